//! A binding time budget: one multiplier ν on Σx, found by bracketed Illinois regula falsi on
//! Σx(ν), which is non-increasing and piecewise linear.

use super::{DwellSolver, MAX_BUDGET};
use crate::problem::Spec;
use crate::solution::Iterations;

impl DwellSolver {
    /// Multiplier search for a binding budget. Returns false if any inner solve hit its limit.
    pub(super) fn budget_search(
        &mut self,
        spec: &Spec,
        upper: &[f64],
        budget: f64,
        it: &mut Iterations,
    ) -> bool {
        let total = |s: &Self| s.vars.x.iter().sum::<f64>() - budget;
        let mut ok = true;
        // At ν ≥ max_j ‖a_j‖·‖t‖ + |μ| every gradient is non-negative at x = 0 (Cauchy–Schwarz), so Σx(ν) = 0.
        let y = self.y_scale;
        let mut hi = self
            .colnorm2
            .iter()
            .fold(0.0f64, |m, c| m.max(c.sqrt() * y))
            * (1.0 + 1e-9)
            + 1e-300;
        let mut s_hi = -budget;
        // When the optimum at ν = 0 is not unique, Σx can jump at 0: a tiny ν picks the optimum with
        // the least total time, and if that one fits, the budget does not really bind.
        // The probe must be well above the KKT tolerance to steer the active set; the re-solve at ν = 0
        // from the probe's active set then removes its bias.
        let probe = hi * 1e-7;
        it.budget += 1;
        ok &= self.newton(spec, upper, probe, it);
        let s = total(self);
        // The last solutions on each side of the root, with their true excess Σx − T.
        let (mut lo, mut s_lo, mut x_lo);
        let mut x_hi: Option<(Vec<f64>, f64)> = None;
        let mut have_hi_solution = false;
        if s <= 0.0 {
            let at_probe = (self.vars.x.clone(), s);
            ok &= self.newton(spec, upper, 0.0, it);
            let s0 = total(self);
            if s0 <= 0.0 {
                self.nu = 0.0;
                return ok;
            }
            // Σx(0) > T ≥ Σx(probe): the root lies between 0 and the probe (a flat objective, a
            // small ridge, makes Σx steep in ν). Search there; never keep the probe's point, which
            // leaves time unused and is not optimal.
            (lo, s_lo, x_lo) = (0.0, s0, (self.vars.x.clone(), s0));
            (hi, s_hi) = (probe, s);
            x_hi = Some(at_probe);
            have_hi_solution = true;
        } else {
            (lo, s_lo, x_lo) = (probe, s, (self.vars.x.clone(), s));
        }
        let mut side = 0i8;
        while it.budget < MAX_BUDGET {
            let nu = if it.budget == 1 && self.nu > lo && self.nu < hi {
                self.nu
            } else {
                let r = hi - s_hi * (hi - lo) / (s_hi - s_lo);
                if r.is_finite() && r > lo && r < hi {
                    r
                } else {
                    0.5 * (lo + hi)
                }
            };
            it.budget += 1;
            ok &= self.newton(spec, upper, nu, it);
            let s = total(self);
            if s.abs() <= 1e-11 * budget.max(1e-300) {
                self.nu = nu;
                return ok;
            }
            if s > 0.0 {
                lo = nu;
                s_lo = s;
                x_lo = (self.vars.x.clone(), s);
                if side == -1 {
                    s_hi *= 0.5;
                }
                side = -1;
            } else {
                hi = nu;
                s_hi = s;
                x_hi = Some((self.vars.x.clone(), s));
                have_hi_solution = true;
                if side == 1 {
                    s_lo *= 0.5;
                }
                side = 1;
            }
            if hi - lo <= 1e-15 * hi {
                break;
            }
        }
        // Land on the root: x(ν) is linear between breakpoints, so when the bracket has closed the
        // point on the segment between the two sides' solutions with Σx = T is the optimum.
        if let Some((xh, sh)) = &x_hi {
            let (xl, sl) = &x_lo;
            let theta = (-sh / (sl - sh)).clamp(0.0, 1.0);
            let x: Vec<f64> = xh
                .iter()
                .zip(xl)
                .map(|(h, l)| h + theta * (l - h))
                .collect();
            self.move_to(spec, &x);
            self.vars.resnap(upper);
            self.vars.factor_valid = false;
        } else if !have_hi_solution || total(self) > 0.0 {
            ok &= self.newton(spec, upper, hi, it);
        }
        let sum: f64 = self.vars.x.iter().sum();
        if sum > budget {
            let x: Vec<f64> = self.vars.x.iter().map(|v| v * budget / sum).collect();
            self.move_to(spec, &x);
            self.vars.resnap(upper);
        }
        self.nu = hi;
        ok && it.budget < MAX_BUDGET
    }
}
