//! The zoo: routines with a known verdict, for `tancheck selftest` to show what the checker
//! catches and what it must let pass.
//!
//! Each [`ZooEntry`] names a model, says in one line what is wrong with it, and gives the
//! finding a check is expected to reach (one of [`FINDINGS`]; `none` for a correct routine).
//! The Rust model is [`zoo_model`]; compiled versions, where there are, are exported by the
//! sources in [`C_SOURCES`] and [`FORTRAN_SOURCES`] under the entry's symbols (each with its
//! complex-step twin, `_cx`).
//!
//! The flawed J2 variants ([`J2Flaw`], [`FlawedJ2`]) keep the stress update of [`J2`] and spoil
//! only the tangent; the bimodulus models ([`Bimodulus`]) are elastic with a kink.

mod j2_flaw;

pub use j2_flaw::{FlawedJ2, J2Flaw, RANK_TWO_FACTOR, SINGLE_ENTRY_FACTOR, UNIT_FACTOR};

use tancheck_core::{ModelRoutine, PointKind};

use crate::{AnyModel, Bimodulus, Cohesive, Elastic, ModelError, Thermo, J2};

/// Every finding an entry may expect. `none`: the routine is correct and must pass.
pub const FINDINGS: [&str; 25] = [
    "shear-factor",
    "shear-permutation",
    "transposed",
    "uniform-scale",
    "elastic-tangent",
    "initial-stiffness",
    "start-temperature",
    "continuum-tangent",
    "stale-tangent",
    "rank-one-term",
    "term-scaled",
    "term-sign",
    "term-missing",
    "single-entry",
    "symmetrized",
    "rank-two",
    "dtemp-partial",
    "twin-not-complex-step-safe",
    "one-column",
    "kink-neither-side",
    "dtemp",
    "secant",
    "coupling-missing",
    "plane-stress-uncondensed",
    "none",
];

/// Sources of the compiled zoo routines, relative to the repository root: every `c_symbol`
/// of [`zoo`] is exported by one of them (link them into one library).
pub const C_SOURCES: [&str; 6] = [
    "fortran-shim/examples/c/zoo_j2.c",
    "fortran-shim/examples/c/bimodulus.c",
    "fortran-shim/examples/c/j2.c",
    "fortran-shim/examples/c/elastic.c",
    "fortran-shim/examples/c/thermo.c",
    "fortran-shim/examples/c/cohesive.c",
];

/// Sources of the Fortran zoo routines, relative to the repository root: every
/// `fortran_symbol` of [`zoo`] is exported by one of them.
pub const FORTRAN_SOURCES: [&str; 5] = [
    "fortran-shim/examples/fortran/zoo_j2.F90",
    "fortran-shim/examples/fortran/j2.F90",
    "fortran-shim/examples/fortran/elastic.F90",
    "fortran-shim/examples/fortran/thermo.F90",
    "fortran-shim/examples/fortran/cohesive.F90",
];

/// One routine of the zoo.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ZooEntry {
    /// Stable kebab-case name, as [`zoo_model`] takes it.
    pub name: &'static str,
    /// What is wrong with it (or that nothing is), in one line.
    pub description: &'static str,
    /// The finding a check should reach: one of [`FINDINGS`].
    pub expected: &'static str,
    /// Kinds of point it supports.
    pub kinds: &'static [PointKind],
    /// The C routine with the same layout, when there is one.
    pub c_symbol: Option<&'static str>,
    /// The Fortran routine with the same layout, when there is one.
    pub fortran_symbol: Option<&'static str>,
}

/// Every entry of the zoo, family by family (the order of [`zoo`]).
const ROWS: [ZooEntry; 30] = [
    // The J2 family: the reference, its flawed tangents and its broken twins.
    ZooEntry {
        name: J2::NAME,
        description: "J2 plasticity with the consistent tangent (the reference the variants spoil)",
        expected: "none",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2"),
        fortran_symbol: Some("f_j2"),
    },
    ZooEntry {
        name: "j2-shear-factor",
        description: "shear columns of the tangent halved, as if written for tensor shear strain",
        expected: "shear-factor",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_shear_factor"),
        fortran_symbol: Some("f_j2_shear_factor"),
    },
    ZooEntry {
        name: "j2-shear-permuted",
        description: "tangent written with shear order 12, 13, 23 while stress and strain use 23, 13, 12",
        expected: "shear-permutation",
        kinds: &[PointKind::Solid3d],
        c_symbol: Some("c_j2_shear_permuted"),
        fortran_symbol: Some("f_j2_shear_permuted"),
    },
    ZooEntry {
        name: J2::CONTINUUM_NAME,
        description: "continuum elastoplastic tangent instead of the consistent one after yield",
        expected: "continuum-tangent",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_continuum"),
        fortran_symbol: Some("f_j2_continuum"),
    },
    ZooEntry {
        name: "j2-elastic-first-plastic",
        description: "elastic tangent in the increment where plastic flow starts from a virgin state",
        expected: "elastic-tangent",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_elastic_first_plastic"),
        fortran_symbol: Some("f_j2_elastic_first_plastic"),
    },
    ZooEntry {
        name: "j2-stale",
        description:
            "returns the consistent tangent of the previous increment (kept in two extra state entries)",
        expected: "stale-tangent",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_stale"),
        fortran_symbol: None,
    },
    ZooEntry {
        name: "j2-no-kinematic",
        description:
            "kinematic modulus left out of the plastic correction of the tangent, kept in the update",
        expected: "term-scaled",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_no_kinematic"),
        fortran_symbol: Some("f_j2_no_kinematic"),
    },
    ZooEntry {
        name: "j2-unit-factor",
        description: "tangent 1000 times too large (modulus in MPa, stress in kPa)",
        expected: "uniform-scale",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_unit_factor"),
        fortran_symbol: Some("f_j2_unit_factor"),
    },
    ZooEntry {
        name: "j2-one-column",
        description: "13 shear column of the tangent taken from the elastic tangent",
        expected: "one-column",
        kinds: &[PointKind::Solid3d],
        c_symbol: Some("c_j2_one_column"),
        fortran_symbol: Some("f_j2_one_column"),
    },
    ZooEntry {
        name: "j2-reversal",
        description: "plastic correction of the tangent with the wrong sign, only in yielding after a load \
                      reversal (the last flow direction kept in ncomp extra state entries)",
        expected: "term-sign",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_reversal"),
        fortran_symbol: None,
    },
    ZooEntry {
        name: "j2-single-entry",
        description: "one entry of the tangent (33/22) off by 1e-4",
        expected: "single-entry",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_single_entry"),
        fortran_symbol: Some("f_j2_single_entry"),
    },
    ZooEntry {
        name: "j2-plastic-sign",
        description: "plastic correction of the tangent with the wrong sign in every plastic increment",
        expected: "term-sign",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_plastic_sign"),
        fortran_symbol: Some("f_j2_plastic_sign"),
    },
    ZooEntry {
        name: "j2-term-missing",
        description: "after yield, the plastic correction 2μθ̄ n⊗n left out of the tangent (θ kept)",
        expected: "term-missing",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_term_missing"),
        fortran_symbol: Some("f_j2_term_missing"),
    },
    ZooEntry {
        name: "j2-rank-two",
        description: "after yield, a spurious pressure coupling c(n⊗1 + 1⊗n) in the tangent (rank two)",
        expected: "rank-two",
        kinds: &J2::KINDS,
        c_symbol: Some("c_j2_rank_two"),
        fortran_symbol: Some("f_j2_rank_two"),
    },
    ZooEntry {
        name: "twin-real-sqrt",
        description: "consistent J2 whose complex twin takes a real-only square root in the norm of the \
                      flow direction (Rust: the norm's real part kept)",
        expected: "twin-not-complex-step-safe",
        kinds: &J2::KINDS,
        c_symbol: Some("c_twin_real_sqrt"),
        fortran_symbol: Some("f_twin_real_sqrt"),
    },
    ZooEntry {
        name: "twin-conjugate",
        description:
            "consistent J2 whose complex twin takes the norm with a conjugate (C conj, Fortran \
                      dot_product; Rust has no conjugate: the norm's real part kept, the same to first order)",
        expected: "twin-not-complex-step-safe",
        kinds: &J2::KINDS,
        c_symbol: Some("c_twin_conjugate"),
        fortran_symbol: Some("f_twin_conjugate"),
    },
    // Elasticity: the reference and the bimodulus kink.
    ZooEntry {
        name: Elastic::NAME,
        description: "linear isotropic elasticity (smooth, correct)",
        expected: "none",
        kinds: &Elastic::KINDS,
        c_symbol: Some("c_elastic"),
        fortran_symbol: Some("f_elastic"),
    },
    ZooEntry {
        name: Elastic::UNCONDENSED_NAME,
        description: "plane-stress elasticity returning the in-plane block of the 3D stiffness as its \
                      tangent (not condensed for σ33 = 0; the stress is right)",
        expected: "plane-stress-uncondensed",
        kinds: &[PointKind::PlaneStress],
        c_symbol: Some("c_elastic_uncondensed"),
        fortran_symbol: Some("f_elastic_uncondensed"),
    },
    ZooEntry {
        name: Bimodulus::NAME,
        description: "correct elasticity with a kink: different 11 stiffness in tension and compression",
        expected: "none",
        kinds: &Bimodulus::KINDS,
        c_symbol: Some("c_bimodulus"),
        fortran_symbol: None,
    },
    ZooEntry {
        name: Bimodulus::AVERAGE_NAME,
        description: "bimodulus elasticity returning the mean of the two sides' tangents at the kink",
        expected: "kink-neither-side",
        kinds: &Bimodulus::KINDS,
        c_symbol: Some("c_bimodulus_average"),
        fortran_symbol: None,
    },
    // Thermo-elasticity.
    ZooEntry {
        name: Thermo::NAME,
        description:
            "thermo-elasticity with temperature-dependent modulus, Poisson ratio and expansion (correct)",
        expected: "none",
        kinds: &Thermo::KINDS,
        c_symbol: Some("c_thermo"),
        fortran_symbol: Some("f_thermo"),
    },
    ZooEntry {
        name: Thermo::DTEMP_SIGN_NAME,
        description:
            "thermo-elasticity returning the temperature derivative of the stress with the wrong sign",
        expected: "dtemp",
        kinds: &Thermo::KINDS,
        c_symbol: Some("c_thermo_dtemp_sign"),
        fortran_symbol: Some("f_thermo_dtemp_sign"),
    },
    ZooEntry {
        name: Thermo::PARTIAL_DTEMP_NAME,
        description: "thermo-elasticity whose temperature derivative of the stress misses its \
                      thermal-expansion term",
        expected: "dtemp-partial",
        kinds: &Thermo::KINDS,
        c_symbol: Some("c_thermo_partial_dtemp"),
        fortran_symbol: Some("f_thermo_partial_dtemp"),
    },
    ZooEntry {
        name: Thermo::START_TEMPERATURE_NAME,
        description: "thermo-elasticity whose tangent takes its moduli at the temperature of the start of the increment",
        expected: "start-temperature",
        kinds: &Thermo::KINDS,
        c_symbol: Some("c_thermo_start_temperature"),
        fortran_symbol: Some("f_thermo_start_temperature"),
    },
    // The cohesive law.
    ZooEntry {
        name: Cohesive::NAME,
        description: "bilinear mixed-mode cohesive law with its consistent tangent (correct)",
        expected: "none",
        kinds: &Cohesive::KINDS,
        c_symbol: Some("c_cohesive"),
        fortran_symbol: Some("f_cohesive"),
    },
    ZooEntry {
        name: Cohesive::SECANT_NAME,
        description: "cohesive law returning the secant (1-d)K instead of the tangent during damage growth",
        expected: "secant",
        kinds: &Cohesive::KINDS,
        c_symbol: Some("c_cohesive_secant"),
        fortran_symbol: Some("f_cohesive_secant"),
    },
    ZooEntry {
        name: Cohesive::NO_COUPLING_NAME,
        description: "cohesive law with the mixed-mode coupling terms of the damage growth left out",
        expected: "coupling-missing",
        kinds: &Cohesive::KINDS,
        c_symbol: Some("c_cohesive_no_coupling"),
        fortran_symbol: Some("f_cohesive_no_coupling"),
    },
    ZooEntry {
        name: Cohesive::TRANSPOSED_NAME,
        description: "cohesive law returning its unsymmetric mixed-mode tangent transposed",
        expected: "transposed",
        kinds: &Cohesive::KINDS,
        c_symbol: Some("c_cohesive_transposed"),
        fortran_symbol: Some("f_cohesive_transposed"),
    },
    ZooEntry {
        name: Cohesive::SYMMETRIZED_NAME,
        description: "cohesive law returning the symmetric part of its unsymmetric mixed-mode tangent",
        expected: "symmetrized",
        kinds: &Cohesive::KINDS,
        c_symbol: Some("c_cohesive_symmetrized"),
        fortran_symbol: Some("f_cohesive_symmetrized"),
    },
    ZooEntry {
        name: Cohesive::UNDAMAGED_NAME,
        description: "cohesive law returning the undamaged stiffness K once the interface is damaged",
        expected: "initial-stiffness",
        kinds: &Cohesive::KINDS,
        c_symbol: Some("c_cohesive_undamaged"),
        fortran_symbol: Some("f_cohesive_undamaged"),
    },
];

/// The zoo, in a fixed order: the J2 family, the elastic family, thermo-elasticity, cohesive.
pub fn zoo() -> Vec<ZooEntry> {
    ROWS.to_vec()
}

/// The entry called `name`.
pub fn zoo_entry(name: &str) -> Option<ZooEntry> {
    zoo().into_iter().find(|e| e.name == name)
}

/// A routine of the zoo, chosen at run time.
#[derive(Clone, Debug)]
pub enum ZooModel {
    /// A model of [`AnyModel`] (`elastic`, `j2`, `j2-continuum`, ...).
    Reference(AnyModel),
    /// A J2 variant with a spoiled tangent.
    FlawedJ2(FlawedJ2),
    /// `bimodulus` or `bimodulus-average`.
    Bimodulus(Bimodulus),
}

impl ZooModel {
    /// The zoo model called `name` for a kind of point.
    pub fn new(name: &str, kind: PointKind) -> Result<ZooModel, ModelError> {
        if let Some(flaw) = J2Flaw::from_name(name) {
            return Ok(ZooModel::FlawedJ2(FlawedJ2::new(flaw, kind)?));
        }
        match name {
            Bimodulus::NAME => Ok(ZooModel::Bimodulus(Bimodulus::new(kind)?)),
            Bimodulus::AVERAGE_NAME => Ok(ZooModel::Bimodulus(Bimodulus::average(kind)?)),
            // Every model of `AnyModel`: the references and the flawed models kept there.
            _ => Ok(ZooModel::Reference(AnyModel::new(name, kind)?)),
        }
    }

    /// Meaning of each property, in order.
    pub fn prop_names(&self) -> &'static [&'static str] {
        match self {
            ZooModel::Reference(m) => m.prop_names(),
            ZooModel::FlawedJ2(_) => &J2::PROP_NAMES,
            ZooModel::Bimodulus(_) => &Bimodulus::PROP_NAMES,
        }
    }
}

crate::call::model_by_variant!(ZooModel { Reference, FlawedJ2, Bimodulus });

/// The zoo model called `name` for a kind of point, as a routine the checker can call (with
/// its complex-step twin).
pub fn zoo_model(name: &str, kind: PointKind) -> Result<ModelRoutine<ZooModel>, ModelError> {
    ZooModel::new(name, kind).map(ModelRoutine)
}

#[cfg(test)]
mod tests {
    use super::*;
    use tancheck_core::Model;

    #[test]
    fn rows_are_consistent_with_their_models() {
        let rows = zoo();
        for (k, e) in rows.iter().enumerate() {
            assert!(FINDINGS.contains(&e.expected), "{}: unknown finding {}", e.name, e.expected);
            assert!(rows[..k].iter().all(|o| o.name != e.name), "{} twice", e.name);
            assert!(!e.kinds.is_empty() && !e.description.is_empty());
            for kind in PointKind::ALL {
                let made = zoo_model(e.name, kind);
                assert_eq!(made.is_ok(), e.kinds.contains(&kind), "{} {kind}", e.name);
                if let Ok(r) = made {
                    assert_eq!(r.0.info().name, e.name);
                    assert_eq!(r.0.info().convention.kind(), kind);
                }
            }
            for s in [e.c_symbol, e.fortran_symbol].into_iter().flatten() {
                let tail = e.name.replace('-', "_");
                assert!(s == format!("c_{tail}") || s == format!("f_{tail}"), "{}: symbol {s}", e.name);
            }
        }
        assert!(matches!(zoo_model("j2-nope", PointKind::Solid3d), Err(ModelError::UnknownName { .. })));
        assert_eq!(zoo_entry("j2-stale").map(|e| e.expected), Some("stale-tangent"));
    }
}
