//! Reference material models of tancheck, written once over [`Scalar`] so that the same
//! code gives the ordinary stress update (`f64`), complex-step derivatives (`Complex64`) and
//! exact forward-mode derivatives (num-dual's `Dual64`).
//!
//! - [`Elastic`]: linear isotropic elasticity, any solid kind of point.
//! - [`J2`]: small-strain J2 plasticity by radial return with isotropic (linear + Voce) and
//!   linear kinematic hardening; with [`J2Tangent::Continuum`] it is the flawed
//!   `j2-continuum` routine.
//! - [`Orthotropic`]: linear orthotropic elasticity with material axes among the properties.
//! - [`JohnsonCook`]: J2 radial return with the Johnson–Cook flow stress (rate, thermal
//!   softening, adiabatic heating) and damage-initiation indicator.
//! - [`Ply`]: composite ply damage (Hashin initiation, crack-band linear softening per mode,
//!   optional viscous regularisation) with its flawed variants [`PlyFlaw`].
//!
//! All models use the default component order of their kind and engineering shear strain;
//! the property and state layouts are those of DEVELOPERS.md ("Reference models"). Pick one
//! by name with [`reference`] or [`AnyModel::new`].

pub mod bimodulus;
pub mod block;
pub mod branches;
mod call;
pub mod cohesive;
pub mod elastic;
pub mod finite;
pub mod j2;
pub mod johnson_cook;
pub mod orthotropic;
pub mod ply;
mod tensor;
pub mod thermo;
pub mod zoo;

#[cfg(test)]
mod alloc_check;
#[cfg(test)]
mod checks;
#[cfg(test)]
mod testing;

pub use bimodulus::Bimodulus;
pub use cohesive::{Cohesive, CohesiveFlaw};
pub use elastic::Elastic;
pub use j2::{J2Tangent, J2};
pub use johnson_cook::{JcTangent, JohnsonCook};
pub use orthotropic::Orthotropic;
pub use ply::{Ply, PlyFlaw};
pub use thermo::{Thermo, ThermoFlaw};
pub use zoo::{zoo, zoo_model, FlawedJ2, J2Flaw, ZooEntry, ZooModel};

use tancheck_core::{ModelRoutine, PointKind};

/// Names of the reference models, as [`reference`] accepts them.
pub const NAMES: [&str; 3] = [Elastic::NAME, J2::NAME, J2::CONTINUUM_NAME];

/// A model that cannot be built.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ModelError {
    #[error("model `{model}` has no {kind} form; it supports {supported}")]
    UnsupportedKind { model: &'static str, kind: PointKind, supported: &'static str },
    #[error("no reference model is called `{name}`; the reference models are elastic, j2, j2-continuum")]
    UnknownName { name: String },
}

/// One of the reference models, chosen at run time.
#[derive(Clone, Debug)]
pub enum AnyModel {
    Elastic(Elastic),
    J2(J2),
    Thermo(Thermo),
    Cohesive(Cohesive),
    Orthotropic(Orthotropic),
    JohnsonCook(JohnsonCook),
    Ply(Ply),
}

impl AnyModel {
    /// The model called `name` (one of [`NAMES`]) for a kind of point.
    pub fn new(name: &str, kind: PointKind) -> Result<AnyModel, ModelError> {
        match name {
            Elastic::NAME => Ok(AnyModel::Elastic(Elastic::new(kind)?)),
            Elastic::UNCONDENSED_NAME => Ok(AnyModel::Elastic(Elastic::uncondensed(kind)?)),
            J2::NAME => Ok(AnyModel::J2(J2::new(kind)?)),
            J2::CONTINUUM_NAME => Ok(AnyModel::J2(J2::continuum(kind)?)),
            Thermo::NAME => Ok(AnyModel::Thermo(Thermo::new(kind)?)),
            Thermo::DTEMP_SIGN_NAME => Ok(AnyModel::Thermo(Thermo::dtemp_sign(kind)?)),
            Thermo::PARTIAL_DTEMP_NAME => {
                Ok(AnyModel::Thermo(Thermo::with_flaw(kind, crate::thermo::ThermoFlaw::PartialDtemp)?))
            }
            Thermo::START_TEMPERATURE_NAME => {
                Ok(AnyModel::Thermo(Thermo::with_flaw(kind, crate::thermo::ThermoFlaw::StartTemperature)?))
            }
            Cohesive::NAME => Ok(AnyModel::Cohesive(Cohesive::new(kind)?)),
            Cohesive::SECANT_NAME => Ok(AnyModel::Cohesive(Cohesive::with_flaw(kind, CohesiveFlaw::Secant)?)),
            Cohesive::NO_COUPLING_NAME => {
                Ok(AnyModel::Cohesive(Cohesive::with_flaw(kind, CohesiveFlaw::NoCoupling)?))
            }
            Cohesive::SYMMETRIZED_NAME => {
                Ok(AnyModel::Cohesive(Cohesive::with_flaw(kind, CohesiveFlaw::Symmetrized)?))
            }
            Cohesive::TRANSPOSED_NAME => {
                Ok(AnyModel::Cohesive(Cohesive::with_flaw(kind, CohesiveFlaw::Transposed)?))
            }
            Cohesive::UNDAMAGED_NAME => {
                Ok(AnyModel::Cohesive(Cohesive::with_flaw(kind, CohesiveFlaw::Undamaged)?))
            }
            Orthotropic::NAME => Ok(AnyModel::Orthotropic(Orthotropic::new(kind)?)),
            JohnsonCook::NAME => Ok(AnyModel::JohnsonCook(JohnsonCook::new(kind)?)),
            JohnsonCook::NO_RATE_TERM_NAME => {
                Ok(AnyModel::JohnsonCook(JohnsonCook::with_tangent(kind, JcTangent::NoRateTerm)?))
            }
            Ply::NAME => Ok(AnyModel::Ply(Ply::new(kind)?)),
            Ply::SECANT_NAME => Ok(AnyModel::Ply(Ply::with_flaw(kind, PlyFlaw::Secant)?)),
            Ply::NO_COUPLING_NAME => Ok(AnyModel::Ply(Ply::with_flaw(kind, PlyFlaw::NoCoupling)?)),
            Ply::VISCOUS_NO_FACTOR_NAME => Ok(AnyModel::Ply(Ply::with_flaw(kind, PlyFlaw::ViscousNoFactor)?)),
            Ply::LENGTH_DROPPED_NAME => Ok(AnyModel::Ply(Ply::with_flaw(kind, PlyFlaw::LengthDropped)?)),
            Ply::HEALING_NAME => Ok(AnyModel::Ply(Ply::with_flaw(kind, PlyFlaw::Healing)?)),
            _ => Err(ModelError::UnknownName { name: name.to_string() }),
        }
    }

    /// Meaning of each property, in order.
    pub fn prop_names(&self) -> &'static [&'static str] {
        match self {
            AnyModel::Elastic(_) => &Elastic::PROP_NAMES,
            AnyModel::J2(_) => &J2::PROP_NAMES,
            AnyModel::Thermo(_) => &Thermo::PROP_NAMES,
            AnyModel::Cohesive(_) => &Cohesive::PROP_NAMES,
            AnyModel::Orthotropic(_) => &Orthotropic::PROP_NAMES,
            AnyModel::JohnsonCook(_) => &JohnsonCook::PROP_NAMES,
            AnyModel::Ply(_) => &Ply::PROP_NAMES,
        }
    }
}

crate::call::model_by_variant!(AnyModel { Elastic, J2, Thermo, Cohesive, Orthotropic, JohnsonCook, Ply });

/// The reference model called `name` for a kind of point, as a routine the checker can call
/// (with its complex-step twin).
pub fn reference(name: &str, kind: PointKind) -> Result<ModelRoutine<AnyModel>, ModelError> {
    AnyModel::new(name, kind).map(ModelRoutine)
}

#[cfg(test)]
mod tests {
    use super::*;
    use tancheck_core::Routine;

    #[test]
    fn models_are_found_by_name_with_their_sizes() {
        let r = reference("j2", PointKind::PlaneStrain).unwrap();
        assert_eq!(r.info().name, "j2");
        assert_eq!((r.info().nstate, r.info().nprop, r.info().convention.ncomp()), (9, 7, 4));
        let r = reference("j2-continuum", PointKind::Solid3d).unwrap();
        assert_eq!((r.info().name.as_str(), r.info().nstate), ("j2-continuum", 13));
        let r = reference("elastic", PointKind::PlaneStress).unwrap();
        assert_eq!((r.info().nstate, r.info().nprop, r.info().convention.ncomp()), (0, 2, 3));
        assert_eq!(r.0.prop_names(), &["E", "nu"]);
        let e = reference("j2", PointKind::PlaneStress).unwrap_err();
        assert!(e.to_string().contains("no plane-stress form"), "{e}");
        let e = reference("nope", PointKind::Solid3d).unwrap_err();
        assert!(e.to_string().contains("elastic, j2, j2-continuum"), "{e}");
        for name in NAMES {
            assert!(AnyModel::new(name, PointKind::Solid3d).is_ok());
        }
    }
}
