//! The compiled zoo: the C and Fortran versions of the zoo routines give the stress, state,
//! tangent and outcome of the Rust models of the same names (tancheck-models, zoo) to 1e-12
//! relative, at random states in every kind they support, and their complex-step twins give
//! the same derivative of the stress as the Rust models' complex step (Squire & Trapp 1998,
//! SIAM Review 40(1):110–112).
//!
//! The Fortran half is ignored ("needs gfortran", cfg set by build.rs) without gfortran, and
//! runs (failing if it cannot build) when TANCHECK_REQUIRE_FORTRAN=1 (as in CI).

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use num_complex::Complex64;
use tancheck::abi::{build_library, BuildOptions, Library, LibraryRoutine};
use tancheck::core::{CallInput, CallOutput, ComplexRoutine, Fault, ModelRoutine, Outcome, Routine};
use tancheck::models::zoo::{zoo, zoo_model, ZooEntry, ZooModel, C_SOURCES, FORTRAN_SOURCES};

/// Agreement of a compiled routine with its Rust model (relative to each array's size).
const TOL: f64 = 1e-12;
/// Agreement of the complex-step derivatives (two codes, the same function).
const TWIN_TOL: f64 = 1e-10;
/// Random points per routine and kind.
const POINTS: usize = 200;

fn repo() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn build(sources: &[&str], name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("tancheck-compiled-zoo-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join(format!("lib{name}.so"));
    let sources: Vec<PathBuf> = sources.iter().map(|s| repo().join(s)).collect();
    build_library(&BuildOptions::new(sources, &out))
        .unwrap_or_else(|e| panic!("building the {name} zoo: {e}"));
    out
}

fn c_library() -> &'static Path {
    static LIB: OnceLock<PathBuf> = OnceLock::new();
    LIB.get_or_init(|| build(&C_SOURCES, "zoo-c"))
}

/// A small deterministic generator (xorshift64*), so that this test needs no extra crate.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
    }
    fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.next()
    }
    fn chance(&mut self, p: f64) -> bool {
        self.next() < p
    }
}

/// The real inputs of one call.
#[derive(Clone, Debug)]
struct Point {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    stress0: Vec<f64>,
    state0: Vec<f64>,
}

/// A random J2 point: a prior plastic state (or the virgin one) with the start stress near the
/// yield surface, an increment that is elastic or plastic, and for `j2-stale` random kept
/// moduli [1 − θ, θ̄].
fn j2_point(rng: &mut Rng, n: usize, nstate: usize) -> Point {
    let e = rng.range(70_000.0, 210_000.0);
    let nu = rng.range(0.0, 0.45);
    let sy0 = rng.range(100.0, 500.0);
    let hardening = [
        [1500.0, 0.0, 0.0, 0.0],
        [0.0, 180.0, 120.0, 0.0],
        [0.0, 0.0, 0.0, 25_000.0],
        [900.0, 120.0, 60.0, 7000.0],
    ];
    let [h_iso, q, b, h_kin] = hardening[(rng.next() * 4.0) as usize % 4];
    let eps_y = sy0 / e;
    let shear = |i: usize| if i >= 3 { 2.0 } else { 1.0 };
    let virgin = rng.chance(0.3);
    let mut state0 = vec![0.0; nstate];
    if !virgin {
        // A deviatoric εp (engineering shear), α above its equivalent strain, β along εp.
        let mut d: Vec<f64> = (0..n).map(|_| rng.range(-1.0, 1.0) * eps_y * 5.0).collect();
        let mean = (d[0] + d[1] + d[2]) / 3.0;
        for x in d.iter_mut().take(3) {
            *x -= mean;
        }
        let norm: f64 = d.iter().enumerate().map(|(i, x)| x * x / shear(i)).sum::<f64>().sqrt();
        state0[..n].copy_from_slice(&d);
        state0[n] = (2.0f64 / 3.0).sqrt() * norm * rng.range(1.0, 3.0);
        for i in 0..n {
            state0[n + 1 + i] = 2.0 / 3.0 * h_kin * d[i] / shear(i) * rng.range(0.5, 1.0);
        }
    }
    if nstate > 2 * n + 1 {
        state0[2 * n + 1] = rng.range(0.0, 0.6);
        state0[2 * n + 2] = rng.range(0.0, 1.0);
    }
    // Start strain: εp plus an elastic strain of stress size about the yield stress.
    let strain: Vec<f64> = (0..n).map(|i| state0[i] + rng.range(-1.0, 1.0) * eps_y * shear(i)).collect();
    let size = eps_y * 10f64.powf(rng.range(-2.0, 0.5));
    let dstrain: Vec<f64> = (0..n).map(|_| rng.range(-1.0, 1.0) * size).collect();
    Point { props: vec![e, nu, sy0, h_iso, q, b, h_kin], strain, dstrain, stress0: vec![0.0; n], state0 }
}

/// A random elastic or bimodulus point; for three properties ε11 at the end is zero exactly
/// in a fifth of the points (the kink).
fn elastic_point(rng: &mut Rng, n: usize, nprop: usize, nstate: usize) -> Point {
    let e = rng.range(10_000.0, 300_000.0);
    let nu = rng.range(-0.5, 0.45);
    let props = if nprop == 3 { vec![e, e * rng.range(0.1, 3.0), nu] } else { vec![e, nu] };
    let strain: Vec<f64> = (0..n).map(|_| rng.range(-2e-3, 2e-3)).collect();
    let mut dstrain: Vec<f64> = (0..n).map(|_| rng.range(-1e-3, 1e-3)).collect();
    if nprop == 3 && rng.chance(0.2) {
        dstrain[0] = -strain[0];
    }
    let stress0 = (0..n).map(|_| rng.range(-100.0, 100.0)).collect();
    Point { props, strain, dstrain, stress0, state0: vec![0.0; nstate] }
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

fn call_real(r: &mut dyn Routine, p: &Point) -> Result<Out<f64>, Fault> {
    let info = r.info().clone();
    let n = info.convention.ncomp();
    let nan = f64::NAN;
    let mut out = Out {
        stress: vec![nan; n],
        state: vec![nan; info.nstate],
        tangent: vec![nan; n * n],
        energy: [nan; 2],
        outcome: Outcome::default(),
    };
    let mut dtemp = vec![nan; n];
    let input = CallInput {
        props: &p.props,
        strain: &p.strain,
        dstrain: &p.dstrain,
        temp: [293.15, 0.0],
        stress0: &p.stress0,
        state0: &p.state0,
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
    r.call(&input, &mut output)?;
    Ok(out)
}

/// Im σ(Δε + i h eⱼ)/h for every column j: the complex-step derivative of the stress.
fn complex_step(r: &mut dyn ComplexRoutine, info: &tancheck::core::RoutineInfo, p: &Point) -> Vec<f64> {
    let n = info.convention.ncomp();
    let h = 1e-30;
    let cx = |v: &[f64]| -> Vec<Complex64> { v.iter().map(|&x| Complex64::new(x, 0.0)).collect() };
    let (props, strain, stress0, state0) = (cx(&p.props), cx(&p.strain), cx(&p.stress0), cx(&p.state0));
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        let mut dstrain = cx(&p.dstrain);
        dstrain[j].im = h;
        let nan = Complex64::new(f64::NAN, f64::NAN);
        let (mut stress, mut state, mut tangent, mut dtemp) =
            (vec![nan; n], vec![nan; info.nstate], vec![nan; n * n], vec![nan; n]);
        let mut energy = [nan; 2];
        let mut outcome = Outcome::default();
        let input = CallInput {
            props: &props,
            strain: &strain,
            dstrain: &dstrain,
            temp: [Complex64::new(293.15, 0.0), Complex64::new(0.0, 0.0)],
            stress0: &stress0,
            state0: &state0,
            time: [0.0, 1.0],
            increment: 1,
            want_tangent: true,
        };
        let mut output = CallOutput {
            stress: &mut stress,
            state: &mut state,
            tangent: &mut tangent,
            dstress_dtemp: &mut dtemp,
            energy: &mut energy,
            outcome: &mut outcome,
        };
        r.call_complex(&input, &mut output).expect("complex call");
        for i in 0..n {
            t[i + j * n] = stress[i].im / h;
        }
    }
    t
}

fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0, |m, x| m.max(x.abs()))
}

/// max |a − b| ≤ tol · max(max |b|, floor).
fn assert_close(a: &[f64], b: &[f64], tol: f64, floor: f64, what: &str) {
    assert_eq!(a.len(), b.len(), "{what}");
    let scale = max_abs(b).max(floor);
    let worst = a.iter().zip(b).fold(0.0f64, |m, (x, y)| m.max((x - y).abs()));
    assert!(
        worst <= tol * scale,
        "{what}: off by {:.3e} relative\n  got  {a:?}\n  want {b:?}",
        worst / scale
    );
}

/// Compare the compiled routine `symbol` with the Rust model of `entry`, every kind.
fn compare(lib: &Library, entry: &ZooEntry, symbol: &str, seed: u64) -> usize {
    let mut rng = Rng(seed);
    let mut compared = 0;
    for &kind in entry.kinds {
        let mut model: ModelRoutine<ZooModel> = zoo_model(entry.name, kind).unwrap();
        let info = model.info().clone();
        let mut compiled: LibraryRoutine = lib.routine(symbol, info.clone()).unwrap();
        let n = kind.ncomp();
        let mut branches = [0usize; 2];
        for k in 0..POINTS {
            let p = if info.nprop == 7 {
                j2_point(&mut rng, n, info.nstate)
            } else {
                elastic_point(&mut rng, n, info.nprop, info.nstate)
            };
            let what = format!("{symbol} vs {} {kind} #{k}", entry.name);
            let want = call_real(&mut model, &p).unwrap_or_else(|e| panic!("{what}: Rust {e}"));
            let got = call_real(&mut compiled, &p).unwrap_or_else(|e| panic!("{what}: compiled {e}"));
            assert_eq!(got.outcome.branch, want.outcome.branch, "{what}: branch");
            assert_eq!(got.outcome.provides, want.outcome.provides, "{what}: provides");
            branches[want.outcome.branch.clamp(0, 1) as usize] += 1;
            assert_close(&got.stress, &want.stress, TOL, 1.0, &format!("{what}: stress"));
            assert_close(&got.tangent, &want.tangent, TOL, 1.0, &format!("{what}: tangent"));
            if info.nprop == 7 {
                // State blocks of J2: εp, α, β, then the kept moduli of j2-stale. Each block is
                // compared relative to its size or a floor of its own units (1e-3 strain, 1 MPa),
                // so a barely plastic step (εp ~ 1e-8, where the radial return's last digits
                // cancel) is judged on absolute agreement to 1e-15 rather than relative.
                for (lo, hi, name, floor) in
                    [(0, n, "eps_p", 1e-3), (n, n + 1, "alpha", 1e-3), (n + 1, 2 * n + 1, "beta", 1.0)]
                {
                    assert_close(
                        &got.state[lo..hi],
                        &want.state[lo..hi],
                        TOL,
                        floor,
                        &format!("{what}: {name}"),
                    );
                }
                assert_close(
                    &got.state[2 * n + 1..],
                    &want.state[2 * n + 1..],
                    TOL,
                    1.0,
                    &format!("{what}: moduli"),
                );
            } else {
                assert_eq!(got.state, want.state, "{what}: state");
            }
            if want.outcome.provides & 2 != 0 {
                assert_close(&got.energy, &want.energy, TOL, 1e-12, &format!("{what}: energy"));
            }
            // The broken twins (twin-*) are broken on purpose, and differently in each language
            // (a conjugate or a real-only square root where each can write one): their real
            // outputs are compared above, their complex steps are not.
            if k % 10 == 0 && !entry.name.starts_with("twin-") {
                let d_want = complex_step(model.complex().unwrap(), &info, &p);
                let d_got = complex_step(compiled.complex().expect("the twin is built"), &info, &p);
                assert_close(&d_got, &d_want, TWIN_TOL, 1.0, &format!("{what}: complex step"));
            }
            compared += 1;
        }
        eprintln!("{symbol} {kind}: {POINTS} points, branches {branches:?}");
        assert!(
            branches[0] >= POINTS / 10 && branches[1] >= POINTS / 10 || info.nprop == 2,
            "{symbol} {kind}: {branches:?}"
        );
    }
    compared
}

#[test]
fn c_zoo_matches_the_rust_models() {
    let lib = Library::open(c_library()).unwrap();
    let mut symbols = 0;
    // The thermo and cohesive rows are compared in tests/compiled_thermo_cohesive.rs.
    for (k, entry) in
        zoo().iter().filter(|e| !e.name.starts_with("thermo") && !e.name.starts_with("cohesive")).enumerate()
    {
        let Some(symbol) = entry.c_symbol else { continue };
        assert!(lib.has_symbol(symbol) && lib.has_symbol(&format!("{symbol}_cx")), "{symbol} missing");
        compare(&lib, entry, symbol, 0x5eed_0100 + k as u64);
        symbols += 1;
    }
    assert!(symbols >= 12, "{symbols} C routines compared");
}

// The routines that need six components refuse four with a failed status and a message
// instead of writing past the 4×4 tangent.
#[test]
fn c_zoo_refuses_kinds_it_lacks() {
    let lib = Library::open(c_library()).unwrap();
    let info = zoo_model("j2", tancheck::core::PointKind::PlaneStrain).unwrap().info().clone();
    for symbol in ["c_j2_shear_permuted", "c_j2_one_column"] {
        let mut r = lib.routine(symbol, info.clone()).unwrap();
        let mut rng = Rng(7);
        let p = j2_point(&mut rng, 4, 9);
        match call_real(&mut r, &p) {
            Err(Fault::Status { status: 2, message, .. }) => {
                assert!(message.contains("ncomp must be 6"), "{symbol}: {message}")
            }
            other => panic!("{symbol}: {other:?}"),
        }
    }
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_zoo_matches_the_rust_models() {
    let out = build(&FORTRAN_SOURCES, "zoo-fortran");
    let lib = Library::open(&out).unwrap();
    let mut symbols = 0;
    // The thermo and cohesive rows are compared in tests/compiled_thermo_cohesive.rs.
    for (k, entry) in
        zoo().iter().filter(|e| !e.name.starts_with("thermo") && !e.name.starts_with("cohesive")).enumerate()
    {
        let Some(symbol) = entry.fortran_symbol else { continue };
        assert!(lib.has_symbol(symbol) && lib.has_symbol(&format!("{symbol}_cx")), "{symbol} missing");
        compare(&lib, entry, symbol, 0x5eed_0200 + k as u64);
        symbols += 1;
    }
    assert!(symbols >= 7, "{symbols} Fortran routines compared");
}
