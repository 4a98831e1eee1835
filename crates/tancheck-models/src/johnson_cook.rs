//! Johnson–Cook plasticity as a point routine: small-strain J2 radial return (the machinery
//! of [`crate::j2`]) with the flow stress of Johnson & Cook (1983), Proc. 7th Int. Symp.
//! Ballistics, 541–547,
//!
//! σ_y(ε̄p, ε̇*, T) = [A + B ε̄pⁿ] [1 + C ln ε̇*] [1 − T*ᵐ],  T* = (T − T_r)/(T_m − T_r),
//!
//! and the damage-initiation indicator of Johnson & Cook (1985), Eng. Fract. Mech. 21(1):31–48,
//! D = Σ Δε̄p / ε_f with ε_f = [D1 + D2 exp(D3 σ*)] [1 + D4 ln ε̇*] [1 + D5 T*], σ* = σ_m/σ_eq.
//!
//! Properties (18), see DEVELOPERS.md ("Reference models"):
//! `[E, ν, A, B, n, C, m, T_r, T_m, rate0, density, heat_capacity, taylor_quinney,
//!   D1, D2, D3, D4, D5]`.
//! State `[εp (ncomp, engineering shear), ε̄p, D, ΔT_heat]`, ncomp + 3 entries.
//! Kinds: solid-3d (11, 22, 33, 23, 13, 12), plane strain / axisymmetric (11, 22, 33, 12).
//!
//! The update, in total form (`stress0` is not read):
//! - Temperature T = `temp[0] + temp[1] + ΔT_heat_n` (the end of the increment plus the
//!   adiabatic heating accumulated up to the start of the increment).
//! - Trial state as in J2 without back stress; elastic (branch 0) when
//!   ‖ξ_tr‖ ≤ √(2/3) σ_y(ε̄p_n, 1, T); otherwise (branch 1) Newton on
//!   g(Δγ) = ‖ξ_tr‖ − 2μΔγ − √(2/3) σ_y(ε̄p_n + Δε̄p, ε̇*, T), Δε̄p = √(2/3)Δγ,
//!   ε̇* = Δε̄p / (Δt · rate0): the rate is the plastic strain increment over the time increment
//!   of the call, so the update (and its tangent) depends on the time increment.
//!
//! Guards, each a documented choice:
//! - **Zero rate.** ln ε̇* → −∞ as ε̇* → 0. The rate factor uses max(ε̇*, 1) (common practice:
//!   no rate effect below the reference rate; its derivative is zero there). The same floor is
//!   used in the D4 term of ε_f. With Δt ≤ 0 no time passes: when C > 0 the step is elastic
//!   (the trial state), the limit Δt → 0⁺ in which the rate factor of any plastic step grows
//!   without bound; with C = 0 the rate does not matter and the step is the usual one.
//! - **Zero plastic strain.** d(Bε̄pⁿ)/dε̄p = nBε̄pⁿ⁻¹ is unbounded at ε̄p = 0 for n < 1. The
//!   flow stress itself is finite there, so the yield test at the start state is exact; the
//!   return mapping is a Newton iteration safeguarded by bisection in the bracket
//!   (0, f_tr/(2μ)] (the perfectly plastic step bounds the root), started at its upper end,
//!   so the slope is only ever evaluated at ε̄p > 0 and the kink of the rate floor cannot
//!   make it cycle. The
//!   returned tangent is the exact derivative at ε̄p_{n+1} > 0 (very stiff for a barely
//!   plastic first step from ε̄p = 0, as the law says).
//! - **Temperature.** T* ≤ 0 (at or below T_r) gives the thermal factor 1 with zero slope
//!   (common practice); T* ≥ 1 (at or above melting) fails the call (status 2) with a
//!   message. For m < 1 the slope m T*ᵐ⁻¹ is unbounded as T* → 0⁺, as the law says.
//! - **Adiabatic heating.** With taylor_quinney χ > 0 the step heats the point by
//!   ΔT = χ σ_y(ε̄p_{n+1}, ε̇*, T_s) Δε̄p / (density · heat_capacity) (χ ≈ 0.9 is common
//!   practice), the plastic work taken at the start temperature T_s so that ΔT is explicit in
//!   Δε̄p, and the end stress lies on the yield surface at the end temperature T_s + ΔT: the
//!   return mapping and the tangent include the heating of the step (a zero increment after it
//!   returns the same stress). ΔT is added to ΔT_heat. χ = 0 switches heating off. A step whose
//!   softening leaves no root in the bracket fails (status 2) with a message.
//! - **Damage.** D has no effect on the stress in this point form, and no point is deleted;
//!   the indicator reaching 1 marks damage initiation only (the block form of the model is
//!   where deletion belongs). σ* is taken from the stress at the end of the increment and
//!   ε_f is floored at [`MIN_FRACTURE_STRAIN`].
//!
//! The consistent tangent is the J2 one, C = κ 1⊗1 + 2μθ(I − ⅓1⊗1) − 2μθ̄ n⊗n, with
//! θ̄ = 1/(1 + K'/(3μ)) − (1 − θ) and K' = dσ_y/dε̄p along the step:
//! K' = ∂σ_y/∂ε̄p + ∂σ_y/∂ε̇* / (Δt · rate0) + ∂σ_y/∂T · dΔT/dε̄p (the rate term, zero on the
//! rate floor, and the heating of the step).
//! [`JcTangent::NoRateTerm`] leaves the rate terms out of K' (the stress update is unchanged):
//! a routine flawed on purpose. ∂σ/∂ΔT = −2μ n dΔγ/dT, dΔγ/dT = −√(2/3) (dσ_y/dT_s)/(2μ + ⅔K')
//! (`provides` DSTRESS_DTEMP); no energies are provided.

use tancheck_core::routine::provides;
use tancheck_core::{CallInput, CallOutput, PointKind, RoutineInfo, Scalar};

use crate::call::{between, fail, point_model, positive, succeed};
use crate::j2::{
    elastic_end, plastic_correction, radial_return, radial_start, return_tangent, solid_layout, trial_state,
};
use crate::tensor::{lame, sqrt_2_3, write_tangent};
use crate::ModelError;

/// Lower bound of the fracture strain ε_f in the damage indicator (a guard against
/// D1 + D2 exp(D3 σ*) ≤ 0 at high triaxiality for negative D1).
pub const MIN_FRACTURE_STRAIN: f64 = 1e-6;

/// Which tangent the Johnson–Cook model returns.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum JcTangent {
    /// The consistent tangent, rate term included.
    #[default]
    Consistent,
    /// The tangent without the rate term ∂σ_y/∂ε̇* / (Δt rate0): wrong after yield whenever
    /// the plastic rate is above the reference rate.
    NoRateTerm,
}

/// Johnson–Cook plasticity with damage-initiation indicator.
#[derive(Clone, Debug)]
pub struct JohnsonCook {
    info: RoutineInfo,
    tangent: JcTangent,
    slots: &'static [usize],
}

/// The constants of the Johnson–Cook laws (flow stress and fracture strain).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct JcLaw<S> {
    pub a: S,
    pub b: S,
    pub n: S,
    pub c: S,
    pub m: S,
    pub t_room: S,
    pub t_melt: S,
    pub d: [S; 5],
}

/// Flow stress and its partial derivatives at one point of the law.
#[derive(Clone, Copy, Debug)]
pub struct Flow<S> {
    /// σ_y.
    pub stress: S,
    /// ∂σ_y/∂ε̄p (only meaningful for ε̄p > 0 when n < 1).
    pub d_strain: S,
    /// ∂σ_y/∂ε̇* (zero on the floor ε̇* ≤ 1).
    pub d_rate: S,
    /// ∂σ_y/∂T (zero for T* ≤ 0).
    pub d_temp: S,
}

impl<S: Scalar> JcLaw<S> {
    /// The law's constants from the model's properties (their order in [`JohnsonCook::PROP_NAMES`]);
    /// the model reads them so, and the tests take them so from the published sets.
    pub fn from_props(p: &[S]) -> JcLaw<S> {
        JcLaw {
            a: p[2],
            b: p[3],
            n: p[4],
            c: p[5],
            m: p[6],
            t_room: p[7],
            t_melt: p[8],
            d: [p[13], p[14], p[15], p[16], p[17]],
        }
    }

    /// Homologous temperature T* = (T − T_r)/(T_m − T_r), unclipped.
    #[inline]
    pub fn homologous(&self, temp: S) -> S {
        (temp - self.t_room) / (self.t_melt - self.t_room)
    }

    /// The flow stress [A + Bε̄pⁿ][1 + C ln max(ε̇*, 1)][1 − T*ᵐ] (T* ≤ 0 → factor 1) and its
    /// slopes; `None` when T* ≥ 1 (melted). The strain slope is computed only for ε̄p > 0
    /// (zero otherwise: the caller never uses it there).
    #[inline]
    pub fn flow(&self, eps_p: S, rate_star: S, temp: S) -> Option<Flow<S>> {
        let (hard, d_hard) = if eps_p.re() > 0.0 {
            // εⁿ = exp(n ln ε) keeps a derivative part that n itself may carry.
            let p = (eps_p.ln() * self.n).exp();
            (self.a + self.b * p, self.b * self.n * p / eps_p)
        } else {
            (self.a, S::zero())
        };
        let (rate, d_rate) = if rate_star.re() > 1.0 {
            (S::one() + self.c * rate_star.ln(), self.c / rate_star)
        } else {
            (S::one(), S::zero())
        };
        let ts = self.homologous(temp);
        if ts.re() >= 1.0 {
            return None;
        }
        let (therm, d_therm) = if ts.re() > 0.0 {
            let tm = (ts.ln() * self.m).exp();
            (S::one() - tm, -self.m * tm / ts / (self.t_melt - self.t_room))
        } else {
            (S::one(), S::zero())
        };
        Some(Flow {
            stress: hard * rate * therm,
            d_strain: d_hard * rate * therm,
            d_rate: hard * d_rate * therm,
            d_temp: hard * rate * d_therm,
        })
    }

    /// Fracture strain [D1 + D2 exp(D3 σ*)][1 + D4 ln max(ε̇*, 1)][1 + D5 T*] with T* clipped
    /// to [0, 1), floored at [`MIN_FRACTURE_STRAIN`].
    #[inline]
    pub fn fracture_strain(&self, triaxiality: S, rate_star: S, temp: S) -> S {
        let [d1, d2, d3, d4, d5] = self.d;
        let mut ef = d1 + d2 * (d3 * triaxiality).exp();
        if rate_star.re() > 1.0 {
            ef *= S::one() + d4 * rate_star.ln();
        }
        let ts = self.homologous(temp);
        if ts.re() > 0.0 {
            ef *= S::one() + d5 * ts;
        }
        ef.max(S::cst(MIN_FRACTURE_STRAIN))
    }
}

impl JohnsonCook {
    /// Name of the model with the consistent tangent.
    pub const NAME: &'static str = "johnson-cook";
    /// Name of the model whose tangent leaves out the rate term.
    pub const NO_RATE_TERM_NAME: &'static str = "johnson-cook-no-rate-term";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 18] = [
        "E",
        "nu",
        "A",
        "B",
        "n",
        "C",
        "m",
        "T_room",
        "T_melt",
        "rate0",
        "density",
        "heat_capacity",
        "taylor_quinney",
        "D1",
        "D2",
        "D3",
        "D4",
        "D5",
    ];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 3] = [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric];

    /// The model with the consistent tangent.
    pub fn new(kind: PointKind) -> Result<JohnsonCook, ModelError> {
        JohnsonCook::with_tangent(kind, JcTangent::Consistent)
    }

    /// The model with the chosen tangent, default order, engineering shear.
    pub fn with_tangent(kind: PointKind, tangent: JcTangent) -> Result<JohnsonCook, ModelError> {
        let name = match tangent {
            JcTangent::Consistent => Self::NAME,
            JcTangent::NoRateTerm => Self::NO_RATE_TERM_NAME,
        };
        let (slots, info) = solid_layout(name, kind, |ncomp| ncomp + 3, Self::PROP_NAMES.len())?;
        Ok(JohnsonCook { info, tangent, slots })
    }

    /// The tangent this model returns.
    pub fn tangent_kind(&self) -> JcTangent {
        self.tangent
    }
}

/// Constants of one call.
struct Props<S> {
    lambda: S,
    mu: S,
    law: JcLaw<S>,
    rate0: S,
    heat: S,
}

fn read_props<S: Scalar>(p: &[S]) -> Result<Props<S>, &'static str> {
    if !positive(p[0].re()) {
        return Err("johnson-cook: E (properties[0]) must be positive");
    }
    if !between(p[1].re(), -1.0, 0.5) {
        return Err("johnson-cook: nu (properties[1]) must lie in (-1, 0.5)");
    }
    if !positive(p[2].re()) {
        return Err("johnson-cook: A (properties[2]) must be positive");
    }
    if !(p[3].re() >= 0.0 && positive(p[4].re()) && p[4].re() <= 1.0) {
        return Err("johnson-cook: B (properties[3]) must be >= 0 and n (properties[4]) in (0, 1]");
    }
    if !(p[5].re() >= 0.0 && p[5].re().is_finite() && positive(p[6].re()) && p[6].re().is_finite()) {
        return Err("johnson-cook: C (properties[5]) must be >= 0 and m (properties[6]) positive");
    }
    if !(p[7].re().is_finite() && p[8].re().is_finite() && p[8].re() > p[7].re()) {
        return Err("johnson-cook: T_melt (properties[8]) must exceed T_room (properties[7])");
    }
    if !positive(p[9].re()) || !p[9].re().is_finite() {
        return Err("johnson-cook: rate0 (properties[9]) must be positive");
    }
    let chi = p[12];
    if !(0.0..=1.0).contains(&chi.re()) {
        return Err("johnson-cook: taylor_quinney (properties[12]) must lie in [0, 1]");
    }
    let heat = if chi.re() > 0.0 {
        let rho_c = p[10] * p[11];
        if !(positive(p[10].re()) && positive(p[11].re()) && rho_c.re().is_finite()) {
            return Err("johnson-cook: density, heat_capacity (properties[10..12]) must be > 0 when taylor_quinney > 0");
        }
        chi / rho_c
    } else {
        S::zero()
    };
    if !p[13..18].iter().all(|d| d.re().is_finite()) {
        return Err("johnson-cook: D1..D5 (properties[13..18]) must be finite");
    }
    let (lambda, mu) = lame(p[0], p[1]);
    Ok(Props { lambda, mu, law: JcLaw::from_props(p), rate0: p[9], heat })
}

point_model!(JohnsonCook, DSTRESS_DTEMP);

impl JohnsonCook {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let slots = self.slots;
        let Some((p, eps_p_n)) = radial_start(read_props(input.props), slots, input, output) else {
            return;
        };
        let (n, r23) = (slots.len(), sqrt_2_3());
        let (ebar_n, damage_n, heat_n) = (input.state0[n], input.state0[n + 1], input.state0[n + 2]);
        if ebar_n.re() < 0.0 || !ebar_n.re().is_finite() {
            fail(output, "johnson-cook: the equivalent plastic strain of the start state is negative");
            return;
        }
        let temp = input.temp[0] + input.temp[1] + heat_n;
        let Some(static_flow) = p.law.flow(ebar_n, S::one(), temp) else {
            fail(output, "johnson-cook: the temperature is at or above T_melt");
            return;
        };

        let (sigma_tr, xi, norm) =
            trial_state(p.lambda, p.mu, input.strain, input.dstrain, eps_p_n, &[S::zero(); 6], slots);
        let f_tr = norm - static_flow.stress * r23;
        let two_mu = p.mu * 2.0;
        let kappa = p.lambda + p.mu * (2.0 / 3.0);
        output.energy.fill(S::zero());

        // No plastic flow in no time when the flow stress depends on the rate (see the guards).
        let dt = input.time[1];
        let no_time = dt <= 0.0 && p.law.c.re() > 0.0;
        if f_tr.re() <= 0.0 || no_time {
            elastic_end(&sigma_tr, p.lambda, p.mu, slots, input, output);
            output.dstress_dtemp.fill(S::zero());
            succeed(output, 0, provides::DSTRESS_DTEMP);
            return;
        }

        // ε̇* = Δε̄p / (Δt rate0) = rate_per_alpha · Δε̄p (Δt > 0 here, or C = 0).
        let rate_per_alpha = if dt > 0.0 { S::one() / (p.rate0 * dt) } else { S::zero() };
        let law = p.law;
        let heat = p.heat;
        let radius = |dgamma: S| match heated_step(&law, heat, ebar_n, dgamma * r23, rate_per_alpha, temp) {
            Some(st) => (st.stress * r23, st.slope * (2.0 / 3.0)),
            None => (S::cst(f64::NAN), S::cst(f64::NAN)),
        };
        // The perfectly plastic step f_tr/(2μ) bounds the root from above when σ_y does not
        // fall with Δγ (B ≥ 0, rate factor ≥ 1, no heating); with heating the bracket is
        // checked and the step fails otherwise.
        let Some(dgamma) = radial_return(norm, two_mu, two_mu, Some(f_tr / two_mu), radius) else {
            fail(output, "johnson-cook: the return mapping did not converge in 200 iterations");
            return;
        };
        let ebar = ebar_n + dgamma * r23;
        let rate_star = rate_per_alpha * dgamma * r23;
        let step = match heated_step(&law, heat, ebar_n, dgamma * r23, rate_per_alpha, temp) {
            Some(st) if dgamma.re() > 0.0 && st.stress.re().is_finite() && st.slope.re().is_finite() => st,
            _ => {
                fail(output, "johnson-cook: the return mapping found no positive plastic step");
                return;
            }
        };
        let g_end = norm - two_mu * dgamma - step.stress * r23;
        if g_end.re().abs() > 1e-8 * norm.re() {
            fail(output, "johnson-cook: thermal softening in this increment leaves no plastic step on the yield surface");
            return;
        }

        let nrm = plastic_correction(&sigma_tr, &xi, norm, two_mu, dgamma, eps_p_n, slots, output);
        output.state[n] = ebar;

        // Damage indicator from the end stress: σ* = σ_m / σ_eq, σ_eq = σ_y on the surface.
        let mut mean = S::zero();
        for (i, &slot) in slots.iter().enumerate() {
            if slot < 3 {
                mean += output.stress[i];
            }
        }
        let triax = mean / 3.0 / step.stress;
        let ef = law.fracture_strain(triax, rate_star, temp + step.heat);
        output.state[n + 1] = damage_n + dgamma * r23 / ef;
        output.state[n + 2] = heat_n + step.heat;

        // Tangent: K' = dσ_y/dε̄p along the step (strain, rate through ε̇* = Δε̄p/(Δt rate0),
        // and the heating of the step).
        let slope_full = step.slope;
        let slope = match self.tangent {
            JcTangent::Consistent => slope_full,
            JcTangent::NoRateTerm => step.slope - step.rate_slope,
        };
        let theta = S::one() - two_mu * dgamma / norm;
        let theta_bar = S::one() / (slope / (p.mu * 3.0) + 1.0) - (S::one() - theta);
        let c = return_tangent(kappa, two_mu, theta, theta_bar, &nrm);
        write_tangent(&c, slots, output.tangent);

        // ∂σ/∂ΔT through Δγ(T).
        let ddgamma_dt = -step.d_temp0 * r23 / (two_mu + slope_full * (2.0 / 3.0));
        for (i, &slot) in slots.iter().enumerate() {
            output.dstress_dtemp[i] = -two_mu * nrm[slot] * ddgamma_dt;
        }
        succeed(output, 1, provides::DSTRESS_DTEMP);
    }
}

/// The flow stress at the end of a plastic step Δε̄p from ε̄p_n, heated within the step.
struct HeatedStep<S> {
    /// σ_y(ε̄p_n + Δε̄p, ε̇*, T_s + ΔT).
    stress: S,
    /// dσ_y/dΔε̄p along the step, all terms.
    slope: S,
    /// The part of `slope` that comes from the rate.
    rate_slope: S,
    /// dσ_y/dT_s.
    d_temp0: S,
    /// ΔT = χ σ_y(T_s) Δε̄p / (ρ c), the heating of the step.
    heat: S,
}

/// σ_y at the end of a step with the heating of the step: ΔT = h σ_y(ε̄p, ε̇*, T_s) Δε̄p
/// (h = χ/(ρc); the plastic work rate taken at the start temperature, so that ΔT is explicit)
/// and σ_y(ε̄p, ε̇*, T_s + ΔT), with its derivatives by the chain rule. `None` when either
/// temperature is at or above T_m.
#[inline]
fn heated_step<S: Scalar>(
    law: &JcLaw<S>,
    h: S,
    ebar_n: S,
    dalpha: S,
    rate_per_alpha: S,
    t_start: S,
) -> Option<HeatedStep<S>> {
    let ebar = ebar_n + dalpha;
    let rate = rate_per_alpha * dalpha;
    let fs = law.flow(ebar, rate, t_start)?;
    if h.re() == 0.0 {
        let rate_slope = fs.d_rate * rate_per_alpha;
        return Some(HeatedStep {
            stress: fs.stress,
            slope: fs.d_strain + rate_slope,
            rate_slope,
            d_temp0: fs.d_temp,
            heat: S::zero(),
        });
    }
    let heat = h * fs.stress * dalpha;
    let fe = law.flow(ebar, rate, t_start + heat)?;
    // dΔT/dΔε̄p = h [(∂σ_y/∂ε̄p + ∂σ_y/∂ε̇* ε̇*') Δε̄p + σ_y] at T_s.
    let d_heat = h * ((fs.d_strain + fs.d_rate * rate_per_alpha) * dalpha + fs.stress);
    let rate_slope = fe.d_rate * rate_per_alpha + fe.d_temp * h * fs.d_rate * rate_per_alpha * dalpha;
    Some(HeatedStep {
        stress: fe.stress,
        slope: fe.d_strain + fe.d_rate * rate_per_alpha + fe.d_temp * d_heat,
        rate_slope,
        d_temp0: fe.d_temp * (S::one() + h * fs.d_temp * dalpha),
        heat,
    })
}
