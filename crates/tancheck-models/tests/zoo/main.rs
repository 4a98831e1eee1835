//! The zoo's flawed routines against independent derivatives of their own stress updates:
//! num-dual's forward-mode dual numbers (an independent library) give ∂σ/∂Δε, and each
//! flaw must differ from it exactly as documented, in the branch it targets, and agree with
//! it elsewhere. Closed forms of the J2 tangent are those of Simo & Taylor (1985), CMAME
//! 48:101–118 and Simo & Hughes (1998), Box 3.2 (REFERENCES.md, "J2 plasticity"); elastic
//! constants follow REFERENCES.md "Relations".

use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::driver::Outputs;
use tancheck_core::{Convention, Model, PointKind, Scalar};
use tancheck_models::zoo::{FlawedJ2, J2Flaw, UNIT_FACTOR};
use tancheck_models::{zoo, zoo_model, Bimodulus, ZooModel, J2};
use tancheck_testkit::call::{model_allocations, model_call, Call};
use tancheck_testkit::point::Point;
use tancheck_testkit::tensor::{deviatoric, random_tensor, slots, tensor_norm, to_tensor, to_vector};

#[path = "../common/mod.rs"]
mod common;

mod bimodulus;
mod j2_flaws;
mod registry;
mod worked;

// ---------------------------------------------------------------------------------------------
// Calls and derivatives

/// One real call that must succeed.
fn run<M: Model>(m: &M, p: &Point) -> Outputs<f64> {
    let out = tancheck_testkit::point::run(m, p);
    assert_eq!(out.outcome.status, 0, "{}: {}", m.info().name, out.outcome.message_text());
    out
}

/// ∂σ/∂Δε by num-dual: one call per column j, Δεⱼ carrying the unit dual part. Column-major.
fn dual_tangent<M: Model>(m: &M, p: &Point) -> Vec<f64> {
    tancheck_testkit::call::dual_tangent(m, &p.call()).0
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
        ..Point::default()
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

fn plastic_end(p: &Point, out: &Outputs<f64>) -> PlasticEnd {
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
    mut check: impl FnMut(&str, &Point, &Outputs<f64>, &[f64], &Convention),
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

/// The worked case of REFERENCES.md (J2 plasticity): see `worked.rs`.
const WORKED: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
