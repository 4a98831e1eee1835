//! A path that ends at the edge of the routine's domain: the base call is inside it, a call
//! of the central difference one step beyond it is refused with a status (a temperature limit,
//! a strain past which the routine asks for a smaller increment). The column is made on the
//! side the routine takes, by the one-sided second-order difference, and the report says so;
//! it was a FAULT (exit 3) for a routine that did nothing wrong. A refusal on both sides, and
//! a crash, stay faults; a wrong tangent or ∂σ/∂T at the edge still fails.

use num_complex::Complex64;
use tancheck::core::driver::PointState;
use tancheck::core::report::{CheckOutcome, Keep};
use tancheck::core::routine::{status, CallInput, CallOutput, ComplexRoutine, Fault, Routine, RoutineInfo};
use tancheck::core::{check, Caller, Path, PathIncrement, PointKind, Report, Shape, Verdict};
use tancheck::models::zoo::zoo_model;

const J2_PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0];
/// Thermo-elasticity with the EN 1993-1-2 modulus reduction (linear from 200 to 300 C there)
/// and a constant expansion coefficient.
const THERMO_PROPS: [f64; 6] = [210000.0, 0.3, 0.0, 1.0, 0.0, 1.2e-5];

/// The end state a call would reach, and where the routine refuses it.
#[derive(Clone, Copy)]
struct Edge {
    /// Largest end strain ε11 (first component) taken.
    strain_max: f64,
    /// Temperatures taken at the end of an increment.
    temp: (f64, f64),
    /// Crash instead of refusing.
    crash: bool,
}

const NO_EDGE: Edge =
    Edge { strain_max: f64::INFINITY, temp: (f64::NEG_INFINITY, f64::INFINITY), crash: false };

/// A routine that refuses (status) or crashes on an increment whose end lies beyond `edge`.
struct Bounded<R> {
    inner: R,
    edge: Edge,
}

impl<R> Bounded<R> {
    fn beyond<S: Copy + Into<Complex64>>(&self, input: &CallInput<'_, S>) -> bool {
        let e11 = input.strain[0].into().re + input.dstrain[0].into().re;
        let t = input.temp[0].into().re + input.temp[1].into().re;
        e11 > self.edge.strain_max || t < self.edge.temp.0 || t > self.edge.temp.1
    }
    fn refuse(&self, o: &mut tancheck::core::routine::Outcome) -> Result<(), Fault> {
        if self.edge.crash {
            return Err(Fault::Crashed { signal: 11, what: "a planted crash".into() });
        }
        o.status = status::FAILED;
        Err(Fault::Status {
            status: status::FAILED,
            message: "beyond the edge".into(),
            largest_fraction: 0.0,
        })
    }
}

impl<R: Routine> Routine for Bounded<R> {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        if self.beyond(input) {
            return self.refuse(output.outcome);
        }
        self.inner.call(input, output)
    }
    tancheck::core::pass_on_to_inner!();
}

impl<R: Routine> ComplexRoutine for Bounded<R> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        if self.beyond(input) {
            return self.refuse(output.outcome);
        }
        self.inner.complex().expect("the model has its twin").call_complex(input, output)
    }
}

fn run(model: &str, props: &[f64], start_temp: f64, path: &Path, edge: Edge) -> Report {
    let inner = zoo_model(model, PointKind::Solid3d).unwrap();
    let mut r = Bounded { inner, edge };
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    check::run_with(
        &mut caller,
        props,
        PointState::zero(&info, start_temp),
        path,
        &Default::default(),
        Keep::All,
        &mut |_| {},
    )
    .unwrap()
}

/// Uniaxial strain to 0.004 in 8 increments (plastic from the third on): ε11 at the path's end.
fn strain_path() -> (Path, f64) {
    let path = Path::ramp(Shape::UniaxialStrain, 0.004, 8, 0);
    let end = path.increments.iter().map(|i| i.dstrain[0]).sum::<f64>();
    (path, end)
}

/// Heating by `dtemp` per increment with a small tension, then `hold` increments at the end
/// temperature with tension only.
fn heating_path(steps: usize, dtemp: f64, hold: usize) -> Path {
    let inc = |dt: f64| PathIncrement {
        dstrain: [2e-4, 0.0, 0.0, 0.0, 0.0, 0.0],
        dtemp: dt,
        dtime: 1.0,
        hold_stress: None,
    };
    let mut increments: Vec<PathIncrement> = (0..steps).map(|_| inc(dtemp)).collect();
    increments.extend((0..hold).map(|_| inc(0.0)));
    Path { name: "heating".into(), increments }
}

fn one_sided_notes(r: &Report) -> Vec<&String> {
    r.notes.iter().filter(|n| n.contains("taken one-sided")).collect()
}

#[test]
fn a_strain_edge_at_the_end_of_the_path_passes_one_sided() {
    let (path, end) = strain_path();
    // The base calls stay within the edge (to rounding); the last increment's +h call does not.
    let edge = Edge { strain_max: end + 1e-12, ..NO_EDGE };
    let r = run("j2", &J2_PROPS, 20.0, &path, edge);
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}\n{:#?}", r.notes, r.increments.last());
    let notes = one_sided_notes(&r);
    assert_eq!(notes.len(), 1, "{:#?}", r.notes);
    assert!(notes[0].starts_with("increment 8:") && notes[0].contains("11 (backward)"), "{}", notes[0]);
    assert!(notes[0].contains("beyond the edge"), "the routine's own words: {}", notes[0]);
    // Without the edge the same check passes too, with no such note: the one-sided column is
    // as accurate as the central one here.
    let free = run("j2", &J2_PROPS, 20.0, &path, NO_EDGE);
    assert_eq!(free.verdict, Verdict::Pass);
    assert!(one_sided_notes(&free).is_empty());
    let worst = |r: &Report| r.summary.iter().map(|s| s.worst_norm_error).fold(0.0, f64::max);
    assert!(worst(&r) < 1e-6, "{}", worst(&r));
}

#[test]
fn a_wrong_tangent_at_the_edge_still_fails() {
    let (path, end) = strain_path();
    let edge = Edge { strain_max: end + 1e-12, ..NO_EDGE };
    let r = run("j2-continuum", &J2_PROPS, 20.0, &path, edge);
    assert_eq!(r.verdict, Verdict::TangentFailure, "{:#?}", r.notes);
    let last = r.increments.last().expect("increments");
    assert_eq!(last.index, 8);
    assert!(last.fault.is_none());
    let central = last.checks.iter().find(|c| c.scheme == tancheck::core::Scheme::Central).unwrap();
    assert!(matches!(&central.tangent, CheckOutcome::Compared(x) if !x.pass), "{central:#?}");
}

#[test]
fn a_temperature_edge_is_taken_on_the_side_the_routine_takes() {
    // Heating 210 -> 290 C: the edge at the end temperature (backward side).
    let path = heating_path(8, 10.0, 0);
    let hot = Edge { temp: (f64::NEG_INFINITY, 290.0), ..NO_EDGE };
    let r = run("thermo", &THERMO_PROPS, 210.0, &path, hot);
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}\n{:#?}", r.notes, r.increments.last());
    let notes = one_sided_notes(&r);
    assert_eq!(notes.len(), 1, "{:#?}", r.notes);
    assert!(notes[0].contains("dT (backward)"), "{}", notes[0]);
    // Cooling 290 -> 210 C with the edge below: the forward side.
    let path = heating_path(8, -10.0, 0);
    let cold = Edge { temp: (210.0, f64::INFINITY), ..NO_EDGE };
    let r = run("thermo", &THERMO_PROPS, 290.0, &path, cold);
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}", r.notes);
    assert!(one_sided_notes(&r).iter().any(|n| n.contains("dT (forward)")), "{:#?}", r.notes);
    // A wrong ∂σ/∂T at the edge still fails.
    let path = heating_path(8, 10.0, 0);
    let r = run("thermo-dtemp-sign", &THERMO_PROPS, 210.0, &path, hot);
    assert_eq!(r.verdict, Verdict::TangentFailure, "{:#?}", r.notes);
    let last = r.increments.last().unwrap();
    assert!(last.fault.is_none());
    assert!(last
        .checks
        .iter()
        .any(|c| matches!(&c.dstress_dtemp, Some(CheckOutcome::Compared(x)) if !x.pass)));
}

#[test]
fn refused_on_both_sides_or_a_crash_stays_a_fault() {
    // The temperature held at a single admissible value: both sides of ∂σ/∂T are refused.
    let path = heating_path(0, 0.0, 3);
    let pinned = Edge { temp: (250.0, 250.0), ..NO_EDGE };
    let r = run("thermo", &THERMO_PROPS, 250.0, &path, pinned);
    assert_eq!(r.verdict, Verdict::RoutineFault, "{:#?}", r.notes);
    // A crash beyond the edge is a crash.
    let (path, end) = strain_path();
    let edge = Edge { strain_max: end + 1e-12, crash: true, ..NO_EDGE };
    let r = run("j2", &J2_PROPS, 20.0, &path, edge);
    assert_eq!(r.verdict, Verdict::RoutineFault);
    assert!(r.first_fault().is_some_and(|f| f.message.contains("a planted crash")));
}

#[test]
fn a_path_that_stays_at_the_edge_folds_its_notes() {
    // At the edge from the fourth increment on: seven increments with a one-sided ∂σ/∂T.
    let path = heating_path(4, 10.0, 6);
    let hot = Edge { temp: (f64::NEG_INFINITY, 250.0), ..NO_EDGE };
    let r = run("thermo", &THERMO_PROPS, 210.0, &path, hot);
    assert_eq!(r.verdict, Verdict::Pass, "{:#?}", r.notes);
    let notes = one_sided_notes(&r);
    assert_eq!(notes.len(), 4, "three in full and one count: {:#?}", r.notes);
    assert!(notes[3].starts_with("4 more increments"), "{}", notes[3]);
}
