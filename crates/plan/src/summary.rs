//! The evaluation as one JSON object: what `traycast solve --format json` prints and what the
//! workbench's `window.traycast.evaluation()` returns, so the two can never disagree in shape.

use crate::evaluate::Evaluation;
use crate::model::Plan;

/// The evaluation's numbers by name (NaN becomes null).
pub fn to_json(plan: &Plan, e: &Evaluation) -> serde_json::Value {
    let finite = |v: &f64| if v.is_finite() { Some(*v) } else { None };
    serde_json::json!({
        "plan": plan.name,
        "dwell_s": e.dwell,
        "total_s": e.total_s,
        "status": e.status.as_str(),
        "kkt_residual": e.kkt_residual,
        "variation": { "oven_power": plan.variation.oven_power, "start_k": plan.variation.start_k },
        "planning": { "objective": plan.planning.objective.as_str(), "placement": plan.planning.placement },
        "loop": e.refinement.as_ref().map(|r| serde_json::json!({
            "passes": r.passes, "converged": r.converged, "change_k": finite(&r.change_k),
            "tolerance_k": r.tolerance_k, "rms_before_k": finite(&r.rms_before), "rms_after_k": finite(&r.rms_after),
            "kept_later_pass": r.kept, "safety_gap_k": finite(&r.safety_gap_k), "stopped": r.stopped,
        })),
        "zones": plan.zones.iter().zip(&e.zones).map(|(z, r)| serde_json::json!({
            "name": z.name, "coverage_linear": r.coverage_linear, "coverage_simulated": r.coverage_simulated,
            "rms_linear_k": r.rms_linear, "rms_simulated_k": r.rms_simulated,
            "diagnosis": r.diagnosis.as_ref().map(ToString::to_string),
        })).collect::<Vec<_>>(),
        "items": plan.items.iter().zip(&e.items).enumerate().map(|(k, (i, r))| serde_json::json!({
            "name": i.name, "min_c": finite(&r.min), "mean_c": finite(&r.mean), "max_c": finite(&r.max), "safe": r.verdict.safe,
            "verdict": crate::evaluate::verdict_words(&r.verdict, e.illustrative()), "missing": r.verdict.missing,
            "illustrative_maps": e.illustrative(),
            "judged": r.judged.map(|j| serde_json::json!({
                "point": j.name(), "row": j.cell / plan.tray.width, "col": j.cell % plan.tray.width,
                "depth_mm": j.depth_m * 1000.0,
            })),
            "margin_k": finite(&r.verdict.margin), "rule": r.verdict.binding.source, "moisture_g": r.moisture_g,
            "log_reduction": r.verdict.kill.and_then(|k| finite(&k.achieved)),
            "log_reduction_required": r.verdict.kill.map(|k| k.target.logs),
            "safety_card": crate::evaluate::SafetyCard::of(plan, e, k).to_json(),
            "uniformity": e.uniformity.get(k).map(|u| {
                let one = |x: &crate::evaluate::Uniformity| serde_json::json!({
                    "cv": finite(&x.cv), "spread_k": finite(&x.spread_k), "in_band": finite(&x.in_band),
                });
                serde_json::json!({
                    "steered_linear": one(&u.steered_linear),
                    "steered_simulated": one(&u.steered_simulated),
                    "unsteered_linear": one(&u.unsteered_linear),
                })
            }),
            "verdict_on": if r.spread.is_some() { "95 % bounds" } else { "nominal temperatures" },
            "bounds_from": e.bounds_from,
            "spread": r.spread.as_ref().map(|s| serde_json::json!({
                "coldest_c": [finite(&s.coldest.0), finite(&s.coldest.1)],
                "mean_c": [finite(&s.mean.0), finite(&s.mean.1)],
                "warmest_c": [finite(&s.warmest.0), finite(&s.warmest.1)],
                "nominal_safe": s.nominal.safe, "nominal_margin_k": finite(&s.nominal.margin),
            })),
        })).collect::<Vec<_>>(),
        "baseline": { "seconds": e.baseline.seconds, "rms_linear_k": e.baseline.rms_linear, "coverage_linear": finite(&e.baseline.coverage_linear) },
        "error_linear": e.error_linear.iter().map(finite).collect::<Vec<_>>(),
        "warnings": e.warnings,
        "cautions": e.cautions,
    })
}

/// A schedule on other ovens ([`crate::evaluate::across_ovens`]) as JSON: per oven, each item's
/// verdict and margin; per item, the oven where it does worst.
pub fn across_ovens_json(plan: &Plan, a: &crate::evaluate::AcrossOvens) -> serde_json::Value {
    let finite = |v: f64| if v.is_finite() { Some(v) } else { None };
    serde_json::json!({
        "ovens": a.ovens.iter().map(|o| serde_json::json!({
            "library": o.library,
            "items": plan.items.iter().zip(&o.items).map(|(i, r)| serde_json::json!({
                "name": i.name, "safe": r.verdict.safe, "margin_k": finite(r.verdict.margin),
                "log_reduction": r.verdict.kill.and_then(|k| finite(k.achieved)),
            })).collect::<Vec<_>>(),
        })).collect::<Vec<_>>(),
        "worst": a.worst.iter().enumerate().map(|(k, &w)| {
            let v = &a.ovens[w].items[k].verdict;
            serde_json::json!({
                "name": plan.items[k].name, "library": a.ovens[w].library,
                "safe": v.safe, "margin_k": finite(v.margin),
            })
        }).collect::<Vec<_>>(),
    })
}

/// Each item's safety margin over the scenarios ([`crate::robustness::safety_margins`]), with
/// the lower `quantile` of it.
pub fn scenarios_json(
    plan: &Plan,
    m: &crate::robustness::SafetyMargins,
    quantile: f64,
) -> serde_json::Value {
    let finite = |v: f64| if v.is_finite() { Some(v) } else { None };
    serde_json::json!({
        "names": m.scenarios,
        "quantile": quantile,
        "items": plan.items.iter().enumerate().map(|(k, i)| {
            let (lo, mid, hi, at) = m.spread(k);
            serde_json::json!({
                "name": i.name,
                "margins_k": m.margins.iter().map(|s| finite(s[k])).collect::<Vec<_>>(),
                "least_k": finite(lo), "quantile_k": finite(m.quantile(k, quantile)), "median_k": finite(mid), "largest_k": finite(hi), "least_in": at,
            })
        }).collect::<Vec<_>>(),
    })
}
