//! A small routine for the tests of bisection, shrinking and cases: a uniaxial bar of
//! elastoplastic material with linear isotropic hardening (the one-dimensional return map of
//! Simo & Hughes 1998, Computational Inelasticity, §1.4.2, Box 1.4).
//!
//! Properties [E, σy, H]; state [εp, α]. Trial stress σ_tr = E (ε + Δε − εp), f = |σ_tr| −
//! (σy + H α); elastic (branch 0) when f ≤ 0, else (branch 1) Δγ = f/(E + H),
//! σ = σ_tr − E Δγ sign σ_tr, εp += Δγ sign σ_tr, α += Δγ. Consistent tangent E in branch 0,
//! E H/(E + H) in branch 1 (Box 1.4). [`Bar::elastic_when_plastic`] returns E in branch 1 too.

use crate::convention::{Convention, PointKind, ShearMeasure};
use crate::routine::{CallInput, CallOutput, Fault, Model, ModelRoutine, RoutineInfo};
use crate::scalar::Scalar;

/// Status 0, and zero ∂σ/∂T and energies: what the bars of these tests return beside their
/// stress, state and tangent.
fn no_extras<S: Scalar>(out: &mut CallOutput<'_, S>) {
    out.outcome.status = 0;
    out.dstress_dtemp[0] = S::zero();
    out.energy[0] = S::zero();
    out.energy[1] = S::zero();
}

#[derive(Clone, Debug)]
pub struct Bar {
    info: RoutineInfo,
    /// Return the elastic modulus in the plastic branch (a flaw).
    pub elastic_when_plastic: bool,
}

impl Bar {
    pub fn new(elastic_when_plastic: bool) -> ModelRoutine<Bar> {
        ModelRoutine(Bar {
            info: RoutineInfo {
                name: if elastic_when_plastic { "bar-elastic-when-plastic" } else { "bar" }.into(),
                convention: Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering),
                nstate: 2,
                nprop: 3,
            },
            elastic_when_plastic,
        })
    }
}

/// E, σy, H of the tests.
pub const PROPS: [f64; 3] = [200_000.0, 250.0, 10_000.0];

impl Model for Bar {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, sy, h) = (input.props[0], input.props[1], input.props[2]);
        let (ep, alpha) = (input.state0[0], input.state0[1]);
        let trial = e * (input.strain[0] + input.dstrain[0] - ep);
        let f = trial.abs() - (sy + h * alpha);
        no_extras(out);
        if f.re() <= 0.0 {
            out.stress[0] = trial;
            out.state[0] = ep;
            out.state[1] = alpha;
            out.tangent[0] = e;
            out.outcome.branch = 0;
        } else {
            let sign = if trial.re() >= 0.0 { 1.0 } else { -1.0 };
            let dgamma = f / (e + h);
            out.stress[0] = trial - e * dgamma * sign;
            out.state[0] = ep + dgamma * sign;
            out.state[1] = alpha + dgamma;
            out.tangent[0] = if self.elastic_when_plastic { e } else { e * h / (e + h) };
            out.outcome.branch = 1;
        }
        Ok(())
    }
}

/// A uniaxial bar of scalar damage with linear softening, for the tests of the initial-
/// stiffness trial: properties [E, κ0, κf]; state [κ], the largest |strain| reached. With
/// κ = max(κₙ, |ε|), d = κf (κ − κ0)/(κ (κf − κ0)) past κ0 (0 before, below 1 while κ < κf),
/// σ = (1 − d) E ε. Tangent (1 − d) E off damage growth; in growth (branch 1: |ε| above
/// both κₙ and κ0) (1 − d) E − E ε d′(κ) sign ε, d′(κ) = κf κ0/(κ² (κf − κ0)) (the uniaxial
/// case of Simo & Ju 1987, Int. J. Solids Struct. 23(7), from memory).
/// [`DamageBar::undamaged`] returns E everywhere (a flaw wherever the damage is above zero).
#[derive(Clone, Debug)]
pub struct DamageBar {
    info: RoutineInfo,
    /// Return the undamaged modulus E on every branch (a flaw).
    pub undamaged: bool,
}

impl DamageBar {
    pub fn new(undamaged: bool) -> ModelRoutine<DamageBar> {
        ModelRoutine(DamageBar {
            info: RoutineInfo {
                name: if undamaged { "damage-bar-undamaged" } else { "damage-bar" }.into(),
                convention: Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering),
                nstate: 1,
                nprop: 3,
            },
            undamaged,
        })
    }
}

/// E, κ0, κf of the damage bar's tests.
pub const DAMAGE_PROPS: [f64; 3] = [30_000.0, 6e-4, 5e-3];

impl Model for DamageBar {
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
        let sign = if eps.re() >= 0.0 { 1.0 } else { -1.0 };
        let abs = eps * sign;
        let grows = abs.re() > input.state0[0].re() && abs.re() > k0.re();
        let kappa = if grows { abs } else { input.state0[0] };
        let d = if kappa.re() > k0.re() { kf * (kappa - k0) / (kappa * (kf - k0)) } else { S::zero() };
        out.stress[0] = (S::one() - d) * e * eps;
        out.state[0] = kappa;
        out.tangent[0] = if self.undamaged {
            e
        } else if grows {
            let dd = kf * k0 / (kappa * kappa * (kf - k0));
            (S::one() - d) * e - e * eps * dd * sign
        } else {
            (S::one() - d) * e
        };
        no_extras(out);
        out.outcome.branch = i32::from(grows);
        Ok(())
    }
}

/// A uniaxial Kelvin–Voigt bar (a spring E beside a dashpot η), its rate by backward Euler:
/// σ = E (ε + Δε) + η Δε/Δt; properties [E, η], no state. Consistent tangent E + η/Δt.
/// [`ViscousBar::unit_time`] returns E + η, the tangent of Δt = 1 (a flaw that vanishes there:
/// a shrink moving Δt toward its default 1 must keep the failure of every scheme).
#[derive(Clone, Debug)]
pub struct ViscousBar {
    info: RoutineInfo,
    pub unit_time: bool,
}

impl ViscousBar {
    pub fn new(unit_time: bool) -> ModelRoutine<ViscousBar> {
        ModelRoutine(ViscousBar {
            info: RoutineInfo {
                name: if unit_time { "viscous-bar-unit-time" } else { "viscous-bar" }.into(),
                convention: Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering),
                nstate: 0,
                nprop: 2,
            },
            unit_time,
        })
    }
}

impl Model for ViscousBar {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        out: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, eta, dt) = (input.props[0], input.props[1], input.time[1]);
        no_extras(out);
        out.outcome.branch = 0;
        out.stress[0] = e * (input.strain[0] + input.dstrain[0]) + eta * input.dstrain[0] / dt;
        out.tangent[0] = if self.unit_time { e + eta } else { e + eta / dt };
        Ok(())
    }
}
