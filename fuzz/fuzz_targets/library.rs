//! Fuzz target: map libraries (CSV and JSON, and the by-content reader) from arbitrary bytes never
//! panic or allocate past their limits, and whatever they accept is valid and round-trips.
#![no_main]

use libfuzzer_sys::fuzz_target;
use traycast_plan::library::MapLibrary;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let parsed = [
        MapLibrary::from_csv(text),
        MapLibrary::from_json(text),
        MapLibrary::parse(text),
    ];
    for lib in parsed.into_iter().flatten() {
        assert!(lib.validate().is_ok(), "accepted an invalid library");
        let back = MapLibrary::from_json(&lib.to_json()).expect("own JSON reads back");
        assert_eq!(back.loads.len(), lib.loads.len());
    }
});
