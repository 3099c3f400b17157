//! Display units: everything inside is °C; °F exists only here, at the edge.

/// The temperature unit shown to the user.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Unit {
    /// Degrees Celsius.
    Celsius,
    /// Degrees Fahrenheit.
    Fahrenheit,
}

impl Unit {
    /// A temperature (°C) in this unit.
    pub fn temp(self, c: f64) -> f64 {
        match self {
            Unit::Celsius => c,
            Unit::Fahrenheit => c * 9.0 / 5.0 + 32.0,
        }
    }

    /// A temperature difference (K) in this unit's degrees.
    pub fn diff(self, k: f64) -> f64 {
        match self {
            Unit::Celsius => k,
            Unit::Fahrenheit => k * 9.0 / 5.0,
        }
    }

    /// Converts a value typed in this unit back to °C.
    pub fn to_celsius(self, v: f64) -> f64 {
        match self {
            Unit::Celsius => v,
            Unit::Fahrenheit => (v - 32.0) * 5.0 / 9.0,
        }
    }

    /// Symbol for temperatures.
    pub fn symbol(self) -> &'static str {
        match self {
            Unit::Celsius => "°C",
            Unit::Fahrenheit => "°F",
        }
    }

    /// Symbol for temperature differences (margins): K, or °F of difference.
    pub fn diff_symbol(self) -> &'static str {
        match self {
            Unit::Celsius => "K",
            Unit::Fahrenheit => "°F",
        }
    }

    /// Formats a temperature with one decimal (an em dash for missing values).
    pub fn fmt(self, c: f64) -> String {
        if c.is_finite() {
            format!("{:.1} {}", self.temp(c), self.symbol())
        } else {
            "—".into()
        }
    }
}
