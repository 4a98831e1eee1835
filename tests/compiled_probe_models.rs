//! The compiled routines the probes beyond the tangent check need, loaded and called through
//! the guarded shim:
//!
//! - `c_orthotropic` / `f_orthotropic` (fortran-shim/examples/{c,fortran}/orthotropic.*) give
//!   the stress, tangent, energy and branch of the Rust `orthotropic` model to 1e-12, and
//!   their twins its complex-step derivatives; the Rust model is tied to Jones, Mechanics of
//!   Composite Materials (from memory) and num-dual in crates/tancheck-models/tests/orthotropic.rs.
//! - `c_j2` / `f_j2` with softening properties give the Rust `j2` model's results (the Rust
//!   model is checked with softening in crates/tancheck-models/tests/j2_softening.rs).
//! - The probe zoo (fortran-shim/examples/c/probe_zoo.c) shows each routine's one flaw
//!   concretely: the behaviour a probe has to catch, next to elastic results that stay
//!   correct (compared with the Rust `elastic` model, REFERENCES.md "Relations").
//!
//! Without a Fortran compiler the Fortran halves are ignored ("needs gfortran", cfg set by
//! build.rs); with TANCHECK_REQUIRE_FORTRAN=1 they run.

use std::path::Path;

use num_complex::Complex64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::abi::{FindingKind, GuardLevel, GuardedArray, Library};
use tancheck::core::routine::{provides, status};
use tancheck::core::{CallInput, Convention, Fault, PointKind, Routine, RoutineInfo, ShearMeasure};
use tancheck::models::reference;

fn c_lib() -> &'static Path {
    build_examples("probe_models_c", &["c/orthotropic.c", "c/probe_zoo.c", "c/j2.c"])
}

fn f_lib() -> &'static Path {
    build_examples("probe_models_f", &["fortran/orthotropic.F90", "fortran/j2.F90"])
}

/// Owned inputs of one call.
#[derive(Clone, Debug)]
struct Call {
    props: Vec<f64>,
    strain: Vec<f64>,
    dstrain: Vec<f64>,
    stress0: Vec<f64>,
    state0: Vec<f64>,
}

impl Call {
    fn new(props: &[f64], n: usize, nstate: usize) -> Call {
        Call {
            props: props.to_vec(),
            strain: vec![0.0; n],
            dstrain: vec![0.0; n],
            stress0: vec![0.0; n],
            state0: vec![0.0; nstate],
        }
    }
}

/// Output buffers of one call (the driver's own, NaN-filled).
use tancheck::core::driver::Outputs as Out;
use tancheck_testkit::libs::build_examples;

fn try_call(r: &mut dyn Routine, c: &Call) -> (Result<(), Fault>, Out<f64>) {
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
    let res = r.call(&input, &mut o.view());
    (res, o)
}

fn call(r: &mut dyn Routine, c: &Call) -> Out<f64> {
    let (res, o) = try_call(r, c);
    res.unwrap_or_else(|f| panic!("{}: {f}", r.info().name));
    o
}

/// Complex-step column j of ∂σ/∂Δε through the routine's twin (Squire & Trapp 1998).
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

/// All columns of the complex-step derivative, column-major like a tangent.
fn complex_tangent(r: &mut dyn Routine, c: &Call) -> Vec<f64> {
    (0..c.strain.len()).flat_map(|j| complex_column(r, c, j)).collect()
}

fn rel(a: &[f64], b: &[f64]) -> f64 {
    let d: f64 = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n: f64 = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    d / n.max(1e-300)
}

fn info(name: &str, kind: PointKind, nstate: usize, nprop: usize) -> RoutineInfo {
    RoutineInfo {
        name: name.into(),
        convention: Convention::new(kind, ShearMeasure::Engineering),
        nstate,
        nprop,
    }
}

fn random_vec(rng: &mut StdRng, n: usize, s: f64) -> Vec<f64> {
    (0..n).map(|_| rng.gen_range(-s..s)).collect()
}

// ---------------------------------------------------------------------------------------
// Orthotropic elasticity, compiled against Rust.

/// Random orthotropic constants the Rust model accepts, and random axes.
fn random_ortho_props(rng: &mut StdRng, rust: &mut dyn Routine) -> Vec<f64> {
    let n = rust.info().convention.ncomp();
    loop {
        let mut p: Vec<f64> = (0..3).map(|_| rng.gen_range(3_000.0..200_000.0)).collect();
        p.extend((0..3).map(|_| rng.gen_range(-0.3..0.6)));
        p.extend((0..3).map(|_| rng.gen_range(1_000.0..60_000.0)));
        p.extend((0..6).map(|_| rng.gen_range(-1.0..1.0)));
        if try_call(rust, &Call::new(&p, n, 0)).0.is_ok() {
            return p;
        }
    }
}

fn compare_orthotropic(lib: &Path, symbol: &str) {
    let lib = Library::open(lib).unwrap();
    let mut rng = StdRng::seed_from_u64(0x0a7f_1001);
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric] {
        let mut rust = reference("orthotropic", kind).unwrap();
        let mut compiled = lib.routine(symbol, rust.info().clone()).unwrap();
        assert!(compiled.has_twin(), "{symbol} has its complex twin");
        let n = kind.ncomp();
        for k in 0..100 {
            let c = Call {
                props: random_ortho_props(&mut rng, &mut rust),
                strain: random_vec(&mut rng, n, 2e-3),
                dstrain: random_vec(&mut rng, n, 1e-3),
                stress0: random_vec(&mut rng, n, 300.0),
                state0: vec![],
            };
            let a = call(&mut rust, &c);
            let b = call(&mut compiled, &c);
            assert!(rel(&b.stress, &a.stress) <= 1e-12, "{symbol} {kind} #{k} stress");
            assert!(rel(&b.tangent, &a.tangent) <= 1e-12, "{symbol} {kind} #{k} tangent");
            assert!(
                (b.energy[0] - a.energy[0]).abs() <= 1e-12 * a.energy[0].abs().max(1e-6),
                "{symbol} energy"
            );
            assert_eq!((b.energy[1], b.outcome.branch), (0.0, 0));
            assert!(b.outcome.provides(provides::ENERGY));
            if k % 10 == 0 {
                let want = complex_tangent(&mut rust, &c);
                assert!(rel(&complex_tangent(&mut compiled, &c), &want) <= 1e-12, "{symbol} {kind} twin");
                assert!(rel(&a.tangent, &want) <= 1e-12, "Rust tangent vs its complex step");
            }
        }
        // A bad property set fails in both, with the property named.
        let mut bad = random_ortho_props(&mut rng, &mut rust);
        let a1 = [bad[9], bad[10], bad[11]];
        bad[12..15].copy_from_slice(&a1.map(|x| -2.0 * x));
        for r in [&mut rust as &mut dyn Routine, &mut compiled] {
            let (res, _) = try_call(r, &Call::new(&bad, n, 0));
            match res {
                Err(Fault::Status { status: s, message, .. }) => {
                    assert_eq!(s, status::FAILED);
                    assert!(message.contains("not parallel"), "{message}");
                }
                other => panic!("{}: parallel axes accepted: {other:?}", r.info().name),
            }
        }
    }
}

#[test]
fn c_orthotropic_matches_the_rust_model() {
    compare_orthotropic(c_lib(), "c_orthotropic");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_orthotropic_matches_the_rust_model() {
    compare_orthotropic(f_lib(), "f_orthotropic");
}

// ---------------------------------------------------------------------------------------
// Softening J2, compiled against Rust.

/// Softening property sets for the stability probe: h = H_iso + H_kin < 0, and a Voce
/// softening that saturates at σy0 + Q > 0. Random walks of ±1.5e-3 per component stay short
/// of K = 0 (linear: at α = σy0/|H_iso| = 0.05).
const J2_SOFTENING: [[f64; 7]; 3] = [
    [200_000.0, 0.3, 250.0, -5_000.0, 0.0, 0.0, 0.0],
    [200_000.0, 0.3, 250.0, 0.0, -100.0, 150.0, 0.0],
    [210_000.0, 0.29, 300.0, -8_000.0, 0.0, 0.0, 2_000.0],
];

fn compare_j2_softening(lib: &Path, symbol: &str) {
    let lib = Library::open(lib).unwrap();
    let mut rng = StdRng::seed_from_u64(0x50f7_1001);
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
        for props in J2_SOFTENING {
            let mut rust = reference("j2", kind).unwrap();
            let info = rust.info().clone();
            let mut compiled = lib.routine(symbol, info.clone()).unwrap();
            let n = kind.ncomp();
            let (mut elastic, mut plastic) = (0, 0);
            for _ in 0..40 {
                let mut c = Call::new(&props, n, info.nstate);
                for step in 0..6 {
                    c.dstrain = random_vec(&mut rng, n, 1.5e-3);
                    let a = call(&mut rust, &c);
                    let b = call(&mut compiled, &c);
                    assert!(rel(&b.stress, &a.stress) <= 1e-12, "{symbol} {kind} step {step} stress");
                    assert!(rel(&b.tangent, &a.tangent) <= 1e-12, "{symbol} {kind} step {step} tangent");
                    assert!(rel(&b.state, &a.state) <= 1e-12, "{symbol} {kind} step {step} state");
                    assert_eq!(a.outcome.branch, b.outcome.branch);
                    if a.outcome.branch == 0 {
                        elastic += 1;
                    } else {
                        plastic += 1;
                    }
                    if step == 5 {
                        let want = complex_tangent(&mut rust, &c);
                        assert!(rel(&complex_tangent(&mut compiled, &c), &want) <= 1e-12, "{symbol} twin");
                    }
                    for i in 0..n {
                        c.strain[i] += c.dstrain[i];
                    }
                    c.state0.copy_from_slice(&a.state);
                }
            }
            assert!(
                elastic >= 30 && plastic >= 30,
                "{symbol} {kind} {props:?}: {elastic} elastic, {plastic} plastic"
            );
        }
    }
}

#[test]
fn c_j2_with_softening_matches_the_rust_model() {
    compare_j2_softening(c_lib(), "c_j2");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_j2_with_softening_matches_the_rust_model() {
    compare_j2_softening(f_lib(), "f_j2");
}

// ---------------------------------------------------------------------------------------
// The probe zoo: each routine's flaw, shown concretely.

const STEEL: [f64; 2] = [210_000.0, 0.3];
/// PZ_LEAK and PZ_ANISO of probe_zoo.c (documented parameters of the flawed routines).
const LEAK: f64 = 0.5;
const ANISO: f64 = 0.5;

/// The Rust `elastic` model's answer for the same call (stress, tangent, energy).
fn elastic(kind: PointKind, c: &Call) -> Out<f64> {
    let mut m = reference("elastic", kind).unwrap();
    call(&mut m, &Call { state0: vec![], ..c.clone() })
}

fn matvec(t: &[f64], v: &[f64]) -> Vec<f64> {
    let n = v.len();
    (0..n).map(|i| (0..n).map(|j| t[i + j * n] * v[j]).sum()).collect()
}

// pz_saved_state: calls A, B, A give two answers for A. The second A differs from the A made
// right after A by exactly LEAK·C·(Δε_B − Δε_A): the previous call's increment leaks in. The
// tangent is C in every call and the twin's complex step agrees with it (the leak is real), so
// only a hidden-state probe (or the full guard's repeat) sees it; the full guard reports
// "different results for two identical calls".
//
// All calls of pz_saved_state in this test binary are in this one test: the memory is a static
// of the library, shared by every thread.
#[test]
fn saved_state_changes_the_answer_of_a_repeated_call() {
    let kind = PointKind::Solid3d;
    let lib = Library::open(c_lib()).unwrap();
    let mut r = lib.routine("pz_saved_state", info("pz_saved_state", kind, 0, 2)).unwrap();
    let mut a = Call::new(&STEEL, 6, 0);
    a.strain = vec![1e-3, -2e-4, 3e-4, 1e-4, -5e-4, 2e-4];
    a.dstrain = vec![4e-4, 1e-4, -2e-4, 3e-4, 0.0, -1e-4];
    a.stress0 = matvec(&elastic(kind, &a).tangent, &a.strain);
    let b = Call { dstrain: vec![-6e-4, 5e-4, 2e-4, 0.0, 7e-4, 1e-4], ..a.clone() };
    let c_el = elastic(kind, &a).tangent;
    let plain = elastic(kind, &a).stress;

    let _ = call(&mut r, &a);
    let a_after_a = call(&mut r, &a);
    let _ = call(&mut r, &b);
    let a_after_b = call(&mut r, &a);

    let leak_a = matvec(&c_el, &a.dstrain);
    let leak_b = matvec(&c_el, &b.dstrain);
    let want_aa: Vec<f64> = (0..6).map(|i| plain[i] + LEAK * leak_a[i]).collect();
    let want_ab: Vec<f64> = (0..6).map(|i| plain[i] + LEAK * leak_b[i]).collect();
    assert!(rel(&a_after_a.stress, &want_aa) <= 1e-12, "{:?} vs {want_aa:?}", a_after_a.stress);
    assert!(rel(&a_after_b.stress, &want_ab) <= 1e-12, "{:?} vs {want_ab:?}", a_after_b.stress);
    let diff = rel(&a_after_b.stress, &a_after_a.stress);
    assert!(diff > 0.1, "A after B differs from A after A: {diff:.3e}");
    for out in [&a_after_a, &a_after_b] {
        assert!(rel(&out.tangent, &c_el) <= 1e-12, "the tangent is C");
    }
    // The twin's complex step (its own memory, real-valued) gives C: a complex-step tangent
    // check passes.
    assert!(rel(&complex_tangent(&mut r, &a), &c_el) <= 1e-12);

    // Determinism: at the full guard level each call is made twice; after a different call the
    // two disagree, and the call ends with the finding.
    assert!(r.findings().is_empty(), "{:#?}", r.findings());
    r.set_guard_level(GuardLevel::Full);
    match try_call(&mut r, &b).0 {
        Err(Fault::Misbehaved { what }) => {
            assert!(what.contains("different results for two identical calls"), "{what}")
        }
        other => panic!("the full guard let it pass: {other:?}"),
    }
    let f = r.findings();
    assert_eq!((f.len(), f[0].kind), (1, FindingKind::Unrepeatable), "{f:#?}");
}

// pz_writes_strain: the guard reports the strain as written, every component with a nonzero
// increment, in the real call and in the twin; the caller's strain is untouched (the routine
// wrote the guard's copy); stress, tangent and energy are elasticity's. An increment of zero
// writes back the same values, which no comparison can see.
#[test]
fn writes_strain_is_reported_as_writing_its_input() {
    for kind in [PointKind::Solid3d, PointKind::PlaneStress] {
        let n = kind.ncomp();
        let lib = Library::open(c_lib()).unwrap();
        let mut r = lib.routine("pz_writes_strain", info("pz_writes_strain", kind, 0, 2)).unwrap();
        assert_eq!(r.guard_level(), GuardLevel::Light);
        let mut c = Call::new(&STEEL, n, 0);
        c.strain = (0..n).map(|i| 1e-3 * (i as f64 + 1.0)).collect();
        c.dstrain = (0..n).map(|i| 1e-4 * (2.0 - i as f64 * 0.5)).collect();
        c.dstrain[n - 1] = 3e-4;
        let before = c.strain.clone();
        let (res, out) = try_call(&mut r, &c);
        match res {
            Err(Fault::Misbehaved { what }) => assert!(what.contains("read-only input strain"), "{what}"),
            other => panic!("the write went unnoticed: {other:?}"),
        }
        assert_eq!(c.strain, before, "the caller's strain is untouched");
        let f = r.findings();
        assert_eq!(f.len(), 1, "{f:#?}");
        assert_eq!((f[0].kind, f[0].array), (FindingKind::InputWritten, GuardedArray::Strain));
        let changed = c.dstrain.iter().filter(|&&d| d != 0.0).count();
        assert_eq!((f[0].first, f[0].entries, f[0].len), (0, changed, n));
        let want = elastic(kind, &c);
        assert!(rel(&out.stress, &want.stress) <= 1e-12 && rel(&out.tangent, &want.tangent) <= 1e-12);
        assert!((out.energy[0] - want.energy[0]).abs() <= 1e-12 * want.energy[0].abs());

        // The twin, on a fresh routine so that its finding is its own.
        let mut r = lib.routine("pz_writes_strain", info("pz_writes_strain", kind, 0, 2)).unwrap();
        let z = |v: &[f64]| v.iter().map(|&x| Complex64::new(x, 0.0)).collect::<Vec<_>>();
        let (props, strain, dstrain, stress0) = (z(&c.props), z(&c.strain), z(&c.dstrain), z(&c.stress0));
        let mut o = Out::new(n, 0, Complex64::new(f64::NAN, 0.0));
        let input = CallInput {
            props: &props,
            strain: &strain,
            dstrain: &dstrain,
            temp: [Complex64::new(20.0, 0.0), Complex64::new(0.0, 0.0)],
            stress0: &stress0,
            state0: &[],
            time: [0.0, 1.0],
            increment: 1,
            want_tangent: true,
        };
        let res = r.complex().unwrap().call_complex(&input, &mut o.view());
        assert!(matches!(res, Err(Fault::Misbehaved { .. })), "{res:?}");
        let f = r.findings();
        assert_eq!(
            (f.len(), f[0].kind, f[0].array, f[0].complex),
            (1, FindingKind::InputWritten, GuardedArray::Strain, true)
        );

        let mut r = lib.routine("pz_writes_strain", info("pz_writes_strain", kind, 0, 2)).unwrap();
        let _ = call(&mut r, &Call { dstrain: vec![0.0; n], ..c.clone() });
        assert!(r.findings().is_empty(), "rewriting the same values is invisible: {:#?}", r.findings());
    }
}

/// A symmetric tensor (canonical slots 11, 22, 33, 23, 13, 12) from a 6-vector of tensor
/// components, as a 3×3 matrix.
fn tensor(v: &[f64], shear_half: bool) -> [[f64; 3]; 3] {
    let f = if shear_half { 0.5 } else { 1.0 };
    [[v[0], f * v[5], f * v[4]], [f * v[5], v[1], f * v[3]], [f * v[4], f * v[3], v[2]]]
}

fn untensor(t: &[[f64; 3]; 3], shear_double: bool) -> Vec<f64> {
    let f = if shear_double { 2.0 } else { 1.0 };
    vec![t[0][0], t[1][1], t[2][2], f * t[1][2], f * t[0][2], f * t[0][1]]
}

fn rotate(r: &[[f64; 3]; 3], t: &[[f64; 3]; 3]) -> [[f64; 3]; 3] {
    let mut o = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            for k in 0..3 {
                for l in 0..3 {
                    o[i][j] += r[i][k] * t[k][l] * r[j][l];
                }
            }
        }
    }
    o
}

fn about_3(deg: f64) -> [[f64; 3]; 3] {
    let (c, s) = (deg.to_radians().cos(), deg.to_radians().sin());
    [[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]]
}

/// Frobenius norm of a stress in canonical Voigt order (shear components count twice).
fn frobenius(v: &[f64]) -> f64 {
    (v[..3].iter().map(|x| x * x).sum::<f64>() + 2.0 * v[3..].iter().map(|x| x * x).sum::<f64>()).sqrt()
}

/// The stress for a call with strain, increment and start stress turned by `r`, and R σ Rᵀ
/// of the unturned call's stress.
fn turned(routine: &mut dyn Routine, c: &Call, r: &[[f64; 3]; 3]) -> (Vec<f64>, Vec<f64>) {
    let q = Call {
        strain: untensor(&rotate(r, &tensor(&c.strain, true)), true),
        dstrain: untensor(&rotate(r, &tensor(&c.dstrain, true)), true),
        stress0: untensor(&rotate(r, &tensor(&c.stress0, false)), false),
        ..c.clone()
    };
    let base = call(routine, c);
    let got = call(routine, &q).stress;
    (got, untensor(&rotate(r, &tensor(&base.stress, false)), false))
}

// pz_not_objective: its tangent is the complex-step derivative of its update and symmetric
// (a tangent or symmetry check passes), but turning the inputs does not turn the stress. For
// a pure shear γ12 = g turned by 45° about axis 3, the turned call's stress misses R σ Rᵀ by
// exactly √2·c·|g|, c = ANISO·μ (the term c (ε11 − ε22)(e11 − e22) at ε11 − ε22 = ±g); a
// 90° turn about axis 3 does not show it; a general rotation does.
#[test]
fn not_objective_does_not_rotate_with_the_frame() {
    let kind = PointKind::Solid3d;
    let lib = Library::open(c_lib()).unwrap();
    let mut r = lib.routine("pz_not_objective", info("pz_not_objective", kind, 0, 2)).unwrap();
    let mu = STEEL[0] / (2.0 * (1.0 + STEEL[1]));
    let c_aniso = ANISO * mu;

    let mut rng = StdRng::seed_from_u64(0x0b1e_0001);
    for _ in 0..20 {
        let c = Call {
            strain: random_vec(&mut rng, 6, 1e-3),
            dstrain: random_vec(&mut rng, 6, 1e-3),
            ..Call::new(&STEEL, 6, 0)
        };
        let out = call(&mut r, &c);
        assert!(rel(&out.tangent, &complex_tangent(&mut r, &c)) <= 1e-12, "consistent tangent");
        for i in 0..6 {
            for j in 0..6 {
                assert!((out.tangent[i + 6 * j] - out.tangent[j + 6 * i]).abs() <= 1e-9);
            }
        }
        // Elasticity plus c d⊗d, d = e11 − e22.
        let mut want = elastic(kind, &c).tangent;
        for (i, j, s) in [(0, 0, 1.0), (1, 1, 1.0), (0, 1, -1.0), (1, 0, -1.0)] {
            want[i + 6 * j] += s * c_aniso;
        }
        assert!(rel(&out.tangent, &want) <= 1e-12);
    }

    let g = 1e-3;
    let shear = Call { dstrain: vec![0.0, 0.0, 0.0, 0.0, 0.0, g], ..Call::new(&STEEL, 6, 0) };
    let (got, want) = turned(&mut r, &shear, &about_3(45.0));
    let miss = frobenius(&got.iter().zip(&want).map(|(a, b)| a - b).collect::<Vec<_>>());
    assert!((miss - 2f64.sqrt() * c_aniso * g).abs() <= 1e-9 * miss, "45°: missed by {miss}");
    assert!(miss > 0.3 * frobenius(&want), "a large miss: {miss} of {}", frobenius(&want));

    let (got, want) = turned(&mut r, &shear, &about_3(90.0));
    assert!(rel(&got, &want) <= 1e-12, "90° about axis 3 leaves the term unchanged");

    let (got, want) = turned(
        &mut r,
        &Call { dstrain: vec![1e-3, -4e-4, 2e-4, 3e-4, -1e-4, 5e-4], ..Call::new(&STEEL, 6, 0) },
        &[[0.36, 0.48, -0.8], [-0.8, 0.6, 0.0], [0.48, 0.64, 0.6]],
    );
    assert!(rel(&got, &want) > 1e-3, "a general rotation shows it: {:.3e}", rel(&got, &want));

    // Isotropic elasticity itself (the honest routine) passes the same 45° test.
    let mut honest = reference("elastic", kind).unwrap();
    let (got, want) = turned(&mut honest, &shear, &about_3(45.0));
    assert!(rel(&got, &want) <= 1e-12);
}

// pz_negative_dissipation: along a path where each increment starts where the last ended
// (stress0 = σ_n, state0 = state_n), the reported dissipation changes by −½ Δε·C Δε < 0 in
// every increment, although the response is elastic: the stored energy's change equals the
// trapezoidal work ½(σ_n + σ_{n+1})·Δε (nothing is dissipated). Stress and tangent are
// elasticity's.
#[test]
fn negative_dissipation_decreases_every_increment() {
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::PlaneStress, PointKind::Uniaxial] {
        let n = kind.ncomp();
        let lib = Library::open(c_lib()).unwrap();
        let mut r =
            lib.routine("pz_negative_dissipation", info("pz_negative_dissipation", kind, 2, 2)).unwrap();
        let mut rng = StdRng::seed_from_u64(0x0d15_0001);
        let mut c = Call::new(&STEEL, n, 2);
        c.state0[1] = 7.5; // an entry past the work: carried through
        let (mut stored_n, mut dissipated_n) = (0.0, 0.0);
        for step in 0..10 {
            c.dstrain = random_vec(&mut rng, n, 1e-3);
            let out = call(&mut r, &c);
            let el = elastic(kind, &c);
            assert!(rel(&out.stress, &el.stress) <= 1e-12 && rel(&out.tangent, &el.tangent) <= 1e-12);
            assert!(out.outcome.provides(provides::ENERGY));
            assert_eq!(out.state[1], 7.5);
            let c_de = matvec(&el.tangent, &c.dstrain);
            let quad: f64 = c.dstrain.iter().zip(&c_de).map(|(a, b)| a * b).sum();
            let d_dissipated = out.energy[1] - dissipated_n;
            assert!(d_dissipated < 0.0, "{kind} step {step}: dissipation fell by {d_dissipated:e}");
            assert!(
                (d_dissipated + 0.5 * quad).abs() <= 1e-10 * quad,
                "{kind} step {step}: {d_dissipated:e} vs −½ Δε·CΔε = {:e}",
                -0.5 * quad
            );
            let trapezoid: f64 = (0..n).map(|i| 0.5 * (c.stress0[i] + out.stress[i]) * c.dstrain[i]).sum();
            assert!((out.energy[0] - stored_n - trapezoid).abs() <= 1e-10 * out.energy[0].abs().max(1e-6));
            stored_n = out.energy[0];
            dissipated_n = out.energy[1];
            for i in 0..n {
                c.strain[i] += c.dstrain[i];
            }
            c.stress0.copy_from_slice(&out.stress);
            c.state0.copy_from_slice(&out.state);
        }
        assert!(dissipated_n < 0.0);
        // Without a state entry for the work it refuses to run.
        let mut r0 =
            lib.routine("pz_negative_dissipation", info("pz_negative_dissipation", kind, 0, 2)).unwrap();
        let (res, _) = try_call(&mut r0, &Call::new(&STEEL, n, 0));
        assert!(matches!(res, Err(Fault::Status { status: status::FAILED, .. })), "{res:?}");
    }
}

// Every probe-zoo routine exports its twin, and each rejects what it does not support.
#[test]
fn probe_zoo_routines_export_twins_and_refuse_unsupported_kinds() {
    let lib = Library::open(c_lib()).unwrap();
    for sym in ["pz_saved_state", "pz_writes_strain", "pz_not_objective", "pz_negative_dissipation"] {
        assert!(lib.has_symbol(sym) && lib.has_symbol(&format!("{sym}_cx")), "{sym}");
    }
    let mut r = lib.routine("pz_not_objective", info("pz_not_objective", PointKind::Uniaxial, 0, 2)).unwrap();
    let (res, _) = try_call(&mut r, &Call::new(&STEEL, 1, 0));
    match res {
        Err(Fault::Status { message, .. }) => assert!(message.contains("unsupported ncomp"), "{message}"),
        other => panic!("uniaxial accepted: {other:?}"),
    }
}
