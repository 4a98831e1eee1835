//! The input-immutability probe: the routine does not write to what it only reads (strain,
//! strain increment, start stress, start state, properties). Inputs are copied before each
//! call and compared bit for bit after it.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct Immutability;

impl Probe for Immutability {
    fn name(&self) -> &'static str {
        "immutability"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let mut first: Option<(usize, String)> = None;
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) || first.is_some() {
                return Ok(());
            }
            let before = (
                d.start().strain.clone(),
                d.dstrain().to_vec(),
                d.start().stress.clone(),
                d.start().state.clone(),
                d.props().to_vec(),
            );
            d.base_call(c)?;
            let same = |x: &[f64], y: &[f64]| x.iter().zip(y).position(|(p, q)| p.to_bits() != q.to_bits());
            for (what, b, a) in [
                ("strain", &before.0, &d.start().strain),
                ("dstrain", &before.1, &d.dstrain().to_vec()),
                ("stress0", &before.2, &d.start().stress),
                ("state0", &before.3, &d.start().state),
                ("props", &before.4, &d.props().to_vec()),
            ] {
                if let Some(i) = same(b, a) {
                    first = Some((k, format!("{what}[{i}] changed from {} to {}", b[i], a[i])));
                    break;
                }
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("immutability", k, &f));
        }
        Ok(match first {
            None => ProbeResult::new("immutability", ProbeStatus::Pass, "no input was written to"),
            Some((k, what)) => {
                let mut r = ProbeResult::new(
                    "immutability",
                    ProbeStatus::Fail,
                    format!("the routine writes to a read-only input at increment {k}: {what}"),
                );
                r.increment = Some(k);
                r
            }
        })
    }
}
