//! The manifest's optional `explore` section: what `tancheck explore` may vary and what it
//! should reach.
//!
//! ```json
//! "explore": {
//!   "properties": [ { "index": 2, "range": [200, 500] },
//!                   { "index": 3, "range": [10, 5000], "log": true } ],
//!   "branches": { "0": "elastic", "1": "plastic" },
//!   "temperature": [20, 400],
//!   "strain_scale": 0.002
//! }
//! ```
//! Every field is optional; unknown fields are errors.

use std::collections::BTreeMap;

use serde::Deserialize;

use tancheck_core::explore::{ExploreSettings, NamedBranch, PropertyRange};

/// A property drawn from a range.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PropertySpec {
    pub index: usize,
    pub range: [f64; 2],
    /// Log-uniform instead of uniform (a positive range).
    #[serde(default)]
    pub log: bool,
}

/// The `explore` section.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExploreSpec {
    /// Properties drawn for each fresh path (the manifest's value elsewhere).
    #[serde(default)]
    pub properties: Vec<PropertySpec>,
    /// Branches the routine reports and should reach: id (as text) → name.
    #[serde(default)]
    pub branches: BTreeMap<String, String>,
    /// The temperatures the paths stay within.
    pub temperature: Option<[f64; 2]>,
    /// The strain scale of the increments instead of the measured elastic range.
    pub strain_scale: Option<f64>,
}

impl ExploreSpec {
    /// The property ranges.
    pub fn ranges(&self) -> Vec<PropertyRange> {
        self.properties
            .iter()
            .map(|p| PropertyRange { index: p.index, low: p.range[0], high: p.range[1], log: p.log })
            .collect()
    }

    /// The declared branches, by id.
    pub fn named_branches(&self) -> Result<Vec<NamedBranch>, String> {
        self.branches
            .iter()
            .map(|(k, v)| {
                k.trim()
                    .parse::<i32>()
                    .map(|branch| NamedBranch { branch, name: v.clone() })
                    .map_err(|_| format!("explore.branches: `{k}` is not a branch number (an integer)"))
            })
            .collect()
    }

    /// Put what the section declares into `ex`.
    pub fn apply(&self, ex: &mut ExploreSettings) -> Result<(), String> {
        ex.property_ranges = self.ranges();
        for b in self.named_branches()? {
            match ex.branches.iter_mut().find(|x| x.branch == b.branch) {
                Some(x) => *x = b,
                None => ex.branches.push(b),
            }
        }
        ex.branches.sort_by_key(|b| b.branch);
        ex.temperature = self.temperature.map(|[a, b]| (a, b));
        ex.strain_scale = self.strain_scale;
        Ok(())
    }
}

/// Check the section against a routine with `nprop` properties, temperatures at most
/// `max_temperature` in magnitude (the message names the field).
pub fn validate(spec: Option<&ExploreSpec>, nprop: usize, max_temperature: f64) -> Result<(), String> {
    let Some(spec) = spec else { return Ok(()) };
    let mut ex = ExploreSettings::default();
    spec.apply(&mut ex)?;
    if let Some(s) = spec.strain_scale {
        if !(s.is_finite() && s > 0.0 && s <= tancheck_core::path::MAX_STRAIN) {
            return Err(format!(
                "explore.strain_scale is {s}; it must be a number above 0 and at most {}",
                tancheck_core::path::MAX_STRAIN
            ));
        }
    }
    if let Some([lo, hi]) = spec.temperature {
        let max = max_temperature;
        if lo.abs() > max || hi.abs() > max {
            return Err(format!("explore.temperature: temperatures must be at most {max:e} in magnitude"));
        }
    }
    ex.validate(nprop).map_err(|e| {
        let field = match e {
            tancheck_core::CoreError::PropertyRange { .. } => "explore.properties",
            tancheck_core::CoreError::TemperatureWindow(..) => "explore.temperature",
            _ => "explore",
        };
        format!("{field}: {e}")
    })
}
