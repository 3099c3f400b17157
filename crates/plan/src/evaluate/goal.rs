//! The constrained objectives' problems: which cells become rows, their soft bands and hard
//! limits, the placement scenarios, and the answer turned back into the plan's terms.
//!
//! Hard limits are rises (K) on the linear prediction. Zone caps are always hard. For the safe
//! minimum, every cell of an item with a food-safety minimum gets a floor and every cell of a
//! chilled item a ceiling ([`Hard`]); the simulation loop (`refine.rs`) moves them cell by cell
//! until the coldest point's lower bound (the warmest point's upper bound) sits at the limit. For
//! shortest and max-margin the zones' bands themselves are hard.
//!
//! With placement scenarios each hard row is repeated for the food placed one cell left, right,
//! up and down: the row of cell i reads the maps at the neighbouring cell (the maps are those of
//! the planned layout; a shift off the tray has no row).

use super::maps::PlanMaps;
use super::prepared::Prepared;
use crate::error::{Place, PlanError};
use crate::model::{Objective, Plan};
use traycast_solver::{
    Constraint, Goal, Iterations, Outcome, Planned, Rates, Refusal, Solution, Spec, Status, Task,
    solve_task_from,
};
use traycast_thermal::composition::BOILING_POINT;

/// Per-cell hard limits on the linear rise for the safe minimum, K (−∞ / +∞ where none).
#[derive(Clone, Debug, PartialEq)]
pub struct Hard {
    /// Least rise per cell.
    pub floor: Vec<f64>,
    /// Most rise per cell.
    pub ceiling: Vec<f64>,
}

/// Smallest rise a floor may ask for, K: a limit already met at the start needs no heat.
const NO_RISE: f64 = 0.0;

impl Hard {
    /// The first guess: each item's safety limits as rises from its start, widened by the plan's
    /// variation (power (1 ∓ p), start ∓ k). The coldest point is colder than the column mean the
    /// linear model predicts, so this is the least a floor can be; the loop raises it.
    pub fn initial(plan: &Plan, prep: &Prepared) -> Hard {
        let n = plan.tray.cells();
        let (p, k) = (plan.variation.oven_power, plan.variation.start_k);
        let mut hard = Hard {
            floor: vec![f64::NEG_INFINITY; n],
            ceiling: vec![f64::INFINITY; n],
        };
        for (item, cells) in prep.item_cells().iter().enumerate() {
            let Some(food) = plan.catalogue_food(item) else {
                continue;
            };
            let (min, max) = food.safety.limits();
            let start = plan.items[item].start_c;
            for &i in cells {
                if let Some(m) = min {
                    hard.floor[i] = ((m - start + k) / (1.0 - p)).max(NO_RISE);
                }
                if let Some(m) = max {
                    hard.ceiling[i] = (m - start - k) / (1.0 + p);
                }
            }
        }
        hard
    }

    /// Moves each floor (ceiling) by how far the simulated lower (upper) bound after standing
    /// missed the limit, never below (above) `initial`; a floor with more than [`SPARE_K`] of room
    /// comes down by half of the excess. `short_kill` lists items whose temperature holds but whose kill falls short:
    /// their floors go up by 2 K. Returns the largest move, K.
    pub fn correct(
        &mut self,
        plan: &Plan,
        prep: &Prepared,
        lower: &[f64],
        upper: &[f64],
        initial: &Hard,
        short_kill: &[bool],
    ) -> f64 {
        let mut moved = 0.0f64;
        for (item, cells) in prep.item_cells().iter().enumerate() {
            let Some(food) = plan.catalogue_food(item) else {
                continue;
            };
            let (min, max) = food.safety.limits();
            for &i in cells {
                if let Some(m) = min
                    && lower[i].is_finite()
                {
                    let gap = m - lower[i];
                    let step = relax(gap);
                    let bump = if short_kill[item] { 2.0 } else { 0.0 };
                    // More heat than brings the column to the boiling point only boils water
                    // off: a coldest point still short then is short of conduction and time
                    // (a longer stand), not of power, and the floor stops there.
                    let top = (BOILING_POINT - plan.items[item].start_c).max(initial.floor[i]);
                    let new = (self.floor[i] + step + bump).max(initial.floor[i]).min(top);
                    moved = moved.max((new - self.floor[i]).abs());
                    self.floor[i] = new;
                }
                if let Some(m) = max
                    && upper[i].is_finite()
                {
                    let over = upper[i] - m;
                    let step = relax(over);
                    let new = (self.ceiling[i] - step).min(initial.ceiling[i]);
                    moved = moved.max((new - self.ceiling[i]).abs());
                    self.ceiling[i] = new;
                }
            }
        }
        moved
    }
}

/// How far to move a limit that the simulation missed by `miss` K (positive: short of the limit):
/// all of a shortfall; of room to spare, only what exceeds [`SPARE_K`], and half of that — a floor
/// with a little room keeps it, so the loop settles instead of creeping towards the edge.
fn relax(miss: f64) -> f64 {
    if miss > 0.0 {
        miss
    } else {
        0.5 * (miss + SPARE_K).min(0.0)
    }
}

/// Room above a safety limit that the loop leaves alone, K.
pub const SPARE_K: f64 = 2.0;

/// One row of the problem: the cell it constrains and the cell (and oven) whose maps it reads.
struct Row {
    cell: usize,
    from: usize,
    /// 0: the plan's own maps; k: the k-th other oven's.
    oven: usize,
    /// The row carries the cell's soft band (the planned position of a zoned cell).
    soft: bool,
}

/// Solves the plan's constrained problem on `maps` (rates scaled per cell by `gains`).
pub(super) fn solve(
    plan: &Plan,
    prep: &Prepared,
    maps: &PlanMaps,
    others: &[PlanMaps],
    gains: Option<&[f64]>,
    hard: Option<&Hard>,
    warm: &mut Option<Planned>,
) -> Result<Solution, PlanError> {
    let objective = plan.planning.objective;
    let (n, configs) = (maps.cells, maps.configs);
    if let (Objective::SafeMinimum, Some(h)) = (objective, hard) {
        too_warm_already(plan, prep, h)?;
    }
    let zoned_row: Vec<Option<usize>> = {
        let mut v = vec![None; n];
        for (r, &i) in prep.rows.iter().enumerate() {
            v[i] = Some(r);
        }
        v
    };
    let cap = |i: usize| -> f64 {
        plan.zone_at(i)
            .and_then(|z| plan.zones[z].cap_c)
            .map_or(f64::INFINITY, |c| c - prep.start[i])
    };
    // The hard limits of cell i (at its planned position).
    let limits = |i: usize| -> (f64, f64) {
        match (objective, hard) {
            (Objective::SafeMinimum, Some(h)) => (h.floor[i], h.ceiling[i].min(cap(i))),
            (Objective::Shortest | Objective::MaxMargin, _) => match zoned_row[i] {
                Some(r) => (prep.problem.lo[r], prep.problem.hi[r]),
                None => (f64::NEG_INFINITY, f64::INFINITY),
            },
            _ => (f64::NEG_INFINITY, cap(i)),
        }
    };
    let mut rows: Vec<Row> = prep
        .rows
        .iter()
        .map(|&i| Row {
            cell: i,
            from: i,
            oven: 0,
            soft: true,
        })
        .collect();
    if objective == Objective::SafeMinimum {
        rows.extend((0..n).filter(|&i| zoned_row[i].is_none()).filter_map(|i| {
            let (f, c) = limits(i);
            (f.is_finite() || c.is_finite()).then_some(Row {
                cell: i,
                from: i,
                oven: 0,
                soft: false,
            })
        }));
    }
    if plan.planning.placement {
        let (w, h) = (plan.tray.width as i64, plan.tray.height as i64);
        let base: Vec<usize> = rows.iter().map(|r| r.cell).collect();
        for (dx, dy) in [(-1i64, 0i64), (1, 0), (0, -1), (0, 1)] {
            for &i in &base {
                let (f, c) = limits(i);
                if !(f.is_finite() || c.is_finite()) {
                    continue;
                }
                let (r, col) = ((i as i64) / w + dy, (i as i64) % w + dx);
                if (0..h).contains(&r) && (0..w).contains(&col) {
                    rows.push(Row {
                        cell: i,
                        from: (r * w + col) as usize,
                        oven: 0,
                        soft: false,
                    });
                }
            }
        }
    }
    // Every hard row again on each other oven's maps (planned position).
    if objective.is_constrained() && !others.is_empty() {
        let base: Vec<usize> = rows
            .iter()
            .filter(|r| r.from == r.cell)
            .map(|r| r.cell)
            .collect();
        for k in 1..=others.len() {
            for &i in &base {
                let (f, c) = limits(i);
                if f.is_finite() || c.is_finite() {
                    rows.push(Row {
                        cell: i,
                        from: i,
                        oven: k,
                        soft: false,
                    });
                }
            }
        }
    }
    let m = rows.len();
    let gain = |i: usize| gains.map_or(1.0, |g| g[i]);
    let mut data = Vec::with_capacity(m * configs);
    for row in &rows {
        let g = gain(row.cell);
        let source = if row.oven == 0 {
            maps
        } else {
            &others[row.oven - 1]
        };
        if source.configs != configs {
            return Err(PlanError::new(
                "maps.library",
                format!(
                    "another oven's library has {} configurations, this plan's oven {configs}: they are not the same model",
                    source.configs
                ),
            ));
        }
        data.extend((0..configs).map(|c| source.loaded[c * n + row.from] * g));
    }
    let rates = Rates::from_row_major(m, configs, &data)?;
    let soft = |f: &dyn Fn(usize) -> f64, none: f64| -> Vec<f64> {
        rows.iter()
            .map(|row| match (row.soft, zoned_row[row.cell]) {
                (true, Some(r)) => f(r),
                _ => none,
            })
            .collect()
    };
    let mut spec = Spec::band(
        soft(&|r| prep.problem.lo[r], f64::NEG_INFINITY),
        soft(&|r| prep.problem.hi[r], f64::INFINITY),
        configs,
    );
    spec.weights = soft(&|r| prep.problem.weight[r], 1.0);
    spec.upper = vec![plan.oven.limit_s.unwrap_or(f64::INFINITY); configs];
    spec.budget = plan.oven.budget_s;
    spec.time_penalty = plan.oven.time_penalty;
    let mut task = match objective {
        Objective::Shortest => Task::new(Goal::Shortest, m, configs),
        Objective::MaxMargin => Task::new(Goal::MaxMargin, m, configs),
        _ => Task::fit(spec.clone()),
    };
    task.upper = spec.upper;
    task.budget = spec.budget;
    for (r, row) in rows.iter().enumerate() {
        (task.floor[r], task.ceiling[r]) = limits(row.cell);
    }
    // The previous answer (the stroke before, or the loop's last pass) warm-starts this one; a
    // start that does not fit is ignored, and the answer is the same either way.
    let from = warm.as_ref().filter(|p| p.dwell.len() == configs);
    let planned =
        solve_task_from(&rates, &task, from).map_err(|e| refused(plan, &rows, &task, e))?;
    *warm = Some(planned.clone());
    let status = match planned.outcome {
        Outcome::Uncertified => Status::Uncertified,
        Outcome::Optimal if planned.multipliers.budget > 0.0 => Status::BudgetBinding,
        Outcome::Optimal => Status::Optimal,
    };
    Ok(Solution {
        objective: planned.objective,
        achieved: Vec::new(),
        band_distance: Vec::new(),
        status,
        budget_multiplier: planned.multipliers.budget,
        iterations: Iterations {
            active_set: planned.iterations,
            newton: planned.passes,
            budget: 0,
        },
        kkt_residual: planned.certificate.residual(),
        dwell: planned.dwell.clone(),
    })
}

/// A chilled item whose ceiling is below zero rise cannot be kept under its limit even unheated:
/// that is the plan's input, not the schedule's, and is said so.
fn too_warm_already(plan: &Plan, prep: &Prepared, hard: &Hard) -> Result<(), PlanError> {
    for (k, cells) in prep.item_cells().iter().enumerate() {
        if let Some(&i) = cells.iter().find(|&&i| hard.ceiling[i] < 0.0) {
            let it = &plan.items[k];
            let limit = plan
                .catalogue_food(k)
                .and_then(|f| f.safety.limits().1)
                .unwrap_or(f64::NAN);
            return Err(PlanError::new(
                format!("items[{k}].start_c"),
                format!(
                    "{} starts at {:.1} °C and may start {:.1} K warmer, so its warmest point may be above its {limit:.1} °C limit before any heating (cell row {}, column {}): start it colder or narrow the start variation (variation.start_k)",
                    it.name,
                    it.start_c,
                    plan.variation.start_k,
                    i / plan.tray.width,
                    i % plan.tray.width
                ),
            ));
        }
    }
    Ok(())
}

/// A refusal in the plan's terms: the cell (and item or zone) whose limit cannot be met, and what
/// it conflicts with.
fn refused(plan: &Plan, rows: &[Row], task: &Task, e: Refusal) -> PlanError {
    let w = plan.tray.width;
    let at = |row: usize| {
        let i = rows[row].cell;
        Place::Cell {
            row: i / w,
            col: i % w,
        }
    };
    let name = |row: usize| -> String {
        let i = rows[row].cell;
        let what = plan
            .item_at(i)
            .map(|k| plan.items[k].name.clone())
            .unwrap_or_else(|| "the food".into());
        let shifted = if rows[row].from != i {
            " with the food placed one cell off"
        } else {
            ""
        };
        let oven = if rows[row].oven > 0 {
            format!(" on other oven {}", rows[row].oven)
        } else {
            String::new()
        };
        format!("{what} at row {}, column {}{shifted}{oven}", i / w, i % w)
    };
    let describe = |c: Constraint| -> String {
        match c {
            Constraint::Floor(r) => {
                format!("the minimum rise of {:.1} K for {}", task.floor[r], name(r))
            }
            Constraint::Ceiling(r) => format!(
                "the maximum rise of {:.1} K for {}",
                task.ceiling[r],
                name(r)
            ),
            Constraint::Budget => format!(
                "the oven's time budget of {} s",
                plan.oven.budget_s.unwrap_or(f64::INFINITY)
            ),
            Constraint::Limit(_) => format!(
                "the per-configuration limit of {} s",
                plan.oven.limit_s.unwrap_or(f64::INFINITY)
            ),
            other => other.to_string(),
        }
    };
    match e {
        Refusal::Input(e) => e.into(),
        Refusal::Infeasible(inf) => {
            // Name a cell's limit first when one is involved: that is what the user can change.
            let mut all = vec![inf.constraint];
            all.extend(inf.conflicts.iter().copied());
            all.retain(|c| !matches!(c, Constraint::Dwell(_)));
            let main = all
                .iter()
                .position(|c| matches!(c, Constraint::Floor(_) | Constraint::Ceiling(_)))
                .unwrap_or(0);
            let head = all.get(main).copied().unwrap_or(inf.constraint);
            let place = match head {
                Constraint::Floor(r) | Constraint::Ceiling(r) => at(r),
                _ => Place::Field("oven".into()),
            };
            // One mention per kind of limit and item: a hundred cells of one item say one thing.
            let key = |c: Constraint| -> (u8, Option<usize>) {
                match c {
                    Constraint::Floor(r) => (0, plan.item_at(rows[r].cell)),
                    Constraint::Ceiling(r) => (1, plan.item_at(rows[r].cell)),
                    Constraint::Budget => (2, None),
                    Constraint::Limit(_) => (3, None),
                    _ => (4, None),
                }
            };
            let mut seen = vec![key(head)];
            let mut with: Vec<String> = Vec::new();
            for &c in &all {
                let k = key(c);
                if !seen.contains(&k) && with.len() < 3 {
                    seen.push(k);
                    with.push(describe(c));
                }
            }
            let mut msg = format!("no schedule meets {}", describe(head));
            if !with.is_empty() {
                msg.push_str(&format!(" together with {}", with.join(" and ")));
            }
            msg.push_str(
                ": widen a band, give the oven more time, or plan with max-margin or the band fit to see how close it comes",
            );
            PlanError::new(place, msg)
        }
        Refusal::Unbounded(why) => PlanError::new("planning.objective", why),
        Refusal::IterationLimit(k) => PlanError::new(
            "planning.objective",
            format!("the constrained solve found no answer within {k} steps"),
        ),
    }
}
