//! A scheme's perturbed calls made in one guarded entry (a loaded routine with its guards off)
//! end exactly as the same calls made one by one: the same report, bit for bit, and the same
//! calls, for routines whose perturbed calls fail, ask for a smaller increment, crash, read
//! outputs they have not written or write into their increment (tests/sweep_faults.c), and for
//! the example J2 routines (the consistent and the continuum tangent), under every scheme.

use num_complex::Complex64;
use tancheck_abi::{GuardLevel, Library, LibraryRoutine};
use tancheck_core::check;
use tancheck_core::driver::{Outputs, PointState};
use tancheck_core::path::{Path, PathIncrement, Shape};
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
    same_at_levels(lib, symbol, info, props, path, &[GuardLevel::Off, GuardLevel::Light, GuardLevel::Full])
}

/// [`same_either_way`] at the given guard levels: the same reports, calls and guard findings.
fn same_at_levels(
    lib: &std::path::Path,
    symbol: &str,
    info: RoutineInfo,
    props: &[f64],
    path: &Path,
    levels: &[GuardLevel],
) -> Report {
    let open = |level| {
        let mut r = Library::open(lib).unwrap().routine(symbol, info.clone()).unwrap();
        r.set_guard_level(level);
        r
    };
    let mut swept = None;
    for &level in levels {
        for schemes in [
            vec![Scheme::Central, Scheme::ComplexStep],
            vec![Scheme::Forward, Scheme::Backward, Scheme::Central4, Scheme::Richardson],
        ] {
            let settings = Settings { schemes, jobs: 1, ..Default::default() };
            let (mut ra, mut rb) = (open(level), open(level));
            let a = check_with(&mut ra, props, path, &settings);
            let b = check_with(&mut OneByOne { inner: &mut rb }, props, path, &settings);
            let what = format!("{symbol}, guards {level:?}");
            assert_eq!(format!("{:?}", a.0), format!("{:?}", b.0), "{what}: the reports differ");
            assert_eq!((a.1, a.2), (b.1, b.2), "{what}: other calls");
            assert_eq!(ra.findings(), rb.findings(), "{what}: other guard findings");
            assert_eq!(ra.guard_calls(), rb.guard_calls(), "{what}: other guard calls");
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
    // The real calls refused on one side (dstrain[3] < 0) are gone around: column 23 is made
    // on the side the routine takes (the report's notes say so); the twin's refusal of a call
    // whose real inputs the routine computes sets the twin aside (not complex-step safe), the
    // diagnosis naming the call.
    let notes = r.notes.join("\n");
    assert!(notes.contains("23 (forward) taken one-sided") && notes.contains("a planted failure"), "{notes}");
    assert!(!f.contains("dstrain[3] ±"), "{f}");
    assert!(f.contains(tancheck_core::call_check::TWIN_REFUSED), "{f}");
    let reasons: Vec<&str> =
        r.increments.iter().filter_map(|i| i.diagnosis.as_ref()).map(|d| d.reason.as_str()).collect();
    assert!(
        reasons.iter().any(|d| d.contains("dstrain[4] + i") && d.contains("a planted failure")),
        "{reasons:?}"
    );
}

#[test]
fn a_smaller_increment_asked_for_ends_as_one_by_one() {
    let r =
        same_either_way(faults_library(), "sweep_smaller", info("sweep_smaller", 2, 2), &[2e5, 0.3], &ramp());
    // Refused on one side (dstrain[1] < 0): column 22 is made on the other, with a note that
    // gives the routine's words.
    let notes = r.notes.join("\n");
    assert!(notes.contains("22 (forward) taken one-sided") && notes.contains("a quarter of this"), "{notes}");
    assert!(!faults(&r).contains("dstrain[1] ±"));
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
fn an_unwritten_output_and_a_written_input_in_the_middle_of_the_columns_end_as_one_by_one() {
    same_either_way(faults_library(), "sweep_hole", info("sweep_hole", 2, 2), &[2e5, 0.3], &ramp());
    same_either_way(
        faults_library(),
        "sweep_writes_input",
        info("sweep_writes_input", 2, 2),
        &[2e5, 0.3],
        &ramp(),
    );
    // With the light guards, both are findings of the perturbed calls.
    for (symbol, finding) in [
        ("sweep_hole", "left state[1] unwritten"),
        ("sweep_writes_input", "wrote to its read-only input strain"),
    ] {
        let mut r = Library::open(faults_library()).unwrap().routine(symbol, info(symbol, 2, 2)).unwrap();
        let settings = Settings { jobs: 1, ..Default::default() };
        let (report, _, _) = check_with(&mut r, &[2e5, 0.3], &ramp(), &settings);
        assert!(faults(&report).contains(finding), "{symbol}: {}", faults(&report));
    }
}

#[test]
fn a_failure_in_the_last_call_of_a_sweep_ends_as_one_by_one() {
    let r = same_either_way(faults_library(), "sweep_last", info("sweep_last", 2, 2), &[2e5, 0.3], &ramp());
    let f = faults(&r);
    // The real refusal (dstrain[5] < 0, the sweep's last call) is seen and gone around on the
    // other side (a status dropped there would leave no note); the twin's refusal sets the twin
    // aside, the diagnosis naming its call.
    let notes = r.notes.join("\n");
    assert!(
        notes.contains("12 (forward) taken one-sided") && notes.contains("the last call fails"),
        "{notes}"
    );
    assert!(f.contains(tancheck_core::call_check::TWIN_REFUSED), "{f}");
    let reasons: Vec<&str> =
        r.increments.iter().filter_map(|i| i.diagnosis.as_ref()).map(|d| d.reason.as_str()).collect();
    assert!(
        reasons.iter().any(|d| d.contains("dstrain[5] + i") && d.contains("the last call fails")),
        "{reasons:?}"
    );
}

#[test]
fn a_call_and_temperature_written_by_the_routine_reach_no_later_call() {
    let heated = PathIncrement { dtemp: 2.0, ..PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]) };
    let path = Path { name: "heated".into(), increments: vec![heated; 3] };
    same_either_way(
        faults_library(),
        "sweep_writes_call",
        info("sweep_writes_call", 2, 2),
        &[2e5, 0.3],
        &path,
    );
}

#[test]
fn floating_point_traps_stop_a_sweep_as_they_stop_a_single_call() {
    for traps in [true, false] {
        let open = |level| {
            let mut r = Library::open(faults_library())
                .unwrap()
                .routine("sweep_fpe", info("sweep_fpe", 2, 2))
                .unwrap();
            r.set_guard_level(level);
            r.set_fp_traps(traps).unwrap();
            r
        };
        for level in [GuardLevel::Off, GuardLevel::Light] {
            let settings = Settings { jobs: 1, ..Default::default() };
            let (mut ra, mut rb) = (open(level), open(level));
            let a = check_with(&mut ra, &[2e5, 0.3], &ramp(), &settings);
            let b = check_with(&mut OneByOne { inner: &mut rb }, &[2e5, 0.3], &ramp(), &settings);
            assert_eq!(format!("{:?}", a.0), format!("{:?}", b.0), "traps {traps}, guards {level:?}");
            if traps {
                assert!(faults(&a.0).contains("SIGFPE"), "{}", faults(&a.0));
            }
        }
    }
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

/// The misbehaving routines of fortran-shim/examples/c/misbehave.c that end neither the
/// process nor their call's thread (and whose results do not depend on the calls before: a
/// check made twice must give the same report), each checked with sweeps and one call at a
/// time at every guard level: the same reports and the same guard findings.
#[test]
fn misbehaving_routines_are_found_the_same_with_and_without_sweeps() {
    let lib = build_examples("sweep_misbehave", &["c/misbehave.c"]);
    for symbol in [
        "bad_null_deref",
        "bad_divide_by_zero",
        "bad_state_overrun",
        "bad_perturbed_overrun",
        "bad_perturbed_crash",
        "bad_tangent_hole",
        "bad_writes_strain",
        "bad_scratch_increment",
        "bad_unasked_tangent",
        "bad_unguarded_norm",
    ] {
        same_either_way(lib, symbol, info(symbol, 0, 2), &[2e5, 0.3], &ramp());
    }
    // A read past the end of the properties reads what lies there: without guards, whatever
    // memory follows them (not the same from check to check), in the guarded block its zone.
    for symbol in ["bad_props_overread", "bad_branch_overread"] {
        same_at_levels(
            lib,
            symbol,
            info(symbol, 0, 2),
            &[2e5, 0.3],
            &ramp(),
            &[GuardLevel::Light, GuardLevel::Full],
        );
    }
    // The light guards see the perturbed calls' overrun, which only they make.
    let mut r = Library::open(lib).unwrap().routine("bad_perturbed_overrun", info("p", 0, 2)).unwrap();
    let settings = Settings { jobs: 1, ..Default::default() };
    let (report, _, _) = check_with(&mut r, &[2e5, 0.3], &ramp(), &settings);
    assert!(faults(&report).contains("wrote past the end of state"), "{}", faults(&report));
}

#[test]
fn only_a_routine_without_full_guards_sweeps() {
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
    let sweep_at = |level| {
        let mut stresses = [0.0f64; 72];
        let counter = std::sync::atomic::AtomicU64::new(5);
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
            counter: Some(&counter),
        })
        .map(|end| (end.calls, end.result.is_ok(), stresses.map(f64::to_bits), counter.into_inner()))
    };
    // With the full guards, each call is checked on its own: the caller makes them one by one.
    assert_eq!(sweep_at(GuardLevel::Full), None);
    let light = sweep_at(GuardLevel::Light).expect("the light guards sweep");
    let off = sweep_at(GuardLevel::Off).expect("a routine without guards sweeps");
    assert_eq!((off.0, off.1), (12, true));
    // The counter a wrapper gives is raised once per call.
    assert_eq!(off.3, 5 + 12);
    assert_eq!(light, off);
    // Column 3's −h call: stress0 + C (dstrain − h e₄) in engineering shear, μ = E / 2(1 + ν).
    let mu = 2e5 / (2.0 * 1.3);
    assert_eq!(f64::from_bits(off.2[7 * 6 + 3]), mu * -1e-7);
}
