//! The thermo-elastic reference model (`thermo`, and the flawed `thermo-dtemp-sign`) against
//! EN 1993-1-2 values (REFERENCES.md, "Thermo-elasticity and elastic constants"), closed forms
//! of isotropic thermo-elasticity, and num-dual / complex-step derivatives of its own update.

use num_complex::Complex64;
use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::driver::Outputs;
use tancheck_core::routine::{provides, status};
use tancheck_core::{Convention, Model, PointKind, Scalar};
use tancheck_models::thermo::{en1993_modulus_factor, en1993_thermal_elongation};
use tancheck_models::{AnyModel, Thermo, ThermoFlaw};
use tancheck_testkit::call::{
    dual_dtemp, dual_tangent, model_allocations, model_call, model_complex_dtemp, model_complex_tangent, Call,
};
use tancheck_testkit::tangent::{matrix_error, rel_or_exact};

// ---------------------------------------------------------------------------------------
// A counting allocator: one call of the model must not allocate (DEVELOPERS.md, hot path).

mod common;

// ---------------------------------------------------------------------------------------
// One call with owned arrays, in any scalar type.

/// The real inputs of one call.
#[derive(Clone, Debug)]
struct Point {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    temp: [f64; 2],
}

impl Point {
    /// The call (stress0 zero: the total-form model does not read it).
    fn call(&self) -> Call {
        Call::new(&self.props, self.strain.len(), 0)
            .strain(&self.strain)
            .dstrain(&self.dstrain)
            .temp(self.temp[0], self.temp[1])
    }
}

fn run<M: Model>(m: &M, p: &Point) -> Outputs<f64> {
    model_call(m, &p.call(), &p.dstrain, p.temp).expect("sizes match")
}

/// ∂σ/∂Δε (column-major) and ∂σ/∂ΔT by num-dual: one call per direction with the unit dual
/// part on Δεⱼ or on ΔT.
fn dual_derivatives<M: Model>(m: &M, p: &Point) -> (Vec<f64>, Vec<f64>) {
    let c = p.call();
    (dual_tangent(m, &c).0, dual_dtemp(m, &c))
}

/// The same derivatives by the complex step Im σ(x + ih)/h (Squire & Trapp 1998).
fn complex_derivatives<M: Model>(m: &M, p: &Point, h: f64) -> (Vec<f64>, Vec<f64>) {
    let c = p.call();
    (model_complex_tangent(m, &c, h), model_complex_dtemp(m, &c, h))
}

fn norm(v: impl Iterator<Item = f64>) -> f64 {
    v.map(|x| x * x).sum::<f64>().sqrt()
}

/// Relative error of a tangent against a reference in Mandel form (the fourth-order tensor's
/// Frobenius norm): whole matrix and worst column. A zero reference demands an exact zero.
fn tangent_error(conv: &Convention, got: &[f64], reference: &[f64]) -> f64 {
    let (mut a, mut b) = (got.to_vec(), reference.to_vec());
    conv.tangent_to_mandel(&mut a);
    conv.tangent_to_mandel(&mut b);
    matrix_error(conv.ncomp(), &a, &b)
}

/// Relative error of a stress-like vector (Mandel form). A zero reference demands a zero.
fn vector_error(conv: &Convention, got: &[f64], reference: &[f64]) -> f64 {
    let (mut a, mut b) = (vec![0.0; got.len()], vec![0.0; got.len()]);
    conv.stress_to_mandel(got, &mut a);
    conv.stress_to_mandel(reference, &mut b);
    rel_or_exact(&a, &b)
}

// ---------------------------------------------------------------------------------------
// Reference values.

/// EN 1993-1-2:2005 Table 3.1, carbon steel, k_E,θ (REFERENCES.md: read, secondary copy),
/// typed here again, independently of the model's own table.
const TABLE_3_1: [(f64, f64); 13] = [
    (20.0, 1.00),
    (100.0, 1.00),
    (200.0, 0.90),
    (300.0, 0.80),
    (400.0, 0.70),
    (500.0, 0.60),
    (600.0, 0.31),
    (700.0, 0.13),
    (800.0, 0.09),
    (900.0, 0.0675),
    (1000.0, 0.045),
    (1100.0, 0.0225),
    (1200.0, 0.0),
];

/// Structural steel E = 210 GPa, ν = 0.3, α = 12e-6/K (EN 1993-1-1 §3.2.6; REFERENCES.md:
/// memory/secondary).
const E_STEEL: f64 = 210_000.0;
const NU_STEEL: f64 = 0.3;
const ALPHA_STEEL: f64 = 12e-6;

/// Properties: E20, ν0, ν1, modulus law, expansion law, α.
fn steel(modulus_law: f64, expansion_law: f64) -> Vec<f64> {
    vec![E_STEEL, NU_STEEL, 0.0, modulus_law, expansion_law, ALPHA_STEEL]
}

/// A uniaxial call at temperature `t` (as temp[0], no increment) and total strain `eps`.
fn uniaxial(props: &[f64], eps: f64, t: f64) -> Outputs<f64> {
    let m = Thermo::new(PointKind::Uniaxial).unwrap();
    run(&m, &Point { props: props.to_vec(), strain: vec![eps], dstrain: vec![0.0], temp: [t, 0.0] })
}

// EN 1993-1-2 Table 3.1 (read, secondary copy; linear interpolation between rows): the
// uniaxial modulus E20 k_E,θ at each row and half way between rows, through the model and
// through its public k_E function.
#[test]
fn modulus_follows_en1993_table_3_1() {
    let props = steel(1.0, 0.0);
    let mut checked = 0;
    for w in TABLE_3_1.windows(2) {
        let ((ta, ka), (tb, kb)) = (w[0], w[1]);
        for (t, k) in [(ta, ka), (0.5 * (ta + tb), 0.5 * (ka + kb)), (tb, kb)] {
            let out = uniaxial(&props, 0.0, t);
            assert!(
                (out.tangent[0] - E_STEEL * k).abs() <= 1e-9,
                "E at {t} °C: {} vs {}",
                out.tangent[0],
                E_STEEL * k
            );
            let (kf, _) = en1993_modulus_factor(t);
            assert!((kf - k).abs() <= 1e-15, "k_E({t}) = {kf}, table {k}");
            checked += 1;
        }
    }
    assert_eq!(checked, 36);
    // Outside the table the end values hold (the model's documented extension).
    assert_eq!(en1993_modulus_factor(-30.0).0, 1.0);
    assert_eq!(en1993_modulus_factor(1300.0).0, 0.0);
}

// EN 1993-1-2 §3.4.1.1 thermal elongation of carbon steel (REFERENCES.md, derived from the
// published formula): 0 at 20 °C, 9.984e-4 at 100, 5.1984e-3 at 400, 8.3984e-3 at 600,
// 1.38e-2 at 1000. Through the model: a free uniaxial bar at that strain carries no stress,
// and a fully restrained one carries −E(T) Δl/l.
#[test]
fn thermal_strain_follows_en1993_elongation() {
    let props = steel(1.0, 1.0);
    for (t, dl) in [(20.0, 0.0), (100.0, 9.984e-4), (400.0, 5.1984e-3), (600.0, 8.3984e-3), (1000.0, 1.38e-2)]
    {
        let (eps, _) = en1993_thermal_elongation(t);
        assert!((eps - dl).abs() <= 1e-15, "Δl/l({t}) = {eps:e}, derived {dl:e}");
        let free = uniaxial(&props, dl, t);
        assert!(free.stress[0].abs() <= 1e-9, "free bar at {t} °C: σ = {}", free.stress[0]);
        let held = uniaxial(&props, 0.0, t);
        let k = TABLE_3_1.iter().find(|r| r.0 == t).map(|r| r.1).unwrap();
        assert!(
            (held.stress[0] + E_STEEL * k * dl).abs() <= 1e-9,
            "restrained bar at {t} °C: {}",
            held.stress[0]
        );
    }
}

// The EN 1993-1-2 elongation drops by 8.4e-6 at 750 °C (REFERENCES.md, derived: the first
// range gives 1.10084e-2 there, the second 1.1e-2) and is continuous at 860 °C (both ranges
// give 1.1e-2). The model takes 750 °C in the second range (as EN 1993-1-2 does).
#[test]
fn elongation_jumps_at_750_and_not_at_860() {
    let below = f64::from_bits(750f64.to_bits() - 1);
    let jump = en1993_thermal_elongation(below).0 - en1993_thermal_elongation(750.0).0;
    assert!((jump - 8.4e-6).abs() <= 1e-12, "jump at 750 °C: {jump:e}");
    let below860 = f64::from_bits(860f64.to_bits() - 1);
    let step = en1993_thermal_elongation(below860).0 - en1993_thermal_elongation(860.0).0;
    assert!(step.abs() <= 1e-12, "step at 860 °C: {step:e}");
    assert_eq!(en1993_thermal_elongation(750.0).0, 1.1e-2);
    // The restrained bar's stress shows the same jump, scaled by E(750 °C) = 0.11 E20
    // (half way between the 700 and 800 rows of Table 3.1).
    let props = steel(1.0, 1.0);
    let ds = uniaxial(&props, 0.0, below).stress[0] - uniaxial(&props, 0.0, 750.0).stress[0];
    assert!((ds + E_STEEL * 0.11 * 8.4e-6).abs() <= 1e-9, "stress jump {ds}");
}

// Closed forms derived from σ = C:(ε − ε_th 1) and ∂σ/∂T = C'(ε − ε_th 1) − C:ε_th' 1
// (REFERENCES.md, "Thermo-elasticity") with K = E/(3(1−2ν)) ("Relations"): free expansion
// ε = ε_th 1 carries no stress in every kind; a fully restrained 3D point carries
// σ = −3K ε_th = −E ε_th/(1−2ν) on the diagonal, a restrained plane-stress sheet −E ε_th/(1−ν)
// (the plane-stress matrix of the elastic model), a restrained bar −E ε_th; with constant E, ν
// and α, ∂σ/∂T is the same factor times −α; the stored energy is ½ σ·(ε − ε_th 1).
#[test]
fn restrained_and_free_expansion_follow_the_closed_forms() {
    let props = steel(0.0, 0.0);
    let (t0, dt) = (20.0, 300.0);
    let eps_th = ALPHA_STEEL * dt;
    for kind in Thermo::KINDS {
        let m = Thermo::new(kind).unwrap();
        let n = kind.ncomp();
        let normal = match kind {
            PointKind::PlaneStress => 2,
            PointKind::Uniaxial => 1,
            _ => 3,
        };
        let factor = match kind {
            PointKind::PlaneStress => E_STEEL / (1.0 - NU_STEEL),
            PointKind::Uniaxial => E_STEEL,
            _ => E_STEEL / (1.0 - 2.0 * NU_STEEL),
        };
        let mut free = vec![0.0; n];
        free[..normal].fill(eps_th);
        let p = Point { props: props.clone(), strain: vec![0.0; n], dstrain: free, temp: [t0, dt] };
        let out = run(&m, &p);
        assert!(out.stress.iter().all(|s| s.abs() <= 1e-9), "{kind}: free expansion {:?}", out.stress);
        assert!(out.energy[0].abs() <= 1e-15);
        let p = Point { props: props.clone(), strain: vec![0.0; n], dstrain: vec![0.0; n], temp: [t0, dt] };
        let out = run(&m, &p);
        for i in 0..n {
            let want = if i < normal { -factor * eps_th } else { 0.0 };
            assert!(
                (out.stress[i] - want).abs() <= 1e-9 * factor * eps_th,
                "{kind} σ[{i}] = {}",
                out.stress[i]
            );
            let want_dt = if i < normal { -factor * ALPHA_STEEL } else { 0.0 };
            assert!(
                (out.dstress_dtemp[i] - want_dt).abs() <= 1e-12 * factor * ALPHA_STEEL,
                "{kind} ∂σ[{i}]/∂T"
            );
        }
        let stored = 0.5 * normal as f64 * factor * eps_th * eps_th;
        assert!((out.energy[0] - stored).abs() <= 1e-12 * stored, "{kind}: stored {}", out.energy[0]);
        assert_eq!(out.energy[1], 0.0);
        assert_eq!(out.outcome.branch, 0);
        assert!(out.outcome.provides(provides::DSTRESS_DTEMP) && out.outcome.provides(provides::ENERGY));
    }
}

// At a table point or range boundary the returned ∂σ/∂T is the right-hand derivative (the
// model's documented choice): a one-sided forward difference of the model's own stress
// (definition of the right derivative) agrees to the difference's truncation; the backward
// difference sees the other slope. The kinks of Table 3.1 are the rows where the slope of
// k_E changes (100, 500, 600, 700, 800, 1200 °C; between 100 and 500 °C and from 800 to
// 1100 °C the rows lie on straight lines), plus the elongation's 860 °C; 750 °C is a jump.
#[test]
fn kinks_return_the_right_hand_derivative() {
    let m = Thermo::new(PointKind::Solid3d).unwrap();
    let mut props = steel(1.0, 1.0);
    props[2] = 4e-5; // ν(T) varies too
    let strain = vec![2e-3, -1e-3, 5e-4, 1e-3, -2e-3, 3e-3];
    let h = 1e-4;
    let mut kinks = 0;
    for t in [100.0, 500.0, 600.0, 700.0, 750.0, 800.0, 860.0, 1200.0] {
        let p = |dt: f64| Point {
            props: props.clone(),
            strain: strain.clone(),
            dstrain: vec![0.0; 6],
            temp: [t, dt],
        };
        let base = run(&m, &p(0.0));
        let fwd = run(&m, &p(h));
        let bwd = run(&m, &p(-h));
        let conv = &m.info().convention;
        let forward: Vec<f64> = fwd.stress.iter().zip(&base.stress).map(|(a, b)| (a - b) / h).collect();
        let backward: Vec<f64> = base.stress.iter().zip(&bwd.stress).map(|(a, b)| (a - b) / h).collect();
        let e_fwd = vector_error(conv, &base.dstress_dtemp, &forward);
        assert!(e_fwd <= 1e-6, "{t} °C: returned ∂σ/∂T vs forward difference {e_fwd:.3e}");
        if t != 750.0 {
            // (at 750 °C the backward difference straddles the 8.4e-6 jump: no derivative)
            let e_bwd = vector_error(conv, &base.dstress_dtemp, &backward);
            assert!(e_bwd > 1e-3, "{t} °C: the two sides should differ ({e_bwd:.3e})");
            kinks += 1;
        }
    }
    assert_eq!(kinks, 7);
}

// ---------------------------------------------------------------------------------------
// Random states against num-dual and the complex step.

/// Per kind: random states.
const STATES: usize = 1200;
/// Analytic tangent and ∂σ/∂T against num-dual, relative (Mandel form).
const DUAL_TOL: f64 = 1e-12;
/// Complex step (h = 1e-30) against num-dual.
const COMPLEX_TOL: f64 = 1e-12;
/// Minimum distance (°C) of the end temperature from any table point or range boundary.
const KINK_GAP: f64 = 1e-3;

/// Bins of the end temperature for the EN laws: below 20 °C, the twelve rows of Table 3.1,
/// above 1200 °C.
fn en_bin(t: f64) -> usize {
    TABLE_3_1.iter().take_while(|r| r.0 <= t).count()
}

/// A random call: modulus law, expansion law, a user table when the modulus law is 2, ν
/// varying with T, and a start temperature and increment that put the end temperature anywhere
/// in −50..1350 °C, away from the kinks of the laws in use.
fn random_point(rng: &mut StdRng, n: usize) -> (Point, usize) {
    loop {
        let modulus_law = [0.0, 1.0, 1.0, 2.0][rng.gen_range(0..4)];
        let expansion_law = if rng.gen_bool(0.6) { 1.0 } else { 0.0 };
        let mut props = vec![
            rng.gen_range(50_000.0..250_000.0),
            rng.gen_range(0.0..0.35),
            rng.gen_range(-1e-4..1e-4),
            modulus_law,
            expansion_law,
            rng.gen_range(5e-6..2.5e-5),
        ];
        let mut kinks: Vec<f64> = Vec::new();
        let mut points = 0;
        if modulus_law == 2.0 {
            points = rng.gen_range(2..=5);
            let mut t = rng.gen_range(-50.0..300.0);
            for _ in 0..points {
                props.push(t);
                props.push(rng.gen_range(0.0..1.2));
                kinks.push(t);
                t += rng.gen_range(50.0..400.0);
            }
        } else if modulus_law == 1.0 {
            kinks.extend(TABLE_3_1.iter().map(|r| r.0));
        }
        if expansion_law == 1.0 {
            kinks.extend([750.0, 860.0]);
        }
        let t0 = rng.gen_range(-50.0..1350.0);
        let dt = if rng.gen_bool(0.2) { 0.0 } else { rng.gen_range(-60.0..60.0) };
        let t_end = t0 + dt;
        let nu_end = props[1] + props[2] * (t_end - 20.0);
        if kinks.iter().any(|k| (t_end - k).abs() < KINK_GAP) || !(-0.9..0.49).contains(&nu_end) {
            continue;
        }
        let v = |rng: &mut StdRng, s: f64| (0..n).map(|_| rng.gen_range(-s..s)).collect::<Vec<f64>>();
        let p = Point { props, strain: v(rng, 2e-2), dstrain: v(rng, 2e-3), temp: [t0, dt] };
        return (p, points);
    }
}

// Tangent and ∂σ/∂T of every kind against num-dual (forward-mode dual numbers, an independent
// library), and the complex step (Squire & Trapp 1998; Martins, Sturdza & Alonso 2003) against
// num-dual, at random states; every row of Table 3.1, both sides of 20 and 1200 °C and each
// range of the EN elongation must be reached.
#[test]
fn tangent_and_dtemp_are_the_derivatives_of_the_update() {
    let mut rng = StdRng::seed_from_u64(0x7e51_0001);
    let mut total = 0;
    for kind in Thermo::KINDS {
        let n = kind.ncomp();
        let mut en_bins = [0usize; 14];
        let mut elongation_ranges = [0usize; 3];
        let mut laws = [0usize; 3];
        let mut worst = [0.0f64; 4];
        for k in 0..STATES {
            let (p, points) = random_point(&mut rng, n);
            let m = Thermo::new(kind).unwrap().with_table_points(points);
            let out = run(&m, &p);
            let what = format!("thermo {kind} #{k} {p:?}");
            assert_eq!(out.outcome.status, status::OK, "{what}: {}", out.outcome.message_text());
            assert_eq!(out.outcome.branch, 0);
            assert!(
                out.stress.iter().chain(&out.tangent).chain(&out.dstress_dtemp).all(|x| x.is_finite()),
                "{what}"
            );
            let conv = &m.info().convention;
            // num-dual, an independent library: ∂σ/∂Δε and ∂σ/∂ΔT.
            let (dual_t, dual_dt) = dual_derivatives(&m, &p);
            let e_t = tangent_error(conv, &out.tangent, &dual_t);
            let e_dt = vector_error(conv, &out.dstress_dtemp, &dual_dt);
            assert!(e_t <= DUAL_TOL, "{what}: tangent vs num-dual {e_t:.3e}");
            assert!(e_dt <= DUAL_TOL, "{what}: ∂σ/∂T vs num-dual {e_dt:.3e}");
            // Complex step against num-dual.
            let (cx_t, cx_dt) = complex_derivatives(&m, &p, 1e-30);
            let c_t = tangent_error(conv, &cx_t, &dual_t);
            let c_dt = vector_error(conv, &cx_dt, &dual_dt);
            assert!(
                c_t <= COMPLEX_TOL && c_dt <= COMPLEX_TOL,
                "{what}: complex vs num-dual {c_t:.3e} {c_dt:.3e}"
            );
            worst = [worst[0].max(e_t), worst[1].max(e_dt), worst[2].max(c_t), worst[3].max(c_dt)];

            let t_end = p.temp[0] + p.temp[1];
            let (mlaw, xlaw) = (p.props[3] as usize, p.props[4]);
            laws[mlaw] += 1;
            if mlaw == 1 {
                en_bins[en_bin(t_end)] += 1;
            }
            if xlaw == 1.0 {
                elongation_ranges[usize::from(t_end >= 750.0) + usize::from(t_end >= 860.0)] += 1;
            }
            total += 1;
        }
        eprintln!(
            "thermo {kind}: {STATES} states (laws {laws:?}, EN rows {en_bins:?}, elongation ranges \
             {elongation_ranges:?}); worst tangent/∂σ∂T vs dual {:.1e}/{:.1e}, complex vs dual {:.1e}/{:.1e}",
            worst[0], worst[1], worst[2], worst[3]
        );
        assert!(en_bins.iter().all(|&c| c >= 5), "{kind}: every EN row must be reached: {en_bins:?}");
        assert!(elongation_ranges.iter().all(|&c| c >= 20), "{kind}: {elongation_ranges:?}");
        assert!(laws.iter().all(|&c| c >= STATES / 6), "{kind}: {laws:?}");
    }
    assert_eq!(total, 5 * STATES);
}

// thermo-dtemp-sign: the tangent is the derivative everywhere (num-dual), the stress is the
// correct model's, and ∂σ/∂T is off by exactly a relative 2 wherever num-dual's is not zero
// (returned −g against g).
#[test]
fn dtemp_sign_flaw_is_wrong_in_dtemp_only() {
    let mut rng = StdRng::seed_from_u64(0x7e51_0002);
    let mut nonzero = 0;
    for kind in Thermo::KINDS {
        for k in 0..STATES / 2 {
            let (p, points) = random_point(&mut rng, kind.ncomp());
            let bad = Thermo::dtemp_sign(kind).unwrap().with_table_points(points);
            let good = Thermo::new(kind).unwrap().with_table_points(points);
            assert_eq!(bad.info().name, "thermo-dtemp-sign");
            assert_eq!(bad.flaw(), ThermoFlaw::DtempSign);
            let out = run(&bad, &p);
            assert_eq!(out.stress, run(&good, &p).stress);
            let conv = &bad.info().convention;
            let (dual_t, dual_dt) = dual_derivatives(&bad, &p);
            assert!(tangent_error(conv, &out.tangent, &dual_t) <= DUAL_TOL, "{kind} #{k}");
            if norm(dual_dt.iter().copied()) > 0.0 {
                let e = vector_error(conv, &out.dstress_dtemp, &dual_dt);
                assert!((e - 2.0).abs() <= 1e-12, "{kind} #{k}: ∂σ/∂T error {e}");
                nonzero += 1;
            }
        }
    }
    assert!(nonzero >= 5 * STATES / 2 * 9 / 10, "{nonzero}");
}

// ---------------------------------------------------------------------------------------

fn count_allocations<S: Scalar>(m: &Thermo, p: &Point) -> usize {
    model_allocations::<S, _>(m, &p.call(), 5).0
}

// One call allocates nothing, in f64, num-dual and complex arithmetic, for each law, and on
// the failure path (DEVELOPERS.md: the hot path).
#[test]
fn no_call_allocates() {
    for kind in Thermo::KINDS {
        let n = kind.ncomp();
        for (law, points) in [(0.0, 0), (1.0, 0), (2.0, 3)] {
            let m = Thermo::new(kind).unwrap().with_table_points(points);
            let mut props = steel(law, 1.0);
            props.extend([20.0, 1.0, 400.0, 0.7, 900.0, 0.1].iter().take(2 * points));
            let p = Point { props, strain: vec![1e-3; n], dstrain: vec![2e-4; n], temp: [300.0, 25.0] };
            assert_eq!(run(&m, &p).outcome.status, status::OK);
            assert_eq!(count_allocations::<f64>(&m, &p), 0, "{kind} law {law}");
            assert_eq!(count_allocations::<Dual64>(&m, &p), 0, "{kind} law {law}");
            assert_eq!(count_allocations::<Complex64>(&m, &p), 0, "{kind} law {law}");
        }
        let m = Thermo::new(kind).unwrap();
        let p =
            Point { props: steel(7.0, 1.0), strain: vec![0.0; n], dstrain: vec![0.0; n], temp: [20.0, 0.0] };
        assert_eq!(run(&m, &p).outcome.status, status::FAILED);
        assert_eq!(count_allocations::<f64>(&m, &p), 0, "{kind} failure path");
    }
}

#[test]
fn bad_properties_and_kinds_are_refused() {
    let m = Thermo::new(PointKind::Solid3d).unwrap();
    let at = |props: Vec<f64>, t: f64| {
        run(&m, &Point { props, strain: vec![0.0; 6], dstrain: vec![0.0; 6], temp: [t, 0.0] })
    };
    let mut p = steel(1.0, 1.0);
    p[0] = 0.0;
    for (props, t, needle) in [
        (p, 20.0, "E20"),
        (steel(3.0, 0.0), 20.0, "modulus_law"),
        (steel(1.5, 0.0), 20.0, "modulus_law"),
        (steel(0.0, 2.0), 20.0, "expansion_law"),
        (steel(2.0, 0.0), 20.0, "at least 2"),
        (vec![E_STEEL, 0.3, 3e-4, 0.0, 0.0, 1e-5], 900.0, "nu(T)"),
    ] {
        let out = at(props, t);
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains(needle), "{}", out.outcome.message_text());
        assert!(out.stress.iter().chain(&out.tangent).chain(&out.dstress_dtemp).all(|x| x.is_nan()));
    }
    let m = Thermo::new(PointKind::Uniaxial).unwrap().with_table_points(2);
    let mut props = steel(2.0, 0.0);
    props.extend([400.0, 1.0, 300.0, 0.5]);
    let out = run(&m, &Point { props, strain: vec![0.0], dstrain: vec![0.0], temp: [20.0, 0.0] });
    assert!(out.outcome.message_text().contains("increase strictly"), "{}", out.outcome.message_text());
    assert!(Thermo::new(PointKind::Cohesive3d).is_err());
    let any = AnyModel::new("thermo-dtemp-sign", PointKind::PlaneStress).unwrap();
    assert_eq!((any.info().nprop, any.info().nstate), (6, 0));
    assert_eq!(any.prop_names(), &["E20", "nu0", "nu1", "modulus_law", "expansion_law", "alpha"]);
}
