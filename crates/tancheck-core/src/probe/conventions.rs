//! The conventions probe: does the routine behave in the component order and shear measure
//! the manifest declares?
//!
//! A wrong declaration does not show in the tangent check: the returned tangent is still the
//! derivative of the stress update, whatever the slots mean. It shows in the physics of the
//! elastic response. The probe takes the numerical elastic tangent at the start (complex step
//! when there is a twin, else central differences, around a zero increment) and reads it under
//! every hypothesis: every order of the kind's components, with either shear measure. Under the
//! right one,
//!
//! - an isotropic law has the isotropic form in Mandel notation: the normal block has equal
//!   diagonal entries `a` and equal off-diagonal entries `b`, the normal/shear blocks vanish,
//!   and the shear block is diagonal with `a − b` = 2μ (Voigt with engineering shear:
//!   C44 = (C11 − C12)/2; Nye 1957, Physical Properties of Crystals, ch. VIII; from memory);
//! - an anisotropic law with a stored energy has a symmetric Mandel tangent (major symmetry);
//!   a wrong shear measure multiplies its normal/shear coupling by 2 on one side and ½ on the
//!   other. With engineering shear every choice of shear slots keeps a symmetric tangent
//!   symmetric, so symmetry tells the shear measure, never the order.
//!
//! What the evidence cannot tell, the probe says instead of guessing:
//!
//! - any order of the normal components among themselves, and of the shear components among
//!   themselves, gives the same isotropic response (the isotropic form is invariant under
//!   them): those orders make no difference to an isotropic law and are not named;
//! - an anisotropic response tells the shear measure (and which slots are shear) only through
//!   its normal/shear coupling: with material axes along the global ones there is none, and
//!   the result is "inconclusive";
//! - cohesive and uniaxial points have no elastic relation between their components: not
//!   applicable.
//!
//! [`analyse`] is the pure part (a tangent in, a finding out); `check` uses it on the first
//! elastic increment's numerical tangent, at no extra cost, and warns only when the evidence
//! is conclusive and differs from the declaration.

use super::Needs;
use super::{Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::driver::{Direction, Driver};
use crate::error::CoreError;
use crate::routine::Caller;
use crate::schemes::Scheme;

pub struct Conventions;

use crate::convention_fit::{analyse, Finding, DEFAULT_TOL};

/// The numerical elastic tangent at the start: around a zero increment, by the complex step
/// when the routine has a twin, else by central differences.
pub fn elastic_tangent(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
) -> Result<(Vec<f64>, Scheme), crate::routine::Fault> {
    let info = caller.info().clone();
    let n = info.convention.ncomp();
    let mut d = Driver::new(&info, env.props, env.start.clone())
        .map_err(|e| crate::routine::Fault::Unsupported(e.to_string()))?;
    d.set_increment(&vec![0.0; n], 0.0, 1.0);
    d.base_call(caller)?;
    let scheme = if caller.has_complex() { Scheme::ComplexStep } else { Scheme::Central };
    let h = env.settings.scheme(scheme).rel_step * d.strain_scale(env.settings.step_floor);
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        scheme.column(&mut d, caller, Direction::Strain(j), h, &mut t[j * n..(j + 1) * n])?;
    }
    Ok((t, scheme))
}

impl Probe for Conventions {
    fn name(&self) -> &'static str {
        "conventions"
    }
    fn needs(&self) -> Needs {
        // The twin is used when there is one, not required.
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let conv = caller.info().convention.clone();
        let (t, scheme) = match elastic_tangent(caller, env) {
            Ok(x) => x,
            Err(f) => return Ok(super::faulted("conventions", 1, &f)),
        };
        let finding = analyse(&conv, &t, tol);
        let status = match finding {
            Finding::Other { .. } => ProbeStatus::Fail,
            Finding::AsDeclared { .. } => ProbeStatus::Pass,
            Finding::Inconclusive { .. } | Finding::NotApplicable { .. } => ProbeStatus::Skipped,
        };
        let mut r = ProbeResult::new("conventions", status, finding.sentence());
        r.tol = Some(tol);
        r.details.push(format!(
            "the elastic tangent at the start ({}, around a zero increment) read under every order of the \
             components with either shear measure",
            scheme.name()
        ));
        Ok(r)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::convention::{Component, Convention, PointKind, ShearMeasure};
    use crate::convention_fit::readings;
    use crate::worked::isotropic;

    fn conv(labels: &[&str], shear: ShearMeasure) -> Convention {
        let kind = if labels.len() == 6 { PointKind::Solid3d } else { PointKind::PlaneStrain };
        Convention::from_labels(kind, labels, shear).unwrap()
    }

    const DEFAULT: [&str; 6] = ["11", "22", "33", "23", "13", "12"];

    // λ, μ of steel, E = 200 GPa, ν = 0.3: λ = Eν/((1+ν)(1−2ν)), μ = E/(2(1+ν)).
    const LAMBDA: f64 = 115384.61538461539;
    const MU: f64 = 76923.07692307692;

    #[test]
    fn an_isotropic_response_behaves_as_declared() {
        for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
            let c = conv(&DEFAULT, shear);
            let f = analyse(&c, &isotropic(&c, LAMBDA, MU), DEFAULT_TOL);
            assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        }
    }

    #[test]
    fn a_wrong_shear_measure_is_named() {
        // The routine uses tensor shear; the manifest declares engineering.
        let actual = conv(&DEFAULT, ShearMeasure::Tensor);
        let declared = conv(&DEFAULT, ShearMeasure::Engineering);
        let f = analyse(&declared, &isotropic(&actual, LAMBDA, MU), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.shear, ShearMeasure::Tensor);
        assert_eq!(behaves.order, declared.order(), "the closest order: the declared one");
        assert!(f.sentence().contains("with tensor shear; it is declared as"), "{}", f.sentence());
    }

    #[test]
    fn a_normal_and_shear_slot_swapped_is_named() {
        // Plane strain in 11 22 12 33 declared as the default 11 22 33 12.
        let actual = conv(&["11", "22", "12", "33"], ShearMeasure::Engineering);
        let declared = conv(&["11", "22", "33", "12"], ShearMeasure::Engineering);
        let f = analyse(&declared, &isotropic(&actual, LAMBDA, MU), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.order, actual.order());
        assert_eq!(behaves.shear, ShearMeasure::Engineering);
        assert!(
            f.sentence().starts_with("behaves as order 11 22 12 33 with engineering shear"),
            "{}",
            f.sentence()
        );
    }

    #[test]
    fn shear_orders_among_themselves_make_no_difference_to_an_isotropic_response() {
        let actual = conv(&["11", "22", "33", "12", "13", "23"], ShearMeasure::Engineering);
        let declared = conv(&DEFAULT, ShearMeasure::Engineering);
        let f = analyse(&declared, &isotropic(&actual, LAMBDA, MU), DEFAULT_TOL);
        assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        assert!(f.sentence().contains("makes no difference"), "{}", f.sentence());
    }

    /// An orthotropic-like stiffness with normal/shear coupling: an isotropic one plus a
    /// symmetric positive coupling between 11 and 12 (Mandel), as a rotated orthotropic
    /// material has.
    fn coupled(conv: &Convention) -> Vec<f64> {
        let n = conv.ncomp();
        let mut t = isotropic(conv, LAMBDA, MU);
        conv.tangent_to_mandel(&mut t);
        let (p, q) = (conv.position(Component::C11).unwrap(), conv.position(Component::C12).unwrap());
        t[p + q * n] += 0.2 * MU;
        t[q + p * n] += 0.2 * MU;
        t[p + p * n] += 0.5 * MU;
        conv.tangent_from_mandel(&mut t);
        t
    }

    #[test]
    fn an_anisotropic_response_tells_the_shear_measure_only_through_its_coupling() {
        let actual = conv(&DEFAULT, ShearMeasure::Tensor);
        let declared = conv(&DEFAULT, ShearMeasure::Engineering);
        let f = analyse(&declared, &coupled(&actual), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.shear, ShearMeasure::Tensor);
        let f = analyse(&actual, &coupled(&actual), DEFAULT_TOL);
        assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        // Engineering shear, declared so: symmetric in every choice of shear slots, so the
        // measure is confirmed and the order is said to be unknown.
        let f = analyse(&declared, &coupled(&declared), DEFAULT_TOL);
        assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        assert!(f.sentence().contains("cannot be told"), "{}", f.sentence());
        // Engineering shear declared as tensor: named.
        let f = analyse(&actual, &coupled(&declared), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.shear, ShearMeasure::Engineering);

        // Without coupling (axes along the global ones) it cannot tell.
        let mut t = isotropic(&actual, LAMBDA, MU);
        t[0] *= 1.5;
        let f = analyse(&declared, &t, DEFAULT_TOL);
        assert!(matches!(f, Finding::Inconclusive { .. }), "{f:?}");
    }

    #[test]
    fn cohesive_and_uniaxial_points_are_not_applicable() {
        let c = Convention::new(PointKind::Cohesive3d, ShearMeasure::Engineering);
        assert!(matches!(
            analyse(&c, &[1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0], 1e-6),
            Finding::NotApplicable { .. }
        ));
        let c = Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering);
        assert!(matches!(analyse(&c, &[1.0], 1e-6), Finding::NotApplicable { .. }));
    }

    #[test]
    fn one_reading_per_choice_of_shear_slots() {
        let r = readings(PointKind::Solid3d.default_components());
        assert_eq!(r.len(), 20, "6 choose 3");
        assert_eq!(r.iter().filter(|o| o.as_slice() == PointKind::Solid3d.default_components()).count(), 1);
        assert_eq!(readings(PointKind::PlaneStrain.default_components()).len(), 4);
        let swapped = readings(&[Component::C11, Component::C22, Component::C33, Component::C12]);
        assert!(swapped.contains(&vec![Component::C11, Component::C22, Component::C12, Component::C33]));
    }
}
