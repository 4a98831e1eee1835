//! Finite strain: routines driven by the deformation gradient, the measures of their stress
//! and tangent, numerical tangents made in each measure, paths in F, the check with its own
//! causes, and the objectivity probes.
//!
//! Data flow: [`mat3`] → [`measure`] → [`routine`] → [`numeric`] → [`path`] → [`causes`] →
//! [`check`] (with `cutback` and `kink`) → [`probe`]; [`locate`] and [`case`] bisect a
//! failing check and write and replay its case.

pub mod case;
pub mod causes;
pub mod check;
mod cutback;
mod kink;
pub mod locate;
pub mod mat3;
pub mod measure;
pub mod numeric;
pub mod path;
pub mod probe;
mod rigid;
pub mod routine;

pub use check::{FiniteReport, FiniteSettings};
pub use measure::{StressMeasure, TangentMeasure};
pub use path::{FinitePath, FinitePathSpec};
pub use routine::{
    FiniteInfo, FiniteInput, FiniteModel, FiniteModelRoutine, FiniteOutput, FiniteRoutine, Frame,
};
