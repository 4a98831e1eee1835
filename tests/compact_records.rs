//! A check that keeps only the failures in detail judges a passing increment from a few
//! numbers (`Measurement::passed`, `Collector::push_passed`) instead of the full comparison.
//! The zoo is checked with the selftest's demo properties and paths, and a longer path.
//! These tests hold that shortcut to the full judgement: over every routine of the zoo (right
//! and flawed tangents, broken twins, ∂σ/∂T, kinks), a mixed-control path, a routine without a
//! twin, one and two threads and with and without the first-call looks, the report that keeps
//! only failures has the same records, summaries, branches, verdict, notes and call counts as
//! the one that keeps everything, and its detailed increments are exactly the ones the full
//! report marks as failed, diagnosed or faulted.

use tancheck::cli::selftest::{path_for as selftest_path, props};
use tancheck::core::path::{Path, PathIncrement, Shape};
use tancheck::core::report::Keep;
use tancheck::core::{
    check, CallInput, CallOutput, Caller, Fault, PointState, Report, Routine, RoutineInfo, Settings,
};
use tancheck::models::reference;
use tancheck::models::zoo::{zoo, zoo_model, ZooEntry};

/// A routine with its twin hidden: every complex-step check is skipped.
struct NoTwin<R>(R);

impl<R: Routine> Routine for NoTwin<R> {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.call(input, output)
    }
}

/// Out, back through the start and out again, with a temperature change (a routine that
/// ignores temperature is unaffected): elastic and inelastic increments, unloading and a
/// reversal.
fn path_for(name: &str) -> Path {
    let mut p = Path::ramp(Shape::TensionShear, 4e-3, 8, 6);
    if name.starts_with("cohesive") {
        p = Path::ramp(Shape::MixedMode, 6e-3, 8, 4);
    }
    for (k, inc) in p.increments.iter_mut().enumerate() {
        inc.dtemp = if name.starts_with("thermo") { 40.0 + k as f64 } else { 0.0 };
    }
    p
}

fn run(routine: &mut dyn Routine, props: &[f64], path: &Path, settings: &Settings, keep: Keep) -> Report {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    check::run_with(&mut caller, props, PointState::zero(&info, 20.0), path, settings, keep, &mut |_| {})
        .expect("a valid check")
}

/// The JSON text of a report part (NaN compares equal to NaN there: both are `null`).
macro_rules! json {
    ($v:expr) => {
        serde_json::to_string($v).expect("serialisable")
    };
}

/// The report keeping failures against the one keeping everything.
fn same_report(what: &str, all: &Report, failures: &Report) {
    assert_eq!(json!(&all.records), json!(&failures.records), "{what}: records");
    assert_eq!(json!(&all.summary), json!(&failures.summary), "{what}: summary");
    assert_eq!(json!(&all.branches), json!(&failures.branches), "{what}: branches");
    assert_eq!(all.verdict, failures.verdict, "{what}: verdict");
    assert_eq!(all.notes, failures.notes, "{what}: notes");
    assert_eq!(all.coverage, failures.coverage, "{what}: coverage");
    assert_eq!(json!(&all.calls), json!(&failures.calls), "{what}: calls");
    let detailed: Vec<_> =
        all.increments.iter().filter(|i| !i.passed() || i.diagnosis.is_some() || i.fault.is_some()).collect();
    assert_eq!(json!(&detailed), json!(&failures.increments), "{what}: detailed increments");
    assert_eq!(all.records.len(), all.increments.len(), "{what}: a record per increment");
}

fn settings_variants() -> Vec<(&'static str, Settings)> {
    vec![
        ("default", Settings::default()),
        ("no first-call looks", Settings { first_calls: false, ..Settings::default() }),
        ("two threads", Settings { jobs: 2, first_calls: false, ..Settings::default() }),
    ]
}

fn kinds(e: &ZooEntry) -> Vec<tancheck::core::PointKind> {
    e.kinds.to_vec()
}

#[test]
fn every_zoo_routine_gets_the_same_records_and_summaries_keeping_only_failures() {
    let mut failing = 0;
    let mut passing = 0;
    for e in zoo() {
        for kind in kinds(&e) {
            for (label, settings) in settings_variants() {
                // The selftest's path for the entry, and a longer one out, back and out again.
                for path in [selftest_path(&e), path_for(e.name)] {
                    let what = format!("{} ({kind:?}, {label}, {})", e.name, path.name);
                    let mut a = zoo_model(e.name, kind).unwrap();
                    let all = run(&mut a, &props(e.name), &path, &settings, Keep::All);
                    let mut b = zoo_model(e.name, kind).unwrap();
                    let failures = run(&mut b, &props(e.name), &path, &settings, Keep::Failures);
                    same_report(&what, &all, &failures);
                    if all.increments.iter().all(|i| i.passed()) {
                        passing += 1;
                    } else {
                        failing += 1;
                    }
                }
            }
        }
    }
    // Both kinds of report were seen: the shortcut and the full judgement.
    assert!(passing >= 10 && failing >= 10, "{passing} passing and {failing} failing checks");
}

#[test]
fn a_mixed_control_path_and_a_routine_without_twin_get_the_same_records() {
    let hold = Some([None, Some(0.0), Some(0.0), Some(0.0), Some(0.0), None]);
    let mut increments = Vec::new();
    for k in 0..10 {
        let d = if k < 5 { [1e-3, 0.0, 0.0, 0.0, 0.0, 0.0] } else { [0.0, 0.0, 0.0, 0.0, 0.0, 1e-3] };
        increments.push(PathIncrement { hold_stress: hold, ..PathIncrement::strain(d) });
    }
    let mixed = Path { name: "tension, then shear, lateral stresses held at zero".into(), increments };
    let props = props("j2");
    for (label, settings) in settings_variants() {
        for path in [&mixed, &path_for("j2")] {
            let what = format!("j2 on {} ({label})", path.name);
            let mut a = reference("j2", tancheck::core::PointKind::Solid3d).unwrap();
            let all = run(&mut a, &props, path, &settings, Keep::All);
            let mut b = reference("j2", tancheck::core::PointKind::Solid3d).unwrap();
            let failures = run(&mut b, &props, path, &settings, Keep::Failures);
            same_report(&what, &all, &failures);
            // Without the twin the complex step is skipped in every increment.
            let what = format!("{what}, no twin");
            let mut a = NoTwin(reference("j2", tancheck::core::PointKind::Solid3d).unwrap());
            let all = run(&mut a, &props, path, &settings, Keep::All);
            let mut b = NoTwin(reference("j2", tancheck::core::PointKind::Solid3d).unwrap());
            let failures = run(&mut b, &props, path, &settings, Keep::Failures);
            assert!(all.summary.iter().any(|s| s.skipped > 0), "{what}: {}", json!(&all.summary));
            same_report(&what, &all, &failures);
        }
    }
}

/// The complex step alone, without a twin, compares nothing: refused as bad input, not a pass
/// with 0 checks (a flawed routine passed so). With a real scheme beside it, the check runs
/// and the complex step is skipped with a note.
#[test]
fn the_complex_step_alone_without_a_twin_is_refused() {
    let props = props("j2-continuum");
    let path = path_for("j2");
    let only = Settings { schemes: vec![tancheck::core::Scheme::ComplexStep], ..Settings::default() };
    let mut r = NoTwin(zoo_model("j2-continuum", tancheck::core::PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let e = check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &only).unwrap_err();
    assert!(e.to_string().contains("has no complex twin: nothing would be checked"), "{e}");
    let mut r = NoTwin(zoo_model("j2-continuum", tancheck::core::PointKind::Solid3d).unwrap());
    let report = run(&mut r, &props, &path, &Settings::default(), Keep::Failures);
    assert_eq!(report.verdict, tancheck::core::Verdict::TangentFailure);
}
