//! One probe series → a heating rate: the least-squares slope over the straight part of its curve,
//! with thaw, sensor-lag, boiling, curvature and outlier trimming (the steps are in the
//! [module overview](super)).

use super::Settings;
use crate::regression::{self, LineFit};
use crate::runs::Reading;

/// Below this robust spread, K, residuals are treated as this spread (readings are rarely finer
/// than 0.1 K; an exact synthetic line would otherwise make every reading an outlier).
const SPREAD_FLOOR_K: f64 = 0.02;
/// Standard deviation of rounding readings to 0.1 K, 0.1/√12 K: the least residual spread a fit
/// is credited with.
const QUANTISATION_SD_K: f64 = 0.028_867_513_459_481_29;

/// What the estimation did with one probe series.
#[derive(Clone, Debug, PartialEq)]
pub struct ProbeFit {
    /// Index into [`crate::runs::HeatingRuns::series`].
    pub series: usize,
    /// The fit over the readings kept (None when too few remain).
    pub fit: Option<LineFit>,
    /// Readings kept in the fit.
    pub used: usize,
    /// Dropped as still thawing.
    pub thaw: usize,
    /// Dropped from the start while the curve bent upwards (sensor lag, thaw tail).
    pub lag: usize,
    /// Dropped at or near boiling, or from the end while the curve bent downwards.
    pub late: usize,
    /// Lines of the readings dropped as outliers.
    pub outliers: Vec<usize>,
    /// The curve never became straight within [`Settings::min_fit`] readings.
    pub curved: bool,
    /// Why the probe is suspect, if it is (its cell is then filled unless another probe covers it).
    pub suspect: Option<String>,
    /// The readings the fit ran over, as indices into the series (outliers inside it excluded
    /// from the fit); empty without a fit.
    pub window: std::ops::Range<usize>,
}

/// Fits one series (`freeze_c`: the food's initial freezing point; `settle_s`: time skipped at the
/// start of the straight part for the sensor to catch up, see [`sensor_lag`]).
pub fn fit_series(
    readings: &[Reading],
    freeze_c: f64,
    settle_s: f64,
    settings: &Settings,
) -> ProbeFit {
    let n = readings.len();
    let start = readings
        .iter()
        .rposition(|r| r.temp_c < freeze_c + settings.thaw_margin_k)
        .map_or(0, |k| k + 1);
    let end = readings[start..]
        .iter()
        .position(|r| r.temp_c >= settings.boil_guard_c)
        .map_or(n, |k| start + k);
    let settled = readings[start..end]
        .iter()
        .position(|r| r.t >= readings[start.min(n - 1)].t + settle_s)
        .map_or(end, |k| start + k);
    let (mut a, mut b) = (settled, end);
    let mut result = ProbeFit {
        series: 0,
        fit: None,
        used: 0,
        thaw: start,
        lag: 0,
        late: n - end,
        outliers: Vec::new(),
        curved: false,
        suspect: None,
        window: 0..0,
    };
    loop {
        if b - a < settings.min_fit {
            result.suspect = Some(format!(
                "only {} readings between the thaw band and {:.0} °C; run longer or start warmer",
                b - a,
                settings.boil_guard_c
            ));
            result.lag = a - start;
            result.late = n - b;
            return result;
        }
        let window = &readings[a..b];
        let (inliers, outliers, bent_ends) = robust_inliers(window, settings.outlier_sigmas);
        // A first reading far above the line is the knee of sensor lag (the line through the rest
        // extrapolates below the start), a last one far below it the approach to boiling: trim
        // them as such rather than calling them outliers.
        if b - a > settings.min_fit {
            if bent_ends.0 {
                a += 1;
                continue;
            }
            if bent_ends.1 {
                b -= 1;
                continue;
            }
        }
        let (t, y): (Vec<f64>, Vec<f64>) = inliers.iter().map(|r| (r.t, r.temp_c)).unzip();
        let bend = regression::curvature_t(&t, &y).unwrap_or(0.0);
        if b - a > settings.min_fit {
            // The last 3, 6, 12 and 24 readings against the line through the rest: the approach
            // to boiling often bends only the last few, too few for a quadratic term to notice.
            if bends_down_at_the_end(&t, &y, settings) {
                b -= 1;
                continue;
            }
            // Each half on its own as well: a lagging start and a bending end together make an S
            // whose overall quadratic term can vanish.
            let half = t.len() / 2;
            let early = regression::curvature_t(&t[..=half], &y[..=half]).unwrap_or(0.0);
            let late = regression::curvature_t(&t[half..], &y[half..]).unwrap_or(0.0);
            let limit = settings.curvature_t;
            if early > limit || (bend > limit && late >= -limit) {
                a += 1;
                continue;
            }
            if late < -limit || bend < -limit {
                b -= 1;
                continue;
            }
        }
        result.curved = bend.abs() > settings.curvature_t;
        result.fit = regression::line(&t, &y).map(|mut f| {
            // Readings are rarely finer than 0.1 K: the residual spread is at least that
            // quantisation's, 0.1/√12 K, or a noise-free run would claim an exact slope.
            if f.residual_sd < QUANTISATION_SD_K && f.n > 2 {
                let mean = t.iter().sum::<f64>() / t.len() as f64;
                let sxx: f64 = t.iter().map(|v| (v - mean).powi(2)).sum();
                f.residual_sd = QUANTISATION_SD_K;
                f.slope_se = QUANTISATION_SD_K / sxx.sqrt();
            }
            // A trace's residuals are autocorrelated: never narrower than the HAC error.
            let hac = regression::slope_se_hac(&t, &y, &f);
            if hac > f.slope_se {
                f.slope_se = hac;
            }
            f
        });
        result.used = inliers.len();
        result.outliers = outliers;
        result.lag = a - start;
        result.late = n - b;
        result.window = a..b;
        break;
    }
    if result.fit.is_none() {
        result.suspect = Some("no line fits its readings".into());
    }
    if let Some(f) = result.fit {
        if result.curved {
            result.suspect = Some(format!(
                "the curve never straightens (still bent over the last {} readings)",
                result.used
            ));
        } else if f.slope < 0.0 && f.slope < -3.0 * f.slope_se {
            result.suspect = Some(format!(
                "cools at {:.3} K/s while the oven heats: not in the food, or displaced",
                -f.slope
            ));
        } else if result.outliers.len() * 5 > result.used {
            result.suspect = Some(format!(
                "{} of {} readings are outliers",
                result.outliers.len(),
                result.used + result.outliers.len()
            ));
        }
    }
    result
}

/// Whether the last readings lie significantly below the line through the others (mean residual
/// below −[`Settings::tail_t`] standard errors for the last 3, 6, 12 or 24 readings).
fn bends_down_at_the_end(t: &[f64], y: &[f64], settings: &Settings) -> bool {
    [3usize, 6, 12, 24]
        .into_iter()
        .filter(|&m| t.len() >= m + settings.min_fit.max(3))
        .any(|m| {
            let k = t.len() - m;
            regression::line(&t[..k], &y[..k]).is_some_and(|body| {
                let tail = (k..t.len()).map(|j| y[j] - body.at(t[j])).sum::<f64>() / m as f64;
                tail < -settings.tail_t * body.residual_sd.max(SPREAD_FLOOR_K) / (m as f64).sqrt()
            })
        })
}

/// The probes' time constant, s, estimated from series that start on the straight part: a
/// first-order sensor on a ramp reads rate × τ below the true temperature once settled, so
/// τ ≈ (first reading − the fitted line at that time) / slope. Returns the median over `series`
/// (each: readings, freezing point), or 0 when none qualifies.
pub fn sensor_lag<'a>(
    series: impl Iterator<Item = (&'a [Reading], f64)>,
    settings: &Settings,
) -> f64 {
    let mut taus: Vec<f64> = series
        .filter_map(|(r, freeze)| {
            if r.first()?.temp_c < freeze + settings.thaw_margin_k {
                return None;
            }
            let f = fit_series(r, freeze, 0.0, settings).fit?;
            (f.slope > 10.0 * f.slope_se && f.slope > 0.0)
                .then(|| ((r[0].temp_c - f.at(r[0].t)) / f.slope).clamp(0.0, MAX_LAG_S))
        })
        .collect();
    let tau = regression::median(&mut taus);
    if tau.is_finite() { tau } else { 0.0 }
}

/// Largest sensor time constant believed, s (beyond it the probe is not in contact).
pub const MAX_LAG_S: f64 = 30.0;

/// Splits a window into readings within `sigmas` robust standard deviations of its line and the
/// lines of the others; also says whether the first reading is an outlier above the line and the
/// last one an outlier below it.
fn robust_inliers(window: &[Reading], sigmas: f64) -> (Vec<Reading>, Vec<usize>, (bool, bool)) {
    let (t, y): (Vec<f64>, Vec<f64>) = window.iter().map(|r| (r.t, r.temp_c)).unzip();
    let Some(f) = regression::line(&t, &y) else {
        return (window.to_vec(), Vec::new(), (false, false));
    };
    let res: Vec<f64> = window.iter().map(|r| r.temp_c - f.at(r.t)).collect();
    let mut abs: Vec<f64> = res.iter().map(|e| e.abs()).collect();
    let limit = sigmas * (1.4826 * regression::median(&mut abs)).max(SPREAD_FLOOR_K);
    let mut inliers = Vec::with_capacity(window.len());
    let mut outliers = Vec::new();
    for (r, e) in window.iter().zip(&res) {
        if e.abs() > limit {
            outliers.push(r.line);
        } else {
            inliers.push(*r);
        }
    }
    let ends = (res[0] > limit, res[res.len() - 1] < -limit);
    (inliers, outliers, ends)
}
