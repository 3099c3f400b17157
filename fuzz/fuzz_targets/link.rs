//! Fuzz target: share links, plan JSON and map libraries from arbitrary bytes must never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = traycast_plan::wire::from_link(text);
        let _ = traycast_plan::wire::from_json(text);
        let _ = traycast_plan::library::MapLibrary::from_csv(text);
        let _ = traycast_plan::library::MapLibrary::from_json(text);
    }
});
