//! Small statistical helpers shared by calibration and the safety bounds: normal and Student's t
//! quantiles.

/// The two-sided 95 % normal quantile, z₀.₉₇₅.
pub const Z975: f64 = 1.959_963_984_540_054;

/// Student's t quantile t₀.₉₇₅(ν) by the Cornish–Fisher expansion in 1/ν (Abramowitz & Stegun
/// 26.7.5), for ν ≥ 3 (smaller ν are taken as 3).
pub fn t975(nu: f64) -> f64 {
    let nu = nu.max(3.0);
    let z = Z975;
    let (z3, z5, z7, z9) = (z.powi(3), z.powi(5), z.powi(7), z.powi(9));
    z + (z3 + z) / (4.0 * nu)
        + (5.0 * z5 + 16.0 * z3 + 3.0 * z) / (96.0 * nu * nu)
        + (3.0 * z7 + 19.0 * z5 + 17.0 * z3 - 15.0 * z) / (384.0 * nu.powi(3))
        + (79.0 * z9 + 776.0 * z7 + 1482.0 * z5 - 1920.0 * z3 - 945.0 * z) / (92160.0 * nu.powi(4))
}

/// The standard normal quantile Φ⁻¹(p) for 0 < p < 1 (NaN outside): P. J. Acklam's rational
/// approximation (relative error below 1.2 × 10⁻⁹).
pub fn normal_quantile(p: f64) -> f64 {
    if !(p > 0.0 && p < 1.0) {
        return f64::NAN;
    }
    const A: [f64; 6] = [
        -3.969_683_028_665_376e1,
        2.209_460_984_245_205e2,
        -2.759_285_104_469_687e2,
        1.383_577_518_672_69e2,
        -3.066_479_806_614_716e1,
        2.506_628_277_459_239,
    ];
    const B: [f64; 5] = [
        -5.447_609_879_822_406e1,
        1.615_858_368_580_409e2,
        -1.556_989_798_598_866e2,
        6.680_131_188_771_972e1,
        -1.328_068_155_288_572e1,
    ];
    const C: [f64; 6] = [
        -7.784_894_002_430_293e-3,
        -3.223_964_580_411_365e-1,
        -2.400_758_277_161_838,
        -2.549_732_539_343_734,
        4.374_664_141_464_968,
        2.938_163_982_698_783,
    ];
    const D: [f64; 4] = [
        7.784_695_709_041_462e-3,
        3.224_671_290_700_398e-1,
        2.445_134_137_142_996,
        3.754_408_661_907_416,
    ];
    let tail = |q: f64| {
        (((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5])
            / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1.0)
    };
    const LOW: f64 = 0.024_25;
    if p < LOW {
        tail((-2.0 * p.ln()).sqrt())
    } else if p > 1.0 - LOW {
        -tail((-2.0 * (1.0 - p).ln()).sqrt())
    } else {
        let q = p - 0.5;
        let r = q * q;
        (((((A[0] * r + A[1]) * r + A[2]) * r + A[3]) * r + A[4]) * r + A[5]) * q
            / (((((B[0] * r + B[1]) * r + B[2]) * r + B[3]) * r + B[4]) * r + 1.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Student's t 97.5 % quantiles as every statistics table prints them (e.g. NIST/SEMATECH
    /// e-Handbook of Statistical Methods, table 1.3.6.7.2): ν = 5: 2.571, 10: 2.228, 30: 2.042.
    #[test]
    fn t_quantiles_match_the_table() {
        for (nu, t) in [(5.0, 2.571), (10.0, 2.228), (30.0, 2.042)] {
            assert!((t975(nu) - t).abs() < 0.002, "ν {nu}: {}", t975(nu));
        }
    }

    /// Standard normal quantiles as printed in statistics tables (e.g. NIST/SEMATECH
    /// e-Handbook, table 1.3.6.7.1): Φ⁻¹(0.975) = 1.95996, Φ⁻¹(0.999) = 3.09023,
    /// Φ⁻¹(0.9999) = 3.71902, Φ⁻¹(0.01) = −2.32635.
    #[test]
    fn normal_quantiles_match_the_table() {
        for (p, z) in [
            (0.975, 1.95996),
            (0.999, 3.09023),
            (0.9999, 3.71902),
            (0.01, -2.32635),
        ] {
            assert!(
                (normal_quantile(p) - z).abs() < 1e-5,
                "p {p}: {}",
                normal_quantile(p)
            );
        }
        assert!(normal_quantile(0.0).is_nan() && normal_quantile(1.0).is_nan());
    }
}
