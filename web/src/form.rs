//! Reading form fields.

use leptos::prelude::*;

/// The number typed in the field `ev` came from, when it is a finite one.
pub fn num(ev: &leptos::ev::Event) -> Option<f64> {
    event_target_value(ev)
        .trim()
        .parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
}
