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

use tancheck_core::{
    CallInput, CallOutput, Convention, Fault, Model, PointKind, RoutineInfo, Scalar, ShearMeasure,
};

use crate::call::{between, check_sizes, fail, positive, succeed};
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
        let slots: &'static [usize] = match kind {
            PointKind::Solid3d => &SLOTS_6,
            PointKind::PlaneStrain | PointKind::Axisymmetric => &SLOTS_4,
            _ => {
                return Err(ModelError::UnsupportedKind {
                    model: name,
                    kind,
                    supported: "solid-3d, plane-strain, axisymmetric",
                })
            }
        };
        let ncomp = slots.len();
        Ok(J2 {
            info: RoutineInfo {
                name: name.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: 2 * ncomp + 1,
                nprop: 7,
            },
            tangent,
            slots,
        })
    }

    /// The tangent this model returns.
    pub fn tangent_kind(&self) -> J2Tangent {
        self.tangent
    }
}

/// Material constants of one call.
struct Props<S> {
    lambda: S,
    mu: S,
    sy0: S,
    h_iso: S,
    q: S,
    b: S,
    h_kin: S,
}

impl<S: Scalar> Props<S> {
    /// Yield stress K(α) = σy0 + H_iso α + Q (1 − exp(−b α)).
    #[inline]
    fn yield_stress(&self, alpha: S) -> S {
        self.sy0 + self.h_iso * alpha + self.q * (S::one() - (-self.b * alpha).exp())
    }
    /// K'(α) = H_iso + Q b exp(−b α).
    #[inline]
    fn hardening_slope(&self, alpha: S) -> S {
        self.h_iso + self.q * self.b * (-self.b * alpha).exp()
    }
}

/// Read and check the properties; the message says which one is wrong.
fn read_props<S: Scalar>(p: &[S]) -> Result<Props<S>, &'static str> {
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

impl Model for J2 {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        check_sizes(&self.info, input, output)?;
        let p = match read_props(input.props) {
            Ok(p) => p,
            Err(message) => {
                fail(output, message);
                return Ok(());
            }
        };
        let slots = self.slots;
        let n = slots.len();
        let r23 = sqrt_2_3();
        let eps_p_n = &input.state0[..n];
        let alpha_n = input.state0[n];
        let beta_n_v = &input.state0[n + 1..];

        let k_n = p.yield_stress(alpha_n);
        if !positive(k_n.re()) {
            fail(output, "j2: the yield stress K(alpha) of the start state is not positive");
            return Ok(());
        }

        let beta_n = stress_to_tensor(beta_n_v, slots);
        let (sigma_tr, xi, norm) =
            trial_state(p.lambda, p.mu, input.strain, input.dstrain, eps_p_n, &beta_n, slots);
        let f_tr = norm - k_n * r23;

        let kappa = p.lambda + p.mu * (2.0 / 3.0);
        let two_mu = p.mu * 2.0;

        if f_tr.re() <= 0.0 {
            for (i, &slot) in slots.iter().enumerate() {
                output.stress[i] = sigma_tr[slot];
            }
            output.state.copy_from_slice(input.state0);
            let c = isotropic_matrix(p.lambda, p.mu);
            write_tangent(&c, slots, output.tangent);
            finish(output, &p, input);
            succeed(output, 0, tancheck_core::routine::provides::ENERGY);
            return Ok(());
        }

        // Return mapping: Newton on g(Δγ) from Δγ = 0.
        let c_lin = two_mu + p.h_kin * (2.0 / 3.0);
        let radius = |dgamma: S| {
            let alpha = alpha_n + dgamma * r23;
            (p.yield_stress(alpha) * r23, p.hardening_slope(alpha) * (2.0 / 3.0))
        };
        let Some(dgamma) = radial_return(norm, c_lin, two_mu, None, radius) else {
            fail(output, "j2: the return mapping did not converge in 50 Newton iterations");
            return Ok(());
        };

        let mut nrm = [S::zero(); 6];
        for k in 0..6 {
            nrm[k] = xi[k] / norm;
        }
        let alpha = alpha_n + dgamma * r23;
        // With softening (K' < 0) a large step can take K(α_{n+1}) to zero or below: then
        // ξ_{n+1} = √(2/3) K(α_{n+1}) n would point against n, and the root of g is no return.
        if !positive(p.yield_stress(alpha).re()) {
            fail(output, "j2: softening takes the yield stress K(alpha) to zero in this increment");
            return Ok(());
        }
        for (i, &slot) in slots.iter().enumerate() {
            output.stress[i] = sigma_tr[slot] - two_mu * dgamma * nrm[slot];
            // Engineering shear: the plastic shear strain γp = 2 εp.
            let deps = if is_shear_slot(slot) { dgamma * nrm[slot] * 2.0 } else { dgamma * nrm[slot] };
            output.state[i] = eps_p_n[i] + deps;
            output.state[n + 1 + i] = beta_n_v[i] + p.h_kin * (2.0 / 3.0) * dgamma * nrm[slot];
        }
        output.state[n] = alpha;

        let slope = p.hardening_slope(alpha);
        let base = S::one() / ((slope + p.h_kin) / (p.mu * 3.0) + 1.0);
        let (theta, theta_bar) = match self.tangent {
            J2Tangent::Consistent => {
                let theta = S::one() - two_mu * dgamma / norm;
                (theta, base - (S::one() - theta))
            }
            J2Tangent::Continuum => (S::one(), base),
        };
        let c = return_tangent(kappa, two_mu, theta, theta_bar, &nrm);
        write_tangent(&c, slots, output.tangent);
        finish(output, &p, input);
        succeed(output, 1, tancheck_core::routine::provides::ENERGY);
        Ok(())
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
mod tests {
    use super::*;
    use crate::testing::{run, Out, Point};
    use tancheck_core::routine::status;

    /// The worked case of REFERENCES.md: E = 200 GPa, ν = 0.3, σy0 = 250 MPa, H_iso = 1000 MPa,
    /// no Voce term, H_kin = 500 MPa.
    const WORKED: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

    fn at(t: &[f64], n: usize, i: usize, j: usize) -> f64 {
        t[i + j * n]
    }

    /// |x − printed| within half a unit of the printed value's last digit.
    fn assert_printed(x: f64, printed: f64, half_unit: f64, what: &str) {
        assert!((x - printed).abs() <= half_unit, "{what} = {x:.10}, printed {printed}");
    }

    // Worked case, one increment ε = diag(0.003, 0, 0) from the virgin state. Values derived
    // from the closed form of Simo & Taylor (1985), CMAME 48:101–118 / Simo & Hughes (1998)
    // Box 3.2 (REFERENCES.md, "J2 plasticity"): σ11 = 667.5774, σ22 = σ33 = 416.2113 MPa,
    // Δγ = 1.115432e-3, θ = 0.5446266, θ̄ = 0.5381686, C1111 = 167329.028,
    // C2211 = C3311 = 166335.486, C1212 = μθ = 41894.353 MPa.
    #[test]
    fn worked_case_matches_the_published_closed_form() {
        let m = J2::new(PointKind::Solid3d).unwrap();
        let p = Point::new(&WORKED, 6, 13).dstrain(&[0.003, 0.0, 0.0, 0.0, 0.0, 0.0]);
        let out = run(&m, &p).unwrap();
        assert_eq!(out.outcome.status, status::OK);
        assert_eq!(out.outcome.branch, 1);
        assert_printed(out.stress[0], 667.5774, 5e-5, "σ11");
        assert_printed(out.stress[1], 416.2113, 5e-5, "σ22");
        assert_printed(out.stress[2], 416.2113, 5e-5, "σ33");
        for s in &out.stress[3..] {
            assert_eq!(*s, 0.0);
        }
        // α = √(2/3) Δγ (Simo & Hughes Box 3.2 update of the equivalent plastic strain).
        let dgamma = out.state[6] / sqrt_2_3();
        assert_printed(dgamma, 1.115432e-3, 5e-10, "Δγ");
        let t = &out.tangent;
        assert_printed(at(t, 6, 0, 0), 167329.028, 5e-4, "C1111");
        assert_printed(at(t, 6, 1, 0), 166335.486, 5e-4, "C2211");
        assert_printed(at(t, 6, 2, 0), 166335.486, 5e-4, "C3311");
        for k in 3..6 {
            assert_printed(at(t, 6, k, k), 41894.353, 5e-4, "shear diagonal");
        }
        // θ from C1212 = μθ and θ̄ from C1111 = κ + (4/3)μθ − 2μθ̄ n11², n11² = 2/3
        // (the same closed form).
        let (lambda, mu) = lame(WORKED[0], WORKED[1]);
        let kappa = lambda + 2.0 * mu / 3.0;
        let theta = at(t, 6, 5, 5) / mu;
        assert_printed(theta, 0.5446266, 5e-8, "θ");
        let theta_bar = (kappa + 4.0 / 3.0 * mu * theta - at(t, 6, 0, 0)) / (4.0 / 3.0 * mu);
        assert_printed(theta_bar, 0.5381686, 5e-8, "θ̄");
        // Flow direction n = diag(2, −1, −1)/√6: εp = Δγ n, β = ⅔ H_kin Δγ n.
        let n11 = 2.0 / 6f64.sqrt();
        assert!((out.state[0] - dgamma * n11).abs() < 1e-15);
        assert!((out.state[1] + dgamma * n11 / 2.0).abs() < 1e-15);
        assert!((out.state[7] - 2.0 / 3.0 * 500.0 * dgamma * n11).abs() < 1e-12);
        // The symmetric tangent is stored symmetric.
        for i in 0..6 {
            for j in 0..6 {
                assert!((at(t, 6, i, j) - at(t, 6, j, i)).abs() <= 1e-9 * at(t, 6, 0, 0));
            }
        }
    }

    // The 4-component kinds carry the 11, 22, 33, 12 rows and columns of the 3D update.
    #[test]
    fn four_components_are_the_3d_update_without_23_and_13() {
        let de6 = [0.002, -0.0007, 0.0004, 0.0, 0.0, 0.0016];
        let de4 = [0.002, -0.0007, 0.0004, 0.0016];
        let out6 =
            run(&J2::new(PointKind::Solid3d).unwrap(), &Point::new(&WORKED, 6, 13).dstrain(&de6)).unwrap();
        for kind in [PointKind::PlaneStrain, PointKind::Axisymmetric] {
            let out4 = run(&J2::new(kind).unwrap(), &Point::new(&WORKED, 4, 9).dstrain(&de4)).unwrap();
            assert_eq!(out4.outcome.branch, 1);
            let map = [0, 1, 2, 5];
            for (i, &a) in map.iter().enumerate() {
                assert!((out4.stress[i] - out6.stress[a]).abs() < 1e-10);
                for (j, &b) in map.iter().enumerate() {
                    assert!((at(&out4.tangent, 4, i, j) - at(&out6.tangent, 6, a, b)).abs() < 1e-8);
                }
            }
        }
    }

    /// One increment in uniaxial stress: the lateral strain increments Δε22, Δε33 are solved
    /// for σ22 = σ33 = 0 by Newton with the model's own tangent (shears stay zero).
    fn uniaxial_stress_step(m: &J2, strain: &[f64; 6], state: &[f64], d11: f64) -> ([f64; 6], Out<f64>) {
        let nu = WORKED[1];
        let mut de = [d11, -nu * d11, -nu * d11, 0.0, 0.0, 0.0];
        for _ in 0..40 {
            let p = Point::new(&WORKED, 6, 13).strain(strain).dstrain(&de).state0(state);
            let out = run(m, &p).unwrap();
            let (r2, r3) = (out.stress[1], out.stress[2]);
            let t = &out.tangent;
            let (a, b, c, d) = (at(t, 6, 1, 1), at(t, 6, 1, 2), at(t, 6, 2, 1), at(t, 6, 2, 2));
            let det = a * d - b * c;
            let x2 = (d * r2 - b * r3) / det;
            let x3 = (a * r3 - c * r2) / det;
            de[1] -= x2;
            de[2] -= x3;
            if r2.abs().max(r3.abs()) <= 1e-12 * out.stress[0].abs() {
                return (de, out);
            }
        }
        panic!("the uniaxial-stress Newton did not converge");
    }

    // Uniaxial elastoplastic modulus E_t = E h/(E + h), h = H_iso + H_kin: 1488.834 MPa for
    // the worked case (REFERENCES.md, derived from the J2 closed form of Simo & Hughes 1998).
    // Both the slope of the computed σ11–ε11 path and the tangent condensed to uniaxial
    // stress, C11 − C1L C_LL⁻¹ C_L1 (L = 22, 33), must give it.
    #[test]
    fn uniaxial_stress_tangent_is_the_elastoplastic_modulus() {
        let (e, h) = (WORKED[0], WORKED[3] + WORKED[6]);
        let e_t = e * h / (e + h);
        assert_printed(e_t, 1488.834, 5e-4, "E h/(E+h)");
        let m = J2::new(PointKind::Solid3d).unwrap();
        let mut strain = [0.0; 6];
        let mut state = vec![0.0; 13];
        let mut last: Option<(f64, f64)> = None;
        let mut plastic_steps = 0;
        // The first step (1e-3) stays elastic (yield strain 1.25e-3); the second crosses yield.
        for d11 in [1e-3, 1e-3, 5e-4, 5e-4, 2e-3, 1e-4] {
            let (de, out) = uniaxial_stress_step(&m, &strain, &state, d11);
            for k in 0..6 {
                strain[k] += de[k];
            }
            state.copy_from_slice(&out.state);
            let s11 = out.stress[0];
            if out.outcome.branch == 1 {
                plastic_steps += 1;
                let t = &out.tangent;
                let (a, b, c, d) = (at(t, 6, 1, 1), at(t, 6, 1, 2), at(t, 6, 2, 1), at(t, 6, 2, 2));
                let det = a * d - b * c;
                let (c12, c13, c21, c31) = (at(t, 6, 0, 1), at(t, 6, 0, 2), at(t, 6, 1, 0), at(t, 6, 2, 0));
                let condensed =
                    at(t, 6, 0, 0) - (c12 * (d * c21 - b * c31) + c13 * (a * c31 - c * c21)) / det;
                assert!((condensed - e_t).abs() <= 1e-8 * e_t, "condensed tangent {condensed} vs {e_t}");
                if let Some((e_prev, s_prev)) = last {
                    let slope = (s11 - s_prev) / (strain[0] - e_prev);
                    assert!((slope - e_t).abs() <= 1e-8 * e_t, "path slope {slope} vs {e_t}");
                }
                last = Some((strain[0], s11));
            } else {
                assert!((s11 - e * strain[0]).abs() < 1e-9, "elastic uniaxial stress is E ε");
            }
        }
        assert_eq!(plastic_steps, 5);
    }

    #[test]
    fn bad_properties_and_kinds_are_refused() {
        let m = J2::new(PointKind::Solid3d).unwrap();
        let mut props = WORKED;
        props[2] = 0.0;
        let out = run(&m, &Point::new(&props, 6, 13)).unwrap();
        assert_eq!(out.outcome.status, status::FAILED);
        assert!(out.outcome.message_text().contains("sy0"));
        assert!(out.tangent.iter().all(|x| x.is_nan()));
        let mut props = WORKED;
        props[3] = -300_000.0;
        let out = run(&m, &Point::new(&props, 6, 13)).unwrap();
        assert!(out.outcome.message_text().contains("softening"), "{}", out.outcome.message_text());
        assert!(J2::new(PointKind::PlaneStress).is_err());
        assert!(J2::continuum(PointKind::Uniaxial).is_err());
        assert!(matches!(run(&m, &Point::new(&WORKED, 6, 9)), Err(Fault::Unsupported(_))));
    }

    // Elastic unloading from a plastic state keeps the state and returns the elastic matrix.
    #[test]
    fn elastic_steps_keep_the_state() {
        let m = J2::new(PointKind::Solid3d).unwrap();
        let first = run(&m, &Point::new(&WORKED, 6, 13).dstrain(&[0.003, 0.0, 0.0, 0.0, 0.0, 0.0])).unwrap();
        let p = Point::new(&WORKED, 6, 13)
            .strain(&[0.003, 0.0, 0.0, 0.0, 0.0, 0.0])
            .dstrain(&[-0.0005, 0.0, 0.0, 0.0, 0.0, 0.0])
            .state0(&first.state);
        let out = run(&m, &p).unwrap();
        assert_eq!(out.outcome.branch, 0);
        assert_eq!(out.state, first.state);
        let (lambda, mu) = lame(WORKED[0], WORKED[1]);
        assert!((out.stress[0] - (first.stress[0] - (lambda + 2.0 * mu) * 0.0005)).abs() < 1e-9);
        assert!((out.tangent[0] - (lambda + 2.0 * mu)).abs() < 1e-9);
        assert!(out.tangent.iter().chain(&out.state).chain(&out.dstress_dtemp).all(|x| x.is_finite()));
    }
}
