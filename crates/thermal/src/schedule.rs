//! Schedules: the ordered (configuration, seconds) steps a controller runs, built from dwell totals.

use crate::error::ThermalError;

/// One step: stay in `config` for `seconds`.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Step {
    /// Configuration index.
    pub config: usize,
    /// Duration, s.
    pub seconds: f64,
}

/// An ordered list of steps.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Schedule {
    /// The steps, in order.
    pub steps: Vec<Step>,
}

impl Schedule {
    /// One block per configuration with a positive dwell, in configuration order.
    pub fn blocks(dwell: &[f64]) -> Self {
        Self::rounds(dwell, 1)
    }

    /// Each dwell split into `rounds` equal parts, the configurations cycled `rounds` times: heat
    /// spreads between visits, which limits hot spots.
    pub fn rounds(dwell: &[f64], rounds: usize) -> Self {
        let rounds = rounds.max(1);
        let mut steps = Vec::new();
        for _ in 0..rounds {
            for (config, &d) in dwell.iter().enumerate() {
                if d > 0.0 {
                    steps.push(Step {
                        config,
                        seconds: d / rounds as f64,
                    });
                }
            }
        }
        Schedule { steps }
    }

    /// Total heating time, s.
    pub fn total(&self) -> f64 {
        self.steps.iter().map(|s| s.seconds).sum()
    }

    /// Checks every step names one of `configs` configurations and lasts a finite, non-negative time.
    pub fn validate(&self, configs: usize) -> Result<(), ThermalError> {
        for (i, s) in self.steps.iter().enumerate() {
            if s.config >= configs {
                return Err(ThermalError::UnknownConfiguration {
                    step: i,
                    config: s.config,
                    configs,
                });
            }
            if !s.seconds.is_finite() || s.seconds < 0.0 {
                return Err(ThermalError::OutOfRange {
                    what: "schedule step duration (s)",
                    value: s.seconds,
                    allowed: "a finite number ≥ 0",
                });
            }
        }
        Ok(())
    }
}
