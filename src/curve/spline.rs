//! Interpolating cubic spline on unevenly spaced knots.
//!
//! Written here rather than taken from a crate because none of the maintained interpolation
//! crates we looked at offers the not-a-knot end condition with analytic first and second
//! derivatives. The construction is the textbook one (de Boor, "A Practical Guide to Splines",
//! ch. IV): solve a tridiagonal system for the second derivatives M_i at the knots; on
//! [x_i, x_{i+1}] with h = x_{i+1} - x_i, t = (x - x_i)/h,
//! S(x) = (1-t) y_i + t y_{i+1} + h^2/6 [((1-t)^3 - (1-t)) M_i + (t^3 - t) M_{i+1}].

/// End condition of the spline.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SplineEnd {
    /// Third derivative continuous across the second and the next-to-last knots (de Boor).
    #[default]
    NotAKnot,
    /// Zero second derivative at both ends.
    Natural,
}

/// A cubic spline through (x_i, y_i), x strictly increasing, at least 4 knots.
#[derive(Debug, Clone)]
pub struct CubicSpline {
    x: Vec<f64>,
    y: Vec<f64>,
    second: Vec<f64>,
}

impl CubicSpline {
    /// Build the spline. The caller guarantees at least 4 knots with x strictly increasing.
    pub fn new(x: Vec<f64>, y: Vec<f64>, end: SplineEnd) -> CubicSpline {
        let n = x.len();
        assert!(n >= 4 && y.len() == n, "spline needs at least 4 knots");
        let h: Vec<f64> = x.windows(2).map(|w| w[1] - w[0]).collect();
        let m = n - 2; // unknowns M_1 .. M_{n-2}
        let mut lower = vec![0.0; m];
        let mut diag = vec![0.0; m];
        let mut upper = vec![0.0; m];
        let mut rhs = vec![0.0; m];
        for k in 0..m {
            let i = k + 1;
            lower[k] = h[i - 1];
            diag[k] = 2.0 * (h[i - 1] + h[i]);
            upper[k] = h[i];
            rhs[k] = 6.0 * ((y[i + 1] - y[i]) / h[i] - (y[i] - y[i - 1]) / h[i - 1]);
        }
        if end == SplineEnd::NotAKnot {
            // M_0 = M_1 (1 + h0/h1) - M_2 h0/h1, folded into the first row.
            let (h0, h1) = (h[0], h[1]);
            diag[0] += h0 + h0 * h0 / h1;
            upper[0] -= h0 * h0 / h1;
            // M_{n-1} = M_{n-2} (1 + hb/ha) - M_{n-3} hb/ha, folded into the last row.
            let (ha, hb) = (h[n - 3], h[n - 2]);
            diag[m - 1] += hb + hb * hb / ha;
            lower[m - 1] -= hb * hb / ha;
        }
        let interior = solve_tridiagonal(&lower, &diag, &upper, &rhs);
        let mut second = vec![0.0; n];
        second[1..n - 1].copy_from_slice(&interior);
        if end == SplineEnd::NotAKnot {
            let (h0, h1) = (h[0], h[1]);
            second[0] = second[1] * (1.0 + h0 / h1) - second[2] * h0 / h1;
            let (ha, hb) = (h[n - 3], h[n - 2]);
            second[n - 1] = second[n - 2] * (1.0 + hb / ha) - second[n - 3] * hb / ha;
        }
        CubicSpline { x, y, second }
    }

    /// The knots.
    pub fn knots(&self) -> (&[f64], &[f64]) {
        (&self.x, &self.y)
    }

    fn interval(&self, x: f64) -> usize {
        let i = self.x.partition_point(|&k| k <= x);
        i.clamp(1, self.x.len() - 1) - 1
    }

    /// Value, first and second derivative at x (the end cubics continue beyond the knots).
    pub fn evaluate(&self, x: f64) -> (f64, f64, f64) {
        let i = self.interval(x);
        let h = self.x[i + 1] - self.x[i];
        let t = (x - self.x[i]) / h;
        let u = 1.0 - t;
        let (m0, m1) = (self.second[i], self.second[i + 1]);
        let (y0, y1) = (self.y[i], self.y[i + 1]);
        let value = u * y0 + t * y1 + h * h / 6.0 * ((u * u * u - u) * m0 + (t * t * t - t) * m1);
        let slope =
            (y1 - y0) / h + h / 6.0 * (-(3.0 * u * u - 1.0) * m0 + (3.0 * t * t - 1.0) * m1);
        let curvature = u * m0 + t * m1;
        (value, slope, curvature)
    }
}

/// Thomas algorithm for a tridiagonal system (diagonally dominant here, so no pivoting).
fn solve_tridiagonal(lower: &[f64], diag: &[f64], upper: &[f64], rhs: &[f64]) -> Vec<f64> {
    let n = diag.len();
    let mut c = vec![0.0; n];
    let mut d = vec![0.0; n];
    c[0] = upper[0] / diag[0];
    d[0] = rhs[0] / diag[0];
    for i in 1..n {
        let denom = diag[i] - lower[i] * c[i - 1];
        c[i] = upper[i] / denom;
        d[i] = (rhs[i] - lower[i] * d[i - 1]) / denom;
    }
    let mut x = vec![0.0; n];
    x[n - 1] = d[n - 1];
    for i in (0..n - 1).rev() {
        x[i] = d[i] - c[i] * x[i + 1];
    }
    x
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn not_a_knot_reproduces_a_cubic_exactly() {
        // A cubic is reproduced exactly by the not-a-knot spline (de Boor, ch. IV).
        let f = |x: f64| 2.0 - x + 0.5 * x * x - 0.3 * x * x * x;
        let x: Vec<f64> = [0.0, 0.3, 1.1, 1.7, 2.0, 3.2, 4.0].to_vec();
        let y = x.iter().map(|&v| f(v)).collect();
        let spline = CubicSpline::new(x, y, SplineEnd::NotAKnot);
        for probe in [0.1, 0.9, 2.5, 3.9] {
            let (v, d1, d2) = spline.evaluate(probe);
            assert!((v - f(probe)).abs() < 1e-12);
            assert!((d1 - (-1.0 + probe - 0.9 * probe * probe)).abs() < 1e-11);
            assert!((d2 - (1.0 - 1.8 * probe)).abs() < 1e-10);
        }
    }

    #[test]
    fn natural_spline_has_zero_end_curvature() {
        let x: Vec<f64> = (0..6).map(f64::from).collect();
        let y = x.iter().map(|v| v.sin()).collect();
        let spline = CubicSpline::new(x, y, SplineEnd::Natural);
        assert!(spline.evaluate(0.0).2.abs() < 1e-14);
        assert!(spline.evaluate(5.0).2.abs() < 1e-14);
    }
}
