//! The finite-strain models against published closed forms, and every tangent measure and
//! conversion against num-dual (exact forward-mode derivatives, an independent derivative).

use num_dual::Dual64;
use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::finite::numeric::{map_back, perturbation, quantity};
use tancheck_core::finite::{FiniteInput, FiniteModel, FiniteOutput, Frame, StressMeasure, TangentMeasure};
use tancheck_core::{Outcome, Scalar};

use super::{HypoJaumann, NeoHookean};

const E: f64 = 1000.0;
const NU: f64 = 0.3;
/// σy0, H and the start α of the plastic models (invented for the tests).
const SY0: f64 = 50.0;
const H: f64 = 20.0;
const ALPHA0: f64 = 0.01;

/// Call a model at (F₀, F₁, τ₀) in scalar S; returns stress and tangent. Properties: E, ν
/// (and σy0, H for a plastic model); its state starts at α = [`ALPHA0`].
fn call<S: Scalar, M: FiniteModel>(m: &M, f0: &Mat3<S>, f1: &Mat3<S>, s0: &[S; 6]) -> ([S; 6], Vec<S>) {
    let props = [E, NU, SY0, H].map(S::cst);
    let state0 = vec![S::cst(ALPHA0); m.info().nstate];
    let rot = m.info().frame.increment(f0, f1);
    let (stress, _, tangent, _) = call_at(m, &props[..m.info().nproperties], f0, f1, &rot, s0, &state0);
    (stress, tangent)
}

/// One call of a finite model in scalar S from (F₀, τ₀, state) to F₁ with the rotation
/// increment `rot`: stress, state, tangent and outcome. The arrays of one call written once for
/// this module's tests and the finite J2 model's.
pub(super) fn call_at<S: Scalar, M: FiniteModel>(
    m: &M,
    props: &[S],
    f0: &Mat3<S>,
    f1: &Mat3<S>,
    rot: &Mat3<S>,
    s0: &[S; 6],
    state0: &[S],
) -> ([S; 6], Vec<S>, Vec<S>, Outcome) {
    let (f0v, f1v, rotv) = (mat3::to_flat(f0), mat3::to_flat(f1), mat3::to_flat(rot));
    let input = FiniteInput {
        properties: props,
        f0: &f0v,
        f1: &f1v,
        rotation: &rotv,
        temperature: [S::zero(); 2],
        stress0: s0,
        state0,
        time: [0.0, 1.0],
        increment: 1,
    };
    let (mut stress, mut state, mut tangent) =
        ([S::zero(); 6], vec![S::zero(); m.info().nstate], vec![S::zero(); 81]);
    let (mut energy, mut outcome) = ([S::zero(); 2], Outcome::default());
    let mut out = FiniteOutput {
        stress: &mut stress,
        state: &mut state,
        tangent: &mut tangent,
        energy: &mut energy,
        outcome: &mut outcome,
    };
    m.evaluate(&input, &mut out).unwrap();
    (stress, state, tangent, outcome)
}

/// The tangent in measure `m` by num-dual: one dual direction per column, the measure's
/// perturbation and quantity (`numeric`), mapped back.
fn dual_tangent<M: FiniteModel>(
    model: &M,
    m: TangentMeasure,
    f0: &Mat3<f64>,
    f1: &Mat3<f64>,
    s0: &[f64; 6],
) -> Vec<f64> {
    dual_tangent_of(m, f1, model.info().stress, |fd| {
        call(model, &mat3::lift(f0), fd, &s0.map(Dual64::from_re)).0
    })
}

/// The tangent in measure `m` of a stress (in measure `sm`) as a function of F₁, by num-dual:
/// one dual direction per column. The column loop written once for this module's tests and
/// the finite J2 model's.
pub(super) fn dual_tangent_of(
    m: TangentMeasure,
    f1: &Mat3<f64>,
    sm: StressMeasure,
    stress: impl Fn(&Mat3<Dual64>) -> [Dual64; 6],
) -> Vec<f64> {
    let n = m.size();
    let mut out = vec![0.0; n * n];
    for b in 0..n {
        let dir = perturbation(m, f1, b);
        let mut fd = mat3::lift::<Dual64>(f1);
        for i in 0..3 {
            for j in 0..3 {
                fd[i][j].eps = dir[i][j];
            }
        }
        let q = quantity(m, &fd, &sm.to_kirchhoff(&stress(&fd), mat3::det(&fd)));
        let col = map_back(m, f1, &q.map(|x| x.eps));
        out[n * b..n * b + n].copy_from_slice(&col[..n]);
    }
    out
}

/// Relative error |a − b| / |b| (both test modules').
pub(super) fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    d / n
}

/// A general deformation gradient: stretch, shear and a rotation, det ≠ 1.
fn general_f() -> Mat3<f64> {
    let u = [[1.25, 0.12, -0.05], [0.12, 0.85, 0.07], [-0.05, 0.07, 1.1]];
    mat3::mul(&mat3::axis_rotation([0.3, -1.0, 0.6], 0.7), &u)
}

// Every measure: the closed-form tangent converted by `measure::convert` equals the num-dual
// derivative made with that measure's own perturbation — the conversions and the
// perturbations agree with each other and with an independent derivative.
#[test]
fn neo_hookean_every_measure_matches_num_dual() {
    let f = general_f();
    for sm in StressMeasure::ALL {
        for m in TangentMeasure::ALL {
            let model = NeoHookean::new(sm, m);
            let (_, t) = call(&model, &mat3::identity(), &f, &[0.0; 6]);
            let d = dual_tangent(&model, m, &mat3::identity(), &f, &[0.0; 6]);
            let n = m.size();
            let e = rel(&t[..n * n], &d);
            assert!(e < 1e-12, "{} {}: {e:e}", sm.name(), m.name());
        }
    }
}

// Conversions round trip: measure a → b → a gives back a (objective response).
#[test]
fn conversions_round_trip() {
    use tancheck_core::finite::measure::convert;
    let f = general_f();
    let (lambda, mu) = (E * NU / ((1.0 + NU) * (1.0 - 2.0 * NU)), E / (2.0 * (1.0 + NU)));
    let tau = NeoHookean::kirchhoff(mu, lambda, &f);
    let ct = NeoHookean::truesdell(mu, lambda, mat3::det(&f));
    for a in TangentMeasure::ALL {
        let mut ta = vec![0.0; 81];
        convert(TangentMeasure::TauTruesdell, a, &f, &tau, &ct, &mut ta);
        for b in TangentMeasure::ALL {
            let mut tb = vec![0.0; 81];
            convert(a, b, &f, &tau, &ta, &mut tb);
            let mut back = vec![0.0; 81];
            convert(b, a, &f, &tau, &tb, &mut back);
            let n = a.size();
            assert!(rel(&back[..n * n], &ta[..n * n]) < 1e-12, "{} → {}", a.name(), b.name());
        }
    }
}

// The Jaumann–Truesdell difference is ½(δ_ik τ_jl + τ_ik δ_jl + δ_il τ_jk + τ_il δ_jk)
// (REFERENCES.md, finite strain; from memory, confirmed here against num-dual: the test above
// checks both measures against num-dual, this one the component formula).
#[test]
fn jaumann_minus_truesdell_is_the_stress_term() {
    let f = general_f();
    let kh = NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let kt = NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauTruesdell);
    let (tau, tj) = call(&kh, &mat3::identity(), &f, &[0.0; 6]);
    let (_, tt) = call(&kt, &mat3::identity(), &f, &[0.0; 6]);
    let t = mat3::from_sym6(&tau);
    let dl = |a: usize, b: usize| if a == b { 1.0 } else { 0.0 };
    for (r, &(i, j)) in mat3::SYM_PAIRS.iter().enumerate() {
        for (c, &(k, l)) in mat3::SYM_PAIRS.iter().enumerate() {
            let want =
                0.5 * (dl(i, k) * t[j][l] + t[i][k] * dl(j, l) + dl(i, l) * t[j][k] + t[i][l] * dl(j, k));
            let got = tj[r + 6 * c] - tt[r + 6 * c];
            assert!((got - want).abs() < 1e-9 * E, "({r},{c}): {got} vs {want}");
        }
    }
}

// Uniaxial stretch with the lateral directions held, F = diag(s, 1, 1): J = s,
// σ₁₁ = (μ/J)(s² − 1) + (λ/J) ln s, σ₂₂ = σ₃₃ = (λ/J) ln s (derived by substitution from the
// Cauchy stress σ = (μ/J)(b − I) + (λ/J) ln J I of Bonet & Wood 2008, ch. 5; from memory).
#[test]
fn neo_hookean_uniaxial_stretch_closed_form() {
    let model = NeoHookean::new(StressMeasure::Cauchy, TangentMeasure::SigmaJaumann);
    let (lambda, mu) = (E * NU / ((1.0 + NU) * (1.0 - 2.0 * NU)), E / (2.0 * (1.0 + NU)));
    for s in [0.6, 1.0 + 1e-3, 1.5, 2.5] {
        let f = [[s, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
        let (sig, _) = call(&model, &mat3::identity(), &f, &[0.0; 6]);
        let s11 = mu / s * (s * s - 1.0) + lambda / s * s.ln();
        let s22 = lambda / s * s.ln();
        assert!((sig[0] - s11).abs() < 1e-12 * E, "{s}");
        assert!((sig[1] - s22).abs() < 1e-12 * E && (sig[2] - s22).abs() < 1e-12 * E);
        assert!(sig[3..].iter().all(|x| x.abs() < 1e-12 * E));
    }
}

// Simple shear F = I + γ e₁⊗e₂: J = 1, σ₁₂ = μγ, σ₁₁ = μγ², σ₂₂ = σ₃₃ = 0 — the classical
// neo-Hookean simple-shear response (Rivlin 1948; Ogden, Non-linear Elastic Deformations,
// 1984, §5.2; from memory), no oscillation at any γ.
#[test]
fn neo_hookean_simple_shear_closed_form() {
    let model = NeoHookean::new(StressMeasure::Cauchy, TangentMeasure::SigmaJaumann);
    let mu = E / (2.0 * (1.0 + NU));
    for g in [0.1, 1.0, 3.0, 10.0] {
        let f = [[1.0, g, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
        let (sig, _) = call(&model, &mat3::identity(), &f, &[0.0; 6]);
        assert!((sig[5] - mu * g).abs() < 1e-12 * E * g, "{g}");
        assert!((sig[0] - mu * g * g).abs() < 1e-12 * E * g * g);
        assert!(sig[1].abs() < 1e-10 * E && sig[2].abs() < 1e-10 * E);
    }
}

// The hypoelastic Jaumann update's own tangent against num-dual, away from the reference
// configuration and with a start stress.
#[test]
fn hypo_tangent_matches_num_dual() {
    let model = HypoJaumann::new();
    assert_eq!(model.info().frame, Frame::Jaumann);
    let f0 = general_f();
    let f1 = mat3::add(&f0, &[[0.02, 0.05, -0.01], [0.03, -0.015, 0.02], [-0.02, 0.01, 0.01]]);
    let s0 = [120.0, -40.0, 15.0, 30.0, -25.0, 60.0];
    let (_, t) = call(&model, &f0, &f1, &s0);
    let d = dual_tangent(&model, TangentMeasure::TauJaumann, &f0, &f1, &s0);
    assert!(rel(&t[..36], &d) < 1e-12, "{:e}", rel(&t[..36], &d));
}

// The hypoelastic J2 update (radial return on the objective trial stress) against num-dual
// on a plastic step, and on a step that stays elastic (where it equals the elastic update).
#[test]
fn hypo_j2_tangent_matches_num_dual() {
    let model = HypoJaumann::j2();
    let f0 = general_f();
    let f1 = mat3::add(&f0, &[[0.02, 0.05, -0.01], [0.03, -0.015, 0.02], [-0.02, 0.01, 0.01]]);
    let s0 = [120.0, -40.0, 15.0, 30.0, -25.0, 60.0];
    let (s, t) = call(&model, &f0, &f1, &s0);
    let (s_el, _) = call(&HypoJaumann::new(), &f0, &f1, &s0);
    assert!(rel(&s, &s_el) > 1e-2, "the step must be plastic: {s:?} vs {s_el:?}");
    let d = dual_tangent(&model, TangentMeasure::TauJaumann, &f0, &f1, &s0);
    assert!(rel(&t[..36], &d) < 1e-12, "{:e}", rel(&t[..36], &d));
    let small = mat3::add(&f0, &[[1e-4, 0.0, 0.0], [0.0, 0.0, 0.0], [0.0, 0.0, 0.0]]);
    let (s, t) = call(&model, &f0, &small, &[1.0, 0.0, 0.0, 0.0, 0.0, 0.0]);
    let (s_el, t_el) = call(&HypoJaumann::new(), &f0, &small, &[1.0, 0.0, 0.0, 0.0, 0.0, 0.0]);
    assert_eq!((s, &t[..36]), (s_el, &t_el[..36]), "an elastic step is the elastic update");
}

// Simple shear of the hypoelastic Jaumann model: σ₁₂ = G sin γ, σ₁₁ = −σ₂₂ = G (1 − cos γ)
// (Dienes 1979, Acta Mechanica 32:217–232; Nagtegaal & de Jong 1982, IJNME 17:15–41; from
// memory, and rederived from σ̊ = ℂ : d in simple shear). The update adds the elastic part
// after the rotation, so it converges at first order in the increment Δγ: the error stays
// below 1.5 Δγ G over a full period, and halves with Δγ.
#[test]
fn hypo_simple_shear_oscillates_as_dienes() {
    let g = E / (2.0 * (1.0 + NU));
    let gmax = 2.0 * std::f64::consts::PI;
    let coarse = shear_error(2000, gmax) / g;
    let fine = shear_error(4000, gmax) / g;
    assert!(fine < 1.5 * gmax / 4000.0, "{fine:e}");
    assert!((coarse / fine - 2.0).abs() < 0.1, "{coarse:e} {fine:e}");
}

fn shear_error(n: usize, gmax: f64) -> f64 {
    let model = HypoJaumann::new();
    let g = E / (2.0 * (1.0 + NU));

    let mut s = [0.0; 6];
    let mut f0 = mat3::identity::<f64>();
    let mut worst = 0.0_f64;
    for k in 1..=n {
        let gam = gmax * k as f64 / n as f64;
        let f1 = [[1.0, gam, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
        let (s1, _) = call(&model, &f0, &f1, &s);
        s = s1;
        f0 = f1;
        worst = worst.max((s[5] - g * gam.sin()).abs()).max((s[0] - g * (1.0 - gam.cos())).abs());
        worst = worst.max((s[1] + g * (1.0 - gam.cos())).abs());
    }
    worst
}

// Every row of the finite-strain zoo reaches its verdict and finding through the check
// (complex step with the Rust twin as the reference).
#[test]
fn finite_zoo_rows_reach_their_findings() {
    use super::{finite_zoo, zoo_path};
    use tancheck_core::finite::check::run;
    use tancheck_core::finite::FiniteSettings;
    use tancheck_core::Verdict;
    let path = zoo_path().build().unwrap();
    for row in finite_zoo() {
        let (props, state) = (row.model.properties(), row.model.start_state());
        let mut r = row.model.routine();
        let rep = run(r.as_mut(), props, &state, &path, FiniteSettings::default());
        let worst = rep.increments.iter().map(|i| i.error_complex.unwrap()).fold(0.0, f64::max);
        match row.expected {
            None => assert_eq!(rep.verdict, Verdict::Pass, "{}: {worst:e}", row.name),
            Some(f) => {
                assert_eq!(rep.verdict, Verdict::TangentFailure, "{}", row.name);
                assert_eq!(rep.finding.as_deref(), Some(f), "{}: {:?}", row.name, rep.increments[0].cause);
            }
        }
        // the central differences agree with the complex step on the correct rows
        if row.expected.is_none() {
            let c = rep.increments.iter().map(|i| i.error_central).fold(0.0, f64::max);
            assert!(c < 1e-7, "{}: central {c:e}", row.name);
        }
    }
}

// The probes: the neo-Hookean routine is objective and its simple-shear stress monotonic
// (σ₁₂ = μγ); the hypoelastic Jaumann routine is objective and oscillates as Dienes (1979)
// found; the one that never applies the rotation increment fails the rigid-increment and
// stretch-rotate probes but not the superposed one (it is objective when the whole motion is
// rotated, which is why both probes exist).
#[test]
fn probes_tell_objective_from_not() {
    use tancheck_core::finite::probe::{run_all, ProbeOptions, ShearResponse};
    use tancheck_core::finite::FiniteModelRoutine;
    let path = super::zoo_path().build().unwrap();
    let props = super::ZOO_PROPERTIES;
    let verdicts = |r: &mut dyn tancheck_core::finite::FiniteRoutine, o: &ProbeOptions| {
        run_all(r, &props, &[], &path, o)
            .into_iter()
            .map(|p| (p.name, p.passed, p.summary))
            .collect::<Vec<_>>()
    };
    let nh = verdicts(
        &mut FiniteModelRoutine(NeoHookean::new(StressMeasure::Cauchy, TangentMeasure::SigmaJaumann)),
        &ProbeOptions::default(),
    );
    assert!(nh.iter().all(|p| p.1), "{nh:?}");
    let osc = ProbeOptions { shear_response: ShearResponse::Oscillating, ..Default::default() };
    let hy = verdicts(&mut FiniteModelRoutine(HypoJaumann::new()), &osc);
    assert!(hy.iter().all(|p| p.1), "{hy:?}");
    let hy_default = verdicts(&mut FiniteModelRoutine(HypoJaumann::new()), &ProbeOptions::default());
    assert!(!hy_default[3].1 && hy_default[3].2.contains("oscillates"), "{hy_default:?}");
    let bad = verdicts(&mut FiniteModelRoutine(HypoJaumann::without_rotation()), &osc);
    let by = |n: &str| bad.iter().find(|p| p.0 == n).unwrap().1;
    assert!(by("rotation-superposed"), "{bad:?}");
    assert!(!by("rotation-increment") && !by("stretch-rotate"), "{bad:?}");
}

// An update that turns the start stress the wrong way round (the transposed rotation increment,
// ΔRᵀ τ ΔR) has the shear stress of simple shear right, σ₁₂ = G sin γ, and σ₁₁ of the wrong
// sign: the simple-shear probe compares both with Dienes (1979), σ₁₁ = G(1 − cos γ) (it passed
// such a routine on σ₁₂ alone; a user-style sweep).
#[test]
fn simple_shear_catches_a_stress_turned_the_wrong_way() {
    use num_complex::Complex64;
    use tancheck_core::finite::probe::{run_all, ProbeOptions, ShearResponse};
    use tancheck_core::finite::{FiniteInfo, FiniteModelRoutine, FiniteRoutine};
    use tancheck_core::Fault;
    struct Backwards(FiniteModelRoutine<HypoJaumann>);
    fn transposed<S: Copy>(r: &[S; 9]) -> [S; 9] {
        std::array::from_fn(|k| r[3 * (k % 3) + k / 3])
    }
    impl FiniteRoutine for Backwards {
        fn info(&self) -> &FiniteInfo {
            self.0.info()
        }
        fn call(&mut self, i: &FiniteInput<'_, f64>, o: &mut FiniteOutput<'_, f64>) -> Result<(), Fault> {
            let q = transposed(i.rotation);
            self.0.call(&FiniteInput { rotation: &q, ..*i }, o)
        }
        fn has_complex(&self) -> bool {
            true
        }
        fn call_complex(
            &mut self,
            i: &FiniteInput<'_, Complex64>,
            o: &mut FiniteOutput<'_, Complex64>,
        ) -> Result<(), Fault> {
            let q = transposed(i.rotation);
            self.0.call_complex(&FiniteInput { rotation: &q, ..*i }, o)
        }
    }
    let path = super::zoo_path().build().unwrap();
    let osc = ProbeOptions { shear_response: ShearResponse::Oscillating, ..Default::default() };
    let shear = |r: &mut dyn FiniteRoutine| {
        run_all(r, &super::ZOO_PROPERTIES, &[], &path, &osc)
            .into_iter()
            .find(|p| p.name == "simple-shear")
            .unwrap()
    };
    let right = shear(&mut FiniteModelRoutine(HypoJaumann::new()));
    assert!(right.passed, "{right:?}");
    let wrong = shear(&mut Backwards(FiniteModelRoutine(HypoJaumann::new())));
    assert!(!wrong.passed && wrong.summary.contains("not as a hypoelastic Jaumann update"), "{wrong:?}");
}

// A twin that is not complex-step safe (here it halves the derivative part of its stress,
// as a twin that drops an imaginary part in one term would) is set aside: the check judges
// with central differences, passes the tangent, and says the twin is not safe (exit 4).
#[test]
fn a_broken_twin_is_set_aside() {
    use num_complex::Complex64;
    use tancheck_core::finite::check::run;
    use tancheck_core::finite::{FiniteInfo, FiniteModelRoutine, FiniteRoutine, FiniteSettings};
    use tancheck_core::{Fault, Verdict};
    struct Broken(FiniteModelRoutine<NeoHookean>);
    impl FiniteRoutine for Broken {
        fn info(&self) -> &FiniteInfo {
            self.0.info()
        }
        fn call(&mut self, i: &FiniteInput<'_, f64>, o: &mut FiniteOutput<'_, f64>) -> Result<(), Fault> {
            self.0.call(i, o)
        }
        fn has_complex(&self) -> bool {
            true
        }
        fn call_complex(
            &mut self,
            i: &FiniteInput<'_, Complex64>,
            o: &mut FiniteOutput<'_, Complex64>,
        ) -> Result<(), Fault> {
            self.0.call_complex(i, o)?;
            o.stress.iter_mut().for_each(|z| z.im *= 0.5);
            Ok(())
        }
    }
    let path = super::zoo_path().build().unwrap();
    let mut r =
        Broken(FiniteModelRoutine(NeoHookean::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann)));
    let rep = run(&mut r, &super::ZOO_PROPERTIES, &[], &path, FiniteSettings::default());
    assert_eq!(rep.verdict, Verdict::TwinNotSafe, "{rep:?}");
    assert_eq!(rep.twin_not_safe, Some(1));
    assert!(rep.increments.iter().all(|i| i.passed));
}
