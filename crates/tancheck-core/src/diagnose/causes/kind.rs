//! The vocabulary of the cause trials: the usual causes, one tested explanation, and the
//! evidence every trial reads; [`Found`] collects the trials' results in order.

use serde::{Deserialize, Serialize};

use crate::compare::compare;
use crate::convention::Convention;

/// A usual cause of a wrong tangent.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Cause {
    /// Shear rows or columns off by 2 or ½ (engineering against tensor shear).
    ShearFactor,
    /// Shear components in another order (12/13/23 against 23/13/12 ...).
    ShearPermutation,
    /// Rows and columns in another component order than the stress and strain (a tangent
    /// written for the order 11 22 12 33 of a routine that declares 11 22 33 12): any
    /// reordering but one of the shear components among themselves (`shear-permutation`).
    ComponentOrder,
    /// Rows and columns swapped.
    Transposed,
    /// The whole tangent scaled, e.g. by a unit factor 1e3 or a sign.
    UniformScale,
    /// The elastic tangent returned in an inelastic branch.
    ElasticTangent,
    /// The derivative with the temperature held at the start of the increment: moduli, yield
    /// stress or other temperature-dependent terms of the tangent taken at the start
    /// temperature where the stress update uses the end one.
    StartTemperature,
    /// The stiffness at the start of the path (the material before any damage, softening or
    /// hardening) returned for a state that has changed since: the undamaged stiffness of a
    /// damaged point, in damage growth or in unloading.
    InitialStiffness,
    /// The tangent of the start of the increment.
    StaleTangent,
    /// The returned matrix maps the total strain to the stress (a secant), not increments
    /// to increments.
    Secant,
    /// The deviatoric part of an isotropic stiffness (the shear-modulus term 2G P_dev) off by
    /// a factor (given in the detail), the volumetric part right.
    ShearModulus,
    /// The volumetric part (the bulk-modulus term 3K P_vol) off by a factor, the deviatoric
    /// part right.
    BulkModulus,
    /// Both parts off by different factors (a wrong Poisson's ratio).
    IsotropicModuli,
    /// Coupling (off-diagonal) terms missing.
    CouplingMissing,
    /// One row wrong: a stress component's response missing a term.
    OneRow,
    /// One column wrong: a term missing for one strain direction.
    OneColumn,
    /// A continuum (non-algorithmic) tangent: the discrepancy shrinks in proportion to the
    /// increment.
    ContinuumTangent,
    /// A single rank-one term wrong, such as a hardening modulus missing from the plastic
    /// correction n⊗n, by a factor that is neither 0 nor −1 (see [`Cause::TermScaled`]).
    RankOneTerm,
    /// The symmetric part ½(C + Cᵀ) of an unsymmetric derivative returned.
    Symmetrized,
    /// One entry wrong (named in the detail).
    SingleEntry,
    /// One rank-one term of the derivative missing (its factor is 0).
    TermMissing,
    /// One rank-one term of the derivative with the wrong sign (its factor is −1).
    TermSign,
    /// One rank-one term of the derivative scaled by a factor (given in the detail).
    TermScaled,
    /// The discrepancy has rank two: two terms wrong, or a term a⊗b + b⊗a.
    RankTwo,
    /// ∂σ/∂T with one of its terms left out (the stiffness's temperature dependence, ∝ σ, or
    /// the thermal expansion, ∝ C:1). Named as the finding it gives (`dtemp-partial`); the
    /// earlier name is still read (case files).
    #[serde(rename = "dtemp-partial", alias = "partial-dtemp")]
    PartialDtemp,
    /// A plane-stress tangent left uncondensed: the in-plane block of the 3D tangent, without
    /// the term C_a3 C_3b / C_33 that holding σ33 at zero takes off.
    #[serde(rename = "plane-stress-uncondensed")]
    Uncondensed,
    /// Every entry of the returned tangent zero where the derivative's are not.
    ZeroTangent,
}

impl Cause {
    /// Specific explanations first: when several explain the discrepancy, the first listed
    /// here is ranked first.
    pub const BY_SPECIFICITY: [Cause; 27] = [
        Cause::ZeroTangent,
        Cause::ShearFactor,
        Cause::ShearPermutation,
        Cause::ComponentOrder,
        Cause::Transposed,
        Cause::Symmetrized,
        Cause::StartTemperature,
        // Before the uniform scale: the undamaged stiffness of a point unloading with damage d
        // is the true tangent times 1/(1 − d), and what the routine returned is the better name.
        Cause::InitialStiffness,
        Cause::UniformScale,
        Cause::ElasticTangent,
        Cause::StaleTangent,
        // Before the secant: where both explain (a large first plastic increment from a virgin
        // state, whose continuum tangent nearly maps the total strain to the stress), the
        // discrepancy falling with the increment down to nothing is the stronger evidence (a
        // continuum tangent read `secant`; a user-style sweep). A secant's does not fall so.
        Cause::ContinuumTangent,
        Cause::Secant,
        // Before the moduli: an uncondensed isotropic stiffness is also its in-plane bulk
        // part off; what the routine returned is the better name.
        Cause::Uncondensed,
        Cause::ShearModulus,
        Cause::BulkModulus,
        Cause::IsotropicModuli,
        Cause::CouplingMissing,
        Cause::SingleEntry,
        Cause::OneColumn,
        Cause::OneRow,
        Cause::TermMissing,
        Cause::TermSign,
        Cause::TermScaled,
        Cause::RankOneTerm,
        Cause::RankTwo,
        Cause::PartialDtemp,
    ];

    pub fn name(self) -> &'static str {
        match self {
            Cause::ShearFactor => "shear-factor",
            Cause::ShearPermutation => "shear-permutation",
            Cause::ComponentOrder => "component-order",
            Cause::Transposed => "transposed",
            Cause::UniformScale => "uniform-scale",
            Cause::ElasticTangent => "elastic-tangent",
            Cause::InitialStiffness => "initial-stiffness",
            Cause::StartTemperature => "start-temperature",
            Cause::StaleTangent => "stale-tangent",
            Cause::Secant => "secant",
            Cause::ShearModulus => "shear-modulus",
            Cause::BulkModulus => "bulk-modulus",
            Cause::IsotropicModuli => "isotropic-moduli",
            Cause::CouplingMissing => "coupling-missing",
            Cause::OneRow => "one-row",
            Cause::OneColumn => "one-column",
            Cause::ContinuumTangent => "continuum-tangent",
            Cause::RankOneTerm => "rank-one-term",
            Cause::Symmetrized => "symmetrized",
            Cause::SingleEntry => "single-entry",
            Cause::TermMissing => "term-missing",
            Cause::TermSign => "term-sign",
            Cause::TermScaled => "term-scaled",
            Cause::RankTwo => "rank-two",
            Cause::PartialDtemp => "dtemp-partial",
            Cause::Uncondensed => "plane-stress-uncondensed",
            Cause::ZeroTangent => "zero-tangent",
        }
    }

    pub(super) fn rank(self) -> usize {
        Cause::BY_SPECIFICITY.iter().position(|&c| c == self).unwrap_or(usize::MAX)
    }
}

/// One tested explanation.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Hypothesis {
    pub cause: Cause,
    /// What exactly, e.g. "shear columns ×0.5" or "column 13".
    pub detail: String,
    /// max(norm error, worst entry error) left after the correction.
    pub error_left: f64,
    /// The correction leaves (almost) nothing: this explains the discrepancy.
    pub explains: bool,
}

/// The discrepancy at smaller increments (for the continuum-tangent test).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Refinement {
    /// Fractions of the increment, largest first, and the tangent error at each.
    pub fractions: Vec<f64>,
    pub errors: Vec<f64>,
    /// Every refined increment reached the same branch as the full one.
    pub same_branch: bool,
    /// The fractions are of the part of the increment past this fraction of it: where the
    /// full increment's branch begins when the increment crosses into it (a first plastic
    /// increment: its smaller fractions from the start stay elastic). 0 when every fraction
    /// from the start reaches the branch.
    #[serde(default)]
    pub past: f64,
}

/// What the hypotheses are tested against.
pub struct Evidence<'a> {
    pub conv: &'a Convention,
    /// The returned tangent and the best numerical one (routine form, column-major).
    pub returned: &'a [f64],
    pub numerical: &'a [f64],
    /// The derivative along an elastic unloading step from the start state, if measured.
    pub elastic: Option<&'a [f64]>,
    /// The tangent the routine returned at that step.
    pub elastic_returned: Option<&'a [f64]>,
    /// The derivative along a small unloading step from the end of the increment, if
    /// measured (state changed): the stiffness of the state reached.
    pub elastic_end: Option<&'a [f64]>,
    /// The derivative at the start of the path (a small step from its start state along the
    /// increment's direction), if measured.
    pub initial: Option<&'a [f64]>,
    /// The derivative of the increment with its temperature increment left out (the
    /// temperature held at the start), if the increment changes the temperature.
    pub start_temperature: Option<&'a [f64]>,
    /// The discrepancy at fractions of the temperature increment alone (the strain increment
    /// kept), when the increment changes the temperature.
    pub temp_refinement: Option<&'a Refinement>,
    /// The derivative at the end of the previous increment (the start of this one).
    pub previous: Option<&'a [f64]>,
    pub refinement: Option<&'a Refinement>,
    /// Strain and stress at the end of the increment (routine form).
    pub strain_end: &'a [f64],
    pub stress_end: &'a [f64],
    pub state_changed: bool,
    pub tol: f64,
    pub entry_floor: f64,
}

impl Evidence<'_> {
    pub(super) fn error(&self, candidate: &[f64]) -> f64 {
        let c = compare(self.conv, candidate, self.numerical, self.tol, self.entry_floor, 0);
        c.error()
    }

    /// Error of the returned tangent against a predicted one.
    pub(super) fn distance(&self, predicted: &[f64]) -> f64 {
        let c = compare(self.conv, self.returned, predicted, self.tol, self.entry_floor, 0);
        c.error()
    }
}

/// The hypotheses tested so far, in the order they were tested, and the error level below
/// which a hypothesis explains the failure.
pub(super) struct Found {
    pub(super) hs: Vec<Hypothesis>,
    pub(super) explain_level: f64,
}

impl Found {
    pub(super) fn push(&mut self, cause: Cause, detail: String, error_left: f64) {
        let explains = error_left <= self.explain_level;
        self.hs.push(Hypothesis { cause, detail, error_left, explains });
    }
}
