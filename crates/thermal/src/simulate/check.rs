//! Input checks before a simulation: every problem named with its cell or setting.

use super::{Edge, Load, Maps, Settings};
use crate::error::{ThermalError, in_range};
use crate::schedule::Schedule;

pub(super) fn validate(
    load: &Load,
    maps: &Maps,
    schedule: &Schedule,
    settings: &Settings,
) -> Result<(), ThermalError> {
    let n = load.tray.cells();
    in_range(
        "cell size (m)",
        load.tray.cell_size,
        1e-5,
        10.0,
        "0.00001 to 10 m",
    )?;
    if load.cells.len() != n {
        return Err(ThermalError::Dimension {
            what: "cell contents",
            expected: n,
            found: load.cells.len(),
        });
    }
    if load.start.len() != n {
        return Err(ThermalError::Dimension {
            what: "start temperatures",
            expected: n,
            found: load.start.len(),
        });
    }
    if maps.rates.len() != maps.configs * n {
        return Err(ThermalError::Dimension {
            what: "heating maps",
            expected: maps.configs * n,
            found: maps.rates.len(),
        });
    }
    for (i, c) in load.cells.iter().enumerate() {
        let Some(c) = c else { continue };
        let bad = |problem: String| ThermalError::Cell { cell: i, problem };
        if c.item >= load.items.len() {
            return Err(bad(format!(
                "names food item {}, but there are {}",
                c.item,
                load.items.len()
            )));
        }
        if !(c.thickness.is_finite() && c.thickness > 0.0) {
            return Err(bad(format!(
                "thickness {} m must be greater than 0",
                c.thickness
            )));
        }
        let t = load.start[i];
        if !(t.is_finite() && (-60.0..=100.0).contains(&t)) {
            return Err(bad(format!(
                "start temperature {t} °C must be between −60 and 100 °C"
            )));
        }
        for cfg in 0..maps.configs {
            let r = maps.rates[cfg * n + i];
            if !(r.is_finite() && r >= 0.0) {
                return Err(bad(format!(
                    "heating rate {r} K/s under configuration {cfg} must be a number ≥ 0"
                )));
            }
        }
    }
    schedule.validate(maps.configs)?;
    in_range(
        "surface heat-transfer coefficient (W/(m²·K))",
        settings.surface_h,
        0.0,
        1e4,
        "0 to 10 000",
    )?;
    in_range(
        "contact conductance (W/(m²·K))",
        settings.contact_conductance,
        1e-6,
        1e7,
        "greater than 0",
    )?;
    in_range(
        "air temperature (°C)",
        settings.air,
        -60.0,
        300.0,
        "−60 to 300 °C",
    )?;
    in_range(
        "standing time (s)",
        settings.standing,
        0.0,
        86_400.0,
        "0 to 86 400 s",
    )?;
    in_range(
        "time step (s)",
        settings.step,
        1e-6,
        600.0,
        "greater than 0, at most 600 s",
    )?;
    in_range(
        "recording interval (s)",
        settings.record_every,
        1e-6,
        1e6,
        "greater than 0",
    )?;
    in_range(
        "thickest layer (m)",
        settings.max_layer,
        1e-4,
        1.0,
        "0.0001 to 1 m",
    )?;
    in_range(
        "share of power entering from below",
        settings.bottom_entry,
        0.0,
        1.0,
        "0 to 1",
    )?;
    in_range(
        "cavity air relative humidity",
        settings.air_humidity,
        0.0,
        1.0,
        "0 to 1",
    )?;
    in_range(
        "tray heat capacity (J/(m²·K))",
        settings.tray_capacity,
        0.0,
        1e6,
        "0 to 1 000 000",
    )?;
    for edge in [settings.edges.x, settings.edges.y] {
        if let Edge::Fixed(t) = edge {
            in_range("edge temperature (°C)", t, -60.0, 300.0, "−60 to 300 °C")?;
        }
    }
    Ok(())
}
