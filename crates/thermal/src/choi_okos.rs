//! Choi & Okos (1986) property polynomials of food components, P(t) = A + B·t + C·t², t in °C.
//!
//! Source: Choi, Y. and Okos, M.R. (1986), "Effects of temperature and composition on the thermal
//! properties of foods", in *Food Engineering and Process Applications* vol. 1, pp. 93–101, as
//! reprinted in ASHRAE Handbook – Refrigeration (2006) ch. 9 Table 1. Valid −40 to 150 °C.
//! Units: k in W/(m·K), ρ in kg/m³, cp in kJ/(kg·K). The water cp constant is 4.1762 (the value that
//! reproduces ASHRAE's own Table 3; some transcriptions print 4.1289).

/// A food component of the Choi–Okos model.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Component {
    /// Liquid water (unfrozen).
    Water,
    /// Ice.
    Ice,
    /// Protein.
    Protein,
    /// Fat.
    Fat,
    /// Carbohydrate.
    Carbohydrate,
    /// Fiber.
    Fiber,
    /// Ash (minerals).
    Ash,
}

type Poly = [f64; 3];

fn eval(p: Poly, t: f64) -> f64 {
    p[0] + p[1] * t + p[2] * t * t
}

/// ∫₀ᵗ P(s) ds.
fn integral(p: Poly, t: f64) -> f64 {
    p[0] * t + p[1] * t * t / 2.0 + p[2] * t * t * t / 3.0
}

const WATER_CP_SUBZERO: Poly = [4.0817, -5.3062e-3, 9.9516e-4];
const WATER_CP: Poly = [4.1762, -9.0864e-5, 5.4731e-6];

impl Component {
    /// All components, in a fixed order.
    pub const ALL: [Component; 7] = [
        Component::Water,
        Component::Ice,
        Component::Protein,
        Component::Fat,
        Component::Carbohydrate,
        Component::Fiber,
        Component::Ash,
    ];

    fn k_poly(self) -> Poly {
        match self {
            Component::Protein => [1.7881e-1, 1.1958e-3, -2.7178e-6],
            Component::Fat => [1.8071e-1, -2.7604e-4, -1.7749e-7],
            Component::Carbohydrate => [2.0141e-1, 1.3874e-3, -4.3312e-6],
            Component::Fiber => [1.8331e-1, 1.2497e-3, -3.1683e-6],
            Component::Ash => [3.2962e-1, 1.4011e-3, -2.9069e-6],
            Component::Water => [5.7109e-1, 1.7625e-3, -6.7036e-6],
            Component::Ice => [2.2196, -6.2489e-3, 1.0154e-4],
        }
    }

    fn rho_poly(self) -> Poly {
        match self {
            Component::Protein => [1.3299e3, -5.1840e-1, 0.0],
            Component::Fat => [9.2559e2, -4.1757e-1, 0.0],
            Component::Carbohydrate => [1.5991e3, -3.1046e-1, 0.0],
            Component::Fiber => [1.3115e3, -3.6589e-1, 0.0],
            Component::Ash => [2.4238e3, -2.8063e-1, 0.0],
            Component::Water => [9.9718e2, 3.1439e-3, -3.7574e-3],
            Component::Ice => [9.1689e2, -1.3071e-1, 0.0],
        }
    }

    fn cp_poly(self, t: f64) -> Poly {
        match self {
            Component::Protein => [2.0082, 1.2089e-3, -1.3129e-6],
            Component::Fat => [1.9842, 1.4733e-3, -4.8008e-6],
            Component::Carbohydrate => [1.5488, 1.9625e-3, -5.9399e-6],
            Component::Fiber => [1.8459, 1.8306e-3, -4.6509e-6],
            Component::Ash => [1.0926, 1.8896e-3, -3.6817e-6],
            Component::Water if t < 0.0 => WATER_CP_SUBZERO,
            Component::Water => WATER_CP,
            Component::Ice => [2.0623, 6.0769e-3, 0.0],
        }
    }

    /// Thermal conductivity at `t` °C, W/(m·K).
    pub fn conductivity(self, t: f64) -> f64 {
        eval(self.k_poly(), t)
    }

    /// Density at `t` °C, kg/m³.
    pub fn density(self, t: f64) -> f64 {
        eval(self.rho_poly(), t)
    }

    /// Specific heat at `t` °C, kJ/(kg·K). Water uses its sub-zero polynomial below 0 °C.
    pub fn specific_heat(self, t: f64) -> f64 {
        eval(self.cp_poly(t), t)
    }

    /// Sensible enthalpy ∫ cp dt from −40 °C to `t`, kJ/kg (water's two branches joined at 0 °C).
    pub fn sensible_enthalpy(self, t: f64) -> f64 {
        const REF: f64 = -40.0;
        match self {
            Component::Water => {
                let below =
                    |u: f64| integral(WATER_CP_SUBZERO, u) - integral(WATER_CP_SUBZERO, REF);
                if t < 0.0 {
                    below(t)
                } else {
                    below(0.0) + integral(WATER_CP, t)
                }
            }
            c => integral(c.cp_poly(t), t) - integral(c.cp_poly(t), REF),
        }
    }
}
