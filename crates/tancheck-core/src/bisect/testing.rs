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
        out.outcome.status = 0;
        out.dstress_dtemp[0] = S::zero();
        out.energy[0] = S::zero();
        out.energy[1] = S::zero();
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
