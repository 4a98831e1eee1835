//! Load paths: sequences of increments in canonical components.
//!
//! Canonical components are tensor strains 11, 22, 33, 23, 13, 12 for solids (or opening,
//! slip 1, slip 2 for cohesive points). The driver converts them to each routine's order and
//! shear measure; components a kind lacks are dropped (plane strain keeps ε33 = 0 because
//! no built-in direction moves it for that kind).

use serde::{Deserialize, Serialize};

use crate::error::CoreError;

/// The most increments a path may have.
pub const MAX_INCREMENTS: usize = 1_000_000;
/// The largest strain component (increment, peak or start) accepted in magnitude: far beyond
/// any small-strain routine's range; larger values are input errors, not routine failures.
pub const MAX_STRAIN: f64 = 10.0;
/// The largest temperature increment accepted in magnitude (K).
pub const MAX_DTEMP: f64 = 1.0e4;
/// The largest time increment accepted.
pub const MAX_DTIME: f64 = 1.0e12;
/// The largest held or start stress accepted in magnitude.
pub const MAX_STRESS: f64 = 1.0e15;

/// One increment of a path.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct PathIncrement {
    /// Canonical strain increment.
    #[serde(deserialize_with = "six_components")]
    pub dstrain: [f64; 6],
    #[serde(default)]
    pub dtemp: f64,
    #[serde(default = "one")]
    pub dtime: f64,
    /// Mixed control: canonical stress components held at these values at the end of the
    /// increment (`null` for a strain-controlled component, whose `dstrain` applies); the
    /// strain increments of held components are solved for.
    #[serde(default, skip_serializing_if = "Option::is_none", deserialize_with = "six_held")]
    pub hold_stress: Option<[Option<f64>; 6]>,
}

impl PathIncrement {
    /// A strain-controlled increment.
    pub fn strain(dstrain: [f64; 6]) -> PathIncrement {
        PathIncrement { dstrain, dtemp: 0.0, dtime: 1.0, hold_stress: None }
    }
}

/// The six held stress components (null where not held), with an error that says so for
/// another count: seven read "trailing characters" (a user-style sweep).
fn six_held<'de, D: serde::Deserializer<'de>>(d: D) -> Result<Option<[Option<f64>; 6]>, D::Error> {
    let Some(v) = Option::<Vec<Option<f64>>>::deserialize(d)? else { return Ok(None) };
    v.as_slice().try_into().map(Some).map_err(|_| {
        serde::de::Error::custom(format!(
            "hold_stress has {} entr{}: it has the 6 tensor components 11 22 33 23 13 12 for every kind of \
             point, each a held stress or null",
            v.len(),
            if v.len() == 1 { "y" } else { "ies" }
        ))
    })
}

/// The six tensor components of a path's strain increment, with an error that says so for
/// another count (a plane-stress user writes the three the routine takes).
fn six_components<'de, D: serde::Deserializer<'de>>(d: D) -> Result<[f64; 6], D::Error> {
    let v: Vec<f64> = Vec::deserialize(d)?;
    v.as_slice().try_into().map_err(|_| {
        serde::de::Error::custom(format!(
            "dstrain has {} entr{}: a path's dstrain has the 6 tensor components 11 22 33 23 13 12 for every \
             kind of point (each kind takes the ones it uses, e.g. 11 22 12 for plane stress)",
            v.len(),
            if v.len() == 1 { "y" } else { "ies" }
        ))
    })
}

fn one() -> f64 {
    1.0
}

/// A named path.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Path {
    pub name: String,
    pub increments: Vec<PathIncrement>,
}

/// Built-in path shapes: a direction in canonical components.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Shape {
    /// ε11 only.
    UniaxialStrain,
    /// ε12 only (tensor shear).
    Shear12,
    /// ε11 = ε22.
    Biaxial,
    /// ε11 = ε22 = ε33.
    Hydrostatic,
    /// ε11 with ε12 = ε11/2, ε13 = 0.15 ε11 and ε23 = −ε11/4: every column of a 3D tangent is
    /// exercised, and the flow direction has no zero shear component.
    TensionShear,
    /// Slots 0, 1, 2 as 1, 0.75, 0.375: for cohesive points an opening with both slips (mixed
    /// mode); for solids a triaxial normal strain.
    MixedMode,
}

impl Shape {
    pub const ALL: [Shape; 6] = [
        Shape::UniaxialStrain,
        Shape::Shear12,
        Shape::Biaxial,
        Shape::Hydrostatic,
        Shape::TensionShear,
        Shape::MixedMode,
    ];

    pub fn name(self) -> &'static str {
        match self {
            Shape::UniaxialStrain => "uniaxial-strain",
            Shape::Shear12 => "shear-12",
            Shape::Biaxial => "biaxial",
            Shape::Hydrostatic => "hydrostatic",
            Shape::TensionShear => "tension-shear",
            Shape::MixedMode => "mixed-mode",
        }
    }

    pub fn direction(self) -> [f64; 6] {
        match self {
            Shape::UniaxialStrain => [1.0, 0.0, 0.0, 0.0, 0.0, 0.0],
            Shape::Shear12 => [0.0, 0.0, 0.0, 0.0, 0.0, 1.0],
            Shape::Biaxial => [1.0, 1.0, 0.0, 0.0, 0.0, 0.0],
            Shape::Hydrostatic => [1.0, 1.0, 1.0, 0.0, 0.0, 0.0],
            Shape::TensionShear => [1.0, 0.0, 0.0, -0.25, 0.15, 0.5],
            Shape::MixedMode => [1.0, 0.75, 0.375, 0.0, 0.0, 0.0],
        }
    }

    pub fn from_name(s: &str) -> Result<Shape, CoreError> {
        Shape::ALL.into_iter().find(|x| x.name() == s).ok_or_else(|| {
            let names: Vec<_> = Shape::ALL.iter().map(|x| x.name()).collect();
            CoreError::UnknownShape { given: s.into(), known: names.join(", ") }
        })
    }
}

/// The canonical slots' names, in order (tensor components 11 22 33 23 13 12).
pub const SLOT_NAMES: [&str; 6] = ["11", "22", "33", "23", "13", "12"];

impl Path {
    /// Zero the strain entries in the slots `kind` does not drive (`PointKind::path_slots`:
    /// its components' slots but a plane-strain point's 33); the names of the slots that held
    /// a nonzero entry.
    pub fn leave_out_slots(&mut self, kind: crate::PointKind) -> Vec<&'static str> {
        let kept = kind.path_slots();
        let mut left = Vec::new();
        for slot in (0..6).filter(|s| !kept.contains(s)) {
            if self.increments.iter().any(|inc| inc.dstrain[slot] != 0.0) {
                left.push(SLOT_NAMES[slot]);
            }
            for inc in &mut self.increments {
                inc.dstrain[slot] = 0.0;
            }
        }
        left
    }

    /// Load along `shape` to `peak` (the size of the direction's leading component) in
    /// `steps_out` equal increments, then back to zero in `steps_back` increments.
    ///
    /// Each increment is the difference between its target point and the strain the increments
    /// before it add up to in floating point (as a solver, and the check's walk, add them), so
    /// the path reaches its peak and comes back to exactly zero: equal increments summed left
    /// 1e-19 to 1e-21 of strain at the end, a point 1e-19 from a switch at zero strain, where a
    /// correct damage law with a tension–compression split failed (a user-style sweep). The
    /// differences are exact (Sterbenz: consecutive points within a factor 2 of each other, or
    /// from or to zero), so every point of the path is its target, bit for bit.
    pub fn ramp(shape: Shape, peak: f64, steps_out: usize, steps_back: usize) -> Path {
        let d = shape.direction();
        let mut increments = Vec::with_capacity(steps_out + steps_back);
        let mut reached = [0.0f64; 6];
        for k in 0..steps_out + steps_back {
            // The fraction of the peak at the end of increment k.
            let at = if k < steps_out {
                (k + 1) as f64 / steps_out as f64
            } else {
                (steps_out + steps_back - k - 1) as f64 / steps_back as f64
            };
            let mut de = [0.0; 6];
            for i in 0..6 {
                let target = d[i] * peak * at;
                de[i] = target - reached[i];
                reached[i] += de[i];
            }
            increments.push(PathIncrement::strain(de));
        }
        let name = if steps_back > 0 {
            format!("{} to {peak:e} and back ({steps_out}+{steps_back} increments)", shape.name())
        } else {
            format!("{} to {peak:e} ({steps_out} increments)", shape.name())
        };
        Path { name, increments }
    }

    /// The default path of a point of `kind`, to `peak` in `steps_out` increments and back in
    /// `steps_back`: tension-shear (every column of a 3D tangent exercised), a bar's
    /// uniaxial-strain, and a cohesive point's mixed-mode, an opening with its slips, so that
    /// the mixed-mode coupling is loaded (tension-shear left it pure opening, and a wrong
    /// coupling passed; a user-style sweep); the second slip left out for a 2D one, unsaid (it
    /// has none). Entries in slots the kind does not have are left out, and the name says so.
    /// The command line's default path and the C API's `TCK_SHAPE_DEFAULT` are this one.
    pub fn kind_default(kind: crate::PointKind, peak: f64, steps_out: usize, steps_back: usize) -> Path {
        use crate::PointKind;
        let shape = match kind {
            PointKind::Uniaxial => Shape::UniaxialStrain,
            PointKind::Cohesive3d | PointKind::Cohesive2d => Shape::MixedMode,
            _ => Shape::TensionShear,
        };
        let mut p = Path::ramp(shape, peak, steps_out, steps_back);
        if kind == PointKind::Cohesive2d {
            for inc in &mut p.increments {
                inc.dstrain[2] = 0.0;
            }
            p.name = p.name.replace("mixed-mode", "mixed-mode (opening and slip)");
        }
        let left = p.leave_out_slots(kind);
        if !left.is_empty() {
            p.name.push_str(&format!(
                " (its {} left out for {} point)",
                left.join(" and "),
                kind.with_article()
            ));
        }
        p
    }

    /// Uniaxial stress: ε11 prescribed out to `peak` in `steps_out` increments and back in
    /// `steps_back`, every other stress component held at zero.
    pub fn uniaxial_stress(peak: f64, steps_out: usize, steps_back: usize) -> Path {
        let mut p = Path::ramp(Shape::UniaxialStrain, peak, steps_out, steps_back);
        for inc in &mut p.increments {
            inc.hold_stress = Some([None, Some(0.0), Some(0.0), Some(0.0), Some(0.0), Some(0.0)]);
        }
        p.name = p.name.replace("uniaxial-strain", "uniaxial stress");
        p
    }

    pub fn validate(&self) -> Result<(), CoreError> {
        if self.increments.is_empty() {
            return Err(CoreError::EmptyPath);
        }
        if self.increments.len() > MAX_INCREMENTS {
            return Err(CoreError::TooManyIncrements { count: self.increments.len(), max: MAX_INCREMENTS });
        }
        for (k, inc) in self.increments.iter().enumerate() {
            let increment = k + 1;
            if inc.dstrain.iter().any(|x| !x.is_finite()) || !inc.dtemp.is_finite() || !inc.dtime.is_finite()
            {
                return Err(CoreError::NotFinite { increment });
            }
            if let Some(&value) = inc.dstrain.iter().find(|x| x.abs() > MAX_STRAIN) {
                return Err(CoreError::StrainOutOfRange { increment, value, max: MAX_STRAIN });
            }
            if inc.dtemp.abs() > MAX_DTEMP {
                return Err(CoreError::TemperatureOutOfRange { increment, value: inc.dtemp, max: MAX_DTEMP });
            }
            if !(0.0..=MAX_DTIME).contains(&inc.dtime) {
                return Err(CoreError::TimeOutOfRange { increment, value: inc.dtime, max: MAX_DTIME });
            }
            if let Some(hold) = &inc.hold_stress {
                if let Some(&value) = hold.iter().flatten().find(|x| !x.is_finite() || x.abs() > MAX_STRESS) {
                    return Err(CoreError::HeldStressOutOfRange { increment, value, max: MAX_STRESS });
                }
                // A component is prescribed or held, not both: the solve finds a held one's strain.
                const LABELS: [&str; 6] = ["11", "22", "33", "23", "13", "12"];
                if let Some(i) = (0..6).find(|&i| hold[i].is_some() && inc.dstrain[i] != 0.0) {
                    return Err(CoreError::HeldAndPrescribed {
                        increment,
                        component: LABELS[i],
                        dstrain: inc.dstrain[i],
                        stress: hold[i].unwrap_or_default(),
                    });
                }
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_ramp_returns_to_zero() {
        let p = Path::ramp(Shape::TensionShear, 4e-3, 8, 5);
        assert_eq!(p.increments.len(), 13);
        let mut sum = [0.0; 6];
        for inc in &p.increments {
            for (s, d) in sum.iter_mut().zip(inc.dstrain) {
                *s += d;
            }
        }
        assert!(sum.iter().all(|s| s.abs() < 1e-18), "{sum:?}");
        assert!(Shape::from_name("nope").unwrap_err().to_string().contains("uniaxial-strain"));
    }

    // Summed in floating point as the walk sums them, the increments of every built-in shape
    // reach the peak and come back to zero bit for bit (equal increments left 2.7e-19 of
    // ε11 after 20 out and 10 back: a point off a switch at zero strain; a user-style sweep).
    #[test]
    fn a_ramp_ends_at_exactly_zero_and_passes_its_peak() {
        for shape in Shape::ALL {
            for (peak, out, back) in [(4e-3, 8, 4), (0.1, 20, 10), (1e-3, 7, 3), (3.7e-3, 11, 13)] {
                let p = Path::ramp(shape, peak, out, back);
                let mut sum = [0.0f64; 6];
                for (k, inc) in p.increments.iter().enumerate() {
                    for (s, d) in sum.iter_mut().zip(inc.dstrain) {
                        *s += d;
                    }
                    if k + 1 == out {
                        let want = shape.direction().map(|x| x * peak);
                        assert_eq!(sum, want, "{shape:?} {peak} {out} {back}: the peak");
                    }
                }
                assert_eq!(sum, [0.0; 6], "{shape:?} {peak} {out} {back}");
            }
        }
    }
}
