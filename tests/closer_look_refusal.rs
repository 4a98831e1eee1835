//! The calls of the closer look at a failed check (step studies from relative steps of 1e-2,
//! kink probes, cause trials) are not the check's: a routine may refuse some of them with a
//! status, as it would refuse a solver's too-large increment. Such a refusal is no fault of
//! the routine (it made the increment a FAULT, exit 3, reported with the base call's inputs,
//! whose replay then returned status 0); a crash in one of them is a fault, reported with the
//! inputs of the call that crashed.

use num_complex::Complex64;
use tancheck::core::driver::PointState;
use tancheck::core::report::{CheckOutcome, Keep};
use tancheck::core::routine::{status, CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};
use tancheck::core::{check, Caller, Path, PointKind, Shape, Verdict};
use tancheck::models::zoo::zoo_model;

const J2_PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0];

/// A routine that refuses (status) or crashes on a strain increment larger than `limit` in
/// any entry: the path's increments stay below it, the closer look's largest steps do not.
struct Limited<R> {
    inner: R,
    limit: f64,
    crash: bool,
}

impl<R> Limited<R> {
    fn over<S: Copy + Into<Complex64>>(&self, d: &[S]) -> bool {
        d.iter().any(|x| (*x).into().re.abs() > self.limit)
    }
    fn refuse(&self, o: &mut tancheck::core::routine::Outcome) -> Result<(), Fault> {
        if self.crash {
            return Err(Fault::Crashed { signal: 11, what: "a planted crash".into() });
        }
        o.status = status::FAILED;
        Err(Fault::Status {
            status: status::FAILED,
            message: "increment too large".into(),
            largest_fraction: 0.0,
        })
    }
}

impl<R: Routine> Routine for Limited<R> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        if self.over(input.dstrain) {
            return self.refuse(output.outcome);
        }
        self.inner.call(input, output)
    }
    tancheck::core::pass_on_to_inner!();
}

impl<R: Routine> ComplexRoutine for Limited<R> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        if self.over(input.dstrain) {
            return self.refuse(output.outcome);
        }
        self.inner.complex().expect("the model has its twin").call_complex(input, output)
    }
}

/// The limit of the calls: `factor` times the path's largest strain increment entry. With
/// 1.02 it is above every call of the check (its steps are about 1e-6 of the strain) and of
/// the cause trials, and below the step studies' largest steps (1e-2 of the strain, 4 % of
/// the increment here); with 1.001 the cause trials' slightly longer increments pass it too.
fn limit(path: &Path, factor: f64) -> f64 {
    let largest = path.increments.iter().flat_map(|i| i.dstrain.iter()).fold(0.0f64, |a, x| a.max(x.abs()));
    largest * factor
}

fn path() -> Path {
    Path::ramp(Shape::UniaxialStrain, 0.004, 8, 0)
}

/// A check of the flawed J2 model (the elastic tangent at the first plastic increment) with
/// its calls limited (see [`limit`]).
fn check_limited(factor: f64, crash: bool) -> tancheck::core::Report {
    let inner = zoo_model("j2-elastic-first-plastic", PointKind::Solid3d).unwrap();
    let path = path();
    let mut r = Limited { inner, limit: limit(&path, factor), crash };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    check::run_with(
        &mut caller,
        &J2_PROPS,
        PointState::zero(&info, 20.0),
        &path,
        &Default::default(),
        Keep::All,
        &mut |_| {},
    )
    .unwrap()
}

/// The increment that failed, with no fault anywhere.
fn failed_without_fault(report: &tancheck::core::Report) -> &tancheck::core::diagnose::Diagnosis {
    assert_eq!(report.verdict, Verdict::TangentFailure, "{:#?}", report.increments);
    assert!(report.increments.iter().all(|i| i.fault.is_none()), "no increment faulted");
    let failed = report.increments.iter().find(|i| !i.passed()).expect("the flawed increment fails");
    // The failed check stands.
    assert!(failed.checks.iter().any(|c| matches!(&c.tangent, CheckOutcome::Compared(x) if !x.pass)));
    let d = failed.diagnosis.as_ref().expect("a diagnosis");
    assert!(!d.pass, "{d:#?}");
    d
}

#[test]
fn a_step_the_routine_refuses_is_left_out_of_the_step_study() {
    let report = check_limited(1.02, false);
    let d = failed_without_fault(&report);
    // The refused steps are left out of the studies, which still have the smaller ones, and
    // the diagnosis names its cause.
    assert!(
        !d.studies.is_empty() && d.studies.iter().all(|s| s.points.len() < 22 && s.points.len() > 10),
        "{d:#?}"
    );
    assert_eq!(d.finding, "elastic-tangent", "{d:#?}");
}

#[test]
fn a_refused_call_of_the_closer_look_stops_it_without_a_fault() {
    let report = check_limited(1.001, false);
    let d = failed_without_fault(&report);
    assert!(
        d.reason.contains("the closer look stopped") && d.reason.contains("increment too large"),
        "{d:#?}"
    );
}

#[test]
fn a_crash_in_a_call_of_the_closer_look_is_reported_with_that_call() {
    let report = check_limited(1.02, true);
    assert_eq!(report.verdict, Verdict::RoutineFault);
    let f = report.first_fault().expect("a fault");
    assert!(f.message.contains("a planted crash"), "{f:#?}");
    let call = &f.call;
    assert!(
        call.perturbation.as_deref().is_some_and(|p| p.contains("closer look")),
        "the call is named as one of the closer look: {call:#?}"
    );
    // Its own inputs: an increment entry beyond the limit (the base call's are within it).
    assert!(call.dstrain.iter().any(|x| x.abs() > limit(&path(), 1.02)), "{call:#?}");
}
