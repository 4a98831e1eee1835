//! The irreversibility probe: state variables declared as damage (`"damage": [indices]` in the
//! suite, 0-based) never decrease along the path — not when loading, not when unloading or
//! reloading. A damage variable that falls means the material heals on unloading, which a
//! damage model must not do (its dissipation would turn negative). Tolerance: a fall larger
//! than `tol` (default 1e-12, absolute; damage is dimensionless) fails.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::error::CoreError;
use crate::routine::Caller;

pub struct Irreversibility;

const DEFAULT_TOL: f64 = 1e-12;

impl Probe for Irreversibility {
    fn name(&self) -> &'static str {
        "irreversibility"
    }
    fn needs(&self) -> Needs {
        Needs::DAMAGE_INDICES
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let name = self.name();
        let Some(indices) = env.spec.damage.as_ref().filter(|v| !v.is_empty()) else {
            // run_probes skips before this (Needs::DAMAGE_INDICES); a direct call gets the
            // same reason.
            let why = super::unmet(self.needs(), caller.capabilities(), caller.info(), env);
            return Ok(ProbeResult::skipped(name, why.unwrap_or_default()));
        };
        let nstate = caller.info().nstate;
        if let Some(&bad) = indices.iter().find(|&&i| i >= nstate) {
            return Err(CoreError::DamageIndex { index: bad, nstate });
        }
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let mut first: Option<(usize, usize, f64, f64)> = None; // (increment, index, before, after)
        let mut falls = 0usize;
        let mut grew = false;
        let walked = walk(caller, env, |k, d, _| {
            if !env.spec.runs_at(k) {
                return Ok(());
            }
            for &i in indices {
                let (before, after) = (d.start().state[i], d.base.state[i]);
                if after > before {
                    grew = true;
                }
                let fall = before - after;
                if fall > tol || fall.is_nan() {
                    falls += 1;
                    if first.is_none() {
                        first = Some((k, i, before, after));
                    }
                }
            }
            Ok(())
        });
        if let Err((k, f)) = walked {
            return Ok(faulted(name, k, &f));
        }
        let mut r = match first {
            None => ProbeResult::new(
                name,
                ProbeStatus::Pass,
                if grew {
                    "damage never decreases along the path (it grows and is kept on unloading)"
                } else {
                    "damage never decreases along the path (it does not grow on this path: a weak test)"
                },
            ),
            Some((k, i, b, a)) => {
                let mut r = ProbeResult::new(
                    name,
                    ProbeStatus::Fail,
                    format!(
                        "damage state[{i}] falls from {b:.6e} to {a:.6e} at increment {k} (it heals; \
                         {falls} fall(s) in all)"
                    ),
                );
                r.increment = Some(k);
                r.value = Some(b - a);
                r
            }
        };
        r.tol = Some(tol);
        Ok(r)
    }
}
