//! The C and Fortran thermo and cohesive routines (fortran-shim/examples/{c,fortran}/thermo.*,
//! cohesive.*), compiled with their complex-step twins, loaded and called through the guarded
//! shim, against the Rust reference models: stress, state, tangent, ∂σ/∂T, energy, branch and
//! status equal to 1e-12 relative at random states, and the twins' complex-step derivatives
//! equal to the Rust models' exact derivatives (Squire & Trapp 1998) — for a flawed variant,
//! the correct model's tangent or ∂σ/∂T, which is what its twin exposes.
//!
//! The Rust models are tied to published values (EN 1993-1-2; Camanho & Dávila 2002) and to
//! num-dual derivatives in crates/tancheck-models/tests/{thermo,cohesive}.rs. Without a
//! Fortran compiler the Fortran halves are ignored ("needs gfortran", cfg set by build.rs);
//! with TANCHECK_REQUIRE_FORTRAN=1 they run.

use std::path::{Path, PathBuf};

use num_complex::Complex64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::core::routine::provides;
use tancheck::core::{CallInput, Model, PointKind, Routine, RoutineInfo};
use tancheck::models::cohesive::branch;
use tancheck::models::{Cohesive, CohesiveFlaw, Thermo, ThermoFlaw};

fn c_lib() -> &'static Path {
    build_examples("thermo_cohesive_c", &["c/thermo.c", "c/cohesive.c"])
}

fn f_lib() -> &'static Path {
    build_examples("thermo_cohesive_f", &["fortran/thermo.F90", "fortran/cohesive.F90"])
}

/// Real inputs of one call.
#[derive(Clone, Debug)]
struct Call {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    temp: [f64; 2],
    state0: Vec<f64>,
}

/// Output buffers of one call (the driver's own, NaN-filled).
use tancheck::core::driver::Outputs as Out;
use tancheck_testkit::libs::{build_examples, examples_dir, scratch};

/// One real call of anything that is a `Routine`.
fn call_real(r: &mut dyn Routine, c: &Call) -> Out<f64> {
    let n = c.strain.len();
    let stress0 = vec![0.0; n];
    let input = CallInput {
        props: &c.props,
        strain: &c.strain,
        dstrain: &c.dstrain,
        temp: c.temp,
        stress0: &stress0,
        state0: &c.state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    let mut out = Out::new(n, c.state0.len(), f64::NAN);
    r.call(&input, &mut out.view()).unwrap_or_else(|f| panic!("{}: {f}", r.info().name));
    out
}

/// Which input carries the complex step.
#[derive(Clone, Copy)]
enum Step {
    Strain(usize),
    Temperature,
}

/// One complex call of the twin with the step h on one input.
fn call_complex(r: &mut dyn Routine, c: &Call, step: Step, h: f64) -> Out<Complex64> {
    let cx = |v: &[f64]| v.iter().map(|&x| Complex64::new(x, 0.0)).collect::<Vec<_>>();
    let n = c.strain.len();
    let (props, strain, state0, stress0) = (cx(&c.props), cx(&c.strain), cx(&c.state0), cx(&vec![0.0; n]));
    let mut dstrain = cx(&c.dstrain);
    let mut temp = [Complex64::new(c.temp[0], 0.0), Complex64::new(c.temp[1], 0.0)];
    match step {
        Step::Strain(j) => dstrain[j].im = h,
        Step::Temperature => temp[1].im = h,
    }
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp,
        stress0: &stress0,
        state0: &state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    let nan = Complex64::new(f64::NAN, f64::NAN);
    let mut out = Out::new(n, c.state0.len(), nan);
    let name = r.info().name.clone();
    let twin = r.complex().unwrap_or_else(|| panic!("{name}: the twin was built"));
    twin.call_complex(&input, &mut out.view()).unwrap_or_else(|f| panic!("{name} (twin): {f}"));
    out
}

fn norm(v: impl Iterator<Item = f64>) -> f64 {
    v.map(|x| x * x).sum::<f64>().sqrt()
}

/// ‖a − b‖ ≤ tol ‖b‖ (an exact zero when b is zero).
fn assert_close(a: &[f64], b: &[f64], tol: f64, what: &str) {
    let d = norm(a.iter().zip(b).map(|(x, y)| x - y));
    let r = norm(b.iter().copied());
    assert!(
        a.len() == b.len() && d <= tol * r,
        "{what}: relative difference {:.3e}\n  got {a:?}\n want {b:?}",
        d / r
    );
}

const TOL: f64 = 1e-12;
const H: f64 = 1e-30;

/// Compare one compiled routine with its Rust model at one state; `exact` is the correct
/// Rust model whose tangent and ∂σ/∂T the twin's complex step must reproduce. Returns the
/// branch.
fn compare<M: Model + Clone, E: Model + Clone>(
    r: &mut dyn Routine,
    model: &M,
    exact: &E,
    c: &Call,
    what: &str,
) -> i32 {
    let mut rust = tancheck::core::ModelRoutine(model.clone());
    let mut exact = tancheck::core::ModelRoutine(exact.clone());
    let want = call_real(&mut rust, c);
    let got = call_real(r, c);
    assert_eq!(got.outcome.status, want.outcome.status, "{what}");
    assert_eq!(got.outcome.branch, want.outcome.branch, "{what}: branch");
    assert_eq!(got.outcome.provides, want.outcome.provides, "{what}: provides");
    assert_close(&got.stress, &want.stress, TOL, &format!("{what}: stress"));
    assert_close(&got.state, &want.state, TOL, &format!("{what}: state"));
    assert_close(&got.tangent, &want.tangent, TOL, &format!("{what}: tangent"));
    assert_close(&got.energy, &want.energy, TOL, &format!("{what}: energy"));
    if want.outcome.provides(provides::DSTRESS_DTEMP) {
        assert_close(&got.dstress_dtemp, &want.dstress_dtemp, TOL, &format!("{what}: dstress_dtemp"));
    }
    // The twin: real parts are the real routine's, Im/h the exact derivative (Squire & Trapp
    // 1998), the correct model's even for a flawed variant.
    let truth = call_real(&mut exact, c);
    let n = c.strain.len();
    let mut column = vec![0.0; n * n];
    for j in 0..n {
        let o = call_complex(r, c, Step::Strain(j), H);
        let re: Vec<f64> = o.stress.iter().map(|z| z.re).collect();
        assert_close(&re, &got.stress, TOL, &format!("{what}: twin stress (real part)"));
        for i in 0..n {
            column[i + j * n] = o.stress[i].im / H;
        }
    }
    assert_close(&column, &truth.tangent, TOL, &format!("{what}: twin complex-step tangent"));
    if want.outcome.provides(provides::DSTRESS_DTEMP) {
        let o = call_complex(r, c, Step::Temperature, H);
        let d: Vec<f64> = o.stress.iter().map(|z| z.im / H).collect();
        assert_close(&d, &truth.dstress_dtemp, TOL, &format!("{what}: twin complex-step dstress/dT"));
    }
    want.outcome.branch
}

fn info_for(symbol: &str, model: &impl Model) -> RoutineInfo {
    RoutineInfo { name: symbol.to_string(), ..model.info().clone() }
}

// ---------------------------------------------------------------------------------------
// thermo

const THERMO_STATES: usize = 300;

/// A random thermo call for `n` components: laws, a user table of `points` when the modulus
/// law is 2, temperatures across −50..1350 °C (the table kinks are met with probability zero).
fn thermo_call(rng: &mut StdRng, n: usize) -> (Call, usize) {
    loop {
        let modulus_law = [0.0, 1.0, 2.0][rng.gen_range(0..3)];
        let mut props = vec![
            rng.gen_range(50_000.0..250_000.0),
            rng.gen_range(0.0..0.35),
            rng.gen_range(-1e-4..1e-4),
            modulus_law,
            if rng.gen_bool(0.6) { 1.0 } else { 0.0 },
            rng.gen_range(5e-6..2.5e-5),
        ];
        let mut points = 0;
        if modulus_law == 2.0 {
            points = rng.gen_range(2..=5);
            let mut t = rng.gen_range(-50.0..300.0);
            for _ in 0..points {
                props.extend([t, rng.gen_range(0.0..1.2)]);
                t += rng.gen_range(50.0..400.0);
            }
        }
        let temp = [rng.gen_range(-50.0..1350.0), rng.gen_range(-60.0..60.0)];
        let nu_end = props[1] + props[2] * (temp[0] + temp[1] - 20.0);
        if !(-0.9..0.49).contains(&nu_end) {
            continue;
        }
        let v = |rng: &mut StdRng, s: f64| (0..n).map(|_| rng.gen_range(-s..s)).collect::<Vec<f64>>();
        return (Call { props, strain: v(rng, 2e-2), dstrain: v(rng, 2e-3), temp, state0: vec![] }, points);
    }
}

fn check_thermo(lib_path: &Path, prefix: &str) {
    let lib = Library::open(lib_path).unwrap();
    let mut rng = StdRng::seed_from_u64(0x7c0e_0001);
    let mut total = 0;
    for (suffix, flaw) in [
        ("thermo", ThermoFlaw::None),
        ("thermo_dtemp_sign", ThermoFlaw::DtempSign),
        ("thermo_start_temperature", ThermoFlaw::StartTemperature),
    ] {
        let symbol = format!("{prefix}_{suffix}");
        for kind in Thermo::KINDS {
            for k in 0..THERMO_STATES {
                let (c, points) = thermo_call(&mut rng, kind.ncomp());
                let model = Thermo::with_flaw(kind, flaw).unwrap().with_table_points(points);
                let exact = Thermo::new(kind).unwrap().with_table_points(points);
                let mut r = lib.routine(&symbol, info_for(&symbol, &model)).unwrap();
                assert!(r.has_twin(), "{symbol}_cx");
                compare(&mut r, &model, &exact, &c, &format!("{symbol} {kind} #{k} {c:?}"));
                total += 1;
            }
        }
    }
    eprintln!("{prefix} thermo: {total} states agree with the Rust models");
    assert_eq!(total, 3 * 5 * THERMO_STATES);
}

#[test]
fn c_thermo_matches_the_rust_model() {
    check_thermo(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_thermo_matches_the_rust_model() {
    check_thermo(f_lib(), "f");
}

// ---------------------------------------------------------------------------------------
// cohesive

/// States per branch, symbol and kind.
const COHESIVE_STATES: usize = 80;

/// AS4/PEEK (REFERENCES.md: from memory), or random interface properties with
/// 2 G K > max(N, S)² by a margin.
fn cohesive_props(rng: &mut StdRng) -> Vec<f64> {
    if rng.gen_bool(0.3) {
        return vec![1e6, 80.0, 100.0, 0.969, 1.719, 2.284];
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

/// Onset and final equivalent separation (Camanho & Dávila 2002; B-K 1996) of an open
/// interface with mode ratio β, or of a closed one (`None`: pure shear).
fn onset_final(p: &[f64], beta: Option<f64>) -> (f64, f64) {
    let (d03, d0s) = (p[1] / p[0], p[2] / p[0]);
    match beta {
        Some(b) => {
            let d0m = d03 * d0s * ((1.0 + b * b) / (d0s * d0s + b * b * d03 * d03)).sqrt();
            let gc = p[3] + (p[4] - p[3]) * (b * b / (1.0 + b * b)).powf(p[5]);
            (d0m, 2.0 * gc / (p[0] * d0m))
        }
        None => (d0s, 2.0 * p[4] / p[2]),
    }
}

/// A random cohesive call aimed at `target`, a relative 1e-3 away from its boundaries.
fn cohesive_call(rng: &mut StdRng, n: usize, target: i32) -> Call {
    let props = cohesive_props(rng);
    let closed = match target {
        branch::CLOSED => true,
        branch::ELASTIC | branch::UNLOADING => false,
        _ => rng.gen_bool(0.3),
    };
    // A unit-λ direction: mixed mode (β log-uniform over [0.02, 50]) when open, slips with any
    // closing when closed.
    let mut dir = vec![0.0; n];
    let a: f64 = rng.gen_range(0.0..std::f64::consts::TAU);
    let beta = if closed {
        dir[0] = -rng.gen_range(1e-3..10.0);
        None
    } else {
        let b = if rng.gen_bool(0.2) { 0.0 } else { 10f64.powf(rng.gen_range(-1.7..1.7)) };
        dir[0] = 1.0 / (1.0 + b * b).sqrt();
        Some(b)
    };
    let sh = if closed { 1.0 } else { beta.unwrap() * dir[0] };
    if n == 3 {
        dir[1] = sh * a.cos();
        dir[2] = sh * a.sin();
    } else {
        dir[1] = sh * a.cos().signum();
    }
    let (d0m, dfm) = onset_final(&props, beta);
    let lam_of = |d: f64| dfm * d0m / (dfm - d * (dfm - d0m));
    let g = 1e-3;
    let (d_old, lam) = match target {
        branch::ELASTIC => (0.0, d0m * rng.gen_range(0.01..1.0 - g)),
        branch::GROWTH => {
            let d_old = if rng.gen_bool(0.3) { 0.0 } else { rng.gen_range(0.0..0.95) };
            (d_old, lam_of(rng.gen_range(d_old + g..1.0 - g)))
        }
        branch::UNLOADING | branch::CLOSED => {
            let d_old =
                if target == branch::CLOSED && rng.gen_bool(0.3) { 0.0 } else { rng.gen_range(g..1.0 - g) };
            (d_old, lam_of(d_old) * rng.gen_range(0.01..1.0 - g))
        }
        _ => {
            if rng.gen_bool(0.5) {
                (1.0, dfm * rng.gen_range(0.01..3.0))
            } else {
                (rng.gen_range(0.0..1.0), dfm * rng.gen_range(1.0 + g..3.0))
            }
        }
    };
    let sep: Vec<f64> = dir.iter().map(|x| x * lam).collect();
    let dstrain: Vec<f64> = sep.iter().map(|s| s * rng.gen_range(-0.5..1.5)).collect();
    let strain: Vec<f64> = sep.iter().zip(&dstrain).map(|(s, d)| s - d).collect();
    Call { props, strain, dstrain, temp: [20.0, 0.0], state0: vec![d_old, rng.gen_range(0.0..2.0)] }
}

fn check_cohesive(lib_path: &Path, prefix: &str) {
    let lib = Library::open(lib_path).unwrap();
    let mut rng = StdRng::seed_from_u64(0x7c0e_0002);
    let variants = [
        ("cohesive", CohesiveFlaw::None),
        ("cohesive_secant", CohesiveFlaw::Secant),
        ("cohesive_no_coupling", CohesiveFlaw::NoCoupling),
        ("cohesive_transposed", CohesiveFlaw::Transposed),
        ("cohesive_undamaged", CohesiveFlaw::Undamaged),
    ];
    let mut total = 0;
    for (suffix, flaw) in variants {
        let symbol = format!("{prefix}_{suffix}");
        for kind in Cohesive::KINDS {
            let model = Cohesive::with_flaw(kind, flaw).unwrap();
            let exact = Cohesive::new(kind).unwrap();
            let mut r = lib.routine(&symbol, info_for(&symbol, &model)).unwrap();
            assert!(r.has_twin(), "{symbol}_cx");
            let mut count = [0usize; 5];
            for target in [branch::ELASTIC, branch::GROWTH, branch::UNLOADING, branch::CLOSED, branch::FAILED]
            {
                for k in 0..COHESIVE_STATES {
                    let c = cohesive_call(&mut rng, kind.ncomp(), target);
                    let b = compare(&mut r, &model, &exact, &c, &format!("{symbol} {kind} #{k} {c:?}"));
                    assert_eq!(b, target, "{symbol} {kind}: {c:?}");
                    count[b as usize] += 1;
                    total += 1;
                }
            }
            assert!(count.iter().all(|&c| c == COHESIVE_STATES), "{symbol} {kind}: {count:?}");
        }
    }
    eprintln!("{prefix} cohesive: {total} states agree with the Rust models (every branch of every variant)");
}

#[test]
fn c_cohesive_matches_the_rust_model() {
    check_cohesive(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_cohesive_matches_the_rust_model() {
    check_cohesive(f_lib(), "f");
}

fn build_debug(name: &str, sources: &[&str]) -> PathBuf {
    let out = scratch(name).join(format!("lib{name}.so"));
    let mut opts = BuildOptions::new(sources.iter().map(|s| examples_dir().join(s)), &out);
    opts.debug = true;
    build_library(&opts).unwrap_or_else(|e| panic!("building {name}: {e}"));
    out
}

// Debug builds (run-time checks; Fortran reals start as signalling NaN) called with
// floating-point traps for invalid operation, division by zero and overflow, in every branch
// and law: no trap fires, and the results are the Rust models' as above.
#[test]
#[cfg_attr(tancheck_no_fp_traps, ignore = "needs floating-point traps (this machine has none)")]
fn c_debug_builds_run_clean_under_fp_traps() {
    debug_builds_run_clean(vec![(
        build_debug("thermo_cohesive_c_debug", &["c/thermo.c", "c/cohesive.c"]),
        "c",
    )]);
}

#[test]
#[cfg_attr(
    any(tancheck_no_fortran, tancheck_no_fp_traps),
    ignore = "needs gfortran and floating-point traps"
)]
fn fortran_debug_builds_run_clean_under_fp_traps() {
    debug_builds_run_clean(vec![(
        build_debug("thermo_cohesive_f_debug", &["fortran/thermo.F90", "fortran/cohesive.F90"]),
        "f",
    )]);
}

fn debug_builds_run_clean(libs: Vec<(PathBuf, &str)>) {
    let mut rng = StdRng::seed_from_u64(0x7c0e_0003);
    for (path, prefix) in libs {
        let lib = Library::open(&path).unwrap();
        let mut calls = 0;
        for kind in Thermo::KINDS {
            for k in 0..40 {
                let (c, points) = thermo_call(&mut rng, kind.ncomp());
                let model = Thermo::new(kind).unwrap().with_table_points(points);
                let symbol = format!("{prefix}_thermo");
                let mut r = lib.routine(&symbol, info_for(&symbol, &model)).unwrap();
                r.set_fp_traps(true).unwrap();
                compare(&mut r, &model, &model, &c, &format!("debug {symbol} {kind} #{k} {c:?}"));
                calls += 1;
            }
        }
        for kind in Cohesive::KINDS {
            let model = Cohesive::new(kind).unwrap();
            let symbol = format!("{prefix}_cohesive");
            let mut r = lib.routine(&symbol, info_for(&symbol, &model)).unwrap();
            r.set_fp_traps(true).unwrap();
            for target in [branch::ELASTIC, branch::GROWTH, branch::UNLOADING, branch::CLOSED, branch::FAILED]
            {
                for k in 0..20 {
                    let c = cohesive_call(&mut rng, kind.ncomp(), target);
                    let b = compare(&mut r, &model, &model, &c, &format!("debug {symbol} {kind} #{k} {c:?}"));
                    assert_eq!(b, target);
                    calls += 1;
                }
            }
        }
        eprintln!("{prefix} debug build: {calls} states clean (traps on)");
    }
}

// A compiled routine refuses what the Rust model refuses, with the same message.
#[test]
fn compiled_c_routines_refuse_bad_input_like_the_rust_models() {
    refuse_bad_input_like_the_rust_models(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn compiled_fortran_routines_refuse_bad_input_like_the_rust_models() {
    refuse_bad_input_like_the_rust_models(f_lib(), "f");
}

fn refuse_bad_input_like_the_rust_models(path: &Path, prefix: &str) {
    let lib = Library::open(path).unwrap();
    let model = Cohesive::new(PointKind::Cohesive2d).unwrap();
    let symbol = format!("{prefix}_cohesive");
    let mut r = lib.routine(&symbol, info_for(&symbol, &model)).unwrap();
    let c = Call {
        props: vec![1e6, 80.0, 100.0, 0.969, 1.719, 0.5],
        strain: vec![0.0; 2],
        dstrain: vec![1e-5, 0.0],
        temp: [20.0, 0.0],
        state0: vec![0.0, 0.0],
    };
    let stress0 = [0.0; 2];
    let input = CallInput {
        props: &c.props,
        strain: &c.strain,
        dstrain: &c.dstrain,
        temp: c.temp,
        stress0: &stress0,
        state0: &c.state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    let mut got = Out::new(2, 2, f64::NAN);
    let mut want = Out::new(2, 2, f64::NAN);
    let e_got = r.call(&input, &mut got.view()).unwrap_err().to_string();
    let e_want =
        tancheck::core::ModelRoutine(model.clone()).call(&input, &mut want.view()).unwrap_err().to_string();
    assert_eq!(e_got, e_want);
    assert!(e_got.contains("eta (properties[5])"), "{e_got}");

    let model = Thermo::new(PointKind::Solid3d).unwrap();
    let symbol = format!("{prefix}_thermo");
    let mut r = lib.routine(&symbol, info_for(&symbol, &model)).unwrap();
    let props = [210_000.0, 0.3, 0.0, 2.0, 0.0, 12e-6];
    let zeros = [0.0; 6];
    let input =
        CallInput { props: &props, strain: &zeros, dstrain: &zeros, stress0: &zeros, state0: &[], ..input };
    let mut got = Out::new(6, 0, f64::NAN);
    let mut want = Out::new(6, 0, f64::NAN);
    let e_got = r.call(&input, &mut got.view()).unwrap_err().to_string();
    let e_want = tancheck::core::ModelRoutine(model).call(&input, &mut want.view()).unwrap_err().to_string();
    assert_eq!(e_got, e_want);
    assert!(e_got.contains("at least 2"), "{e_got}");
}
