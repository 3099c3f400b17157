//! Fuzz target: share links, plan JSON, map libraries and heating runs from arbitrary bytes must
//! never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = traycast_plan::wire::from_link(text);
        let _ = traycast_plan::wire::from_json(text);
        let _ = traycast_plan::library::MapLibrary::from_csv(text);
        let _ = traycast_plan::library::MapLibrary::from_json(text);
        let layout = traycast_plan::demos::demo("side-by-side").expect("demo");
        let options = traycast_plan::runs::ReadOptions::default();
        if let Ok(runs) = traycast_plan::runs::HeatingRuns::parse(text, &layout, options) {
            let settings = traycast_plan::calibrate::Settings::default();
            let _ = traycast_plan::calibrate::calibrate(&runs, &layout, &settings);
        }
    }
});
