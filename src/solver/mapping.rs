//! A smooth stretch of the radial coordinate for wavefunctions that reach far from their well.
//!
//! r(x) = s + L (e^((x - s)/L) - 1): r = x at the start s, the step in r is the step in x times
//! r'(x) = 1 + (r - s)/L, so it stays within a factor two of the plain step out to r = s + L
//! and grows in proportion to r beyond. A tail a level bound by little spreads over hundreds or
//! thousands of bohr takes a few hundred points per e-fold of r instead of tens of thousands,
//! and the tail of a power-law potential, which varies on the scale of r itself, stays
//! resolved all the way out. With psi(r(x)) = sqrt(r'(x)) phi(x) the radial equation keeps
//! Numerov's form in x (the Liouville transformation; e.g. F.W.J. Olver, "Asymptotics and
//! Special Functions" (1974), ch. 6):
//!
//! ```text
//!   phi'' = [ r'^2 2 mu (V(r) - E) + F ] phi,   F = 3/4 (r''/r')^2 - 1/2 r'''/r' = 1/(4 L^2)
//! ```
//!
//! (r'' = r'/L and r''' = r'/L^2, so the Schwarzian term is a constant). The same map, on a
//! grid uniform in x, carries the sinc-DVR reference ([`super::dvr`]).

/// The stretch r(x) = start + scale (e^((x - start)/scale) - 1), lengths in bohr.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stretch {
    /// s: r = x here, and the step in r equals the step in x.
    pub start: f64,
    /// L: the step in r has doubled where r - s = L.
    pub scale: f64,
}

impl Stretch {
    /// (r, r', F) at x, F = 1/(4 L^2) the Schwarzian term of the transformed equation.
    pub fn at(&self, x: f64) -> (f64, f64, f64) {
        let t = (x - self.start) / self.scale;
        (
            self.start + self.scale * t.exp_m1(),
            t.exp(),
            0.25 / (self.scale * self.scale),
        )
    }

    /// r(x), bohr.
    pub fn r(&self, x: f64) -> f64 {
        self.at(x).0
    }

    /// The x with r(x) = r.
    pub fn x_of(&self, r: f64) -> f64 {
        self.start + self.scale * ((r - self.start) / self.scale).ln_1p()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn derivatives_agree_with_differences_and_inverse_inverts() {
        // r', r'' = r'/L, r''' = r'/L^2 and F = 3/4 (r''/r')^2 - 1/2 r'''/r' = 1/(4 L^2),
        // against central differences of r (1e-6 relative: the differences' own error at
        // h = 1e-4, our bound).
        let s = Stretch {
            start: 2.0,
            scale: 7.5,
        };
        for x in [2.0, 4.0, 12.0, 40.0] {
            let h = 1e-4;
            let (r, slope, schwarzian) = s.at(x);
            let d1 = (s.r(x + h) - s.r(x - h)) / (2.0 * h);
            let d2 = (s.r(x + h) - 2.0 * r + s.r(x - h)) / (h * h);
            assert!((d1 - slope).abs() < 1e-6 * slope);
            assert!((d2 - slope / s.scale).abs() < 1e-5 * slope / s.scale);
            assert!((schwarzian - 0.25 / (7.5 * 7.5)).abs() < 1e-15);
            assert!((s.x_of(r) - x).abs() < 1e-9 * x);
        }
        assert_eq!(s.r(2.0), 2.0);
    }
}
