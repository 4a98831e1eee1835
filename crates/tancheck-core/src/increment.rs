//! One increment of a check along a path: the mixed-control solve when the increment holds
//! stresses, the per-call check of [`judge::check_call`], the full memory guards on the first
//! call of a newly reached branch, and the move to the next start state. The serial walk of
//! [`crate::check::run`] and the threads of [`crate::concurrent`] both check an increment
//! with [`Walk::step`], so that their results are the same.

use crate::call_check as judge;
use crate::driver::Driver;
use crate::first_calls;
use crate::mixed;
use crate::path::PathIncrement;
use crate::report::{CallRecord, FaultRecord, IncrementResult};
use crate::routine::{Caller, Fault};
use crate::settings::Settings;

/// What one increment leaves for the report and for the increments after it.
pub struct Step {
    pub result: IncrementResult,
    /// The base call returned (the per-call check ran), faulted later or not.
    pub checked: bool,
    /// The best numerical tangent of the increment (see [`judge::CallCheck::best`]).
    pub best: Option<Vec<f64>>,
    /// The strain increment opposed the stress at the start (unloading).
    pub unloaded: bool,
    /// A note for the report (a mixed-control solve that did not converge).
    pub note: Option<String>,
}

impl Step {
    /// The path stops after this increment (a fault).
    pub fn stops(&self) -> bool {
        self.result.fault.is_some()
    }
}

/// Routine positions and targets of the stress components a mixed-control increment holds.
pub fn held_components(conv: &crate::Convention, hold: &[Option<f64>; 6]) -> (Vec<usize>, Vec<f64>) {
    let mut controlled = Vec::new();
    let mut targets = Vec::new();
    for (i, c) in conv.order().iter().enumerate() {
        if let Some(t) = hold[crate::convention::canonical_slot(*c)] {
            controlled.push(i);
            targets.push(t);
        }
    }
    (controlled, targets)
}

/// An increment set on the driver: the solve's fault if any, its log and a note for the report.
pub type Settled = (Result<(), Fault>, Option<mixed::SolveLog>, Option<String>);

/// A walk along a path: the driver, the settings, the branches reached so far and the
/// strain-increment scratch. The serial walk and each thread's share step through one, so that
/// their steps are the same code.
pub struct Walk<'s> {
    pub driver: Driver,
    settings: &'s Settings,
    /// The branches reached so far (a newly reached one gets the full guards).
    pub reached: first_calls::Branches,
    /// Scratch of the routine's length for the strain increment.
    dstrain: Vec<f64>,
}

impl<'s> Walk<'s> {
    /// A walk from the driver's start, no branch reached yet.
    pub fn new(driver: Driver, settings: &'s Settings) -> Walk<'s> {
        let dstrain = vec![0.0; driver.ncomp()];
        Walk { driver, settings, reached: first_calls::Branches::default(), dstrain }
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
                    "increment {}: the mixed-control solve did not converge (residuals {:?}); the increment is checked where it stopped",
                    k + 1,
                    log.residuals
                )
            });
                (Ok(()), Some(log), note)
            }
            Err(f) => (Err(f), None, None),
        }
    }

    /// Check increment `k` (0-based) from the driver's start state and move the driver to its
    /// end when it passed without a fault. `previous` is the best numerical tangent of the
    /// increment before.
    pub fn step(
        &mut self,
        k: usize,
        inc: &PathIncrement,
        caller: &mut Caller<'_>,
        previous: Option<&[f64]>,
    ) -> Step {
        let (solved, solve_log, note) = self.set(k, inc, caller);
        let (driver, settings) = (&mut self.driver, self.settings);
        let n = driver.ncomp();
        let work: f64 = (0..n).map(|i| driver.start().stress[i] * driver.dstrain()[i]).sum();
        let unloaded = work < 0.0;
        // The base call, every scheme, and the diagnosis of a failure: one call's check.
        let checked = solved.and_then(|()| judge::check_call(driver, caller, settings, previous));
        let mut cc = match checked {
            Err(fault) => {
                let result =
                    record(k, driver, solve_log, None, None, Some(judge::fault_record(&fault, driver, None)));
                return Step { result, checked: false, best: None, unloaded, note };
            }
            Ok(cc) => cc,
        };
        let guarded = if settings.first_calls && self.reached.first(cc.reported_branch, cc.state_changed) {
            first_calls::full_guard(driver, caller).err()
        } else {
            None
        };
        let best = cc.best.take().map(|(_, t)| t);
        if let Some(fault) = guarded {
            let result = record(k, driver, solve_log, Some(cc), None, Some(*fault));
            return Step { result, checked: true, best, unloaded, note };
        }
        // Non-finite outputs carry the inputs of the call, as a crash does.
        let non_finite_call = (!cc.non_finite.is_empty()).then(|| judge::call_record(driver, None));
        driver.advance();
        let result = record(k, driver, solve_log, Some(cc), non_finite_call, None);
        Step { result, checked: true, best, unloaded, note }
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
