//! Assertions for `cargo test`: check a routine's tangent along a path and fail the test
//! with a message that names the finding.
//!
//! A routine is anything that implements [`Routine`](crate::core::Routine): a Rust model
//! wrapped in [`ModelRoutine`](crate::core::ModelRoutine) (its complex-step twin comes with
//! it), or a routine of a compiled library from [`library_routine`].
//!
//! ```
//! use tancheck::assert::{assert_finding, assert_tangent_consistent};
//! use tancheck::core::{
//!     CallInput, CallOutput, Convention, Fault, Model, ModelRoutine, Path, PointKind, RoutineInfo,
//!     Scalar, ShearMeasure, Shape,
//! };
//!
//! /// A hardening spring: σ = σ₀ + E Δε + a ((ε + Δε)³ − ε³), tangent E + 3 a (ε + Δε)².
//! struct Spring {
//!     info: RoutineInfo,
//!     /// The factor in front of a (ε + Δε)² in the tangent: 3 is right.
//!     factor: f64,
//! }
//!
//! impl Spring {
//!     fn new(factor: f64) -> Spring {
//!         let convention = Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering);
//!         Spring { info: RoutineInfo { name: "spring".into(), convention, nstate: 0, nprop: 2 }, factor }
//!     }
//! }
//!
//! impl Model for Spring {
//!     fn info(&self) -> &RoutineInfo {
//!         &self.info
//!     }
//!     fn evaluate<S: Scalar>(&self, i: &CallInput<'_, S>, o: &mut CallOutput<'_, S>) -> Result<(), Fault> {
//!         let (e, a) = (i.props[0], i.props[1]);
//!         let (eps0, eps1) = (i.strain[0], i.strain[0] + i.dstrain[0]);
//!         o.stress[0] = i.stress0[0] + e * i.dstrain[0] + a * (eps1 * eps1 * eps1 - eps0 * eps0 * eps0);
//!         o.tangent[0] = e + a * eps1 * eps1 * self.factor;
//!         o.dstress_dtemp[0] = S::cst(0.0);
//!         o.energy[0] = S::cst(0.0);
//!         o.energy[1] = S::cst(0.0);
//!         Ok(())
//!     }
//! }
//!
//! let props = [1000.0, 4.0e7];
//! let path = Path::ramp(Shape::UniaxialStrain, 0.01, 5, 2);
//!
//! // The right tangent passes; the report is returned for further assertions.
//! let report = assert_tangent_consistent(&mut ModelRoutine(Spring::new(3.0)), &props, &path);
//! assert_eq!(report.increments.len(), 7);
//!
//! // A tangent that forgot the 3 fails, and the message names the finding and the increment.
//! let failure = std::panic::catch_unwind(|| {
//!     assert_tangent_consistent(&mut ModelRoutine(Spring::new(1.0)), &props, &path);
//! })
//! .unwrap_err();
//! let message = failure.downcast_ref::<String>().unwrap();
//! assert!(message.contains("the tangent of `spring` is not consistent"), "{message}");
//! assert!(message.contains("finding"), "{message}");
//!
//! // A known flaw can be pinned down: the finding must be the one expected.
//! assert_finding(
//!     &mut ModelRoutine(tancheck::models::zoo::ZooModel::new("j2-shear-factor", PointKind::Solid3d).unwrap()),
//!     &[200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0],
//!     &Path::ramp(Shape::TensionShear, 4e-3, 8, 4),
//!     "shear-factor",
//! );
//! ```
//!
//! A consistent tangent shows that the routine differentiates its own stress update; it does
//! not validate the material model against test data.

use std::path::Path as FsPath;

use crate::abi::{Library, LibraryRoutine, LoadError};
use crate::cli::report::terminal::{Detail, Terminal};
use crate::cli::report::Reporter;
use crate::core::{
    check, Caller, Convention, CoreError, PointKind, PointState, Report, Routine, RoutineInfo, Settings,
    Verdict,
};

/// The settings of a check, for the helpers with `_with`. The defaults are those of
/// `tancheck check` (central differences and the complex step, the closer look at first calls),
/// from a zero start state at temperature 0.
#[derive(Clone, Debug, Default)]
pub struct Options {
    /// Schemes, steps and tolerances.
    pub settings: Settings,
    /// The start state; `None`: zero strain, stress and state variables at temperature 0.
    pub start: Option<PointState>,
}

/// A check that could not give a passing report: bad input (wrong sizes, bad settings), or a
/// report whose verdict is not a pass. Its `Display` is the readable message.
#[derive(Clone, Debug)]
pub enum CheckFailure {
    /// The check could not run: the inputs do not fit the routine.
    Input { routine: String, error: CoreError },
    /// The check ran and did not pass.
    Verdict(Box<Report>),
}

impl std::fmt::Display for CheckFailure {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            CheckFailure::Input { routine, error } => {
                write!(f, "tancheck could not check `{routine}`: {error}")
            }
            CheckFailure::Verdict(report) => f.write_str(&failure_message(report)),
        }
    }
}

impl std::error::Error for CheckFailure {}

/// Run the check of `routine` along `path` (as `tancheck check` does) and return the report,
/// whatever its verdict; an error only when the check cannot run.
pub fn run_check(
    routine: &mut dyn Routine,
    props: &[f64],
    path: &crate::core::Path,
    options: &Options,
) -> Result<Report, CheckFailure> {
    let info = routine.info().clone();
    let start = options.start.clone().unwrap_or_else(|| PointState::zero(&info, 0.0));
    let mut caller = Caller::new(routine);
    check::run(&mut caller, props, start, path, &options.settings)
        .map_err(|error| CheckFailure::Input { routine: info.name.clone(), error })
}

/// Check and return the report when every check passed; otherwise the failure, whose
/// message names the verdict, the finding and the failing increments.
pub fn check_tangent(
    routine: &mut dyn Routine,
    props: &[f64],
    path: &crate::core::Path,
    options: &Options,
) -> Result<Report, CheckFailure> {
    let report = run_check(routine, props, path, options)?;
    if report.verdict == Verdict::Pass {
        Ok(report)
    } else {
        Err(CheckFailure::Verdict(Box::new(report)))
    }
}

/// Panic (fail the test) unless the tangent of `routine` is consistent along `path`, with
/// the default settings; returns the passing report.
#[track_caller]
pub fn assert_tangent_consistent(
    routine: &mut dyn Routine,
    props: &[f64],
    path: &crate::core::Path,
) -> Report {
    assert_tangent_consistent_with(routine, props, path, &Options::default())
}

/// [`assert_tangent_consistent`] with other settings or start state.
#[track_caller]
pub fn assert_tangent_consistent_with(
    routine: &mut dyn Routine,
    props: &[f64],
    path: &crate::core::Path,
    options: &Options,
) -> Report {
    match check_tangent(routine, props, path, options) {
        Ok(r) => r,
        Err(e) => panic!("{e}"),
    }
}

/// Panic unless the check finds `finding` (a name as `tancheck check` prints it, e.g.
/// `shear-factor`, `continuum-tangent`, `none`, `routine-fault`); returns the report. For
/// tests that pin down a known flaw, or that a fix removed it (`none`).
#[track_caller]
pub fn assert_finding(
    routine: &mut dyn Routine,
    props: &[f64],
    path: &crate::core::Path,
    finding: &str,
) -> Report {
    let report = match run_check(routine, props, path, &Options::default()) {
        Ok(r) => r,
        Err(e) => panic!("{e}"),
    };
    let found = report.finding();
    if found != finding {
        panic!(
            "tancheck expected the finding `{finding}` for `{}`, and found `{found}` (verdict {})\n{}",
            report.routine.name,
            report.verdict.word(),
            readable(&report)
        );
    }
    report
}

/// The routine `symbol` of the shared library at `library` (built e.g. by `tancheck build`,
/// with its complex-step twin `symbol_cx` when there is one), in the default component order
/// of `kind` with engineering shear, with `nstate` state variables and `nprop` properties.
/// Every call goes through the guarded shim, so a crash fails the check instead of the test
/// process.
pub fn library_routine(
    library: impl AsRef<FsPath>,
    symbol: &str,
    kind: PointKind,
    nstate: usize,
    nprop: usize,
) -> Result<LibraryRoutine, LoadError> {
    library_routine_in(library, symbol, Convention::new(kind, Default::default()), nstate, nprop)
}

/// [`library_routine`] in another component order or shear measure.
pub fn library_routine_in(
    library: impl AsRef<FsPath>,
    symbol: &str,
    convention: Convention,
    nstate: usize,
    nprop: usize,
) -> Result<LibraryRoutine, LoadError> {
    let lib = Library::open(library.as_ref())?;
    let name =
        format!("{}:{symbol}", library.as_ref().file_name().map(|f| f.to_string_lossy()).unwrap_or_default());
    lib.routine(symbol, RoutineInfo { name, convention, nstate, nprop })
}

/// The message of a failed check: a headline with the verdict and the finding, the first
/// failing increment, then the report as `tancheck check -q` prints it.
pub fn failure_message(report: &Report) -> String {
    let what = match report.verdict {
        Verdict::Pass => "passed".to_string(),
        Verdict::TangentFailure => "is not consistent".to_string(),
        Verdict::RoutineFault => {
            "could not be checked: the routine crashed, misbehaved or failed".to_string()
        }
        Verdict::TwinNotSafe => {
            "agrees with the real differences, but the complex-step twin is not complex-step safe".to_string()
        }
    };
    let mut m = format!(
        "tancheck: the tangent of `{}` {what} (verdict {}, finding `{}`)",
        report.routine.name,
        report.verdict.word(),
        report.finding()
    );
    if let Some(inc) = report.increments.iter().find(|i| !i.passed()) {
        m.push_str(&format!(
            "; first failing increment {} (branch {}, finding `{}`)",
            inc.index,
            inc.branch_label(),
            inc.finding()
        ));
    }
    if let Some(f) = report.first_fault() {
        m.push_str(&format!("; {}", f.message));
    }
    m.push('\n');
    m.push_str(&readable(report));
    m
}

fn readable(report: &Report) -> String {
    let mut buf = Vec::new();
    // Writing into a Vec cannot fail.
    let _ = Terminal::new(Detail::Quiet, &mut buf).check(report);
    String::from_utf8_lossy(&buf).into_owned()
}
