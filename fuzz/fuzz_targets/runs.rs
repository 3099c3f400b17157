//! Fuzz target: heating runs read against an arbitrary layout (tray size, cell pitch, food grid,
//! configurations all from the input), with millimetre or cell positions under a ready header or
//! the input's own, then calibrated: never a panic, and every accepted series sits on a food cell
//! of the layout.
#![no_main]

use libfuzzer_sys::fuzz_target;
use traycast_plan::calibrate::{self, Settings};
use traycast_plan::model::{FoodItem, Plan};
use traycast_plan::runs::{HeatingRuns, ReadOptions};

/// Layout from the first 8 bytes: width, height, pitch (mm), configurations, a food pattern, °F.
fn layout(head: &[u8]) -> (Plan, ReadOptions) {
    let width = 1 + head[0] as usize % 8;
    let height = 1 + head[1] as usize % 8;
    let pitch = 1.0 + head[2] as f64 * 0.37;
    let mut plan = Plan::blank(width, height, pitch);
    plan.items = vec![
        FoodItem {
            name: "a".into(),
            food: "lasagne".into(),
            thickness_mm: 20.0,
            start_c: -18.0,
            covered: false,
        },
        FoodItem {
            name: "b".into(),
            food: "carrots".into(),
            thickness_mm: 10.0,
            start_c: 5.0,
            covered: true,
        },
    ];
    plan.oven.configs = 1 + head[3] as usize % 4;
    let pattern = u32::from_le_bytes([head[4], head[5], head[6], head[7]]);
    for i in 0..width * height {
        plan.food[i] = ((pattern >> (i % 32)) & 1) as u8 + u8::from(i % 3 == 0);
        plan.food[i] = plan.food[i].min(2);
    }
    (plan, ReadOptions { fahrenheit: head[7] & 0x80 != 0 })
}

fuzz_target!(|data: &[u8]| {
    if data.len() < 8 {
        return;
    }
    let (plan, options) = layout(&data[..8]);
    let Ok(body) = std::str::from_utf8(&data[8..]) else {
        return;
    };
    // Most inputs get a header, so the fuzzer spends its time on records: millimetre positions,
    // cell positions, or whatever the input itself says.
    let unit = if options.fahrenheit { "temp_f" } else { "temp_c" };
    let text = match data[3] >> 6 {
        0 | 1 => format!("# traycast-runs 1\nrun,config,time_s,x_mm,y_mm,{unit}\n{body}"),
        2 => format!("# traycast-runs 1\nrun,config,time_s,row,col,{unit}\n{body}"),
        _ => body.to_string(),
    };
    if let Ok(runs) = HeatingRuns::parse(&text, &plan, options) {
        for s in &runs.series {
            assert!(s.cell < plan.tray.cells() && plan.food[s.cell] != 0);
        }
        let _ = calibrate::calibrate(&runs, &plan, &Settings::default());
    }
});
