//! Rerunning the call of a parsed case: a driver holding exactly its inputs, the bit-for-bit
//! comparison with the saved outputs, the check with the saved settings and the path walk.

use super::*;
use crate::call_check::{self as judge, CallCheck};
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::Path;
use crate::routine::{Caller, RoutineInfo};
use crate::settings::Settings;

/// A driver holding exactly the call of a case: its start state, increment and increment
/// number (not yet called), and no path before it (see [`Driver::set_origin`]).
pub fn driver_for(info: &RoutineInfo, call: &DecodedCall) -> Result<Driver, CoreError> {
    let mut d = Driver::new(info, &call.props, call.start.clone())?;
    d.set_origin(None);
    // The driver numbers increments as they are set; set this one until it has its number.
    for _ in 0..call.increment {
        d.set_increment(&call.dstrain, call.dtemp, call.dtime);
    }
    Ok(d)
}

/// The result of a replay.
#[derive(Clone, Debug)]
pub struct Replay {
    /// What the call returned now (NaN where it wrote nothing).
    pub outputs: DecodedOutputs,
    /// The call's fault, if it faulted.
    pub fault: Option<String>,
    /// Outputs whose bits differ from the case's, e.g. "tangent[7]: 1.2e5 now, 1.3e5 in the case".
    pub differences: Vec<String>,
    /// The check of the call now (none when the call faulted).
    pub check: Option<CallCheck>,
    /// Whether walking the case's path from its start reaches the call's start state and
    /// increment number bit for bit (none when the case has no path, or when asked not to).
    pub path_leads_here: Option<Result<(), CoreError>>,
}

impl Replay {
    /// The stress, state, tangent, status and branch are those of the case, bit for bit.
    pub fn identical(&self) -> bool {
        self.differences.is_empty()
    }
}

fn differences(now: &DecodedOutputs, then: &DecodedOutputs) -> Vec<String> {
    let mut out = Vec::new();
    if now.status != then.status {
        out.push(format!("status: {} now, {} in the case", now.status, then.status));
    }
    if now.branch != then.branch {
        out.push(format!("branch: {} now, {} in the case", now.branch, then.branch));
    }
    let mut arrays = vec![
        ("stress", &now.stress, &then.stress),
        ("state", &now.state, &then.state),
        ("tangent", &now.tangent, &then.tangent),
    ];
    if let (Some(a), Some(b)) = (&now.dstress_dtemp, &then.dstress_dtemp) {
        arrays.push(("dstress_dtemp", a, b));
    }
    for (what, a, b) in arrays {
        let diff: Vec<usize> =
            (0..a.len().min(b.len())).filter(|&i| a[i].to_bits() != b[i].to_bits()).collect();
        if let Some(&i) = diff.first() {
            out.push(format!(
                "{what}[{i}]: {:e} now, {:e} in the case{}",
                a[i],
                b[i],
                if diff.len() > 1 { format!(" ({} entries differ)", diff.len()) } else { String::new() }
            ));
        }
    }
    out
}

/// Rerun the call of a case through `caller` (a routine with the case's sizes and
/// convention): the call itself with exactly the saved inputs, compared bit for bit with the
/// saved outputs, then its check with the case's settings. With `walk_path`, also walk the
/// case's path (when it has one) to see that it leads to the call.
pub fn replay(caller: &mut Caller<'_>, case: &ParsedCase, walk_path: bool) -> Result<Replay, CoreError> {
    let info = caller.info().clone();
    let mut driver = driver_for(&info, &case.call)?;
    // The diagnosis's initial stiffness is that of the path's start, as in the check.
    driver.set_origin(case.path.as_ref().map(|(start, _)| start.clone()));
    let base = driver.base_call(caller);
    let b = &driver.base;
    let outputs = DecodedOutputs {
        status: b.outcome.status,
        branch: b.outcome.branch,
        stress: b.stress.clone(),
        state: b.state.clone(),
        tangent: b.tangent.clone(),
        dstress_dtemp: b
            .outcome
            .provides(crate::routine::provides::DSTRESS_DTEMP)
            .then(|| b.dstress_dtemp.clone()),
    };
    let mut fault = base.as_ref().err().map(|f| f.to_string());
    let diffs = differences(&outputs, &case.outputs);
    let check = if fault.is_none() {
        match judge::check_call(&mut driver, caller, &case.case.probe.settings, case.previous.as_deref()) {
            Ok(c) => Some(c),
            Err(f) => {
                fault = Some(format!("a call of the check: {f}"));
                None
            }
        }
    } else {
        None
    };
    let path_leads_here = match (&case.path, walk_path) {
        (Some((start, path)), true) => {
            Some(walk(caller, &info, &case.case.probe.settings, &case.call, start, path))
        }
        _ => None,
    };
    Ok(Replay { outputs, fault, differences: diffs, check, path_leads_here })
}

fn walk(
    caller: &mut Caller<'_>,
    info: &RoutineInfo,
    settings: &Settings,
    call: &DecodedCall,
    start: &PointState,
    path: &Path,
) -> Result<(), CoreError> {
    let last = path.increments.len();
    let mut d = Driver::new(info, &call.props, start.clone())?;
    let conv = &info.convention;
    let mut dstrain = vec![0.0; conv.ncomp()];
    for (k, inc) in path.increments.iter().enumerate() {
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        d.set_increment(&dstrain, inc.dtemp, inc.dtime);
        if k + 1 == last {
            if inc.hold_stress.is_some() {
                crate::bisect::base_call_of(&mut d, caller, inc, settings)
                    .map_err(|fault| CoreError::PathFault { increment: k + 1, fault })?;
            }
            break;
        }
        crate::bisect::base_call_of(&mut d, caller, inc, settings)
            .map_err(|fault| CoreError::PathFault { increment: k + 1, fault })?;
        d.advance();
    }
    let s = d.start();
    let same =
        |a: &[f64], b: &[f64]| a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x.to_bits() == y.to_bits());
    let mut off = Vec::new();
    for (what, a, b) in [
        ("strain", &s.strain, &call.start.strain),
        ("stress", &s.stress, &call.start.stress),
        ("state", &s.state, &call.start.state),
        ("dstrain", &d.dstrain().to_vec(), &call.dstrain),
    ] {
        if !same(a, b) {
            off.push(what);
        }
    }
    if s.temp.to_bits() != call.start.temp.to_bits() || d.dtemp().to_bits() != call.dtemp.to_bits() {
        off.push("temperature");
    }
    if s.time.to_bits() != call.start.time.to_bits() || d.dtime().to_bits() != call.dtime.to_bits() {
        off.push("time");
    }
    if d.increment() != call.increment {
        off.push("increment number");
    }
    if off.is_empty() {
        Ok(())
    } else {
        Err(CoreError::PathMissesCall { differ: off })
    }
}
