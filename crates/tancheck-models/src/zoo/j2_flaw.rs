//! Flawed J2 variants: the stress update of [`J2`] unchanged, the returned tangent spoiled in
//! one documented way each.
//!
//! Every variant calls the consistent [`J2`] model for stress, state and tangent, then
//! changes the tangent only. Where a flaw needs a quantity of the return map (the flow
//! direction n, the hardening slope, θ), it comes from J2's own pieces (crate::j2: the
//! properties, `trial_state`, `consistent_moduli`, `return_tangent`; Simo & Hughes 1998,
//! Box 3.2) applied to the call's inputs and outputs:
//!
//! - n = ξ_tr/‖ξ_tr‖ from J2's trial state, so n has the same bits as J2's;
//! - Δγ = (α_{n+1} − α_n)/√(2/3), θ and θ̄ from J2's consistent moduli with K' = K'(α_{n+1}).
//!
//! Two variants change the state layout: `j2-stale` appends two entries (see
//! [`J2Flaw::Stale`]) and `j2-reversal` appends ncomp (see [`J2Flaw::Reversal`]).

use tancheck_core::routine::status;
use tancheck_core::{
    CallInput, CallOutput, Convention, Fault, Model, PointKind, RoutineInfo, Scalar, ShearMeasure,
};

use crate::call::check_sizes;
use crate::j2::{consistent_moduli, continuum_ratio, read_props, return_tangent, trial_state, Props};
use crate::tensor::{
    is_shear_slot, isotropic_matrix, sqrt_2_3, stress_to_tensor, write_tangent, SLOTS_4, SLOTS_6,
};
use crate::{ModelError, J2};

/// Solid-3d only: the flaw needs the 23 and 13 components.
const KINDS_3D: [PointKind; 1] = [PointKind::Solid3d];

/// Canonical slots in the order 11, 22, 33, 12, 13, 23: the shear order `j2-shear-permuted`
/// writes its tangent in.
const PERMUTED_SLOTS: [usize; 6] = [0, 1, 2, 5, 4, 3];

/// The routine index of the 13 shear component in the 6-component order (11, 22, 33, 23, 13, 12).
const COLUMN_13: usize = 4;

/// One way of spoiling the consistent J2 tangent. The stress update is J2's in every variant.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum J2Flaw {
    /// `j2-shear-factor`: every shear column of the tangent divided by 2, as if the tangent
    /// were written for tensor shear strain while the strain is engineering (γ = 2ε). Wrong in
    /// both branches. Expected finding: `shear-factor`.
    ShearFactor,
    /// `j2-shear-permuted`: the tangent written with the shear rows and columns in the order
    /// 12, 13, 23 while stress and strain use 23, 13, 12 (entry (i, j) holds C of components
    /// p(i), p(j) with p swapping 23 and 12). The isotropic elastic tangent does not change
    /// under that swap, so only the plastic branch is wrong (when n23 ≠ n12). Solid-3d only.
    /// Expected finding: `shear-permutation`.
    ShearPermuted,
    /// `j2-elastic-first-plastic`: the elastic tangent in the first plastic increment (branch
    /// 1 with α_n = 0 exactly: plastic flow starts from a virgin state), the consistent tangent
    /// otherwise. Expected finding: `elastic-tangent`.
    ElasticFirstPlastic,
    /// `j2-stale`: the tangent of the previous increment. State: J2's 2·ncomp + 1 entries,
    /// then [1 − θ, θ̄] of the consistent tangent at the end of this increment (0, 0 when it
    /// is elastic), 2·ncomp + 3 entries in all. The tangent returned is
    /// κ 1⊗1 + 2μθ_s(I − ⅓1⊗1) − 2μθ̄_s n_s⊗n_s with θ_s, θ̄_s read from the start state and
    /// n_s the flow direction of the start state, ξ_n/‖ξ_n‖ with ξ_n = dev C:(ε − εp_n) − β_n
    /// (n_s = 0 when ξ_n = 0). After a plastic increment ξ_n is parallel to that increment's
    /// flow direction, so this is exactly the consistent tangent the previous increment
    /// returned; a zero start (no previous increment) gives the elastic tangent. The tangent
    /// therefore does not depend on Δε. Right only when the previous and the present
    /// increment have the same derivative (elastic after elastic). Expected finding:
    /// `stale-tangent`.
    Stale,
    /// `j2-no-kinematic`: the consistent tangent with H_kin left out of θ̄,
    /// θ̄ = 1/(1 + K'/(3μ)) − (1 − θ), while the stress update keeps H_kin: the plastic
    /// correction 2μθ̄ n⊗n has the wrong size. Right in the elastic branch and when
    /// H_kin = 0. Expected finding: `term-scaled`.
    NoKinematic,
    /// `j2-unit-factor`: the consistent tangent times [`UNIT_FACTOR`] (1000, a modulus in MPa
    /// with stress in kPa). Wrong in both branches. Expected finding: `uniform-scale`.
    UnitFactor,
    /// `j2-one-column`: the consistent tangent with its 13 shear column taken from the elastic
    /// tangent (the plastic term missing for one strain direction). Right in the elastic
    /// branch. Solid-3d only. Expected finding: `one-column`.
    OneColumn,
    /// `j2-reversal`: the consistent tangent, except in a plastic increment that reverses the
    /// direction of the previous plastic flow, where the plastic correction has the wrong sign:
    /// κ 1⊗1 + 2μθ(I − ⅓1⊗1) + 2μθ̄ n⊗n. State: J2's 2·ncomp + 1 entries, then the flow
    /// direction n_last of the latest plastic increment (ncomp entries, routine order, tensor
    /// components, so a shear entry is n_ij, not 2 n_ij; zero before any plastic flow),
    /// 3·ncomp + 1 entries in all. A plastic increment sets n_last to its n; an elastic one
    /// carries it. The increment reverses the flow when n : n_last < 0 (the double
    /// contraction, shear entries counted twice). Right in the elastic branch, on the first
    /// plastic loading and while the flow keeps its sense; wrong in reversed (Bauschinger)
    /// yielding only. Expected finding: `term-sign`.
    Reversal,
    /// `j2-single-entry`: the consistent tangent with one entry, ∂σ33/∂ε22 (row 33, column
    /// 22), times 1 + 1e-4 ([`SINGLE_ENTRY_FACTOR`]), in both branches. Expected finding:
    /// `single-entry`.
    SingleEntry,
    /// `j2-plastic-sign`: the plastic correction with the wrong sign in every plastic
    /// increment, κ 1⊗1 + 2μθ(I − ⅓1⊗1) + 2μθ̄ n⊗n. Expected finding: `term-sign`.
    PlasticSign,
    /// `j2-rank-two`: after yield, the consistent tangent plus c (n⊗1 + 1⊗n) with
    /// c = [`RANK_TWO_FACTOR`]·μ (a pressure coupling a pressure-independent update does not
    /// have): a discrepancy of rank two. Expected finding: `rank-two`.
    RankTwo,
    /// `j2-term-missing`: after yield, the plastic correction −2μθ̄ n⊗n left out of the
    /// tangent (θ kept): κ 1⊗1 + 2μθ(I − ⅓1⊗1). Expected finding: `term-missing`.
    TermMissing,
    /// `twin-real-sqrt`: J2 whose stress update, after yield, divides ξ_tr by a norm whose
    /// square root keeps only the real part (sqrt(Re x), the imaginary part dropped). The real
    /// build is J2 to the bit; the complex-step twin loses the derivative of the norm.
    /// The tangent is the consistent one. Expected finding: `twin-not-complex-step-safe`.
    TwinRealSqrt,
    /// `twin-conjugate`: as `twin-real-sqrt`, with the norm taken as Σ x·conj(x): to first
    /// order in the complex step that is the real part of Σ x², so the Rust model (whose scalar
    /// has no conjugate) keeps Re Σ x². Expected finding: `twin-not-complex-step-safe`.
    TwinConjugate,
}

/// Factor of the entry `j2-single-entry` spoils.
pub const SINGLE_ENTRY_FACTOR: f64 = 1.0 + 1e-4;

/// c/μ of the rank-two term of `j2-rank-two`.
pub const RANK_TWO_FACTOR: f64 = 0.05;

/// Factor of `j2-unit-factor`.
pub const UNIT_FACTOR: f64 = 1e3;

impl J2Flaw {
    /// Every flaw, in the order of the zoo.
    pub const ALL: [J2Flaw; 14] = [
        J2Flaw::ShearFactor,
        J2Flaw::ShearPermuted,
        J2Flaw::ElasticFirstPlastic,
        J2Flaw::Stale,
        J2Flaw::NoKinematic,
        J2Flaw::UnitFactor,
        J2Flaw::OneColumn,
        J2Flaw::Reversal,
        J2Flaw::SingleEntry,
        J2Flaw::PlasticSign,
        J2Flaw::RankTwo,
        J2Flaw::TermMissing,
        J2Flaw::TwinRealSqrt,
        J2Flaw::TwinConjugate,
    ];

    /// The variant's stable name.
    pub fn name(self) -> &'static str {
        match self {
            J2Flaw::ShearFactor => "j2-shear-factor",
            J2Flaw::ShearPermuted => "j2-shear-permuted",
            J2Flaw::ElasticFirstPlastic => "j2-elastic-first-plastic",
            J2Flaw::Stale => "j2-stale",
            J2Flaw::NoKinematic => "j2-no-kinematic",
            J2Flaw::UnitFactor => "j2-unit-factor",
            J2Flaw::OneColumn => "j2-one-column",
            J2Flaw::Reversal => "j2-reversal",
            J2Flaw::SingleEntry => "j2-single-entry",
            J2Flaw::PlasticSign => "j2-plastic-sign",
            J2Flaw::RankTwo => "j2-rank-two",
            J2Flaw::TermMissing => "j2-term-missing",
            J2Flaw::TwinRealSqrt => "twin-real-sqrt",
            J2Flaw::TwinConjugate => "twin-conjugate",
        }
    }

    /// The flaw by its name.
    pub fn from_name(name: &str) -> Option<J2Flaw> {
        J2Flaw::ALL.into_iter().find(|f| f.name() == name)
    }

    /// Kinds of point the variant supports.
    pub fn kinds(self) -> &'static [PointKind] {
        match self {
            J2Flaw::ShearPermuted | J2Flaw::OneColumn => &KINDS_3D,
            _ => &J2::KINDS,
        }
    }

    fn supported(self) -> &'static str {
        match self {
            J2Flaw::ShearPermuted | J2Flaw::OneColumn => "solid-3d",
            _ => "solid-3d, plane-strain, axisymmetric",
        }
    }

    /// State entries the variant adds after J2's 2·ncomp + 1, for `ncomp` components.
    pub fn extra_state(self, ncomp: usize) -> usize {
        match self {
            J2Flaw::Stale => 2,
            J2Flaw::Reversal => ncomp,
            _ => 0,
        }
    }
}

/// A J2 model whose tangent is spoiled by one [`J2Flaw`].
#[derive(Clone, Debug)]
pub struct FlawedJ2 {
    base: J2,
    flaw: J2Flaw,
    info: RoutineInfo,
    slots: &'static [usize],
}

impl FlawedJ2 {
    /// The variant with `flaw` for one kind of point (default order, engineering shear).
    pub fn new(flaw: J2Flaw, kind: PointKind) -> Result<FlawedJ2, ModelError> {
        if !flaw.kinds().contains(&kind) {
            return Err(ModelError::UnsupportedKind {
                model: flaw.name(),
                kind,
                supported: flaw.supported(),
            });
        }
        let base = J2::new(kind)?;
        let slots: &'static [usize] = if kind.ncomp() == 6 { &SLOTS_6 } else { &SLOTS_4 };
        let info = RoutineInfo {
            name: flaw.name().to_string(),
            convention: Convention::new(kind, ShearMeasure::Engineering),
            nstate: base.info().nstate + flaw.extra_state(kind.ncomp()),
            nprop: base.info().nprop,
        };
        Ok(FlawedJ2 { base, flaw, info, slots })
    }

    /// The flaw of this variant.
    pub fn flaw(&self) -> J2Flaw {
        self.flaw
    }
}

/// J2's trial state with the strain increment `dstrain` (zeros: the start state): the flow
/// direction n = ξ/‖ξ‖ (the zero tensor when ‖ξ‖ = 0), ‖ξ‖ and ξ, canonical components.
fn flow<S: Scalar>(
    p: &Props<S>,
    strain: &[S],
    dstrain: &[S],
    eps_p: &[S],
    beta: &[S],
    slots: &[usize],
) -> ([S; 6], S, [S; 6]) {
    let (_, xi, norm) =
        trial_state(p.lambda, p.mu, strain, dstrain, eps_p, &stress_to_tensor(beta, slots), slots);
    let mut n = [S::zero(); 6];
    if norm.re() > 0.0 {
        for k in 0..6 {
            n[k] = xi[k] / norm;
        }
    }
    (n, norm, xi)
}

/// J2's tangent C = κ 1⊗1 + 2μθ(I − ⅓1⊗1) − 2μθ̄ n⊗n (`return_tangent`) in routine order.
fn write_j2<S: Scalar>(
    p: &Props<S>,
    theta: S,
    theta_bar: S,
    nrm: &[S; 6],
    slots: &[usize],
    tangent: &mut [S],
) {
    let kappa = p.lambda + p.mu * (2.0 / 3.0);
    write_tangent(&return_tangent(kappa, p.mu * 2.0, theta, theta_bar, nrm), slots, tangent);
}

impl Model for FlawedJ2 {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        check_sizes(&self.info, input, output)?;
        let slots = self.slots;
        let n = slots.len();
        let m = 2 * n + 1;
        {
            let j2_input = CallInput { state0: &input.state0[..m], ..*input };
            let mut j2_output = CallOutput {
                stress: &mut *output.stress,
                state: &mut output.state[..m],
                tangent: &mut *output.tangent,
                dstress_dtemp: &mut *output.dstress_dtemp,
                energy: &mut *output.energy,
                outcome: &mut *output.outcome,
            };
            self.base.evaluate(&j2_input, &mut j2_output)?;
        }
        if output.outcome.status != status::OK {
            // J2 has filled its part with NaN and written the message.
            output.state[m..].fill(S::cst(f64::NAN));
            return Ok(());
        }
        let plastic = output.outcome.branch == 1;
        // J2 accepted the properties, so they read.
        let Ok(p) = read_props(input.props) else { return Ok(()) };
        let (lambda, mu, h_kin) = (p.lambda, p.mu, p.h_kin);
        let tangent = &mut *output.tangent;
        let alpha_n = input.state0[n];
        let (eps_p_n, beta_n) = (&input.state0[..n], &input.state0[n + 1..m]);
        let trial = || flow(&p, input.strain, input.dstrain, eps_p_n, beta_n, slots);
        // Δγ and the consistent θ, θ̄ of a plastic increment, from its end state.
        let moduli = |norm: S, alpha: S| {
            let dgamma = (alpha - alpha_n) / sqrt_2_3();
            let (theta, theta_bar) = consistent_moduli(mu, p.hardening_slope(alpha) + h_kin, dgamma, norm);
            (dgamma, theta, theta_bar)
        };
        match self.flaw {
            J2Flaw::ShearFactor => {
                for (j, &sj) in slots.iter().enumerate() {
                    if is_shear_slot(sj) {
                        for t in &mut tangent[j * n..(j + 1) * n] {
                            *t = *t * 0.5;
                        }
                    }
                }
            }
            J2Flaw::ShearPermuted => {
                let mut c = [S::zero(); 36];
                c.copy_from_slice(tangent);
                for (j, &pj) in PERMUTED_SLOTS.iter().enumerate() {
                    for (i, &pi) in PERMUTED_SLOTS.iter().enumerate() {
                        tangent[i + 6 * j] = c[pi + 6 * pj];
                    }
                }
            }
            J2Flaw::ElasticFirstPlastic => {
                if plastic && alpha_n.re() == 0.0 {
                    write_tangent(&isotropic_matrix(lambda, mu), slots, tangent);
                }
            }
            J2Flaw::Stale => {
                // The returned tangent: the moduli kept by the previous increment, with the
                // flow direction of the start state.
                let zeros = [S::zero(); 6];
                let (n_start, _, _) = flow(&p, input.strain, &zeros[..n], eps_p_n, beta_n, slots);
                let theta_s = S::one() - input.state0[m];
                write_j2(&p, theta_s, input.state0[m + 1], &n_start, slots, tangent);
                // The moduli of this increment, for the next one.
                let (one_minus_theta, theta_bar) = if plastic {
                    let (_, norm, _) = trial();
                    let (_, theta, theta_bar) = moduli(norm, output.state[n]);
                    (S::one() - theta, theta_bar)
                } else {
                    (S::zero(), S::zero())
                };
                output.state[m] = one_minus_theta;
                output.state[m + 1] = theta_bar;
            }
            J2Flaw::NoKinematic => {
                if plastic {
                    // θ̄ without H_kin minus θ̄ with it; the (1 − θ) parts cancel.
                    let slope = p.hardening_slope(output.state[n]);
                    let shift = mu * 2.0 * (continuum_ratio(mu, slope) - continuum_ratio(mu, slope + h_kin));
                    let (nrm, _, _) = trial();
                    for (j, &sj) in slots.iter().enumerate() {
                        for (i, &si) in slots.iter().enumerate() {
                            tangent[i + j * n] -= shift * nrm[si] * nrm[sj];
                        }
                    }
                }
            }
            J2Flaw::UnitFactor => {
                for t in tangent.iter_mut() {
                    *t = *t * UNIT_FACTOR;
                }
            }
            J2Flaw::OneColumn => {
                if plastic {
                    let c = isotropic_matrix(lambda, mu);
                    for i in 0..n {
                        tangent[i + COLUMN_13 * n] = c[slots[i]][slots[COLUMN_13]];
                    }
                }
            }
            J2Flaw::SingleEntry => {
                // Row 33 (index 2), column 22 (index 1): the same in 6 and 4 components.
                tangent[2 + n] = tangent[2 + n] * SINGLE_ENTRY_FACTOR;
            }
            J2Flaw::PlasticSign
            | J2Flaw::RankTwo
            | J2Flaw::TermMissing
            | J2Flaw::TwinRealSqrt
            | J2Flaw::TwinConjugate
                if plastic =>
            {
                let (nrm, norm, xi_tr) = trial();
                let (dgamma, theta, theta_bar) = moduli(norm, output.state[n]);
                match self.flaw {
                    J2Flaw::PlasticSign | J2Flaw::TermMissing => {
                        let returned_bar =
                            if self.flaw == J2Flaw::TermMissing { S::zero() } else { -theta_bar };
                        write_j2(&p, theta, returned_bar, &nrm, slots, tangent);
                    }
                    J2Flaw::RankTwo => {
                        let c = mu * RANK_TWO_FACTOR;
                        for (j, &sj) in slots.iter().enumerate() {
                            for (i, &si) in slots.iter().enumerate() {
                                let one_i = if si < 3 { S::one() } else { S::zero() };
                                let one_j = if sj < 3 { S::one() } else { S::zero() };
                                tangent[i + n * j] += c * (nrm[si] * one_j + one_i * nrm[sj]);
                            }
                        }
                    }
                    _ => {
                        // The broken norm: its real part only (what sqrt(Re x) or Σ x·conj(x)
                        // leave to first order in the complex step).
                        let broken = S::cst(norm.re());
                        for (i, &si) in slots.iter().enumerate() {
                            let nb = xi_tr[si] / broken;
                            output.stress[i] += mu * 2.0 * dgamma * (nrm[si] - nb);
                        }
                    }
                }
            }
            J2Flaw::PlasticSign
            | J2Flaw::RankTwo
            | J2Flaw::TermMissing
            | J2Flaw::TwinRealSqrt
            | J2Flaw::TwinConjugate => {}
            J2Flaw::Reversal => {
                if plastic {
                    let (nrm, norm, _) = trial();
                    // n : n_last, shear entries counted twice (tensor components).
                    let mut dot = S::zero();
                    for (i, &si) in slots.iter().enumerate() {
                        let w = if is_shear_slot(si) { 2.0 } else { 1.0 };
                        dot += nrm[si] * input.state0[m + i] * w;
                    }
                    if dot.re() < 0.0 {
                        let (_, theta, theta_bar) = moduli(norm, output.state[n]);
                        write_j2(&p, theta, -theta_bar, &nrm, slots, tangent);
                    }
                    for (i, &si) in slots.iter().enumerate() {
                        output.state[m + i] = nrm[si];
                    }
                } else {
                    output.state[m..].copy_from_slice(&input.state0[m..]);
                }
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::tensor::lame;
    use crate::testing::{run, Point};

    /// The worked case of REFERENCES.md (J2 plasticity): E = 200 GPa, ν = 0.3, σy0 = 250 MPa,
    /// H_iso = 1000 MPa, H_kin = 500 MPa, one increment ε = diag(0.003, 0, 0) from the virgin
    /// state.
    const WORKED: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

    // The flaws leave the stress update alone: σ11 = 667.5774 MPa in the worked case
    // (derived from the closed form of Simo & Hughes 1998, Box 3.2; REFERENCES.md), the same
    // bits as J2, and the state of J2 in its first 2·ncomp + 1 entries.
    #[test]
    fn every_flaw_keeps_the_j2_stress_update() {
        let j2 = J2::new(PointKind::Solid3d).unwrap();
        let de = [0.003, 0.0, 0.0, 0.0, 0.0, 0.0];
        let reference = run(&j2, &Point::new(&WORKED, 6, 13).dstrain(&de)).unwrap();
        assert!((reference.stress[0] - 667.5774).abs() <= 5e-5);
        for flaw in J2Flaw::ALL {
            let m = FlawedJ2::new(flaw, PointKind::Solid3d).unwrap();
            let nstate = m.info().nstate;
            let out = run(&m, &Point::new(&WORKED, 6, nstate).dstrain(&de)).unwrap();
            assert_eq!(out.outcome.branch, 1, "{}", flaw.name());
            assert_eq!(out.stress, reference.stress, "{}", flaw.name());
            assert_eq!(out.state[..13], reference.state[..], "{}", flaw.name());
            assert!(out.tangent.iter().all(|x| x.is_finite()), "{}", flaw.name());
        }
    }

    #[test]
    fn kinds_and_sizes() {
        assert!(FlawedJ2::new(J2Flaw::ShearPermuted, PointKind::PlaneStrain).is_err());
        assert!(FlawedJ2::new(J2Flaw::OneColumn, PointKind::Axisymmetric).is_err());
        assert!(FlawedJ2::new(J2Flaw::Stale, PointKind::PlaneStress).is_err());
        let m = FlawedJ2::new(J2Flaw::Stale, PointKind::PlaneStrain).unwrap();
        assert_eq!((m.info().nstate, m.info().nprop), (11, 7));
        let m = FlawedJ2::new(J2Flaw::Reversal, PointKind::PlaneStrain).unwrap();
        assert_eq!(m.info().nstate, 13);
        let m = FlawedJ2::new(J2Flaw::Reversal, PointKind::Solid3d).unwrap();
        assert_eq!(m.info().nstate, 19);
        for flaw in J2Flaw::ALL {
            assert_eq!(J2Flaw::from_name(flaw.name()), Some(flaw));
        }
    }

    // j2-reversal: uniaxial strain ε11 = 0.003 from the virgin state of the worked case
    // (plastic, flow n along +dev e11), then ε11 back by 0.006 (reversed yielding). The first
    // increment returns J2's tangent and keeps its n; the second differs from J2's consistent
    // tangent by exactly +4μθ̄ n⊗n (the sign of the plastic correction flipped), which num-dual's
    // exact derivative confirms is the wrong one.
    #[test]
    fn reversal_flips_the_plastic_correction_only_after_a_reversal() {
        let j2 = J2::new(PointKind::Solid3d).unwrap();
        let m = FlawedJ2::new(J2Flaw::Reversal, PointKind::Solid3d).unwrap();
        let de = [0.003, 0.0, 0.0, 0.0, 0.0, 0.0];
        let first = run(&m, &Point::new(&WORKED, 6, 19).dstrain(&de)).unwrap();
        let reference = run(&j2, &Point::new(&WORKED, 6, 13).dstrain(&de)).unwrap();
        assert_eq!(first.tangent, reference.tangent);
        // n of a uniaxial strain: (2, −1, −1)/√6, no shear.
        let s6 = 6f64.sqrt();
        for (k, want) in [2.0 / s6, -1.0 / s6, -1.0 / s6, 0.0, 0.0, 0.0].into_iter().enumerate() {
            assert!((first.state[13 + k] - want).abs() < 1e-15, "{k}: {:?}", &first.state[13..]);
        }
        // Carried through an elastic increment.
        let small = [-1e-5, 0.0, 0.0, 0.0, 0.0, 0.0];
        let elastic =
            run(&m, &Point::new(&WORKED, 6, 19).strain(&de).state0(&first.state).dstrain(&small)).unwrap();
        assert_eq!(elastic.outcome.branch, 0);
        assert_eq!(elastic.state[13..], first.state[13..]);
        // Reversed yielding.
        let back = [-0.006, 0.0, 0.0, 0.0, 0.0, 0.0];
        let p =
            Point::new(&WORKED, 6, 19).strain(&de).stress0(&first.stress).state0(&first.state).dstrain(&back);
        let rev = run(&m, &p).unwrap();
        assert_eq!(rev.outcome.branch, 1);
        let pj = Point::new(&WORKED, 6, 13)
            .strain(&de)
            .stress0(&first.stress)
            .state0(&first.state[..13])
            .dstrain(&back);
        let consistent = run(&j2, &pj).unwrap();
        assert_eq!(rev.stress, consistent.stress);
        let (exact, _) = crate::testing::dual_tangent(&j2, &pj);
        let (_, mu) = lame(WORKED[0], WORKED[1]);
        let dgamma = (rev.state[6] - first.state[6]) / sqrt_2_3();
        // ξ_tr of the reversed step is along −n: n_rev = −n.
        let nrev: Vec<f64> = rev.state[13..].to_vec();
        assert!((nrev[0] + 2.0 / s6).abs() < 1e-15, "{nrev:?}");
        let norm_tr = {
            let beta = stress_to_tensor(&first.state[7..13], &SLOTS_6);
            trial_state(lame(WORKED[0], WORKED[1]).0, mu, &de, &back, &first.state[..6], &beta, &SLOTS_6).2
        };
        let theta = 1.0 - 2.0 * mu * dgamma / norm_tr;
        let theta_bar = 1.0 / (1.0 + (WORKED[3] + WORKED[6]) / (3.0 * mu)) - (1.0 - theta);
        let mut worst_flip = 0.0f64;
        let mut worst_exact = 0.0f64;
        for j in 0..6 {
            for i in 0..6 {
                let d = rev.tangent[i + 6 * j] - consistent.tangent[i + 6 * j];
                worst_flip = worst_flip.max((d - 4.0 * mu * theta_bar * nrev[i] * nrev[j]).abs());
                worst_exact = worst_exact.max((consistent.tangent[i + 6 * j] - exact[i + 6 * j]).abs());
            }
        }
        assert!(worst_flip < 1e-9 * mu, "{worst_flip}");
        assert!(worst_exact < 1e-9 * mu, "{worst_exact}");
        assert!(4.0 * mu * theta_bar / 6.0 > 1e3, "the flipped term is large: {theta_bar}");
    }

    // A failed J2 call stays failed, with every output NaN (also the extra state).
    #[test]
    fn failures_pass_through() {
        let m = FlawedJ2::new(J2Flaw::Stale, PointKind::Solid3d).unwrap();
        let mut props = WORKED;
        props[2] = -1.0;
        let out = run(&m, &Point::new(&props, 6, 15)).unwrap();
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains("sy0"));
        assert!(out.state.iter().chain(&out.tangent).all(|x| x.is_nan()));
    }
}
