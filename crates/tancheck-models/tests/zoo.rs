//! The zoo's flawed routines against independent derivatives of their own stress updates:
//! num-dual's forward-mode dual numbers (an independent library) give ∂σ/∂Δε, and each
//! flaw must differ from it exactly as documented, in the branch it targets, and agree with
//! it elsewhere. Closed forms of the J2 tangent are those of Simo & Taylor (1985), CMAME
//! 48:101–118 and Simo & Hughes (1998), Box 3.2 (REFERENCES.md, "J2 plasticity"); elastic
//! constants follow REFERENCES.md "Relations".

use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::{CallInput, CallOutput, Convention, Model, Outcome, PointKind, Scalar};
use tancheck_models::zoo::{FlawedJ2, J2Flaw, UNIT_FACTOR};
use tancheck_models::{zoo, zoo_model, Bimodulus, ZooModel, J2};

// ---------------------------------------------------------------------------------------------
// Calls and derivatives

/// The real inputs of one call.
#[derive(Clone, Debug)]
struct Point {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    state0: Vec<f64>,
}

/// The outputs of one call.
#[derive(Clone, Debug)]
struct Out<S> {
    stress: Vec<S>,
    state: Vec<S>,
    tangent: Vec<S>,
    energy: [S; 2],
    outcome: Outcome,
}

fn lift<S: Scalar>(v: &[f64]) -> Vec<S> {
    v.iter().map(|&x| S::cst(x)).collect()
}

/// One call in scalar type `S`, outputs pre-filled with NaN as the checker does.
fn call<S: Scalar, M: Model>(m: &M, props: &[S], strain: &[S], dstrain: &[S], state0: &[S]) -> Out<S> {
    let n = strain.len();
    let nan = S::cst(f64::NAN);
    let stress0 = vec![S::zero(); n];
    let mut out = Out {
        stress: vec![nan; n],
        state: vec![nan; state0.len()],
        tangent: vec![nan; n * n],
        energy: [nan; 2],
        outcome: Outcome::default(),
    };
    let mut dtemp = vec![nan; n];
    let input = CallInput {
        props,
        strain,
        dstrain,
        temp: [S::cst(293.15), S::zero()],
        stress0: &stress0,
        state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    let mut output = CallOutput {
        stress: &mut out.stress,
        state: &mut out.state,
        tangent: &mut out.tangent,
        dstress_dtemp: &mut dtemp,
        energy: &mut out.energy,
        outcome: &mut out.outcome,
    };
    m.evaluate(&input, &mut output).expect("the sizes fit");
    out
}

fn run<M: Model>(m: &M, p: &Point) -> Out<f64> {
    let out = call(m, &p.props, &p.strain, &p.dstrain, &p.state0);
    assert_eq!(out.outcome.status, 0, "{}: {}", m.info().name, out.outcome.message_text());
    out
}

/// ∂σ/∂Δε by num-dual: one call per column j, Δεⱼ carrying the unit dual part. Column-major.
fn dual_tangent<M: Model>(m: &M, p: &Point) -> Vec<f64> {
    let n = p.strain.len();
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        let de: Vec<Dual64> =
            p.dstrain.iter().enumerate().map(|(k, &x)| Dual64::new(x, f64::from(u8::from(k == j)))).collect();
        let out = call(m, &lift(&p.props), &lift(&p.strain), &de, &lift(&p.state0));
        assert_eq!(out.outcome.status, 0, "dual call: {}", out.outcome.message_text());
        for i in 0..n {
            t[i + j * n] = out.stress[i].eps;
        }
    }
    t
}

fn mandel(conv: &Convention, t: &[f64]) -> Vec<f64> {
    let mut t = t.to_vec();
    conv.tangent_to_mandel(&mut t);
    t
}

fn frobenius(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum::<f64>().sqrt()
}

/// Relative Mandel–Frobenius error of `got` against `reference`.
fn rel_error(conv: &Convention, got: &[f64], reference: &[f64]) -> f64 {
    let (a, b) = (mandel(conv, got), mandel(conv, reference));
    let d: Vec<f64> = a.iter().zip(&b).map(|(x, y)| x - y).collect();
    frobenius(&d) / frobenius(&b)
}

/// Relative error of column j of `got` against the same column of `reference` (Mandel).
fn column_error(conv: &Convention, got: &[f64], reference: &[f64], j: usize) -> f64 {
    let n = conv.ncomp();
    let (a, b) = (mandel(conv, got), mandel(conv, reference));
    let col = j * n..(j + 1) * n;
    let d: Vec<f64> = a[col.clone()].iter().zip(&b[col.clone()]).map(|(x, y)| x - y).collect();
    frobenius(&d) / frobenius(&b[col])
}

/// Agreement of an analytic tangent with num-dual (as the reference models' own checks).
const DUAL_TOL: f64 = 1e-12;
/// A flaw counts as visible above this relative error (the brief of the zoo).
const VISIBLE: f64 = 1e-3;
/// Random states per kind and hardening.
const STATES: usize = 300;

// ---------------------------------------------------------------------------------------------
// Elastic constants and random J2 states

/// λ and μ from E and ν (REFERENCES.md "Relations").
fn lame(e: f64, nu: f64) -> (f64, f64) {
    (e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu)), e / (2.0 * (1.0 + nu)))
}

/// The isotropic elastic tangent in routine order with engineering-shear columns: λ + 2μ on
/// the normal diagonal, λ off it, μ on the shear diagonal (REFERENCES.md "Relations",
/// σ12 = G γ12). Column-major n×n.
fn elastic_tangent(e: f64, nu: f64, n: usize) -> Vec<f64> {
    let (lambda, mu) = lame(e, nu);
    let mut c = vec![0.0; n * n];
    for i in 0..3 {
        for j in 0..3 {
            c[i + j * n] = lambda;
        }
        c[i + i * n] = lambda + 2.0 * mu;
    }
    for i in 3..n {
        c[i + i * n] = mu;
    }
    c
}

/// Canonical slots (11, 22, 33, 23, 13, 12) of a kind's components.
fn slots(n: usize) -> &'static [usize] {
    if n == 6 {
        &[0, 1, 2, 3, 4, 5]
    } else {
        &[0, 1, 2, 5]
    }
}

fn random_tensor(rng: &mut StdRng, n: usize) -> [f64; 6] {
    let mut t = [0.0; 6];
    for &s in slots(n) {
        t[s] = rng.gen_range(-1.0..1.0);
    }
    t
}

fn deviatoric(mut t: [f64; 6]) -> [f64; 6] {
    let p = (t[0] + t[1] + t[2]) / 3.0;
    for x in t.iter_mut().take(3) {
        *x -= p;
    }
    t
}

fn tensor_norm(t: &[f64; 6]) -> f64 {
    (t[0] * t[0] + t[1] * t[1] + t[2] * t[2] + 2.0 * (t[3] * t[3] + t[4] * t[4] + t[5] * t[5])).sqrt()
}

/// Tensor components → a routine vector: engineering shear for strains (`shear` = 2), plain
/// for stresses (1).
fn to_vector(t: &[f64; 6], n: usize, shear: f64) -> Vec<f64> {
    slots(n).iter().map(|&s| if s >= 3 { shear * t[s] } else { t[s] }).collect()
}

/// A routine vector → tensor components (`shear` as in [`to_vector`]).
fn to_tensor(v: &[f64], shear: f64) -> [f64; 6] {
    let mut t = [0.0; 6];
    for (x, &s) in v.iter().zip(slots(v.len())) {
        t[s] = if s >= 3 { x / shear } else { *x };
    }
    t
}

/// Hardening [H_iso, Q, b, H_kin] of the random states. The kinematic moduli are large
/// enough for `j2-no-kinematic` to show.
const HARDENING: [(&str, [f64; 4]); 4] = [
    ("linear isotropic", [1500.0, 0.0, 0.0, 0.0]),
    ("Voce", [0.0, 180.0, 120.0, 0.0]),
    ("kinematic only", [0.0, 0.0, 0.0, 25_000.0]),
    ("mixed", [900.0, 120.0, 60.0, 7000.0]),
];

/// A random J2 call: random elastic constants and yield stress; with probability `virgin`
/// the virgin state (εp = 0, α = 0, β = 0), otherwise a prior plastic state (deviatoric εp,
/// α ≥ √(2/3)‖εp‖, β along εp); a start stress inside or on the yield surface; an increment
/// of random direction whose size spans three and a half decades around the yield strain.
fn random_j2_point(rng: &mut StdRng, n: usize, hardening: &[f64; 4], virgin: f64) -> Point {
    let e = rng.gen_range(70_000.0..210_000.0);
    let nu = rng.gen_range(0.0..0.45);
    let sy0 = rng.gen_range(100.0..500.0);
    let [h_iso, q, b, h_kin] = *hardening;
    let eps_y = sy0 / e;
    let (eps_p, alpha) = if rng.gen_bool(virgin) {
        ([0.0; 6], 0.0)
    } else {
        let d = deviatoric(random_tensor(rng, n));
        let scale = rng.gen_range(0.0..10.0) * eps_y / tensor_norm(&d);
        let ep = d.map(|x| x * scale);
        (ep, (2.0f64 / 3.0).sqrt() * tensor_norm(&ep) * rng.gen_range(1.0..3.0))
    };
    let kin = 2.0 / 3.0 * h_kin * rng.gen_range(0.5..1.0);
    let beta = eps_p.map(|x| x * kin);
    let k_n = sy0 + h_iso * alpha + q * (1.0 - (-b * alpha).exp());
    let m = deviatoric(random_tensor(rng, n));
    let r = if rng.gen_bool(0.3) { 1.0 } else { rng.gen_range(0.0..1.0) };
    let radius = r * (2.0f64 / 3.0).sqrt() * k_n / tensor_norm(&m);
    let pressure = rng.gen_range(-2.0..2.0) * sy0;
    let (_, mu) = lame(e, nu);
    let bulk = e / (3.0 * (1.0 - 2.0 * nu));
    let mut strain = [0.0; 6];
    for k in 0..6 {
        strain[k] = eps_p[k]
            + (radius * m[k] + beta[k]) / (2.0 * mu)
            + if k < 3 { pressure / (3.0 * bulk) } else { 0.0 };
    }
    let size = eps_y * 10f64.powf(rng.gen_range(-3.0..0.5));
    let de = random_tensor(rng, n).map(|x| x * size);
    let mut state0 = to_vector(&eps_p, n, 2.0);
    state0.push(alpha);
    state0.extend(to_vector(&beta, n, 1.0));
    Point {
        props: vec![e, nu, sy0, h_iso, q, b, h_kin],
        strain: to_vector(&strain, n, 2.0),
        dstrain: to_vector(&de, n, 2.0),
        state0,
    }
}

/// The J2 quantities at the end of a plastic increment, from its outputs alone by the closed
/// forms of Simo & Hughes (1998), Box 3.2: the unit flow direction n (Mandel vector, from
/// ξ_{n+1} = dev σ − β_{n+1}, which radial return keeps parallel to n), K'(α_{n+1}), θ and θ̄.
struct PlasticEnd {
    n_mandel: Vec<f64>,
    slope: f64,
    mu: f64,
    theta_bar: f64,
}

fn plastic_end(p: &Point, out: &Out<f64>) -> PlasticEnd {
    let n = p.strain.len();
    let [e, nu, sy0, h_iso, q, b, h_kin] = p.props[..] else { unreachable!() };
    let (_, mu) = lame(e, nu);
    let sigma = deviatoric(to_tensor(&out.stress, 1.0));
    let beta = to_tensor(&out.state[n + 1..2 * n + 1], 1.0);
    let mut xi = [0.0; 6];
    for k in 0..6 {
        xi[k] = sigma[k] - beta[k];
    }
    let norm = tensor_norm(&xi);
    let r2 = 2f64.sqrt();
    let n_mandel = slots(n).iter().map(|&s| xi[s] / norm * if s >= 3 { r2 } else { 1.0 }).collect();
    let r23 = (2.0f64 / 3.0).sqrt();
    let alpha = out.state[n];
    let dgamma = (alpha - p.state0[n]) / r23;
    let k_yield = sy0 + h_iso * alpha + q * (1.0 - (-b * alpha).exp());
    let slope = h_iso + q * b * (-b * alpha).exp();
    let xi_tr = r23 * k_yield + (2.0 * mu + 2.0 / 3.0 * h_kin) * dgamma;
    let theta = 1.0 - 2.0 * mu * dgamma / xi_tr;
    let theta_bar = 1.0 / (1.0 + (slope + h_kin) / (3.0 * mu)) - (1.0 - theta);
    PlasticEnd { n_mandel, slope, mu, theta_bar }
}

/// For every kind of a flaw and every hardening, `STATES` random points: the flawed model's
/// stress and J2 state are J2's, and `check` judges its tangent against num-dual.
fn for_random_states(
    flaw: J2Flaw,
    seed: u64,
    virgin: f64,
    mut check: impl FnMut(&str, &Point, &Out<f64>, &[f64], &Convention),
) {
    let mut rng = StdRng::seed_from_u64(seed);
    for &kind in flaw.kinds() {
        let m = FlawedJ2::new(flaw, kind).unwrap();
        let j2 = J2::new(kind).unwrap();
        let conv = m.info().convention.clone();
        let n = kind.ncomp();
        for (hname, hard) in &HARDENING {
            for k in 0..STATES {
                let mut p = random_j2_point(&mut rng, n, hard, virgin);
                let reference = run(&j2, &p);
                p.state0.resize(m.info().nstate, 0.0);
                let out = run(&m, &p);
                let what = format!("{} {kind} {hname} #{k}", flaw.name());
                assert_eq!(out.stress, reference.stress, "{what}: the stress update is J2's");
                assert_eq!(out.state[..2 * n + 1], reference.state[..], "{what}: the state is J2's");
                assert_eq!(out.outcome.branch, reference.outcome.branch, "{what}");
                let dual = dual_tangent(&m, &p);
                check(&what, &p, &out, &dual, &conv);
            }
        }
    }
}

/// Counts per branch [elastic, plastic] and of plastic states where the flaw shows.
#[derive(Default, Debug)]
struct Tally {
    branch: [usize; 2],
    visible: usize,
}

impl Tally {
    fn assert_both_branches(&self, what: &str) {
        let total = self.branch[0] + self.branch[1];
        assert!(self.branch[0] * 5 >= total && self.branch[1] * 5 >= total, "{what}: {self:?}");
    }
}

// ---------------------------------------------------------------------------------------------
// The flawed J2 variants at random states

// j2-shear-factor: every shear column is half the num-dual column, in both branches (the
// engineering-shear column holds C_ijkl, REFERENCES.md J2 worked case note).
#[test]
fn shear_factor_halves_the_shear_columns_everywhere() {
    let mut t = Tally::default();
    for_random_states(J2Flaw::ShearFactor, 0x200a_0001, 0.2, |what, p, out, dual, conv| {
        let n = p.strain.len();
        let mut want = dual.to_vec();
        for j in 3..n {
            for i in 0..n {
                want[i + j * n] *= 0.5;
            }
        }
        assert!(rel_error(conv, &out.tangent, &want) <= DUAL_TOL, "{what}");
        let err = rel_error(conv, &out.tangent, dual);
        assert!(err > VISIBLE, "{what}: {err:.3e}");
        t.branch[out.outcome.branch as usize] += 1;
    });
    eprintln!("j2-shear-factor: {t:?}");
    t.assert_both_branches("j2-shear-factor");
}

// j2-shear-permuted: P D P with P swapping the 23 and 12 rows and columns. The isotropic
// elastic tangent is invariant under P, so the elastic branch is right; after yield only the
// n⊗n term moves, and ‖P(n⊗n)P − n⊗n‖ = √(2 − 2(n·Pn)²) for a unit n, so the Mandel error is
// 2μ|θ̄| √(2 − 2(n·Pn)²)/‖D‖ (derived from the closed form of Simo & Hughes 1998, Box 3.2).
#[test]
fn shear_permutation_shows_after_yield_only() {
    let perm = [0usize, 1, 2, 5, 4, 3];
    let mut t = Tally::default();
    for_random_states(J2Flaw::ShearPermuted, 0x200a_0002, 0.2, |what, p, out, dual, conv| {
        let err = rel_error(conv, &out.tangent, dual);
        let b = out.outcome.branch as usize;
        t.branch[b] += 1;
        if b == 0 {
            assert!(err <= DUAL_TOL, "{what}: elastic branch {err:.3e}");
            return;
        }
        let mut want = vec![0.0; 36];
        for j in 0..6 {
            for i in 0..6 {
                want[i + 6 * j] = dual[perm[i] + 6 * perm[j]];
            }
        }
        assert!(rel_error(conv, &out.tangent, &want) <= DUAL_TOL, "{what}");
        let end = plastic_end(p, out);
        let nm = &end.n_mandel;
        let dot: f64 = (0..6).map(|i| nm[i] * nm[perm[i]]).sum();
        let predicted = 2.0 * end.mu * end.theta_bar.abs() * (2.0 - 2.0 * dot * dot).max(0.0).sqrt()
            / frobenius(&mandel(conv, dual));
        assert!((err - predicted).abs() <= 1e-6 * predicted + 1e-12, "{what}: {err:.6e} vs {predicted:.6e}");
        if err > VISIBLE {
            t.visible += 1;
        }
    });
    eprintln!("j2-shear-permuted: {t:?} (visible: plastic states with error > 1e-3)");
    t.assert_both_branches("j2-shear-permuted");
    assert!(t.visible * 10 >= t.branch[1] * 8, "the permutation shows too rarely: {t:?}");
}

// j2-elastic-first-plastic: in a plastic increment from α_n = 0 the tangent is the elastic
// matrix (REFERENCES.md "Relations"), far from the derivative; everywhere else it is the
// derivative.
#[test]
fn elastic_tangent_in_the_first_plastic_increment_only() {
    let (mut first, mut later_plastic, mut elastic) = (0, 0, 0);
    for_random_states(J2Flaw::ElasticFirstPlastic, 0x200a_0003, 0.5, |what, p, out, dual, conv| {
        let n = p.strain.len();
        let err = rel_error(conv, &out.tangent, dual);
        if out.outcome.branch == 1 && p.state0[n] == 0.0 {
            first += 1;
            let c = elastic_tangent(p.props[0], p.props[1], n);
            assert!(rel_error(conv, &out.tangent, &c) <= DUAL_TOL, "{what}: not the elastic tangent");
            assert!(err > VISIBLE, "{what}: {err:.3e}");
        } else {
            if out.outcome.branch == 1 {
                later_plastic += 1;
            } else {
                elastic += 1;
            }
            assert!(err <= DUAL_TOL, "{what}: {err:.3e}");
        }
    });
    eprintln!(
        "j2-elastic-first-plastic: {first} first plastic, {later_plastic} later plastic, {elastic} elastic"
    );
    assert!(first >= 300 && later_plastic >= 300 && elastic >= 300, "{first} {later_plastic} {elastic}");
}

// j2-no-kinematic: after yield the tangent is D − 2μ Δθ̄ n⊗n with
// Δθ̄ = 1/(1 + K'/(3μ)) − 1/(1 + (K' + H_kin)/(3μ)) (θ̄ of Simo & Hughes 1998, Box 3.2, with
// and without H_kin; derived), so the Mandel error is 2μ|Δθ̄|/‖D‖. Right in the elastic
// branch and with H_kin = 0.
#[test]
fn kinematic_modulus_missing_from_the_rank_one_term() {
    let mut t = Tally::default();
    let mut without_kin = 0;
    for_random_states(J2Flaw::NoKinematic, 0x200a_0004, 0.2, |what, p, out, dual, conv| {
        let err = rel_error(conv, &out.tangent, dual);
        let h_kin = p.props[6];
        let b = out.outcome.branch as usize;
        t.branch[b] += 1;
        if b == 0 || h_kin == 0.0 {
            without_kin += usize::from(b == 1);
            assert!(err <= DUAL_TOL, "{what}: {err:.3e}");
            return;
        }
        let end = plastic_end(p, out);
        let mu = end.mu;
        let shift = 1.0 / (1.0 + end.slope / (3.0 * mu)) - 1.0 / (1.0 + (end.slope + h_kin) / (3.0 * mu));
        let n = p.strain.len();
        let mut want = mandel(conv, dual);
        for j in 0..n {
            for i in 0..n {
                want[i + j * n] -= 2.0 * mu * shift * end.n_mandel[i] * end.n_mandel[j];
            }
        }
        conv.tangent_from_mandel(&mut want);
        assert!(rel_error(conv, &out.tangent, &want) <= 1e-10, "{what}");
        let predicted = 2.0 * mu * shift / frobenius(&mandel(conv, dual));
        assert!((err - predicted).abs() <= 1e-6 * predicted, "{what}: {err:.6e} vs {predicted:.6e}");
        if err > VISIBLE {
            t.visible += 1;
        }
    });
    eprintln!("j2-no-kinematic: {t:?}, {without_kin} plastic with H_kin = 0");
    t.assert_both_branches("j2-no-kinematic");
    assert!(without_kin > 0);
    assert!(t.visible * 10 >= (t.branch[1] - without_kin) * 9, "{t:?}");
}

// j2-unit-factor: exactly 1000 times the num-dual derivative, in both branches.
#[test]
fn unit_factor_is_a_uniform_scale() {
    let mut t = Tally::default();
    for_random_states(J2Flaw::UnitFactor, 0x200a_0005, 0.2, |what, _p, out, dual, conv| {
        let want: Vec<f64> = dual.iter().map(|x| x * UNIT_FACTOR).collect();
        assert!(rel_error(conv, &out.tangent, &want) <= DUAL_TOL, "{what}");
        let err = rel_error(conv, &out.tangent, dual);
        assert!((err - (UNIT_FACTOR - 1.0)).abs() <= 1e-9 * UNIT_FACTOR, "{what}: {err}");
        t.branch[out.outcome.branch as usize] += 1;
    });
    eprintln!("j2-unit-factor: {t:?}");
    t.assert_both_branches("j2-unit-factor");
}

// j2-one-column: every column but 13 is the num-dual column; column 13 is the elastic one
// (μ on the diagonal, REFERENCES.md "Relations"), which differs after yield.
#[test]
fn one_column_differs_only_in_the_13_column() {
    let mut t = Tally::default();
    for_random_states(J2Flaw::OneColumn, 0x200a_0006, 0.2, |what, p, out, dual, conv| {
        let b = out.outcome.branch as usize;
        t.branch[b] += 1;
        for j in [0, 1, 2, 3, 5] {
            let e = column_error(conv, &out.tangent, dual, j);
            assert!(e <= DUAL_TOL, "{what}: column {j} {e:.3e}");
        }
        let (_, mu) = lame(p.props[0], p.props[1]);
        let col13: Vec<f64> = (0..6).map(|i| if i == 4 { mu } else { 0.0 }).collect();
        let got = &out.tangent[24..30];
        assert!(got.iter().zip(&col13).all(|(g, w)| (g - w).abs() <= 1e-12 * mu), "{what}: {got:?}");
        let e13 = column_error(conv, &out.tangent, dual, 4);
        let err = rel_error(conv, &out.tangent, dual);
        if b == 0 {
            assert!(e13 <= DUAL_TOL && err <= DUAL_TOL, "{what}: elastic branch {e13:.3e}");
        } else if err > VISIBLE {
            assert!(e13 > err, "{what}: the whole error sits in column 13");
            t.visible += 1;
        }
    });
    eprintln!("j2-one-column: {t:?}");
    t.assert_both_branches("j2-one-column");
    assert!(t.visible * 10 >= t.branch[1] * 8, "{t:?}");
}

// j2-stale along two increments: the first (no previous increment: zero extra state) returns
// the elastic tangent; the second returns the num-dual derivative of the first, which is
// right only when both increments have the same derivative (elastic after elastic).
#[test]
fn stale_tangent_lags_one_increment() {
    let mut rng = StdRng::seed_from_u64(0x200a_0007);
    let (mut plastic_second, mut visible, mut elastic_pairs, mut after_plastic) = (0, 0, 0, 0);
    for &kind in J2Flaw::Stale.kinds() {
        let m = FlawedJ2::new(J2Flaw::Stale, kind).unwrap();
        let conv = m.info().convention.clone();
        let n = kind.ncomp();
        for (hname, hard) in &HARDENING {
            for k in 0..STATES {
                let what = format!("j2-stale {kind} {hname} #{k}");
                let mut p1 = random_j2_point(&mut rng, n, hard, 0.2);
                p1.state0.resize(2 * n + 3, 0.0);
                let out1 = run(&m, &p1);
                let dual1 = dual_tangent(&m, &p1);
                let c = elastic_tangent(p1.props[0], p1.props[1], n);
                assert!(rel_error(&conv, &out1.tangent, &c) <= DUAL_TOL, "{what}: first increment");
                let err1 = rel_error(&conv, &out1.tangent, &dual1);
                if out1.outcome.branch == 0 {
                    assert!(err1 <= DUAL_TOL, "{what}: {err1:.3e}");
                    assert_eq!(out1.state[2 * n + 1..], [0.0, 0.0]);
                } else {
                    assert!(err1 > VISIBLE, "{what}: {err1:.3e}");
                }
                // The second increment, in a new direction, from the end of the first.
                let size = p1.props[2] / p1.props[0] * 10f64.powf(rng.gen_range(-2.0..0.3));
                let p2 = Point {
                    props: p1.props.clone(),
                    strain: p1.strain.iter().zip(&p1.dstrain).map(|(a, b)| a + b).collect(),
                    dstrain: to_vector(&random_tensor(&mut rng, n).map(|x| x * size), n, 2.0),
                    state0: out1.state.clone(),
                };
                let out2 = run(&m, &p2);
                let dual2 = dual_tangent(&m, &p2);
                assert!(rel_error(&conv, &out2.tangent, &dual1) <= 1e-10, "{what}: not the first derivative");
                let err2 = rel_error(&conv, &out2.tangent, &dual2);
                let lag = rel_error(&conv, &dual1, &dual2);
                assert!((err2 - lag).abs() <= 1e-9 * lag.max(1.0), "{what}");
                match (out1.outcome.branch, out2.outcome.branch) {
                    (0, 0) => {
                        elastic_pairs += 1;
                        assert!(err2 <= DUAL_TOL, "{what}: {err2:.3e}");
                    }
                    (1, b2) => {
                        after_plastic += 1;
                        plastic_second += usize::from(b2 == 1);
                        visible += usize::from(err2 > VISIBLE);
                    }
                    _ => {}
                }
            }
        }
    }
    eprintln!(
        "j2-stale: {elastic_pairs} elastic pairs, {after_plastic} after a plastic increment \
         ({plastic_second} plastic again, {visible} with error > 1e-3)"
    );
    assert!(elastic_pairs > 100 && plastic_second > 300, "{elastic_pairs} {plastic_second}");
    assert!(visible * 10 >= after_plastic * 9, "{visible} of {after_plastic} after a plastic increment");
}

// ---------------------------------------------------------------------------------------------
// The worked case of REFERENCES.md (J2 plasticity): E = 200 GPa, ν = 0.3, σy0 = 250 MPa,
// H_iso = 1000 MPa, H_kin = 500 MPa, ε = diag(0.003, 0, 0) from the virgin state.
// C1111 = 167329.028, C2211 = 166335.486, C1212 = μθ = 41894.353 MPa, θ = 0.5446266,
// θ̄ = 0.5381686 (derived from the closed form of Simo & Hughes 1998, Box 3.2).

const WORKED: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
const C1111: f64 = 167_329.028;
const C1212: f64 = 41_894.353;

fn worked(flaw: J2Flaw, state0: Option<&[f64]>, strain: [f64; 6]) -> Out<f64> {
    let m = FlawedJ2::new(flaw, PointKind::Solid3d).unwrap();
    let mut s0 = state0.map_or(vec![0.0; 13], <[f64]>::to_vec);
    s0.resize(m.info().nstate, 0.0);
    let p = Point {
        props: WORKED.to_vec(),
        strain: strain.to_vec(),
        dstrain: vec![0.003, 0.0, 0.0, 0.0, 0.0, 0.0],
        state0: s0,
    };
    run(&m, &p)
}

fn near(x: f64, want: f64, tol: f64, what: &str) {
    assert!((x - want).abs() <= tol, "{what}: {x:.6} vs {want}");
}

#[test]
fn worked_case_values_of_every_flaw() {
    let z = [0.0; 6];
    let (lambda, mu) = lame(WORKED[0], WORKED[1]);
    // Shear columns halved: C1212/2.
    let t = worked(J2Flaw::ShearFactor, None, z).tangent;
    near(t[0], C1111, 5e-4, "C1111");
    for k in 3..6 {
        near(t[k + 6 * k], C1212 / 2.0, 3e-4, "halved shear diagonal");
    }
    // Uniaxial flow (n has no shear part): the permutation is invisible here, the blind spot
    // of uniaxial-only tests (REFERENCES.md, practitioners' tests, common practice).
    let t = worked(J2Flaw::ShearPermuted, None, z).tangent;
    near(t[0], C1111, 5e-4, "C1111");
    for k in 3..6 {
        near(t[k + 6 * k], C1212, 5e-4, "shear diagonal");
    }
    // First plastic increment from the virgin state: λ + 2μ = 269230.769 and μ = 76923.077
    // (REFERENCES.md "Relations", derived).
    let t = worked(J2Flaw::ElasticFirstPlastic, None, z).tangent;
    near(t[0], 269_230.769, 5e-4, "λ + 2μ");
    near(t[1], 115_384.615, 5e-4, "λ");
    near(t[5 + 6 * 5], 76_923.077, 5e-4, "μ");
    // H_kin left out: C1111 − C1111_flawed = (4/3)μ Δθ̄ with n11² = 2/3 (derived).
    let shift = 1.0 / (1.0 + 1000.0 / (3.0 * mu)) - 1.0 / (1.0 + 1500.0 / (3.0 * mu));
    let t = worked(J2Flaw::NoKinematic, None, z).tangent;
    near(t[0], C1111 - 4.0 / 3.0 * mu * shift, 5e-4, "C1111 without H_kin");
    near(t[5 + 6 * 5], C1212, 5e-4, "shear diagonal untouched (n12 = 0)");
    // Times 1000.
    let t = worked(J2Flaw::UnitFactor, None, z).tangent;
    near(t[0], C1111 * 1e3, 0.5, "1000 C1111");
    // Column 13 elastic: μ on its diagonal, the rest consistent.
    let t = worked(J2Flaw::OneColumn, None, z).tangent;
    near(t[4 + 6 * 4], 76_923.077, 5e-4, "μ in column 13");
    near(t[3 + 6 * 3], C1212, 5e-4, "C2323");
    near(t[0], C1111, 5e-4, "C1111");
    // Stale: first the elastic tangent; then, in an unloading increment from the end of the
    // worked one, the consistent tangent of the worked increment.
    let first = worked(J2Flaw::Stale, None, z);
    near(first.tangent[0], lambda + 2.0 * mu, 1e-9, "λ + 2μ");
    let m = FlawedJ2::new(J2Flaw::Stale, PointKind::Solid3d).unwrap();
    let p = Point {
        props: WORKED.to_vec(),
        strain: vec![0.003, 0.0, 0.0, 0.0, 0.0, 0.0],
        dstrain: vec![-1e-4, 0.0, 0.0, 0.0, 0.0, 0.0],
        state0: first.state.clone(),
    };
    let second = run(&m, &p);
    assert_eq!(second.outcome.branch, 0);
    near(second.tangent[0], C1111, 5e-4, "C1111 one increment late");
    near(second.tangent[1], 166_335.486, 5e-4, "C2211 one increment late");
    near(second.tangent[3 + 6 * 3], C1212, 5e-4, "C2323 one increment late");
    near(1.0 - first.state[13], 0.5446266, 5e-8, "θ kept in the state");
    near(first.state[14], 0.5381686, 5e-8, "θ̄ kept in the state");
}

// ---------------------------------------------------------------------------------------------
// Bimodulus

fn bimodulus_point(rng: &mut StdRng, n: usize, e11_end: Option<f64>) -> Point {
    let e_t = rng.gen_range(10_000.0..300_000.0);
    // The two sides differ clearly (a factor 1.7 to 10 either way).
    let e_c = e_t * if rng.gen_bool(0.5) { rng.gen_range(0.1..0.6) } else { rng.gen_range(1.7..3.0) };
    let nu = rng.gen_range(-0.5..0.45);
    let mut strain: Vec<f64> = (0..n).map(|_| rng.gen_range(-2e-3..2e-3)).collect();
    let mut dstrain: Vec<f64> = (0..n).map(|_| rng.gen_range(-1e-3..1e-3)).collect();
    if let Some(x) = e11_end {
        // strain + dstrain = x exactly: both halves chosen so the sum rounds to x.
        strain[0] = rng.gen_range(-2e-3..2e-3);
        dstrain[0] = x - strain[0];
        if strain[0] + dstrain[0] != x {
            strain[0] = 0.0;
            dstrain[0] = x;
        }
    }
    Point { props: vec![e_t, e_c, nu], strain, dstrain, state0: vec![] }
}

/// Column 0 of ∂σ/∂Δε by a one-sided difference of step h (the stress is linear on each side
/// of the kink, so this is exact up to rounding).
fn one_sided_column0<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    let base = run(m, p).stress;
    let mut q = p.clone();
    q.dstrain[0] += h;
    let moved = run(m, &q).stress;
    moved.iter().zip(&base).map(|(a, b)| (a - b) / h).collect()
}

// Away from the kink both bimodulus models return the num-dual derivative, on the branch of
// the sign of ε11; the reported stored energy is a potential of the stress (dW/dε = σ with
// engineering shear, linear elasticity), checked with num-dual.
#[test]
fn bimodulus_is_exact_away_from_the_kink() {
    let mut rng = StdRng::seed_from_u64(0x200a_0008);
    for kind in Bimodulus::KINDS {
        let n = kind.ncomp();
        for m in [Bimodulus::new(kind).unwrap(), Bimodulus::average(kind).unwrap()] {
            let conv = m.info().convention.clone();
            let mut count = [0; 2];
            for k in 0..600 {
                let p = bimodulus_point(&mut rng, n, None);
                let what = format!("{} {kind} #{k}", m.info().name);
                let out = run(&m, &p);
                let e11 = p.strain[0] + p.dstrain[0];
                assert_eq!(out.outcome.branch, i32::from(e11 < 0.0), "{what}");
                count[out.outcome.branch as usize] += 1;
                let dual = dual_tangent(&m, &p);
                assert!(rel_error(&conv, &out.tangent, &dual) <= DUAL_TOL, "{what}");
                for j in 0..n {
                    let de: Vec<Dual64> = p
                        .dstrain
                        .iter()
                        .enumerate()
                        .map(|(i, &x)| Dual64::new(x, f64::from(u8::from(i == j))))
                        .collect();
                    let d = call(&m, &lift(&p.props), &lift(&p.strain), &de, &[]);
                    let s = out.stress[j];
                    assert!(
                        (d.energy[0].eps - s).abs() <= 1e-12 * frobenius(&out.stress),
                        "{what}: dW/dε{j}"
                    );
                }
            }
            assert!(count[0] > 200 && count[1] > 200, "{count:?}");
        }
    }
}

// At ε11 = 0 exactly: the stress is continuous (no jump between the sides, the reason for
// the rank-one compression term), `bimodulus` returns the tension-side derivative (num-dual
// takes the tension branch there, and a forward difference agrees), and `bimodulus-average`
// returns a 11–11 entry that neither one-sided difference has.
#[test]
fn bimodulus_at_the_kink() {
    let mut rng = StdRng::seed_from_u64(0x200a_0009);
    for kind in Bimodulus::KINDS {
        let n = kind.ncomp();
        let good = Bimodulus::new(kind).unwrap();
        let avg = Bimodulus::average(kind).unwrap();
        let conv = good.info().convention.clone();
        for k in 0..300 {
            let p = bimodulus_point(&mut rng, n, Some(0.0));
            let what = format!("bimodulus {kind} #{k}");
            assert_eq!(p.strain[0] + p.dstrain[0], 0.0);
            let out = run(&good, &p);
            assert_eq!(out.outcome.branch, 0, "{what}: the kink belongs to the tension side");
            let h = 1e-7;
            let forward = one_sided_column0(&good, &p, h);
            let backward = one_sided_column0(&good, &p, -h);
            let scale = frobenius(&out.tangent);
            let col0 = &out.tangent[..n];
            let dual = dual_tangent(&good, &p);
            assert!(rel_error(&conv, &out.tangent, &dual) <= DUAL_TOL, "{what}");
            for i in 0..n {
                assert!((col0[i] - forward[i]).abs() <= 1e-7 * scale, "{what}: forward row {i}");
            }
            let (e_t, e_c) = (p.props[0], p.props[1]);
            assert!((backward[0] - forward[0] - (e_c - e_t)).abs() <= 1e-7 * scale, "{what}: the sides");
            // Continuity: σ(ε11 = +h) − σ(ε11 = −h) = (forward + backward) h, of size h.
            let mut up = p.clone();
            up.dstrain[0] += h;
            let mut down = p.clone();
            down.dstrain[0] -= h;
            let (su, sd) = (run(&good, &up).stress, run(&good, &down).stress);
            let smax = frobenius(&out.stress).max(1.0);
            for i in 0..n {
                let linear = h * (forward[i] + backward[i]);
                assert!((su[i] - sd[i] - linear).abs() <= 1e-9 * smax, "{what}: a jump at the kink, row {i}");
            }

            let flawed = run(&avg, &p);
            assert_eq!(flawed.stress, out.stress);
            let mean = 0.5 * (e_t + e_c);
            assert!((flawed.tangent[0] - mean).abs() <= 1e-9 * scale || n == 6, "{what}: uniaxial mean");
            let mut fwd = out.tangent.clone();
            fwd[..n].copy_from_slice(&forward);
            let mut bwd = out.tangent.clone();
            bwd[..n].copy_from_slice(&backward);
            let jump = (e_c - e_t).abs();
            let to_fwd = rel_error(&conv, &flawed.tangent, &fwd);
            let to_bwd = rel_error(&conv, &flawed.tangent, &bwd);
            // Half the jump of the 11–11 entry to either side (derived from the definition).
            let half = 0.5 * jump / frobenius(&mandel(&conv, &fwd));
            assert!((to_fwd - half).abs() <= 1e-6 * half + 1e-9, "{what}: {to_fwd:.6e} vs {half:.6e}");
            assert!(to_fwd > VISIBLE && to_bwd > VISIBLE, "{what}: {to_fwd:.3e} {to_bwd:.3e}");
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Registry and the hot path

#[test]
fn every_zoo_entry_builds_for_its_kinds() {
    for e in zoo() {
        for &kind in e.kinds {
            let r = zoo_model(e.name, kind).unwrap_or_else(|err| panic!("{}: {err}", e.name));
            assert_eq!(r.0.info().convention.ncomp(), kind.ncomp());
            assert!(!r.0.prop_names().is_empty());
        }
    }
}

mod common;
use tancheck_testkit::call::{model_allocations, Call};

/// Allocations made by ten calls of `m` in scalar type S (buffers made beforehand).
fn allocations_of<S: Scalar>(m: &ZooModel, props: &[f64], dstrain: &[f64]) -> usize {
    let info = m.info();
    let c = Call::new(props, info.convention.ncomp(), info.nstate).dstrain(dstrain).temp(0.0, 0.0);
    let (made, outcome) = model_allocations::<S, _>(m, &c, 10);
    assert_eq!(outcome.status, 0);
    made
}

// DEVELOPERS.md: one routine call is the hot path and does not allocate, on either branch,
// in f64 and in dual numbers.
#[test]
fn zoo_calls_do_not_allocate() {
    // The thermo and cohesive rows have their own no-allocation tests (tests/thermo.rs,
    // tests/cohesive.rs), with properties of their own.
    for e in zoo().into_iter().filter(|e| !e.name.starts_with("thermo") && !e.name.starts_with("cohesive")) {
        for &kind in e.kinds {
            let r = zoo_model(e.name, kind).unwrap();
            let n = kind.ncomp();
            let props: Vec<f64> = match r.0.prop_names().len() {
                7 => WORKED.to_vec(),
                3 => vec![200_000.0, 80_000.0, 0.3],
                _ => vec![200_000.0, 0.3],
            };
            for size in [1e-4, 3e-3, -3e-3] {
                let de: Vec<f64> = (0..n).map(|i| if i == 0 { size } else { 0.0 }).collect();
                assert_eq!(allocations_of::<f64>(&r.0, &props, &de), 0, "{} {kind}", e.name);
                assert_eq!(allocations_of::<Dual64>(&r.0, &props, &de), 0, "{} {kind}", e.name);
            }
        }
    }
}
