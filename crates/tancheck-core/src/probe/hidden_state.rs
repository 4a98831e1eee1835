//! The hidden-state probe: calls A, B, A — A the increment, B a different one (the reversed
//! increment, doubled) from the same start — must give the same answers for A. A routine that
//! keeps saved (static) variables between calls fails.
//!
//! Then, from the second increment on, a call C — the increment from the start of the one
//! before (another point's start state, as the points of an element give) — is made twice:
//! once under the increment's own number, after A, and once under a number the path never
//! reaches, first there. The two must agree bit for bit: a routine that keeps results per
//! increment number (a tangent computed at the first call of an increment and returned to the
//! later ones; a start state read at the first call and used for every point of the increment,
//! the one static all points share) gives C the first call's (both passed every probe; a
//! user-style sweep).
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
        let mut keyed: Option<(usize, (Kept, Difference))> = None;
        let (mut probed, mut refused) = (0usize, Vec::new());
        // The start state of the increment before (C's start).
        let mut before: Option<crate::driver::PointState> = None;
        let far_from = env.path.increments.len() + 1;
        let walked = walk(caller, env, |k, d, c| {
            let previous = before.replace(d.start().clone());
            if !env.spec.runs_at(k) || first.is_some() || keyed.is_some() {
                return Ok(());
            }
            // C runs on a driver of its own: `d.base` still holds the walk's call A.
            if let (Some(prev), true) = (previous, k >= 2) {
                keyed = per_increment_number(c, env, d, prev, k, far_from + k)?.map(|diff| (k, diff));
                if keyed.is_some() {
                    return Ok(());
                }
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
            if !(same_bits(&a.0, &d.base.stress)
                && same_bits(&a.1, &d.base.state)
                && same_bits(&a.2, &d.base.tangent))
            {
                let outputs = [
                    ("stress", &a.0, &d.base.stress),
                    ("state", &a.1, &d.base.state),
                    ("tangent", &a.2, &d.base.tangent),
                ];
                first = Some((k, largest_difference(&outputs)));
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
        if let (None, Some((k, (kept, (what, i, x, y, rel))))) = (&first, keyed) {
            let why = match kept {
                Kept::PerNumber => format!(
                    "at increment {k}, a call from another start state (the start of the increment before, as \
                     another point of the element has) gave other results under the increment's own number, \
                     after the increment's call, than under a number no other call had ({what}[{i}]: {x:e} \
                     against {y:e}, relative {rel:.1e}): the routine keeps results per increment number (a \
                     tangent or start state saved at the first call of an increment and used for the later \
                     ones, a static variable every point shares, or a result that reads the increment number \
                     itself?)"
                ),
                Kept::FromTheCallBefore => format!(
                    "at increment {k}, a call from another start state (the start of the increment before, as \
                     another point of the element has), made twice in a row under one increment number no \
                     other call had, gave other results the second time ({what}[{i}]: {x:e} then {y:e}, \
                     relative {rel:.1e}): the routine's results depend on the call made before (a saved or \
                     static variable read in place of the start state it is given?)"
                ),
            };
            let mut r = ProbeResult::new("hidden-state", ProbeStatus::Fail, why);
            r.increment = Some(k);
            r.value = Some(rel);
            return Ok(r);
        }
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
                    "calls A, B, A give the same answers for A, and a call from another start the same under \
                     any increment number",
                );
                r.details.extend(refused_note);
                r
            }
            Some((k, (what, i, x, y, rel))) => {
                // The size says which kind of keeping it is: a warm start or a cache changes only
                // the last bits, a kept result the value (a user's warm-started local solve
                // read like a saved plastic strain; a user-style sweep).
                let size = if rel <= ROUNDING {
                    format!(
                        "only in the last bits ({what}[{i}]: {x:e} then {y:e}, relative {rel:.1e}): a warm start or a \
                         cache kept between calls, harmless to the values but not repeatable bit for bit"
                    )
                } else {
                    format!("{what}[{i}]: {x:e} then {y:e}, relative {rel:.1e}")
                };
                let mut r = ProbeResult::new(
                    "hidden-state",
                    ProbeStatus::Fail,
                    format!("A, B, A gave a different second A at increment {k}, {size}: the routine keeps state between calls (a saved or static variable?)"),
                );
                r.increment = Some(k);
                r.value = Some(rel);
                r
            }
        })
    }
}

/// What call C found: results kept per increment number, or results that depend on the
/// call made before (C made twice in a row under one new number gave two answers).
#[derive(Clone, Copy, Debug, PartialEq)]
enum Kept {
    PerNumber,
    FromTheCallBefore,
}

/// Call C (increment `k`'s strain and temperature increments from `prev`, the start of the
/// increment before) under the number `k`, after the increment's own calls, then twice under
/// `far`, a number no call had: the outputs' largest difference when they differ, and which
/// kind of keeping it shows (the two calls under `far` differing: the call before, not the
/// number, made the difference; a routine reading its previous call's result was said to keep
/// results per increment number; a user-style sweep). A call C the routine refuses with a
/// status is no finding (another start may not take this increment).
fn per_increment_number(
    c: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
    d: &crate::driver::Driver,
    prev: crate::driver::PointState,
    k: usize,
    far: usize,
) -> Result<Option<(Kept, Difference)>, crate::routine::Fault> {
    let info = c.info().clone();
    let Ok(mut other) = crate::driver::Driver::new(&info, env.props, prev) else { return Ok(None) };
    other.set_increment(d.dstrain(), d.dtemp(), d.dtime());
    let mut outputs = Vec::with_capacity(3);
    for number in [k, far, far] {
        other.set_count(i32::try_from(number).unwrap_or(i32::MAX));
        match other.base_call(c) {
            Ok(()) => outputs.push((
                other.base.stress.clone(),
                other.base.state.clone(),
                other.base.tangent.clone(),
            )),
            Err(crate::routine::Fault::Status { .. }) => return Ok(None),
            Err(f) => return Err(f),
        }
    }
    let differ = |a: &(Vec<f64>, Vec<f64>, Vec<f64>), b: &(Vec<f64>, Vec<f64>, Vec<f64>)| {
        (!(same_bits(&a.0, &b.0) && same_bits(&a.1, &b.1) && same_bits(&a.2, &b.2))).then(|| {
            largest_difference(&[("stress", &a.0, &b.0), ("state", &a.1, &b.1), ("tangent", &a.2, &b.2)])
        })
    };
    if let Some(diff) = differ(&outputs[1], &outputs[2]) {
        return Ok(Some((Kept::FromTheCallBefore, diff)));
    }
    Ok(differ(&outputs[0], &outputs[1]).map(|diff| (Kept::PerNumber, diff)))
}

/// Whether two outputs hold the same values bit for bit.
fn same_bits(x: &[f64], y: &[f64]) -> bool {
    x.iter().zip(y).all(|(p, q)| p.to_bits() == q.to_bits())
}

/// The entry of the outputs that differs most: output, index, the two values, relative
/// difference (see [`largest_difference`]).
type Difference = (&'static str, usize, f64, f64, f64);

/// A relative difference at most this is in the last bits of a value.
const ROUNDING: f64 = 1e-12;

/// The entry whose two values differ most, relative to the larger of them: (output, index,
/// first value, second value, relative difference; 1 where one is not a number).
fn largest_difference(
    outputs: &[(&'static str, &Vec<f64>, &Vec<f64>)],
) -> (&'static str, usize, f64, f64, f64) {
    let mut worst: Option<(&'static str, usize, f64, f64, f64)> = None;
    for (what, a, b) in outputs {
        for (i, (x, y)) in a.iter().zip(b.iter()).enumerate() {
            if x.to_bits() == y.to_bits() {
                continue;
            }
            let scale = x.abs().max(y.abs());
            let rel = if !(x.is_finite() && y.is_finite()) {
                1.0
            } else if scale > 0.0 {
                (x - y).abs() / scale
            } else {
                0.0
            };
            // The first entry that differs, then any that differs more.
            if worst.is_none_or(|w| rel > w.4) {
                worst = Some((what, i, *x, *y, rel));
            }
        }
    }
    worst.unwrap_or(("stress", 0, 0.0, 0.0, 0.0))
}

#[cfg(test)]
mod tests {
    // The largest relative difference is named, with its output and entry.
    #[test]
    fn the_largest_difference_is_named() {
        let (a, b) = (vec![1.0, 2.0], vec![1.0, 2.0 * (1.0 + 4e-16)]);
        let (c, e) = (vec![5.0], vec![5.5]);
        let w = super::largest_difference(&[("stress", &a, &b), ("state", &c, &e)]);
        assert_eq!((w.0, w.1), ("state", 0));
        assert!((w.4 - 0.5 / 5.5).abs() < 1e-15);
        let w = super::largest_difference(&[("stress", &a, &b)]);
        assert_eq!((w.0, w.1), ("stress", 1));
        assert!(w.4 > 0.0 && w.4 <= super::ROUNDING);
    }
}
