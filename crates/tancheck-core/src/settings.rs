//! Steps and tolerances of a check, with documented defaults.

use serde::{Deserialize, Serialize};

use crate::error::CoreError;
use crate::schemes::Scheme;

/// How one scheme is run and judged.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct SchemeSettings {
    /// Step relative to the strain scale of the increment (see [`Settings::step_floor`]).
    pub rel_step: f64,
    /// A check passes when the norm error and every entry error are at most this.
    pub tol: f64,
}

/// Settings of a tangent check.
///
/// Default relative steps follow the usual error balance of each scheme (Nocedal & Wright,
/// Numerical Optimization, 2nd ed. 2006, §8.1): forward √ε_mach ≈ 1.5e-8, central
/// ε_mach^(1/3) ≈ 6e-6; the complex step has no subtractive cancellation, so any tiny step
/// works (Squire & Trapp 1998): 1e-20. Default tolerances are this project's choice, set well
/// above the errors the schemes reach on smooth routines (measured in the tests of
/// `schemes`): forward 1e-4, central 1e-6, complex step 1e-10.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields, default)]
pub struct Settings {
    pub schemes: Vec<Scheme>,
    // A scheme's section may give only one of its two numbers; the other keeps the scheme's
    // default (`"central": {"tol": 1e-8}` was refused for its missing rel_step, where
    // `--tol central=1e-8` ran; a user-style sweep).
    #[serde(deserialize_with = "partial::forward")]
    pub forward: SchemeSettings,
    #[serde(deserialize_with = "partial::backward")]
    pub backward: SchemeSettings,
    #[serde(deserialize_with = "partial::central")]
    pub central: SchemeSettings,
    #[serde(deserialize_with = "partial::central4")]
    pub central4: SchemeSettings,
    #[serde(deserialize_with = "partial::richardson")]
    pub richardson: SchemeSettings,
    #[serde(deserialize_with = "partial::complex_step")]
    pub complex_step: SchemeSettings,
    /// The strain scale of an increment is max(|ε + Δε|∞, |Δε|∞, step_floor); the step of a
    /// scheme is its `rel_step` times that scale. The floor keeps the step finite at zero strain.
    pub step_floor: f64,
    /// Temperature scale for ∂σ/∂T steps: max(|T|, |ΔT|, temp_floor).
    pub temp_floor: f64,
    /// An entry's error is |ΔC_ij| / max(|C_ij|, entry_floor · ‖C‖), all in Mandel form, so a
    /// wrong small entry is not hidden under large diagonal ones while entries that should be
    /// zero are judged against the matrix scale.
    pub entry_floor: f64,
    /// How many of the worst entries a report lists per check.
    pub worst_entries: usize,
    /// When a check fails, take a closer look: kink probe, step studies, cause hypotheses.
    pub diagnose: bool,
    /// The Newton solve of mixed-control increments.
    pub mixed: crate::mixed::MixedSettings,
    /// Look harder at first calls, cheaply: a zero increment from the start state (outputs
    /// must be finite), and the full memory guards (reads past the end of the inputs; the call
    /// repeated and compared bit for bit) on the first call of each newly reached branch.
    pub first_calls: bool,
    /// Threads a check may use (`--jobs`); 1 (the default) for one. More are used only for a
    /// routine that offers handles for other threads and passes the probe of
    /// [`crate::concurrent`]; the report is the same whatever the number. In a report's
    /// settings: the threads the path was checked on. Not part of a manifest or of a report's
    /// JSON.
    #[serde(skip)]
    pub jobs: usize,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            schemes: vec![Scheme::Central, Scheme::ComplexStep],
            forward: SchemeSettings { rel_step: 1.5e-8, tol: 1e-4 },
            backward: SchemeSettings { rel_step: 1.5e-8, tol: 1e-4 },
            central: SchemeSettings { rel_step: 6e-6, tol: 1e-6 },
            central4: SchemeSettings { rel_step: 1e-3, tol: 1e-6 },
            richardson: SchemeSettings { rel_step: 1e-3, tol: 1e-6 },
            complex_step: SchemeSettings { rel_step: 1e-20, tol: 1e-10 },
            step_floor: 1e-6,
            temp_floor: 1.0,
            entry_floor: 1e-2,
            worst_entries: 4,
            diagnose: true,
            mixed: crate::mixed::MixedSettings::default(),
            first_calls: true,
            jobs: 1,
        }
    }
}

impl Settings {
    pub fn scheme(&self, s: Scheme) -> SchemeSettings {
        match s {
            Scheme::Forward => self.forward,
            Scheme::Backward => self.backward,
            Scheme::Central => self.central,
            Scheme::Central4 => self.central4,
            Scheme::Richardson => self.richardson,
            Scheme::ComplexStep => self.complex_step,
        }
    }

    pub fn scheme_mut(&mut self, s: Scheme) -> &mut SchemeSettings {
        match s {
            Scheme::Forward => &mut self.forward,
            Scheme::Backward => &mut self.backward,
            Scheme::Central => &mut self.central,
            Scheme::Central4 => &mut self.central4,
            Scheme::Richardson => &mut self.richardson,
            Scheme::ComplexStep => &mut self.complex_step,
        }
    }

    /// Settings that cannot work, explained.
    pub fn validate(&self) -> Result<(), CoreError> {
        if self.schemes.is_empty() {
            return Err(CoreError::NoScheme);
        }
        for s in Scheme::ALL {
            let c = self.scheme(s);
            if !(c.rel_step > 0.0 && c.rel_step <= 1.0) {
                return Err(CoreError::SchemeStep { scheme: s.name(), value: c.rel_step });
            }
            if !(c.tol > 0.0 && c.tol.is_finite()) {
                return Err(CoreError::SchemeTolerance { scheme: s.name(), value: c.tol });
            }
        }
        if [self.step_floor, self.temp_floor, self.entry_floor].iter().any(|&x| !x.is_finite() || x <= 0.0) {
            return Err(CoreError::Floors);
        }
        Ok(())
    }
}

/// A scheme's section read with either number left out: the scheme's default fills it.
mod partial {
    use serde::{Deserialize, Deserializer};

    use super::{SchemeSettings, Settings};

    #[derive(Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Partial {
        rel_step: Option<f64>,
        tol: Option<f64>,
    }

    fn fill<'de, D: Deserializer<'de>>(d: D, default: SchemeSettings) -> Result<SchemeSettings, D::Error> {
        let p = Partial::deserialize(d)?;
        Ok(SchemeSettings {
            rel_step: p.rel_step.unwrap_or(default.rel_step),
            tol: p.tol.unwrap_or(default.tol),
        })
    }

    macro_rules! schemes {
        ($($name:ident),*) => {$(
            pub(super) fn $name<'de, D: Deserializer<'de>>(d: D) -> Result<SchemeSettings, D::Error> {
                fill(d, Settings::default().$name)
            }
        )*};
    }
    schemes!(forward, backward, central, central4, richardson, complex_step);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_scheme_section_may_give_one_of_its_numbers() {
        let s: Settings =
            serde_json::from_str(r#"{ "central": { "tol": 1e-8 }, "forward": { "rel_step": 1e-7 } }"#)
                .expect("either number alone");
        let d = Settings::default();
        assert_eq!(s.central, SchemeSettings { rel_step: d.central.rel_step, tol: 1e-8 });
        assert_eq!(s.forward, SchemeSettings { rel_step: 1e-7, tol: d.forward.tol });
        assert_eq!(s.complex_step, d.complex_step);
        // Still no unknown field.
        let e = serde_json::from_str::<Settings>(r#"{ "central": { "tolerance": 1e-8 } }"#).unwrap_err();
        assert!(e.to_string().contains("unknown field `tolerance`"), "{e}");
        // And a report's settings read back as written.
        let back: Settings = serde_json::from_str(&serde_json::to_string(&d).unwrap()).unwrap();
        assert_eq!(back, d);
    }
}
