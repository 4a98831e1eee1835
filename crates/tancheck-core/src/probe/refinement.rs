//! The increment-refinement probe: each increment split into 2, 4, … sub-increments from the
//! same start. The end stress must change by shrinking amounts as the subdivision grows (an
//! integration scheme that converges); the observed order log₂(e_m / e_2m), with e_m the
//! change from m to 2m sub-increments, is reported (about 1 for backward Euler, and the
//! changes are at rounding level for a path-independent law).
//!
//! The changes may rise before they shrink: a rate-dependent point unloading from an
//! overstress relaxes in the first sub-increments of a step that is elastic as a whole, and
//! the relaxation they resolve grows before it converges (a sweep's viscoplastic J2: changes
//! 8.8e-4, 2.7e-3, 1.9e-3 at 2, 4, 8 sub-increments, converging at first order from about 16).
//! Where they have not shrunk twice in a row by the subdivision asked for, the probe goes on
//! doubling up to [`EXTENDED`] sub-increments and judges the last changes: an update that does
//! not converge (a fixed amount per call, not per unit of strain or time) never shrinks.

use super::Needs;
use super::{faulted, walk, Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::driver::Driver;
use crate::error::CoreError;
use crate::routine::{Caller, Fault};

pub struct Refinement;

/// Most sub-increments the probe goes to when the changes have not yet shrunk twice in a row.
const EXTENDED: usize = 256;

/// Whether a change shrank from `a` to `b`: below the rounding floor, or by more than 5 %.
fn shrank(a: f64, b: f64, floor: f64) -> bool {
    b <= floor || b < a / 1.05
}

/// The changes shrank at their last two doublings (or have only one, shrunk, so far).
fn settled(changes: &[f64], floor: f64) -> bool {
    let n = changes.len();
    n >= 3 && shrank(changes[n - 3], changes[n - 2], floor) && shrank(changes[n - 2], changes[n - 1], floor)
}

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
        // The first increment whose changes rose and were followed past the subdivision asked.
        let mut extended: Option<(usize, Vec<f64>)> = None;
        let walked = walk(caller, env, |k, d, c| {
            if !env.spec.runs_at(k) || bad.is_some() {
                return Ok(());
            }
            let scale = d.base.stress.iter().fold(1.0f64, |a, s| a.max(s.abs()));
            let mut prev = d.base.stress.clone();
            let mut changes = Vec::new();
            let mut m = 2;
            loop {
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
                // Changes must shrink once above the rounding floor. A change that rises from
                // rounding level is no divergence: a one-step update exact for this increment
                // (radial return under proportional loading) changes only once the
                // sub-increment boundaries split a kink such as the yield point. One that
                // rises above it may still be before the converging range: go on doubling.
                let rose = changes.windows(2).any(|w| w[0] > floor && w[1] > 1.05 * w[0]);
                if !e.is_finite()
                    || m > EXTENDED.max(max_m)
                    || (m > max_m && (!rose || settled(&changes, floor)))
                {
                    break;
                }
            }
            let rose = changes.windows(2).any(|w| w[0] > floor && w[1] > 1.05 * w[0]);
            if changes.iter().any(|c| !c.is_finite()) || (rose && !settled(&changes, floor)) {
                bad = Some((k, changes.clone()));
            } else if rose && (1usize << changes.len()) > max_m && extended.is_none() {
                extended = Some((k, changes.clone()));
            }
            // The order from the doublings after the last rise (the converging range).
            let from =
                changes.windows(2).rposition(|w| w[0] > floor && w[1] > 1.05 * w[0]).map_or(0, |i| i + 1);
            for w in changes[from..].windows(2) {
                if w[0] > floor && w[1] > floor {
                    orders.push((w[0] / w[1]).log2());
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
                if let Some((k, ch)) = extended {
                    r.details.push(format!(
                        "at increment {k} the changes rose before they shrank and were followed to {} sub-increments: {}",
                        1usize << ch.len(),
                        ch.iter().map(|c| format!("{c:.2e}")).collect::<Vec<_>>().join(", ")
                    ));
                }
                r
            }
            Some((k, ch)) => {
                let mut r = ProbeResult::new(
                    "refinement",
                    ProbeStatus::Fail,
                    format!(
                        "at increment {k} subdividing does not converge: changes {ch:?} (from 1 to 2 up to {} sub-increments)",
                        1usize << ch.len()
                    ),
                );
                r.increment = Some(k);
                r
            }
        })
    }
}
