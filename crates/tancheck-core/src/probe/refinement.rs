//! The increment-refinement probe: each increment split into 2, 4, … sub-increments from the
//! same start. The end stress must change by shrinking amounts as the subdivision grows (an
//! integration scheme that converges); the observed order log₂(e_m / e_2m), with e_m the
//! change from m to 2m sub-increments, is reported (about 1 for backward Euler, and the
//! changes are at rounding level for a path-independent law).

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::routine::{Caller, Fault};

pub struct Refinement;

fn end_stress(d: &Driver, c: &mut Caller<'_>, m: usize) -> Result<Vec<f64>, Fault> {
    let mut sub = d.clone();
    let part: Vec<f64> = d.dstrain().iter().map(|x| x / m as f64).collect();
    let dtemp = d.dtemp() / m as f64;
    // Each sub-increment takes its share of the time too, so rates stay those of the path.
    sub.set_dtime_keep_count(d.dtime() / m as f64);
    for _ in 0..m {
        sub.set_increment_keep_count(&part, dtemp);
        sub.base_call(c)?;
        sub.advance();
    }
    Ok(sub.start().stress.clone())
}

impl Probe for Refinement {
    fn name(&self) -> &'static str {
        "refinement"
    }
    fn needs(&self) -> Needs {
        Needs::empty()
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError> {
        let max_m = env.spec.subdivisions.unwrap_or(8).max(4);
        let floor = env.spec.tol.unwrap_or(1e-12);
        let mut orders = Vec::new();
        let mut bad: Option<(usize, Vec<f64>)> = None;
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) || bad.is_some() {
                return Ok(());
            }
            let scale = d.base.stress.iter().fold(1.0f64, |a, s| a.max(s.abs()));
            let mut prev = d.base.stress.clone();
            let mut changes = Vec::new();
            let mut m = 2;
            while m <= max_m {
                let s = end_stress(d, c, m)?;
                // A stress that is not finite is a change no subdivision can shrink.
                let e = if s.iter().chain(&prev).all(|x| x.is_finite()) {
                    s.iter().zip(&prev).fold(0.0f64, |a, (x, y)| a.max((x - y).abs())) / scale
                } else {
                    f64::INFINITY
                };
                changes.push(e);
                prev = s;
                m *= 2;
            }
            if changes.iter().any(|c| !c.is_finite()) {
                bad = Some((k, changes.clone()));
            }
            for w in changes.windows(2) {
                if w[0] > floor && w[1] > floor {
                    orders.push((w[0] / w[1]).log2());
                }
                // Changes must shrink once above the rounding floor. A change that rises from
                // rounding level is no divergence: a one-step update exact for this increment
                // (radial return under proportional loading) changes only once the
                // sub-increment boundaries split a kink such as the yield point.
                if !w[1].is_finite() || (w[0] > floor && w[1] > 1.05 * w[0]) {
                    bad = Some((k, changes.clone()));
                }
            }
            // The restored base call for the walk to advance from.
            d.base_call(c)
        });
        if let Err((k, f)) = walked {
            return Ok(faulted("refinement", k, &f));
        }
        let order = if orders.is_empty() {
            None
        } else {
            let mut o = orders.clone();
            o.sort_by(f64::total_cmp);
            Some(o[o.len() / 2])
        };
        Ok(match bad {
            None => {
                let mut r = ProbeResult::new(
                    "refinement",
                    ProbeStatus::Pass,
                    match order {
                        Some(p) => format!(
                            "sub-increments change the stress by shrinking amounts, observed order {p:.2}"
                        ),
                        None => {
                            "sub-increments change the stress only at rounding level (path-independent here)"
                                .to_string()
                        }
                    },
                );
                r.value = order;
                r
            }
            Some((k, ch)) => {
                let mut r = ProbeResult::new(
                    "refinement",
                    ProbeStatus::Fail,
                    format!("at increment {k} subdividing does not converge: changes {ch:?}"),
                );
                r.increment = Some(k);
                r
            }
        })
    }
}
