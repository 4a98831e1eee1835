//! A check on several threads, with the same report as on one.
//!
//! The increments of a path depend on each other only through the start state (and, for a
//! failing increment's diagnosis, the previous increment's numerical tangent; for the full
//! guards, which branches were reached before). So the path is cut into consecutive shares,
//! one per thread. The first thread checks its share at once; every other thread first walks
//! the path up to its share with base calls only (one call per increment instead of the ~19
//! of a check, not counted in the report), checks the increment just before its share for its
//! tangent, and then checks its share exactly as one thread would. The shares are sized so
//! that the threads finish together, and merged in path order; a fault ends the path where
//! one thread would have ended it. Same inputs, same calls, same results, bit for bit.
//!
//! That holds only for a routine whose calls do not disturb each other. Before a check uses
//! threads, [`thread_safety`] calls the routine with a few different increments, one after the
//! other in two orders and then on every thread at once, and compares the outputs bit for
//! bit. A routine that fails (static or SAVE variables, shared work buffers, a result that
//! depends on the calls before) is checked on one thread, and the report says why.

use std::ops::Range;

use crate::call_check as judge;
use crate::driver::{Driver, PointState};
use crate::increment;
use crate::path::Path;
use crate::report::{Collector, Keep};
use crate::routine::{Caller, Routine, RoutineInfo};
use crate::settings::Settings;

/// A path shorter than this many increments per thread is checked on fewer threads.
pub const MIN_INCREMENTS_PER_THREAD: usize = 32;

/// Increments of the probe, as multiples of the path's first increment.
const PROBE_SCALES: [f64; 6] = [1.0, 2.0, -1.0, 4.0, -3.0, 8.0];
/// Rounds over the probe's increments each thread makes at once with the others.
const PROBE_ROUNDS: usize = 200;

/// Whether a check made with `jobs` > 1 must be made again on one thread, with the guards'
/// findings and extra calls of the routine's handle cleared first: the guards of the caller's
/// handle found something (`guard_findings`), a call faulted, or the report stops short of the
/// path's `increments` without a fault (a later thread's walk to its share failed). Each
/// thread's handle keeps its own guard findings, and a finding new to a handle ends that call
/// with a fault, so only one thread walking the path in order places a finding's first
/// occurrence where one thread would. Only misbehaving routines pay for it.
pub fn redo_on_one_thread(report: &crate::report::Report, guard_findings: bool, increments: usize) -> bool {
    use crate::report::CheckOutcome;
    let faulted = report
        .increments
        .iter()
        .any(|i| i.fault.is_some() || i.checks.iter().any(|c| matches!(c.tangent, CheckOutcome::Fault(_))));
    report.settings.jobs > 1 && (guard_findings || faulted || report.records.len() < increments)
}

/// The threads' share of the path, in path order.
pub struct Chunk {
    /// The share's increments, collected as the check collects them (a record each, the full
    /// detail of those `keep` asks for), so a long share holds no more than the serial walk.
    pub collected: Collector,
    /// Notes of the share's increments (mixed-control solves that did not converge).
    pub notes: Vec<String>,
    /// Some increment of the share unloaded.
    pub unloaded: bool,
    /// The best numerical tangent of the share's first checked increment that left the state
    /// unchanged (for the conventions warning), when there was one.
    pub first_elastic: Option<Option<Vec<f64>>>,
    /// Calls made to check the share (the walk to it not included).
    pub real_calls: u64,
    pub complex_calls: u64,
    /// Every increment of the share was checked (none faulted, the walk reached it).
    pub complete: bool,
}

/// Handles for the threads beyond the caller's one, when `settings.jobs` asks for more than
/// one thread, the path is long enough, the routine offers handles and passes
/// [`thread_safety`]. A routine that fails the probe gets a note saying why it runs on one
/// thread.
pub fn plan(
    caller: &mut Caller<'_>,
    driver: &Driver,
    path: &Path,
    settings: &Settings,
    notes: &mut Vec<String>,
) -> Option<Vec<Box<dyn Routine + Send>>> {
    let jobs = settings.jobs.min(path.increments.len() / MIN_INCREMENTS_PER_THREAD);
    if jobs < 2 {
        return None;
    }
    // The probe calls handles of its own, dropped after it: what the memory guards of the
    // caller's routine and of the threads' handles record stays the check's alone.
    let mut probed = Vec::with_capacity(jobs);
    for _ in 0..jobs {
        probed.push(caller.another()?);
    }
    let verdict = thread_safety(&mut probed, driver, path);
    drop(probed);
    match verdict {
        Ok(()) => (1..jobs).map(|_| caller.another()).collect(),
        Err(why) => {
            notes.push(format!("checked on one thread instead of {jobs}: {why}"));
            None
        }
    }
}

/// The outputs of one probe call, bit for bit (or the fault's words).
type Bits = Result<Vec<u64>, String>;

fn probe_call(caller: &mut Caller<'_>, d: &mut Driver, dstrain: &[f64]) -> Bits {
    d.set_dstrain(dstrain);
    d.base_call(caller).map_err(|f| f.to_string())?;
    let o = &d.base;
    let mut v: Vec<u64> =
        o.stress.iter().chain(&o.state).chain(&o.tangent).chain(&o.energy).map(|x| x.to_bits()).collect();
    v.push(o.outcome.status as u64);
    v.push(o.outcome.branch as u64);
    Ok(v)
}

fn describe(i: usize, scale: f64, got: &Bits, want: &Bits) -> String {
    let what = match (got, want) {
        (Ok(a), Ok(b)) => match a.iter().zip(b).position(|(x, y)| x != y) {
            Some(k) => format!("output word {k} differs"),
            None => "outputs differ".into(),
        },
        (Err(e), _) | (_, Err(e)) => format!("one of them failed ({e})"),
    };
    format!("probe increment {} ({scale} × the first increment): {what}", i + 1)
}

/// Whether the routine behind `handles` (at least one; one per thread) gives the same outputs,
/// bit for bit, whatever the order of its calls and when called from every thread at once.
pub fn thread_safety(
    handles: &mut [Box<dyn Routine + Send>],
    driver: &Driver,
    path: &Path,
) -> Result<(), String> {
    let Some((first, others)) = handles.split_first_mut() else {
        return Ok(());
    };
    let mut main = Caller::new(&mut **first);
    let caller = &mut main;
    let conv = caller.info().convention.clone();
    let n = conv.ncomp();
    let first = path.increments.first().map(|i| i.dstrain).unwrap_or([1e-4; 6]);
    let mut d0 = vec![0.0; n];
    conv.strain_from_canonical(&first, &mut d0);
    if d0.iter().all(|x| *x == 0.0) {
        d0.iter_mut().for_each(|x| *x = 1e-4);
    }
    let inputs: Vec<Vec<f64>> = PROBE_SCALES.iter().map(|s| d0.iter().map(|x| x * s).collect()).collect();
    let mut d = driver.clone();
    let want: Vec<Bits> = inputs.iter().map(|x| probe_call(caller, &mut d, x)).collect();
    let result = (|| {
        for (i, x) in inputs.iter().enumerate().rev() {
            let got = probe_call(caller, &mut d, x);
            if got != want[i] {
                return Err(format!(
                    "the same call gave different results after other calls (static or SAVE variables?): {}",
                    describe(i, PROBE_SCALES[i], &got, &want[i])
                ));
            }
        }
        let run = |c: &mut Caller<'_>, d: &mut Driver, offset: usize| -> Result<(), String> {
            for r in 0..PROBE_ROUNDS {
                for k in 0..inputs.len() {
                    let i = (k + offset + r) % inputs.len();
                    let got = probe_call(c, d, &inputs[i]);
                    if got != want[i] {
                        return Err(describe(i, PROBE_SCALES[i], &got, &want[i]));
                    }
                }
            }
            Ok(())
        };
        let outcome: Vec<Result<(), String>> = std::thread::scope(|s| {
            let mut joins = Vec::new();
            for (t, h) in others.iter_mut().enumerate() {
                let mut dt = driver.clone();
                let run = &run;
                joins.push(s.spawn(move || {
                    let mut c = Caller::new(&mut **h);
                    run(&mut c, &mut dt, t + 1)
                }));
            }
            let mut out = vec![run(caller, &mut d, 0)];
            out.extend(
                joins.into_iter().map(|j| j.join().unwrap_or_else(|_| Err("a probe thread panicked".into()))),
            );
            out
        });
        match outcome.into_iter().find_map(Result::err) {
            Some(e) => Err(format!(
                "calls from several threads at once gave different results from one at a time: {e}"
            )),
            None => Ok(()),
        }
    })();
    result
}

/// Where the shares of `threads` threads begin (and the path's end): a thread whose share
/// begins at increment s first makes s base calls, so later shares are shorter.
/// `calls_per_increment` is what checking one increment costs in calls.
pub fn shares(increments: usize, threads: usize, calls_per_increment: f64) -> Vec<usize> {
    let w = calls_per_increment.max(1.0);
    // Thread t's share starts at s_t = T (1 − (1 − 1/w)^t); the last one ends at the path's end.
    let q = 1.0 - 1.0 / w;
    let total = increments as f64 / (1.0 - q.powi(threads as i32)).max(1e-12);
    let mut b: Vec<usize> =
        (0..threads).map(|t| ((total * (1.0 - q.powi(t as i32))).round() as usize).min(increments)).collect();
    b.push(increments);
    b
}

/// Calls one increment's check makes, about: the base call and every scheme's columns.
fn calls_per_increment(settings: &Settings, n: usize) -> f64 {
    use crate::schemes::Scheme;
    let per_column: usize = settings
        .schemes
        .iter()
        .map(|s| match s {
            Scheme::Forward | Scheme::Backward | Scheme::ComplexStep => 1,
            Scheme::Central => 2,
            Scheme::Central4 | Scheme::Richardson => 4,
        })
        .sum();
    // A comparison costs about as much as a few calls of a fast routine.
    1.0 + (per_column * n) as f64 + 2.0 * settings.schemes.len() as f64
}

/// What every thread checks: the inputs of `check::run_with`, passed through unchanged to the
/// walk and to each share as one value.
#[derive(Clone, Copy)]
pub struct Job<'a> {
    pub info: &'a RoutineInfo,
    pub props: &'a [f64],
    pub start: &'a PointState,
    pub path: &'a Path,
    pub settings: &'a Settings,
    pub keep: Keep,
}

/// Check `job.path` on the caller's thread and one thread per handle, in shares; the chunks in
/// path order. The caller's counts are left as they were: the chunks carry theirs.
pub fn walk(caller: &mut Caller<'_>, handles: Vec<Box<dyn Routine + Send>>, job: Job<'_>) -> Vec<Chunk> {
    let Job { info, path, settings, .. } = job;
    let threads = handles.len() + 1;
    let b = shares(path.increments.len(), threads, calls_per_increment(settings, info.convention.ncomp()));
    std::thread::scope(|s| {
        let mut joins = Vec::new();
        for (t, mut h) in handles.into_iter().enumerate() {
            let range = b[t + 1]..b[t + 2];
            joins.push(s.spawn(move || {
                let chunk = share(&mut Caller::new(&mut *h), job, range);
                (chunk, h.guard_extra_calls())
            }));
        }
        let (real0, cplx0) = (caller.real_calls, caller.complex_calls);
        let first = share(caller, job, b[0]..b[1]);
        caller.real_calls = real0;
        caller.complex_calls = cplx0;
        let mut out = vec![first];
        for j in joins {
            let (chunk, extra) = j.join().unwrap_or_else(|p| std::panic::resume_unwind(p));
            // The guards' reruns on the thread's handle count for the check, as on one thread.
            caller.absorb_guard_extra_calls(extra);
            out.push(chunk);
        }
        out
    })
}

/// One thread's share: the walk to its start (base calls), then its increments checked.
fn share(caller: &mut Caller<'_>, job: Job<'_>, range: Range<usize>) -> Chunk {
    let Job { info, props, start, path, settings, keep } = job;
    let incomplete = Chunk {
        collected: Collector::new(settings, keep, 0),
        notes: Vec::new(),
        unloaded: false,
        first_elastic: None,
        real_calls: 0,
        complex_calls: 0,
        complete: false,
    };
    let Ok(driver) = Driver::new(info, props, start.clone()) else {
        return incomplete;
    };
    let mut walk = increment::Walk::new(driver, settings);
    let quiet = Settings { diagnose: false, first_calls: false, ..settings.clone() };
    for (k, inc) in path.increments[..range.start].iter().enumerate() {
        let (solved, _, _) = walk.set(k, inc, caller);
        if solved.is_err() {
            return incomplete;
        }
        let seen = if k + 1 == range.start {
            judge::check_call(&mut walk.driver, caller, &quiet, None).map(|cc| {
                walk.set_previous(cc.best.as_ref().map(|(_, t)| &t[..]));
                (cc.reported_branch, cc.state_changed)
            })
        } else {
            walk.driver.base_call(caller).map(|()| {
                let b = walk.driver.base.outcome.branch;
                (
                    (b >= 0).then_some(b),
                    walk.driver.base.state.iter().zip(&walk.driver.start().state).any(|(a, b)| a != b),
                )
            })
        };
        match seen {
            Ok((branch, changed)) => {
                if settings.first_calls {
                    walk.reached.first(branch, changed);
                }
            }
            Err(_) => return incomplete,
        }
        walk.driver.advance();
    }
    let (real0, cplx0) = (caller.real_calls, caller.complex_calls);
    let mut collected = Collector::new(settings, keep, range.len());
    let (mut notes, mut unloaded, mut first_elastic) = (Vec::new(), false, None);
    let mut complete = true;
    for k in range {
        let step = walk.step(k, &path.increments[k], caller, &mut collected);
        unloaded |= step.unloaded;
        notes.extend(step.note);
        if step.checked && first_elastic.is_none() && !step.state_changed {
            first_elastic = Some(walk.best().map(<[f64]>::to_vec));
        }
        if step.stops {
            complete = false;
            break;
        }
    }
    Chunk {
        collected,
        notes,
        unloaded,
        first_elastic,
        real_calls: caller.real_calls - real0,
        complex_calls: caller.complex_calls - cplx0,
        complete,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shares_cover_the_path_and_later_ones_are_shorter() {
        for (n, t) in [(20_000, 2), (20_000, 4), (100, 3), (64, 2)] {
            let b = shares(n, t, 20.0);
            assert_eq!(b.len(), t + 1);
            assert_eq!((b[0], b[t]), (0, n));
            assert!(b.windows(2).all(|w| w[0] <= w[1]), "{b:?}");
            let len: Vec<usize> = b.windows(2).map(|w| w[1] - w[0]).collect();
            assert!(len.windows(2).all(|w| w[0] >= w[1]), "{len:?}");
            // Each thread's cost (walk + share × w) is about the same.
            let cost: Vec<f64> = (0..t).map(|k| b[k] as f64 + 20.0 * len[k] as f64).collect();
            let (lo, hi) = cost.iter().fold((f64::MAX, 0.0f64), |(l, h), c| (l.min(*c), h.max(*c)));
            assert!(hi - lo <= 21.0 * t as f64, "{cost:?}");
        }
    }
}
