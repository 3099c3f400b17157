//! Time at temperature: how many log10 of a target pathogen a temperature history kills.
//!
//! Bigelow's log-linear model: at temperature T the decimal reduction time is
//! D(T) = D_ref · 10^((T_ref − T)/z), and a history kills ∫ dt / D(T(t)) log10. The history is
//! taken as piecewise linear between its samples, on which the integral is exact (the logarithmic
//! mean of the end rates), so no step size flatters it.
//!
//! Below each curve's `floor_c` (the lowest temperature of the table it comes from) no kill is
//! counted: the published curves do not reach lower, and the log-linear model overstates kill
//! there (McMinn et al., Meat and Muscle Biology 2018, found less than Appendix A's kill at
//! 54.4 °C). Counting none errs towards the conservative verdict.

use std::f64::consts::LN_10;

/// A pathogen's thermal death-time curve.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct KillCurve {
    /// The target pathogen.
    pub pathogen: &'static str,
    /// Reference temperature, °C.
    pub t_ref_c: f64,
    /// Decimal reduction time at the reference temperature, s.
    pub d_ref_s: f64,
    /// z-value: the temperature rise that divides D by ten, K.
    pub z_k: f64,
    /// No kill is counted below this temperature, °C.
    pub floor_c: f64,
    /// Where the numbers come from.
    pub source: &'static str,
}

/// °F to °C, exactly.
const fn celsius(fahrenheit: f64) -> f64 {
    (fahrenheit - 32.0) * 5.0 / 9.0
}

/// Salmonella in meat (beef, pork, lamb): USDA FSIS Appendix A (1999 compliance guidelines for
/// cooked beef, roast beef and corned beef), the 6.5-log10 column: 112 min at 130 °F, and every
/// 1 °F higher divides the time by 10^0.1 (z = 10 °F = 5.56 K), which the table's rows from
/// 130 °F to 157 °F follow within their rounding.
pub const SALMONELLA_MEAT: KillCurve = KillCurve {
    pathogen: "Salmonella",
    t_ref_c: celsius(130.0),
    d_ref_s: 112.0 * 60.0 / 6.5,
    z_k: 50.0 / 9.0,
    floor_c: celsius(130.0),
    source: "FSIS Appendix A (1999): 6.5 log10 in 112 min at 130 °F, z 10 °F",
};

/// Salmonella in poultry: USDA FSIS time–temperature tables for cooking ready-to-eat poultry
/// products, chicken with 12 % fat (the most heat-tolerant chicken column): 7.0 log10 in 81.4 min
/// at 136 °F (57.8 °C), as reproduced in the Canadian Food Inspection Agency's "Preventive control
/// recommendations for manufacturing cooked ready-to-eat meat products", Table 2; with Appendix A's
/// z = 10 °F, which the table's 1 %-fat rows at 136 and 137 °F (63.3 and 50.1 min) follow within
/// 0.4 %. Longer than every leaner chicken row, so it errs towards the conservative side.
pub const SALMONELLA_POULTRY: KillCurve = KillCurve {
    pathogen: "Salmonella",
    t_ref_c: celsius(136.0),
    d_ref_s: 81.4 * 60.0 / 7.0,
    z_k: 50.0 / 9.0,
    floor_c: celsius(136.0),
    source: "FSIS ready-to-eat poultry tables, chicken 12 % fat: 7.0 log10 in 81.4 min at 136 °F, z 10 °F",
};

/// Listeria monocytogenes: the 6-log10 process of the UK Advisory Committee on the Microbiological
/// Safety of Food (1995), adopted by the European Chilled Food Federation's guidelines: 70 °C for
/// 2 min, z = 7.5 K, tabulated from 60 °C (45 min) to 80 °C (6 s). Recalled from memory.
pub const LISTERIA: KillCurve = KillCurve {
    pathogen: "Listeria monocytogenes",
    t_ref_c: 70.0,
    d_ref_s: 120.0 / 6.0,
    z_k: 7.5,
    floor_c: 60.0,
    source: "UK ACMSF (1995) / ECFF: 6 log10 in 2 min at 70 °C, z 7.5 K (from memory)",
};

/// The kill a food category must reach at its coldest point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct KillTarget {
    /// The curve of its target pathogen.
    pub curve: KillCurve,
    /// Log10 reduction required.
    pub logs: f64,
    /// Where the requirement comes from.
    pub source: &'static str,
}

impl KillCurve {
    /// Decimal reduction time at `t` °C, s (infinite below the floor).
    pub fn d_seconds(&self, t: f64) -> f64 {
        if t < self.floor_c {
            f64::INFINITY
        } else {
            self.d_ref_s * 10f64.powf((self.t_ref_c - t) / self.z_k)
        }
    }

    /// Seconds at a constant `t` °C that kill `logs` log10.
    pub fn hold_seconds(&self, t: f64, logs: f64) -> f64 {
        logs * self.d_seconds(t)
    }

    /// Log10 reduction along a temperature history (`temps` °C at `times` s), linear between
    /// samples. A history with a non-finite value kills nothing it can vouch for: NaN.
    pub fn log_reduction(&self, times: &[f64], temps: &[f64]) -> f64 {
        debug_assert_eq!(times.len(), temps.len());
        let mut logs = 0.0;
        for k in 1..times.len().min(temps.len()) {
            logs += self.segment(times[k - 1], temps[k - 1], times[k], temps[k]);
        }
        logs
    }

    /// Kill over one linear piece, exact: only the part above the floor counts.
    fn segment(&self, t0: f64, mut a: f64, t1: f64, mut b: f64) -> f64 {
        if !(a.is_finite() && b.is_finite()) {
            return f64::NAN;
        }
        let mut dt = t1 - t0;
        if dt <= 0.0 || (a < self.floor_c && b < self.floor_c) {
            return 0.0;
        }
        // Keep only the time above the floor.
        if a < self.floor_c {
            dt *= (b - self.floor_c) / (b - a);
            a = self.floor_c;
        } else if b < self.floor_c {
            dt *= (a - self.floor_c) / (a - b);
            b = self.floor_c;
        }
        let (ra, rb) = (1.0 / self.d_seconds(a), 1.0 / self.d_seconds(b));
        // ∫ 10^(c + s·t) dt over the piece: the logarithmic mean of the end rates times dt.
        let x = (b - a) * LN_10 / self.z_k;
        if x.abs() < 1e-9 {
            dt * 0.5 * (ra + rb)
        } else {
            dt * (rb - ra) / x
        }
    }
}
