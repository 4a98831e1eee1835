//! A whole check from a zero start state, the settings of one scheme, and a report's
//! increments in one line each: what the verdict tests run and print when they fail.

use tancheck_core::path::Path;
use tancheck_core::{check, Caller, PointState, Report, Routine, Scheme, Settings};

/// The check of `routine` with `props` along `path`, from the zero state at `temp0`.
pub fn run_from_zero(
    routine: &mut dyn Routine,
    props: &[f64],
    temp0: f64,
    path: &Path,
    settings: &Settings,
) -> Report {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    check::run(&mut caller, props, PointState::zero(&info, temp0), path, settings).expect("a valid check")
}

/// The default settings with `scheme` alone.
pub fn only(scheme: Scheme) -> Settings {
    Settings { schemes: vec![scheme], ..Settings::default() }
}

/// Each increment's index, verdict, finding and diagnosis reason, one line each (for the
/// message of a failed assertion).
pub fn summary(r: &Report) -> String {
    r.increments
        .iter()
        .map(|i| {
            format!(
                "inc {} passed {} finding {} reason {}",
                i.index,
                i.passed(),
                i.finding(),
                i.diagnosis.as_ref().map_or("-".to_string(), |d| d.reason.clone())
            )
        })
        .collect::<Vec<_>>()
        .join("\n")
}
