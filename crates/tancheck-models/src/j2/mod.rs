//! Small-strain J2 plasticity by radial return (Simo & Taylor 1985, CMAME 48:101–118;
//! Simo & Hughes 1998, Computational Inelasticity, Box 3.2), with linear-plus-Voce isotropic
//! and linear kinematic hardening.
//!
//! Properties `[E, ν, σy0, H_iso, Q, b, H_kin]`: yield stress
//! K(α) = σy0 + H_iso α + Q (1 − exp(−b α)), kinematic modulus H_kin.
//! State `[εp (ncomp, engineering shear), α, β (ncomp, back stress)]`, 2·ncomp + 1 entries.
//! Kinds: solid-3d (11, 22, 33, 23, 13, 12) and plane strain / axisymmetric (11, 22, 33, 12).
//!
//! The update is in total form and ignores `stress0`: σ_tr = C:(ε + Δε − εp_n),
//! ξ_tr = dev σ_tr − β_n, f_tr = ‖ξ_tr‖ − √(2/3) K(α_n). Elastic when f_tr ≤ 0 (branch 0);
//! otherwise (branch 1) Newton on
//! g(Δγ) = ‖ξ_tr‖ − (2μ + ⅔H_kin)Δγ − √(2/3) K(α_n + √(2/3)Δγ) from Δγ = 0 (stopping rule
//! at [`STEP_TOLERANCE`]), then
//! σ = σ_tr − 2μΔγ n, β = β_n + ⅔H_kin Δγ n, α = α_n + √(2/3)Δγ, εp = εp_n + Δγ n with
//! n = ξ_tr/‖ξ_tr‖; the step fails (status 2) when softening takes K(α_{n+1}) to zero or
//! below. The consistent tangent is
//! C = κ 1⊗1 + 2μθ(I − ⅓1⊗1) − 2μθ̄ n⊗n, θ = 1 − 2μΔγ/‖ξ_tr‖,
//! θ̄ = 1/(1 + (K'(α_{n+1}) + H_kin)/(3μ)) − (1 − θ).
//!
//! [`J2Tangent::Continuum`] keeps the stress update and returns the continuum elastoplastic
//! tangent instead (θ = 1, θ̄ = 1/(1 + (K' + H_kin)/(3μ))): a routine flawed on purpose.

use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{between, fail, point_model, positive, props_or_fail, succeed};
use crate::tensor::{
    deviator, is_shear_slot, isotropic_matrix, lame, norm_sq, sqrt_2_3, strain_to_tensor, stress_to_tensor,
    trace, write_tangent, SLOTS_4, SLOTS_6,
};
use crate::ModelError;

/// Newton iterations allowed before the extra one.
pub const MAX_ITERATIONS: usize = 50;
/// Newton stops after the iteration whose step |δ| ≤ STEP_TOLERANCE · ‖ξ_tr‖/(2μ) (real
/// parts), and then makes one more iteration so that dual and complex parts converge too.
///
/// ‖ξ_tr‖/(2μ) is the scale of Δγ (Δγ < ‖ξ_tr‖/(2μ + ⅔H_kin) whenever K > 0). A tolerance
/// relative to Δγ itself would lie below rounding for a barely plastic step: g(Δγ) is a
/// difference of terms of size ‖ξ_tr‖, so its rounding is a few ulps of ‖ξ_tr‖ and the step
/// cannot fall below about 1e-16 ‖ξ_tr‖/(2μ) however small Δγ is.
pub const STEP_TOLERANCE: f64 = 1e-14;

/// Which tangent the J2 model returns.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum J2Tangent {
    /// The consistent (algorithmic) tangent: the derivative of the stress update.
    #[default]
    Consistent,
    /// The continuum elastoplastic tangent: wrong for the discrete update after yield.
    Continuum,
}

/// J2 plasticity with isotropic (linear + Voce) and linear kinematic hardening.
#[derive(Clone, Debug)]
pub struct J2 {
    info: RoutineInfo,
    tangent: J2Tangent,
    slots: &'static [usize],
}

/// The canonical slots and the info of a J2-type model for `kind` (the kinds with a 33
/// component: solid-3d, plane strain, axisymmetric; default order, engineering shear), with
/// `nstate(ncomp)` state variables; or the error naming the model.
pub(crate) fn solid_layout(
    model: &'static str,
    kind: PointKind,
    nstate: impl Fn(usize) -> usize,
    nprop: usize,
) -> Result<(&'static [usize], RoutineInfo), ModelError> {
    let slots: &'static [usize] = match kind {
        PointKind::Solid3d => &SLOTS_6,
        PointKind::PlaneStrain | PointKind::Axisymmetric => &SLOTS_4,
        _ => {
            let supported = "solid-3d, plane-strain, axisymmetric";
            return Err(ModelError::UnsupportedKind { model, kind, supported });
        }
    };
    let info = RoutineInfo {
        name: model.to_string(),
        convention: Convention::new(kind, ShearMeasure::Engineering),
        nstate: nstate(slots.len()),
        nprop,
    };
    Ok((slots, info))
}

impl J2 {
    /// Name of the model with the consistent tangent.
    pub const NAME: &'static str = "j2";
    /// Name of the model with the continuum tangent.
    pub const CONTINUUM_NAME: &'static str = "j2-continuum";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 7] = ["E", "nu", "sy0", "H_iso", "Q", "b", "H_kin"];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 3] = [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric];

    /// The model with the consistent tangent.
    pub fn new(kind: PointKind) -> Result<J2, ModelError> {
        J2::with_tangent(kind, J2Tangent::Consistent)
    }

    /// The model returning the continuum tangent (named `j2-continuum`).
    pub fn continuum(kind: PointKind) -> Result<J2, ModelError> {
        J2::with_tangent(kind, J2Tangent::Continuum)
    }

    /// The model with the chosen tangent, in the default order with engineering shear.
    pub fn with_tangent(kind: PointKind, tangent: J2Tangent) -> Result<J2, ModelError> {
        let name = match tangent {
            J2Tangent::Consistent => Self::NAME,
            J2Tangent::Continuum => Self::CONTINUUM_NAME,
        };
        let (slots, info) = solid_layout(name, kind, |ncomp| 2 * ncomp + 1, 7)?;
        Ok(J2 { info, tangent, slots })
    }

    /// The tangent this model returns.
    pub fn tangent_kind(&self) -> J2Tangent {
        self.tangent
    }
}

/// Material constants of one call.
pub(crate) struct Props<S> {
    pub(crate) lambda: S,
    pub(crate) mu: S,
    sy0: S,
    h_iso: S,
    q: S,
    b: S,
    pub(crate) h_kin: S,
}

impl<S: Scalar> Props<S> {
    /// Yield stress K(α) = σy0 + H_iso α + Q (1 − exp(−b α)).
    #[inline]
    pub(crate) fn yield_stress(&self, alpha: S) -> S {
        self.sy0 + self.h_iso * alpha + self.q * (S::one() - (-self.b * alpha).exp())
    }
    /// K'(α) = H_iso + Q b exp(−b α).
    #[inline]
    pub(crate) fn hardening_slope(&self, alpha: S) -> S {
        self.h_iso + self.q * self.b * (-self.b * alpha).exp()
    }
}

/// Read and check the properties; the message says which one is wrong.
pub(crate) fn read_props<S: Scalar>(p: &[S]) -> Result<Props<S>, &'static str> {
    let (e, nu, sy0, h_iso, q, b, h_kin) = (p[0], p[1], p[2], p[3], p[4], p[5], p[6]);
    if !positive(e.re()) {
        return Err("j2: E (properties[0]) must be positive");
    }
    if !between(nu.re(), -1.0, 0.5) {
        return Err("j2: nu (properties[1]) must lie in (-1, 0.5)");
    }
    if !positive(sy0.re()) {
        return Err("j2: sy0 (properties[2]) must be positive");
    }
    if !(b.re() >= 0.0 && h_iso.re().is_finite() && q.re().is_finite() && h_kin.re().is_finite()) {
        return Err("j2: b (properties[5]) must be >= 0 and H_iso, Q, H_kin finite");
    }
    let (lambda, mu) = lame(e, nu);
    // g(Δγ) decreases strictly when 2μ + ⅔(K' + H_kin) > 0 for every α; K' runs between
    // H_iso + Q b (α = 0) and H_iso (α → ∞).
    let slope_min = h_iso.re() + (q.re() * b.re()).min(0.0);
    if !positive(3.0 * mu.re() + slope_min + h_kin.re()) {
        return Err("j2: softening too strong: 3 mu + H_kin + K' must stay positive");
    }
    Ok(Props { lambda, mu, sy0, h_iso, q, b, h_kin })
}

point_model!(J2, ENERGY);

impl J2 {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let slots = self.slots;
        let Some((p, eps_p_n)) = radial_start(read_props(input.props), slots, input, output) else {
            return;
        };
        let (n, r23) = (slots.len(), sqrt_2_3());
        let alpha_n = input.state0[n];
        let beta_n_v = &input.state0[n + 1..];

        let k_n = p.yield_stress(alpha_n);
        if !positive(k_n.re()) {
            fail(output, "j2: the yield stress K(alpha) of the start state is not positive");
            return;
        }

        let beta_n = stress_to_tensor(beta_n_v, slots);
        let (sigma_tr, xi, norm) =
            trial_state(p.lambda, p.mu, input.strain, input.dstrain, eps_p_n, &beta_n, slots);
        let f_tr = norm - k_n * r23;

        let kappa = p.lambda + p.mu * (2.0 / 3.0);
        let two_mu = p.mu * 2.0;

        if f_tr.re() <= 0.0 {
            elastic_end(&sigma_tr, p.lambda, p.mu, slots, input, output);
            finish(output, &p, input);
            succeed(output, 0, tancheck_core::routine::provides::ENERGY);
            return;
        }

        // Return mapping: Newton on g(Δγ) from Δγ = 0.
        let c_lin = two_mu + p.h_kin * (2.0 / 3.0);
        let radius = |dgamma: S| {
            let alpha = alpha_n + dgamma * r23;
            (p.yield_stress(alpha) * r23, p.hardening_slope(alpha) * (2.0 / 3.0))
        };
        let Some(dgamma) = radial_return(norm, c_lin, two_mu, None, radius) else {
            fail(output, "j2: the return mapping did not converge in 50 Newton iterations");
            return;
        };

        let alpha = alpha_n + dgamma * r23;
        // With softening (K' < 0) a large step can take K(α_{n+1}) to zero or below: then
        // ξ_{n+1} = √(2/3) K(α_{n+1}) n would point against n, and the root of g is no return.
        if !positive(p.yield_stress(alpha).re()) {
            fail(output, "j2: softening takes the yield stress K(alpha) to zero in this increment");
            return;
        }
        let nrm = plastic_correction(&sigma_tr, &xi, norm, two_mu, dgamma, eps_p_n, slots, output);
        for (i, &slot) in slots.iter().enumerate() {
            output.state[n + 1 + i] = beta_n_v[i] + p.h_kin * (2.0 / 3.0) * dgamma * nrm[slot];
        }
        output.state[n] = alpha;

        let hardening = p.hardening_slope(alpha) + p.h_kin;
        let (theta, theta_bar) = match self.tangent {
            J2Tangent::Consistent => consistent_moduli(p.mu, hardening, dgamma, norm),
            J2Tangent::Continuum => (S::one(), continuum_ratio(p.mu, hardening)),
        };
        let c = return_tangent(kappa, two_mu, theta, theta_bar, &nrm);
        write_tangent(&c, slots, output.tangent);
        finish(output, &p, input);
        succeed(output, 1, tancheck_core::routine::provides::ENERGY);
    }
}

/// Trial state of a radial return: σ_tr = λ tr(εe) 1 + 2μ εe with εe = ε + Δε − εp_n
/// (routine vectors, engineering shear), ξ_tr = dev σ_tr − β_n and ‖ξ_tr‖, all canonical.
#[inline]
pub(crate) fn trial_state<S: Scalar>(
    lambda: S,
    mu: S,
    strain: &[S],
    dstrain: &[S],
    eps_p_n: &[S],
    beta_n: &[S; 6],
    slots: &[usize],
) -> ([S; 6], [S; 6], S) {
    let n = slots.len();
    let mut v = [S::zero(); 6];
    for i in 0..n {
        v[i] = strain[i] + dstrain[i] - eps_p_n[i];
    }
    let ee = strain_to_tensor(&v[..n], slots);
    let tr = trace(&ee);
    let mut sigma_tr = [S::zero(); 6];
    for (k, s) in sigma_tr.iter_mut().enumerate() {
        *s = ee[k] * (mu * 2.0);
        if k < 3 {
            *s += lambda * tr;
        }
    }
    let dev = deviator(&sigma_tr);
    let mut xi = [S::zero(); 6];
    for k in 0..6 {
        xi[k] = dev[k] - beta_n[k];
    }
    (sigma_tr, xi, norm_sq(&xi).sqrt_or_zero())
}

/// What a radial return (J2 and Johnson–Cook) starts from: the model's properties, read from
/// the call (`None` when they are refused: the call has then failed with the reason), and the
/// plastic strain of the start state (the state's first entries, one per routine slot).
pub(crate) fn radial_start<'a, S: Scalar, P>(
    props: Result<P, &'static str>,
    slots: &[usize],
    input: &'a CallInput<'_, S>,
    output: &mut CallOutput<'_, S>,
) -> Option<(P, &'a [S])> {
    let p = props_or_fail(output, props)?;
    Some((p, &input.state0[..slots.len()]))
}

/// The elastic ending of a radial return (J2 and Johnson–Cook): σ = σ_tr on the routine's
/// slots, the start state kept, the isotropic elastic tangent.
pub(crate) fn elastic_end<S: Scalar>(
    sigma_tr: &[S; 6],
    lambda: S,
    mu: S,
    slots: &[usize],
    input: &CallInput<'_, S>,
    output: &mut CallOutput<'_, S>,
) {
    for (i, &slot) in slots.iter().enumerate() {
        output.stress[i] = sigma_tr[slot];
    }
    output.state.copy_from_slice(input.state0);
    write_tangent(&isotropic_matrix(lambda, mu), slots, output.tangent);
}

/// The plastic correction of a radial return (J2 and Johnson–Cook): the flow direction
/// n = ξ_tr/‖ξ_tr‖, then σ = σ_tr − 2μ Δγ n and εp = εp_n + Δγ n on the routine's slots
/// (the first entries of the state); returns n.
#[allow(clippy::too_many_arguments)]
pub(crate) fn plastic_correction<S: Scalar>(
    sigma_tr: &[S; 6],
    xi: &[S; 6],
    norm: S,
    two_mu: S,
    dgamma: S,
    eps_p_n: &[S],
    slots: &[usize],
    output: &mut CallOutput<'_, S>,
) -> [S; 6] {
    let mut nrm = [S::zero(); 6];
    for k in 0..6 {
        nrm[k] = xi[k] / norm;
    }
    for (i, &slot) in slots.iter().enumerate() {
        output.stress[i] = sigma_tr[slot] - two_mu * dgamma * nrm[slot];
        // Engineering shear: the plastic shear strain γp = 2 εp.
        let deps = if is_shear_slot(slot) { dgamma * nrm[slot] * 2.0 } else { dgamma * nrm[slot] };
        output.state[i] = eps_p_n[i] + deps;
    }
    nrm
}

/// Newton on the radial-return condition g(Δγ) = ‖ξ_tr‖ − c_lin Δγ − R(Δγ) = 0, where
/// `radius(Δγ)` gives (R, dR/dΔγ), R the radius √(2/3)·(flow stress) of the yield surface at
/// the end of the step. `None` when it does not converge in [`MAX_ITERATIONS`] (four times
/// that with a bracket).
///
/// Without `bracket` it is plain Newton from Δγ = 0 (the J2 model): it stops after the
/// iteration whose step |δ| ≤ [`STEP_TOLERANCE`] · ‖ξ_tr‖/(2μ) (real parts) and then makes one
/// more Newton iteration so that dual and complex parts converge too. With `bracket = Some(hi)`
/// the root is known to lie in (0, hi] (g(0) > 0 ≥ g(hi), for flow stresses that do not fall
/// with Δγ): Newton starts from `hi`, keeps the bracket up to date from the sign of g, and a
/// step that leaves the bracket is replaced by bisection. Δγ = 0 itself is never evaluated,
/// which matters for flow stresses whose slope is unbounded there, and kinks of the flow stress
/// (a rate floor) cannot make it cycle. It stops when a Newton step is below
/// [`STEP_TOLERANCE`] relative to Δγ or the bracket has closed to rounding; the last iteration
/// then corrects only the dual/complex part by a Newton step (the real part stays in the
/// bracket).
#[inline]
pub(crate) fn radial_return<S: Scalar>(
    norm: S,
    c_lin: S,
    two_mu: S,
    bracket: Option<S>,
    radius: impl Fn(S) -> (S, S),
) -> Option<S> {
    let (mut lo, mut hi) = (0.0, bracket.map_or(f64::INFINITY, |h| h.re()));
    let mut dgamma = bracket.unwrap_or(S::zero());
    let mut extra = false;
    let mut iterations = 0;
    let step_tol = STEP_TOLERANCE * norm.re() / two_mu.re();
    let limit = if bracket.is_some() { 4 * MAX_ITERATIONS } else { MAX_ITERATIONS };
    while iterations < limit || extra {
        let (r, dr) = radius(dgamma);
        let g = norm - c_lin * dgamma - r;
        let dg = -c_lin - dr;
        let mut step = -g / dg;
        iterations += 1;
        if extra {
            // Bracketed: the real part stays where the bracket put it; the Newton step
            // corrects the dual/complex part only (g ≈ 0 there: the implicit derivative).
            return Some(if bracket.is_some() { dgamma + step - S::cst(step.re()) } else { dgamma + step });
        }
        let mut newton = true;
        if bracket.is_some() {
            if g.re() > 0.0 {
                lo = dgamma.re();
            } else {
                hi = dgamma.re();
            }
            let next = dgamma.re() + step.re();
            if !(next > lo && next < hi && step.re().is_finite()) {
                // Bisection: a step to the midpoint of the bracket.
                step = S::cst(0.5 * (lo + hi)) - dgamma;
                newton = false;
            }
        }
        dgamma += step;
        extra = match bracket {
            None => step.re().abs() <= step_tol,
            // Relative to Δγ, which can lie far below ‖ξ_tr‖/(2μ) when the slope of the flow
            // stress is unbounded at Δγ = 0; or the bracket has closed to rounding.
            Some(_) => {
                (newton && step.re().abs() <= STEP_TOLERANCE * dgamma.re().abs()) || hi - lo <= 4e-16 * hi
            }
        };
    }
    None
}

/// θ̄ of the continuum elastoplastic tangent (θ = 1): 1/(1 + (K' + H_kin)/(3μ)), with
/// `hardening` = K'(α_{n+1}) + H_kin (Simo & Hughes 1998, ch. 3).
#[inline]
pub(crate) fn continuum_ratio<S: Scalar>(mu: S, hardening: S) -> S {
    S::one() / (hardening / (mu * 3.0) + 1.0)
}

/// θ = 1 − 2μΔγ/‖ξ_tr‖ and θ̄ = 1/(1 + (K' + H_kin)/(3μ)) − (1 − θ) of the consistent tangent
/// (Simo & Taylor 1985; Simo & Hughes 1998, Box 3.2), `hardening` = K'(α_{n+1}) + H_kin.
#[inline]
pub(crate) fn consistent_moduli<S: Scalar>(mu: S, hardening: S, dgamma: S, norm: S) -> (S, S) {
    let theta = S::one() - mu * 2.0 * dgamma / norm;
    (theta, continuum_ratio(mu, hardening) - (S::one() - theta))
}

/// The tangent of a radial return in canonical order (engineering shear strain):
/// C = κ 1⊗1 + 2μθ(I − ⅓1⊗1) − 2μθ̄ n⊗n.
#[inline]
pub(crate) fn return_tangent<S: Scalar>(
    kappa: S,
    two_mu: S,
    theta: S,
    theta_bar: S,
    nrm: &[S; 6],
) -> [[S; 6]; 6] {
    let mut c = [[S::zero(); 6]; 6];
    let shear_mod = two_mu * theta;
    for (a, row) in c.iter_mut().enumerate() {
        for (b, x) in row.iter_mut().enumerate() {
            let mut v = -two_mu * theta_bar * nrm[a] * nrm[b];
            if a < 3 && b < 3 {
                v += kappa - shear_mod / 3.0;
            }
            if a == b {
                // Symmetric identity: 1 on the normal diagonal, ½ on the shear diagonal.
                v += if a < 3 { shear_mod } else { shear_mod * 0.5 };
            }
            *x = v;
        }
    }
    c
}

/// No temperature dependence; the energies at the end of the increment, from the end state.
///
/// The backward-Euler radial return of associative J2 plasticity is the stationarity condition
/// of an incremental potential (the variational structure of the return mapping, e.g. Ortiz &
/// Stainier 1999, CMAME 171:419–444; from memory), with the stored energy
/// Ψ = ½ σ:εₑ + ½H_iso α² + Q(α − (1 − e^{−bα})/b) + (3/(4H_kin)) β:β and the dissipation
/// D = σy0 α (the dissipation rate of associative J2 flow is σy0 α̇). So ΔΨ + ΔD equals the
/// work ∫σ:dε along each increment, and D never decreases.
fn finish<S: Scalar>(output: &mut CallOutput<'_, S>, p: &Props<S>, input: &CallInput<'_, S>) {
    output.dstress_dtemp.fill(S::zero());
    let n = output.stress.len();
    let (state, stress) = (&*output.state, &*output.stress);
    let mut psi = S::zero();
    for i in 0..n {
        // Engineering shear in ε and εp: σ·(ε − εp) is the tensor contraction σ:εₑ.
        psi += stress[i] * (input.strain[i] + input.dstrain[i] - state[i]) * 0.5;
    }
    let alpha = state[n];
    psi += p.h_iso * alpha * alpha * 0.5;
    if p.b.re() > 0.0 {
        psi += p.q * (alpha - (S::one() - (-p.b * alpha).exp()) / p.b);
    }
    if p.h_kin.re() > 0.0 {
        let mut bb = S::zero();
        for i in 0..n {
            // β holds tensor components: shear ones count twice in β:β.
            let w = if i < 3 { 1.0 } else { 2.0 };
            bb += state[n + 1 + i] * state[n + 1 + i] * w;
        }
        psi += bb * 0.75 / p.h_kin;
    }
    output.energy[0] = psi;
    output.energy[1] = p.sy0 * alpha;
}

#[cfg(test)]
mod tests;
