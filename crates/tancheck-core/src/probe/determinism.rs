//! The determinism probe: the same call twice gives bit-identical stress, state and tangent.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct Determinism;

impl Probe for Determinism {
    fn name(&self) -> &'static str {
        "determinism"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut first_diff = None;
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) || first_diff.is_some() {
                return Ok(());
            }
            let a = (d.base.stress.clone(), d.base.state.clone(), d.base.tangent.clone());
            d.base_call(c)?;
            let same = |x: &[f64], y: &[f64]| x.iter().zip(y).all(|(p, q)| p.to_bits() == q.to_bits());
            if !(same(&a.0, &d.base.stress) && same(&a.1, &d.base.state) && same(&a.2, &d.base.tangent)) {
                first_diff = Some(k);
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("determinism", k, &f));
        }
        Ok(match first_diff {
            None => ProbeResult::new(
                "determinism",
                ProbeStatus::Pass,
                "the same call twice gives bit-identical results",
            ),
            Some(k) => {
                let mut r = ProbeResult::new(
                    "determinism",
                    ProbeStatus::Fail,
                    format!("the same call twice gives different results at increment {k} (saved variables, uninitialised memory?)"),
                );
                r.increment = Some(k);
                r
            }
        })
    }
}
