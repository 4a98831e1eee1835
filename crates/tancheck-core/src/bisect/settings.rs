//! How finely the inside of an increment is searched, and which settings cannot work.

use serde::{Deserialize, Serialize};

use crate::error::CoreError;

/// How finely the inside of an increment is searched.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields, default)]
pub struct BisectSettings {
    /// Bisection stops when the bracket of the class change is at most this fraction of the
    /// increment wide.
    pub fraction_tol: f64,
    /// Fractions k/grid (k = 1 … grid) are judged first; the last class change among them is
    /// then narrowed.
    pub grid: usize,
    /// The smallest fraction judged when the whole grid has the class of the full increment.
    pub smallest_fraction: f64,
}

impl Default for BisectSettings {
    fn default() -> Self {
        BisectSettings { fraction_tol: 1e-6, grid: 16, smallest_fraction: 1.0 / 1048576.0 }
    }
}

impl BisectSettings {
    pub fn validate(&self) -> Result<(), CoreError> {
        if !(self.fraction_tol > 0.0 && self.fraction_tol < 1.0) {
            return Err(CoreError::FractionTolerance(self.fraction_tol));
        }
        if self.grid < 2 {
            return Err(CoreError::GridTooSmall(self.grid));
        }
        if !(self.smallest_fraction > 0.0 && self.smallest_fraction < 1.0 / self.grid as f64) {
            return Err(CoreError::SmallestFraction(self.smallest_fraction));
        }
        Ok(())
    }
}
