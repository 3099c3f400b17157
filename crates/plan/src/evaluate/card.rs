//! One safety card per food item: the same facts, in the same words, in the workbench, the command
//! line, the JSON summary and the printed report. The cautions ([`crate::evaluate::Evaluation`]'s
//! `cautions`) are shown beside the cards wherever they are.

use super::report::{Evaluation, ItemSummary, logs, verdict_words};
use crate::model::Plan;
use traycast_thermal::safety::{Kill, minutes, stand_words};

/// What a food item's verdict rests on.
#[derive(Clone, Debug, PartialEq)]
pub struct SafetyCard {
    /// The item's name.
    pub item: String,
    /// True when every part of the verdict holds.
    pub safe: bool,
    /// The verdict in words ([`verdict_words`]).
    pub verdict: String,
    /// "coldest point" or "warmest point".
    pub point: &'static str,
    /// Where that point is: "row 3, col 7, 12 mm deep" (None for an item with no cells).
    pub place: Option<String>,
    /// Its temperature after standing, °C (the nominal prediction).
    pub temperature_c: f64,
    /// Its 95 % bound (lower for the coldest point, upper for the warmest), °C, when the maps
    /// carry errors; the verdict is then judged on it.
    pub bound_c: Option<f64>,
    /// The limit the binding rule sets, °C.
    pub limit_c: f64,
    /// Margin against it, K, on what the verdict was judged on.
    pub margin_k: f64,
    /// The kill of the target pathogen at the coldest point, when the item's category asks for one.
    pub kill: Option<Kill>,
    /// The plan's stand, s.
    pub stood_s: f64,
    /// Covered while heating and standing.
    pub covered: bool,
    /// The stand the rules ask for, s, and whether covered.
    pub stand_required: (f64, bool),
    /// The binding rule's source.
    pub rule: String,
}

impl SafetyCard {
    /// The card of item `k` of `plan`, from its summary in `e`.
    pub fn of(plan: &Plan, e: &Evaluation, k: usize) -> SafetyCard {
        let s: &ItemSummary = &e.items[k];
        let v = &s.verdict;
        let warmest = !v.binding.minimum;
        let pick =
            |v: &traycast_thermal::safety::Verdict| if warmest { v.warmest } else { v.coldest };
        let (temperature_c, bound_c) = match &s.spread {
            Some(sp) => (pick(&sp.nominal), Some(pick(v))),
            None => (pick(v), None),
        };
        SafetyCard {
            item: plan.items[k].name.clone(),
            safe: v.safe,
            verdict: verdict_words(v, e.illustrative()),
            point: if warmest {
                "warmest point"
            } else {
                "coldest point"
            },
            place: s.judged.map(|j| j.place(plan.tray.width)),
            temperature_c,
            bound_c,
            limit_c: v.binding.celsius,
            margin_k: v.margin,
            kill: v.kill,
            stood_s: plan.oven.standing_s,
            covered: plan.items[k].covered,
            stand_required: (v.stand_required_s, v.cover_required),
            rule: v.binding.source.clone(),
        }
    }

    /// Every card of an evaluation, in item order (none when the evaluation belongs to a plan
    /// with other items: a front end may hold a result while the next one is computed).
    pub fn all(plan: &Plan, e: &Evaluation) -> Vec<SafetyCard> {
        if e.items.len() != plan.items.len() {
            return Vec::new();
        }
        (0..e.items.len())
            .map(|k| SafetyCard::of(plan, e, k))
            .collect()
    }

    /// The card as lines of text, temperatures written by `temp` and differences by `diff` (so a
    /// front end can show its own unit): verdict, point, kill, stand, rule.
    pub fn lines(&self, temp: &dyn Fn(f64) -> String, diff: &dyn Fn(f64) -> String) -> Vec<String> {
        let bound = self.bound_c.map_or(String::new(), |b| {
            format!(
                "; 95 % {} bound {}, judged on it",
                if self.point == "coldest point" {
                    "lower"
                } else {
                    "upper"
                },
                temp(b)
            )
        });
        let point = match &self.place {
            Some(place) => format!(
                "{} ({place}): {}{bound}; limit {}, margin {}",
                self.point,
                temp(self.temperature_c),
                temp(self.limit_c),
                diff(self.margin_k)
            ),
            None => format!("{}: none (the item has no cells)", self.point),
        };
        let kill = match self.kill {
            Some(k) if k.achieved.is_nan() => format!(
                "kill: not computed; {} log10 {} needed ({})",
                k.target.logs, k.target.curve.pathogen, k.target.source
            ),
            Some(k) => format!(
                "kill at the coldest point: {} of {} log10 {} needed ({}; curve: {})",
                logs(k.achieved),
                k.target.logs,
                k.target.curve.pathogen,
                k.target.source,
                k.target.curve.source
            ),
            None => "kill: no kill step asked for by this item's rules".to_string(),
        };
        let (need_s, need_cover) = self.stand_required;
        let stand = format!(
            "stand: {} {} (rules ask: {})",
            minutes(self.stood_s),
            if self.covered { "covered" } else { "uncovered" },
            stand_words(need_s, need_cover)
        );
        vec![
            format!("{}: {}", self.item, self.verdict),
            point,
            kill,
            stand,
            format!("rule: {}", self.rule),
        ]
    }

    /// The card as JSON, in °C and K.
    pub fn to_json(&self) -> serde_json::Value {
        let finite = |v: f64| v.is_finite().then_some(v);
        serde_json::json!({
            "item": self.item,
            "safe": self.safe,
            "verdict": self.verdict,
            "point": self.point,
            "place": self.place,
            "temperature_c": finite(self.temperature_c),
            "bound_c": self.bound_c.and_then(finite),
            "limit_c": self.limit_c,
            "margin_k": finite(self.margin_k),
            "log_reduction": self.kill.and_then(|k| finite(k.achieved)),
            "log_reduction_required": self.kill.map(|k| k.target.logs),
            "pathogen": self.kill.map(|k| k.target.curve.pathogen),
            "kill_source": self.kill.map(|k| format!("{}; {}", k.target.source, k.target.curve.source)),
            "stood_s": self.stood_s,
            "covered": self.covered,
            "stand_required_s": self.stand_required.0,
            "cover_required": self.stand_required.1,
            "rule": self.rule,
        })
    }
}
