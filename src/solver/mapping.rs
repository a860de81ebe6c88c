//! A smooth stretch of the radial coordinate for the tails of weakly bound levels.
//!
//! r(x) = x + (g - 1) w ln(1 + exp((x - x_s)/w)): uniform (r = x) well inside x_s, and steps
//! g times longer far outside it, joined smoothly over a width w. With
//! psi(r(x)) = sqrt(r'(x)) phi(x) the radial equation keeps Numerov's form in x
//! (the Liouville transformation; e.g. F.W.J. Olver, "Asymptotics and Special Functions"
//! (1974), ch. 6):
//!
//! ```text
//!   phi'' = [ r'^2 2 mu (V(r) - E) + F(x) ] phi,   F = 3/4 (r''/r')^2 - 1/2 r'''/r'
//! ```
//!
//! so a level bound by little, whose wavefunction reaches hundreds of bohr, needs a few hundred
//! points in its tail instead of tens of thousands.

/// The stretch r(x). `gain` = 1 is the identity.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stretch {
    /// x_s, where stretching sets in, bohr.
    pub onset: f64,
    /// w, the width of the transition, bohr.
    pub width: f64,
    /// g, the ratio of the far step to the near step.
    pub gain: f64,
}

impl Stretch {
    /// (r, r', F) at x, F = 3/4 (r''/r')^2 - 1/2 r'''/r' (minus half the Schwarzian
    /// derivative), with one exponential: t = (x - x_s)/w, e = exp(-|t|),
    /// softplus(t) = max(t, 0) + ln(1 + e), and the logistic sigma(t) = 1/(1 + e) for t >= 0,
    /// e/(1 + e) below.
    pub fn at(&self, x: f64) -> (f64, f64, f64) {
        let t = (x - self.onset) / self.width;
        let e = (-t.abs()).exp();
        let softplus = t.max(0.0) + e.ln_1p();
        let sigma = if t >= 0.0 {
            1.0 / (1.0 + e)
        } else {
            e / (1.0 + e)
        };
        let r = x + (self.gain - 1.0) * self.width * softplus;
        let (first, second, third) = self.derivatives_from(sigma);
        let schwarzian = 0.75 * (second / first).powi(2) - 0.5 * third / first;
        (r, first, schwarzian)
    }

    /// r(x), bohr.
    pub fn r(&self, x: f64) -> f64 {
        self.at(x).0
    }

    /// (r', r'', r''') at x (the tests check them against differences of r).
    #[cfg(test)]
    fn derivatives(&self, x: f64) -> (f64, f64, f64) {
        self.derivatives_from(1.0 / (1.0 + (-(x - self.onset) / self.width).exp()))
    }

    /// (r', r'', r''') from the logistic sigma at x.
    fn derivatives_from(&self, sigma: f64) -> (f64, f64, f64) {
        let k = self.gain - 1.0;
        let first = 1.0 + k * sigma;
        let second = k * sigma * (1.0 - sigma) / self.width;
        let third = k * sigma * (1.0 - sigma) * (1.0 - 2.0 * sigma) / (self.width * self.width);
        (first, second, third)
    }

    /// The x with r(x) = r (r is increasing), by bisection.
    pub fn x_of(&self, r: f64) -> f64 {
        let (mut lo, mut hi) = (r - (self.gain - 1.0) * self.width * 50.0 - r.abs() - 1.0, r);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if self.r(mid) < r {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        0.5 * (lo + hi)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn derivatives_agree_with_differences_and_inverse_inverts() {
        let s = Stretch {
            onset: 5.0,
            width: 1.5,
            gain: 20.0,
        };
        for x in [0.0, 4.0, 5.0, 7.0, 12.0] {
            let h = 1e-4;
            let (d1, d2, _) = s.derivatives(x);
            assert!(((s.r(x + h) - s.r(x - h)) / (2.0 * h) - d1).abs() < 1e-6 * d1);
            let d2_numeric = (s.r(x + h) - 2.0 * s.r(x) + s.r(x - h)) / (h * h);
            assert!((d2_numeric - d2).abs() < 1e-4 * (1.0 + d2.abs()));
            assert!((s.x_of(s.r(x)) - x).abs() < 1e-9);
        }
        assert!((s.derivatives(40.0).0 - 20.0).abs() < 1e-6);
        // at() gives r' and F = 3/4 (r''/r')^2 - 1/2 r'''/r' from the same derivatives; the
        // two logistic evaluations differ by rounding only (1e-12 bounds that; common practice).
        for x in [3.0, 5.0, 6.5] {
            let (r, slope, schwarzian) = s.at(x);
            let (d1, d2, d3) = s.derivatives(x);
            assert!((r - s.r(x)).abs() < 1e-12 && (slope - d1).abs() < 1e-12 * d1);
            assert!((schwarzian - (0.75 * (d2 / d1).powi(2) - 0.5 * d3 / d1)).abs() < 1e-12);
        }
    }
}
