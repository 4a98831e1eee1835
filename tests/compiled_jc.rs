//! The C and Fortran Johnson–Cook point routines (fortran-shim/examples/c/jc.c,
//! fortran/jc.F90: `*_jc` and the flawed `*_jc_no_rate_term`), compiled, loaded and called
//! through the guarded shim, give the same stress, state, tangent and ∂σ/∂ΔT as the Rust models
//! `johnson-cook` / `johnson-cook-no-rate-term`, and their complex twins the same
//! complex-step derivatives, along random walks with random time increments (none, the rate floor
//! to fast)
//! and temperatures.
//!
//! The Rust model is tied to the published Johnson–Cook values of REFERENCES.md and to num-dual
//! in crates/tancheck-models/tests/johnson_cook.rs.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use num_complex::Complex64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::core::driver::Outputs as Out;
use tancheck::core::{CallInput, PointKind, Routine};
use tancheck::models::reference;

/// Agreement asked of the compiled routines (relative, whole array). Looser than the 1e-12 of
/// the J2 comparison: the bracketed return map of a step barely past yield from ε̄p = 0 is
/// settled by rounding, and the tangent there is very sensitive to where (the slope
/// nBε̄pⁿ⁻¹ of the law).
const TOL: f64 = 1e-10;

fn shim() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples")
}

fn build(name: &str, sources: &[&str]) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("tancheck-root-test-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join(format!("lib{name}.so"));
    build_library(&BuildOptions::new(sources.iter().map(|s| shim().join(s)), &out))
        .unwrap_or_else(|e| panic!("building {name}: {e}"));
    out
}

fn c_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("jc_c", &["c/jc.c"]))
}

fn f_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("jc_f", &["fortran/jc.F90"]))
}

/// 4340 steel of REFERENCES.md (Johnson–Cook constants, read, secondary) with typical E, ν,
/// T_r, reference rate, density, heat capacity and χ = 0.9 (common practice).
const STEEL: [f64; 18] = [
    200_000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
    -2.12, 0.002, 0.61,
];
/// OFHC copper of REFERENCES.md (read, secondary), other entries as for STEEL.
const COPPER: [f64; 18] = [
    124_000.0, 0.34, 90.0, 292.0, 0.31, 0.025, 1.09, 293.0, 1356.0, 1.0, 8.96e-9, 3.83e8, 0.9, 0.54, 4.89,
    -3.03, 0.014, 1.12,
];

struct Call {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    stress0: Vec<f64>,
    state0: Vec<f64>,
    temp: [f64; 2],
    dtime: f64,
}

fn call(r: &mut dyn Routine, c: &Call) -> Out<f64> {
    let mut o = Out::new(c.strain.len(), c.state0.len(), f64::NAN);
    let input = CallInput {
        props: &c.props,
        strain: &c.strain,
        dstrain: &c.dstrain,
        temp: c.temp,
        stress0: &c.stress0,
        state0: &c.state0,
        time: [0.0, c.dtime],
        increment: 1,
        want_tangent: true,
    };
    r.call(&input, &mut o.view()).expect("the call succeeds");
    o
}

/// Complex-step column j of ∂σ/∂Δε (j < n) or ∂σ/∂ΔT (j = n) through the routine's twin.
fn complex_column(r: &mut dyn Routine, c: &Call, j: usize) -> Vec<f64> {
    let z = |v: &[f64]| v.iter().map(|&x| Complex64::new(x, 0.0)).collect::<Vec<_>>();
    let (props, strain, stress0, state0) = (z(&c.props), z(&c.strain), z(&c.stress0), z(&c.state0));
    let mut dstrain = z(&c.dstrain);
    let h = 1e-30;
    let mut temp = [Complex64::new(c.temp[0], 0.0), Complex64::new(c.temp[1], 0.0)];
    if j < dstrain.len() {
        dstrain[j].im = h;
    } else {
        temp[1].im = h;
    }
    let mut o = Out::new(c.strain.len(), c.state0.len(), Complex64::new(f64::NAN, 0.0));
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp,
        stress0: &stress0,
        state0: &state0,
        time: [0.0, c.dtime],
        increment: 1,
        want_tangent: false,
    };
    r.complex().expect("twin").call_complex(&input, &mut o.view()).expect("the complex call succeeds");
    o.stress.iter().map(|s| s.im / h).collect()
}

fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    if n == 0.0 {
        d
    } else {
        d / n
    }
}

/// Random walks of the Rust model; each call also goes to the compiled routine. Returns the
/// (elastic, plastic) counts.
fn compare(
    model: &str,
    kind: PointKind,
    lib: &Path,
    symbol: &str,
    props: &[f64],
    seed: u64,
) -> (usize, usize) {
    let mut rust = reference(model, kind).unwrap();
    let info = rust.info().clone();
    let lib = Library::open(lib).unwrap();
    let mut compiled = lib.routine(symbol, info.clone()).unwrap();
    assert!(compiled.has_twin(), "{symbol} has its complex twin");
    let n = info.convention.ncomp();
    let mut rng = StdRng::seed_from_u64(seed);
    let (mut elastic, mut plastic) = (0, 0);
    for _ in 0..30 {
        let mut c = Call {
            props: props.to_vec(),
            strain: vec![0.0; n],
            dstrain: vec![0.0; n],
            stress0: vec![0.0; n],
            state0: vec![0.0; info.nstate],
            temp: [rng.gen_range(250.0..700.0), 0.0],
            dtime: 1.0,
        };
        for step in 0..6 {
            if step > 0 && rng.gen_bool(0.4) {
                // Unloading: a fifth of the last increment backwards (elastic after yield).
                for d in c.dstrain.iter_mut() {
                    *d *= -0.2;
                }
            } else {
                for d in c.dstrain.iter_mut() {
                    *d = rng.gen_range(-2e-3..2e-3);
                }
            }
            c.temp[1] = rng.gen_range(-10.0..10.0);
            // Now and then no time at all: elastic when C > 0 (no plastic flow in no time).
            c.dtime = if rng.gen_bool(0.1) { 0.0 } else { 10f64.powf(rng.gen_range(-7.0..1.0)) };
            let a = call(&mut rust, &c);
            let b = call(&mut compiled, &c);
            assert_eq!(a.outcome.status, 0, "{}", a.outcome.message_text());
            assert_eq!(b.outcome.status, 0, "{symbol}: {}", b.outcome.message_text());
            assert_eq!(a.outcome.branch, b.outcome.branch, "{symbol} branch");
            assert_eq!(a.outcome.provides, b.outcome.provides, "{symbol} provides");
            let what = format!("{symbol} {kind} step {step}");
            assert!(rel(&b.stress, &a.stress) <= TOL, "{what} stress {:?} vs {:?}", b.stress, a.stress);
            assert!(rel(&b.state, &a.state) <= TOL, "{what} state {:?} vs {:?}", b.state, a.state);
            assert!(rel(&b.tangent, &a.tangent) <= TOL, "{what} tangent");
            assert!(rel(&b.dstress_dtemp, &a.dstress_dtemp) <= TOL, "{what} ∂σ/∂ΔT");
            if a.outcome.branch == 1 {
                plastic += 1;
            } else {
                elastic += 1;
            }
            if step % 2 == 1 {
                for j in 0..=n {
                    let col = complex_column(&mut compiled, &c, j);
                    let want = complex_column(&mut rust, &c, j);
                    assert!(rel(&col, &want) <= TOL, "{what} complex-step column {j}");
                }
            }
            for i in 0..n {
                c.strain[i] += c.dstrain[i];
            }
            c.temp[0] += c.temp[1];
            c.stress0.copy_from_slice(&a.stress);
            c.state0.copy_from_slice(&a.state);
        }
    }
    (elastic, plastic)
}

fn check_language(lib: &Path, prefix: &str) {
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric] {
        for props in [STEEL, COPPER] {
            for (model, sym) in [("johnson-cook", "jc"), ("johnson-cook-no-rate-term", "jc_no_rate_term")] {
                let (e, p) = compare(model, kind, lib, &format!("{prefix}_{sym}"), &props, 14);
                assert!(
                    e >= 20 && p >= 20,
                    "{prefix}_{sym} {kind}: both branches ({e} elastic, {p} plastic)"
                );
            }
        }
    }
}

#[test]
fn c_johnson_cook_matches_the_rust_model() {
    check_language(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_johnson_cook_matches_the_rust_model() {
    check_language(f_lib(), "f");
}
