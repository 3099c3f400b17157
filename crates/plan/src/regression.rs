//! Ordinary least squares for heating curves: the straight line through (t, T) with the standard
//! errors of its slope and intercept, and the curvature test that finds where a curve stops being
//! straight.
//!
//! The formulas are the textbook ones (and what SciPy's `linregress` returns):
//! slope b = Sxy / Sxx, intercept a = ȳ − b·x̄, r = Sxy / √(Sxx·Syy),
//! s² = Σ(y − a − b·x)² / (n − 2), SE(b) = √(s² / Sxx), SE(a) = SE(b)·√(Σx² / n).

/// A fitted straight line.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LineFit {
    /// Points used.
    pub n: usize,
    /// Slope (y units per x unit).
    pub slope: f64,
    /// Intercept at x = 0.
    pub intercept: f64,
    /// Pearson correlation coefficient r (NaN when y is constant).
    pub r: f64,
    /// Standard error of the slope (NaN with fewer than 3 points).
    pub slope_se: f64,
    /// Standard error of the intercept (NaN with fewer than 3 points).
    pub intercept_se: f64,
    /// Residual standard deviation s = √(SSR / (n − 2)).
    pub residual_sd: f64,
}

impl LineFit {
    /// Coefficient of determination r².
    pub fn r_squared(&self) -> f64 {
        self.r * self.r
    }

    /// The fitted value at `x`.
    pub fn at(&self, x: f64) -> f64 {
        self.intercept + self.slope * x
    }
}

/// Fits y = a + b·x by least squares. `None` with fewer than two points or when every x is equal.
pub fn line(x: &[f64], y: &[f64]) -> Option<LineFit> {
    let n = x.len().min(y.len());
    if n < 2 {
        return None;
    }
    let nf = n as f64;
    let mx = x[..n].iter().sum::<f64>() / nf;
    let my = y[..n].iter().sum::<f64>() / nf;
    let (mut sxx, mut sxy, mut syy) = (0.0, 0.0, 0.0);
    for (xi, yi) in x.iter().zip(y) {
        let (dx, dy) = (xi - mx, yi - my);
        sxx += dx * dx;
        sxy += dx * dy;
        syy += dy * dy;
    }
    if sxx <= 0.0 {
        return None;
    }
    let slope = sxy / sxx;
    let intercept = my - slope * mx;
    let r = if syy > 0.0 {
        (sxy / (sxx * syy).sqrt()).clamp(-1.0, 1.0)
    } else {
        f64::NAN
    };
    let (slope_se, intercept_se, residual_sd) = if n > 2 {
        // SSR = Syy − b·Sxy, computed from the residuals to avoid cancellation.
        let ssr: f64 = x
            .iter()
            .zip(y)
            .map(|(xi, yi)| {
                let e = yi - intercept - slope * xi;
                e * e
            })
            .sum();
        let s2 = ssr / (nf - 2.0);
        let se = (s2 / sxx).sqrt();
        let sum_x2: f64 = x[..n].iter().map(|v| v * v).sum();
        (se, se * (sum_x2 / nf).sqrt(), s2.sqrt())
    } else {
        (f64::NAN, f64::NAN, f64::NAN)
    };
    Some(LineFit {
        n,
        slope,
        intercept,
        r,
        slope_se,
        intercept_se,
        residual_sd,
    })
}

/// The t statistic of the quadratic term when y = a + b·x + c·x² is fitted (positive: the curve
/// bends upwards). `None` with fewer than four points or a degenerate design.
///
/// Centred and scaled x keeps the 3 × 3 normal equations well conditioned; they are solved by
/// Cramer's rule, and the t statistic is c / SE(c) with SE(c)² = s²·(XᵀX)⁻¹₂₂.
pub fn curvature_t(x: &[f64], y: &[f64]) -> Option<f64> {
    let n = x.len().min(y.len());
    if n < 4 {
        return None;
    }
    let nf = n as f64;
    let mx = x[..n].iter().sum::<f64>() / nf;
    let half = x[..n].iter().map(|v| (v - mx).abs()).fold(0.0f64, f64::max);
    if half <= 0.0 {
        return None;
    }
    let u: Vec<f64> = x[..n].iter().map(|v| (v - mx) / half).collect();
    let (mut s1, mut s2, mut s3, mut s4) = (0.0, 0.0, 0.0, 0.0);
    let (mut t0, mut t1, mut t2) = (0.0, 0.0, 0.0);
    for (ui, yi) in u.iter().zip(y) {
        let u2 = ui * ui;
        s1 += ui;
        s2 += u2;
        s3 += u2 * ui;
        s4 += u2 * u2;
        t0 += yi;
        t1 += ui * yi;
        t2 += u2 * yi;
    }
    let m = [[nf, s1, s2], [s1, s2, s3], [s2, s3, s4]];
    let det = |m: &[[f64; 3]; 3]| {
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
            - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
            + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
    };
    let d = det(&m);
    if d.abs() <= 1e-12 * nf * nf * nf {
        return None;
    }
    let rhs = [t0, t1, t2];
    let solve_col = |k: usize| {
        let mut mk = m;
        for r in 0..3 {
            mk[r][k] = rhs[r];
        }
        det(&mk) / d
    };
    let (a, b, c) = (solve_col(0), solve_col(1), solve_col(2));
    let ssr: f64 = u
        .iter()
        .zip(y)
        .map(|(ui, yi)| {
            let e = yi - a - b * ui - c * ui * ui;
            e * e
        })
        .sum();
    let s2_res = ssr / (nf - 3.0);
    // (XᵀX)⁻¹ entry (2,2) = cofactor(2,2) / det.
    let inv22 = (m[0][0] * m[1][1] - m[0][1] * m[1][0]) / d;
    let se = (s2_res * inv22).sqrt();
    if se > 0.0 {
        Some(c / se)
    } else if c == 0.0 {
        Some(0.0)
    } else {
        Some(c.signum() * f64::INFINITY)
    }
}

/// Median of a slice (NaN when empty); the slice is reordered.
pub fn median(v: &mut [f64]) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    v.sort_by(f64::total_cmp);
    let m = v.len() / 2;
    if v.len() % 2 == 1 {
        v[m]
    } else {
        0.5 * (v[m - 1] + v[m])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exact_line_has_zero_errors() {
        let x = [0.0, 1.0, 2.0, 3.0];
        let y = [1.0, 3.0, 5.0, 7.0];
        let f = line(&x, &y).unwrap();
        assert!((f.slope - 2.0).abs() < 1e-12 && (f.intercept - 1.0).abs() < 1e-12);
        assert!(f.slope_se < 1e-12 && (f.r - 1.0).abs() < 1e-12);
        assert!(curvature_t(&x, &y).unwrap().abs() < 1e3);
    }

    #[test]
    fn parabola_bends_up() {
        let x: Vec<f64> = (0..10).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(k, v)| v * v + if k % 2 == 0 { 0.01 } else { -0.01 })
            .collect();
        assert!(curvature_t(&x, &y).unwrap() > 100.0);
        let y2: Vec<f64> = y.iter().map(|v| -v).collect();
        assert!(curvature_t(&x, &y2).unwrap() < -100.0);
    }

    #[test]
    fn degenerate_inputs() {
        assert!(line(&[1.0], &[2.0]).is_none());
        assert!(line(&[1.0, 1.0], &[2.0, 3.0]).is_none());
        assert!(curvature_t(&[0.0, 1.0, 2.0], &[0.0, 1.0, 2.0]).is_none());
        assert!(median(&mut []).is_nan());
        assert_eq!(median(&mut [3.0, 1.0, 2.0, 10.0]), 2.5);
    }
}
