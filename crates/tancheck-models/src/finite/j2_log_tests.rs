//! The finite-strain J2 model: its tangent in every measure against num-dual (elastic and
//! plastic increments, from a rotated plastic start state), its stress against the
//! small-strain J2 model at small strain, and the exactness of its return on a radial path.

use num_dual::Dual64;
use tancheck_core::finite::mat3::{self, Mat3};
use tancheck_core::finite::{FiniteModel, StressMeasure, TangentMeasure};
use tancheck_core::{CallInput, CallOutput, Model, Outcome, PointKind, Scalar};

use super::tests::{call_at, dual_tangent_of, rel};
use super::J2Log;
use crate::j2::J2;

const PROPS: [f64; 4] = [200_000.0, 0.3, 250.0, 1000.0];

/// One call in scalar S: stress, state, tangent, branch.
fn call<S: Scalar>(m: &J2Log, f0: &Mat3<S>, f1: &Mat3<S>, st0: &[S]) -> ([S; 6], Vec<S>, Vec<S>, i32) {
    let (stress, state, tangent, outcome) =
        call_at(m, &PROPS.map(S::cst), f0, f1, &mat3::identity::<S>(), &[S::zero(); 6], st0);
    assert_eq!(outcome.status, 0);
    (stress, state, tangent, outcome.branch)
}

fn dual_tangent(model: &J2Log, m: TangentMeasure, f0: &Mat3<f64>, f1: &Mat3<f64>, st0: &[f64]) -> Vec<f64> {
    let st: Vec<Dual64> = st0.iter().map(|&x| Dual64::from_re(x)).collect();
    dual_tangent_of(m, f1, model.info().stress, |fd| call(model, &mat3::lift(f0), fd, &st).0)
}

/// A plastic start state: the model's own state after a rotated stretch-and-shear.
fn start() -> (Mat3<f64>, Vec<f64>) {
    let model = J2Log::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let u = [[1.04, 0.02, 0.0], [0.02, 0.98, 0.01], [0.0, 0.01, 0.99]];
    let f0 = mat3::mul(&mat3::axis_rotation([0.2, 1.0, -0.3], 0.5), &u);
    let (_, st, _, branch) = call(&model, &mat3::identity(), &f0, &[0.0; 7]);
    assert_eq!(branch, 1);
    (f0, st)
}

// Consistent tangent, every measure, both stress measures: the returned tangent (𝔻 : 𝕄,
// converted) equals the num-dual derivative of the update made with the measure's own
// perturbation, on a plastic increment (with a rotation in it) and on an elastic unloading.
#[test]
fn tangent_matches_num_dual_in_every_measure() {
    let (f0, st0) = start();
    let load = mat3::mul(&[[1.03, 0.015, 0.0], [0.0, 0.99, 0.01], [0.005, 0.0, 0.985]], &f0);
    let load = mat3::mul(&mat3::axis_rotation([0.0, 0.3, 1.0], 0.2), &load);
    // back 1 % of the way to the reference: along minus the flow direction, elastic
    let u = [[1.04, 0.02, 0.0], [0.02, 0.98, 0.01], [0.0, 0.01, 0.99]];
    let back = mat3::add(&mat3::identity(), &mat3::scale(&mat3::sub(&u, &mat3::identity()), 0.99));
    let unload = mat3::mul(&mat3::axis_rotation([0.2, 1.0, -0.3], 0.5), &back);
    for (f1, want_branch) in [(load, 1), (unload, 0)] {
        for sm in StressMeasure::ALL {
            for m in TangentMeasure::ALL {
                let model = J2Log::new(sm, m);
                let (_, _, t, branch) = call(&model, &f0, &f1, &st0);
                assert_eq!(branch, want_branch);
                let d = dual_tangent(&model, m, &f0, &f1, &st0);
                let n = m.size();
                let e = rel(&t[..n * n], &d);
                assert!(e < 1e-9, "{} {} branch {branch}: {e:e}", sm.name(), m.name());
            }
        }
    }
}

// Two equal principal stretches (uniaxial stretch from the reference state): the tangent
// still matches num-dual, the divided differences of ln taking their limit.
#[test]
fn tangent_matches_num_dual_with_equal_stretches() {
    let model = J2Log::new(StressMeasure::Cauchy, TangentMeasure::SigmaJaumann);
    let f1 = [[1.01, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
    let (_, _, t, branch) = call(&model, &mat3::identity(), &f1, &[0.0; 7]);
    assert_eq!(branch, 1);
    let d = dual_tangent(&model, TangentMeasure::SigmaJaumann, &mat3::identity(), &f1, &[0.0; 7]);
    assert!(rel(&t[..36], &d) < 1e-9, "{:e}", rel(&t[..36], &d));
}

// At small strain the Kirchhoff stress equals the small-strain J2 stress (crate::j2, radial
// return of Simo & Taylor 1985) for the strain ε = sym(F − I), to first order: the
// difference is O(|ε|²) relative, checked on an elastic-plastic path of ten increments.
#[test]
fn agrees_with_small_strain_j2_at_small_strain() {
    let finite = J2Log::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let small = J2::new(PointKind::Solid3d).unwrap();
    let sprops = [PROPS[0], PROPS[1], PROPS[2], PROPS[3], 0.0, 0.0, 0.0];
    let dir = [[1.0, 0.3, 0.0], [0.3, -0.4, 0.1], [0.0, 0.1, -0.2]];
    let scale = 3e-5; // strain per increment: yield (≈1.2e-3) is passed after about four
    let (mut fst, mut sst) = (vec![0.0; 7], vec![0.0; 13]);
    let mut f0 = mat3::identity::<f64>();
    let mut strain = [0.0; 6];
    let mut worst = 0.0_f64;
    let mut plastic = false;
    for k in 1..=10 {
        let f1 = mat3::add(&mat3::identity(), &mat3::scale(&dir, scale * 4.0 * k as f64));
        let (tau, st, _, branch) = call(&finite, &f0, &f1, &fst);
        plastic |= branch == 1;
        let eps = mat3::sub(&f1, &mat3::identity());
        // engineering shear for the small-strain model, order 11 22 33 23 13 12
        let e1 = mat3::to_sym6(&eps).map(|x| x);
        let de: Vec<f64> = (0..6).map(|s| (e1[s] - strain[s]) * if s < 3 { 1.0 } else { 2.0 }).collect();
        let e0: Vec<f64> = (0..6).map(|s| strain[s] * if s < 3 { 1.0 } else { 2.0 }).collect();
        let (mut sig, mut st2, mut tan, mut dsdt) =
            (vec![0.0; 6], vec![0.0; 13], vec![0.0; 36], vec![0.0; 6]);
        let (mut en, mut oc) = ([0.0; 2], Outcome::default());
        let input = CallInput {
            props: &sprops,
            strain: &e0,
            dstrain: &de,
            temp: [0.0; 2],
            stress0: &[0.0; 6],
            state0: &sst,
            time: [0.0, 1.0],
            increment: k,
            want_tangent: false,
        };
        let mut out = CallOutput {
            stress: &mut sig,
            state: &mut st2,
            tangent: &mut tan,
            dstress_dtemp: &mut dsdt,
            energy: &mut en,
            outcome: &mut oc,
        };
        small.evaluate(&input, &mut out).unwrap();
        let size = sig.iter().map(|x| x * x).sum::<f64>().sqrt();
        let d = tau.iter().zip(&sig).map(|(a, b)| (a - b) * (a - b)).sum::<f64>().sqrt();
        worst = worst.max(d / size);
        (fst, sst, f0, strain) = (st.to_vec(), st2, f1, e1);
    }
    assert!(plastic);
    // |ε| ≈ 1.3e-3 at the end: second-order terms of that size relative
    assert!(worst < 5e-3, "{worst:e}");
}

// Uniaxial stretch with the lateral directions held, F = diag(s, 1, 1): the logarithmic
// strain keeps its direction (a radial path), so the return is exact whatever the increment:
// one increment and fifty give the same stress, and both the closed form of the radial
// return in εᵉ = diag(ln s, 0, 0): qᵗʳ = 2G ln s, Δα = (qᵗʳ − σy0)/(3G + H),
// τ₁₁ = K ln s + (4/3) G ln s (1 − 3GΔα/qᵗʳ) (derived from the model's equations above).
#[test]
fn return_is_exact_on_a_radial_path() {
    let model = J2Log::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let s = 1.3;
    let diag = |x: f64| [[x, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];
    let (one, _, _, _) = call(&model, &mat3::identity(), &diag(s), &[0.0; 7]);
    let mut st = vec![0.0; 7];
    let mut many = [0.0; 6];
    for k in 1..=50 {
        let (a, b) = (1.0 + (s - 1.0) * (k - 1) as f64 / 50.0, 1.0 + (s - 1.0) * k as f64 / 50.0);
        let (t, st1, _, _) = call(&model, &diag(a), &diag(b), &st);
        st = st1;
        many = t;
    }
    let (e, nu, sy0, h) = (PROPS[0], PROPS[1], PROPS[2], PROPS[3]);
    let (k, g) = (e / (3.0 * (1.0 - 2.0 * nu)), e / (2.0 * (1.0 + nu)));
    let ls = s.ln();
    let qtr = 2.0 * g * ls;
    let da = (qtr - sy0) / (3.0 * g + h);
    let t11 = k * ls + 4.0 / 3.0 * g * ls * (1.0 - 3.0 * g * da / qtr);
    let t22 = k * ls - 2.0 / 3.0 * g * ls * (1.0 - 3.0 * g * da / qtr);
    assert!((one[0] - t11).abs() < 1e-10 * t11.abs(), "{} {t11}", one[0]);
    assert!((one[1] - t22).abs() < 1e-10 * t11.abs());
    for s in 0..6 {
        assert!((one[s] - many[s]).abs() < 1e-9 * t11.abs(), "{s}: {} {}", one[s], many[s]);
    }
    assert!((st[6] - da).abs() < 1e-12, "{} {da}", st[6]);
}

// The probes: the elastic log strain is a tensorial state that rotates with a superposed
// rotation, α and the energies do not change, and the shear stress in simple shear grows
// monotonically (no Jaumann-rate oscillation: the update is hyperelastic in εᵉ). Declaring
// the elastic strain a scalar state makes the superposed-rotation probe fail.
#[test]
fn probes_pass_with_the_tensorial_state() {
    use tancheck_core::finite::probe::{run_all, ProbeOptions};
    use tancheck_core::finite::FiniteModelRoutine;
    let path = super::zoo_path().build().unwrap();
    let props = super::J2_PROPERTIES;
    let mut r = FiniteModelRoutine(J2Log::new(StressMeasure::Cauchy, TangentMeasure::SigmaJaumann));
    let good = ProbeOptions { tensor_state: vec![0], ..Default::default() };
    let res = run_all(&mut r, &props, &[0.0; 7], &path, &good);
    assert!(res.iter().all(|p| p.passed), "{res:?}");
    let res = run_all(&mut r, &props, &[0.0; 7], &path, &ProbeOptions::default());
    let sup = res.iter().find(|p| p.name == "rotation-superposed").unwrap();
    assert!(!sup.passed, "{sup:?}");
}

// Every conversion between measures, each way, against num-dual alone: the num-dual tangent
// of measure a converted to measure b (`measure::convert`) equals the num-dual tangent of b,
// on a plastic increment of j2-log from a rotated plastic state (an objective response that
// is not hyperelastic, so nothing here leans on a closed form).
#[test]
fn every_conversion_matches_num_dual() {
    use tancheck_core::finite::measure::convert;
    let (f0, st0) = start();
    let f1 = mat3::mul(&[[1.03, 0.015, 0.0], [0.0, 0.99, 0.01], [0.005, 0.0, 0.985]], &f0);
    let model = J2Log::new(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let (tau, _, _, branch) = call(&model, &f0, &f1, &st0);
    assert_eq!(branch, 1);
    let dual: Vec<Vec<f64>> =
        TangentMeasure::ALL.iter().map(|&m| dual_tangent(&model, m, &f0, &f1, &st0)).collect();
    for (a, ta) in TangentMeasure::ALL.iter().zip(&dual) {
        for (b, tb) in TangentMeasure::ALL.iter().zip(&dual) {
            let mut got = vec![0.0; b.size() * b.size()];
            convert(*a, *b, &f1, &tau, ta, &mut got);
            let e = rel(&got, tb);
            assert!(e < 1e-9, "{} → {}: {e:e}", a.name(), b.name());
        }
    }
}
