//! Fuzz target: share links and plan JSON from arbitrary bytes never panic, and whatever they
//! accept is a valid plan that survives a round trip.
#![no_main]

use libfuzzer_sys::fuzz_target;
use traycast_plan::wire;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    for plan in [wire::from_link(text), wire::from_json(text)].into_iter().flatten() {
        assert!(plan.validate().is_ok(), "accepted an invalid plan");
        assert_eq!(wire::from_link(&wire::to_link(&plan)).ok().as_ref(), Some(&plan));
    }
});
