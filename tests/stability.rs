//! The stability probe against published localization results for associated J2 plasticity
//! with the continuum elastoplastic tangent (REFERENCES.md, "Localization"; Rudnicki & Rice
//! 1975, JMPS 23:371–394; Rice 1976, 14th IUTAM Congress; values derived from the criterion):
//!
//! - uniaxial tension: ellipticity is lost at the plastic modulus h_cr = −E/4 for any ν, with
//!   the band normal at cos²θ = (2 − ν)/3 from the tension axis (41.2° at ν = 0.3);
//! - plane strain, pure shear: h_cr = 0.
//!
//! h_cr is found by bisection on the hardening modulus H_iso of `j2-continuum` (whose uniaxial
//! plastic modulus is H_iso: E_t = E h/(E + h), REFERENCES.md "J2 plasticity"), with the sign
//! of min det Q(n) from `min_det_acoustic` on the tangent of one increment just past yield.

use tancheck::core::mixed::{self, MixedSettings};
use tancheck::core::path::{Path, PathIncrement};
use tancheck::core::probe::stability::{self, min_det_acoustic, Acoustic, Stability};
use tancheck::core::probe::{self, Probe, ProbeEnv, ProbeSpec, ProbeStatus};
use tancheck::core::{Caller, Convention, Driver, PointKind, PointState, Routine, Settings};
use tancheck::models::reference;

const E: f64 = 200_000.0;
const SY: f64 = 250.0;

fn props(nu: f64, h: f64) -> [f64; 7] {
    [E, nu, SY, h, 0.0, 0.0, 0.0]
}

/// The continuum tangent after one uniaxial-stress increment to 1.02 times the yield strain
/// (σ22 = σ33 = shears = 0 solved by Newton), and the routine's convention.
fn uniaxial_tension_tangent(nu: f64, h: f64) -> (Convention, Vec<f64>) {
    let mut r = reference("j2-continuum", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let mut d = Driver::new(&info, &props(nu, h), PointState::zero(&info, 20.0)).unwrap();
    d.set_increment(&[1.02 * SY / E, 0.0, 0.0, 0.0, 0.0, 0.0], 0.0, 1.0);
    let log = mixed::solve(&mut d, &mut caller, &[1, 2, 3, 4, 5], &[0.0; 5], &MixedSettings::default(), true)
        .unwrap();
    assert!(log.converged, "{log:?}");
    assert_eq!(d.base.outcome.branch, 1, "past yield");
    for s in &d.base.stress[1..] {
        assert!(s.abs() < 1e-8 * SY, "uniaxial stress {:?}", d.base.stress);
    }
    (info.convention, d.base.tangent.clone())
}

/// The continuum tangent after one plane-strain increment ε11 = −ε22 = a past yield, and the
/// convention; asserts that the stress is pure shear (σ22 = −σ11, σ33 = σ12 = 0).
fn plane_strain_shear_tangent(h: f64) -> (Convention, Vec<f64>) {
    let nu = 0.3;
    let mu = E / (2.0 * (1.0 + nu));
    // Yield in pure shear: 2μ a √2 = √(2/3) σy.
    let a = 1.05 * SY / (2.0 * mu * 3f64.sqrt());
    let mut r = reference("j2-continuum", PointKind::PlaneStrain).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let mut d = Driver::new(&info, &props(nu, h), PointState::zero(&info, 20.0)).unwrap();
    d.set_increment(&[a, -a, 0.0, 0.0], 0.0, 1.0);
    d.base_call(&mut caller).unwrap();
    assert_eq!(d.base.outcome.branch, 1, "past yield");
    let s = &d.base.stress;
    assert!(
        (s[0] + s[1]).abs() < 1e-12 * s[0].abs() && s[2].abs() < 1e-12 * s[0].abs() && s[3] == 0.0,
        "{s:?}"
    );
    (info.convention, d.base.tangent.clone())
}

/// Bisection for the sign change of min det Q in h on [lo, hi] (lost at lo, elliptic at hi),
/// to 1e-5 of |h| (1e-8 E near zero). Returns h_cr and the acoustic minimum just on the lost
/// side.
fn critical_modulus(
    mut lo: f64,
    mut hi: f64,
    tangent: impl Fn(f64) -> (Convention, Vec<f64>),
) -> (f64, Acoustic) {
    let lost = |h: f64| {
        let (conv, t) = tangent(h);
        let (d, n) = min_det_acoustic(&conv, &t);
        let dim = if conv.kind() == PointKind::Solid3d { 3 } else { 2 };
        (d <= 0.0, Acoustic { min_det: d, normal: n, dim, max_abs_det: f64::NAN })
    };
    assert!(lost(lo).0, "ellipticity must be lost at h = {lo}");
    assert!(!lost(hi).0, "ellipticity must hold at h = {hi}");
    while hi - lo > 1e-5 * lo.abs().max(hi.abs()).max(1e-3 * E) {
        let mid = 0.5 * (lo + hi);
        if lost(mid).0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    (0.5 * (lo + hi), lost(lo).1)
}

// Rudnicki & Rice (1975); Rice (1976) — REFERENCES.md "Localization", derived: uniaxial
// tension, h_cr = −E/4 for any ν, cos²θ = (2 − ν)/3: 41.2° at ν = 0.3 and 39.2° (cos²θ = 0.6)
// at ν = 0.2.
#[test]
fn uniaxial_tension_localizes_at_minus_a_quarter_of_e() {
    for (nu, published_deg) in [(0.3, 41.2), (0.2, 0.6f64.sqrt().acos().to_degrees())] {
        let (h_cr, at) = critical_modulus(-0.5 * E, 0.0, |h| uniaxial_tension_tangent(nu, h));
        let ratio = h_cr / E;
        let angle = at.angle_from_axis1();
        let formula = ((2.0 - nu) / 3.0f64).sqrt().acos().to_degrees();
        eprintln!(
            "ν = {nu}: h_cr/E = {ratio:.5}, band normal {:?} at {angle:.3}° (formula {formula:.3}°)",
            at.normal
        );
        assert!((ratio / -0.25 - 1.0).abs() < 0.01, "ν = {nu}: h_cr/E = {ratio}");
        assert!(
            (angle / published_deg - 1.0).abs() < 0.01,
            "ν = {nu}: band at {angle}°, published {published_deg}°"
        );
        assert!((angle / formula - 1.0).abs() < 0.01);
        // The band normal lies on the cone about the tension axis: any azimuth, unit length.
        let n = at.normal;
        assert!((n[0] * n[0] + n[1] * n[1] + n[2] * n[2] - 1.0).abs() < 1e-12);
    }
}

// REFERENCES.md "Localization" (derived from the Rudnicki–Rice criterion): plane strain pure
// shear, h_cr = 0. The band normal then lies at 45° from axis 1, derived here: with the flow
// direction N = (e₁e₁ − e₂e₂)/√2 and θ̄ = 1/(1 + h/3μ), the in-plane
// det Q(n) = μ(λ + 2μ)[1 − θ̄ (1 − (λ + μ)/(λ + 2μ) cos² 2t)] for n = (cos t, sin t), whose
// minimum over t sits at t = 45° and is zero exactly when h = 0.
#[test]
fn plane_strain_pure_shear_localizes_at_zero_hardening() {
    let (h_cr, at) = critical_modulus(-0.05 * E, 0.05 * E, plane_strain_shear_tangent);
    let angle = at.angle_from_axis1();
    eprintln!(
        "plane strain pure shear: h_cr/E = {:.2e}, band normal {:?} at {angle:.3}°",
        h_cr / E,
        at.normal
    );
    assert!(h_cr.abs() <= 0.01 * E, "h_cr = {h_cr}");
    assert!((angle - 45.0).abs() < 0.45, "{angle}");
    assert_eq!(at.normal[2], 0.0, "an in-plane normal");
}

fn walk_probe(h: f64) -> (stability::Survey, probe::ProbeResult, Option<usize>) {
    let mut r = reference("j2-continuum", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    // Increments of 5e-4 in ε11: yield strain σy/E = 1.25e-3 is crossed in increment 3.
    let path = Path::uniaxial_stress(3e-3, 6, 0);
    let settings = Settings::default();
    let spec = ProbeSpec::named("stability");
    let p = props(0.3, h);
    let env = ProbeEnv { props: &p, start: &start, path: &path, settings: &settings, spec: &spec };
    // The first inelastic increment, and the lateral stresses really held at zero.
    let mut first_plastic = None;
    probe::walk(&mut caller, &env, |k, d, _| {
        if first_plastic.is_none() && d.base.outcome.branch == 1 {
            first_plastic = Some(k);
        }
        for s in &d.base.stress[1..] {
            assert!(s.abs() < 1e-7 * SY, "increment {k}: {:?}", d.base.stress);
        }
        Ok(())
    })
    .unwrap();
    let survey = stability::survey(&mut caller, &env).unwrap();
    let result = Stability.run(&mut caller, &env).unwrap();
    (survey, result, first_plastic)
}

// Softer than h_cr = −E/4 (REFERENCES.md "Localization"): ellipticity is lost as soon as the
// point yields, at increment 3; the symmetric part is not positive definite there either
// (N:C:N = 2μ(1 − θ̄) < 0 for h < 0). Hardening keeps both along the whole path.
#[test]
fn the_probe_reports_ellipticity_loss_at_the_first_yielding_increment() {
    let (survey, result, first_plastic) = walk_probe(-0.3 * E);
    assert_eq!(first_plastic, Some(3));
    let (k, a) = survey.first_loss.expect("ellipticity lost");
    assert_eq!(k, 3);
    assert!(a.det_ratio().unwrap() < 0.0);
    assert_eq!(survey.first_softening, Some(3));
    // Elastic increments before it are elliptic.
    for (k, a) in &survey.increments[..2] {
        assert!(a.det_ratio().unwrap() > 0.0 && a.eigen_ratio() > 0.0, "increment {k}");
    }
    assert_eq!(result.status, ProbeStatus::Pass, "informative: {result:?}");
    assert!(result.summary.contains("ellipticity lost at increment 3"), "{}", result.summary);
    assert!(result.value.unwrap() < 0.0);
    eprintln!("h = -0.3 E: {}", result.summary);

    let (survey, result, first_plastic) = walk_probe(0.005 * E);
    assert_eq!(first_plastic, Some(3));
    assert_eq!(survey.first_loss, None);
    assert_eq!(survey.first_softening, None);
    assert_eq!(survey.increments.len(), 6);
    assert!(result.summary.contains("elliptic along the path"), "{}", result.summary);
    assert!(result.value.unwrap() > 0.0);
    eprintln!("h = +0.005 E: {}", result.summary);
}

// Between h_cr = −E/4 and 0 a uniaxial-tension point softens (the symmetric part of the
// tangent is indefinite) yet stays elliptic (REFERENCES.md "Localization": h_cr = −E/4).
#[test]
fn softening_above_the_critical_modulus_keeps_ellipticity() {
    let (survey, result, _) = walk_probe(-0.2 * E);
    assert_eq!(survey.first_softening, Some(3));
    assert_eq!(survey.first_loss, None, "{}", result.summary);
    assert!(result.summary.contains("not positive definite from increment 3"), "{}", result.summary);
}

// A strain-controlled path with `at` probes only the named increments; cohesive points get
// the eigenvalue measure alone.
#[test]
fn at_and_cohesive_points() {
    let mut r = reference("j2", PointKind::Solid3d).unwrap();
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let path = Path {
        name: "two increments".into(),
        increments: vec![PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]); 2],
    };
    let settings = Settings::default();
    let spec = ProbeSpec { at: Some(vec![2]), ..ProbeSpec::named("stability") };
    let p = [E, 0.3, SY, 1000.0, 0.0, 0.0, 0.0];
    let env = ProbeEnv { props: &p, start: &start, path: &path, settings: &settings, spec: &spec };
    let s = stability::survey(&mut caller, &env).unwrap();
    assert_eq!(s.increments.iter().map(|x| x.0).collect::<Vec<_>>(), vec![2]);
    // Isotropic elasticity (increment 2 is still elastic): Q(n) = μ1 + (λ + μ)n⊗n for every n,
    // the classical acoustic tensor (derived from C = λ1⊗1 + 2μI), so min det Q = μ²(λ + 2μ);
    // s = 3λ + 2μ, the bulk eigenvalue of the Mandel tangent.
    let (lambda, mu) = (E * 0.3 / (1.3 * 0.4), E / 2.6);
    let want = mu * mu * (lambda + 2.0 * mu) / (3.0 * lambda + 2.0 * mu).powi(3);
    // The symmetric part is positive definite there (its smallest eigenvalue is 2μ), so the
    // walk does not search the normals: it gives the lower bound (λmin/2)³ = μ³, below the
    // exact value; `assess` of the same tangent searches and finds μ²(λ + 2μ).
    let a = s.increments[0].1;
    assert!(a.bound_only);
    let bound = mu.powi(3) / (3.0 * lambda + 2.0 * mu).powi(3);
    assert!((a.det_ratio().unwrap() / bound - 1.0).abs() < 1e-10);
    assert!(bound < want);
    let mut d = tancheck::core::Driver::new(&info, &p, start.clone()).unwrap();
    d.set_increment(&[2e-4, 0.0, 0.0, 0.0, 0.0, 0.0], 0.0, 1.0);
    d.base_call(&mut caller).unwrap();
    let exact = stability::assess(&info.convention, &d.base.tangent);
    assert!(!exact.bound_only);
    assert!((exact.det_ratio().unwrap() / want - 1.0).abs() < 1e-10);

    let mut c = reference("cohesive", PointKind::Cohesive3d).unwrap();
    let cinfo = c.info().clone();
    let mut caller = Caller::new(&mut c);
    let start = PointState::zero(&cinfo, 20.0);
    let cprops = cohesive_props(cinfo.nprop);
    let spec = ProbeSpec::named("stability");
    let env = ProbeEnv { props: &cprops, start: &start, path: &path, settings: &settings, spec: &spec };
    let res = Stability.run(&mut caller, &env).unwrap();
    assert_eq!(res.status, ProbeStatus::Pass, "{res:?}");
    assert!(res.summary.contains("no acoustic tensor"), "{}", res.summary);
}

/// AS4/PEEK interface data of REFERENCES.md "Cohesive zone" (memory): penalty K 1e6 N/mm³,
/// N 80, S 100 MPa, G_Ic 0.969, G_IIc 1.719 N/mm, η 2.284, in the model's property order.
fn cohesive_props(nprop: usize) -> Vec<f64> {
    let names = tancheck::models::AnyModel::new("cohesive", PointKind::Cohesive3d).unwrap().prop_names();
    assert_eq!(names.len(), nprop);
    names
        .iter()
        .map(|n| match *n {
            "K" => 1e6,
            "N" => 80.0,
            "S" => 100.0,
            "G_Ic" => 0.969,
            "G_IIc" => 1.719,
            "eta" => 2.284,
            other => panic!("unexpected cohesive property {other}"),
        })
        .collect()
}

/// σ = K tr(ε) 1: a tangent K 1⊗1 of rank one (what a return that holds the deviatoric stress
/// leaves, as at the apex of a pressure-dependent surface without hardening). Its acoustic
/// tensor Q(n) = K n⊗n is singular for every normal, so the loss of ellipticity names no band
/// normal (a user-style sweep's apex read as a band at a normal picked by rounding).
#[derive(Clone, Debug)]
struct BulkOnly(tancheck::core::RoutineInfo);

impl tancheck::core::Model for BulkOnly {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        &self.0
    }

    fn evaluate<S: tancheck::core::Scalar>(
        &self,
        input: &tancheck::core::CallInput<'_, S>,
        out: &mut tancheck::core::CallOutput<'_, S>,
    ) -> Result<(), tancheck::core::Fault> {
        let k = input.props[0];
        let tr = (0..3).fold(S::zero(), |a, i| a + input.strain[i] + input.dstrain[i]);
        for i in 0..6 {
            out.stress[i] = if i < 3 { k * tr } else { S::zero() };
            out.dstress_dtemp[i] = S::zero();
            for j in 0..6 {
                out.tangent[j * 6 + i] = if i < 3 && j < 3 { k } else { S::zero() };
            }
        }
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
        Ok(())
    }
}

#[test]
fn a_tangent_singular_for_every_normal_names_no_band() {
    let info = tancheck::core::RoutineInfo {
        name: "bulk-only".into(),
        convention: Convention::new(PointKind::Solid3d, tancheck::core::ShearMeasure::Engineering),
        nstate: 0,
        nprop: 1,
    };
    let mut m = tancheck::core::ModelRoutine(BulkOnly(info.clone()));
    let mut caller = Caller::new(&mut m);
    let start = PointState::zero(&info, 20.0);
    let path = Path {
        name: "stretch".into(),
        increments: vec![PathIncrement::strain([1e-3, 0.0, 0.0, 0.0, 0.0, 0.0])],
    };
    let settings = Settings::default();
    let spec = ProbeSpec::named("stability");
    let env = ProbeEnv { props: &[1e5], start: &start, path: &path, settings: &settings, spec: &spec };
    let res = Stability.run(&mut caller, &env).unwrap();
    assert!(
        res.summary.contains("for every normal") && res.summary.contains("no band normal"),
        "{}",
        res.summary
    );
    // Isotropic elasticity keeps its positive determinant everywhere: nothing of the kind.
    let mut r = reference("elastic", PointKind::Solid3d).unwrap();
    let einfo = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&einfo, 20.0);
    let env = ProbeEnv { props: &[E, 0.3], start: &start, path: &path, settings: &settings, spec: &spec };
    let res = Stability.run(&mut caller, &env).unwrap();
    assert!(res.summary.starts_with("elliptic along the path"), "{}", res.summary);
}

/// Elasticity whose tangent is infinite from increment 2 on (its stress stays finite).
struct InfiniteTangent(tancheck::core::ModelRoutine<tancheck::models::AnyModel>);

impl tancheck::core::Routine for InfiniteTangent {
    fn info(&self) -> &tancheck::core::RoutineInfo {
        self.0.info()
    }
    fn call(
        &mut self,
        input: &tancheck::core::CallInput<'_, f64>,
        output: &mut tancheck::core::CallOutput<'_, f64>,
    ) -> Result<(), tancheck::core::Fault> {
        self.0.call(input, output)?;
        if input.increment >= 2 {
            output.tangent[0] = f64::INFINITY;
        }
        Ok(())
    }
}

/// A tangent entry that is not a finite number fails the probe, as it fails the tangent check
/// (exit 1, finding `non-finite-output`): it is no fault of the routine (a crash, a failure
/// status), which would make the suite's verdict FAULT, exit 3 (it did; a user-style sweep).
#[test]
fn a_non_finite_tangent_fails_the_probe_and_is_no_fault() {
    let mut r = InfiniteTangent(reference("elastic", PointKind::Solid3d).unwrap());
    let info = r.info().clone();
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    let path = Path::ramp(tancheck::core::Shape::UniaxialStrain, 1e-3, 3, 0);
    let settings = Settings::default();
    let spec = ProbeSpec::named("stability");
    let env = ProbeEnv { props: &[E, 0.3], start: &start, path: &path, settings: &settings, spec: &spec };
    let res = Stability.run(&mut caller, &env).unwrap();
    assert_eq!(res.status, ProbeStatus::Fail, "{}", res.summary);
    assert!(!res.fault, "{}", res.summary);
    assert_eq!(res.increment, Some(2), "{}", res.summary);
    assert!(res.summary.contains("non-finite entry (inf at position 0) at increment 2"), "{}", res.summary);
}
