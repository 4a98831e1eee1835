//! Mixed control at the material point: uniaxial stress on J2 with linear hardening
//! reproduces the elastoplastic modulus E·h/(E + h), h = H_iso + H_kin (REFERENCES.md:
//! 1488.834 MPa for E = 200 GPa, h = 1500 MPa, derived from the J2 closed form of Simo &
//! Taylor 1985); Newton's method with the consistent tangent converges quadratically and with
//! the continuum tangent only linearly (a standard result of Newton's method, REFERENCES.md).

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::{check, Caller, PointKind, PointState, Report, Routine, Settings};
use tancheck::models::reference;

fn run(model: &str, props: &[f64], path: &Path) -> Report {
    let mut r = reference(model, PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    check::run(&mut caller, props, PointState::zero(&info, 20.0), path, &Settings::default()).unwrap()
}

#[test]
fn uniaxial_stress_gives_the_elastoplastic_modulus() {
    // E = 200 GPa, h = H_iso + H_kin = 1500 MPa.
    let e = 200000.0;
    let props = [e, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
    let path = Path::uniaxial_stress(6e-3, 12, 0);
    let r = run("j2", &props, &path);
    assert_eq!(r.verdict, tancheck::core::Verdict::Pass);
    for inc in &r.increments {
        let log = inc.solve.as_ref().expect("a mixed-control increment");
        assert!(log.converged, "{log:?}");
        // The lateral stresses are held at zero.
        for s in &inc.stress[1..] {
            assert!(s.abs() < 1e-7, "{:?}", inc.stress);
        }
    }
    // The published value (REFERENCES.md, derived from E·h/(E + h)), to its 7 printed digits.
    let et = 1488.834;
    // After yield (about ε11 = σy/E = 1.25e-3), the slope of σ11 against ε11 is E_t.
    let plastic: Vec<_> = r.increments.iter().filter(|i| i.state_changed).collect();
    assert!(plastic.len() >= 8);
    for w in plastic.windows(2) {
        let slope = (w[1].stress[0] - w[0].stress[0]) / (w[1].strain[0] - w[0].strain[0]);
        assert!((slope / et - 1.0).abs() < 1e-6, "slope {slope}, E_t {et}");
    }
    // Before yield it is E.
    let first = &r.increments[0];
    assert!((first.stress[0] / first.strain[0] / e - 1.0).abs() < 1e-10);
}

/// Tension with the lateral stresses held at zero, then shear at fixed ε11: the flow direction
/// turns, so the difference between the continuum and the consistent tangent acts on the
/// held components (in proportional uniaxial stress it does not).
fn tension_then_shear() -> Path {
    let hold = Some([None, Some(0.0), Some(0.0), Some(0.0), Some(0.0), None]);
    let mut increments = Vec::new();
    for k in 0..8 {
        let d = if k < 4 { [1e-3, 0.0, 0.0, 0.0, 0.0, 0.0] } else { [0.0, 0.0, 0.0, 0.0, 0.0, 1e-3] };
        increments.push(PathIncrement { hold_stress: hold, ..PathIncrement::strain(d) });
    }
    Path { name: "tension, then shear at fixed tension strain".into(), increments }
}

fn newton_orders(model: &str) -> Vec<f64> {
    // Voce hardening makes the plastic response nonlinear, so Newton needs several iterations.
    let props = [200000.0, 0.3, 250.0, 500.0, 300.0, 30.0, 0.0];
    let r = run(model, &props, &tension_then_shear());
    let mut orders = Vec::new();
    for inc in r.increments.iter().filter(|i| i.state_changed) {
        let log = inc.solve.as_ref().unwrap();
        assert!(log.converged && !log.numerical_fallback, "{model}: {log:?}");
        // Orders from residuals well above the rounding floor.
        let scale = inc.stress[0].abs().max(1.0);
        let r: Vec<f64> = log.residuals.iter().cloned().filter(|&x| x > 1e-13 * scale).collect();
        let l = tancheck::core::mixed::SolveLog { residuals: r, converged: true, numerical_fallback: false };
        orders.extend(l.orders());
    }
    orders
}

#[test]
fn newton_converges_quadratically_with_the_consistent_tangent_only() {
    let consistent = newton_orders("j2");
    assert!(!consistent.is_empty());
    let best = consistent.iter().cloned().fold(0.0, f64::max);
    assert!(best >= 1.9, "consistent orders {consistent:?}");
    let continuum = newton_orders("j2-continuum");
    assert!(!continuum.is_empty());
    for p in &continuum {
        assert!((p - 1.0).abs() < 0.25, "continuum orders {continuum:?}");
    }
}

/// A held stress the material cannot carry: perfect plasticity (yield 300 MPa, no hardening)
/// with σ22 held at 400 MPa. No strain reaches it; Newton on the singular plastic tangent
/// ran to strains of 1e12 and the increments were checked there, reported as a plain pass.
/// Now every increment is checked at the iterate closest to the target within the strain a
/// path may hold, and a coverage warning says the path asked for was not followed.
#[test]
fn a_held_stress_beyond_the_strength_is_not_reached_and_says_so() {
    let props = [180000.0, 0.28, 300.0, 0.0, 0.0, 0.0, 0.0];
    let hold = Some([None, Some(400.0), Some(0.0), Some(0.0), Some(0.0), Some(0.0)]);
    let increments = (0..4).map(|_| PathIncrement {
        hold_stress: hold,
        ..PathIncrement::strain([2e-4, 0.0, 0.0, 0.0, 0.0, 0.0])
    });
    let path = Path { name: "σ22 held past the strength".into(), increments: increments.collect() };
    let r = run("j2", &props, &path);
    for inc in &r.increments {
        assert!(!inc.solve.as_ref().unwrap().converged);
        assert!(inc.strain.iter().all(|e| e.is_finite() && e.abs() <= 10.0 * 4.0), "{:?}", inc.strain);
    }
    let warned = r.coverage.iter().any(|c| c.contains("held stresses were not reached at 4 of 4 increments"));
    assert!(warned, "{:?}", r.coverage);
}

/// σ22 = S atan(ε22/ε0) (and σ = E ε in the other normal components, no shear), with its exact
/// tangent: Newton's method on atan(x) = 0 with full steps diverges from |x| above about 1.39
/// (the classic example; each step overshoots further), so a held σ22 = 0 from a first guess
/// ε22 = 3 ε0 is reached only by a solve that shortens steps that do not lower the residual.
struct Arctangent(tancheck::core::RoutineInfo);

const S: f64 = 100.0;
const E0: f64 = 1e-3;

impl Routine for Arctangent {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.0
    }
    fn call(
        &mut self,
        i: &tancheck::core::CallInput<'_, f64>,
        o: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        let e: Vec<f64> = (0..6).map(|k| i.strain[k] + i.dstrain[k]).collect();
        o.tangent.fill(0.0);
        for k in 0..6 {
            if k == 1 {
                let x = e[1] / E0;
                o.stress[1] = S * x.atan();
                o.tangent[1 + 6] = S / (E0 * (1.0 + x * x));
            } else {
                o.stress[k] = 1000.0 * e[k];
                o.tangent[k + 6 * k] = 1000.0;
            }
        }
        o.outcome.provides = 0;
        Ok(())
    }
}

// A held stress the material carries is reached where full Newton steps jump ever further
// from it (a plane-stress routine heated under a held stress never converged, and the report
// blamed the material: "a held stress the material cannot carry"; a user-style sweep).
#[test]
fn a_held_stress_is_reached_where_full_newton_steps_overshoot() {
    let conv = tancheck::core::Convention::new(PointKind::Solid3d, tancheck::core::ShearMeasure::Engineering);
    let info =
        tancheck::core::RoutineInfo { name: "arctangent".into(), convention: conv, nstate: 0, nprop: 0 };
    let mut r = Arctangent(info.clone());
    let mut caller = Caller::new(&mut r);
    // First ε22 = 3 ε0 under strain control; then σ22 held at zero, the solve starting from
    // there (x = 3).
    let held = PathIncrement {
        hold_stress: Some([None, Some(0.0), None, None, None, None]),
        ..PathIncrement::strain([1e-3, 0.0, 0.0, 0.0, 0.0, 0.0])
    };
    let path = Path {
        name: "held".into(),
        increments: vec![PathIncrement::strain([0.0, 3.0 * E0, 0.0, 0.0, 0.0, 0.0]), held],
    };
    let rep =
        check::run(&mut caller, &[], PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    let log = rep.increments[1].solve.as_ref().expect("a mixed-control increment");
    assert!(log.converged, "{log:?}");
    assert!(rep.increments[1].stress[1].abs() < 1e-6, "{:?}", rep.increments[1].stress);
    assert!(rep.coverage.iter().all(|c| !c.contains("held stresses were not reached")), "{:?}", rep.coverage);
}
