//! The C and Fortran example routines, compiled, loaded and called through the guarded shim,
//! give the same stress, state and tangent as the Rust reference models to 1e-12 relative,
//! and their complex twins the same complex-step derivatives.
//!
//! The Rust models are themselves tied to published values (the J2 worked case of Simo &
//! Taylor 1985, derived, in crates/tancheck-models) and to num-dual derivatives.

use std::path::Path;

use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::core::{PointKind, Routine};
use tancheck::models::reference;
use tancheck_testkit::call::{assert_outputs_agree, call, complex_column, rel, Call, Column};
use tancheck_testkit::libs::{beside_compiled, build_examples};

fn c_lib() -> &'static Path {
    build_examples("examples_c", &["c/elastic.c", "c/j2.c"])
}

fn f_lib() -> &'static Path {
    build_examples("examples_f", &["fortran/elastic.F90", "fortran/j2.F90"])
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
    let (mut rust, mut compiled) = beside_compiled(reference(model, kind).unwrap(), lib, symbol);
    let info = rust.info().clone();
    let n = info.convention.ncomp();
    let mut rng = StdRng::seed_from_u64(seed);
    let (mut elastic, mut inelastic) = (0, 0);
    for _ in 0..60 {
        let mut c = Call::new(props, n, info.nstate);
        for step in 0..6 {
            for d in c.dstrain.iter_mut() {
                *d = rng.gen_range(-1.5e-3..1.5e-3);
            }
            let a = call(&mut rust, &c);
            let b = call(&mut compiled, &c);
            assert_outputs_agree(&b, &a, 1e-12, &format!("{symbol} step {step}"));
            if a.state == c.state0 {
                elastic += 1;
            } else {
                inelastic += 1;
            }
            if step == 5 {
                for j in 0..n {
                    let col = complex_column(&mut compiled, &c, Column::Strain(j), 1e-30);
                    let want = complex_column(&mut rust, &c, Column::Strain(j), 1e-30);
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
