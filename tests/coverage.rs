//! Branch coverage: a path that never leaves the elastic branch, or never unloads, is
//! flagged; the default path (into the plastic range and back) is not. Per-branch summaries
//! count increments and failures.

use tancheck::core::path::{Path, Shape};
use tancheck::core::{check, Caller, PointKind, PointState, Report, Routine, Settings};
use tancheck::models::reference;

fn run(model: &str, path: &Path) -> Report {
    let mut r = reference(model, PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let props: Vec<f64> = if model == "elastic" {
        vec![200000.0, 0.3]
    } else {
        vec![200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0]
    };
    let mut caller = Caller::new(&mut r);
    check::run(&mut caller, &props, PointState::zero(&info, 20.0), path, &Settings::default()).unwrap()
}

#[test]
fn an_elastic_only_uniaxial_path_is_flagged() {
    // Uniaxial strain to 5e-4 stays below yield (about 1.6e-3 for these properties).
    let r = run("j2", &Path::ramp(Shape::UniaxialStrain, 5e-4, 4, 0));
    assert!(r.coverage.iter().any(|c| c.contains("never changed the state")), "{:?}", r.coverage);
    assert!(r.coverage.iter().any(|c| c.contains("never unloaded")), "{:?}", r.coverage);
}

#[test]
fn the_default_path_reaches_plastic_flow_and_unloading() {
    let r = run("j2", &tancheck::cli::session::default_path(PointKind::Solid3d));
    assert!(r.coverage.is_empty(), "{:?}", r.coverage);
    assert!(r.branches.len() >= 2, "{:?}", r.branches);
    let total: usize = r.branches.iter().map(|b| b.increments).sum();
    assert_eq!(total, r.increments.len());
    assert!(r.branches.iter().all(|b| b.failed == 0));
}

#[test]
fn failures_are_counted_per_branch() {
    let r = run("j2-continuum", &tancheck::cli::session::default_path(PointKind::Solid3d));
    let plastic = r.branches.iter().find(|b| b.branch.starts_with("#1")).expect("a plastic branch");
    let elastic = r.branches.iter().find(|b| b.branch.starts_with("#0")).expect("an elastic branch");
    assert_eq!(plastic.failed, plastic.increments, "{plastic:?}");
    assert_eq!(elastic.failed, 0, "{elastic:?}");
}

/// A path that changes the temperature and a routine that never returns ∂σ/∂T: nothing of the
/// temperature coupling was checked, and the report says so (it passed in silence). A routine
/// that returns it gets no such warning.
#[test]
fn a_temperature_path_without_a_returned_dtemp_is_flagged() {
    let mut path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    for inc in &mut path.increments {
        inc.dtemp = 25.0;
    }
    let r = run("elastic", &path);
    assert!(r.coverage.iter().any(|c| c.contains("never returned ∂σ/∂T")), "{:?}", r.coverage);
    let mut m = reference("thermo", PointKind::Solid3d).unwrap();
    let info = m.info().clone();
    let mut caller = Caller::new(&mut m);
    let props = [210000.0, 0.3, 1e-5, 1.0, 1.0, 0.0];
    let r =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert!(!r.coverage.iter().any(|c| c.contains("∂σ/∂T")), "{:?}", r.coverage);
    // Without a temperature change, no warning either.
    let r = run("elastic", &Path::ramp(Shape::TensionShear, 4e-3, 8, 4));
    assert!(!r.coverage.iter().any(|c| c.contains("∂σ/∂T")), "{:?}", r.coverage);
    // A routine that returns ∂σ/∂T on a path that never changes the temperature: a tangent at
    // the start temperature cannot show there (it passed unwarned; a user-style sweep).
    let flat = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let mut caller = Caller::new(&mut m);
    let r =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &flat, &Settings::default()).unwrap();
    assert!(r.coverage.iter().any(|c| c.contains("temperature never changes")), "{:?}", r.coverage);
}

/// Strain increments in slots the routine's kind does not have are left out: a note says so
/// for any such entry, however small (a rule that noted only increments losing a third of
/// their size let a plane-stress path's ε33 of 0.7 ε11 go unsaid; a user-style sweep). The
/// command line's default path leaves them out itself and says so in its name, so a default
/// check of a plane point has no such note (a review found it on every plane check).
#[test]
fn strain_increments_left_out_by_the_kind_are_noted() {
    use tancheck::core::path::PathIncrement;
    let note = |kind: PointKind, model: &str, props: &[f64], path: &Path| -> Vec<String> {
        let mut r = reference(model, kind).unwrap();
        let info = r.info().clone();
        let mut caller = Caller::new(&mut r);
        let rep = check::run(&mut caller, props, PointState::zero(&info, 20.0), path, &Settings::default())
            .unwrap();
        rep.notes.into_iter().filter(|n| n.contains("they were left out")).collect()
    };
    let elastic = [200000.0, 0.3];
    let plane =
        note(PointKind::PlaneStrain, "elastic", &elastic, &Path::ramp(Shape::TensionShear, 4e-3, 8, 4));
    assert!(plane.iter().any(|n| n.contains("slots 23, 13 (first at increment 1)")), "{plane:?}");
    let default = tancheck::cli::session::default_path(PointKind::PlaneStrain);
    assert!(default.name.contains("(its 23 and 13 left out for a plane-strain point)"), "{}", default.name);
    let plane = note(PointKind::PlaneStrain, "elastic", &elastic, &default);
    assert!(plane.is_empty(), "{plane:?}");
    // A small entry is noted too: ε33 a tenth of ε11 on a plane-stress point.
    let small = Path {
        name: "stretch with a little ε33".into(),
        increments: vec![PathIncrement::strain([1e-4, 0.0, 1e-5, 0.0, 0.0, 0.0]); 2],
    };
    let ps = note(PointKind::PlaneStress, "elastic", &elastic, &small);
    assert!(ps.iter().any(|n| n.contains("slot 33 (first at increment 1)")), "{ps:?}");
    let mostly_shear = Path {
        name: "stretch and much shear".into(),
        increments: vec![PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 1e-3]); 2],
    };
    let shear_on_a_bar = note(PointKind::Uniaxial, "elastic", &elastic, &mostly_shear);
    assert!(shear_on_a_bar.iter().any(|n| n.contains("slot 12")), "{shear_on_a_bar:?}");
    let cohesive = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];
    let written = Path {
        name: "increments written for a 3D point".into(),
        increments: (0..6)
            .map(|k| {
                let mut d = [0.0; 6];
                d[k] = 1e-4;
                PathIncrement::strain(d)
            })
            .collect(),
    };
    let c = note(PointKind::Cohesive3d, "cohesive", &cohesive, &written);
    assert!(c.iter().any(|n| n.contains("slots 23, 13, 12 (first at increment 4)")), "{c:?}");
    // A path that lies wholly in slots the kind does not have loads nothing once they are left
    // out: it is refused, naming them, where every increment passed (a cohesive routine on
    // shear-12; a user-style sweep). With a temperature change it loads the point, and runs.
    for (kind, model, props) in
        [(PointKind::Uniaxial, "elastic", &elastic[..]), (PointKind::Cohesive3d, "cohesive", &cohesive[..])]
    {
        let mut r = reference(model, kind).unwrap();
        let info = r.info().clone();
        let mut caller = Caller::new(&mut r);
        let shear = Path::ramp(Shape::Shear12, 1e-3, 2, 1);
        let e = check::run(&mut caller, props, PointState::zero(&info, 20.0), &shear, &Settings::default())
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("lies in slot 12, which the routine's kind") && e.contains("nothing would be checked"),
            "{e}"
        );
        let mut heated = shear.clone();
        heated.increments[0].dtemp = 5.0;
        assert!(check::run(&mut caller, props, PointState::zero(&info, 20.0), &heated, &Settings::default())
            .is_ok());
    }
}

/// A stress held at a value other than zero in a slot the routine's kind does not have cannot
/// be reached: bad input naming the increment and the slot (a plane-strain point asked to hold
/// σ23 at 50, and a plane-stress one σ33 at 100, passed with every stress zero and no word; a
/// user-style sweep). Held at zero it is what the kind gives, and the path runs.
#[test]
fn a_stress_held_in_a_slot_the_kind_lacks_is_bad_input() {
    use tancheck::core::path::PathIncrement;
    let elastic = [200000.0, 0.3];
    for (kind, slot, at) in [(PointKind::PlaneStrain, 3, "23"), (PointKind::PlaneStress, 2, "33")] {
        let mut r = reference("elastic", kind).unwrap();
        let info = r.info().clone();
        let mut caller = Caller::new(&mut r);
        let held = |value: f64| {
            let mut inc = PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]);
            let mut hold = [None; 6];
            hold[slot] = Some(value);
            inc.hold_stress = Some(hold);
            Path {
                name: "held".into(),
                increments: vec![PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]), inc],
            }
        };
        let e = check::run(
            &mut caller,
            &elastic,
            PointState::zero(&info, 20.0),
            &held(50.0),
            &Settings::default(),
        )
        .unwrap_err()
        .to_string();
        assert!(
            e.contains(&format!("increment 2 of the path holds the stress in slot {at} at 50")),
            "{kind:?}: {e}"
        );
        assert!(
            check::run(
                &mut caller,
                &elastic,
                PointState::zero(&info, 20.0),
                &held(0.0),
                &Settings::default()
            )
            .is_ok(),
            "{kind:?}: a hold at zero runs"
        );
    }
}

/// The reference J2 whose stress is NaN from increment 3 on.
struct NanFromThird(tancheck::core::ModelRoutine<tancheck::models::AnyModel>);

impl Routine for NanFromThird {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        self.0.call(input, output)?;
        if input.increment >= 3 {
            output.stress[0] = f64::NAN;
        }
        Ok(())
    }
}

// Once the stress is NaN the increment's work cannot tell loading from unloading: a path that
// unloads is not said to have never unloaded (a user-style sweep saw that warning beside the
// NaN findings of a path out and back).
#[test]
fn a_nan_stress_is_no_evidence_that_the_path_never_unloaded() {
    let mut r = NanFromThird(reference("j2", PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 4, 4);
    let rep =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert!(rep.increments.iter().any(|i| !i.non_finite.is_empty()), "the NaN is found");
    assert!(!rep.coverage.iter().any(|c| c.contains("never unloaded")), "{:?}", rep.coverage);
}

/// Johnson–Cook properties of the README's example (Johnson & Cook 1983 constants for a steel,
/// as the README gives them), from 400 K.
const JC: [f64; 18] = [
    200000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
    -2.12, 0.002, 0.61,
];

/// A rate-dependent routine on a path whose increments all take the same time and whose first
/// increment is elastic: the time enters only where the plastic strain flows, so looking at
/// the first increment alone missed it, and a tangent without its rate term passed such a
/// path with no word (found by a user-style sweep of a viscoplastic routine). The warning now
/// names the first increment that changed the state; with the time varied it is not given.
#[test]
fn one_time_increment_is_flagged_where_the_rate_first_enters() {
    let inc = |e: f64, dtime: f64| tancheck::core::PathIncrement {
        dtime,
        ..tancheck::core::PathIncrement::strain([e, -0.5 * e, -0.5 * e, 0.0, 0.0, e])
    };
    let jc = |dtimes: [f64; 4]| {
        let mut increments = vec![inc(5e-4, dtimes[0])];
        increments.extend(dtimes.iter().map(|&dt| inc(1.5e-3, dt)));
        let path = Path { name: "elastic, then plastic".into(), increments };
        let mut r = reference("johnson-cook", PointKind::Solid3d).unwrap();
        let info = r.info().clone();
        let mut caller = Caller::new(&mut r);
        check::run(&mut caller, &JC, PointState::zero(&info, 400.0), &path, &Settings::default()).unwrap()
    };
    let r = jc([1e-6; 4]);
    assert!(!r.records[0].state_changed, "the first increment is elastic");
    let said: Vec<&String> =
        r.coverage.iter().filter(|c| c.contains("every increment takes the same time")).collect();
    assert_eq!(said.len(), 1, "{:?}", r.coverage);
    assert!(said[0].contains("stress of increment 3"), "{}", said[0]);
    let r = jc([1e-6, 2e-6, 5e-7, 1e-6]);
    assert!(!r.coverage.iter().any(|c| c.contains("same time")), "{:?}", r.coverage);
    // The same under uniaxial stress (every increment holds σ22 … σ12 at zero, the strains
    // solved for): the warning was skipped whenever the first increment held stresses (a creep
    // routine under a held load passed unwarned; a user-style sweep).
    let mut path = Path::uniaxial_stress(8e-3, 4, 0);
    for inc in &mut path.increments {
        inc.dtime = 1e-6;
    }
    assert!(path.increments[0].hold_stress.is_some());
    let mut r = reference("johnson-cook", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let r =
        check::run(&mut caller, &JC, PointState::zero(&info, 400.0), &path, &Settings::default()).unwrap();
    assert!(r.coverage.iter().any(|c| c.contains("every increment takes the same time")), "{:?}", r.coverage);
}

/// The reference Johnson–Cook routine with one more state variable, a flag it sets on its first
/// call (as a routine setting thresholds from its properties does): the first increment changes
/// the state without any rate.
struct FlagsFirstCall(tancheck::core::ModelRoutine<tancheck::models::AnyModel>, tancheck::core::RoutineInfo);

impl Routine for FlagsFirstCall {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.1
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        let flag =
            tancheck_testkit::call::call_with_leading_states(&mut self.0, self.1.nstate - 1, input, output)?;
        flag[0] = 1.0;
        Ok(())
    }
}

// The same with a routine that sets a flag of its state on the first call: the first increment
// that changed the state is the first, which does not depend on the time, and the warning
// looks further, at the first increment after it that changed the state (a ply routine with a
// viscous damage law passed with no word; a user-style sweep).
#[test]
fn one_time_increment_is_flagged_past_a_state_set_on_the_first_call() {
    let inc = |e: f64| tancheck::core::PathIncrement {
        dtime: 1e-6,
        ..tancheck::core::PathIncrement::strain([e, -0.5 * e, -0.5 * e, 0.0, 0.0, e])
    };
    let mut increments = vec![inc(5e-4)];
    increments.extend((0..4).map(|_| inc(1.5e-3)));
    let path = Path { name: "elastic, then plastic".into(), increments };
    let model = reference("johnson-cook", PointKind::Solid3d).unwrap();
    let mut info = model.info().clone();
    info.nstate += 1;
    let mut r = FlagsFirstCall(model, info.clone());
    let mut caller = Caller::new(&mut r);
    let r =
        check::run(&mut caller, &JC, PointState::zero(&info, 400.0), &path, &Settings::default()).unwrap();
    assert!(r.records[0].state_changed, "the flag changes the state at the first increment");
    let said: Vec<&String> =
        r.coverage.iter().filter(|c| c.contains("every increment takes the same time")).collect();
    assert_eq!(said.len(), 1, "{:?}", r.coverage);
}

/// The thermal reference model, failing with a status from increment `from` on.
struct FailsFrom(tancheck::core::ModelRoutine<tancheck::models::AnyModel>, i32);

impl Routine for FailsFrom {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        self.0.call(input, output)?;
        if input.increment >= self.1 {
            output.outcome.status = 2;
            return Err(tancheck::core::Fault::Status {
                status: 2,
                message: "cannot compute this increment".into(),
                largest_fraction: 1.0,
            });
        }
        Ok(())
    }
}

// A path that stopped at a fault at its first increment says nothing of ∂σ/∂T: no warning that
// the routine never returned it (said of a routine that did, whose first call a guard found
// at fault, found by a user-style sweep). The fault's own coverage line stays.
#[test]
fn a_path_stopped_at_a_fault_does_not_say_dtemp_was_never_returned() {
    let mut path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    for inc in &mut path.increments {
        inc.dtemp = 25.0;
    }
    let mut m = FailsFrom(reference("thermo", PointKind::Solid3d).unwrap(), 1);
    let info = m.info().clone();
    let mut caller = Caller::new(&mut m);
    let props = [210000.0, 0.3, 1e-5, 1.0, 1.0, 0.0];
    let r =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert!(r.coverage.iter().any(|c| c.contains("stopped at a fault")), "{:?}", r.coverage);
    assert!(!r.coverage.iter().any(|c| c.contains("∂σ/∂T")), "{:?}", r.coverage);
}

// The path stops at the first increment whose outputs are not finite numbers: the increments
// after it would start from NaN (they were checked from there, the complex step reading "ok 0",
// and a later status of the routine made the verdict a fault; user-style sweeps). The report
// names it `non-finite-output` everywhere, the increment's own finding included.
#[test]
fn the_path_stops_where_the_outputs_are_not_finite() {
    let mut r = NanFromThird(reference("j2", PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 6, 2);
    let rep =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert_eq!(rep.records.len(), 3, "checked up to the NaN, not past it");
    assert_eq!(rep.verdict, tancheck::core::Verdict::TangentFailure);
    assert_eq!(rep.finding(), "non-finite-output");
    let last = rep.increments.last().unwrap();
    assert_eq!((last.index, last.finding()), (3, "non-finite-output"));
    assert!(
        rep.coverage.iter().any(|c| c.contains("stopped at increment 3 of 8") && c.contains("not finite")),
        "{:?}",
        rep.coverage
    );
    // The report keeps the path's length, and the HTML page counts the first failure of it
    // as the terminal does (it said "3 of 3", the increments checked; a user-style sweep).
    assert_eq!(rep.path_increments, 8);
    let page = tancheck::cli::report::html::check_page(&rep);
    assert!(page.contains("increment 3 of 8 (branch"), "the page's first failing increment");
}

// The look at the time increment starts from the start states the check's walk kept: it makes
// its two calls per increment looked at, and no second walk along the path to them (it made a
// second base call of every increment up to the last that changed the state: a twentieth more
// calls on a long path; the count below would grow with the path).
#[test]
fn the_look_at_the_time_increment_does_not_walk_the_path_again() {
    let inc = |e: f64| tancheck::core::PathIncrement {
        dtime: 0.5,
        ..tancheck::core::PathIncrement::strain([e, -0.5 * e, -0.5 * e, 0.0, 0.0, e])
    };
    let mut increments = vec![inc(5e-4)];
    increments.extend((0..60).map(|_| inc(1e-3)));
    let path = Path { name: "elastic, then plastic".into(), increments };
    let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let calls = |first_calls: bool| {
        let mut r = reference("j2", PointKind::Solid3d).unwrap();
        let info = r.info().clone();
        let mut caller = Caller::new(&mut r);
        let settings = Settings { first_calls, ..Settings::default() };
        let rep = check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &settings).unwrap();
        assert_eq!(rep.verdict, tancheck::core::Verdict::Pass, "{:?}", rep.coverage);
        assert!(rep.records.iter().filter(|r| r.state_changed).count() > 50);
        assert!(!rep.coverage.iter().any(|c| c.contains("same time")), "{:?}", rep.coverage);
        caller.real_calls
    };
    let (with, without) = (calls(true), calls(false));
    // The zero increment (one call) and three looks at the time (two calls each).
    assert!(with - without <= 8, "{with} calls with the first-call looks, {without} without");
}

/// The J2 reference model (engineering shear) declared with tensor shear: a wrong declaration.
struct DeclaredTensor(tancheck::core::ModelRoutine<tancheck::models::AnyModel>, tancheck::core::RoutineInfo);

impl Routine for DeclaredTensor {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.1
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        self.0.call(input, output)
    }
    fn complex(&mut self) -> Option<&mut dyn tancheck::core::ComplexRoutine> {
        self.0.complex()
    }
}

// A wrong shear declaration on a path without an elastic increment (the first increment goes
// plastic, the doubled shear strain the sooner): the conventions warning is read from a zero
// increment at the start (it came only from a path's first elastic increment, and never on
// such a path; a user-style sweep). A path with an elastic increment warns as before, once.
#[test]
fn a_wrong_shear_declaration_is_warned_of_without_an_elastic_increment() {
    let warned = |path: &Path| {
        let model = reference("j2", PointKind::Solid3d).unwrap();
        let mut info = model.info().clone();
        info.convention =
            tancheck::core::Convention::new(PointKind::Solid3d, tancheck::core::ShearMeasure::Tensor);
        let mut r = DeclaredTensor(model, info.clone());
        let mut caller = Caller::new(&mut r);
        let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
        let rep = check::run(&mut caller, &props, PointState::zero(&info, 20.0), path, &Settings::default())
            .unwrap();
        (
            rep.records[0].state_changed,
            rep.notes.iter().filter(|n| n.starts_with("conventions warning")).count(),
        )
    };
    let plastic_at_once = Path::ramp(Shape::TensionShear, 8e-3, 2, 0);
    assert_eq!(warned(&plastic_at_once), (true, 1));
    let with_elastic = Path::ramp(Shape::TensionShear, 8e-3, 40, 0);
    assert_eq!(warned(&with_elastic), (false, 1));
}

/// A path that turns back only where the stress is zero (a cohesive interface opened past its
/// final separation, 2 G_Ic / N = 0.01 for the bilinear law with N = 60, G_Ic = 0.3 — the
/// triangle's area — then closed a little while still open) did reverse: the coverage line says
/// it turned back against no stress, not that it never unloaded (a user-style sweep).
#[test]
fn a_reversal_at_zero_stress_is_not_called_no_reversal() {
    use tancheck::core::path::PathIncrement;
    let mut r = reference("cohesive", PointKind::Cohesive3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let mut increments = vec![PathIncrement::strain([5e-3, 0.0, 0.0, 0.0, 0.0, 0.0]); 4];
    increments.extend(vec![PathIncrement::strain([-5e-3, 0.0, 0.0, 0.0, 0.0, 0.0]); 2]);
    let path = Path { name: "open past failure, close a little".into(), increments };
    let props = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];
    let rep =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    assert!(
        rep.coverage.iter().any(|c| c.contains("the path turns back, but never against a stress")),
        "{:?}",
        rep.coverage
    );
    assert!(!rep.coverage.iter().any(|c| c.contains("never unloaded")), "{:?}", rep.coverage);
}

/// A temperature ramp at held strain has nothing to unload: no "never unloaded" warning (it
/// read so on a pure heating path; a user-style sweep). Thermo-elasticity, made-up numbers
/// (the properties of tests/domain_edge.rs).
#[test]
fn a_temperature_ramp_without_strain_is_not_said_to_never_unload() {
    use tancheck::core::path::PathIncrement;
    let mut r = reference("thermo", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let props = [210000.0, 0.3, 0.0, 1.0, 0.0, 1.2e-5];
    let mut caller = Caller::new(&mut r);
    let increments =
        (0..4).map(|_| PathIncrement { dtemp: 20.0, ..PathIncrement::strain([0.0; 6]) }).collect();
    let path = Path { name: "heating at held strain".into(), increments };
    let rep = check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default());
    let rep = rep.unwrap_or_else(|e| panic!("{e}"));
    assert!(!rep.coverage.iter().any(|c| c.contains("never unloaded")), "{:?}", rep.coverage);
}

/// A failure of outputs that are not finite numbers gets no step study from bisect: the study
/// of an inf read as noise ("neither converges nor levels off", best error inf; a user-style
/// sweep). The crossing inside the increment is still found.
#[test]
fn bisect_makes_no_step_study_of_outputs_that_are_not_finite() {
    let mut r = NanFromThird(reference("j2", PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 6, 2);
    let start = PointState::zero(&info, 20.0);
    let settings = Settings::default();
    let rep = check::run(&mut caller, &props, start.clone(), &path, &settings).unwrap();
    let located = tancheck::core::bisect::locate(
        &mut caller,
        &props,
        start,
        &path,
        &rep,
        &settings,
        &tancheck::core::bisect::BisectSettings::default(),
    )
    .unwrap()
    .expect("a failure to locate");
    assert_eq!(located.increment, 3);
    assert_eq!(located.finding, "non-finite-output");
    assert!(located.step.is_none(), "{:?}", located.step);
}
