//! Regression tests of the verdict (issue 9): no false alarm at a branch boundary, the
//! straddling difference as the negative control, the soft-direction error, and the CLI exit
//! code of a correct J2 increment ending on the yield surface.

use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::{
    CallInput, CallOutput, Fault, Model, ModelRoutine, PointKind, Report, RoutineInfo, Scalar, Scheme,
    Settings, Verdict,
};
use tancheck::models::{reference, zoo_model, J2};
use tancheck_testkit::check::{only, run_from_zero, summary};

/// E = 200 GPa, ν = 0.3, σy = 250 MPa, no hardening: the issue's J2 case. The yield point in
/// uniaxial strain is ε11 = σy/2μ = 250/(2·76923.08) = 0.001625 (2μ = E/(1 + ν)).
const PERFECT: [f64; 7] = [200000.0, 0.3, 250.0, 0.0, 0.0, 0.0, 0.0];

/// The worked case of REFERENCES.md (Simo & Taylor 1985; Simo & Hughes 1998, Box 3.2):
/// H_iso = 1000 MPa, H_kin = 500 MPa.
const WORKED: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

fn one(dstrain: [f64; 6]) -> Path {
    Path {
        name: "one increment".into(),
        increments: vec![PathIncrement { dstrain, dtemp: 0.0, dtime: 1.0, hold_stress: None }],
    }
}

fn run(routine: &mut dyn tancheck::core::Routine, props: &[f64], path: &Path, settings: &Settings) -> Report {
    run_from_zero(routine, props, 20.0, path, settings)
}

#[test]
fn correct_j2_ending_on_the_yield_surface_and_around_it_passes() {
    for shift in [0.0, 1e-9, -1e-9] {
        let mut m = reference("j2", PointKind::Solid3d).unwrap();
        let r =
            run(&mut m, &PERFECT, &one([0.001625 + shift, 0.0, 0.0, 0.0, 0.0, 0.0]), &Settings::default());
        assert_eq!(r.verdict, Verdict::Pass, "shift {shift:e}:\n{}", summary(&r));
        // Without the twin (central differences only) each column must find its own side.
        let s = only(Scheme::Central);
        let r = run(&mut m, &PERFECT, &one([0.001625 + shift, 0.0, 0.0, 0.0, 0.0, 0.0]), &s);
        assert_eq!(r.verdict, Verdict::Pass, "central only, shift {shift:e}:\n{}", summary(&r));
    }
    // On the surface the central check straddles the kink: the diagnosis found it and names
    // the side of each column (11 loads plastically forward, so it matches backward).
    let mut m = reference("j2", PointKind::Solid3d).unwrap();
    let s = only(Scheme::Central);
    let r = run(&mut m, &PERFECT, &one([0.001625, 0.0, 0.0, 0.0, 0.0, 0.0]), &s);
    let d = r.increments[0].diagnosis.as_ref().expect("the central check straddled the kink");
    let k = d.kink.as_ref().unwrap();
    assert!(k.detected, "{}", summary(&r));
    assert!(k.sides.starts_with("11 backward, 22 forward, 33 forward"), "{}", k.sides);
}

#[test]
fn correct_cohesive_law_at_mixed_mode_onset_passes() {
    // K, N, S, G_Ic, G_IIc, η: the AS4/PEEK data of REFERENCES.md (memory), onset
    // δ₀₃ = 8e-5 mm, δ₀ₛ = 1e-4 mm; at B = ½ δ₀ₘ = δ₀₃δ₀ₛ/√((1 − B)δ₀ₛ² + Bδ₀₃²).
    let props = [1e6, 80.0, 100.0, 0.969, 1.719, 2.284];
    let (d03, d0s) = (8e-5, 1e-4);
    let d0m = d03 * d0s / (0.5 * d0s * d0s + 0.5 * d03 * d03).sqrt();
    // β = 1 (opening = slip): REFERENCES gives δ₀ₘ = 8.8345e-5 mm for this mixity.
    assert!((d0m / 8.8345e-5 - 1.0).abs() < 1e-4, "{d0m}");
    for kind in [PointKind::Cohesive3d, PointKind::Cohesive2d] {
        for f in [1.0, 1.0 + 1e-9, 1.0 - 1e-9] {
            let c = f * d0m / 2f64.sqrt();
            let mut m = reference("cohesive", kind).unwrap();
            let r = run(&mut m, &props, &one([c, c, 0.0, 0.0, 0.0, 0.0]), &Settings::default());
            assert_eq!(r.verdict, Verdict::Pass, "{kind} at {f}:\n{}", summary(&r));
        }
    }
}

/// J2 whose returned 11/11 entry is a fixed value: the straddling central difference.
#[derive(Clone, Debug)]
struct Straddle {
    base: J2,
    c1111: f64,
}

impl Model for Straddle {
    fn info(&self) -> &RoutineInfo {
        self.base.info()
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        self.base.evaluate(input, output)?;
        output.tangent[0] = S::cst(self.c1111);
        Ok(())
    }
}

// The negative control (REFERENCES.md, J2 worked case, derived): a central difference with
// h = 1e-2 about ε11 = 0.003 straddles both yield points (±0.001625) and is off by 9.9 %. In
// uniaxial strain the response is piecewise linear (elastic λ + 2μ, plastic C1111 =
// 167329.028), so the straddled slope is the length-weighted mean of the two moduli. A
// routine returning it must fail, on the yield surface (a kink: neither side) and off it.
#[test]
fn the_straddling_difference_is_not_excused() {
    let (e, nu) = (200000.0, 0.3);
    let elastic = e * (1.0 - nu) / ((1.0 + nu) * (1.0 - 2.0 * nu));
    let plastic = 167329.028;
    let (lo, hi, y) = (0.003 - 1e-2, 0.003 + 1e-2, 0.001625);
    let straddle = (plastic * ((hi - y) + (-y - lo)) + elastic * 2.0 * y) / (hi - lo);
    let off = straddle / plastic - 1.0;
    assert!((off - 0.099).abs() < 5e-4, "the straddled difference is off by {off}");
    for (end, want) in [(0.001625, "kink-neither-side"), (0.003, "single-entry")] {
        let mut m = ModelRoutine(Straddle { base: J2::new(PointKind::Solid3d).unwrap(), c1111: straddle });
        let props = if end == 0.001625 { PERFECT } else { WORKED };
        let r = run(&mut m, &props, &one([end, 0.0, 0.0, 0.0, 0.0, 0.0]), &Settings::default());
        assert_eq!(r.verdict, Verdict::TangentFailure, "at {end}:\n{}", summary(&r));
        assert_eq!(r.finding(), want, "at {end}:\n{}", summary(&r));
        let s = only(Scheme::Central);
        let r = run(&mut m, &props, &one([end, 0.0, 0.0, 0.0, 0.0, 0.0]), &s);
        assert_eq!(r.verdict, Verdict::TangentFailure, "central only at {end}:\n{}", summary(&r));
    }
}

// J2 with a small kinematic modulus left out of the plastic correction (j2-no-kinematic with
// H_kin = 30 MPa against H_iso = 100 MPa): the soft (plastic) modulus is off by about
// H_kin/(H_iso + H_kin) ≈ 23 %, a few 1e-5 of the elastic scale. Every scheme, forward
// included, fails at its default tolerance; the per-entry and norm errors alone miss it with
// the forward scheme.
#[test]
fn the_soft_direction_error_fails_every_scheme() {
    let props = [200000.0, 0.3, 250.0, 100.0, 0.0, 0.0, 30.0];
    let path = Path {
        name: "uniaxial strain into plastic flow".into(),
        increments: (0..4)
            .map(|_| PathIncrement {
                dstrain: [1e-3, 0.0, 0.0, 0.0, 0.0, 0.0],
                dtemp: 0.0,
                dtime: 1.0,
                hold_stress: None,
            })
            .collect(),
    };
    for scheme in Scheme::ALL {
        let mut m = zoo_model("j2-no-kinematic", PointKind::Solid3d).unwrap();
        let s = only(scheme);
        let r = run(&mut m, &props, &path, &s);
        assert_eq!(r.verdict, Verdict::TangentFailure, "{}:\n{}", scheme.name(), summary(&r));
        if scheme == Scheme::Forward {
            let plastic = r.increments.iter().find(|i| i.state_changed).unwrap();
            let tancheck::core::report::CheckOutcome::Compared(c) = &plastic.checks[0].tangent else {
                panic!("compared")
            };
            assert!(c.norm_error < c.tol && c.worst_entry_error < c.tol, "{c:?}");
            assert!(c.soft_error > 10.0 * c.tol, "{c:?}");
            // The scheme's summary gives the largest error the increments give, the soft
            // direction's here, beyond the norm and entry errors (it gave only those two, and a
            // passing check's lines read 16 times the summary's worst, found by a user-style
            // sweep).
            let sum = &r.summary[0];
            assert!(
                sum.worst_error >= c.soft_error
                    && sum.worst_error > sum.worst_entry_error.max(sum.worst_norm_error),
                "{sum:?}"
            );
        }
    }
    // The consistent J2 passes with every scheme (the soft measure adds no false alarm).
    for scheme in Scheme::ALL {
        let mut m = reference("j2", PointKind::Solid3d).unwrap();
        let s = only(scheme);
        let r = run(&mut m, &props, &path, &s);
        assert_eq!(r.verdict, Verdict::Pass, "{}:\n{}", scheme.name(), summary(&r));
    }
}

#[test]
fn the_issue_manifest_exits_zero() {
    let dir = std::env::temp_dir().join(format!("tancheck-verdict-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let m = dir.join("m.json");
    std::fs::write(
        &m,
        r#"{"routine":{"model":"j2","kind":"solid-3d","states":13,"properties":[200000,0.3,250,0,0,0,0]},"path":{"increments":[{"dstrain":[0.001625,0,0,0,0,0]}]}}"#,
    )
    .unwrap();
    let out =
        std::process::Command::new(env!("CARGO_BIN_EXE_tancheck")).arg("check").arg(&m).output().unwrap();
    let _ = std::fs::remove_dir_all(&dir);
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stdout));
}

/// A continuum tangent is named at the increment where yield begins and at the reverse yield
/// too, not only once the whole increment is plastic: those increments cross into the plastic
/// branch, their smaller fractions from the start stay elastic, and the cause trials now take
/// the fractions of the part past the crossing (where the discrepancy of a continuum tangent
/// shrinks in proportion to the plastic part; a standard result of the return map, Simo &
/// Hughes 1998, from memory). Before, those increments read `unexplained`.
#[test]
fn a_continuum_tangent_is_named_where_the_increment_crosses_into_yield() {
    let path = Path::ramp(tancheck::core::path::Shape::TensionShear, 4e-3, 8, 8);
    let mut m = zoo_model("j2-continuum", PointKind::Solid3d).unwrap();
    let r = run(&mut m, &WORKED, &path, &Settings::default());
    let failed: Vec<_> = r.increments.iter().filter(|i| !i.passed()).collect();
    assert!(failed.len() >= 8, "{}", summary(&r));
    for inc in failed {
        assert_eq!(inc.finding(), "continuum-tangent", "increment {}:\n{}", inc.index, summary(&r));
    }
}

// The report's one-word finding is the finding most failing increments name first, not the
// cause that explains at most of them: a general cause (rank two, which a discrepancy of rank
// one also has on a point of three components or fewer) explains alongside the specific one at
// every increment, and counted there it outnumbered the specific one, which the first
// increment names otherwise (a user-style sweep: a plane-stress ply routine returning its
// undamaged stiffness was headlined `rank-two` in JUnit and HTML).
#[test]
fn the_headline_finding_is_the_one_the_increments_name_first() {
    use tancheck::core::diagnose::{Cause, Hypothesis};
    let mut m = zoo_model("cohesive-undamaged", PointKind::Cohesive3d).unwrap();
    let path = Path::ramp(tancheck::core::Shape::MixedMode, 0.0032, 8, 4);
    let mut r = run(&mut m, &[1e5, 60.0, 90.0, 0.3, 0.9, 2.0], &path, &Settings::default());
    assert_eq!(r.verdict, Verdict::TangentFailure);
    let named: Vec<&str> =
        r.increments.iter().filter_map(|i| i.diagnosis.as_ref()).map(|d| d.finding.as_str()).collect();
    assert_eq!(named[0], "elastic-tangent", "{named:?}");
    assert!(named.iter().filter(|f| **f == "initial-stiffness").count() >= 5, "{named:?}");
    assert_eq!(r.finding(), "initial-stiffness");
    // A general cause explaining at every diagnosed increment, ranked after the specific one.
    for inc in r.increments.iter_mut() {
        if let Some(d) = inc.diagnosis.as_mut() {
            d.causes.push(Hypothesis {
                cause: Cause::RankTwo,
                detail: String::new(),
                error_left: 0.0,
                explains: true,
            });
        }
    }
    assert_eq!(r.finding(), "initial-stiffness");
}

// The report's one-word finding counts the unexplained increments as it counts the causes:
// a cause named at one failing increment does not stand for eleven that nothing explains
// (a tangent built with the start-of-increment backstress read `continuum-tangent` from one
// increment of twelve, found by a user-style sweep). Ties go to the named cause.
#[test]
fn the_finding_is_unexplained_where_most_failing_increments_are() {
    use tancheck::core::path::Shape;
    let mut m = reference("j2-continuum", PointKind::Solid3d).unwrap();
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let r = run(&mut m, &WORKED, &path, &Settings::default());
    assert_eq!(r.finding(), "continuum-tangent", "{}", summary(&r));
    let failing: Vec<usize> = (0..r.increments.len()).filter(|&k| !r.increments[k].passed()).collect();
    assert!(failing.len() >= 3, "{}", summary(&r));
    let relabel = |keep: usize| {
        let mut r = r.clone();
        for &k in &failing[keep..] {
            r.increments[k].diagnosis.as_mut().unwrap().finding = "unexplained".into();
        }
        r
    };
    // One named, the others unexplained: unexplained.
    assert_eq!(relabel(1).finding(), "unexplained");
    // As many named as unexplained: the named cause.
    let half = failing.len() / 2;
    let even = if failing.len() % 2 == 0 { relabel(half) } else { relabel(half + 1) };
    assert_eq!(even.finding(), "continuum-tangent");
    // None named: unexplained, as before.
    assert_eq!(relabel(0).finding(), "unexplained");
    // Two named or more, at a third as many as are unexplained: the named cause (a flaw of the
    // elastic stiffness, named at its 6 elastic increments beside 10 unexplained plastic ones,
    // read `unexplained`; a user-style sweep).
    let k = failing.len().div_ceil(4).max(2);
    assert!(2 * k < failing.len(), "fewer named than unexplained: {}", summary(&r));
    assert_eq!(relabel(k).finding(), "continuum-tangent");
}

// A check told not to diagnose (the C API's `diagnose = 0`, `Settings::diagnose`) says so in
// its one-word finding, as each of its failing increments does: it read `unexplained`, which
// says the diagnosis ran and found nothing (a user-style sweep).
#[test]
fn a_check_told_not_to_diagnose_finds_undiagnosed() {
    use tancheck::core::path::Shape;
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let mut m = reference("j2-continuum", PointKind::Solid3d).unwrap();
    let quiet = Settings { diagnose: false, ..Settings::default() };
    let r = run(&mut m, &WORKED, &path, &quiet);
    assert_eq!(r.verdict, Verdict::TangentFailure, "{}", summary(&r));
    assert!(r.increments.iter().filter(|i| !i.passed()).all(|i| i.finding() == "undiagnosed"));
    assert_eq!(r.finding(), "undiagnosed", "{}", summary(&r));
    // Diagnosed, the same routine's finding is its cause.
    let mut m = reference("j2-continuum", PointKind::Solid3d).unwrap();
    assert_eq!(run(&mut m, &WORKED, &path, &Settings::default()).finding(), "continuum-tangent");
}

// Where several causes explain an increment, it names first the one the most other failing
// increments name first (a continuum tangent read `start-temperature` at the increments that
// only heat, and `isotropic-moduli` at one hydrostatic increment of a porous plasticity
// routine, found by user-style sweeps). An increment that cause does not explain keeps its
// own. Here a real report of a continuum tangent, one increment given a bulk-modulus cause
// ranked first that explains as well, another one that the continuum tangent does not.
#[test]
fn an_increment_names_first_the_cause_the_path_agrees_on_where_it_explains_too() {
    use tancheck::core::diagnose::{Cause, Hypothesis};
    use tancheck::core::path::Shape;
    let mut m = reference("j2-continuum", PointKind::Solid3d).unwrap();
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let r = run(&mut m, &WORKED, &path, &Settings::default());
    let failing: Vec<usize> = (0..r.increments.len()).filter(|&k| !r.increments[k].passed()).collect();
    assert!(failing.len() >= 5, "{}", summary(&r));
    let mut inc = r.increments.clone();
    let bulk = Hypothesis {
        cause: Cause::BulkModulus,
        detail: "the volumetric part is 0.9× the derivative's".into(),
        error_left: 1e-12,
        explains: true,
    };
    // The third: the continuum tangent explains, but leaves 1e-6 where the bulk modulus leaves
    // 1e-12: not as well, so the increment keeps its own (a continuum tangent leaving 1.1e-7
    // was named over a start temperature leaving 2e-16; a user-style sweep).
    for (k, continuum_explains, left) in
        [(failing[1], true, None), (failing[2], false, None), (failing[3], true, Some(1e-6))]
    {
        let d = inc[k].diagnosis.as_mut().unwrap();
        assert_eq!(d.finding, "continuum-tangent");
        d.causes.iter_mut().filter(|h| h.cause == Cause::ContinuumTangent).for_each(|h| {
            h.explains = continuum_explains;
            h.error_left = left.unwrap_or(h.error_left);
        });
        d.causes.insert(0, bulk.clone());
        d.finding = "bulk-modulus".into();
    }
    tancheck::core::report::agree::agree_on_causes(&mut inc, r.routine.order.len());
    let d = inc[failing[1]].diagnosis.as_ref().unwrap();
    assert_eq!(d.finding, "continuum-tangent", "{}", d.reason);
    assert_eq!(d.causes[0].cause, Cause::ContinuumTangent);
    assert!(
        d.reason.contains("explains") && d.reason.contains("bulk-modulus was ranked first"),
        "{}",
        d.reason
    );
    let d = inc[failing[2]].diagnosis.as_ref().unwrap();
    assert_eq!(d.finding, "bulk-modulus", "{}", d.reason);
    let d = inc[failing[3]].diagnosis.as_ref().unwrap();
    assert_eq!(d.finding, "bulk-modulus", "{}", d.reason);
    // The others are untouched.
    for &k in &failing[4..] {
        assert_eq!(inc[k], r.increments[k]);
    }
}

// On a point of one component every wrong tangent is a uniform scale and a scaled term: the
// increment's own ranking names the uniform scale (the factor), and the path does not put a
// shape cause (`term-scaled`) before it, or check would name another cause than bisect and
// replay of the same increment (a user-style sweep of a uniaxial routine). With more
// components the shape cause may lead the path, as before.
#[test]
fn on_a_one_component_point_the_path_names_no_shape_cause_first() {
    use tancheck::core::diagnose::{Cause, Hypothesis};
    use tancheck::core::path::Shape;
    let mut m = reference("j2-continuum", PointKind::Solid3d).unwrap();
    let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
    let r = run(&mut m, &WORKED, &path, &Settings::default());
    let failing: Vec<usize> = (0..r.increments.len()).filter(|&k| !r.increments[k].passed()).collect();
    assert!(failing.len() >= 2);
    let exact = |cause| Hypothesis { cause, detail: String::new(), error_left: 0.0, explains: true };
    let mut inc = r.increments.clone();
    for &k in &failing {
        let d = inc[k].diagnosis.as_mut().unwrap();
        d.causes = vec![exact(Cause::UniformScale), exact(Cause::TermScaled)];
        d.finding = "uniform-scale".into();
    }
    let mut scalar = inc.clone();
    tancheck::core::report::agree::agree_on_causes(&mut scalar, 1);
    for &k in &failing {
        assert_eq!(scalar[k].diagnosis.as_ref().unwrap().finding, "uniform-scale");
    }
    tancheck::core::report::agree::agree_on_causes(&mut inc, 6);
    assert_eq!(inc[failing[0]].diagnosis.as_ref().unwrap().finding, "term-scaled");
}

/// The reference J2 whose stress is NaN wherever the strain at the end of the call is past
/// `self.1` in its first component, in the real routine only (its complex-step twin is clean).
struct NanPast(ModelRoutine<tancheck::models::AnyModel>, f64);

impl tancheck::core::Routine for NanPast {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.call(input, output)?;
        if input.strain[0] + input.dstrain[0] > self.1 {
            output.stress[0] = f64::NAN;
        }
        Ok(())
    }
    fn complex(&mut self) -> Option<&mut dyn tancheck::core::ComplexRoutine> {
        self.0.complex()
    }
}

// A routine that returns NaN just past the end of an increment it computes (a barely plastic
// step without a guard) fails there as `non-finite-derivative`, naming the column, whatever
// the complex step says (it passed: the twin's derivative cleared it; found by a user-style
// sweep of a Johnson–Cook routine). The increment's own stress is finite and not flagged.
#[test]
fn a_perturbed_call_returning_nan_fails_even_where_the_complex_step_agrees() {
    let e = 1e-3;
    for schemes in [Settings::default(), only(Scheme::Central)] {
        let mut m = NanPast(reference("j2", PointKind::Solid3d).unwrap(), e);
        let r = run(&mut m, &WORKED, &one([e, 0.0, 0.0, 0.0, 0.0, 0.0]), &schemes);
        assert_eq!(r.verdict, Verdict::TangentFailure, "{}", summary(&r));
        assert_eq!(r.finding(), "non-finite-derivative", "{}", summary(&r));
        let d = r.increments[0].diagnosis.as_ref().unwrap();
        assert!(d.reason.contains("column 11") && d.reason.contains("not a finite number"), "{}", d.reason);
        assert!(r.increments[0].non_finite.is_empty());
    }
    // Away from the NaN the same routine passes.
    let mut m = NanPast(reference("j2", PointKind::Solid3d).unwrap(), 2.0 * e);
    let r = run(&mut m, &WORKED, &one([e, 0.0, 0.0, 0.0, 0.0, 0.0]), &Settings::default());
    assert_eq!(r.verdict, Verdict::Pass, "{}", summary(&r));
}

/// The reference J2 whose complex-step twin refuses (a status) every call of the first two
/// increments, where the real routine computes them: the twin takes another branch there.
struct RefusingTwin(ModelRoutine<tancheck::models::AnyModel>);

impl tancheck::core::Routine for RefusingTwin {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.call(input, output)
    }
    fn complex(&mut self) -> Option<&mut dyn tancheck::core::ComplexRoutine> {
        Some(self)
    }
}

impl tancheck::core::ComplexRoutine for RefusingTwin {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, num_complex::Complex64>,
        output: &mut CallOutput<'_, num_complex::Complex64>,
    ) -> Result<(), Fault> {
        if input.increment <= 2 {
            output.outcome.status = 2;
            return Err(Fault::Status { status: 2, message: "no convergence".into(), largest_fraction: 1.0 });
        }
        use tancheck::core::Routine;
        self.0.complex().expect("the reference J2 has a twin").call_complex(input, output)
    }
}

// A twin that refuses calls the real routine computes (an unguarded power of zero whose NaN
// derivative part turns its yield test) is not complex-step safe: TWIN (exit 4) with the real
// schemes' checks standing, not a fault of the routine (it was exit 3; a user-style sweep of a
// Johnson–Cook routine).
#[test]
fn a_twin_refusing_calls_the_real_routine_computes_is_twin_not_safe() {
    use tancheck::core::path::Shape;
    let mut m = RefusingTwin(reference("j2", PointKind::Solid3d).unwrap());
    let path = Path::ramp(Shape::TensionShear, 4e-3, 6, 2);
    let r = run(&mut m, &WORKED, &path, &Settings::default());
    assert_eq!(r.verdict, Verdict::TwinNotSafe, "{}", summary(&r));
    assert_eq!(r.exit_code(), 4);
    let d = r.increments[0].diagnosis.as_ref().expect("the increment is judged in full");
    assert!(d.pass && d.twin_unsafe && d.reason.contains("refused a call"), "{}", d.reason);
}

/// Linear elasticity whose σ11 jumps by `self.1` where the strain at the end of the call has
/// ε11 ≥ 0 (a criterion that switches a term on at a sign change), in the real routine and
/// its twin alike (the twin on the real part): the tangent it returns is the derivative on
/// either side.
struct Jumping(ModelRoutine<tancheck::models::AnyModel>, f64);

impl tancheck::core::Routine for Jumping {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.call(input, output)?;
        if input.strain[0] + input.dstrain[0] >= 0.0 {
            output.stress[0] += self.1;
        }
        Ok(())
    }
    fn complex(&mut self) -> Option<&mut dyn tancheck::core::ComplexRoutine> {
        Some(self)
    }
}

impl tancheck::core::ComplexRoutine for Jumping {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, num_complex::Complex64>,
        output: &mut CallOutput<'_, num_complex::Complex64>,
    ) -> Result<(), Fault> {
        use tancheck::core::Routine;
        self.0.complex().expect("elasticity has a twin").call_complex(input, output)?;
        if (input.strain[0] + input.dstrain[0]).re >= 0.0 {
            output.stress[0] += self.1;
        }
        Ok(())
    }
}

// A stress that jumps across the point (a shear path sitting on ε11 = 0 where the law
// switches a term on) has a tangent the complex step confirms, and the check passes; but the
// diagnosis and a coverage warning say that the response is discontinuous there, naming the
// strain direction (it was "cleared on a closer look" without a word; a user-style sweep of a
// ply damage law). A smooth routine on the same path has no such word.
#[test]
fn a_stress_jump_at_the_point_is_said() {
    use tancheck::core::path::Shape;
    let path = Path::ramp(Shape::Shear12, 2e-3, 3, 0);
    let mut m = Jumping(reference("elastic", PointKind::Solid3d).unwrap(), 1.0);
    let r = run_from_zero(&mut m, &[200000.0, 0.3], 20.0, &path, &Settings::default());
    assert_eq!(r.verdict, Verdict::Pass, "{}", summary(&r));
    let d =
        r.increments.iter().find_map(|i| i.diagnosis.as_ref()).expect("the central check straddled the jump");
    assert!(d.reason.contains("jumps across this point in strain direction 11"), "{}", d.reason);
    assert!(r.coverage.iter().any(|c| c.contains("the stress jumps across the point")), "{:?}", r.coverage);
    // The verdict line does not call the tangent the derivative of a stress that jumps (a
    // Mohr-Coulomb update that jumped near its apex read so beside the warning; a user-style
    // sweep).
    let verdict = |r: &tancheck::core::Report| {
        use tancheck::cli::report::Reporter;
        let mut text = Vec::new();
        tancheck::cli::report::terminal::Terminal::new(
            tancheck::cli::report::terminal::Detail::Normal,
            &mut text,
        )
        .check(r)
        .unwrap();
        String::from_utf8(text).unwrap().lines().find(|l| l.contains("verdict:")).unwrap_or("").to_string()
    };
    let v = verdict(&r);
    assert!(
        v.contains("PASS") && v.contains("the stress itself jumps") && !v.contains("is the derivative"),
        "{v}"
    );
    let mut m = Jumping(reference("elastic", PointKind::Solid3d).unwrap(), 0.0);
    let r = run_from_zero(&mut m, &[200000.0, 0.3], 20.0, &path, &Settings::default());
    assert_eq!(r.verdict, Verdict::Pass, "{}", summary(&r));
    assert!(r.coverage.iter().all(|c| !c.contains("jumps")), "{:?}", r.coverage);
    assert!(verdict(&r).contains("is the derivative of the stress update at every increment"));
}

// A first plastic increment twice the elastic range or more, from a virgin state, returning
// the elastic tangent is `elastic-tangent`: the elastic trial's step back from the start (half
// the increment) yielded the other way, so its "elastic" tangent was a plastic one and the
// increment read `initial-stiffness` (a user-style sweep). Tensor shear γ12/2 = 3e-3 against a
// shear yield strain of σy0/(√3 · 2μ) = 9.4e-4 for the worked properties (von Mises).
#[test]
fn a_large_first_plastic_increment_returning_the_elastic_tangent_is_named_so() {
    use tancheck::core::path::PathIncrement;
    let mut m = tancheck::models::zoo::zoo_model("j2-elastic-first-plastic", PointKind::Solid3d).unwrap();
    let path = Path {
        name: "one large shear increment".into(),
        increments: vec![PathIncrement::strain([0.0, 0.0, 0.0, 0.0, 0.0, 3e-3])],
    };
    let r = run(&mut m, &WORKED, &path, &Settings::default());
    let inc = r.increments.iter().find(|i| i.index == 1).expect("increment 1");
    assert!(!inc.passed());
    assert_eq!(inc.finding(), "elastic-tangent", "{:?}", inc.diagnosis.as_ref().map(|d| &d.causes));
}
