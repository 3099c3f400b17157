//! Catalogue foods: composition (with its source), absorption class and food-safety category.
//!
//! Sources:
//! - "ASHRAE Table 3": ASHRAE Handbook – Refrigeration (2006) ch. 9 Table 3, unfrozen composition
//!   and initial freezing point (carbohydrate here is the table's total minus its fiber).
//! - "USDA SR Legacy [R]": USDA National Nutrient Database (SR Legacy) proximates recalled from
//!   memory, not confirmed against the database; freezing points from ASHRAE's published values for
//!   similar foods (lean beef −1.7 °C, fish −2.2 °C) or, where none exists, −1 °C (the NZIFST
//!   simplified value for vegetables) — an assumption. Recalled proximates that did not add up to
//!   100 % within 2 % were rounded by adjusting water (ham).
//! - Water: pure water, the reference load of oven power tests (IEC 60705).

use crate::composition::Composition;
use crate::dielectric::LossClass;
use crate::safety::SafetyCategory;

/// A food type of the catalogue.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CatalogueFood {
    /// Stable identifier used in plan files and links.
    pub id: &'static str,
    /// Display name.
    pub name: &'static str,
    /// Mass percentages: water, protein, fat, carbohydrate (excluding fiber), fiber, ash.
    pub percent: [f64; 6],
    /// Initial freezing point, °C.
    pub freezing_point: f64,
    /// Where the composition comes from.
    pub source: &'static str,
    /// Microwave absorption class.
    pub loss: LossClass,
    /// Food-safety category.
    pub safety: SafetyCategory,
}

impl CatalogueFood {
    /// The validated composition.
    pub fn composition(&self) -> Composition {
        let [w, p, f, c, fb, a] = self.percent;
        Composition::from_percent(w, p, f, c, fb, a, self.freezing_point)
            .expect("catalogue compositions are valid (checked by a test)")
    }
}

const ASHRAE: &str = "ASHRAE Table 3";
const SR: &str = "USDA SR Legacy [R]";

/// The catalogue.
pub const CATALOGUE: [CatalogueFood; 16] = [
    CatalogueFood {
        id: "water",
        name: "Water",
        percent: [100.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        freezing_point: 0.0,
        source: "pure water",
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "carrots",
        name: "Carrots",
        percent: [87.79, 1.03, 0.19, 7.14, 3.00, 0.87],
        freezing_point: -1.4,
        source: ASHRAE,
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "broccoli",
        name: "Broccoli",
        percent: [90.69, 2.98, 0.35, 2.24, 3.00, 0.92],
        freezing_point: -0.6,
        source: ASHRAE,
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "green-beans",
        name: "Green beans",
        percent: [90.27, 1.82, 0.12, 3.74, 3.40, 0.66],
        freezing_point: -0.7,
        source: ASHRAE,
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "sweet-corn",
        name: "Sweet corn",
        percent: [75.96, 3.22, 1.18, 16.32, 2.70, 0.62],
        freezing_point: -0.6,
        source: ASHRAE,
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "lima-beans",
        name: "Lima beans",
        percent: [70.24, 6.84, 0.86, 15.26, 4.90, 1.89],
        freezing_point: -0.6,
        source: ASHRAE,
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "asparagus",
        name: "Asparagus",
        percent: [92.40, 2.28, 0.20, 2.44, 2.10, 0.57],
        freezing_point: -0.6,
        source: ASHRAE,
        loss: LossClass::Watery,
        safety: SafetyCategory::ServedHot,
    },
    CatalogueFood {
        id: "chicken-breast",
        name: "Chicken breast",
        percent: [74.8, 23.1, 1.2, 0.0, 0.0, 1.0],
        freezing_point: -1.7,
        source: SR,
        loss: LossClass::Meat,
        safety: SafetyCategory::Poultry,
    },
    CatalogueFood {
        id: "ground-beef",
        name: "Ground beef, 85 % lean",
        percent: [64.6, 18.6, 15.0, 0.0, 0.0, 0.9],
        freezing_point: -1.7,
        source: SR,
        loss: LossClass::Meat,
        safety: SafetyCategory::GroundMeat,
    },
    CatalogueFood {
        id: "salmon",
        name: "Salmon fillet",
        percent: [64.9, 20.4, 13.4, 0.0, 0.0, 1.1],
        freezing_point: -2.2,
        source: SR,
        loss: LossClass::Meat,
        safety: SafetyCategory::Fish,
    },
    CatalogueFood {
        id: "ham",
        name: "Ham, precooked",
        percent: [66.9, 16.6, 8.6, 3.8, 0.0, 3.6],
        freezing_point: -2.2,
        source: SR,
        loss: LossClass::Salty,
        safety: SafetyCategory::PrecookedHam,
    },
    CatalogueFood {
        id: "rice",
        name: "White rice, cooked",
        percent: [68.4, 2.7, 0.3, 27.8, 0.4, 0.2],
        freezing_point: -1.0,
        source: SR,
        loss: LossClass::Watery,
        safety: SafetyCategory::Reheated,
    },
    CatalogueFood {
        id: "mashed-potato",
        name: "Mashed potato",
        percent: [75.5, 1.9, 4.2, 15.3, 1.5, 1.6],
        freezing_point: -1.0,
        source: SR,
        loss: LossClass::Watery,
        safety: SafetyCategory::Reheated,
    },
    CatalogueFood {
        id: "lasagne",
        name: "Meat lasagne",
        percent: [70.0, 8.5, 5.5, 13.0, 1.5, 1.5],
        freezing_point: -1.5,
        source: SR,
        loss: LossClass::Salty,
        safety: SafetyCategory::Reheated,
    },
    CatalogueFood {
        id: "scrambled-egg",
        name: "Scrambled egg",
        percent: [76.0, 10.0, 11.0, 1.6, 0.0, 1.2],
        freezing_point: -0.6,
        source: SR,
        loss: LossClass::Meat,
        safety: SafetyCategory::EggDish,
    },
    CatalogueFood {
        id: "vanilla-pudding",
        name: "Vanilla pudding (chilled)",
        percent: [74.0, 2.9, 3.2, 19.0, 0.0, 0.9],
        freezing_point: -1.5,
        source: SR,
        loss: LossClass::Watery,
        safety: SafetyCategory::KeepCold,
    },
];

/// Looks a food up by id.
pub fn find(id: &str) -> Option<&'static CatalogueFood> {
    CATALOGUE.iter().find(|f| f.id == id)
}
