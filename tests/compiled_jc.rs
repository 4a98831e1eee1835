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

use std::path::Path;

use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::core::{PointKind, Routine};
use tancheck::models::reference;
use tancheck_testkit::call::{assert_outputs_agree, call, complex_column, rel, Call, Column};
use tancheck_testkit::libs::{beside_compiled, build_examples};

/// Agreement asked of the compiled routines (relative, whole array). Looser than the 1e-12 of
/// the J2 comparison: the bracketed return map of a step barely past yield from ε̄p = 0 is
/// settled by rounding, and the tangent there is very sensitive to where (the slope
/// nBε̄pⁿ⁻¹ of the law).
const TOL: f64 = 1e-10;

fn c_lib() -> &'static Path {
    build_examples("jc_c", &["c/jc.c"])
}

fn f_lib() -> &'static Path {
    build_examples("jc_f", &["fortran/jc.F90"])
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
    let (mut rust, mut compiled) = beside_compiled(reference(model, kind).unwrap(), lib, symbol);
    let info = rust.info().clone();
    let n = info.convention.ncomp();
    let mut rng = StdRng::seed_from_u64(seed);
    let (mut elastic, mut plastic) = (0, 0);
    for _ in 0..30 {
        let mut c = Call::new(props, n, info.nstate).temp(rng.gen_range(250.0..700.0), 0.0);
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
            c.time[1] = if rng.gen_bool(0.1) { 0.0 } else { 10f64.powf(rng.gen_range(-7.0..1.0)) };
            let a = call(&mut rust, &c);
            let b = call(&mut compiled, &c);
            assert_eq!(a.outcome.status, 0, "{}", a.outcome.message_text());
            let what = format!("{symbol} {kind} step {step}");
            assert_outputs_agree(&b, &a, TOL, &what);
            if a.outcome.branch == 1 {
                plastic += 1;
            } else {
                elastic += 1;
            }
            if step % 2 == 1 {
                for j in 0..=n {
                    let column = if j < n { Column::Strain(j) } else { Column::Temperature };
                    let col = complex_column(&mut compiled, &c, column, 1e-30);
                    let want = complex_column(&mut rust, &c, column, 1e-30);
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
