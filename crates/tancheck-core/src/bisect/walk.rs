//! Along the path: the first failing increment of a report, and a driver rebuilt at its start
//! by walking the path with base calls as the check walks it.

use crate::call_check;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::{Path, PathIncrement};
use crate::report::{IncrementResult, Report};
use crate::routine::{Caller, Fault};
use crate::settings::Settings;

/// The first increment of the path that did not pass (the zero increment a default check makes
/// from the start state, reported as increment 0, is not on the path and has nothing to bisect).
pub fn first_failure(report: &Report) -> Option<&IncrementResult> {
    report.increments.iter().find(|i| i.index != crate::first_calls::ZERO_INCREMENT_INDEX && !i.passed())
}

/// The base call of the increment the driver holds (set from `inc`), as [`crate::check::run`]
/// makes it: plain for a strain-controlled increment, by the mixed-control solve for one
/// that holds stresses (the solved strain increment then stays in the driver).
pub fn base_call_of(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    inc: &PathIncrement,
    settings: &Settings,
) -> Result<(), Fault> {
    match &inc.hold_stress {
        None => driver.base_call(caller),
        Some(hold) => {
            let conv = caller.info().convention.clone();
            let (controlled, targets) = crate::check::held_components(&conv, hold);
            crate::mixed::solve(driver, caller, &controlled, &targets, &settings.mixed, true).map(|_| ())
        }
    }
}

/// A driver at the start of increment `index` (1-based) of `path` from `start`, with that
/// increment set (its base call made, which may have faulted: for a mixed-control increment
/// that solves the held components), and the best numerical tangent at the end of the increment
/// before it (the tangent at the start of this one; `None` for the first). The path is walked
/// with base calls, as [`crate::check::run`] walks it, so the start state has the same bits.
pub fn driver_at(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    index: usize,
    settings: &Settings,
) -> Result<(Driver, Option<Vec<f64>>), CoreError> {
    if index == 0 || index > path.increments.len() {
        return Err(CoreError::NotOnPath { index, count: path.increments.len() });
    }
    let info = caller.info().clone();
    let conv = info.convention.clone();
    let mut driver = Driver::new(&info, props, start)?;
    let mut dstrain = vec![0.0; conv.ncomp()];
    let mut previous = None;
    let mut quick = settings.clone();
    quick.diagnose = false;
    for (k, inc) in path.increments.iter().enumerate().take(index) {
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        driver.set_increment(&dstrain, inc.dtemp, inc.dtime);
        let fail = |fault: Fault| CoreError::WalkFailed { target: index, increment: k + 1, fault };
        let base = base_call_of(&mut driver, caller, inc, settings);
        if k + 1 == index {
            // The call of the increment itself may fault: that is what is being looked at.
            break;
        }
        base.map_err(fail)?;
        if k + 2 == index {
            let c = call_check::check_call(&mut driver, caller, &quick, None).map_err(fail)?;
            previous = c.best.map(|(_, t)| t);
        }
        driver.advance();
    }
    Ok((driver, previous))
}
