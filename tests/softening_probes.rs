//! The softening probes on the ply model and the cohesive law, each with a correct routine
//! (must pass) and a flawed one (must fail with the probe's finding):
//! - irreversibility: declared damage variables never fall along a path that loads, unloads
//!   and reloads — the ply's `ply-healing` (damage from the current failure measure) and a
//!   cohesive law that forgets its damage (written here) heal and fail;
//! - regularisation: along a path to full failure the dissipated energy per unit volume × L
//!   is the fracture energy and does not change with L (Bažant & Oh 1983) — `ply-length-dropped`
//!   fails; for the cohesive law (no length) the area under the traction–separation curve is
//!   G_Ic (Camanho & Dávila 2002: G_c = ½ t₀ δ_f) — a law with its tractions scaled fails;
//! - softening at an increment that ends exactly where damage starts to grow (the onset, a
//!   reload to the largest strain so far): a bar with linear softening written here.

use tancheck::core::probe::{run_suite, ProbeSpec, ProbeStatus};
use tancheck::core::{
    CallInput, CallOutput, Caller, Fault, Model, ModelRoutine, PointKind, PointState, RoutineInfo, Scalar,
    Settings,
};
use tancheck::models::{Cohesive, Ply, PlyFlaw};

mod softening_common;
use softening_common::{cohesive_path, path, ply_path, ply_props, probe, ForgetfulCohesive, COHESIVE};

fn irreversibility(damage: &[usize]) -> ProbeSpec {
    ProbeSpec { damage: Some(damage.to_vec()), ..ProbeSpec::named("irreversibility") }
}

#[test]
fn irreversibility_passes_the_ply_and_fails_the_healing_ply() {
    for kind in Ply::KINDS {
        let mut good = ModelRoutine(Ply::new(kind).unwrap());
        let r = probe(&mut good, irreversibility(&[4, 5, 6, 7]), &ply_props(0.0), &ply_path(1.0));
        assert_eq!(r.status, ProbeStatus::Pass, "{kind}: {}", r.summary);
        assert!(r.summary.contains("grows"), "{kind}: the path must reach damage growth: {}", r.summary);
        let mut bad = ModelRoutine(Ply::with_flaw(kind, PlyFlaw::Healing).unwrap());
        let r = probe(&mut bad, irreversibility(&[4, 5, 6, 7]), &ply_props(0.0), &ply_path(1.0));
        assert_eq!(r.status, ProbeStatus::Fail, "{kind}: {}", r.summary);
        // It heals on the first unloading increment (9).
        assert_eq!(r.increment, Some(9), "{}", r.summary);
        assert!(r.summary.contains("heals"), "{}", r.summary);
    }
}

#[test]
fn irreversibility_passes_the_cohesive_law_and_fails_a_forgetful_one() {
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, irreversibility(&[0]), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Pass, "{}", r.summary);
    assert!(r.summary.contains("grows"), "{}", r.summary);
    let mut bad = ModelRoutine(ForgetfulCohesive(Cohesive::new(PointKind::Cohesive3d).unwrap()));
    let r = probe(&mut bad, irreversibility(&[0]), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert_eq!(r.increment, Some(9), "{}", r.summary);
}

#[test]
fn irreversibility_without_declared_damage_is_skipped_and_a_bad_index_is_an_error() {
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, ProbeSpec::named("irreversibility"), &COHESIVE, &cohesive_path(1.0));
    assert_eq!(r.status, ProbeStatus::Skipped);
    let info = good.0.info().clone();
    let mut caller = Caller::new(&mut good);
    let e = run_suite(
        &mut caller,
        "s",
        &[irreversibility(&[7])],
        &COHESIVE,
        &PointState::zero(&info, 20.0),
        &cohesive_path(1.0),
        &Settings::default(),
    )
    .unwrap_err();
    assert!(matches!(e, tancheck::core::CoreError::DamageIndex { index: 7, .. }), "{e:?}");
    assert!(e.to_string().contains("damage index 7"), "{e}");
}

/// The demo ply with ν12 = ν13 = 0, so that a path of transverse strain alone is a uniaxial
/// stress in the material frame and the matrix-tension softening is exactly linear in it.
fn ply_uncoupled() -> Vec<f64> {
    let mut p = ply_props(0.0);
    p[3] = 0.0;
    p[4] = 0.0;
    p
}

fn regularisation(length: Option<usize>, g: Option<f64>) -> ProbeSpec {
    ProbeSpec { length, fracture_energy: g, ..ProbeSpec::named("regularisation") }
}

#[test]
fn regularisation_passes_the_ply_and_fails_the_length_dropping_ply() {
    // Transverse strain to 0.045, past ε_f = 2 G_mt/(Yt L) = 2·0.25/(27·0.5) = 0.0370 (derived).
    let p = path("transverse tension to full failure", 1.0, &[([0.0, 7.5e-4, 0.0, 0.0, 0.0, 0.0], 60)]);
    let props = ply_uncoupled();
    let mut good = ModelRoutine(Ply::new(PointKind::PlaneStress).unwrap());
    let r = probe(&mut good, regularisation(Some(24), Some(0.25)), &props, &p);
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:?}", r.summary, r.details);
    let mut bad = ModelRoutine(Ply::with_flaw(PointKind::PlaneStress, PlyFlaw::LengthDropped).unwrap());
    let r = probe(&mut bad, regularisation(Some(24), None), &props, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{} {:?}", r.summary, r.details);
    assert!(r.summary.contains("changes with L"), "{}", r.summary);
    // A path that stops before failure is not judged.
    let short = path("transverse tension, not to failure", 1.0, &[([0.0, 7.5e-4, 0.0, 0.0, 0.0, 0.0], 10)]);
    let r = probe(&mut good, regularisation(Some(24), Some(0.25)), &props, &short);
    assert_eq!(r.status, ProbeStatus::Skipped, "{}", r.summary);
}

/// The cohesive law with every traction and tangent entry scaled by 1.2: its area is 1.2 G.
#[derive(Clone, Debug)]
struct StrongCohesive(Cohesive);

impl Model for StrongCohesive {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        self.0.evaluate(input, output)?;
        output.stress.iter_mut().chain(output.tangent.iter_mut()).for_each(|x| *x *= S::cst(1.2));
        Ok(())
    }
}

#[test]
fn regularisation_passes_the_cohesive_law_and_fails_a_law_of_another_area() {
    // Mode I opening to 0.0125 mm, past δ_f = 2 G_Ic/N = 0.01 mm (derived from G_c = ½ t₀ δ_f).
    let p = path("mode I opening to full failure", 1.0, &[([2.5e-4, 0.0, 0.0, 0.0, 0.0, 0.0], 50)]);
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, regularisation(None, Some(COHESIVE[3])), &COHESIVE, &p);
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:?}", r.summary, r.details);
    let mut bad = ModelRoutine(StrongCohesive(Cohesive::new(PointKind::Cohesive3d).unwrap()));
    let r = probe(&mut bad, regularisation(None, Some(COHESIVE[3])), &COHESIVE, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{} {:?}", r.summary, r.details);
    assert!(r.summary.contains("declared fracture energy"), "{}", r.summary);
}

/// A cohesive law's dissipated energy is per unit area: the probe says so and multiplies no
/// length ("× L" and "L = 1 per unit volume" were printed for it).
#[test]
fn regularisation_of_a_cohesive_law_speaks_of_energy_per_unit_area() {
    let p = path("mode I opening to full failure", 1.0, &[([2.5e-4, 0.0, 0.0, 0.0, 0.0, 0.0], 50)]);
    let mut good = ModelRoutine(Cohesive::new(PointKind::Cohesive3d).unwrap());
    let r = probe(&mut good, regularisation(None, Some(COHESIVE[3])), &COHESIVE, &p);
    assert!(r.summary.contains("per unit area") && !r.summary.contains("× L"), "{}", r.summary);
    assert!(r.details.iter().all(|d| !d.contains("L =")), "{:?}", r.details);
}

/// A bar with scalar damage and linear softening (invented numbers): κ the largest strain so
/// far (at least κ₀), σ = (1 − d) E ε with (1 − d) κ = κ₀ (κ_f − κ)/(κ_f − κ₀), so that along
/// loading σ = E κ₀ (κ_f − ε)/(κ_f − κ₀) (slope −E κ₀/(κ_f − κ₀)). Loading is ε ≥ κ (the
/// loading side's tangent where ε equals κ exactly: the onset, a reload to the largest strain);
/// unloading is secant, (1 − d) E. Properties [E, κ₀, κ_f]; state [κ, d]. With `always_soft`
/// (a flaw) the loading tangent is returned on unloading too, once damaged.
#[derive(Clone, Debug)]
struct SofteningBar {
    info: RoutineInfo,
    always_soft: bool,
}

impl Model for SofteningBar {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, k0, kf) = (input.props[0], input.props[1], input.props[2]);
        let eps = input.strain[0] + input.dstrain[0];
        let kappa = input.state0[0].max(k0);
        let loading = eps.re() >= kappa.re() && eps.re() >= k0.re();
        let k = if loading { eps } else { kappa };
        let intact = k0 * (kf - k) / ((kf - k0) * k);
        out.stress[0] = intact * e * eps;
        let soft = -(e * k0) / (kf - k0);
        out.tangent[0] =
            if loading || self.always_soft && input.state0[1].re() > 0.0 { soft } else { intact * e };
        out.state[0] = k;
        out.state[1] = S::one() - intact;
        out.dstress_dtemp[0] = S::zero();
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        out.outcome.branch = i32::from(loading);
        Ok(())
    }
}

// An increment that ends exactly where damage starts to grow (the onset, then a reload exactly
// to the largest strain so far) returns the loading side's tangent, which softens though no
// damage grows in it: the check accepts either side's tangent at such a kink, and the probe,
// which looks a step further along the increment and sees the damage grow, says so without
// failing (a correct damage law failed here; a user-style sweep). A law that returns the
// softening tangent while it unloads still fails, at its first unloading increment.
#[test]
fn softening_at_the_onset_of_damage_growth_is_not_held_against_the_routine() {
    let info = RoutineInfo {
        name: "softening-bar".into(),
        convention: tancheck::core::Convention::new(
            PointKind::Uniaxial,
            tancheck::core::ShearMeasure::Engineering,
        ),
        nstate: 2,
        nprop: 3,
    };
    // Dyadic numbers, so that the sums land exactly on κ₀ = 2⁻¹³ and on the largest strain.
    let (k0, h) = (2f64.powi(-13), 2f64.powi(-14));
    let props = [1000.0, k0, 8.0 * k0];
    let bar = |always_soft| ModelRoutine(SofteningBar { info: info.clone(), always_soft });
    let p = path(
        "to the onset, into growth, back, reload to the largest strain, beyond",
        1.0,
        &[
            ([h, 0.0, 0.0, 0.0, 0.0, 0.0], 4),
            ([-h, 0.0, 0.0, 0.0, 0.0, 0.0], 2),
            ([h, 0.0, 0.0, 0.0, 0.0, 0.0], 3),
        ],
    );
    let spec = || ProbeSpec { damage: Some(vec![1]), ..ProbeSpec::named("softening") };
    let r = probe(&mut bar(false), spec(), &props, &p);
    assert_eq!(r.status, ProbeStatus::Pass, "{} {:#?}", r.summary, r.details);
    // Increment 2 ends at κ₀, increment 8 at the largest strain (of increment 4).
    assert!(
        r.summary.contains(
            "softening at 2 increment(s) that end exactly where damage starts to grow, from increment 2"
        ),
        "{}",
        r.summary
    );
    for k in [2, 8] {
        let line = format!("increment {k} (branch 1, ends where damage starts to grow)");
        assert!(r.details.iter().any(|d| d.starts_with(&line)), "{line}: {:#?}", r.details);
    }
    let r = probe(&mut bar(true), spec(), &props, &p);
    assert_eq!(r.status, ProbeStatus::Fail, "{}", r.summary);
    assert_eq!(r.increment, Some(5), "{}", r.summary);
}
