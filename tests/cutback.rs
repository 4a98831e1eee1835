//! A routine that asks for a smaller increment (`TC_STATUS_SMALLER_INCREMENT` with the
//! fraction it expects to manage), as it would ask a solver: the check cuts the increments it
//! refuses into parts and goes on, with a note. It was a FAULT (exit 3) at the first
//! increment for a routine that did nothing wrong. A routine that asks for ever smaller
//! increments, or faults otherwise, keeps the report it had.

use num_complex::Complex64;
use tancheck::core::driver::PointState;
use tancheck::core::report::Keep;
use tancheck::core::routine::{status, CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};
use tancheck::core::{check, Caller, Path, PointKind, Report, Shape, Verdict};
use tancheck::models::zoo::zoo_model;

const J2_PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0];

/// A routine that refuses a strain increment larger than `limit` in any entry, asking for
/// `fraction(limit / largest)` of it.
struct Cutting<R> {
    inner: R,
    limit: f64,
    fraction: fn(f64) -> f64,
}

impl<R> Cutting<R> {
    fn largest<S: Copy + Into<Complex64>>(d: &[S]) -> f64 {
        d.iter().fold(0.0, |a, x| a.max((*x).into().re.abs()))
    }
    fn refuse(&self, largest: f64, o: &mut tancheck::core::routine::Outcome) -> Result<(), Fault> {
        let f = (self.fraction)(self.limit / largest);
        o.status = status::SMALLER_INCREMENT;
        o.largest_fraction = f;
        Err(Fault::Status {
            status: status::SMALLER_INCREMENT,
            message: "substeps exhausted".into(),
            largest_fraction: f,
        })
    }
}

impl<R: Routine> Routine for Cutting<R> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        let l = Self::largest(input.dstrain);
        if l > self.limit {
            return self.refuse(l, output.outcome);
        }
        self.inner.call(input, output)
    }
    tancheck::core::pass_on_to_inner!();
}

impl<R: Routine> ComplexRoutine for Cutting<R> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let l = Self::largest(input.dstrain);
        if l > self.limit {
            return self.refuse(l, output.outcome);
        }
        self.inner.complex().expect("the model has its twin").call_complex(input, output)
    }
}

/// Uniaxial strain to 0.006 in 6 increments and back in 3: increments of 1e-3 and 2e-3 in ε11.
fn path() -> Path {
    Path::ramp(Shape::UniaxialStrain, 0.006, 6, 3)
}

fn run(model: &str, limit: f64, fraction: fn(f64) -> f64) -> Report {
    let inner = zoo_model(model, PointKind::Solid3d).unwrap();
    let mut r = Cutting { inner, limit, fraction };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    check::run_with(
        &mut caller,
        &J2_PROPS,
        PointState::zero(&info, 20.0),
        &path(),
        &Default::default(),
        Keep::Failures,
        &mut |_| {},
    )
    .unwrap()
}

fn cut_note(r: &Report) -> Option<&String> {
    r.notes.iter().find(|n| n.contains("asked for a smaller increment"))
}

#[test]
fn a_routine_that_asks_for_smaller_increments_is_checked_on_the_cut_path() {
    // Increments up to 2e-3 against a limit of 6e-4: the fraction asked is 0.6 and 0.3.
    let r = run("j2", 6e-4, |f| f);
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}\n{:#?}", r.notes, r.first_fault());
    let note = cut_note(&r).unwrap_or_else(|| panic!("{:#?}", r.notes));
    assert!(note.contains("substeps exhausted"), "the routine's words: {note}");
    // 1e-3 parts at 0.9 × 0.6 of the increment: 2 parts; 2e-3 at 0.9 × 0.3: 4 parts.
    assert!(note.contains("1 into 2") && note.contains("7 into 4"), "{note}");
    assert_eq!(r.records.len(), 6 * 2 + 3 * 4, "a record per part");
    assert!(r.path.contains("cut where the routine asked"), "{}", r.path);
    // Plastic increments were checked (the path reached the plastic branch on the parts).
    assert!(r.records.iter().any(|i| i.state_changed));
}

#[test]
fn a_fraction_the_routine_does_not_give_halves_the_increment() {
    // No usable fraction (0): halving until the parts pass.
    let r = run("j2", 6e-4, |_| 0.0);
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}", r.notes);
    let note = cut_note(&r).unwrap();
    assert!(note.contains("1 into 2") && note.contains("7 into 4"), "{note}");
}

#[test]
fn a_wrong_tangent_on_the_cut_path_still_fails() {
    let r = run("j2-continuum", 6e-4, |f| f);
    assert_eq!(r.verdict, Verdict::TangentFailure, "{:#?}", r.notes);
    assert!(cut_note(&r).is_some());
    assert!(r.first_fault().is_none());
}

#[test]
fn a_routine_that_never_takes_an_increment_keeps_its_fault() {
    // Every increment of the path refused down to 1e-10 of strain (ten million parts): the
    // check stops at the first, as before.
    let r = run("j2", 1e-10, |f| f);
    assert_eq!(r.verdict, Verdict::RoutineFault);
    assert!(cut_note(&r).is_none());
    let f = r.first_fault().unwrap();
    assert!(f.message.contains("substeps exhausted") && f.call.perturbation.is_none(), "{f:#?}");
}

#[test]
fn the_probe_suite_runs_on_the_cut_path_too() {
    use tancheck::cli::suite::Suite;
    use tancheck::core::probe::{run_suite, ProbeStatus};
    // The default solid suite on its own path, with increments the routine refuses.
    let suite = Suite::default_for(PointKind::Solid3d, false);
    let path = suite.path().unwrap();
    let largest = path.increments.iter().flat_map(|i| i.dstrain).fold(0.0f64, |a, x| a.max(x.abs()));
    let inner = zoo_model("j2", PointKind::Solid3d).unwrap();
    let mut r = Cutting { inner, limit: 0.6 * largest, fraction: |f| f };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let report =
        run_suite(&mut caller, &suite.suite, &suite.probes, &J2_PROPS, &start, &path, &Default::default())
            .unwrap();
    for p in &report.results {
        assert_ne!(p.status, ProbeStatus::Fail, "{}: {p:#?}", p.probe);
    }
    assert!(report.notes.iter().any(|n| n.contains("asked for a smaller increment")), "{:#?}", report.notes);
    assert!(report.path.contains("cut where the routine asked"));
}

#[test]
fn bisect_and_shrink_work_on_the_cut_path() {
    use tancheck::core::bisect::{locate, shrink, BisectSettings, ShrinkLimits};
    let inner = zoo_model("j2-continuum", PointKind::Solid3d).unwrap();
    let mut r = Cutting { inner, limit: 6e-4, fraction: |f| f };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let (start, path, settings) = (PointState::zero(&info, 20.0), path(), Default::default());
    let report = check::run(&mut caller, &J2_PROPS, start.clone(), &path, &settings).unwrap();
    assert_eq!(report.verdict, Verdict::TangentFailure);
    let cut = report.checked_path.clone().expect("checked on the cut path");
    assert_eq!(cut.increments.len(), report.records.len());
    // The failing increment is located on the cut path (its numbers are the report's).
    let l =
        locate(&mut caller, &J2_PROPS, start.clone(), &path, &report, &settings, &BisectSettings::default())
            .unwrap()
            .expect("a failure to locate");
    assert_eq!(l.of, cut.increments.len());
    // Shrinking keeps only candidates whose increments the routine takes (merged neighbours
    // it refuses would be cut back again): the shrunk path fails the same way on its own.
    let limits = ShrinkLimits { max_iterations: 200, max_seconds: 60.0 };
    let s =
        shrink(&mut caller, &J2_PROPS, &start, &path, &report, &settings, limits).unwrap().expect("shrunk");
    assert!(s.report.checked_path.is_none());
    assert_eq!(s.report.verdict, Verdict::TangentFailure);
    assert!(s.path.increments.iter().all(|i| i.dstrain.iter().all(|x| x.abs() <= 6e-4)), "{:?}", s.path);
    let l2 = locate(&mut caller, &J2_PROPS, start, &s.path, &s.report, &settings, &BisectSettings::default())
        .unwrap();
    assert!(l2.is_some());
}
