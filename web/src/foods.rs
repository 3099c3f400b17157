//! The food items and the target zones: what the brush can paint, each with its settings.

use crate::draw;
use crate::form::num;
use crate::paint::Tool;
use crate::state::workbench;
use leptos::prelude::*;
use traycast_plan::model::{FoodItem, Zone};
use traycast_thermal::catalogue::CATALOGUE;

/// Most items, and most zones, a plan holds.
const MOST: usize = 26;

/// The food items.
#[component]
pub fn Foods() -> impl IntoView {
    let wb = workbench();
    let (unit, tool) = (wb.unit, wb.tool);
    let count = Memo::new(move |_| wb.settings.with(|p| p.items.len()));
    let row = move |k: usize| {
        let colour = draw::FOOD_COLOURS[k % draw::FOOD_COLOURS.len()];
        let set = move |f: Box<dyn FnOnce(&mut FoodItem)>| {
            wb.edit(|p| {
                if let Some(i) = p.items.get_mut(k) {
                    f(i)
                }
            })
        };
        let show = move |f: fn(&FoodItem) -> String| {
            move || {
                wb.settings
                    .with(|p| p.items.get(k).map(f).unwrap_or_default())
            }
        };
        view! {
            <div class="row item" class:active=move || tool.get() == Tool::Food(k)>
                <button class="swatch" data-testid=format!("food-swatch-{k}") style=format!("background:{colour}") title="Paint this food (key 1–9)" aria-label=format!("paint food {}", k + 1) aria-pressed=move || (tool.get() == Tool::Food(k)).to_string() on:click=move |_| tool.set(Tool::Food(k))></button>
                <input class="name" data-testid=format!("food-name-{k}") aria-label="food item name" prop:value=show(|i| i.name.clone())
                    on:change=move |ev| { let v = event_target_value(&ev); set(Box::new(move |i| i.name = v)); } />
                <select aria-label="catalogue food" on:change=move |ev| { let v = event_target_value(&ev); set(Box::new(move |i| i.food = v)); }>
                    {CATALOGUE.iter().map(|f| { let id = f.id; view! { <option value=id selected=move || wb.settings.with(|p| p.items.get(k).is_some_and(|i| i.food == id))>{f.name}</option> } }).collect_view()}
                </select>
                <label>"mm"<input class="short" type="number" step="1" aria-label="thickness (mm)" prop:value=show(|i| i.thickness_mm.to_string())
                    on:change=move |ev| if let Some(v) = num(&ev) { set(Box::new(move |i| i.thickness_mm = v)); } /></label>
                <label>{move || format!("start {}", unit.get().symbol())}<input class="short" type="number" step="1" prop:value=move || wb.settings.with(|p| p.items.get(k).map(|i| format!("{:.1}", unit.get().temp(i.start_c))).unwrap_or_default())
                    on:change=move |ev| if let Some(v) = num(&ev) { let c = unit.get_untracked().to_celsius(v); set(Box::new(move |i| i.start_c = c)); } /></label>
                <label title="A cover keeps the moisture in; the Food Code asks for one when cooking raw animal foods">"covered"<input type="checkbox" prop:checked=move || wb.settings.with(|p| p.items.get(k).is_some_and(|i| i.covered))
                    on:change=move |ev| { let on = event_target_checked(&ev); set(Box::new(move |i| i.covered = on)); } /></label>
            </div>
        }
    };
    let add = move |_| {
        wb.edit(|p| {
            if p.items.len() < MOST {
                p.items.push(FoodItem {
                    name: format!("Food {}", p.items.len() + 1),
                    food: "rice".into(),
                    thickness_mm: 20.0,
                    start_c: 4.0,
                    covered: false,
                });
            }
        })
    };
    view! {
        <h2>"Foods"</h2>
        {move || (0..count.get()).map(row).collect_view()}
        <button on:click=add>"Add food item"</button>
    }
}

/// The target zones.
#[component]
pub fn Targets() -> impl IntoView {
    let wb = workbench();
    let (unit, tool) = (wb.unit, wb.tool);
    let count = Memo::new(move |_| wb.settings.with(|p| p.zones.len()));
    let row = move |k: usize| {
        let colour = draw::ZONE_COLOURS[k % draw::ZONE_COLOURS.len()];
        let set = move |f: Box<dyn FnOnce(&mut Zone)>| {
            wb.edit(|p| {
                if let Some(z) = p.zones.get_mut(k) {
                    f(z)
                }
            })
        };
        let temp = move |get: fn(&Zone) -> f64| {
            move || {
                wb.settings.with(|p| {
                    p.zones
                        .get(k)
                        .map(|z| format!("{:.1}", unit.get().temp(get(z))))
                        .unwrap_or_default()
                })
            }
        };
        let celsius =
            move |ev: &leptos::ev::Event| num(ev).map(|v| unit.get_untracked().to_celsius(v));
        view! {
            <div class="row zone" class:active=move || tool.get() == Tool::Zone(k)>
                <button class="swatch" data-testid=format!("target-swatch-{k}") style=format!("background:{colour};color:#fff") title="Paint this target" aria-label=format!("paint target {}", k + 1) aria-pressed=move || (tool.get() == Tool::Zone(k)).to_string() on:click=move |_| tool.set(Tool::Zone(k))>{draw::ZONE_GLYPHS[k % draw::ZONE_GLYPHS.len()]}</button>
                <input class="name" aria-label="zone name" prop:value=move || wb.settings.with(|p| p.zones.get(k).map(|z| z.name.clone()).unwrap_or_default())
                    on:change=move |ev| { let v = event_target_value(&ev); set(Box::new(move |z| z.name = v)); } />
                <label>{move || format!("min {}", unit.get().symbol())}<input class="short" type="number" data-zone-min=k data-testid=format!("target-min-{k}") prop:value=temp(|z| z.min_c)
                    on:change=move |ev| if let Some(c) = celsius(&ev) { set(Box::new(move |z| { z.min_c = c; z.max_c = z.max_c.max(c); })); } /></label>
                <label>{move || format!("max {}", unit.get().symbol())}<input class="short" type="number" data-zone-max=k data-testid=format!("target-max-{k}") prop:value=temp(|z| z.max_c)
                    on:change=move |ev| if let Some(c) = celsius(&ev) { set(Box::new(move |z| { z.max_c = c; z.min_c = z.min_c.min(c); })); } /></label>
                <label>"weight"<input class="short" type="number" step="0.5" prop:value=move || wb.settings.with(|p| p.zones.get(k).map(|z| z.weight.to_string()).unwrap_or_default())
                    on:change=move |ev| if let Some(v) = num(&ev) { set(Box::new(move |z| z.weight = v.clamp(0.001, 1000.0))); } /></label>
                <label title="A hard maximum no cell of the target may pass">{move || format!("cap {}", unit.get().symbol())}<input class="short" type="number" placeholder="none" prop:value=move || wb.settings.with(|p| p.zones.get(k).and_then(|z| z.cap_c).map(|c| format!("{:.1}", unit.get().temp(c))).unwrap_or_default())
                    on:change=move |ev| { let v = celsius(&ev); set(Box::new(move |z| z.cap_c = v)); } /></label>
            </div>
        }
    };
    let add = move |_| {
        wb.edit(|p| {
            if p.zones.len() < MOST {
                p.zones.push(Zone {
                    name: format!("Target {}", p.zones.len() + 1),
                    min_c: 70.0,
                    max_c: 80.0,
                    weight: 1.0,
                    cap_c: None,
                });
            }
        })
    };
    view! {
        <h2>"Targets"</h2>
        {move || (0..count.get()).map(row).collect_view()}
        <button on:click=add>"Add target"</button>
    }
}
