//! A continuum tangent returned by an increment that enters plastic flow early in its length
//! is named `continuum-tangent`: the refined increments are fractions of its part past the
//! entry, wherever the entry lies. They were fractions of the whole increment when the entry
//! lay below the smallest fraction (1/32), straddling it, and the discrepancy (which falls with
//! the plastic part, not with the fraction) read `secant` or `unexplained`; so did an increment
//! holding a stress (a user-style sweep). The routine is the zoo's J2 with the continuum
//! tangent (`j2-continuum`).
//!
//! The entry of the first path is worked out by hand: under uniaxial strain the von Mises
//! stress is 2G ε11 (deviatoric strain 2/3 ε11, q = 3G·2/3 ε11), so yield is at
//! ε11 = σy / (2G) = 250 / (2 · 76923.08) = 1.625e-3 (von Mises yield with G = E / (2(1 + ν));
//! any plasticity text), from 5e-4 after an increment of 0.08: at 0.01406 of it.

use tancheck::core::diagnose::Cause;
use tancheck::core::{check, Caller, Path, PathIncrement, PointKind, PointState, Report, Routine, Settings};
use tancheck::models::zoo::zoo_model;

/// E, ν, σy0, H_iso, Q, b, H_kin.
const J2: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

fn run(path: &Path) -> Report {
    let mut r = zoo_model("j2-continuum", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    check::run(&mut caller, &J2, PointState::zero(&info, 20.0), path, &Settings::default()).unwrap()
}

fn first_cause(rep: &Report, increment: usize) -> (Cause, f64) {
    let inc = rep.increments.iter().find(|i| i.index == increment).unwrap();
    let d = inc.diagnosis.as_ref().unwrap_or_else(|| panic!("increment {increment} has no diagnosis"));
    let past = d.refinement.as_ref().map_or(0.0, |r| r.past);
    (d.causes.first().map(|h| h.cause).unwrap_or_else(|| panic!("no cause: {d:?}")), past)
}

#[test]
fn an_entry_below_the_smallest_fraction_is_found() {
    let path = Path {
        name: "elastic, then far past yield".into(),
        increments: vec![
            PathIncrement::strain([5e-4, 0.0, 0.0, 0.0, 0.0, 0.0]),
            PathIncrement::strain([0.08, 0.0, 0.0, 0.0, 0.0, 0.0]),
        ],
    };
    let rep = run(&path);
    let (cause, past) = first_cause(&rep, 2);
    assert_eq!(cause, Cause::ContinuumTangent);
    let entry = (250.0 / (2.0 * 200000.0 / 2.6) - 5e-4) / 0.08;
    assert!((past - entry).abs() < 1e-6, "entry found at {past}, by hand {entry}");
}

#[test]
fn an_increment_holding_a_stress_has_its_entry_found() {
    let held = |d: f64| {
        let mut inc = PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0]);
        inc.hold_stress = Some([None, Some(0.0), Some(0.0), Some(0.0), Some(50.0), Some(0.0)]);
        inc
    };
    let path = Path { name: "σ13 held at 50".into(), increments: vec![held(1e-3), held(0.01)] };
    let rep = run(&path);
    let (cause, past) = first_cause(&rep, 2);
    assert_eq!(cause, Cause::ContinuumTangent);
    assert!(past > 0.0 && past < 0.1, "entry at {past}");
}
