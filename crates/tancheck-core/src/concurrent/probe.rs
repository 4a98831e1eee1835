//! Whether a routine is safe to call from several threads: the walk of the path with base
//! calls that the second thread makes (the shares' starts, the states worth probing, a
//! fingerprint of every increment's end state) and the probe of those states.

use crate::driver::{Driver, PointState};
use crate::first_calls::Branches;
use crate::increment;
use crate::path::Path;
use crate::routine::{Caller, Routine};
use crate::settings::Settings;

/// Increments of the path the probe calls from the states the walk reached: at most this many
/// first increments of a branch, and the increments at these fractions of the path (the last
/// one's included). Only calls the check itself makes: a routine may hang or end the process
/// on inputs no path gives it.
const BRANCH_PROBES: usize = 4;
const SPREAD_PROBES: [f64; 5] = [0.2, 0.4, 0.6, 0.8, 0.9999];
/// Rounds over the probe's increments each thread makes at once with the others.
const PROBE_ROUNDS: usize = 100;

/// A fingerprint of a point state, bit for bit: a change of any one word changes it (each
/// word is mixed in by a bijection of the running value).
pub fn fingerprint(s: &PointState) -> u64 {
    let words = s.strain.iter().chain(&s.stress).chain(&s.state).chain([&s.temp, &s.time]);
    words.fold(0xcbf2_9ce4_8422_2325u64, |h, x| {
        (h ^ x.to_bits()).wrapping_mul(0x0000_0100_0000_01b3).rotate_left(23)
    })
}

/// What the walk of the path with base calls saw.
pub(super) struct Walked {
    /// The driver at the start of the increment before the second thread's share, and the
    /// branches reached before that increment.
    pub(super) second: Option<(Driver, Branches)>,
    /// The fingerprint of every increment's end state (see [`fingerprint`]).
    pub(super) fingerprints: Vec<u64>,
    /// Drivers set for increments of the path worth probing: the first one of every branch
    /// (reported branch and whether the state changed) the walk saw, at most
    /// [`BRANCH_PROBES`], those at the fractions [`SPREAD_PROBES`] of the path (states a
    /// routine that reports no branches reaches too), and the last that changed the state.
    pub(super) probes: Vec<(usize, Driver)>,
}

/// Walk `path` from `driver`'s start with base calls on `routine`; the increment and the
/// fault when a call faults.
/// At the increment before thread t's share (`bounds[t] - 1`), the driver and the branches
/// reached so far go to `later[t - 2]` for t ≥ 2, and into the result for t = 1.
pub(super) fn walk_path(
    routine: &mut dyn Routine,
    driver: &Driver,
    path: &Path,
    settings: &Settings,
    bounds: &[usize],
    later: Vec<std::sync::mpsc::Sender<(Driver, Branches)>>,
) -> Result<Walked, String> {
    let mut caller = Caller::new(routine);
    let mut walk = increment::Walk::new(driver.clone(), settings);
    let n = path.increments.len();
    let mut out = Walked { second: None, fingerprints: Vec::with_capacity(n), probes: Vec::new() };
    let mut seen = Branches::default();
    // The deepest inelastic state the path reached (copied into a driver of its own, no
    // allocation per increment).
    let (mut last_changed, mut last_driver) = (None, driver.clone());
    let mut branch_probes = 0;
    for (k, inc) in path.increments.iter().enumerate() {
        if let Some(t) = bounds[1..bounds.len() - 1].iter().position(|b| *b == k + 1) {
            let here = (walk.driver.clone(), walk.reached.clone());
            if t == 0 {
                out.second = Some(here);
            } else if let Some(tx) = later.get(t - 1) {
                // A thread that has stopped waiting no longer needs it.
                let _ = tx.send(here);
            }
        }
        let faulted = |f: crate::routine::Fault| format!("increment {}: {f}", k + 1);
        walk.set(k, inc, &mut caller).0.map_err(faulted)?;
        walk.driver.base_call(&mut caller).map_err(faulted)?;
        let b = walk.driver.base.outcome.branch;
        let branch = (b >= 0).then_some(b);
        let changed = walk.driver.base.state.iter().zip(&walk.driver.start().state).any(|(a, b)| a != b);
        if settings.first_calls {
            walk.reached.first(branch, changed);
        }
        let spread = SPREAD_PROBES.iter().any(|f| (f * n as f64) as usize == k);
        let first_of_branch = seen.first(branch, changed) && branch_probes < BRANCH_PROBES;
        branch_probes += usize::from(first_of_branch);
        if first_of_branch || spread {
            out.probes.push((k, walk.driver.clone()));
        } else if changed {
            last_changed = Some(k);
            last_driver.set_like(&walk.driver);
        }
        walk.driver.advance();
        out.fingerprints.push(fingerprint(walk.driver.start()));
    }
    out.probes.extend(last_changed.map(|k| (k, last_driver)));
    Ok(out)
}

/// The outputs of one probe call, bit for bit (or the fault's words).
type Bits = Result<Vec<u64>, String>;

/// The increment `d` is set for, called as a check calls it: the base call (with the tangent),
/// then the same inputs without asking for the tangent (as the perturbed calls do), so that
/// what one kind of call leaves for the other in a static shows too.
fn probe_call(caller: &mut Caller<'_>, d: &mut Driver) -> Bits {
    d.base_call(caller).map_err(|f| f.to_string())?;
    d.perturbed_call(caller, crate::driver::Direction::Strain(0), 0.0).map_err(|f| f.to_string())?;
    let (o, p) = (&d.base, &d.minus);
    let mut v: Vec<u64> = o
        .stress
        .iter()
        .chain(&o.state)
        .chain(&o.tangent)
        .chain(&o.energy)
        .chain(&p.stress)
        .chain(&p.state)
        .map(|x| x.to_bits())
        .collect();
    v.extend([o.outcome.status, o.outcome.branch, p.outcome.status, p.outcome.branch].map(|x| x as u64));
    Ok(v)
}

/// Why [`thread_safety`] did not pass a routine.
#[derive(Debug)]
pub enum ProbeFailure {
    /// The same call gave other outputs after other calls or on several threads at once.
    Differs(String),
    /// A call of the probe faulted (crashed, reported a failure, or gave the memory guards a
    /// finding): the probe cannot tell; the check on one thread meets the fault or not.
    Faulted(String),
}

/// Whether the routine behind `handles` (at least one; one per thread) gives the same outputs,
/// bit for bit, whatever the order of its calls and when called from every thread at once.
/// The calls: the increments of the path `path_probes` holds (index, driver set for it by a
/// walk), each with the tangent and then without it.
pub fn thread_safety(
    handles: &mut [Box<dyn Routine + Send>],
    path_probes: &[(usize, Driver)],
) -> Result<(), ProbeFailure> {
    let Some((first, others)) = handles.split_first_mut() else {
        return Ok(());
    };
    let mut main = Caller::new(&mut **first);
    let caller = &mut main;
    let mut probes: Vec<(String, Driver)> = path_probes
        .iter()
        .map(|(k, d)| {
            (format!("increment {} of the path, from the state the path reached", k + 1), d.clone())
        })
        .collect();
    // One call's outputs against those the probe wants: a fault is one, whichever call it was.
    let compare = |label: &str, got: Bits, want: &[u64]| -> Result<(), ProbeFailure> {
        match got {
            Err(e) => Err(ProbeFailure::Faulted(format!("{label}: {e}"))),
            Ok(v) if v == want => Ok(()),
            Ok(v) => {
                let k = v.iter().zip(want).position(|(x, y)| x != y).unwrap_or(0);
                Err(ProbeFailure::Differs(format!("{label}: output word {k} differs")))
            }
        }
    };
    let mut want = Vec::with_capacity(probes.len());
    for (label, d) in probes.iter_mut() {
        want.push(probe_call(caller, d).map_err(|e| ProbeFailure::Faulted(format!("{label}: {e}")))?);
    }
    for (i, (label, d)) in probes.iter_mut().enumerate().rev() {
        compare(label, probe_call(caller, d), &want[i]).map_err(|f| match f {
            ProbeFailure::Differs(e) => ProbeFailure::Differs(format!(
                "the same call gave different results after other calls (static or SAVE variables?): {e}"
            )),
            faulted => faulted,
        })?;
    }
    let want = &want;
    let run =
        |c: &mut Caller<'_>, probes: &mut [(String, Driver)], offset: usize| -> Result<(), ProbeFailure> {
            for r in 0..PROBE_ROUNDS {
                for k in 0..probes.len() {
                    let i = (k + offset + r) % probes.len();
                    let (label, d) = &mut probes[i];
                    compare(label, probe_call(c, d), &want[i])?;
                }
            }
            Ok(())
        };
    let outcome: Vec<Result<(), ProbeFailure>> = std::thread::scope(|s| {
        let mut joins = Vec::new();
        for (t, h) in others.iter_mut().enumerate() {
            let mut mine = probes.clone();
            let run = &run;
            joins.push(s.spawn(move || {
                let mut c = Caller::new(&mut **h);
                run(&mut c, &mut mine, t + 1)
            }));
        }
        let mut out = vec![run(caller, &mut probes, 0)];
        out.extend(joins.into_iter().map(|j| {
            j.join().unwrap_or_else(|_| Err(ProbeFailure::Faulted("a probe thread panicked".into())))
        }));
        out
    });
    match outcome.into_iter().find_map(Result::err) {
        Some(ProbeFailure::Differs(e)) => Err(ProbeFailure::Differs(format!(
            "calls from several threads at once gave different results from one at a time: {e}"
        ))),
        Some(faulted) => Err(faulted),
        None => Ok(()),
    }
}

/// Calls of the probe, at most (see [`thread_safety`]).
pub(super) const PROBE_CALLS: usize = 2 * (PROBE_ROUNDS + 2) * (BRANCH_PROBES + SPREAD_PROBES.len() + 1);

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_fingerprint_changes_with_any_one_bit_of_the_state() {
        let s = PointState {
            strain: vec![1e-3, 0.0, -2e-4],
            stress: vec![210.0, 0.0, 1.5],
            state: vec![0.0, 3e-5],
            temp: 20.0,
            time: 7.0,
        };
        let f = fingerprint(&s);
        let fields = s.strain.len() + s.stress.len() + s.state.len() + 2;
        for w in 0..fields {
            for bit in [0, 1, 31, 52, 63] {
                let mut t = s.clone();
                let x = match w {
                    w if w < 3 => &mut t.strain[w],
                    w if w < 6 => &mut t.stress[w - 3],
                    w if w < 8 => &mut t.state[w - 6],
                    8 => &mut t.temp,
                    _ => &mut t.time,
                };
                *x = f64::from_bits(x.to_bits() ^ (1u64 << bit));
                assert_ne!(fingerprint(&t), f, "word {w}, bit {bit}");
            }
        }
    }
}
