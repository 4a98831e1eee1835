//! One increment of a check along a path: the mixed-control solve when the increment holds
//! stresses, the per-call check of [`judge::check_call`], the full memory guards on the first
//! call of a newly reached branch, and the move to the next start state. The serial walk of
//! [`crate::check::run`] and the threads of [`crate::concurrent`] both check an increment
//! with [`Walk::step`], so that their results are the same.

use crate::call_check as judge;
use crate::driver::{Driver, PointState};
use crate::first_calls;
use crate::mixed;
use crate::path::PathIncrement;
use crate::report::{
    CallRecord, CheckOutcome, Collector, FaultRecord, IncrementResult, Keep, PassedIncrement,
};
use crate::routine::{Caller, Fault};
use crate::settings::Settings;

/// What one increment leaves for the increments after it (its result went to the collector).
pub struct Step {
    /// The base call returned (the per-call check ran), faulted later or not.
    pub checked: bool,
    /// The state variables changed in the increment.
    pub state_changed: bool,
    /// The path stops after this increment (a fault).
    pub stops: bool,
    /// The strain increment opposed the stress at the start (unloading).
    pub unloaded: bool,
    /// A note for the report (a mixed-control solve that did not converge).
    pub note: Option<String>,
}

/// Words of an increment's note when its mixed-control solve did not converge (the check's
/// coverage warning counts these notes).
pub(crate) const HELD_NOT_REACHED: &str = "the held stresses were not reached";

pub use crate::mixed::held_components;

/// The start states of the first increment after the first that changed the state variables
/// and of the last one, with their 1-based numbers, kept by a walk whose settings make the
/// first-call looks: the look at the time increment after the check starts there instead of
/// walking the path again from its start (it made a second base call of every increment up
/// to the last that changed the state).
#[derive(Clone, Debug, Default)]
pub struct ChangedStarts {
    pub first: Option<(usize, PointState)>,
    pub last: Option<(usize, PointState)>,
}

impl ChangedStarts {
    /// The first of `self`'s and the last of `later`'s (a later share of the same path).
    pub fn then(self, later: ChangedStarts) -> ChangedStarts {
        match (self.first.is_some(), later.first.is_some()) {
            (_, false) => self,
            (false, true) => later,
            (true, true) => ChangedStarts { first: self.first, last: later.last.or(later.first) },
        }
    }
}

/// An increment set on the driver: the solve's fault if any, its log and a note for the report.
pub type Settled = (Result<(), Fault>, Option<mixed::SolveLog>, Option<String>);

/// A walk along a path: the driver, the settings, the branches reached so far, the best
/// numerical tangent of the last increment and the strain-increment scratch. The serial walk
/// and each thread's share step through one, so that their steps are the same code.
pub struct Walk<'s> {
    pub driver: Driver,
    settings: &'s Settings,
    /// The branches reached so far (a newly reached one gets the full guards).
    pub reached: first_calls::Branches,
    /// Scratch of the routine's length for the strain increment.
    dstrain: Vec<f64>,
    /// The best numerical tangent of the last increment (see [`judge::CallCheck::best`]),
    /// n × n, when `has_best`; kept in place (no allocation per increment).
    best: Vec<f64>,
    has_best: bool,
    /// `best` is the tangent at the start of the next increment, for its stale-tangent
    /// hypothesis (not after a fault).
    best_is_previous: bool,
    /// The start states kept for the look at the time increment (with first-call looks only).
    pub changed: ChangedStarts,
    /// The start state of the increment being stepped (scratch, reused).
    step_start: Option<PointState>,
}

impl<'s> Walk<'s> {
    /// A walk from the driver's start, no branch reached yet.
    pub fn new(driver: Driver, settings: &'s Settings) -> Walk<'s> {
        let n = driver.ncomp();
        Walk {
            driver,
            settings,
            reached: first_calls::Branches::default(),
            dstrain: vec![0.0; n],
            best: vec![0.0; n * n],
            has_best: false,
            best_is_previous: false,
            changed: ChangedStarts::default(),
            step_start: None,
        }
    }

    /// The best numerical tangent of the last increment, if it measured one.
    pub fn best(&self) -> Option<&[f64]> {
        self.has_best.then_some(&self.best[..])
    }

    /// Take `best` as the best numerical tangent at the end of the increment before the next
    /// one (a thread's share starts after increments it walked without checking them all).
    pub fn set_previous(&mut self, best: Option<&[f64]>) {
        self.keep_best(best);
        self.best_is_previous = self.has_best;
    }

    fn keep_best(&mut self, best: Option<&[f64]>) {
        self.has_best = best.is_some();
        if let Some(b) = best {
            self.best.copy_from_slice(b);
        }
    }

    /// Set increment `k` (0-based) of the path on the driver, solving for the strain increment
    /// when it holds stresses.
    pub fn set(&mut self, k: usize, inc: &PathIncrement, caller: &mut Caller<'_>) -> Settled {
        caller.info().convention.strain_from_canonical(&inc.dstrain, &mut self.dstrain);
        let (driver, settings) = (&mut self.driver, self.settings);
        driver.set_increment(&self.dstrain, inc.dtemp, inc.dtime);
        let Some(hold) = &inc.hold_stress else {
            return (Ok(()), None, None);
        };
        let (controlled, targets) = held_components(&caller.info().convention, hold);
        match mixed::solve(driver, caller, &controlled, &targets, &settings.mixed, true) {
            Ok(log) => {
                let note = (!log.converged).then(|| {
                format!(
                    "increment {}: the mixed-control solve did not converge (residuals {:?}); {HELD_NOT_REACHED}, and the increment is checked at the iterate closest to them",
                    k + 1,
                    log.residuals
                )
            });
                (Ok(()), Some(log), note)
            }
            Err(f) => (Err(f), None, None),
        }
    }

    /// Check increment `k` (0-based) from the driver's start state, add its result to
    /// `collected` and move the driver to its end when it passed without a fault. The best
    /// numerical tangent of the increment before is the stale-tangent hypothesis's.
    ///
    /// When `collected` keeps only the failures in detail, an increment that passed every
    /// check goes in as a few numbers ([`judge::Measurement::passed`],
    /// [`Collector::push_passed`]): the same record and summaries, without the report
    /// structures of the full judgement.
    pub fn step(
        &mut self,
        k: usize,
        inc: &PathIncrement,
        caller: &mut Caller<'_>,
        collected: &mut Collector,
    ) -> Step {
        if self.settings.first_calls && k > 0 {
            // The increment's start, kept in place (no allocation after the first).
            match &mut self.step_start {
                Some(s) => s.clone_from(self.driver.start()),
                None => self.step_start = Some(self.driver.start().clone()),
            }
        }
        let step = self.step_judged(k, inc, caller, collected);
        if step.state_changed && !step.stops && k > 0 {
            if let Some(s) = &self.step_start {
                let c = &mut self.changed;
                if c.first.is_none() {
                    c.first = Some((k + 1, s.clone()));
                } else {
                    match &mut c.last {
                        Some((at, kept)) => {
                            *at = k + 1;
                            kept.clone_from(s);
                        }
                        None => c.last = Some((k + 1, s.clone())),
                    }
                }
            }
        }
        step
    }

    /// [`Walk::step`] without keeping its start state.
    fn step_judged(
        &mut self,
        k: usize,
        inc: &PathIncrement,
        caller: &mut Caller<'_>,
        collected: &mut Collector,
    ) -> Step {
        let (solved, solve_log, note) = self.set(k, inc, caller);
        let Walk { driver, settings, best, best_is_previous, reached, .. } = self;
        let settings: &Settings = settings;
        let n = driver.ncomp();
        let work: f64 = (0..n).map(|i| driver.start().stress[i] * driver.dstrain()[i]).sum();
        // A start stress that is not a number cannot tell loading from unloading; the
        // increments after it fail on their non-finite outputs, and "the path never unloaded"
        // would claim what no one can know (a sweep's routine gave it on a path that unloads).
        let unloaded = work < 0.0 || work.is_nan();
        let previous = best_is_previous.then_some(&best[..]);
        // The base call and every scheme; then the judgement: a few numbers for an increment
        // that passed (when only failures are kept in detail), else the full one with the
        // diagnosis of a failure.
        let measured = solved.and_then(|()| judge::measure_call(driver, caller, settings));
        let me = match measured {
            Ok(me) => me,
            Err(fault) => return self.faulted(k, fault, solve_log, unloaded, note, collected),
        };
        // Columns made one-sided around a refused call are said in the report's notes.
        let note = match (note, me.one_sided_note(k + 1)) {
            (Some(a), Some(b)) => Some(format!("{a}; {b}")),
            (a, b) => a.or(b),
        };
        let (branch, state_changed) = (me.reported_branch(), me.state_changed);
        let dtemp_checked = me.returns_dtemp();
        // A newly reached branch gets the full guards after its judgement; the increment is
        // then judged in full (once per branch), as one whose guards find a fault must be.
        let new_branch = settings.first_calls && reached.first(branch, state_changed);
        let passed = if collected.keep() == Keep::Failures && !new_branch {
            me.passed(driver, &caller.info().convention, settings)
        } else {
            None
        };
        // The best tangent leaves the measurement before the judgement (which still reads the
        // previous one).
        let mut new_best = [0.0; 36];
        let has_new_best = me.best().map(|b| new_best[..b.len()].copy_from_slice(b)).is_some();
        let cc = match passed {
            Some(_) => None,
            None => match judge::judge(me, driver, caller, settings, previous) {
                Ok(cc) => Some(cc),
                Err(fault) => {
                    // A call of the diagnosis: its own inputs, not the base call's.
                    let call = caller.take_faulted();
                    return self.faulted_in(k, fault, call, solve_log, unloaded, note, collected);
                }
            },
        };
        let guarded = if new_branch { first_calls::full_guard(driver, caller).err() } else { None };
        self.keep_best(has_new_best.then_some(&new_best[..n * n]));
        let driver = &mut self.driver;
        if let Some(fault) = guarded {
            let mut cc = cc.expect("a newly reached branch is judged in full");
            // The fault speaks for the increment: a diagnosis made from the calls of a routine
            // that reads past its inputs or does not repeat itself names a cause it does not
            // have (a kink, from calls the history had changed).
            cc.diagnosis = None;
            collected.push(record(k, driver, solve_log, Some(cc), None, Some(*fault)));
            self.best_is_previous = false;
            return Step { checked: true, state_changed, stops: true, unloaded, note };
        }
        self.best_is_previous = self.has_best;
        let mut note = note;
        match (cc, passed) {
            (Some(cc), _) => {
                // A comparison set aside (a one-sided column at the edge of the domain where
                // the exact derivative agrees) is said in the notes too: a passing increment's
                // terminal row is folded, and its reason would show in the JSON only.
                let aside: Vec<String> = cc
                    .checks
                    .iter()
                    .flat_map(|c| {
                        [(Some(&c.tangent), "tangent"), (c.dstress_dtemp.as_ref(), "∂σ/∂T")]
                            .into_iter()
                            .filter_map(move |(o, what)| match o {
                                Some(CheckOutcome::Skipped { reason }) if reason.starts_with("set aside") => {
                                    Some(format!("its {} {what} comparison is {reason}", c.scheme.name()))
                                }
                                _ => None,
                            })
                    })
                    .collect();
                if !aside.is_empty() {
                    let said = aside.join("; ");
                    note = Some(match note {
                        Some(n) => format!("{n}; {said}"),
                        None => format!("increment {}: {said}", k + 1),
                    });
                }
                // Non-finite outputs carry the inputs of the call, as a crash does, and the
                // path stops there: the next increments would start from them (it went on,
                // checking increments whose start stress was NaN; user-style sweeps).
                let non_finite_call = (!cc.non_finite.is_empty()).then(|| judge::call_record(driver, None));
                let stops = non_finite_call.is_some();
                driver.advance();
                collected.push(record(k, driver, solve_log, Some(cc), non_finite_call, None));
                if stops {
                    return Step { checked: true, state_changed, stops: true, unloaded, note };
                }
            }
            (None, Some(schemes)) => {
                driver.advance();
                let s = driver.start();
                collected.push_passed(&PassedIncrement {
                    index: k + 1,
                    branch,
                    state_changed,
                    strain: &s.strain,
                    stress: &s.stress,
                    schemes,
                    dtemp_checked,
                });
            }
            (None, None) => unreachable!("an increment is judged in full unless it passed"),
        }
        Step { checked: true, state_changed, stops: false, unloaded, note }
    }

    /// The end of an increment whose base call, solve or diagnosis faulted: the path stops.
    fn faulted(
        &mut self,
        k: usize,
        fault: Fault,
        solve_log: Option<mixed::SolveLog>,
        unloaded: bool,
        note: Option<String>,
        collected: &mut Collector,
    ) -> Step {
        self.faulted_in(k, fault, None, solve_log, unloaded, note, collected)
    }

    /// [`Walk::faulted`] for a fault of the call `call` (the driver's current call when none).
    #[allow(clippy::too_many_arguments)]
    fn faulted_in(
        &mut self,
        k: usize,
        fault: Fault,
        call: Option<crate::routine::FaultedCall>,
        solve_log: Option<mixed::SolveLog>,
        unloaded: bool,
        note: Option<String>,
        collected: &mut Collector,
    ) -> Step {
        let driver = &self.driver;
        let f = match call {
            Some(c) => {
                judge::fault_record_of_call(&fault, c, "a call of the closer look at the failed check")
            }
            None => judge::fault_record(&fault, driver, None),
        };
        collected.push(record(k, driver, solve_log, None, None, Some(f)));
        self.has_best = false;
        self.best_is_previous = false;
        Step { checked: false, state_changed: false, stops: true, unloaded, note }
    }
}

/// The record of increment `k` (0-based) at the driver's start state, from its call check
/// (none when the calls failed) and how it ended: one constructor for the three endings.
fn record(
    k: usize,
    driver: &Driver,
    solve: Option<mixed::SolveLog>,
    cc: Option<judge::CallCheck>,
    non_finite_call: Option<CallRecord>,
    fault: Option<FaultRecord>,
) -> IncrementResult {
    let (reported_branch, state_changed, checks, non_finite, diagnosis) = match cc {
        Some(cc) => (cc.reported_branch, cc.state_changed, cc.checks, cc.non_finite, cc.diagnosis),
        None => (None, false, Vec::new(), Vec::new(), None),
    };
    IncrementResult {
        index: k + 1,
        reported_branch,
        state_changed,
        strain: driver.start().strain.clone(),
        stress: driver.start().stress.clone(),
        checks,
        non_finite,
        non_finite_call,
        solve,
        diagnosis,
        fault,
    }
}

#[cfg(test)]
mod tests {
    use super::ChangedStarts;
    use crate::driver::PointState;

    fn at(k: usize) -> Option<(usize, PointState)> {
        let s = PointState { strain: vec![k as f64], stress: vec![0.0], state: vec![], temp: 0.0, time: 0.0 };
        Some((k, s))
    }

    fn numbers(c: &ChangedStarts) -> (Option<usize>, Option<usize>) {
        (c.first.as_ref().map(|f| f.0), c.last.as_ref().map(|l| l.0))
    }

    // Shares of a path walked on several threads keep what one walk along the whole path
    // keeps: the first increment (after the first) that changed the state, and the last other
    // one, whichever shares they fall in.
    #[test]
    fn shares_keep_the_first_and_the_last_change_of_the_whole_path() {
        let none = ChangedStarts::default;
        let both = |a, b| ChangedStarts { first: at(a), last: at(b) };
        let one = |a| ChangedStarts { first: at(a), last: None };
        assert_eq!(numbers(&none().then(both(5, 9))), (Some(5), Some(9)));
        assert_eq!(numbers(&both(2, 4).then(none())), (Some(2), Some(4)));
        assert_eq!(numbers(&both(2, 4).then(both(5, 9))), (Some(2), Some(9)));
        // A later share with a single change: that change is the last.
        assert_eq!(numbers(&both(2, 4).then(one(7))), (Some(2), Some(7)));
        assert_eq!(numbers(&one(2).then(one(7))), (Some(2), Some(7)));
        assert_eq!(numbers(&one(2).then(none()).then(none())), (Some(2), None));
        // The state kept is the one of that increment.
        assert_eq!(both(2, 4).then(one(7)).last.unwrap().1.strain, vec![7.0]);
    }
}
