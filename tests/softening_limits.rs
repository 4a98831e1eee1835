//! The probes softening needs beyond irreversibility and regularisation, each on the ply model
//! and the cohesive law, with a correct routine and a flawed one:
//! - softening: a negative eigenvalue of the tangent's symmetric part during declared damage
//!   growth is information; where no declared damage grows it fails (`ply-healing` and a
//!   cohesive law that forgets its damage soften on unloading);
//! - viscous-limit: as η → 0 the stress update converges to the rate-independent one and the
//!   tangent is consistent at every viscosity (`ply-viscous-no-factor`; a viscous cohesive law
//!   written here, correct, without the factor Δt/(η + Δt), and relaxing towards the damage of
//!   the start of the increment);
//! - snap-back: the largest admissible length L_max = 2 E G_f/σ₀² (crack band, Bažant & Oh
//!   1983, from memory; the bound is derived in REFERENCES.md) per mode of the ply; a ply that silently shrinks a length
//!   it cannot use; for the cohesive law the smallest admissible fracture energy t₀²/(2K)
//!   (the bilinear law needs δ_f = 2 G_c/t₀ > δ₀ = t₀/K; Camanho & Dávila 2002).
//!
//! The compiled C and Fortran ply routines run the same probes at the end of the file.

use std::path::Path as FsPath;

use tancheck::abi::Library;
use tancheck::core::path::Path;
use tancheck::core::probe::{run_suite, ProbeSpec, ProbeStatus};
use tancheck::core::routine::status;
use tancheck::core::{
    CallInput, CallOutput, Caller, Fault, Model, ModelRoutine, PointKind, PointState, Routine, RoutineInfo,
    Scalar, Settings,
};
use tancheck::models::{Cohesive, Ply, PlyFlaw};
use tancheck_testkit::libs::build_examples;

mod softening_common;
use softening_common::{cohesive_path, path, ply_path, ply_props, probe, ForgetfulCohesive, COHESIVE};

/// The demo ply with ν12 = ν13 = ν23 = 0: a path of one material strain is a uniaxial stress
/// in one mode, E_k = C_kk, and the onset energy is X²/(2 E_k).
fn ply_uncoupled() -> Vec<f64> {
    let mut p = ply_props(0.0);
    p[3] = 0.0;
    p[4] = 0.0;
    p[5] = 0.0;
    p
}

fn softening(damage: &[usize]) -> ProbeSpec {
    ProbeSpec { damage: Some(damage.to_vec()), ..ProbeSpec::named("softening") }
}

fn viscous(index: usize) -> ProbeSpec {
    ProbeSpec { viscosity: Some(index), ..ProbeSpec::named("viscous-limit") }
}

fn snap_back(damage: &[usize], length: Option<usize>, g: f64) -> ProbeSpec {
    ProbeSpec {
        damage: Some(damage.to_vec()),
        length,
        fracture_energy: Some(g),
        ..ProbeSpec::named("snap-back")
    }
}

// ---------------------------------------------------------------------------------------
// softening

#[test]
fn softening_during_growth_is_information_for_the_ply_and_healing_fails() {
    for kind in Ply::KINDS {
        let mut good = ModelRoutine(Ply::new(kind).unwrap());
        let r = probe(&mut good, softening(&[4, 5, 6, 7]), &ply_props(0.0), &ply_path(1.0));
        assert_eq!(r.status, ProbeStatus::Pass, "{kind}: {} {:#?}", r.summary, r.details);
        assert!(r.summary.contains("softening during damage growth"), "{kind}: {}", r.summary);
        assert!(r.value.unwrap() < 0.0, "{kind}: a negative eigenvalue was seen: {:?}", r.value);
        let mut bad = ModelRoutine(Ply::with_flaw(kind, PlyFlaw::Healing).unwrap());
        let r = probe(&mut bad, softening(&[4, 5, 6, 7]), &ply_props(0.0), &ply_path(1.0));
        assert_eq!(r.status, ProbeStatus::Fail, "{kind}: {}", r.summary);
        // It softens on the first unloading increment (9), where its damage falls.
        assert_eq!(r.increment, Some(9), "{kind}: {}", r.summary);
        assert!(r.summary.contains("no declared damage grows"), "{}", r.summary);
    }
}

#[test]
fn softening_during_growth_is_information_for_the_cohesive_law_and_forgetting_fails() {
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, softening(&[0]), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:#?}", r.summary, r.details);
    assert!(r.summary.contains("softening during damage growth"), "{}", r.summary);
    let mut bad = ModelRoutine(ForgetfulCohesive(Cohesive::new(PointKind::Cohesive3d).unwrap()));
    let r = probe(&mut bad, softening(&[0]), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert_eq!(r.increment, Some(9), "{}", r.summary);
}

#[test]
fn softening_reports_the_band_normal_where_ellipticity_is_lost() {
    // Uniaxial material strain in matrix tension (plane stress, ν = 0): from the onset (in
    // increment 4) the 22 entry of the tangent is the softening slope, negative, while the
    // shear stiffness (1 − d_mt) G12 stays positive, so det Q(n) < 0 for normals near axis 2.
    let p = path("transverse tension into growth", 1.0, &[([0.0, 7.5e-4, 0.0, 0.0, 0.0, 0.0], 8)]);
    let mut good = ModelRoutine(Ply::new(PointKind::PlaneStress).unwrap());
    let r = probe(&mut good, softening(&[4, 5, 6, 7]), &ply_uncoupled(), &p);
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:#?}", r.summary, r.details);
    assert!(r.summary.contains("ellipticity lost at increment 4 (damage growth)"), "{}", r.summary);
    // The band normal against a brute-force scan (0.01°) of det Q(n) for the returned tangent
    // of increment 4, Q = [[C11 n1² + C66 n2², (C12 + C66) n1 n2], [(C21 + C66) n1 n2,
    // C66 n1² + C22 n2²]] (Rudnicki & Rice 1975; engineering shear, no normal–shear coupling
    // on the material axes).
    let angle: f64 = r.summary.split(" at ").last().unwrap().split('°').next().unwrap().parse().unwrap();
    let props = ply_uncoupled();
    let (strain, dstrain, state0, stress0) = ([0.0, 2.25e-3, 0.0], [0.0, 7.5e-4, 0.0], [0.0; 8], [0.0; 3]);
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp: [20.0, 0.0],
        stress0: &stress0,
        state0: &state0,
        time: [0.0, 1.0],
        increment: 4,
        want_tangent: true,
    };
    let mut out = tancheck::core::driver::Outputs::new(3, 8, f64::NAN);
    good.call(&input, &mut out.view()).unwrap();
    let c = |i: usize, j: usize| out.tangent[i + 3 * j];
    let det = |t: f64| {
        let (n1, n2) = (t.cos(), t.sin());
        let q11 = c(0, 0) * n1 * n1 + c(2, 2) * n2 * n2;
        let q22 = c(2, 2) * n1 * n1 + c(1, 1) * n2 * n2;
        q11 * q22 - (c(0, 1) + c(2, 2)) * (c(1, 0) + c(2, 2)) * n1 * n1 * n2 * n2
    };
    let best = (0..9000).map(|k| (k as f64 * 0.01).to_radians()).min_by(|a, b| det(*a).total_cmp(&det(*b)));
    let want = best.unwrap().to_degrees();
    assert!(c(1, 1) < 0.0 && det(want.to_radians()) < 0.0, "{:?}", out.tangent);
    assert!((angle - want).abs() < 0.06, "probe {angle}°, scan {want}°");
}

#[test]
fn softening_without_declared_damage_is_skipped_and_a_bad_index_is_an_error() {
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, ProbeSpec::named("softening"), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Skipped);
    assert!(r.summary.contains("no damage variables declared"), "{}", r.summary);
    let info = good.0.info().clone();
    let mut caller = Caller::new(&mut good);
    let e = run_suite(
        &mut caller,
        "s",
        &[softening(&[2])],
        &COHESIVE,
        &PointState::zero(&info, 20.0),
        &cohesive_path(1.0),
        &Settings::default(),
    )
    .unwrap_err();
    assert!(e.to_string().contains("damage index 2"), "{e}");
}

// ---------------------------------------------------------------------------------------
// viscous limit

/// Which viscous cohesive law.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Visc {
    /// d_v = (η d_v,n + Δt d)/(η + Δt), tangent with Δt/(η + Δt) on the growth term.
    Correct,
    /// The same update, the growth term of the tangent taken whole.
    NoFactor,
    /// For η > 0 the viscous damage relaxes towards the damage of the start of the increment
    /// (explicit in the driving damage): a consistent tangent, but one increment behind the
    /// rate-independent law however small η is.
    Lagging,
}

/// The cohesive law with Duvaut–Lions viscous damage (REFERENCES.md: backward Euler,
/// ḋ_v = (d − d_v)/η). Properties: the cohesive law's six and η; state [d, G_d, d_v].
/// Traction t = t_inner + (d − d_v) K δ̃ with δ̃ = (⟨δ₃⟩, δ_s); tangent
/// T = T_inner + (d − d_v) K Ĩ + (1 − v) K δ̃ ⊗ ∂d/∂δ, v = Δt/(η + Δt), where
/// K δ̃ ⊗ ∂d/∂δ = E − T_inner and E is the inner law's diagonal ((1 − d) K, K when closed).
#[derive(Clone, Debug)]
struct ViscousCohesive {
    inner: Cohesive,
    info: RoutineInfo,
    flaw: Visc,
}

impl ViscousCohesive {
    fn new(flaw: Visc) -> ViscousCohesive {
        let inner = Cohesive::new(PointKind::Cohesive3d).unwrap();
        let info = RoutineInfo {
            name: format!("viscous cohesive ({flaw:?})"),
            nstate: 3,
            nprop: 7,
            ..inner.info().clone()
        };
        ViscousCohesive { inner, info, flaw }
    }
}

impl Model for ViscousCohesive {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let p = input.props;
        let mut st = [S::zero(); 2];
        {
            let inner_in = CallInput { props: &p[..6], state0: &input.state0[..2], ..*input };
            let mut o = CallOutput {
                stress: &mut *output.stress,
                state: &mut st,
                tangent: &mut *output.tangent,
                dstress_dtemp: &mut *output.dstress_dtemp,
                energy: &mut *output.energy,
                outcome: &mut *output.outcome,
            };
            self.inner.evaluate(&inner_in, &mut o)?;
        }
        if output.outcome.status != status::OK {
            output.state.fill(S::cst(f64::NAN));
            return Ok(());
        }
        let (k, eta, dt) = (p[0], p[6], input.time[1]);
        let (d_n, dv_n, d) = (input.state0[0], input.state0[2], st[0]);
        let viscous = eta.re() > 0.0;
        let v = if viscous { S::cst(dt) / (eta + dt) } else { S::one() };
        let driving = if self.flaw == Visc::Lagging { d_n } else { d };
        let dv = if viscous { (eta * dv_n + driving * dt) / (eta + dt) } else { d };
        let factor = match self.flaw {
            Visc::Correct => S::one() - v,
            Visc::NoFactor => S::zero(),
            Visc::Lagging if viscous => S::one(),
            Visc::Lagging => S::zero(),
        };
        let mut sep = [S::zero(); 3];
        for (i, x) in sep.iter_mut().enumerate() {
            *x = input.strain[i] + input.dstrain[i];
        }
        let open = sep[0].re() >= 0.0;
        let eff = [if open { sep[0] } else { S::zero() }, sep[1], sep[2]];
        let diag = [if open { (S::one() - d) * k } else { k }, (S::one() - d) * k, (S::one() - d) * k];
        for i in 0..3 {
            output.stress[i] += (d - dv) * k * eff[i];
            for j in 0..3 {
                let e = if i == j { diag[i] } else { S::zero() };
                let growth = e - output.tangent[i + 3 * j];
                let shift = if i == j && (i > 0 || open) { (d - dv) * k } else { S::zero() };
                output.tangent[i + 3 * j] += shift + factor * growth;
            }
        }
        output.state[0] = d;
        output.state[1] = st[1];
        output.state[2] = dv;
        Ok(())
    }
}

fn viscous_cohesive_props(eta: f64) -> Vec<f64> {
    let mut p = COHESIVE.to_vec();
    p.push(eta);
    p
}

#[test]
fn viscous_limit_passes_the_viscous_ply_and_fails_the_ply_without_the_factor() {
    for kind in Ply::KINDS {
        let mut good = ModelRoutine(Ply::new(kind).unwrap());
        let r = probe(&mut good, viscous(25), &ply_props(0.02), &ply_path(0.01));
        assert_eq!(r.status, ProbeStatus::Pass, "{kind}: {} {:#?}", r.summary, r.details);
        assert!(r.value.unwrap() < 1e-3, "{kind}: {:?}", r.value);
        let mut bad = ModelRoutine(Ply::with_flaw(kind, PlyFlaw::ViscousNoFactor).unwrap());
        let r = probe(&mut bad, viscous(25), &ply_props(0.02), &ply_path(0.01));
        assert_eq!(r.status, ProbeStatus::Fail, "{kind}: {}", r.summary);
        assert!(r.summary.contains("tangent is not consistent"), "{}", r.summary);
        assert!(!r.summary.contains("does not converge"), "the update itself is right: {}", r.summary);
    }
}

#[test]
fn viscous_limit_on_a_viscous_cohesive_law_correct_without_the_factor_and_lagging() {
    let props = viscous_cohesive_props(0.02);
    let mut good = ModelRoutine(ViscousCohesive::new(Visc::Correct));
    let r = probe(&mut good, viscous(6), &props, &cohesive_path(0.01));
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:#?}", r.summary, r.details);
    let mut no_factor = ModelRoutine(ViscousCohesive::new(Visc::NoFactor));
    let r = probe(&mut no_factor, viscous(6), &props, &cohesive_path(0.01));
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("tangent is not consistent"), "{}", r.summary);
    let mut lagging = ModelRoutine(ViscousCohesive::new(Visc::Lagging));
    let r = probe(&mut lagging, viscous(6), &props, &cohesive_path(0.01));
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("does not converge to the rate-independent limit"), "{}", r.summary);
    assert!(!r.summary.contains("tangent"), "its tangent is consistent: {}", r.summary);
}

#[test]
fn viscous_limit_is_skipped_without_a_viscosity_or_without_time() {
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, ProbeSpec::named("viscous-limit"), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Skipped);
    assert!(r.summary.contains("no viscosity declared"), "{}", r.summary);
    let mut ply = ModelRoutine(Ply::new(PointKind::PlaneStress).unwrap());
    let r = probe(&mut ply, viscous(25), &ply_props(0.02), &ply_path(0.0));
    assert_eq!(r.status, ProbeStatus::Skipped);
    assert!(r.summary.contains("no time increments"), "{}", r.summary);
}

// ---------------------------------------------------------------------------------------
// snap-back

/// One path per mode of the ply (uniaxial material strain, plane stress, ν = 0), into damage
/// growth, with its strength X, modulus E_k and fracture energy: (mode, path, X, E, G).
fn mode_paths() -> [(&'static str, Path, f64, f64, f64); 4] {
    let one = |name: &str, slot: usize, step: f64, n: usize| {
        let mut d = [0.0; 6];
        d[slot] = step;
        path(name, 1.0, &[(d, n)])
    };
    [
        ("fibre tension", one("fibre tension", 0, 2.5e-3, 6), 1500.0, 138000.0, 90.0),
        ("fibre compression", one("fibre compression", 0, -2e-3, 5), 900.0, 138000.0, 80.0),
        ("matrix tension", one("matrix tension", 1, 7.5e-4, 6), 27.0, 11000.0, 0.25),
        ("matrix compression", one("matrix compression", 1, -4e-3, 6), 200.0, 11000.0, 2.0),
    ]
}

fn l_max_in(summary: &str) -> f64 {
    let tail = summary.split("L_max = ").nth(1).unwrap_or_else(|| panic!("no L_max in: {summary}"));
    tail.split([' ', ',', ';', ')']).next().unwrap().parse().unwrap()
}

#[test]
fn snap_back_gives_the_largest_admissible_length_of_each_ply_mode() {
    for (mode, p, x, e, g) in mode_paths() {
        let mut good = ModelRoutine(Ply::new(PointKind::PlaneStress).unwrap());
        let r = probe(&mut good, snap_back(&[4, 5, 6, 7], Some(24), g), &ply_uncoupled(), &p);
        assert_eq!(r.status, ProbeStatus::Pass, "{mode}: {} {:#?}", r.summary, r.details);
        // L_max = 2 E G_f/σ₀² (crack band, Bažant & Oh 1983; derived in REFERENCES.md):
        // 11.04, 27.259, 7.5446 and 1.1 mm for the four modes of the demo ply.
        let want = 2.0 * e * g / (x * x);
        let got = l_max_in(&r.summary);
        assert!((got / want - 1.0).abs() < 1e-5, "{mode}: L_max {got}, 2 E G/X² = {want}");
        assert!((r.value.unwrap() - 0.5 / want).abs() < 1e-5 * r.value.unwrap(), "{mode}: {:?}", r.value);
    }
    // Solid-3d: with every ν = 0, C_kk = E_k and the same bounds.
    for (mode, p, x, e, g) in mode_paths() {
        let mut good = ModelRoutine(Ply::new(PointKind::Solid3d).unwrap());
        let r = probe(&mut good, snap_back(&[4, 5, 6, 7], Some(24), g), &ply_uncoupled(), &p);
        assert_eq!(r.status, ProbeStatus::Pass, "{mode}: {} {:#?}", r.summary, r.details);
        assert!((l_max_in(&r.summary) / (2.0 * e * g / (x * x)) - 1.0).abs() < 1e-5, "{mode}: {}", r.summary);
    }
}

#[test]
fn a_length_too_large_is_reported_with_the_largest_admissible_one() {
    // Matrix tension path, L = 10 mm > L_max = 7.5446 mm: the ply refuses it (its message names
    // matrix compression, whose bound 1.1 mm is the smallest of the four modes).
    let (_, p, _, _, g) = mode_paths().into_iter().nth(2).unwrap();
    let mut props = ply_uncoupled();
    props[24] = 10.0;
    let mut good = ModelRoutine(Ply::new(PointKind::PlaneStress).unwrap());
    let r = probe(&mut good, snap_back(&[4, 5, 6, 7], Some(24), g), &props, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("refuses L = 1.000000e1"), "{}", r.summary);
    assert!(r.summary.contains("snaps back in matrix compression"), "{}", r.summary);
    assert!(r.summary.contains("too large for the fracture energy"), "{}", r.summary);
    assert!((l_max_in(&r.summary) / 7.544581 - 1.0).abs() < 1e-5, "{}", r.summary);
}

/// A ply that silently halves a length it cannot use until the call succeeds: it never snaps
/// back, but it dissipates a different energy from the one its user asked for.
#[derive(Clone, Debug)]
struct ShrinkingPly(Ply);

impl Model for ShrinkingPly {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let mut props = [S::zero(); 26];
        props.copy_from_slice(input.props);
        for _ in 0..40 {
            self.0.evaluate(&CallInput { props: &props, ..*input }, output)?;
            if output.outcome.status == status::OK {
                break;
            }
            props[24] *= S::cst(0.5);
        }
        Ok(())
    }
}

#[test]
fn a_ply_that_silently_shrinks_its_length_fails() {
    let (_, p, _, _, g) = mode_paths().into_iter().nth(2).unwrap();
    let mut bad = ModelRoutine(ShrinkingPly(Ply::new(PointKind::PlaneStress).unwrap()));
    // An admissible L: the routine must refuse 1.05 L_max, and it does not.
    let r = probe(&mut bad, snap_back(&[4, 5, 6, 7], Some(24), g), &ply_uncoupled(), &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("accepts L = 7.92"), "{}", r.summary);
    // L too large: reported with L_max, and the routine said nothing.
    let mut props = ply_uncoupled();
    props[24] = 10.0;
    let r = probe(&mut bad, snap_back(&[4, 5, 6, 7], Some(24), g), &props, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("accepts it without a word"), "{}", r.summary);
    assert!((l_max_in(&r.summary) / 7.544581 - 1.0).abs() < 1e-5, "{}", r.summary);
}

/// The cohesive law that, instead of refusing a toughness below t₀²/(2K), raises it quietly
/// to twice that bound.
#[derive(Clone, Debug)]
struct LenientCohesive(Cohesive);

impl Model for LenientCohesive {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let mut props = [S::zero(); 6];
        props.copy_from_slice(input.props);
        let (k, n, s) = (props[0], props[1], props[2]);
        let floor = if n.re() > s.re() { n * n / k } else { s * s / k };
        for g in &mut props[3..5] {
            if g.re() < floor.re() {
                *g = floor;
            }
        }
        self.0.evaluate(&CallInput { props: &props, ..*input }, output)
    }
}

#[test]
fn snap_back_of_the_cohesive_law_gives_the_smallest_admissible_fracture_energy() {
    // Mode I opening past onset; W₀ = N²/(2K) = 60²/(2·1e5) = 0.018 N/mm (derived from the
    // bilinear law: ½ t₀ δ₀ with δ₀ = N/K; Camanho & Dávila 2002).
    let p = path("mode I opening into growth", 1.0, &[([2.5e-4, 0.0, 0.0, 0.0, 0.0, 0.0], 6)]);
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, snap_back(&[0], None, COHESIVE[3]), &COHESIVE, &p);
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:#?}", r.summary, r.details);
    assert!((r.value.unwrap() - 0.018 / 0.3).abs() < 1e-9, "{:?}", r.value);
    // G_Ic = 0.01 < 0.018: the law refuses it (δ_f would not lie beyond δ₀).
    let mut small = COHESIVE;
    small[3] = 0.01;
    let r = probe(&mut good, snap_back(&[0], None, 0.01), &small, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("final separation not beyond onset"), "{}", r.summary);
    // A law that quietly raises it: reported with the smallest admissible fracture energy.
    let mut bad = ModelRoutine(LenientCohesive(Cohesive::new(PointKind::Cohesive3d).unwrap()));
    let r = probe(&mut bad, snap_back(&[0], None, 0.01), &small, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert!(r.summary.contains("below the energy to the onset of softening 1.800000e-2"), "{}", r.summary);
    // The toughness judged is the declared one, the suite's word: the summary says so, not that
    // the routine took a value it was never given (a user-style sweep).
    assert!(
        r.summary.starts_with("the declared fracture energy 1.000000e-2 (the suite's fracture_energy)"),
        "{}",
        r.summary
    );
    let r = probe(&mut bad, snap_back(&[0], None, COHESIVE[3]), &COHESIVE, &p);
    assert_eq!(r.status, ProbeStatus::Pass, "{}", r.summary);
}

#[test]
fn snap_back_is_skipped_without_damage_or_growth() {
    let (_, p, ..) = mode_paths().into_iter().nth(2).unwrap();
    let mut good = ModelRoutine(Ply::new(PointKind::PlaneStress).unwrap());
    let spec = ProbeSpec { length: Some(24), ..ProbeSpec::named("snap-back") };
    let r = probe(&mut good, spec, &ply_uncoupled(), &p);
    assert_eq!(r.status, ProbeStatus::Skipped, "{}", r.summary);
    let short = path("elastic only", 1.0, &[([0.0, 1e-4, 0.0, 0.0, 0.0, 0.0], 3)]);
    let r = probe(&mut good, snap_back(&[4, 5, 6, 7], Some(24), 0.25), &ply_uncoupled(), &short);
    assert_eq!(r.status, ProbeStatus::Skipped, "{}", r.summary);
    assert!(r.summary.contains("does not grow"), "{}", r.summary);
}

// ---------------------------------------------------------------------------------------
// the compiled C and Fortran ply routines

fn c_lib() -> &'static FsPath {
    build_examples("ply_c", &["c/ply.c"])
}

fn f_lib() -> &'static FsPath {
    build_examples("ply_f", &["fortran/ply.F90"])
}

/// Every softening probe on the compiled correct routine and its flawed variants.
fn compiled(lib_path: &FsPath, prefix: &str) {
    let lib = Library::open(lib_path).unwrap();
    for kind in Ply::KINDS {
        let open = |flaw: PlyFlaw| {
            let sym = format!("{prefix}_{}", Ply::name_of(flaw).replace('-', "_"));
            let info = Ply::with_flaw(kind, flaw).unwrap().info().clone();
            lib.routine(&sym, RoutineInfo { name: sym.clone(), ..info }).unwrap()
        };
        let mut good = open(PlyFlaw::None);
        let r = probe(&mut good, softening(&[4, 5, 6, 7]), &ply_props(0.0), &ply_path(1.0));
        assert_eq!(r.status, ProbeStatus::Pass, "{prefix} {kind}: {}", r.summary);
        assert!(r.summary.contains("softening during damage growth"), "{prefix} {kind}: {}", r.summary);
        let r = probe(&mut good, viscous(25), &ply_props(0.02), &ply_path(0.01));
        assert_eq!(r.status, ProbeStatus::Pass, "{prefix} {kind}: {}", r.summary);
        // One uniaxial path per mode (every ν = 0, so C_kk = E_k in both kinds).
        for (mode, p, x, e, g) in mode_paths() {
            let r = probe(&mut good, snap_back(&[4, 5, 6, 7], Some(24), g), &ply_uncoupled(), &p);
            assert_eq!(r.status, ProbeStatus::Pass, "{prefix} {kind} {mode}: {}", r.summary);
            let want = 2.0 * e * g / (x * x);
            assert!((l_max_in(&r.summary) / want - 1.0).abs() < 1e-5, "{mode}: {}", r.summary);
        }
        let (_, p, _, _, g) = mode_paths().into_iter().nth(2).unwrap();
        let mut props = ply_uncoupled();
        props[24] = 10.0;
        let r = probe(&mut good, snap_back(&[4, 5, 6, 7], Some(24), g), &props, &p);
        assert_eq!(r.status, ProbeStatus::Fail, "{prefix} {kind}: {}", r.summary);
        assert!(r.summary.contains("snaps back in matrix compression"), "{}", r.summary);

        let mut healing = open(PlyFlaw::Healing);
        let r = probe(&mut healing, softening(&[4, 5, 6, 7]), &ply_props(0.0), &ply_path(1.0));
        assert_eq!((r.status, r.increment), (ProbeStatus::Fail, Some(9)), "{prefix} {kind}: {}", r.summary);
        let mut no_factor = open(PlyFlaw::ViscousNoFactor);
        let r = probe(&mut no_factor, viscous(25), &ply_props(0.02), &ply_path(0.01));
        assert_eq!(r.status, ProbeStatus::Fail, "{prefix} {kind}: {}", r.summary);
        assert!(r.summary.contains("tangent is not consistent"), "{}", r.summary);
    }
}

#[test]
fn compiled_c_ply_under_the_softening_probes() {
    compiled(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn compiled_fortran_ply_under_the_softening_probes() {
    compiled(f_lib(), "f");
}
