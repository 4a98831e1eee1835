//! The hidden-state probe: calls A, B, A — A the increment, B a different one (the reversed
//! increment, doubled) from the same start — must give the same answers for A. A routine that
//! keeps saved (static) variables between calls fails.
//!
//! B is the probe's own call, off the path: a routine may refuse it with a status (a return
//! past a cone's apex, a strain its law does not take). That is no fault of the routine; B is
//! then tried smaller (the reversed increment, then half the increment), and an increment none
//! of whose B calls the routine takes is not probed (said in the details; skipped when no
//! increment was). A crash or a memory guard's finding in B stays a fault.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct HiddenState;

/// The increments B tried, as multiples of the increment A, in order.
const B_FACTORS: [f64; 3] = [-2.0, -1.0, 0.5];

impl Probe for HiddenState {
    fn name(&self) -> &'static str {
        "hidden-state"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut first = None;
        let (mut probed, mut refused) = (0usize, Vec::new());
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) || first.is_some() {
                return Ok(());
            }
            let a = (d.base.stress.clone(), d.base.state.clone(), d.base.tangent.clone());
            let full = d.dstrain().to_vec();
            let dtemp = d.dtemp();
            // B: the reversed increment doubled, else smaller ones the routine may take.
            let mut took = false;
            for f in B_FACTORS {
                let b: Vec<f64> = full.iter().map(|x| f * x).collect();
                d.set_increment_keep_count(&b, f * dtemp);
                match d.base_call(c) {
                    Ok(()) => {
                        took = true;
                        break;
                    }
                    Err(crate::routine::Fault::Status { .. }) => continue,
                    Err(other) => return Err(other),
                }
            }
            d.set_increment_keep_count(&full, dtemp);
            d.base_call(c)?;
            if !took {
                refused.push(k);
                return Ok(());
            }
            probed += 1;
            let same = |x: &[f64], y: &[f64]| x.iter().zip(y).all(|(p, q)| p.to_bits() == q.to_bits());
            if !(same(&a.0, &d.base.stress) && same(&a.1, &d.base.state) && same(&a.2, &d.base.tangent)) {
                first = Some(k);
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("hidden-state", k, &f));
        }
        let refused_note = (!refused.is_empty()).then(|| {
            format!(
                "not probed at increment{} {:?}: the routine refused every other increment B from its start with a status (the reversed increment doubled, the reversed increment, half the increment)",
                if refused.len() == 1 { "" } else { "s" },
                refused
            )
        });
        Ok(match first {
            None if probed == 0 && refused_note.is_some() => {
                let mut r = ProbeResult::new(
                    "hidden-state",
                    ProbeStatus::Skipped,
                    "no increment could be probed: the routine refused every other increment B with a status",
                );
                r.details.extend(refused_note);
                r
            }
            None => {
                let mut r = ProbeResult::new(
                    "hidden-state",
                    ProbeStatus::Pass,
                    "calls A, B, A give the same answers for A",
                );
                r.details.extend(refused_note);
                r
            }
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
