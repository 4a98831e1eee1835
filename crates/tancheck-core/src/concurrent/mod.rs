//! A check on several threads, with the same report as on one.
//!
//! The increments of a path depend on each other only through the start state (and, for a
//! failing increment's diagnosis, the previous increment's numerical tangent; for the full
//! guards, which branches were reached before). So the path is cut into consecutive shares,
//! one per thread, each thread calling a handle of its own. The first thread checks its share
//! from the path's start at once. The second walks the whole path with base calls only (one
//! call per increment instead of the ~23 of a check; `probe::walk_path`), handing every later
//! thread the start of its share as it passes it and keeping a fingerprint of every
//! increment's end state, then probes the routine ([`thread_safety`]) and checks its share. A
//! later thread checks the increment just before its share for its tangent and then its
//! share, exactly as one thread would. The shares are merged in path order; a fault ends the
//! path where one thread would have ended it. Same inputs, same calls, same results, bit for
//! bit.
//!
//! That holds only for a routine whose calls do not disturb each other. [`thread_safety`]
//! calls the routine with a few increments of the path from the states the walk reached (only
//! calls the check makes itself), each with and without the tangent, one after the other in
//! two orders and then on every thread at once, and compares the outputs bit for bit. A routine that fails it (static or SAVE variables, shared work
//! buffers, a result that depends on the calls before) stops the threads, and the path is
//! checked on one thread with a note saying why. After the threads, every increment's end
//! state is compared with the walk's fingerprint; a difference (a result that depends on the
//! calls before, or a race the probe did not see) has the path checked on one thread too.
//! A path too short to pay for the walk and the probe is checked on one thread
//! ([`worth_threads`]).

use std::ops::Range;

use crate::call_check as judge;
use crate::driver::{Driver, PointState};
use crate::first_calls::Branches;
use crate::increment;
use crate::path::Path;
use crate::report::{Collector, Keep};
use crate::routine::{Caller, Routine, RoutineInfo};
use crate::settings::Settings;

mod probe;

pub use crate::report::gave_way::{GaveWay, Serial};

pub use probe::{fingerprint, thread_safety, ProbeFailure};
use probe::{walk_path, PROBE_CALLS};

/// A path shorter than this many increments per thread is checked on fewer threads.
pub const MIN_INCREMENTS_PER_THREAD: usize = 32;

/// Whether a check made on several threads (`report.settings.jobs` > 1: the threads the path
/// was checked on) must be made again on one thread, with the guards' findings and extra
/// calls of the routine's handle cleared first: the guards of the caller's handle found
/// something (`guard_findings`), a call faulted, or the report stops short of the path's
/// `increments` without a fault (a later thread's walk to its share failed). Each thread's
/// handle keeps its own guard findings, and a finding new to a handle ends that call with a
/// fault, so only one thread walking the path in order places a finding's first occurrence
/// where one thread would. Only misbehaving routines pay for it.
pub fn redo_on_one_thread(report: &crate::report::Report, guard_findings: bool, increments: usize) -> bool {
    report.settings.jobs > 1 && (guard_findings || faulted(report) || report.records.len() < increments)
}

/// A call of the check faulted.
fn faulted(report: &crate::report::Report) -> bool {
    use crate::report::CheckOutcome;
    report.increments.iter().any(|i| {
        // Outputs that are not finite numbers stop the path as a fault does.
        i.fault.is_some()
            || !i.non_finite.is_empty()
            || i.checks.iter().any(|c| matches!(c.tangent, CheckOutcome::Fault(_)))
    })
}

/// The note for the `serial` report of a check made again on one thread after `threaded`
/// (see [`redo_on_one_thread`]), when the calls on one thread neither faulted nor gave the
/// guards a finding (`serial_findings`): what went wrong on several threads came from their
/// calls disturbing each other.
pub fn redo_note(
    threaded: &crate::report::Report,
    serial: &crate::report::Report,
    serial_findings: bool,
) -> Option<String> {
    let n = threaded.settings.jobs;
    (!serial_findings && !faulted(serial)).then(|| {
        format!(
            "checked on one thread instead of {n}: calls on {n} threads faulted or were flagged by the \
             memory guards where the same calls on one thread were not (calls from several threads at once \
             disturb each other)"
        )
    })
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
    /// unchanged (for the conventions warning), when there was one, and how many of `notes`
    /// came before it (one thread places the warning there).
    pub first_elastic: Option<(Option<Vec<f64>>, usize)>,
    /// Calls made to check the share (the walk to it not included).
    pub real_calls: u64,
    pub complex_calls: u64,
    /// Every increment of the share was checked (none faulted, the walk reached it).
    pub complete: bool,
    /// The fingerprint of the end state of each increment of the share that did not stop the
    /// path, in path order (see [`fingerprint`]).
    pub checked: Vec<u64>,
    /// Extra calls of the guards the increment before the share made (one thread makes them
    /// once, in the share before).
    before_extra_calls: u64,
    /// The start states the share's walk kept for the look at the time increment.
    pub changed: increment::ChangedStarts,
}

/// What a check on several threads starts from: a handle for each thread beyond the
/// caller's, and one per thread for the walk and the probe.
pub struct Plan {
    /// A handle for each thread, the first one's included: a check given up for one thread
    /// leaves no guard finding or extra call on the caller's routine.
    pub handles: Vec<Box<dyn Routine + Send>>,
    /// Handles of the walk and the probe (one per thread), dropped after them: what the memory
    /// guards of the caller's routine and of the threads' handles record stays the check's.
    probing: Vec<Box<dyn Routine + Send>>,
}

impl Plan {
    /// The threads of the check.
    pub fn threads(&self) -> usize {
        self.handles.len()
    }
}

impl From<ProbeFailure> for Serial {
    fn from(f: ProbeFailure) -> Serial {
        match f {
            ProbeFailure::Differs(why) => Serial::Because(why),
            ProbeFailure::Faulted(fault) => Serial::Faulted(fault),
        }
    }
}

/// Handles for a check on several threads, when `settings.jobs` asks for more than one, the
/// routine offers handles and the path is long enough for the threads to pay for the walk and
/// the probe ([`worth_threads`]). Whether the routine is safe to call from several threads is
/// found while the check runs ([`walk`]).
pub fn plan(caller: &mut Caller<'_>, path: &Path, settings: &Settings) -> Option<Plan> {
    let n = path.increments.len();
    let w = calls_per_increment(settings, caller.info().convention.ncomp());
    let most = settings.jobs.min(n / MIN_INCREMENTS_PER_THREAD);
    let jobs = (2..=most).rev().find(|t| worth_threads(n, *t, w))?;
    let probing = (0..jobs).map(|_| caller.another()).collect::<Option<Vec<_>>>()?;
    let handles = (0..jobs).map(|_| caller.another()).collect::<Option<Vec<_>>>()?;
    Some(Plan { handles, probing })
}

/// Whether checking a path of `n` increments on `threads` threads, `w` calls per increment,
/// takes clearly less time than on one: at most 0.8 of it, counting the walk and the probe on
/// the second thread.
pub fn worth_threads(n: usize, threads: usize, w: f64) -> bool {
    let (_, time) = shares_and_time(n, threads, w, PROBE_CALLS as f64);
    time <= 0.8 * n as f64 * w
}

/// Whether the routine behind `caller` is safe to call from `settings.jobs` threads along
/// `path` from `driver`'s start: the walk of the path with base calls, then [`thread_safety`]
/// on what it reached. What a check on several threads does before the second thread checks.
pub fn probe(
    caller: &mut Caller<'_>,
    driver: &Driver,
    path: &Path,
    settings: &Settings,
) -> Result<(), Serial> {
    let jobs = settings.jobs.max(2);
    let mut probing = (0..jobs)
        .map(|_| caller.another())
        .collect::<Option<Vec<_>>>()
        .ok_or_else(|| Serial::Because("the routine offers no handle for another thread".into()))?;
    let bounds = [0, path.increments.len() / 2, path.increments.len()];
    let walked =
        walk_path(&mut *probing[0], driver, path, settings, &bounds, Vec::new()).map_err(Serial::Faulted)?;
    thread_safety(&mut probing, &walked.probes).map_err(Serial::from)
}

/// Where the shares of `threads` threads begin, and the path's end, so that the threads
/// finish together. `w` is what checking one increment costs in routine calls, `probe` the
/// calls of the probe. The first thread checks from the path's start at once; the second
/// walks the whole path with base calls (n calls), probes, then checks its share; a later
/// thread starts when the walk passes its share's start (s_t calls), checks the increment
/// before its share and then its share.
pub fn shares(increments: usize, threads: usize, w: f64, probe: f64) -> Vec<usize> {
    shares_and_time(increments, threads, w, probe).0
}

/// [`shares`], and the time the slowest thread takes, in calls.
fn shares_and_time(increments: usize, threads: usize, w: f64, probe: f64) -> (Vec<usize>, f64) {
    let (n, w) = (increments as f64, w.max(1.0));
    // The starts for a common finishing time c (in calls).
    let starts = |c: f64| {
        let mut s = vec![0.0, (c / w).min(n)];
        for t in 1..threads.saturating_sub(1) {
            let at = s[t];
            let busy = if t == 1 { n + probe } else { at + w };
            s.push((at + (c - busy).max(0.0) / w).min(n));
        }
        s.truncate(threads);
        s
    };
    let (mut lo, mut hi) = (0.0, (n + probe) * w + n + probe);
    for _ in 0..200 {
        let c = 0.5 * (lo + hi);
        let s = starts(c);
        let last = s[threads - 1];
        let busy = match threads {
            1 => 0.0,
            2 => n + probe,
            _ => last + w,
        };
        if busy + (n - last) * w > c {
            lo = c;
        } else {
            hi = c;
        }
    }
    let mut b: Vec<usize> = starts(hi).iter().map(|x| x.round() as usize).collect();
    // Every thread beyond the first checks at least one increment.
    for t in 1..threads {
        b[t] = b[t].max(b[t - 1] + 1).min(increments.saturating_sub(threads - t));
    }
    b.push(increments);
    // The time of the slowest thread, with the shares as they are.
    let time = (0..threads)
        .map(|t| {
            let before = match t {
                0 => 0.0,
                1 => n + probe,
                _ => b[t] as f64 + w,
            };
            before + (b[t + 1] - b[t]) as f64 * w
        })
        .fold(0.0, f64::max);
    (b, time)
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

/// Check `job.path` on the caller's thread and one more thread per handle of `plan` beyond the
/// first, in shares; the chunks in path order. The caller's counts are left as they were: the
/// chunks carry theirs.
///
/// The first thread checks its share at once. The second walks the whole path with base
/// calls on a handle of its own (passing each later thread the start of its share as it gets
/// there, and keeping a fingerprint of every increment's end state), probes the routine
/// ([`thread_safety`]) and, when it passed, checks its share. After the threads, every checked
/// increment's end state is compared with the walk's. A failed probe, a difference or a
/// faulted walk stops the threads at their next increment and gives [`Serial`]: the check is
/// then to be made on one thread.
///
/// `progress` is told, on the caller's thread, how many increments the threads have checked
/// so far (all shares together): after each increment of the caller's own share, and then
/// whenever another thread finishes or at least every tenth of a second until all have.
pub fn walk(
    caller: &mut Caller<'_>,
    plan: Plan,
    job: Job<'_>,
    progress: &mut dyn FnMut(usize),
) -> Result<Vec<Chunk>, Serial> {
    // Every thread calls a handle of the plan's; the caller's routine only takes the guards'
    // extra calls of a check that stands.
    use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
    use std::sync::mpsc;
    let Job { info, props, start, path, settings, .. } = job;
    // Increments checked by all threads so far, and the caller's thread, woken by each
    // thread as it finishes (for `progress`).
    let done = AtomicUsize::new(0);
    let me = std::thread::current();
    let threads = plan.threads();
    let w = calls_per_increment(settings, info.convention.ncomp());
    let b = shares(path.increments.len(), threads, w, PROBE_CALLS as f64);
    let Plan { handles, mut probing } = plan;
    let driver = Driver::new(info, props, start.clone()).map_err(|e| Serial::Faulted(e.to_string()))?;
    let stop = AtomicBool::new(false);
    let (senders, receivers): (Vec<_>, Vec<_>) = (2..threads).map(|_| mpsc::channel()).unzip();
    let mut handles = handles.into_iter();
    let mut first = handles.next().expect("a plan has a handle for the first thread");
    let mut second = handles.next().expect("a plan has a handle for a second thread");
    let (b, stop, driver, done, me) = (&b, &stop, &driver, &done, &me);
    let (chunks, extras, walked) = std::thread::scope(|s| {
        let walker = s.spawn(move || {
            let walked = (move || {
                let walked = walk_path(&mut *probing[0], driver, path, settings, b, senders);
                let mut walked = match walked {
                    Ok(walked) => walked,
                    Err(fault) => {
                        stop.store(true, Ordering::Relaxed);
                        return Err(Serial::Faulted(fault));
                    }
                };
                if let Err(failure) = thread_safety(&mut probing, &walked.probes) {
                    stop.store(true, Ordering::Relaxed);
                    return Err(Serial::from(failure));
                }
                drop(probing);
                let from = walked.second.take();
                let at = Shared { stop, done };
                let chunk = share(&mut Caller::new(&mut *second), job, b[1]..b[2], from, at, &mut |_| {});
                let extra = second.guard_extra_calls() - chunk.before_extra_calls;
                Ok((chunk, extra, walked.fingerprints))
            })();
            me.unpark();
            walked
        });
        let mut joins = Vec::new();
        for ((t, mut h), rx) in handles.enumerate().zip(receivers) {
            let range = b[t + 2]..b[t + 3];
            joins.push(s.spawn(move || {
                // No start when the walk stopped before the share.
                let Ok(from) = rx.recv() else {
                    me.unpark();
                    return None;
                };
                let at = Shared { stop, done };
                let chunk = share(&mut Caller::new(&mut *h), job, range, Some(from), at, &mut |_| {});
                let extra = h.guard_extra_calls() - chunk.before_extra_calls;
                me.unpark();
                Some((chunk, extra))
            }));
        }
        let at = Shared { stop, done };
        let chunk = share(&mut Caller::new(&mut *first), job, b[0]..b[1], None, at, progress);
        let mut extras = first.guard_extra_calls();
        // The other threads' progress, until they have all finished.
        while !(walker.is_finished() && joins.iter().all(std::thread::ScopedJoinHandle::is_finished)) {
            progress(done.load(Ordering::Relaxed));
            std::thread::park_timeout(std::time::Duration::from_millis(100));
        }
        let walked = walker.join().unwrap_or_else(|p| std::panic::resume_unwind(p));
        let mut out = vec![chunk];
        let fingerprints = walked.map(|(chunk, extra, fingerprints)| {
            out.push(chunk);
            extras += extra;
            fingerprints
        });
        for j in joins {
            if let Some((chunk, extra)) = j.join().unwrap_or_else(|p| std::panic::resume_unwind(p)) {
                extras += extra;
                out.push(chunk);
            }
        }
        (out, extras, fingerprints)
    });
    let fingerprints = walked?;
    let mut checked = Vec::with_capacity(fingerprints.len());
    for c in &chunks {
        checked.extend_from_slice(&c.checked);
        if !c.complete {
            break;
        }
    }
    if let Some(k) = checked.iter().zip(&fingerprints).position(|(a, b)| a != b) {
        return Err(Serial::Because(format!(
            "increment {} ended in another state within the check than in a walk of the path with base calls \
             only (bit for bit): the routine's results depend on the calls made before (static or SAVE \
             variables) or at the same time on other threads",
            k + 1
        )));
    }
    // The guards' reruns on the threads' handles count for the check, as on one thread.
    caller.absorb_guard_extra_calls(extras);
    Ok(chunks)
}

/// What the threads of a check share: the flag that stops them, and the count of increments
/// they have checked.
#[derive(Clone, Copy)]
struct Shared<'a> {
    stop: &'a std::sync::atomic::AtomicBool,
    done: &'a std::sync::atomic::AtomicUsize,
}

/// One thread's share: from the path's start (`from` none), or from the walk's driver and
/// branches at the increment before the share, which is checked for its tangent (and to make
/// the calls one thread makes before the share's first); then its increments checked, until
/// `at.stop` is set, each counted in `at.done` and the count told to `progress`.
fn share(
    caller: &mut Caller<'_>,
    job: Job<'_>,
    range: Range<usize>,
    from: Option<(Driver, Branches)>,
    at: Shared<'_>,
    progress: &mut dyn FnMut(usize),
) -> Chunk {
    let stop = at.stop;
    let Job { info, props, start, path, settings, keep } = job;
    let incomplete = Chunk {
        collected: Collector::new(settings, keep, 0),
        notes: Vec::new(),
        unloaded: false,
        first_elastic: None,
        real_calls: 0,
        complex_calls: 0,
        complete: false,
        checked: Vec::new(),
        before_extra_calls: 0,
        changed: increment::ChangedStarts::default(),
    };
    let extra0 = caller.guard_extra_calls();
    let mut walk = match from {
        None => {
            let Ok(driver) = Driver::new(info, props, start.clone()) else {
                return incomplete;
            };
            increment::Walk::new(driver, settings)
        }
        Some((driver, reached)) => {
            let mut walk = increment::Walk::new(driver, settings);
            walk.reached = reached;
            let quiet = Settings { diagnose: false, first_calls: false, ..settings.clone() };
            let k = range.start - 1;
            if walk.set(k, &path.increments[k], caller).0.is_err() {
                return incomplete;
            }
            match judge::check_call(&mut walk.driver, caller, &quiet, None) {
                Ok(cc) => {
                    walk.set_previous(cc.best.as_ref().map(|(_, t)| &t[..]));
                    if settings.first_calls {
                        walk.reached.first(cc.reported_branch, cc.state_changed);
                    }
                }
                Err(_) => return incomplete,
            }
            walk.driver.advance();
            walk
        }
    };
    let before_extra_calls = caller.guard_extra_calls() - extra0;
    let (real0, cplx0) = (caller.real_calls, caller.complex_calls);
    let mut collected = Collector::new(settings, keep, range.len());
    let (mut notes, mut unloaded, mut first_elastic) = (Vec::new(), false, None);
    let mut complete = true;
    let mut checked = Vec::with_capacity(range.len());
    for k in range {
        if stop.load(std::sync::atomic::Ordering::Relaxed) {
            complete = false;
            break;
        }
        let step = walk.step(k, &path.increments[k], caller, &mut collected);
        unloaded |= step.unloaded;
        notes.extend(step.note);
        if step.checked && first_elastic.is_none() && !step.state_changed {
            first_elastic = Some((walk.best().map(<[f64]>::to_vec), notes.len()));
        }
        if step.stops {
            complete = false;
            break;
        }
        checked.push(fingerprint(walk.driver.start()));
        progress(at.done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1);
    }
    Chunk {
        collected,
        notes,
        unloaded,
        first_elastic,
        real_calls: caller.real_calls - real0,
        complex_calls: caller.complex_calls - cplx0,
        complete,
        checked,
        before_extra_calls,
        changed: std::mem::take(&mut walk.changed),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn threads_are_used_only_where_they_pay_for_the_walk_and_the_probe() {
        // The default schemes on 6 components: 23 calls an increment.
        let w = calls_per_increment(&Settings::default(), 6);
        assert_eq!(w, 23.0);
        assert!(!worth_threads(80, 2, w));
        assert!(!worth_threads(150, 2, w));
        assert!(worth_threads(400, 2, w));
        assert!(worth_threads(20_000, 2, w));
        assert!(worth_threads(20_000, 8, w));
        // Three threads on a short path: the second one's walk and probe alone take longer
        // than one thread's check.
        assert!(!worth_threads(96, 3, w));
        assert!(!worth_threads(100, 4, w));
        for (n, t) in [(96, 3), (300, 3), (300, 4), (1_000, 8), (20_000, 3)] {
            let (b, time) = shares_and_time(n, t, w, PROBE_CALLS as f64);
            // No thread takes longer than the time given: the second never less than the walk,
            // the probe and its share.
            assert!(time >= n as f64 + PROBE_CALLS as f64 + (b[2] - b[1]) as f64 * w, "{n}, {t}: {b:?}");
            assert!(time >= (b[1] - b[0]) as f64 * w, "{n}, {t}: {b:?}");
        }
        // The smallest path worth two threads, against the balance of `shares`: the first
        // thread's share (s·w) and the second's walk, probe and share (n + probe + (n − s)·w)
        // take at most 0.8 of one thread's n·w.
        let least = (1..2_000).find(|n| worth_threads(*n, 2, w)).unwrap();
        assert_eq!(least, 160, "the README gives this figure");
        let probe = PROBE_CALLS as f64;
        let time = |n: f64| (n * (w + 1.0) + probe) / 2.0;
        assert!(time(least as f64) <= 0.8 * least as f64 * w + w, "{least}");
        assert!(time((least - 1) as f64) > 0.8 * (least - 1) as f64 * w - w, "{least}");
    }

    #[test]
    fn shares_cover_the_path_and_the_threads_finish_together() {
        let (w, p) = (20.0, 2_000.0);
        for (n, t) in [(20_000, 2), (20_000, 3), (20_000, 4), (100_000, 2)] {
            let b = shares(n, t, w, p);
            assert_eq!(b.len(), t + 1);
            assert_eq!((b[0], b[t]), (0, n));
            assert!(b.windows(2).all(|x| x[0] < x[1]), "{b:?}");
            let len: Vec<f64> = b.windows(2).map(|x| (x[1] - x[0]) as f64).collect();
            // What each thread does before its share: nothing, the walk and the probe, the
            // walk to its share's start and the increment before it.
            let cost: Vec<f64> = (0..t)
                .map(|k| match k {
                    0 => 0.0,
                    1 => n as f64 + p,
                    _ => b[k] as f64 + w,
                } + w * len[k])
                .collect();
            let (lo, hi) = cost.iter().fold((f64::MAX, 0.0f64), |(l, h), c| (l.min(*c), h.max(*c)));
            assert!(hi - lo <= 2.0 * w, "{n} increments, {t} threads: {cost:?}");
        }
        // A path too short for the probe to pay: every thread still checks an increment.
        for (n, t) in [(64, 2), (100, 3), (96, 3)] {
            let b = shares(n, t, w, p);
            assert_eq!((b[0], b[t]), (0, n));
            assert!(b.windows(2).all(|x| x[0] < x[1]), "{b:?}");
        }
    }
}
