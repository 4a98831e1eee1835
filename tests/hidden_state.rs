//! The hidden-state probe on routines that keep results between calls: per increment number
//! (a tangent or start state saved at the first call of an increment) and from the call
//! before (a saved value read where the call's own belongs), each named for what it is; the
//! reference J2 passes.

use tancheck::core::probe::{run_suite, ProbeStatus};
use tancheck::core::{Caller, PointKind, PointState, Routine, Settings};
use tancheck::models::reference;

/// J2 whose tangent is computed at the first call of each increment number and returned to
/// every later call with that number (a cache keyed on the increment, as a routine that
/// computes its tangent "once per increment" has), or whose start state is read at that first
/// call and used for the later ones (the one static every point of an element shares).
struct PerIncrement {
    inner: tancheck::core::ModelRoutine<tancheck::models::AnyModel>,
    state_too: bool,
    kept: Option<(i32, Vec<f64>, Vec<f64>)>,
}

impl Routine for PerIncrement {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        self.inner.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        match &self.kept {
            Some((k, state0, tangent)) if *k == input.increment => {
                if self.state_too {
                    let state0 = state0.clone();
                    let shared = tancheck::core::CallInput { state0: &state0, ..*input };
                    self.inner.call(&shared, output)?;
                } else {
                    self.inner.call(input, output)?;
                    if input.want_tangent {
                        output.tangent.copy_from_slice(tangent);
                    }
                }
            }
            _ => {
                self.inner.call(input, output)?;
                self.kept = Some((input.increment, input.state0.to_vec(), output.tangent.to_vec()));
            }
        }
        Ok(())
    }
}

// The hidden-state probe calls the increment from another start state (the increment
// before's) under the increment's own number, after its own call, and under a number no call
// had: a routine keeping its tangent or its start state per increment number gives the two
// other results (both passed every probe and the check; a user-style sweep). The reference
// J2 passes.
#[test]
fn results_kept_per_increment_number_fail_the_hidden_state_probe() {
    use tancheck::core::probe::ProbeSpec;
    use tancheck::core::{Path, Shape};
    let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let probe = |r: &mut dyn Routine| {
        let info = r.info().clone();
        let mut caller = Caller::new(r);
        let start = PointState::zero(&info, 20.0);
        let rep = run_suite(
            &mut caller,
            "h",
            &[ProbeSpec::named("hidden-state")],
            &props,
            &start,
            &path,
            &Settings::default(),
        )
        .unwrap();
        rep.results[0].clone()
    };
    for state_too in [false, true] {
        let mut r =
            PerIncrement { inner: reference("j2", PointKind::Solid3d).unwrap(), state_too, kept: None };
        let p = probe(&mut r);
        assert_eq!(p.status, ProbeStatus::Fail, "state too: {state_too}: {p:#?}");
        assert!(p.summary.contains("keeps results per increment number"), "{}", p.summary);
    }
    let mut j2 = reference("j2", PointKind::Solid3d).unwrap();
    assert_eq!(probe(&mut j2).status, ProbeStatus::Pass);
}

/// J2 that adds a thousandth of its previous call's σ11 to its σ11 from increment 2 on (a
/// saved variable read where a value of this call belongs, on a branch the first increment
/// does not take).
struct LastCall {
    inner: tancheck::core::ModelRoutine<tancheck::models::AnyModel>,
    last: f64,
}

impl Routine for LastCall {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        self.inner.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        self.inner.call(input, output)?;
        if input.increment >= 2 {
            output.stress[0] += 1e-3 * self.last;
        }
        self.last = output.stress[0];
        Ok(())
    }
}

// A routine whose results depend on the call before (it reads its previous call's result) is
// said to be that, not to keep results per increment number: the probe's call from another
// start is made twice under one new number, and the two answers differ (it was named a
// per-increment cache; a user-style sweep).
#[test]
fn results_from_the_call_before_are_not_called_per_increment_number() {
    use tancheck::core::probe::ProbeSpec;
    use tancheck::core::{Path, Shape};
    let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let mut r = LastCall { inner: reference("j2", PointKind::Solid3d).unwrap(), last: 0.0 };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let rep = run_suite(
        &mut caller,
        "h",
        &[ProbeSpec::named("hidden-state")],
        &props,
        &start,
        &path,
        &Settings::default(),
    )
    .unwrap();
    let p = &rep.results[0];
    assert_eq!(p.status, ProbeStatus::Fail, "{p:#?}");
    assert!(p.summary.contains("depend on the call made before"), "{}", p.summary);
    assert!(!p.summary.contains("per increment number"), "{}", p.summary);
}
