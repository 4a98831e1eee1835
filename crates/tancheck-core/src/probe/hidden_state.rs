//! The hidden-state probe: calls A, B, A — A the increment, B a different one (the reversed
//! increment, doubled) from the same start — must give the same answers for A. A routine that
//! keeps saved (static) variables between calls fails.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct HiddenState;

impl Probe for HiddenState {
    fn name(&self) -> &'static str {
        "hidden-state"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut first = None;
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) || first.is_some() {
                return Ok(());
            }
            let a = (d.base.stress.clone(), d.base.state.clone(), d.base.tangent.clone());
            let full = d.dstrain().to_vec();
            let dtemp = d.dtemp();
            let b: Vec<f64> = full.iter().map(|x| -2.0 * x).collect();
            d.set_increment_keep_count(&b, -dtemp);
            d.base_call(c)?;
            d.set_increment_keep_count(&full, dtemp);
            d.base_call(c)?;
            let same = |x: &[f64], y: &[f64]| x.iter().zip(y).all(|(p, q)| p.to_bits() == q.to_bits());
            if !(same(&a.0, &d.base.stress) && same(&a.1, &d.base.state) && same(&a.2, &d.base.tangent)) {
                first = Some(k);
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("hidden-state", k, &f));
        }
        Ok(match first {
            None => ProbeResult::new(
                "hidden-state",
                ProbeStatus::Pass,
                "calls A, B, A give the same answers for A",
            ),
            Some(k) => {
                let mut r = ProbeResult::new(
                    "hidden-state",
                    ProbeStatus::Fail,
                    format!("A, B, A gave a different second A at increment {k}: the routine keeps state between calls (a saved or static variable?)"),
                );
                r.increment = Some(k);
                r
            }
        })
    }
}
