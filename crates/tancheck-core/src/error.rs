//! Why core refused its input: bad names, paths, settings and sizes, and cases that do not
//! decode. Every message says what is wrong and, where it is not plain, how to fix it.
//!
//! A crashing or failing routine is not an error here: it is a [`crate::routine::Fault`] in
//! a report. This module sits below every other module of core except `convention` and
//! `routine`, whose types some messages carry.

use crate::convention::{ConventionError, PointKind};
use crate::routine::Fault;

/// Bad input to core: the caller (a manifest, a case file, a suite, the C API) must change it.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CoreError {
    /// A path shape name that is not one of [`crate::path::Shape::ALL`].
    #[error("unknown path shape `{given}`; expected one of {known}")]
    UnknownShape { given: String, known: String },

    /// A scheme name that is not one of [`crate::schemes::Scheme::ALL`].
    #[error(
        "unknown scheme `{0}`; expected forward, backward, central, central4, richardson or complex-step"
    )]
    UnknownScheme(String),

    /// A probe name the registry does not know.
    #[error("unknown probe `{given}`; known probes: {known}")]
    UnknownProbe { given: String, known: String },

    // --- paths ---
    #[error("the path has no increments")]
    EmptyPath,

    /// Every increment moves only slots the routine's kind does not have (they are left out):
    /// nothing would be loaded, and every increment would pass.
    #[error(
        "every strain increment of the path lies in slot{} {slots}, which the routine's kind ({kind}) does not \
         have ({takes}): with them left out nothing is loaded and nothing would be checked; give the path in \
         the routine's own components",
        if slots.contains(',') { "s" } else { "" }
    )]
    PathOutsideKind { slots: String, kind: String, takes: String },

    /// A stress held at a value other than zero in a slot the routine's kind does not have:
    /// the point's stress there is zero by its kind (plane stress) or not its own to hold.
    #[error(
        "increment {increment} of the path holds the stress in slot {slot} at {value}, which the routine's kind \
         ({kind}) does not have ({takes}): it cannot be reached there; hold only the routine's own components \
         (or hold it at 0)"
    )]
    HoldOutsideKind { increment: usize, slot: String, value: f64, kind: String, takes: String },

    #[error("the path has {count} increments; at most {max}")]
    TooManyIncrements { count: usize, max: usize },

    /// `increment` counts from 1.
    #[error("increment {increment} of the path has a value that is not a finite number")]
    NotFinite { increment: usize },

    #[error(
        "increment {increment}: a strain increment of {} is out of range (at most {max} in magnitude)",
        short(*value)
    )]
    StrainOutOfRange { increment: usize, value: f64, max: f64 },

    #[error("increment {increment}: a temperature increment of {} is out of range (at most {max} in magnitude)", short(*value))]
    TemperatureOutOfRange { increment: usize, value: f64, max: f64 },

    #[error("increment {increment}: a time increment of {} is out of range (0 to {max})", short(*value))]
    TimeOutOfRange { increment: usize, value: f64, max: f64 },

    #[error("increment {increment}: a held stress of {} is out of range (a finite number at most {max:e} in magnitude)", short(*value))]
    HeldStressOutOfRange { increment: usize, value: f64, max: f64 },

    #[error(
        "increment {increment}: component {component} has a strain increment ({}) and a held stress ({}); give one of them (set its dstrain entry to 0 to hold the stress, or its hold_stress entry to null to prescribe the strain)",
        short(*dstrain),
        short(*stress)
    )]
    HeldAndPrescribed { increment: usize, component: &'static str, dstrain: f64, stress: f64 },

    /// An increment number (from 1) beyond the path.
    #[error("increment {index} is not on the path ({count} increments)")]
    NotOnPath { index: usize, count: usize },

    // --- settings ---
    #[error("no derivative scheme selected; choose from forward, backward, central, central4, richardson, complex-step")]
    NoScheme,

    /// The complex step is the only scheme selected and the routine has no twin: nothing
    /// would be compared, and a pass would say nothing.
    #[error(
        "only the complex step is selected, and {0} has no complex twin: nothing would be checked; build the twin (`tancheck build` compiles the source again with TC_COMPLEX and exports <symbol>_cx) or select a real scheme as well (e.g. central)"
    )]
    ComplexStepWithoutTwin(String),

    #[error(
        "the {scheme} step must be a positive number at most 1 (relative to the strain scale), got {value}"
    )]
    SchemeStep { scheme: &'static str, value: f64 },

    #[error("the {scheme} tolerance must be a positive number, got {value}")]
    SchemeTolerance { scheme: &'static str, value: f64 },

    #[error("step_floor, temp_floor and entry_floor must be positive finite numbers")]
    Floors,

    #[error("the fraction tolerance must lie in (0, 1), got {0}")]
    FractionTolerance(f64),

    #[error("the grid of fractions needs at least 2 points, got {0}")]
    GridTooSmall(usize),

    #[error("the smallest fraction must lie in (0, 1/grid), got {0}")]
    SmallestFraction(f64),

    #[error("the time limit of a shrink must be positive, got {0}")]
    ShrinkTime(f64),

    // --- exploration ---
    /// A declared property range that cannot be sampled.
    #[error("property range {index}: {reason}")]
    PropertyRange { index: usize, reason: String },

    #[error("an exploration needs a budget: give a number of paths, of calls, or seconds")]
    NoBudget,

    #[error("{what} must be at least 1, got {given}")]
    TooSmall { what: &'static str, given: usize },

    #[error("the temperature window must be two finite numbers, the first below the second, got [{0}, {1}]")]
    TemperatureWindow(f64, f64),

    // --- sizes of a routine's inputs ---
    #[error("{given} properties given; the routine is declared with {declared}")]
    PropertyCount { given: usize, declared: usize },

    #[error("the start strain and stress need {0} components")]
    StartSize(usize),

    #[error("{given} state variables given; the routine is declared with {declared}")]
    StateCount { given: usize, declared: usize },

    /// A routine presented under a convention of another kind of point.
    #[error("cannot present a {inner} routine as a {outer} one")]
    OtherKind { inner: PointKind, outer: PointKind },

    // --- cases ---
    /// The component order of a case's routine.
    #[error("routine.order: {0}")]
    CaseOrder(#[source] ConventionError),

    #[error("{what}[{index}] is null and has no bits")]
    NullWithoutBits { what: String, index: usize },

    #[error("{what} has {values} values and {bits} bit patterns; give both for every entry, or drop `bits`")]
    BitsCount { what: String, values: usize, bits: usize },

    #[error("{what}[{index}]: `{bits}` is not 16 hex digits")]
    NotHexBits { what: String, index: usize, bits: String },

    /// Walking a case's path, the routine failed before reaching the call.
    #[error("increment {increment} of the path: {fault}")]
    PathFault { increment: usize, fault: Fault },

    /// Walking a path to one of its increments, the routine failed at an earlier one.
    #[error("walking the path to increment {target}: increment {increment} failed: {fault}")]
    WalkFailed { target: usize, increment: usize, fault: Fault },

    /// Walking a case's path reached another call than the case's.
    #[error("the path's last increment does not reach the call: {} differ", differ.join(", "))]
    PathMissesCall { differ: Vec<&'static str> },

    // --- probe settings of a suite ---
    #[error("irreversibility: damage index {index} is not a state variable (the routine has {nstate})")]
    DamageIndex { index: usize, nstate: usize },

    /// A probe's own settings in a suite entry do not fit the routine (the message names the
    /// probe and the field).
    #[error("{0}")]
    ProbeInput(String),

    #[error("regularisation: \"length\" {0} is not a positive property")]
    LengthProperty(usize),

    #[error("frame: axis vector at property {at} needs properties {at}..{}, but the routine has {nprop}", at + 2)]
    AxisProperty { at: usize, nprop: usize },
}

/// A number for a message: as written when of everyday size, in exponent form when very large
/// or very small (`1e300`, not 301 digits).
fn short(x: f64) -> String {
    if x == 0.0 || !x.is_finite() || (1e-4..1e6).contains(&x.abs()) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The wording users and tests match on: these messages were strings before the enum.
    #[test]
    fn messages_keep_their_wording() {
        assert_eq!(
            CoreError::UnknownScheme("fwd".into()).to_string(),
            "unknown scheme `fwd`; expected forward, backward, central, central4, richardson or complex-step"
        );
        assert_eq!(
            CoreError::PathMissesCall { differ: vec!["strain", "time"] }.to_string(),
            "the path's last increment does not reach the call: strain, time differ"
        );
        assert_eq!(
            CoreError::AxisProperty { at: 9, nprop: 10 }.to_string(),
            "frame: axis vector at property 9 needs properties 9..11, but the routine has 10"
        );
        assert_eq!(
            CoreError::HeldStressOutOfRange { increment: 2, value: f64::INFINITY, max: 1e12 }.to_string(),
            "increment 2: a held stress of inf is out of range (a finite number at most 1e12 in magnitude)"
        );
    }

    #[test]
    fn out_of_range_values_are_written_short() {
        let e = CoreError::StrainOutOfRange { increment: 11, value: 1e300, max: 10.0 }.to_string();
        assert_eq!(e, "increment 11: a strain increment of 1e300 is out of range (at most 10 in magnitude)");
        let e = CoreError::TimeOutOfRange { increment: 2, value: -0.5, max: 1e6 }.to_string();
        assert!(e.contains("of -0.5 is out of range"), "{e}");
    }
}
