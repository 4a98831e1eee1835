//! The C and Fortran example routines, compiled, loaded and called through the guarded shim,
//! give the same stress, state and tangent as the Rust reference models to 1e-12 relative,
//! and their complex twins the same complex-step derivatives.
//!
//! The Rust models are themselves tied to published values (the J2 worked case of Simo &
//! Taylor 1985, derived, in crates/tancheck-models) and to num-dual derivatives.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use num_complex::Complex64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::core::{CallInput, PointKind, Routine};
use tancheck::models::reference;

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
    L.get_or_init(|| build("examples_c", &["c/elastic.c", "c/j2.c"]))
}

fn f_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("examples_f", &["fortran/elastic.F90", "fortran/j2.F90"]))
}

/// Owned inputs and outputs of one call.
struct Call {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    stress0: Vec<f64>,
    state0: Vec<f64>,
}

/// Output buffers of one call (the driver's own, NaN-filled).
use tancheck::core::driver::Outputs as Out;

fn call(r: &mut dyn Routine, c: &Call) -> Out<f64> {
    let mut o = Out::new(c.strain.len(), c.state0.len(), f64::NAN);
    let input = CallInput {
        props: &c.props,
        strain: &c.strain,
        dstrain: &c.dstrain,
        temp: [20.0, 0.0],
        stress0: &c.stress0,
        state0: &c.state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    r.call(&input, &mut o.view()).expect("the call succeeds");
    o
}

/// Complex-step column j of the stress derivative through the routine's twin.
fn complex_column(r: &mut dyn Routine, c: &Call, j: usize) -> Vec<f64> {
    let z = |v: &[f64]| v.iter().map(|&x| Complex64::new(x, 0.0)).collect::<Vec<_>>();
    let (props, strain, stress0, state0) = (z(&c.props), z(&c.strain), z(&c.stress0), z(&c.state0));
    let mut dstrain = z(&c.dstrain);
    let h = 1e-30;
    dstrain[j].im = h;
    let mut o = Out::new(c.strain.len(), c.state0.len(), Complex64::new(f64::NAN, 0.0));
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp: [Complex64::new(20.0, 0.0), Complex64::new(0.0, 0.0)],
        stress0: &stress0,
        state0: &state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: false,
    };
    r.complex().expect("twin").call_complex(&input, &mut o.view()).expect("the complex call succeeds");
    o.stress.iter().map(|s| s.im / h).collect()
}

fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    d / n.max(1e-300)
}

/// Random states reached by walking the Rust model along random increments, then a random
/// increment; the same call goes to the compiled routine. Returns (elastic, inelastic) counts.
fn compare_model(
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
    let (mut elastic, mut inelastic) = (0, 0);
    for _ in 0..60 {
        let mut c = Call {
            props: props.to_vec(),
            strain: vec![0.0; n],
            dstrain: vec![0.0; n],
            stress0: vec![0.0; n],
            state0: vec![0.0; info.nstate],
        };
        for step in 0..6 {
            for d in c.dstrain.iter_mut() {
                *d = rng.gen_range(-1.5e-3..1.5e-3);
            }
            let a = call(&mut rust, &c);
            let b = call(&mut compiled, &c);
            assert!(
                rel(&b.stress, &a.stress) <= 1e-12,
                "{symbol} stress at step {step}: {:?} vs {:?}",
                b.stress,
                a.stress
            );
            assert!(rel(&b.tangent, &a.tangent) <= 1e-12, "{symbol} tangent at step {step}");
            if !a.state.is_empty() {
                assert!(rel(&b.state, &a.state) <= 1e-12, "{symbol} state at step {step}");
            }
            assert_eq!(a.outcome.branch, b.outcome.branch, "{symbol} branch");
            assert_eq!(a.outcome.provides, b.outcome.provides, "{symbol} provides");
            if a.outcome.provides & tancheck::core::routine::provides::ENERGY != 0 {
                let scale = a.energy[0].abs().max(a.energy[1].abs()).max(1e-12);
                for k in 0..2 {
                    assert!((a.energy[k] - b.energy[k]).abs() <= 1e-12 * scale, "{symbol} energy {k}");
                }
            }
            if a.state == c.state0 {
                elastic += 1;
            } else {
                inelastic += 1;
            }
            if step == 5 {
                for j in 0..n {
                    let col = complex_column(&mut compiled, &c, j);
                    let want = complex_column(&mut rust, &c, j);
                    assert!(rel(&col, &want) <= 1e-12, "{symbol} complex-step column {j}");
                }
            }
            for i in 0..n {
                c.strain[i] += c.dstrain[i];
            }
            c.stress0.copy_from_slice(&a.stress);
            c.state0.copy_from_slice(&a.state);
        }
    }
    (elastic, inelastic)
}

// Demo-style properties within the range the models accept; the check is agreement, not values.
const J2_LINEAR: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
const J2_VOCE: [f64; 7] = [210000.0, 0.29, 300.0, 800.0, 180.0, 25.0, 1500.0];
const ELASTIC: [f64; 2] = [68900.0, 0.33];

fn check_language(lib: &Path, prefix: &str) {
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric] {
        for props in [J2_LINEAR, J2_VOCE] {
            for (model, sym) in [("j2", "j2"), ("j2-continuum", "j2_continuum")] {
                let (e, p) = compare_model(model, kind, lib, &format!("{prefix}_{sym}"), &props, 7);
                assert!(
                    e >= 30 && p >= 30,
                    "{prefix}_{sym} {kind}: both branches reached ({e} elastic, {p} plastic)"
                );
            }
        }
    }
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::PlaneStress, PointKind::Uniaxial] {
        compare_model("elastic", kind, lib, &format!("{prefix}_elastic"), &ELASTIC, 11);
    }
}

#[test]
fn c_examples_match_the_rust_models() {
    check_language(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_examples_match_the_rust_models() {
    check_language(f_lib(), "f");
}
