//! The bilinear mixed-mode cohesive model (`cohesive`) and its flawed variants against the
//! published law (Camanho & Dávila 2002, NASA/TM-2002-211737; Camanho, Dávila & de Moura
//! 2003; Benzeggagh & Kenane 1996; REFERENCES.md, "Cohesive zone") and num-dual /
//! complex-step derivatives of its own update, branch by branch.

use num_complex::Complex64;
use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::routine::{provides, status};
use tancheck_core::{CallInput, CallOutput, Model, Outcome, PointKind, Scalar};
use tancheck_models::cohesive::{branch, mode_mix};
use tancheck_models::{AnyModel, Cohesive, CohesiveFlaw};

// ---------------------------------------------------------------------------------------
// A counting allocator: one call of the model must not allocate (DEVELOPERS.md, hot path).

mod common;
use common::ALLOCATIONS;

// ---------------------------------------------------------------------------------------
// One call with owned arrays, in any scalar type.

#[derive(Clone, Debug)]
struct Point {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    state0: [f64; 2],
}

impl Point {
    /// Separation `sep` reached from zero in one increment, from the state [d, G_d].
    fn at(props: &[f64], sep: &[f64], state0: [f64; 2]) -> Point {
        Point { props: props.to_vec(), strain: vec![0.0; sep.len()], dstrain: sep.to_vec(), state0 }
    }
}

struct Out<S> {
    stress: Vec<S>,
    state: Vec<S>,
    tangent: Vec<S>,
    dtemp: Vec<S>,
    energy: [S; 2],
    outcome: Outcome,
}

fn lift<S: Scalar>(v: &[f64]) -> Vec<S> {
    v.iter().map(|&x| S::cst(x)).collect()
}

fn eval<S: Scalar, M: Model>(m: &M, props: &[S], strain: &[S], dstrain: &[S], state0: &[S]) -> Out<S> {
    let n = strain.len();
    let nan = S::cst(f64::NAN);
    let stress0 = vec![nan; n]; // not read by a total-form model
    let mut out = Out {
        stress: vec![nan; n],
        state: vec![nan; 2],
        tangent: vec![nan; n * n],
        dtemp: vec![nan; n],
        energy: [nan; 2],
        outcome: Outcome::default(),
    };
    let input = CallInput {
        props,
        strain,
        dstrain,
        temp: [S::cst(20.0), S::zero()],
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
        dstress_dtemp: &mut out.dtemp,
        energy: &mut out.energy,
        outcome: &mut out.outcome,
    };
    m.evaluate(&input, &mut output).expect("sizes match");
    out
}

fn run<M: Model>(m: &M, p: &Point) -> Out<f64> {
    eval(m, &p.props, &p.strain, &p.dstrain, &p.state0)
}

/// ∂t/∂Δδ by num-dual (column-major), and the branch of every dual call.
fn dual_tangent<M: Model>(m: &M, p: &Point) -> (Vec<f64>, Vec<i32>) {
    let n = p.strain.len();
    let mut t = vec![0.0; n * n];
    let mut branches = Vec::new();
    for j in 0..n {
        let de: Vec<Dual64> = p
            .dstrain
            .iter()
            .enumerate()
            .map(|(k, &x)| Dual64::new(x, if k == j { 1.0 } else { 0.0 }))
            .collect();
        let out = eval(m, &lift(&p.props), &lift(&p.strain), &de, &lift(&p.state0));
        assert_eq!(out.outcome.status, 0, "{}", out.outcome.message_text());
        for i in 0..n {
            t[i + j * n] = out.stress[i].eps;
        }
        branches.push(out.outcome.branch);
    }
    (t, branches)
}

/// ∂t/∂Δδ by the complex step (Squire & Trapp 1998).
fn complex_tangent<M: Model>(m: &M, p: &Point, h: f64) -> Vec<f64> {
    let n = p.strain.len();
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        let de: Vec<Complex64> = p
            .dstrain
            .iter()
            .enumerate()
            .map(|(k, &x)| Complex64::new(x, if k == j { h } else { 0.0 }))
            .collect();
        let out = eval(m, &lift(&p.props), &lift(&p.strain), &de, &lift(&p.state0));
        for i in 0..n {
            t[i + j * n] = out.stress[i].im / h;
        }
    }
    t
}

fn norm(v: impl Iterator<Item = f64>) -> f64 {
    v.map(|x| x * x).sum::<f64>().sqrt()
}

fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d = norm(a.iter().zip(b).map(|(x, y)| x - y));
    let r = norm(b.iter().copied());
    if r == 0.0 {
        if d == 0.0 {
            0.0
        } else {
            f64::INFINITY
        }
    } else {
        d / r
    }
}

/// Relative error of a tangent (cohesive components carry no Mandel factor): the worse of
/// the whole matrix and the worst column. A zero reference demands an exact zero.
fn tangent_error(n: usize, got: &[f64], reference: &[f64]) -> f64 {
    let mut worst = rel(got, reference);
    for j in 0..n {
        worst = worst.max(rel(&got[j * n..(j + 1) * n], &reference[j * n..(j + 1) * n]));
    }
    worst
}

fn transpose(n: usize, t: &[f64]) -> Vec<f64> {
    let mut u = vec![0.0; n * n];
    for i in 0..n {
        for j in 0..n {
            u[i + j * n] = t[j + i * n];
        }
    }
    u
}

// ---------------------------------------------------------------------------------------
// The published law, written here again from its formulas (REFERENCES.md): β = δ_sh/δ₃.

/// AS4/PEEK (REFERENCES.md: from memory): K 1e6 N/mm³, N 80 MPa, S 100 MPa, G_Ic 0.969 N/mm,
/// G_IIc 1.719 N/mm, η 2.284.
const AS4_PEEK: [f64; 6] = [1e6, 80.0, 100.0, 0.969, 1.719, 2.284];

/// Onset δ₀ₘ, final δ_fm and G_c of the mixed-mode bilinear law for an open interface with
/// mode ratio β (Camanho & Dávila 2002; B-K 1996), or for pure shear (`beta = None`).
fn published(props: &[f64], beta: Option<f64>) -> (f64, f64, f64) {
    let [k, n, s, g1, g2, eta] = props[..] else { unreachable!() };
    let (d03, d0s) = (n / k, s / k);
    match beta {
        Some(b) => {
            let d0m = d03 * d0s * ((1.0 + b * b) / (d0s * d0s + b * b * d03 * d03)).sqrt();
            let gc = g1 + (g2 - g1) * (b * b / (1.0 + b * b)).powf(eta);
            (d0m, 2.0 * gc / (k * d0m), gc)
        }
        None => (d0s, 2.0 * g2 / s, g2),
    }
}

/// The separation at which damage d is reached on a proportional path,
/// λ(d) = δ_fm δ₀ₘ/(δ_fm − d (δ_fm − δ₀ₘ)): the inverse of the bilinear damage law
/// d = δ_fm (λ − δ₀ₘ)/(λ (δ_fm − δ₀ₘ)) of Camanho & Dávila 2002 (the law from memory; it is
/// not among the REFERENCES.md formulas).
fn lambda_of_damage(d0m: f64, dfm: f64, d: f64) -> f64 {
    dfm * d0m / (dfm - d * (dfm - d0m))
}

fn assert_printed(x: f64, printed: f64, half_unit: f64, what: &str) {
    assert!((x - printed).abs() <= half_unit, "{what} = {x:.10e}, printed {printed:e}");
}

// REFERENCES.md (AS4/PEEK data from memory; values derived from the formulas of Camanho &
// Dávila 2002 and B-K 1996): mode I δ₀ = 8.0e-5 mm, δ_f = 0.024225 mm; shear δ₀ = 1.0e-4 mm,
// δ_f = 0.03438 mm; β = 1: G_c = 1.12300 N/mm, δ₀ₘ = 8.8345e-5 mm, δ_fm = 0.025423 mm. The
// model's public law and the test's own transcription must both give them.
#[test]
fn mixed_mode_law_gives_the_derived_as4_peek_values() {
    let at = |b: f64| mode_mix(&AS4_PEEK, b);
    let m = at(0.0);
    assert_printed(m.onset, 8.0e-5, 5e-12, "mode I δ0");
    assert_printed(m.final_separation, 0.024225, 5e-7, "mode I δf");
    let m = at(1.0);
    assert_printed(m.onset, 1.0e-4, 5e-12, "shear δ0");
    assert_printed(m.final_separation, 0.03438, 5e-6, "shear δf");
    // β = 1 is the shear fraction B = β²/(1 + β²) = 1/2.
    let m = at(0.5);
    assert_printed(m.toughness, 1.12300, 5e-6, "β = 1 G_c");
    assert_printed(m.onset, 8.8345e-5, 5e-10, "β = 1 δ0m");
    assert_printed(m.final_separation, 0.025423, 5e-7, "β = 1 δfm");
    let (d0m, dfm, gc) = published(&AS4_PEEK, Some(1.0));
    assert_printed(gc, 1.12300, 5e-6, "β = 1 G_c (transcription)");
    assert_printed(d0m, 8.8345e-5, 5e-10, "β = 1 δ0m (transcription)");
    assert_printed(dfm, 0.025423, 5e-7, "β = 1 δfm (transcription)");
    for beta in [0.0, 0.3, 1.0, 2.5, 40.0] {
        let b = beta * beta / (1.0 + beta * beta);
        let (d0m, dfm, gc) = published(&AS4_PEEK, Some(beta));
        let m = at(b);
        assert!((m.onset - d0m).abs() <= 1e-14 * d0m && (m.final_separation - dfm).abs() <= 1e-13 * dfm);
        assert!((m.toughness - gc).abs() <= 1e-13 * gc, "β = {beta}");
    }
}

// The same values seen through the model's branches: just below the printed onset the point is
// undamaged (0), just above the damage grows (1); just below the printed final separation it
// still grows, just above it has failed (4). Mode I, shear (2D slip; 3D slips at 60° apart)
// and β = 1 (REFERENCES.md, derived; data from memory).
#[test]
fn branches_change_at_the_printed_separations() {
    let cases: [(&str, PointKind, [f64; 3], f64, f64); 5] = [
        ("mode I", PointKind::Cohesive2d, [1.0, 0.0, 0.0], 8.0e-5, 0.024225),
        ("shear 2D", PointKind::Cohesive2d, [-1e-3, 1.0, 0.0], 1.0e-4, 0.03438),
        ("shear 3D", PointKind::Cohesive3d, [-1e-3, 0.5, 0.75f64.sqrt()], 1.0e-4, 0.03438),
        ("β = 1, 2D", PointKind::Cohesive2d, [1.0, 1.0, 0.0], 8.8345e-5, 0.025423),
        ("β = 1, 3D", PointKind::Cohesive3d, [1.0, 0.6, 0.8], 8.8345e-5, 0.025423),
    ];
    for (what, kind, dir, d0, df) in cases {
        let m = Cohesive::new(kind).unwrap();
        let n = kind.ncomp();
        // λ counts the opening only when open; scale the direction to unit λ.
        let open = dir[0] > 0.0;
        let lam_dir = norm(dir.iter().enumerate().map(|(i, x)| if i == 0 && !open { 0.0 } else { *x }));
        let sep = |lam: f64| dir[..n].iter().map(|x| x * lam / lam_dir).collect::<Vec<f64>>();
        let branch_at = |lam: f64| run(&m, &Point::at(&AS4_PEEK, &sep(lam), [0.0, 0.0])).outcome.branch;
        // δ₀ = N/K is exact for the pure modes; the β = 1 onset and every δ_f are printed to 5
        // digits: step off by one unit (β = 1 onset) or two units of the last digit.
        let (u0, uf) = (if d0 == 8.8345e-5 { 1e-9 } else { 1e-12 }, if df == 0.03438 { 2e-5 } else { 2e-6 });
        assert_eq!(branch_at(d0 - u0), if open { branch::ELASTIC } else { branch::CLOSED }, "{what}");
        assert_eq!(branch_at(d0 + u0), branch::GROWTH, "{what}");
        assert_eq!(branch_at(df - uf), branch::GROWTH, "{what}");
        assert_eq!(branch_at(df + uf), branch::FAILED, "{what}");
    }
}

/// Drive a proportional path δ = s·dir (s from 0 to s_end in `steps` increments) and return
/// the work ∫ t·dδ by the trapezoid rule and the last outputs; the energy balance and the
/// monotone damage are checked at every step.
fn proportional_path(kind: PointKind, dir: &[f64], s_end: f64, steps: usize) -> (f64, Out<f64>) {
    let m = Cohesive::new(kind).unwrap();
    let n = kind.ncomp();
    let mut state = [0.0, 0.0];
    let mut strain = vec![0.0; n];
    let mut t_prev = vec![0.0; n];
    let mut work = 0.0;
    let mut last = None;
    for k in 1..=steps {
        let s = s_end * k as f64 / steps as f64;
        let sep: Vec<f64> = dir.iter().map(|x| x * s).collect();
        let dstrain: Vec<f64> = sep.iter().zip(&strain).map(|(a, b)| a - b).collect();
        let out = run(
            &m,
            &Point {
                props: AS4_PEEK.to_vec(),
                strain: strain.clone(),
                dstrain: dstrain.clone(),
                state0: state,
            },
        );
        assert_eq!(out.outcome.status, status::OK);
        for i in 0..n {
            work += 0.5 * (out.stress[i] + t_prev[i]) * dstrain[i];
        }
        // Energy balance: work done = stored + dissipated, to the trapezoid's accuracy.
        let tol = 2e-6 * AS4_PEEK[3];
        assert!(
            (work - out.energy[0] - out.energy[1]).abs() <= tol,
            "step {k}: balance {}",
            work - out.energy[0] - out.energy[1]
        );
        assert!(out.state[0] >= state[0], "damage never decreases");
        t_prev.clone_from(&out.stress);
        strain = sep;
        state = [out.state[0], out.state[1]];
        last = Some(out);
    }
    (work, last.unwrap())
}

// G_c = ½ t₀ δ_f, the area under the bilinear traction–separation curve (REFERENCES.md), for
// mode I (t₀ = N = 80 MPa, δ_f = 0.024225 mm: G_Ic = 0.969 N/mm), shear (S = 100 MPa,
// δ_f = 0.03438 mm: G_IIc = 1.719 N/mm) and β = 1 (G_c = 1.12300 N/mm): the work of a
// proportional path to failure, integrated numerically, and the dissipated energy the model
// accumulates. AS4/PEEK data from memory; δ_f and G_c derived.
#[test]
fn area_under_the_curve_is_the_toughness() {
    let steps = 20_000;
    let cases = [
        ("mode I", PointKind::Cohesive2d, vec![1.0, 0.0], 80.0, 0.024225, 0.969),
        ("shear", PointKind::Cohesive2d, vec![0.0, 1.0], 100.0, 0.03438, 1.719),
        ("shear 3D", PointKind::Cohesive3d, vec![0.0, 0.8, -0.6], 100.0, 0.03438, 1.719),
        ("β = 1", PointKind::Cohesive3d, vec![1.0 / 2f64.sqrt(), 0.5, 0.5], 0.0, 0.025423, 1.12300),
    ];
    for (what, kind, dir, t0, df, gc) in cases {
        // The exact G_c of this mixity from the published formulas, against the printed value.
        let open = dir[0] > 0.0;
        let beta = open.then(|| norm(dir[1..].iter().copied()) / dir[0]);
        let (_, _, gc_exact) = published(&AS4_PEEK, beta);
        assert!((gc_exact - gc).abs() <= 5e-6, "{what}: G_c = {gc_exact}, printed {gc}");
        if t0 > 0.0 {
            // ½ t₀ δ_f from the printed δ_f: G_c to the digits printed.
            assert!((0.5 * t0 * df - gc).abs() <= 0.5 * t0 * 5e-7, "{what}: ½ t0 δf = {}", 0.5 * t0 * df);
        }
        let (work, last) = proportional_path(kind, &dir, 1.2 * df, steps);
        // Trapezoid error at the two kinks ~ (1/8)|Δslope| h² ≈ 3e-7 N/mm at this step.
        assert!((work - gc_exact).abs() <= 1e-6, "{what}: ∫ t·dδ = {work}, G_c {gc_exact}");
        assert_eq!(last.outcome.branch, branch::FAILED, "{what}");
        assert_eq!(last.state[0], 1.0);
        // The increments of dissipation telescope to G_c on a proportional path (to the
        // rounding of 20 000 increments).
        assert!(
            (last.state[1] - gc_exact).abs() <= 1e-9 * gc_exact,
            "{what}: dissipated {} vs G_c {gc_exact}",
            last.state[1]
        );
        assert!(last.stress.iter().all(|t| *t == 0.0), "{what}: a failed open interface carries nothing");
    }
    // The peak traction of mode I is N, reached at δ₀ = N/K (the onset of the bilinear law).
    let m = Cohesive::new(PointKind::Cohesive2d).unwrap();
    let out = run(&m, &Point::at(&AS4_PEEK, &[8.0e-5, 0.0], [0.0, 0.0]));
    assert!((out.stress[0] - 80.0).abs() <= 1e-9 && out.outcome.branch == branch::ELASTIC);
    // Dissipation is exact for a proportional path (∫ ½ K λ² dd along the damage surface):
    // one increment straight to failure dissipates all of G_Ic.
    let out = run(&m, &Point::at(&AS4_PEEK, &[0.03, 0.0], [0.0, 0.0]));
    assert!((out.state[1] - mode_mix(&AS4_PEEK, 0.0).toughness).abs() <= 1e-15);
}

// Irreversibility, secant unloading and the contact penalty of the bilinear law (Camanho &
// Dávila 2002; from memory, not in REFERENCES.md): after damage d, unloading follows
// t = (1 − d) K δ with d kept; a negative opening is carried by the full K and adds no damage,
// even when the interface is damaged or failed.
#[test]
fn damage_is_irreversible_and_contact_uses_the_penalty() {
    let m = Cohesive::new(PointKind::Cohesive3d).unwrap();
    let k = AS4_PEEK[0];
    let (d0m, dfm, _) = published(&AS4_PEEK, Some(0.0));
    let lam = lambda_of_damage(d0m, dfm, 0.5);
    let loaded = run(&m, &Point::at(&AS4_PEEK, &[lam, 0.0, 0.0], [0.0, 0.0]));
    assert_eq!(loaded.outcome.branch, branch::GROWTH);
    assert!((loaded.state[0] - 0.5).abs() <= 1e-12);
    let state = [loaded.state[0], loaded.state[1]];
    // Unloading to half the separation, with a slip added: secant.
    let p = Point {
        props: AS4_PEEK.to_vec(),
        strain: vec![lam, 0.0, 0.0],
        dstrain: vec![-lam / 2.0, 1e-5, 0.0],
        state0: state,
    };
    let out = run(&m, &p);
    assert_eq!(out.outcome.branch, branch::UNLOADING);
    assert_eq!(out.state, state.to_vec());
    let kd = (1.0 - state[0]) * k;
    assert!((out.stress[0] - kd * lam / 2.0).abs() <= 1e-9 && (out.stress[1] - kd * 1e-5).abs() <= 1e-9);
    for i in 0..3 {
        for j in 0..3 {
            assert_eq!(out.tangent[i + 3 * j], if i == j { kd } else { 0.0 });
        }
    }
    // Closing: a negative opening far beyond δ_f carries K δ₃ and leaves d alone.
    for (d, expect) in [(0.0, branch::CLOSED), (state[0], branch::CLOSED), (1.0, branch::FAILED)] {
        let out = run(&m, &Point::at(&AS4_PEEK, &[-10.0 * dfm, 2e-5, 0.0], [d, 0.3]));
        assert_eq!(out.outcome.branch, expect);
        assert_eq!(out.state, vec![d, 0.3]);
        assert!((out.stress[0] + 10.0 * k * dfm).abs() <= 1e-9);
        assert_eq!(out.tangent[0], k);
        assert!((out.stress[1] - (1.0 - d) * k * 2e-5).abs() <= 1e-9);
    }
    // The failed interface: no traction when open.
    let out = run(&m, &Point::at(&AS4_PEEK, &[1e-4, 1e-4, 0.0], [1.0, 1.0]));
    assert_eq!((out.outcome.branch, out.stress.clone()), (branch::FAILED, vec![0.0; 3]));
    assert!(out.tangent.iter().all(|x| *x == 0.0));
    assert!(out.outcome.provides(provides::ENERGY) && !out.outcome.provides(provides::DSTRESS_DTEMP));
}

// ---------------------------------------------------------------------------------------
// Random states in every branch.

/// Random states per branch and kind.
const STATES: usize = 1200;
/// Analytic tangent against num-dual (relative, whole matrix and worst column).
const DUAL_TOL: f64 = 1e-12;
/// Complex step (h = 1e-30) against num-dual.
const COMPLEX_TOL: f64 = 1e-12;
/// Relative distance kept from every branch boundary (damage, onset, failure, zero opening).
const GAP: f64 = 1e-3;

/// The five branches, by id.
const BRANCHES: [i32; 5] =
    [branch::ELASTIC, branch::GROWTH, branch::UNLOADING, branch::CLOSED, branch::FAILED];

/// Random properties near composite interface values, with 2 G K > max(N, S)² by a margin so
/// that δ_fm > δ₀ₘ at every mixity.
fn random_props(rng: &mut StdRng) -> Vec<f64> {
    if rng.gen_bool(0.2) {
        return AS4_PEEK.to_vec();
    }
    vec![
        rng.gen_range(1e5..5e6),
        rng.gen_range(20.0..100.0),
        rng.gen_range(30.0..150.0),
        rng.gen_range(0.2..1.5),
        rng.gen_range(0.5..3.0),
        rng.gen_range(1.0..3.0),
    ]
}

/// Which shape of separation a state takes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Mode {
    /// Opening only.
    PureOpening,
    /// Closed (negative opening) with one slip (2D, or 3D with the second slip zero).
    ClosedOneSlip,
    /// Closed with slips in both directions (3D) — in 2D the same as `ClosedOneSlip`.
    ClosedShear,
    /// Open with slip: mixed mode.
    Mixed,
}

/// A random unit-λ direction of the given mode: (direction, β or None for closed).
fn random_direction(rng: &mut StdRng, n: usize, mode: Mode) -> (Vec<f64>, Option<f64>) {
    let mut dir = vec![0.0; n];
    match mode {
        Mode::PureOpening => dir[0] = 1.0,
        Mode::ClosedOneSlip | Mode::ClosedShear => {
            let slot = if n == 3 && rng.gen_bool(0.5) { 2 } else { 1 };
            dir[slot] = if rng.gen_bool(0.5) { 1.0 } else { -1.0 };
            if mode == Mode::ClosedShear && n == 3 {
                let a: f64 = rng.gen_range(0.1..1.47) * if rng.gen_bool(0.5) { 1.0 } else { -1.0 };
                dir[1] = a.cos();
                dir[2] = a.sin();
            }
            dir[0] = -rng.gen_range(0.0..10.0) - GAP; // any closing, away from zero
        }
        Mode::Mixed => {
            // Mode ratio β log-uniform over [0.02, 50], slip direction random.
            let beta = 10f64.powf(rng.gen_range(-1.7..1.7));
            let a: f64 = rng.gen_range(0.0..std::f64::consts::TAU);
            dir[0] = 1.0 / (1.0 + beta * beta).sqrt();
            let sh = beta * dir[0];
            if n == 3 {
                dir[1] = sh * a.cos();
                dir[2] = sh * a.sin();
            } else {
                dir[1] = if a.cos() < 0.0 { -sh } else { sh };
            }
            return (dir, Some(beta));
        }
    }
    (dir, if mode == Mode::PureOpening { Some(0.0) } else { None })
}

/// A random call meant to land on `target` (0–4), away from the branch boundaries by `GAP`.
fn random_point(rng: &mut StdRng, n: usize, target: i32) -> (Point, Mode) {
    let props = random_props(rng);
    let open_modes = [Mode::PureOpening, Mode::Mixed, Mode::Mixed, Mode::Mixed];
    let closed_modes = [Mode::ClosedOneSlip, Mode::ClosedShear];
    let mode = match target {
        branch::ELASTIC | branch::UNLOADING => open_modes[rng.gen_range(0..4)],
        branch::CLOSED => closed_modes[rng.gen_range(0..2)],
        _ => [Mode::PureOpening, Mode::Mixed, Mode::Mixed, Mode::ClosedOneSlip, Mode::ClosedShear]
            [rng.gen_range(0..5)],
    };
    let (dir, beta) = random_direction(rng, n, mode);
    let (d0m, dfm, _) = published(&props, beta);
    let u = |rng: &mut StdRng, a: f64, b: f64| rng.gen_range(a..b);
    let (d_old, lam) = match target {
        branch::ELASTIC => (0.0, d0m * u(rng, 0.01, 1.0 - GAP)),
        branch::GROWTH => {
            let d_old = if rng.gen_bool(0.3) { 0.0 } else { u(rng, 0.0, 0.95) };
            let d_new = u(rng, d_old + GAP, 1.0 - GAP);
            (d_old, lambda_of_damage(d0m, dfm, d_new))
        }
        branch::UNLOADING => {
            let d_old = u(rng, GAP, 1.0 - GAP);
            (d_old, lambda_of_damage(d0m, dfm, d_old) * u(rng, 0.01, 1.0 - GAP))
        }
        branch::CLOSED => {
            let d_old = if rng.gen_bool(0.3) { 0.0 } else { u(rng, GAP, 1.0 - GAP) };
            (d_old, lambda_of_damage(d0m, dfm, d_old) * u(rng, 0.01, 1.0 - GAP))
        }
        _ => {
            if rng.gen_bool(0.5) {
                (1.0, dfm * u(rng, 0.01, 3.0))
            } else {
                (if rng.gen_bool(0.5) { 0.0 } else { u(rng, 0.0, 1.0) }, dfm * u(rng, 1.0 + GAP, 3.0))
            }
        }
    };
    // dir has unit λ (λ counts the opening only when open); scale the closing with λ too.
    let sep: Vec<f64> = dir.iter().map(|x| x * lam).collect();
    let frac: Vec<f64> = (0..n).map(|_| u(rng, -0.5, 1.5)).collect();
    let dstrain: Vec<f64> = sep.iter().zip(&frac).map(|(s, f)| s * f).collect();
    let strain: Vec<f64> = sep.iter().zip(&dstrain).map(|(s, d)| s - d).collect();
    let dissipated = u(rng, 0.0, 2.0);
    (Point { props, strain, dstrain, state0: [d_old, dissipated] }, mode)
}

// The tangent against num-dual (an independent library's forward-mode derivative), and the
// complex step against num-dual, at random states in every branch of both kinds; each branch
// must be reached by at least 1000 states; the mixed-mode growth tangent must be
// unsymmetric (Camanho & Dávila 2002 with the mixity-dependent δ₀ₘ, δ_fm).
#[test]
fn tangent_is_the_derivative_of_the_update_in_every_branch() {
    let mut rng = StdRng::seed_from_u64(0xc0e5_0001);
    for kind in Cohesive::KINDS {
        let m = Cohesive::new(kind).unwrap();
        let n = kind.ncomp();
        let mut count = [0usize; 5];
        let mut worst = [0.0f64; 2];
        let (mut mixed_growth, mut unsymmetric) = (0, 0);
        for target in BRANCHES {
            for k in 0..STATES {
                let (p, mode) = random_point(&mut rng, n, target);
                let out = run(&m, &p);
                let what = format!("cohesive {kind} target {target} #{k} {mode:?} {p:?}");
                assert_eq!(out.outcome.status, status::OK, "{what}: {}", out.outcome.message_text());
                assert_eq!(out.outcome.branch, target, "{what}");
                assert!(
                    out.stress.iter().chain(&out.state).chain(&out.tangent).all(|x| x.is_finite()),
                    "{what}"
                );
                let (dual, branches) = dual_tangent(&m, &p);
                assert!(branches.iter().all(|&b| b == target), "{what}: dual branch {branches:?}");
                // num-dual, independent library: ∂t/∂Δδ.
                let e = tangent_error(n, &out.tangent, &dual);
                assert!(e <= DUAL_TOL, "{what}: tangent vs num-dual {e:.3e}\n{:?}\n{dual:?}", out.tangent);
                // Complex step (Squire & Trapp 1998) against num-dual.
                let c = tangent_error(n, &complex_tangent(&m, &p, 1e-30), &dual);
                assert!(c <= COMPLEX_TOL, "{what}: complex vs num-dual {c:.3e}");
                worst = [worst[0].max(e), worst[1].max(c)];
                count[target as usize] += 1;
                if target == branch::GROWTH && mode == Mode::Mixed {
                    mixed_growth += 1;
                    if rel(&transpose(n, &dual), &dual) > 1e-3 {
                        unsymmetric += 1;
                    }
                }
            }
        }
        eprintln!(
            "cohesive {kind}: branches {count:?}; worst tangent vs dual {:.1e}, complex vs dual {:.1e}; \
             {unsymmetric}/{mixed_growth} mixed-mode growth tangents unsymmetric by > 1e-3",
            worst[0], worst[1]
        );
        assert!(count.iter().all(|&c| c >= 1000), "{kind}: {count:?}");
        assert!(unsymmetric * 10 >= mixed_growth * 5, "{kind}: {unsymmetric}/{mixed_growth}");
    }
}

/// The secant (1 − d) K on the diagonal, K in the normal entry when closed.
fn secant(n: usize, p: &Point, d: f64) -> Vec<f64> {
    let k = p.props[0];
    let mut s = vec![0.0; n * n];
    for i in 0..n {
        let closed = i == 0 && p.strain[0] + p.dstrain[0] < 0.0;
        s[i + i * n] = if closed { k } else { (1.0 - d) * k };
    }
    s
}

/// The diagonal part of a tangent: the correct tangent without the off-diagonal terms, which
/// all come from damage growth (the secant is diagonal).
fn diagonal(n: usize, tangent: &[f64]) -> Vec<f64> {
    let mut t = vec![0.0; n * n];
    for i in 0..n {
        t[i + i * n] = tangent[i + i * n];
    }
    t
}

// Each flawed variant against num-dual: it agrees (1e-12) on the branches and modes it does
// not target, and where it is wrong its error is the one its flaw predicts from the exact
// (num-dual) tangent D: secant ‖S − D‖/‖D‖, no coupling ‖diag-growth − D‖/‖D‖, transposed
// ‖Dᵀ − D‖/‖D‖, symmetrized ‖½(D + Dᵀ) − D‖/‖D‖ — and large.
#[test]
fn flawed_variants_are_wrong_where_they_should_be_only() {
    let mut rng = StdRng::seed_from_u64(0xc0e5_0002);
    for kind in Cohesive::KINDS {
        let n = kind.ncomp();
        for flaw in [
            CohesiveFlaw::Secant,
            CohesiveFlaw::NoCoupling,
            CohesiveFlaw::Transposed,
            CohesiveFlaw::Symmetrized,
        ] {
            let m = Cohesive::with_flaw(kind, flaw).unwrap();
            let good = Cohesive::new(kind).unwrap();
            let (mut wrong, mut right, mut large) = (0, 0, 0);
            for target in BRANCHES {
                for k in 0..STATES / 2 {
                    let (p, mode) = random_point(&mut rng, n, target);
                    let out = run(&m, &p);
                    let reference = run(&good, &p);
                    assert_eq!((out.stress.clone(), out.state.clone()), (reference.stress, reference.state));
                    let (dual, _) = dual_tangent(&m, &p);
                    let e = tangent_error(n, &out.tangent, &dual);
                    let what = format!("{} {kind} branch {target} #{k} {mode:?}", m.info().name);
                    // Pure-mode growth with a single nonzero component (2D closed shear has one slip).
                    let single = mode == Mode::PureOpening
                        || mode == Mode::ClosedOneSlip
                        || n == 2 && mode == Mode::ClosedShear;
                    let targeted = target == branch::GROWTH
                        && match flaw {
                            CohesiveFlaw::Secant => true,
                            CohesiveFlaw::NoCoupling => !single,
                            CohesiveFlaw::Transposed | CohesiveFlaw::Symmetrized => mode == Mode::Mixed,
                            CohesiveFlaw::None => false,
                        };
                    if !targeted {
                        assert!(e <= DUAL_TOL, "{what}: should agree, error {e:.3e}");
                        right += 1;
                        continue;
                    }
                    wrong += 1;
                    let sec = secant(n, &p, out.state[0]);
                    let flawed = match flaw {
                        CohesiveFlaw::Secant => sec,
                        CohesiveFlaw::NoCoupling => diagonal(n, &dual),
                        CohesiveFlaw::Symmetrized => {
                            let t = transpose(n, &dual);
                            dual.iter().zip(&t).map(|(a, b)| 0.5 * (a + b)).collect()
                        }
                        _ => transpose(n, &dual),
                    };
                    let predicted = tangent_error(n, &flawed, &dual);
                    assert!(
                        (e - predicted).abs() <= 1e-9 * predicted,
                        "{what}: error {e:.6e}, predicted {predicted:.6e}"
                    );
                    assert!(e > 1e-9, "{what}: the flaw is invisible ({e:.3e})");
                    if e > 1e-3 {
                        large += 1;
                    }
                }
            }
            eprintln!(
                "{} {kind}: {right} states agree, {wrong} targeted ({large} with error > 1e-3)",
                m.info().name
            );
            assert!(wrong >= STATES / 10 && right >= STATES, "{wrong} {right}");
            assert!(
                large * 10 >= wrong * 7,
                "{}: too few show the flaw clearly: {large}/{wrong}",
                m.info().name
            );
        }
    }
}

// ---------------------------------------------------------------------------------------

fn allocations() -> usize {
    ALLOCATIONS.with(|c| c.get())
}

fn count_allocations<S: Scalar>(m: &Cohesive, p: &Point) -> (usize, i32) {
    let n = p.strain.len();
    let (props, strain, dstrain, state0) =
        (lift::<S>(&p.props), lift::<S>(&p.strain), lift::<S>(&p.dstrain), lift::<S>(&p.state0));
    let stress0 = vec![S::zero(); n];
    let nan = S::cst(f64::NAN);
    let (mut stress, mut state, mut tangent, mut dtemp) =
        (vec![nan; n], vec![nan; 2], vec![nan; n * n], vec![nan; n]);
    let mut energy = [nan; 2];
    let mut outcome = Outcome::default();
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp: [S::zero(); 2],
        stress0: &stress0,
        state0: &state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    let before = allocations();
    for _ in 0..5 {
        let mut output = CallOutput {
            stress: &mut stress,
            state: &mut state,
            tangent: &mut tangent,
            dstress_dtemp: &mut dtemp,
            energy: &mut energy,
            outcome: &mut outcome,
        };
        m.evaluate(&input, &mut output).unwrap();
    }
    (allocations() - before, outcome.branch)
}

// One call allocates nothing, in every branch, every flaw, every scalar type, and on the
// failure path (DEVELOPERS.md: the hot path).
#[test]
fn no_call_allocates() {
    let mut rng = StdRng::seed_from_u64(0xc0e5_0003);
    for kind in Cohesive::KINDS {
        for flaw in
            [CohesiveFlaw::None, CohesiveFlaw::Secant, CohesiveFlaw::NoCoupling, CohesiveFlaw::Transposed]
        {
            let m = Cohesive::with_flaw(kind, flaw).unwrap();
            for target in BRANCHES {
                let (p, _) = random_point(&mut rng, kind.ncomp(), target);
                assert_eq!(count_allocations::<f64>(&m, &p), (0, target));
                assert_eq!(count_allocations::<Dual64>(&m, &p), (0, target));
                assert_eq!(count_allocations::<Complex64>(&m, &p), (0, target));
            }
            let mut p = Point::at(&AS4_PEEK, &vec![1e-4; kind.ncomp()], [0.0, 0.0]);
            p.props[5] = 0.5;
            assert_eq!(count_allocations::<f64>(&m, &p), (0, -1));
        }
    }
}

#[test]
fn bad_properties_states_and_kinds_are_refused() {
    let m = Cohesive::new(PointKind::Cohesive2d).unwrap();
    let with = |i: usize, x: f64| {
        let mut p = AS4_PEEK.to_vec();
        p[i] = x;
        p
    };
    for (props, state0, needle) in [
        (with(0, 0.0), [0.0, 0.0], "K (properties[0])"),
        (with(1, -1.0), [0.0, 0.0], "strengths"),
        (with(4, 0.0), [0.0, 0.0], "G_Ic, G_IIc"),
        (with(5, 0.9), [0.0, 0.0], "eta"),
        (with(0, 1.0), [0.0, 0.0], "2 G_c K"),
        (AS4_PEEK.to_vec(), [1.5, 0.0], "damage"),
        (AS4_PEEK.to_vec(), [0.2, f64::NAN], "dissipated"),
    ] {
        let out = run(&m, &Point { props, strain: vec![0.0; 2], dstrain: vec![1e-5, 0.0], state0 });
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains(needle), "{needle}: {}", out.outcome.message_text());
        assert!(out.stress.iter().chain(&out.tangent).chain(&out.state).all(|x| x.is_nan()));
    }
    assert!(Cohesive::new(PointKind::Solid3d).is_err());
    for (name, flaw) in [
        ("cohesive", CohesiveFlaw::None),
        ("cohesive-secant", CohesiveFlaw::Secant),
        ("cohesive-no-coupling", CohesiveFlaw::NoCoupling),
        ("cohesive-transposed", CohesiveFlaw::Transposed),
    ] {
        let any = AnyModel::new(name, PointKind::Cohesive3d).unwrap();
        assert_eq!((any.info().name.as_str(), any.info().nprop, any.info().nstate), (name, 6, 2));
        assert_eq!(Cohesive::name_of(flaw), name);
    }
}
