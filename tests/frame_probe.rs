//! The frame probe: isotropic laws (elasticity, J2 with every hardening of the model) rotate
//! their stress and tangent with the strain, σ(R ε Rᵀ) = R σ(ε) Rᵀ — frame indifference of an
//! isotropic law at small strain, a standard result (the J2 update depends on the strain only
//! through isotropic tensor functions: Simo & Hughes 1998, Computational Inelasticity, Box 3.2,
//! from memory) — while a law that singles out the global axes does not. An orthotropic law
//! passes only when its material axes are rotated too.

use tancheck::core::path::{Path, PathIncrement, Shape};
use tancheck::core::probe::frame::{rotate_sym, rotation, Frame};
use tancheck::core::probe::{Probe, ProbeEnv, ProbeResult, ProbeSpec, ProbeStatus};
use tancheck::core::{
    CallInput, CallOutput, Caller, Fault, PointKind, PointState, Routine, RoutineInfo, Settings,
};
use tancheck::models::reference;

const ELASTIC: [f64; 2] = [200000.0, 0.3];
/// Linear isotropic, Voce and linear kinematic hardening at once.
const J2_ALL: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 300.0, 30.0, 500.0];

fn run(routine: &mut dyn Routine, props: &[f64], path: &Path, spec: &ProbeSpec) -> ProbeResult {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    let start = PointState::zero(&info, 20.0);
    let settings = Settings::default();
    let env = ProbeEnv { props, start: &start, path, settings: &settings, spec };
    let r = Frame.run(&mut caller, &env).unwrap();
    eprintln!("{}: {} — {}", info.name, r.status.word(), r.summary);
    r
}

fn paths() -> Vec<Path> {
    vec![
        Path::ramp(Shape::TensionShear, 4e-3, 8, 4),
        Path::uniaxial_stress(4e-3, 8, 4),
        Path::ramp(Shape::Shear12, 5e-3, 5, 5),
    ]
}

#[test]
fn isotropic_laws_rotate_with_the_frame() {
    let spec = ProbeSpec::named("frame");
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric] {
        for path in paths() {
            for (model, props) in
                [("elastic", &ELASTIC[..]), ("j2", &J2_ALL[..]), ("j2-continuum", &J2_ALL[..])]
            {
                let mut r = reference(model, kind).unwrap();
                let res = run(&mut r, props, &path, &spec);
                assert_eq!(res.status, ProbeStatus::Pass, "{model} {kind} {}: {res:?}", path.name);
                assert!(res.value.unwrap() <= 1e-12, "{model} {kind}: {res:?}");
            }
        }
    }
    // Plane stress elasticity, rotated about axis 3.
    let mut r = reference("elastic", PointKind::PlaneStress).unwrap();
    assert_eq!(run(&mut r, &ELASTIC, &paths()[0], &spec).status, ProbeStatus::Pass);
    // Any angle: a larger one, given as `amplitude`.
    let spec = ProbeSpec { amplitude: Some(2.1), ..ProbeSpec::named("frame") };
    let mut r = reference("j2", PointKind::Solid3d).unwrap();
    assert_eq!(run(&mut r, &J2_ALL, &paths()[0], &spec).status, ProbeStatus::Pass);
}

/// Isotropic elasticity plus c·(ε11 − ε22) on σ11 (total strain), with the matching tangent
/// entries: the returned tangent is still the derivative, but the law singles out axes 1, 2.
struct Skewed {
    inner: tancheck::core::ModelRoutine<tancheck::models::AnyModel>,
    c: f64,
    /// Only once the state has changed (plastic strain): a law whose inelastic response
    /// singles out axes 1 and 2 by design (as an orthotropic yield surface does), with an
    /// isotropic elastic response.
    once_yielded: bool,
}

impl Routine for Skewed {
    fn info(&self) -> &RoutineInfo {
        self.inner.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.inner.call(input, output)?;
        if self.once_yielded && output.state.iter().all(|s| *s == 0.0) {
            return Ok(());
        }
        let n = self.inner.info().convention.ncomp();
        let d = input.strain[0] + input.dstrain[0] - input.strain[1] - input.dstrain[1];
        output.stress[0] += self.c * d;
        output.tangent[0] += self.c;
        output.tangent[n] -= self.c;
        Ok(())
    }
}

#[test]
fn a_law_that_singles_out_axes_fails() {
    // Declared isotropic: a response that singles out axes fails. (Undeclared, the same
    // response is anisotropic without axes: skipped, see below.)
    let spec = ProbeSpec { anisotropic: Some(false), ..ProbeSpec::named("frame") };
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
        for (model, props) in [("elastic", &ELASTIC[..]), ("j2", &J2_ALL[..])] {
            // c = 1% of E: far above rounding, small beside the elastic moduli.
            let mut r = Skewed { inner: reference(model, kind).unwrap(), c: 2000.0, once_yielded: false };
            let res = run(&mut r, props, &paths()[0], &spec);
            assert_eq!(res.status, ProbeStatus::Fail, "{model} {kind}: {res:?}");
            assert_eq!(res.increment, Some(1), "{res:?}");
            assert!(res.value.unwrap() > 1e-4, "{res:?}");
            assert!(res.summary.contains("not frame indifferent"), "{}", res.summary);
        }
    }
    // The same term with c = 0 passes: the failure is the term's.
    let mut r =
        Skewed { inner: reference("elastic", PointKind::Solid3d).unwrap(), c: 0.0, once_yielded: false };
    assert_eq!(run(&mut r, &ELASTIC, &paths()[0], &spec).status, ProbeStatus::Pass);
}

// An isotropic elastic response whose stress stops rotating only once the state has changed
// is an anisotropic inelastic law by design (an orthotropic yield surface: a correct Hill-type
// routine failed the default suite, found by a user-style sweep) or a frame-indifference
// defect: nothing declared, the probe is skipped with that reason and the increment; declared
// isotropic, it fails there.
#[test]
fn an_inelastic_response_that_singles_out_axes_needs_a_declaration() {
    let path = &paths()[0];
    let mut r = Skewed { inner: reference("j2", PointKind::Solid3d).unwrap(), c: 2000.0, once_yielded: true };
    let res = run(&mut r, &J2_ALL, path, &ProbeSpec::named("frame"));
    assert_eq!(res.status, ProbeStatus::Skipped, "{res:?}");
    assert!(
        res.summary.contains("anisotropic by design") && res.summary.contains("`axes`"),
        "{}",
        res.summary
    );
    let k = res.increment.expect("the increment is named");
    assert!(k >= 2, "the elastic increments rotate: {res:?}");
    let spec = ProbeSpec { anisotropic: Some(false), ..ProbeSpec::named("frame") };
    let res = run(&mut r, &J2_ALL, path, &spec);
    assert_eq!(res.status, ProbeStatus::Fail, "{res:?}");
    assert_eq!(res.increment, Some(k), "{res:?}");
}

/// Orthotropic inputs (any valid set would do; these follow the T300/914C ply of
/// REFERENCES.md with E3 = E2, G13 = G12, ν13 = ν12 and ν23 = 0.4 assumed), material axes
/// a1 = (1, 1, 0), a2 = (−1, 1, 0.5) at properties 9..12 and 12..15.
const ORTHO: [f64; 15] =
    [138000.0, 11000.0, 11000.0, 0.28, 0.28, 0.4, 5500.0, 5500.0, 3928.57, 1.0, 1.0, 0.0, -1.0, 1.0, 0.5];

#[test]
fn anisotropic_laws_need_their_axes_rotated() {
    let path = &paths()[0];
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
        let mut props = ORTHO;
        if kind != PointKind::Solid3d {
            // In-plane axes for a plane point: the rotation about axis 3 keeps them in-plane.
            props[14] = 0.0;
        }
        let with_axes =
            ProbeSpec { anisotropic: Some(true), axes: Some(vec![9, 12]), ..ProbeSpec::named("frame") };
        let mut r = reference("orthotropic", kind).unwrap();
        let res = run(&mut r, &props, path, &with_axes);
        assert_eq!(res.status, ProbeStatus::Pass, "{kind}: {res:?}");
        assert!(res.summary.contains("material axes rotated"), "{}", res.summary);
        // Declared isotropic, it is not frame indifferent.
        let isotropic = ProbeSpec { anisotropic: Some(false), ..ProbeSpec::named("frame") };
        let res = run(&mut r, &props, path, &isotropic);
        assert_eq!(res.status, ProbeStatus::Fail, "{kind}: {res:?}");
        // Nothing declared: its elastic response is anisotropic and no axes are given, so the
        // probe is skipped with that reason, not failed (a correct routine).
        let res = run(&mut r, &props, path, &ProbeSpec::named("frame"));
        assert_eq!(res.status, ProbeStatus::Skipped, "{kind}: {res:?}");
        assert!(res.summary.contains("anisotropic") && res.summary.contains("`axes`"), "{}", res.summary);
        // Declared anisotropic without axes: skipped with the reason.
        let no_axes = ProbeSpec { anisotropic: Some(true), ..ProbeSpec::named("frame") };
        let res = run(&mut r, &props, path, &no_axes);
        assert_eq!(res.status, ProbeStatus::Skipped);
        assert!(res.summary.contains("axes"), "{}", res.summary);
    }
}

#[test]
fn what_cannot_be_rotated_is_skipped() {
    let spec = ProbeSpec::named("frame");
    let path =
        Path { name: "one".into(), increments: vec![PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0])] };
    let mut r = reference("elastic", PointKind::Uniaxial).unwrap();
    assert_eq!(run(&mut r, &ELASTIC, &path, &spec).status, ProbeStatus::Skipped);
    // A start with stress: skipped with the reason.
    let mut r = reference("elastic", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let mut start = PointState::zero(&info, 20.0);
    start.stress[0] = 10.0;
    let settings = Settings::default();
    let env = ProbeEnv { props: &ELASTIC, start: &start, path: &path, settings: &settings, spec: &spec };
    let res = Frame.run(&mut caller, &env).unwrap();
    assert_eq!(res.status, ProbeStatus::Skipped);
    assert!(res.summary.contains("nonzero"), "{}", res.summary);
}

/// The frame probe of the J2 reference model from a start state with `state` set.
fn from_state(state: &[(usize, f64)], spec: &ProbeSpec) -> Result<ProbeResult, tancheck::core::CoreError> {
    let mut r = reference("j2", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let mut start = PointState::zero(&info, 20.0);
    for &(i, v) in state {
        start.state[i] = v;
    }
    let settings = Settings::default();
    let path = &paths()[0];
    let env = ProbeEnv { props: &J2_ALL, start: &start, path, settings: &settings, spec };
    Frame.run(&mut caller, &env)
}

// A start state nonzero only in scalar state variables (the J2 model's equivalent plastic
// strain α, state index 6, after earlier hardening) is the same in every frame: declared
// with `scalar_states`, the probe runs from it and the isotropic law passes (isotropic J2 with
// any α_n is frame indifferent: the same standard result as above). Undeclared, it is
// skipped with the hint; a tensor state (the back stress β₁₁, index 7) declared scalar
// wrongly does not rotate, and the probe fails; an index beyond the state is bad input.
#[test]
fn scalar_state_variables_declared_as_such_may_start_nonzero() {
    let alpha = [(6, 0.01)];
    let undeclared = from_state(&alpha, &ProbeSpec::named("frame")).unwrap();
    assert_eq!(undeclared.status, ProbeStatus::Skipped);
    assert!(undeclared.summary.contains("scalar_states"), "{}", undeclared.summary);
    let declared = ProbeSpec { scalar_states: Some(vec![6]), ..ProbeSpec::named("frame") };
    let res = from_state(&alpha, &declared).unwrap();
    assert_eq!(res.status, ProbeStatus::Pass, "{res:?}");
    assert!(res.value.unwrap() <= 1e-12, "{res:?}");
    let wrong = ProbeSpec { scalar_states: Some(vec![6, 7]), ..ProbeSpec::named("frame") };
    let res = from_state(&[(6, 0.01), (7, 80.0)], &wrong).unwrap();
    assert_eq!(res.status, ProbeStatus::Fail, "{res:?}");
    let beyond = ProbeSpec { scalar_states: Some(vec![13]), ..ProbeSpec::named("frame") };
    let err = from_state(&alpha, &beyond).unwrap_err().to_string();
    assert!(err.contains("scalar state index 13 is not a state variable (the routine has 13)"), "{err}");
}

// The rotation helpers agree with a rotation worked by hand: 90° about axis 3 maps e₁ to e₂,
// so a uniaxial tensor along 1 becomes one along 2 and a 12 shear changes sign.
#[test]
fn a_quarter_turn_about_axis_3() {
    let r = rotation([0.0, 0.0, 1.0], std::f64::consts::FRAC_PI_2);
    let b = rotate_sym(&r, &[1.0, 0.0, 0.0, 0.0, 0.0, 0.0]);
    let want = [0.0, 1.0, 0.0, 0.0, 0.0, 0.0];
    for i in 0..6 {
        assert!((b[i] - want[i]).abs() < 1e-15, "{b:?}");
    }
    let b = rotate_sym(&r, &[0.0, 0.0, 0.0, 0.0, 0.0, 1.0]);
    assert!((b[5] + 1.0).abs() < 1e-15, "{b:?}");
}

// pz_not_objective of fortran-shim/examples/c/probe_zoo.c (elasticity plus an energy term in
// (ε11 − ε22)²), compiled and loaded through the guarded shim, fails the probe; compiled
// isotropic J2 (c_j2, same file set) passes.
#[test]
fn the_compiled_non_objective_routine_fails() {
    use tancheck::abi::{build_library, BuildOptions, Library};
    use tancheck::core::{Convention, ShearMeasure};
    let examples = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c");
    let src = examples.join("probe_zoo.c");
    let dir = std::env::temp_dir().join(format!("tancheck-frame-probe-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join("libframe_probe.so");
    build_library(&BuildOptions::new([src], &out)).unwrap_or_else(|e| panic!("building probe_zoo.c: {e}"));
    let lib = Library::open(&out).unwrap();
    // It claims isotropy: declared so, it fails.
    let spec = ProbeSpec { anisotropic: Some(false), ..ProbeSpec::named("frame") };
    for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
        let info = RoutineInfo {
            name: "pz_not_objective".into(),
            convention: Convention::new(kind, ShearMeasure::Engineering),
            nstate: 0,
            nprop: 2,
        };
        let mut r = lib.routine("pz_not_objective", info).unwrap();
        let res = run(&mut r, &ELASTIC, &paths()[0], &spec);
        assert_eq!(res.status, ProbeStatus::Fail, "{kind}: {res:?}");
        assert_eq!(res.increment, Some(1));
    }
    let _ = std::fs::remove_dir_all(&dir);
}

// A scalar damage routine (fortran-shim/examples/c/scalar_damage.c: damage driven by an
// energy-norm equivalent strain, growing only, secant unloading), loaded, unloaded and
// reloaded to the same strain: the reload ends (increment 18) exactly on the largest equivalent strain so
// far, a tie that rounding in the rotated frame settles the other way (damage grows there by
// a rounding, or not). The stress rotates to 1.8e-15, the tangents are the two sides' (4.3e-2
// apart), and the probe failed a correct routine (found by a user-style sweep). A tangent
// that is not objective (the damage term left out of one strain column) still fails.
#[test]
fn a_tie_at_a_branch_boundary_is_not_held_against_the_routine() {
    use tancheck::abi::{build_library, BuildOptions, Library};
    use tancheck::core::{Convention, ShearMeasure};
    let src =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/scalar_damage.c");
    let dir = std::env::temp_dir().join(format!("tancheck-frame-tie-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let load = |flaw: u32| -> Library {
        let out = dir.join(format!("libdamage{flaw}.so"));
        let mut opts = BuildOptions::new([&src], &out);
        opts.cflags = vec![format!("-DFLAW={flaw}")];
        build_library(&opts).unwrap_or_else(|e| panic!("building scalar_damage.c: {e}"));
        Library::open(&out).unwrap()
    };
    let info = RoutineInfo {
        name: "scalar_damage".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 2,
        nprop: 4,
    };
    let props = [32000.0, 0.2, 1e-4, 1.5e-3];
    let load_inc = PathIncrement::strain([1.2e-4, -3e-5, -3e-5, 0.0, 0.0, 8e-5]);
    let unload = PathIncrement::strain([-1.8e-4, 4.5e-5, 4.5e-5, 0.0, 0.0, -1.2e-4]);
    let mut increments = vec![load_inc.clone(); 8];
    increments.extend(vec![unload; 4]);
    increments.extend(vec![load_inc; 8]);
    increments.extend(vec![PathIncrement::strain([0.0, 1e-4, 0.0, 5e-5, 0.0, 0.0]); 2]);
    let path = Path { name: "load, unload, reload to the same strain".into(), increments };
    let spec = ProbeSpec::named("frame");
    let lib = load(0);
    let mut r = lib.routine("sweep_dmg", info.clone()).unwrap();
    let res = run(&mut r, &props, &path, &spec);
    assert_eq!(res.status, ProbeStatus::Pass, "{res:?}");
    // Where rounding took the other branch, the details say so (the reload's end).
    for d in res.details.iter().filter(|d| d.contains("branch boundary")) {
        assert!(d.starts_with("increment 18 "), "{d}");
    }
    let flawed = load(3);
    let mut r = flawed.routine("sweep_dmg", info).unwrap();
    let res = run(&mut r, &props, &path, &spec);
    assert_eq!(res.status, ProbeStatus::Fail, "{res:?}");
    let _ = std::fs::remove_dir_all(&dir);
}

/// An isotropic law with a kink: σ = E ε + k ⟨|ε| − κ₀⟩ n, n = ε/|ε| (Mandel form; an isotropic
/// tensor function of ε, so it rotates with the frame). Invented numbers; the derivative is
/// elementary: beyond κ₀, E I + k (I − (κ₀/|ε|)(I − n⊗n)). At |ε| = κ₀ (within 1e-10 of it) the
/// routine returns the forward one-sided derivative column by column, E I + k n ⊗ n⁺ with
/// n⁺ⱼ = max(nⱼ, 0), as the check accepts at a kink; along rotated axes those columns are not
/// the rotated ones (a directional derivative at a kink is not linear in the direction).
struct CornerSpring(RoutineInfo);

impl Routine for CornerSpring {
    fn info(&self) -> &RoutineInfo {
        &self.0
    }
    #[allow(clippy::needless_range_loop)]
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        let (e, k, k0) = (input.props[0], input.props[1], input.props[2]);
        // Engineering shear to Mandel: D = diag(1, 1, 1, 1/√2, 1/√2, 1/√2).
        let dm = |i: usize| if i < 3 { 1.0 } else { std::f64::consts::FRAC_1_SQRT_2 };
        let m: [f64; 6] = std::array::from_fn(|i| (input.strain[i] + input.dstrain[i]) * dm(i));
        let r = m.iter().map(|x| x * x).sum::<f64>().sqrt();
        let n: [f64; 6] = std::array::from_fn(|i| if r > 0.0 { m[i] / r } else { 0.0 });
        let over = r - k0;
        let mut c = [[0.0; 6]; 6];
        for (i, row) in c.iter_mut().enumerate() {
            row[i] = e;
        }
        if over.abs() <= 1e-10 * k0 {
            for i in 0..6 {
                for j in 0..6 {
                    c[i][j] += k * n[i] * n[j].max(0.0);
                }
            }
        } else if over > 0.0 {
            for i in 0..6 {
                for j in 0..6 {
                    let id = if i == j { 1.0 } else { 0.0 };
                    c[i][j] += k * (id - k0 / r * (id - n[i] * n[j]));
                }
            }
        }
        for i in 0..6 {
            // σ = D σ_M; the tangent in the routine's form D C_M D, column-major.
            output.stress[i] = dm(i) * (e * m[i] + k * over.max(0.0) * n[i]);
            for j in 0..6 {
                output.tangent[i + 6 * j] = dm(i) * c[i][j] * dm(j);
            }
            output.dstress_dtemp[i] = 0.0;
        }
        output.energy[0] = 0.0;
        output.energy[1] = 0.0;
        output.outcome.branch = i32::from(over > 0.0);
        Ok(())
    }
}

// A point that ends exactly on a kink of an isotropic law (|ε| = κ₀ after the first
// increment, n = (e₁ − e₂)/√2: the forward 11 column loads and the 22 column unloads, and along
// the rotated axes others do):
// the stress rotates, the tangent there is one-sided column by column and need not
// rotate, so the probe does not compare it and says so. Away from the kink (the second
// increment, beyond κ₀) the tangent is compared as before. A correct damage law with a tension
// split failed here at principal strains of exactly zero (a user-style sweep).
#[test]
fn a_tangent_on_a_kink_is_not_held_to_rotate() {
    let info = RoutineInfo {
        name: "corner-spring".into(),
        convention: tancheck::core::Convention::new(
            PointKind::Solid3d,
            tancheck::core::ShearMeasure::Engineering,
        ),
        nstate: 0,
        nprop: 3,
    };
    let path = Path {
        name: "onto the kink, then beyond".into(),
        increments: vec![
            PathIncrement::strain([1e-3, -1e-3, 0.0, 0.0, 0.0, 0.0]),
            PathIncrement::strain([5e-4, -2e-4, 0.0, 0.0, 0.0, 4e-4]),
        ],
    };
    let props = [1000.0, 400.0, 1e-3 * std::f64::consts::SQRT_2];
    let res = run(&mut CornerSpring(info), &props, &path, &ProbeSpec::named("frame"));
    assert_eq!(res.status, ProbeStatus::Pass, "{res:?}");
    assert!(res.summary.contains("increment 1 ends on a kink"), "{}", res.summary);
    assert!(res.details.iter().any(|d| d.starts_with("increment 1 ends on a kink")), "{:?}", res.details);
    // Increment 2, off the kink, was compared: its tangent rotates to rounding.
    assert!(res.value.unwrap() <= 1e-12, "{res:?}");
}
