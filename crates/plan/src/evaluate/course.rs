//! The simulated time course of a plan (the thermal crate's simulation on the plan's load and
//! thawed maps) and the warnings about cells it drove outside the model.

use super::maps::PlanMaps;
use super::prepared::Prepared;
use crate::error::{Place, PlanError};
use crate::model::Plan;
use traycast_thermal::ThermalError;
use traycast_thermal::material::Material;
use traycast_thermal::schedule::Schedule;
use traycast_thermal::simulate::{self, CellFill, Load, Settings, TimeCourse, Tray};

/// Simulates `schedule` on the plan's load with its thawed maps.
pub fn time_course(
    plan: &Plan,
    maps: &PlanMaps,
    mats: &[Material],
    schedule: &Schedule,
    settings: &Settings,
) -> Result<TimeCourse, PlanError> {
    let start: Vec<f64> = super::problem::start_temps(plan)
        .iter()
        .map(|v| if v.is_nan() { 20.0 } else { *v })
        .collect();
    let rates = simulate::Maps {
        configs: maps.configs,
        rates: &maps.thawed,
    };
    simulate_load(plan, &start, rates, mats, schedule, settings)
}

/// Simulates `schedule` on the plan's load from the per-cell temperatures `start` under reference-
/// state `rates`; a diverging state is an error naming the cell and the item.
pub(crate) fn simulate_load(
    plan: &Plan,
    start: &[f64],
    rates: simulate::Maps,
    mats: &[Material],
    schedule: &Schedule,
    settings: &Settings,
) -> Result<TimeCourse, PlanError> {
    let cells: Vec<Option<CellFill>> = (0..plan.tray.cells())
        .map(|i| {
            plan.item_at(i).map(|k| CellFill {
                item: k,
                thickness: plan.items[k].thickness_mm / 1000.0,
                covered: plan.items[k].covered,
            })
        })
        .collect();
    let load = Load {
        tray: Tray {
            width: plan.tray.width,
            height: plan.tray.height,
            cell_size: plan.tray.cell_mm / 1000.0,
        },
        items: mats,
        cells: &cells,
        start,
    };
    simulate::simulate(&load, &rates, schedule, settings).map_err(|e| match e {
        ThermalError::Diverged { cell, time_s } => PlanError::new(
            Place::Cell {
                row: cell / plan.tray.width,
                col: cell % plan.tray.width,
            },
            format!(
                "the temperature of '{}' stopped being a number at {time_s:.1} s: the plan drives the food past what the model covers; reduce the power, the time or the thickness",
                plan.item_at(cell)
                    .map_or("an empty cell", |k| plan.items[k].name.as_str())
            ),
        ),
        other => other.into(),
    })
}

/// Warnings about cells the time course drove outside the model: boiled dry, or past
/// [`simulate::MODEL_LIMIT_C`] (dried food scorching). One line per item.
/// How far the instant (linear) preview may stray from the simulated coldest point before the
/// evaluation says so, K. Our choice: about the width of a typical target band's margin.
pub const PREVIEW_GAP_K: f64 = 5.0;

pub(super) fn course_warnings(
    plan: &Plan,
    prep: &Prepared,
    course: &TimeCourse,
    linear: &[f64],
) -> Vec<String> {
    let mut out = Vec::new();
    let width = plan.tray.width;
    for (k, (item, cells)) in plan.items.iter().zip(prep.item_cells()).enumerate() {
        // The Food Code's microwave rule for raw animal foods asks for a cover (3-401.12(B)).
        let raw_animal = plan.catalogue_food(k).is_some_and(|f| {
            use traycast_thermal::safety::SafetyCategory as S;
            matches!(
                f.safety,
                S::Poultry | S::GroundMeat | S::WholeMeat | S::Fish | S::EggDish
            )
        });
        if raw_animal && !item.covered && !cells.is_empty() {
            out.push(format!(
                "'{}' is not covered: the FDA Food Code asks raw animal foods cooked in a microwave to be covered to keep their surface moist (3-401.12(B)); the simulation lets it lose water and cool at its surface",
                item.name
            ));
        }
        // Where the preview and the simulation disagree, and the worst cell.
        let gaps: Vec<(usize, f64)> = cells
            .iter()
            .map(|&i| (i, linear[i] - course.after_standing[i]))
            .filter(|&(_, g)| g.abs() > PREVIEW_GAP_K)
            .collect();
        if let Some(&(i, g)) = gaps.iter().max_by(|a, b| a.1.abs().total_cmp(&b.1.abs())) {
            out.push(format!(
                "'{}': the instant (linear) preview differs from the simulated coldest point by more than {PREVIEW_GAP_K:.0} K in {} of {} cells (worst at row {}, col {}: preview {:.1} °C, simulated {:.1} °C, {:+.1} K); the preview leaves out depth, conduction, thawing, boiling and the stand, so judge by the simulation",
                item.name,
                gaps.len(),
                cells.len(),
                i / width,
                i % width,
                linear[i],
                course.after_standing[i],
                g
            ));
        }
        let dry = cells.iter().filter(|&&i| course.boiled_dry[i]).count();
        if dry > 0 {
            out.push(format!(
                "{dry} cell(s) of '{}' boiled dry: all their water evaporated and nothing is left there; shorten the heating or lower the power",
                item.name
            ));
        }
        let hottest = cells
            .iter()
            .map(|&i| course.peak[i])
            .fold(f64::NEG_INFINITY, f64::max);
        if hottest > simulate::MODEL_LIMIT_C {
            out.push(format!(
                "'{}' reaches {hottest:.0} °C: it has dried out and would scorch; above {:.0} °C the food property model no longer holds and the predictions are not physical",
                item.name,
                simulate::MODEL_LIMIT_C
            ));
        }
    }
    out
}
