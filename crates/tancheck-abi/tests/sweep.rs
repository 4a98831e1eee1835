//! A scheme's perturbed calls made in one guarded entry (a loaded routine with its guards off)
//! end exactly as the same calls made one by one: the same report, bit for bit, and the same
//! calls, for routines whose perturbed calls fail, ask for a smaller increment, crash, read
//! outputs they have not written or write into their increment (tests/sweep_faults.c), and for
//! the example J2 routines (the consistent and the continuum tangent), under every scheme.

use num_complex::Complex64;
use tancheck_abi::{GuardLevel, Library, LibraryRoutine};
use tancheck_core::check;
use tancheck_core::driver::{Outputs, PointState};
use tancheck_core::path::{Path, Shape};
use tancheck_core::report::Keep;
use tancheck_core::routine::Sweep;
use tancheck_core::{
    CallInput, CallOutput, Caller, ComplexRoutine, Convention, Fault, PointKind, Report, Routine,
    RoutineInfo, Scheme, Settings, ShearMeasure, Verdict,
};
use tancheck_testkit::libs::{build_examples, build_once};

/// The routine it wraps, called one call at a time (it offers no sweep).
struct OneByOne<'a> {
    inner: &'a mut LibraryRoutine,
}

impl Routine for OneByOne<'_> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.inner.call(input, output)
    }
    tancheck_core::pass_on_to_inner!();
}

impl ComplexRoutine for OneByOne<'_> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.inner.complex().expect("the twin").call_complex(input, output)
    }
}

fn info(name: &str, nstate: usize, nprop: usize) -> RoutineInfo {
    RoutineInfo {
        name: name.into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate,
        nprop,
    }
}

fn faults_library() -> &'static std::path::Path {
    build_once("sweep_faults", &["crates/tancheck-abi/tests/sweep_faults.c"])
}

/// The check's report and its real and complex calls.
fn check_with(r: &mut dyn Routine, props: &[f64], path: &Path, settings: &Settings) -> (Report, u64, u64) {
    let start = PointState::zero(r.info(), 293.0);
    let mut caller = Caller::new(r);
    let report = check::run_with(&mut caller, props, start, path, settings, Keep::All, &mut |_| {})
        .expect("a valid check");
    (report, caller.real_calls, caller.complex_calls)
}

/// The check of `symbol` made with sweeps and one call at a time, at each guard level (a new
/// handle for each check, so that no guard finding carries over): the same to the bit.
fn same_either_way(
    lib: &std::path::Path,
    symbol: &str,
    info: RoutineInfo,
    props: &[f64],
    path: &Path,
) -> Report {
    let open = |level| {
        let mut r = Library::open(lib).unwrap().routine(symbol, info.clone()).unwrap();
        r.set_guard_level(level);
        r
    };
    let mut swept = None;
    for level in [GuardLevel::Off, GuardLevel::Light, GuardLevel::Full] {
        for schemes in [
            vec![Scheme::Central, Scheme::ComplexStep],
            vec![Scheme::Forward, Scheme::Backward, Scheme::Central4, Scheme::Richardson],
        ] {
            let settings = Settings { schemes, jobs: 1, ..Default::default() };
            let a = check_with(&mut open(level), props, path, &settings);
            let b = check_with(&mut OneByOne { inner: &mut open(level) }, props, path, &settings);
            assert_eq!(
                format!("{:?}", a.0),
                format!("{:?}", b.0),
                "{symbol}, guards {level:?}: the reports differ"
            );
            assert_eq!((a.1, a.2), (b.1, b.2), "{symbol}, guards {level:?}: other calls");
            swept.get_or_insert(a.0);
        }
    }
    swept.expect("checked")
}

fn ramp() -> Path {
    Path::ramp(Shape::UniaxialStrain, 2e-3, 3, 2)
}

/// The fault records of a report's increments, as text.
fn faults(r: &Report) -> String {
    format!("{:?}", r.increments.iter().map(|i| &i.checks).collect::<Vec<_>>())
}

#[test]
fn a_failed_status_in_the_middle_of_the_columns_ends_as_one_by_one() {
    let r =
        same_either_way(faults_library(), "sweep_status", info("sweep_status", 2, 2), &[2e5, 0.3], &ramp());
    let f = faults(&r);
    assert!(f.contains("dstrain[3] ±") && f.contains("a planted failure"), "{f}");
    assert!(f.contains("dstrain[4] + i"), "{f}");
}

#[test]
fn a_smaller_increment_asked_for_ends_as_one_by_one() {
    let r =
        same_either_way(faults_library(), "sweep_smaller", info("sweep_smaller", 2, 2), &[2e5, 0.3], &ramp());
    let f = faults(&r);
    assert!(f.contains("dstrain[1] ±") && f.contains("a quarter of this"), "{f}");
}

#[test]
fn a_crash_in_the_middle_of_the_columns_ends_as_one_by_one() {
    let r = same_either_way(faults_library(), "sweep_crash", info("sweep_crash", 2, 2), &[2e5, 0.3], &ramp());
    let f = faults(&r);
    assert!(f.contains("dstrain[2] ±") && f.contains("SIGSEGV"), "{f}");
    assert!(f.contains("dstrain[5] + i"), "{f}");
}

#[test]
fn outputs_read_before_written_are_nan_in_a_sweep_too() {
    let r = same_either_way(faults_library(), "sweep_reads", info("sweep_reads", 2, 2), &[2e5, 0.3], &ramp());
    assert_ne!(r.verdict, Verdict::Pass, "NaN stresses in the perturbed calls fail the check");
}

#[test]
fn an_increment_written_by_the_routine_reaches_no_later_call() {
    let r =
        same_either_way(faults_library(), "sweep_scratch", info("sweep_scratch", 2, 2), &[2e5, 0.3], &ramp());
    assert_eq!(r.verdict, Verdict::Pass, "its tangent is right");
}

#[test]
fn the_j2_routines_check_the_same_with_and_without_sweeps() {
    let lib = build_examples("sweep_j2", &["c/j2.c"]);
    let props = [210000.0, 0.3, 355.0, 0.0, 150.0, 12.0, 2500.0];
    let path = Path::ramp(Shape::UniaxialStrain, 6e-3, 8, 8);
    let good = same_either_way(lib, "c_j2", info("c_j2", 13, 7), &props, &path);
    assert_eq!(good.verdict, Verdict::Pass);
    let bad = same_either_way(lib, "c_j2_continuum", info("c_j2_continuum", 13, 7), &props, &path);
    assert_eq!(bad.verdict, Verdict::TangentFailure);
}

#[test]
fn only_a_routine_without_guards_sweeps() {
    let (props, strain, d, stress0, state0) =
        ([2e5, 0.3], [0.0; 6], [1e-4, 0.0, -0.0, 0.0, 0.0, 0.0], [0.0; 6], [0.0; 2]);
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &d,
        temp: [293.0, 0.0],
        stress0: &stress0,
        state0: &state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: false,
    };
    let mut stresses = [0.0; 72];
    let mut sweep_at = |level| {
        let mut r = Library::open(faults_library())
            .unwrap()
            .routine("sweep_status", info("sweep_status", 2, 2))
            .unwrap();
        r.set_guard_level(level);
        let mut outs = [Outputs::new(6, 2, 0.0), Outputs::new(6, 2, 0.0)];
        let [p, m] = &mut outs;
        let (mut p, mut m) = (p.view(), m.view());
        r.sweep_real(Sweep {
            input,
            kept: &d,
            steps: &[1e-7, -1e-7],
            ncols: 6,
            output: &mut p,
            output_neg: Some(&mut m),
            stresses: &mut stresses,
        })
        .map(|end| (end.calls, end.result.is_ok()))
    };
    // With guards, each call is checked on its own: the caller makes them one by one.
    assert_eq!(sweep_at(GuardLevel::Light), None);
    assert_eq!(sweep_at(GuardLevel::Full), None);
    assert_eq!(sweep_at(GuardLevel::Off), Some((12, true)));
    // Column 3's −h call: stress0 + C (dstrain − h e₄) in engineering shear, μ = E / 2(1 + ν).
    let mu = 2e5 / (2.0 * 1.3);
    assert_eq!(stresses[7 * 6 + 3], mu * -1e-7);
}
