//! The Newton-rate probe: with the consistent J2 tangent (the derivative of the radial-return
//! update, Simo & Taylor 1985, CMAME 48:101–118) Newton's method converges quadratically, with
//! the continuum tangent only linearly — observed orders p_k = ln(r_{k+1}/r_k)/ln(r_k/r_{k−1})
//! → 2 and ≈ 1 (REFERENCES.md "Numerical tangents": common practice, a standard result of
//! Newton's method).
//!
//! The path turns the flow direction (tension with the lateral stresses held at zero, then
//! shear at fixed tension strain), as in tests/uniaxial_stress.rs: under proportional loading
//! the two tangents differ only in directions the iteration does not visit. Voce hardening
//! makes the plastic response nonlinear, so Newton needs several iterations.

use tancheck::core::path::{Path, PathIncrement, Shape};
use tancheck::core::probe::newton::{self, IncrementSolve, NewtonRate};
use tancheck::core::probe::{Probe, ProbeEnv, ProbeResult, ProbeSpec, ProbeStatus};
use tancheck::core::{Caller, PointKind, PointState, Routine, Settings};
use tancheck::models::reference;

const VOCE: [f64; 7] = [200000.0, 0.3, 250.0, 500.0, 300.0, 30.0, 0.0];

fn tension_then_shear() -> Path {
    let hold = Some([None, Some(0.0), Some(0.0), Some(0.0), Some(0.0), None]);
    let mut increments = Vec::new();
    for k in 0..8 {
        let d = if k < 4 { [1e-3, 0.0, 0.0, 0.0, 0.0, 0.0] } else { [0.0, 0.0, 0.0, 0.0, 0.0, 1e-3] };
        increments.push(PathIncrement { hold_stress: hold, ..PathIncrement::strain(d) });
    }
    Path { name: "tension, then shear at fixed tension strain".into(), increments }
}

fn probe(model: &str, kind: PointKind, props: &[f64], path: &Path) -> (Vec<IncrementSolve>, ProbeResult) {
    let mut r = reference(model, kind).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let settings = Settings::default();
    let spec = ProbeSpec::named("newton");
    let env = ProbeEnv { props, start: &start, path, settings: &settings, spec: &spec };
    let solves = newton::study(&mut caller, &env).unwrap();
    let result = NewtonRate.run(&mut caller, &env).unwrap();
    for s in &solves {
        eprintln!(
            "{model} increment {}{}: {} iterations, orders {:?}",
            s.increment,
            if s.state_changed { " (inelastic)" } else { "" },
            s.iterations(),
            s.orders
        );
    }
    eprintln!("{model}: {} — {}", result.status.word(), result.summary);
    (solves, result)
}

#[test]
fn the_consistent_tangent_converges_quadratically() {
    let (solves, result) = probe("j2", PointKind::Solid3d, &VOCE, &tension_then_shear());
    assert_eq!(result.status, ProbeStatus::Pass, "{result:?}");
    let inelastic: Vec<_> = solves.iter().filter(|s| s.state_changed).collect();
    assert!(inelastic.len() >= 6);
    let mut measured = 0;
    for s in &inelastic {
        assert!(s.converged(), "{s:?}");
        if let Some(p) = s.order() {
            measured += 1;
            assert!(p >= 1.9, "increment {}: orders {:?}", s.increment, s.orders);
        }
    }
    assert!(measured >= 4, "{solves:?}");
    assert!(result.value.unwrap() >= 1.9);
}

#[test]
fn the_continuum_tangent_converges_linearly_and_fails() {
    let (solves, result) = probe("j2-continuum", PointKind::Solid3d, &VOCE, &tension_then_shear());
    assert_eq!(result.status, ProbeStatus::Fail, "{result:?}");
    let mut orders: Vec<f64> = Vec::new();
    let mut measured = 0;
    for s in solves.iter().filter(|s| s.state_changed) {
        assert!(s.converged(), "{s:?}");
        orders.extend(&s.orders);
        if let Some(p) = s.order() {
            measured += 1;
            assert!((p - 1.0).abs() < 0.25, "increment {}: orders {:?}", s.increment, s.orders);
        }
    }
    assert!(measured >= 4, "{solves:?}");
    // Linear from the start but for the first few iterates of each increment.
    let near_one = orders.iter().filter(|p| (*p - 1.0).abs() < 0.25).count();
    assert!(near_one as f64 >= 0.8 * orders.len() as f64, "continuum orders {orders:?}");
    // Under proportional tension (increments 2–4) the two tangents agree on the directions
    // Newton visits and it converges in two iterations; the first shear increment, where the
    // flow direction turns, is the first to fail.
    for s in &solves[1..4] {
        assert!(s.state_changed && s.iterations() <= 2 && s.order().is_none(), "{s:?}");
    }
    assert_eq!(result.increment, Some(5));
    assert!(result.summary.contains("below 1.5"), "{}", result.summary);
    // A linear solve's long residual list reads as its first and last four with the count
    // between (45 residuals filled a line; a user-style sweep); a short one in full.
    assert!(solves.iter().any(|s| s.log.residuals.len() > 10), "a long solve: {solves:?}");
    for (s, d) in solves.iter().zip(&result.details) {
        let n = s.log.residuals.len();
        let elided = format!("… {} more …", n.saturating_sub(8));
        assert_eq!(d.contains(&elided), n > 10, "{n} residuals: {d}");
        let last = format!("{:.2e}]", s.log.residuals[n - 1]);
        assert!(d.contains(&last), "{d}");
    }
}

// No false alarm on the strain-controlled tension-with-shear ramp of the default suite, in
// 3D and plane strain, with every hardening of the model; an elastic path has nothing to
// measure.
#[test]
fn no_false_alarm_on_strain_control_and_elastic_paths() {
    let all = [200000.0, 0.3, 250.0, 1000.0, 300.0, 30.0, 500.0];
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
        let (solves, result) = probe("j2", kind, &all, &path);
        assert_eq!(result.status, ProbeStatus::Pass, "{kind}: {result:?}");
        assert!(solves.iter().any(|s| s.order().is_some()), "{kind}: nothing measured");
    }
    let (_, result) = probe("elastic", PointKind::Solid3d, &[200000.0, 0.3], &path);
    assert_eq!(result.status, ProbeStatus::Pass, "{result:?}");
    assert!(result.summary.contains("no order to measure"), "{}", result.summary);
    assert_eq!(result.value, None);
    // A uniaxial-strain path moves only the first component: the probe starts the others
    // away from the answer, so J2 still has iterations to show.
    let (solves, result) =
        probe("j2", PointKind::Solid3d, &all, &Path::ramp(Shape::UniaxialStrain, 4e-3, 8, 0));
    assert_eq!(result.status, ProbeStatus::Pass, "{result:?}");
    assert!(solves.iter().filter(|s| s.state_changed).all(|s| s.iterations() >= 2), "{solves:?}");
    let mut u = reference("elastic", PointKind::Uniaxial).unwrap();
    let info = u.info().clone();
    let mut caller = Caller::new(&mut u);
    let start = PointState::zero(&info, 20.0);
    let settings = Settings::default();
    let spec = ProbeSpec::named("newton");
    let env =
        ProbeEnv { props: &[200000.0, 0.3], start: &start, path: &path, settings: &settings, spec: &spec };
    assert_eq!(NewtonRate.run(&mut caller, &env).unwrap().status, ProbeStatus::Skipped);
}

/// The J2 model refusing (a smaller increment asked for) any call whose ε22 increment is
/// negative: the probe's own iterates start there, the path's calls never do.
struct RefusesContraction<R>(R);

impl<R: Routine> Routine for RefusesContraction<R> {
    fn info(&self) -> &tancheck::core::routine::RoutineInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::routine::CallInput<'_, f64>,
        output: &mut tancheck::core::routine::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::routine::Fault> {
        use tancheck::core::routine::{status, Fault};
        if input.dstrain[1] < -1e-12 {
            output.outcome.status = status::SMALLER_INCREMENT;
            return Err(Fault::Status {
                status: status::SMALLER_INCREMENT,
                message: "contraction refused".into(),
                largest_fraction: 0.5,
            });
        }
        self.0.call(input, output)
    }
}

// A status the routine returns for an iterate of the probe's own solve is a refusal, as a
// solver would meet and cut back from, not a failure of the tangent (it failed the probe,
// exit 1, on a correct routine): the increment is not judged, and a probe with no increment
// left is skipped with the reason.
#[test]
fn an_iterate_the_routine_refuses_is_not_judged() {
    let mut r = RefusesContraction(reference("j2", PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let settings = Settings::default();
    let spec = ProbeSpec::named("newton");
    let path = Path::ramp(Shape::UniaxialStrain, 4e-3, 8, 0);
    let env = ProbeEnv { props: &VOCE, start: &start, path: &path, settings: &settings, spec: &spec };
    let solves = newton::study(&mut caller, &env).unwrap();
    assert!(!solves.is_empty() && solves.iter().all(|s| s.refused), "{solves:#?}");
    let result = NewtonRate.run(&mut caller, &env).unwrap();
    assert_eq!(result.status, ProbeStatus::Skipped, "{result:#?}");
    assert!(
        result.details.iter().all(|d| d.contains("contraction refused") && d.contains("not judged")),
        "{result:#?}"
    );
}

/// A softening law in the 22 component (from memory, a textbook damage form): κ the largest
/// |ε22| reached (the state), d = 1 − (ε0/κ)² beyond ε0, σ22 = (1 − d) E ε22, with its
/// consistent tangent; the other components E ε. Past the peak the same σ22 is reached on the
/// elastic unloading branch at a smaller strain, without damage growth.
struct Softening(tancheck::core::RoutineInfo);

const E: f64 = 1000.0;
const EPS0: f64 = 1e-3;

impl Routine for Softening {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.0
    }
    fn call(
        &mut self,
        i: &tancheck::core::CallInput<'_, f64>,
        o: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        o.tangent.fill(0.0);
        for k in 0..6 {
            let e = i.strain[k] + i.dstrain[k];
            if k == 1 {
                let kappa0 = i.state0[0].max(EPS0);
                let loading = e.abs() > kappa0;
                let kappa = if loading { e.abs() } else { kappa0 };
                let f = (EPS0 / kappa).powi(2);
                o.stress[1] = f * E * e;
                // d/dε [E ε0² ε/κ²] with κ = |ε| on loading: −E ε0²/ε².
                o.tangent[1 + 6] = if loading { -E * EPS0 * EPS0 / (e * e) } else { f * E };
                o.state[0] = kappa;
            } else {
                o.stress[k] = E * e;
                o.tangent[k + 6 * k] = E;
            }
        }
        o.outcome.provides = 0;
        Ok(())
    }
}

// Past the peak of a softening law the probe's solve, from zero, reaches the path's stresses
// on the unloading branch: another solution, left unjudged and said (a secant tangent passed
// as "converged in 1 iteration", its increments labelled inelastic; a user-style sweep).
#[test]
fn a_solve_that_ends_on_another_branch_is_not_judged() {
    let conv = tancheck::core::Convention::new(PointKind::Solid3d, tancheck::core::ShearMeasure::Engineering);
    let info =
        tancheck::core::RoutineInfo { name: "softening".into(), convention: conv, nstate: 1, nprop: 0 };
    let mut r = Softening(info.clone());
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let path = Path {
        name: "past the peak".into(),
        increments: (0..6).map(|_| PathIncrement::strain([1e-4, 5e-4, 0.0, 0.0, 0.0, 0.0])).collect(),
    };
    let settings = Settings::default();
    let spec = ProbeSpec::named("newton");
    let env = ProbeEnv { props: &[], start: &start, path: &path, settings: &settings, spec: &spec };
    let solves = newton::study(&mut caller, &env).unwrap();
    let past: Vec<&IncrementSolve> = solves.iter().filter(|s| s.increment >= 4).collect();
    assert!(!past.is_empty());
    for s in past {
        let w = s.elsewhere.as_deref().unwrap_or_else(|| panic!("increment {}: {s:?}", s.increment));
        assert!(w.contains("another solution") && w.contains("state[0]"), "{w}");
        assert!(s.unjudged());
    }
    let result = NewtonRate.run(&mut caller, &env).unwrap();
    assert!(result.summary.contains("not judged"), "{}", result.summary);
}

/// Elasticity returning a tangent with its 11 entry alone: singular in the components the
/// probe solves for, only because it is wrong (the derivative, the elastic stiffness, is not).
struct OnlyEleven(tancheck::core::ModelRoutine<tancheck::models::AnyModel>);

impl tancheck::core::Routine for OnlyEleven {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        self.0.call(input, output)?;
        for t in output.tangent.iter_mut().skip(1) {
            *t = 0.0;
        }
        Ok(())
    }
    fn complex(&mut self) -> Option<&mut dyn tancheck::core::ComplexRoutine> {
        self.0.complex()
    }
}

// A solve that does not converge where the routine's tangent is singular is excused as a
// corner's only where the derivative (the complex step's) is singular there too: a tangent
// singular because it is wrong is judged, and fails (a Mohr-Coulomb tangent without its
// rotation term passed so; a user-style sweep).
#[test]
fn a_tangent_singular_only_because_it_is_wrong_is_not_excused() {
    use tancheck::core::Routine;
    let mut r = OnlyEleven(reference("elastic", PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let settings = Settings::default();
    let spec = ProbeSpec::named("newton");
    let path = tancheck::core::path::Path::ramp(tancheck::core::path::Shape::TensionShear, 2e-3, 4, 0);
    let env =
        ProbeEnv { props: &[200000.0, 0.3], start: &start, path: &path, settings: &settings, spec: &spec };
    let solves = newton::study(&mut caller, &env).unwrap();
    assert!(solves.iter().all(|s| !s.singular), "{solves:?}");
    let result = NewtonRate.run(&mut caller, &env).unwrap();
    assert_eq!(result.status, ProbeStatus::Fail, "{}", result.summary);
}

// A correct tangent whose Newton solve from the increment's start is pre-asymptotic: a ply
// with damage and viscous lag (tests/routines/ply_lag.c, made-up numbers), whose second
// increment's solve crosses the damage onset and read order 1.43 from [9.65, 3.88, 1.24e-2,
// 3.42e-6, 8.32e-14] (its last residual too near rounding to give an order) and failed; the
// tangent is the derivative (the check passes, complex step and central differences). Started
// near the solution, it shows its order; the variant without the viscous factor in its
// tangent still fails.
#[test]
fn a_pre_asymptotic_start_is_solved_again_from_near_the_solution() {
    use std::process::Command;
    let lib = tancheck_testkit::libs::build_once("ply_lag", &["tests/routines/ply_lag.c"]);
    let dir = tancheck_testkit::libs::scratch("newton-ply-lag");
    let suite = dir.join("suite.json");
    std::fs::write(&suite, r#"{ "suite": "rate", "probes": [{ "probe": "newton" }] }"#).unwrap();
    let run = |args: &[&str]| {
        let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
        (o.status.code().unwrap_or(-1), tancheck_testkit::libs::output_text(&o))
    };
    for (symbol, want) in [("lag_ply", 0), ("lag_ply_no_viscous_factor", 1)] {
        let m = dir.join(format!("{symbol}.json"));
        let inc = r#"{ "dstrain": [0, 0.002, 0, 0, 0, 0.004], "dtime": 1.0 }"#;
        std::fs::write(
            &m,
            format!(
                r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "plane-stress", "states": 6,
                     "properties": [140000, 10000, 0.3, 5000, 0.015, 0.03, 0.01, 0.025, 0.005, 0.02, 0.5, 0.5] }},
                   "path": {{ "increments": [{inc}, {inc}, {inc}] }} }}"#,
                lib.display()
            ),
        )
        .unwrap();
        let m = m.display().to_string();
        let (code, out) = run(&["check", &m]);
        assert_eq!(code, want, "{symbol} check: {out}");
        let (code, out) = run(&["probe", &m, "--suite", suite.to_str().unwrap(), "-v"]);
        assert_eq!(code, want, "{symbol} newton: {out}");
        if want == 0 {
            assert!(out.contains("started at 90 % of the increment: from its start the residuals"), "{out}");
        }
    }
}
