//! The core of tancheck: conventions, routine capabilities, the path driver, derivative
//! schemes, comparison, and the report model. Nothing here knows about libraries, files or
//! terminals; front ends and reporters sit on top.
//!
//! Pipeline: [`path`] → [`driver`] (calls through [`routine::Caller`]) → [`schemes`] →
//! [`compare`] → [`report`]; [`check::run`] ties them together.

pub mod bisect;
pub mod block;
pub mod call_check;
pub mod case;
pub mod check;
pub mod compare;
pub mod concurrent;
pub mod convention;
pub mod convention_fit;
pub mod cutback;
pub mod diagnose;
pub mod driver;
pub mod error;
pub mod explore;
pub mod finite;
pub mod first_calls;
pub mod increment;
pub mod mixed;
pub mod path;
pub mod probe;
pub mod relabel;
pub mod report;
pub mod routine;
pub mod scalar;
pub mod schemes;
pub mod settings;
#[cfg(test)]
mod time_tests;
#[cfg(test)]
pub(crate) mod worked;

pub use convention::{Component, Convention, PointKind, ShearMeasure};
pub use driver::{Direction, Driver, PointState};
pub use error::CoreError;
pub use path::{Path, PathIncrement, Shape};
pub use report::{Report, Verdict};
pub use routine::{
    CallInput, CallOutput, Caller, ComplexRoutine, Fault, Model, ModelRoutine, Outcome, Routine, RoutineInfo,
};
pub use scalar::Scalar;
pub use schemes::Scheme;
pub use settings::{SchemeSettings, Settings};
