//! What a default check looks at besides the tangent, cheaply ([`Settings::first_calls`]):
//!
//! - one zero increment from the start state (Δε = 0, ΔT = 0), whose stress, state variables
//!   and tangent must be finite numbers: a norm divided by itself, a direction normalised
//!   without a guard, shows here (NaN on a zero increment);
//! - the full memory guards on the first call of each newly reached branch (a branch is the
//!   routine's own id with whether the state variables changed, as the report labels it):
//!   the call is repeated with other poison after the end of every read-only array and the
//!   results compared bit for bit, which finds reads past the end of the properties or state
//!   variables and results that depend on the history of calls (saved variables).
//!
//! The cost is one call (two with the guards) at the start and two per branch, beside the
//! dozens of calls each increment's schemes make.
//!
//! [`Settings::first_calls`]: crate::settings::Settings::first_calls

use crate::call_check::fault_record;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::report::{FaultRecord, IncrementResult};
use crate::routine::{Caller, Fault, RoutineInfo};

/// The index [`zero_increment`] gives its result in the report: before increment 1.
pub const ZERO_INCREMENT_INDEX: usize = 0;

/// The zero increment from `start`: `None` when it gave finite outputs; else an increment
/// result (index 0) with the outputs that are not finite, or with the fault of the call.
pub fn zero_increment(
    caller: &mut Caller<'_>,
    info: &RoutineInfo,
    props: &[f64],
    start: &PointState,
    dtime: f64,
) -> Result<Option<IncrementResult>, CoreError> {
    let n = info.convention.ncomp();
    let mut d = Driver::new(info, props, start.clone())?;
    d.set_increment(&vec![0.0; n], 0.0, dtime);
    // The first call of the check: the first branch reached.
    caller.guard_next_call_fully();
    let r = d.base_call(caller);
    let mut result = IncrementResult {
        index: ZERO_INCREMENT_INDEX,
        reported_branch: (d.base.outcome.branch >= 0).then_some(d.base.outcome.branch),
        state_changed: false,
        strain: start.strain.clone(),
        stress: start.stress.clone(),
        checks: Vec::new(),
        non_finite: Vec::new(),
        non_finite_call: None,
        solve: None,
        diagnosis: None,
        fault: None,
    };
    if let Err(f) = r {
        result.fault = Some(fault_record(&f, &d, Some("zero increment from the start state".into())));
        return Ok(Some(result));
    }
    result.non_finite =
        crate::call_check::non_finite_outputs(&d, " for a zero increment from the start state");
    if result.non_finite.is_empty() {
        return Ok(None);
    }
    // Non-finite outputs carry the inputs of the call, as a crash does.
    result.non_finite_call = Some(crate::call_check::call_record(&d, None));
    Ok(Some(result))
}

/// Whether the routine's stress over the increment `inc` from `start` depends on the time
/// increment: the increment's base call made with its time increment and with twice it, the
/// stresses compared bit for bit. `None` when a call fails, the increment takes no time
/// or is under held stresses (nothing is learnt; the check meets the increment's own call
/// anyway). Two calls.
pub fn depends_on_time(
    caller: &mut Caller<'_>,
    info: &RoutineInfo,
    props: &[f64],
    start: &PointState,
    inc: &crate::path::PathIncrement,
) -> Option<bool> {
    if inc.dtime == 0.0 {
        return None;
    }
    let mut d = Driver::new(info, props, start.clone()).ok()?;
    set_solved(&mut d, caller, info, inc)?;
    d.base_call(caller).ok()?;
    let stress = d.base.stress.clone();
    d.set_dtime_keep_count(2.0 * inc.dtime);
    d.base_call(caller).ok()?;
    Some(stress.iter().zip(&d.base.stress).any(|(a, b)| a.to_bits() != b.to_bits()))
}

/// The numerical tangent of a zero increment from `start` (the complex step where the routine
/// has its twin, else central differences, at the settings' steps), when the call leaves the
/// state variables as they are: the elastic response at the start, for the conventions
/// warning of a path that has no elastic increment (a shear measure declared wrongly doubles
/// the shear strain, so the first increment of such a path was already inelastic and the
/// warning never came; a user-style sweep). `None` when a call fails or the state changes.
/// n calls with the twin, 2n without.
pub fn start_tangent(
    caller: &mut Caller<'_>,
    info: &RoutineInfo,
    props: &[f64],
    start: &PointState,
    dtime: f64,
    settings: &crate::settings::Settings,
) -> Option<Vec<f64>> {
    use crate::schemes::Scheme;
    let n = info.convention.ncomp();
    let mut d = Driver::new(info, props, start.clone()).ok()?;
    d.set_increment(&vec![0.0; n], 0.0, dtime);
    d.base_call(caller).ok()?;
    if d.base.state.iter().zip(&start.state).any(|(a, b)| a != b) {
        return None;
    }
    let scheme = if caller.has_complex() { Scheme::ComplexStep } else { Scheme::Central };
    let h = settings.scheme(scheme).rel_step * d.strain_scale(settings.step_floor);
    let mut t = vec![0.0; n * n];
    crate::diagnose::tangent(&mut d, caller, scheme, h, &mut t).ok()?;
    t.iter().all(|x| x.is_finite()).then_some(t)
}

/// Set `inc` on the driver, its strain increment solved for where it holds stresses (as the
/// check's walk does: a creep routine under a held load, the strains all solved for, passed
/// unwarned when held increments were left out; a user-style sweep). `None` when the solve
/// fails or does not converge.
fn set_solved(
    d: &mut Driver,
    caller: &mut Caller<'_>,
    info: &RoutineInfo,
    inc: &crate::path::PathIncrement,
) -> Option<()> {
    let mut dstrain = vec![0.0; info.convention.ncomp()];
    info.convention.strain_from_canonical(&inc.dstrain, &mut dstrain);
    d.set_increment(&dstrain, inc.dtemp, inc.dtime);
    if let Some(hold) = &inc.hold_stress {
        let (controlled, targets) = crate::mixed::held_components(&info.convention, hold);
        let settings = crate::mixed::MixedSettings::default();
        let log = crate::mixed::solve(d, caller, &controlled, &targets, &settings, true).ok()?;
        log.converged.then_some(())
    } else {
        Some(())
    }
}

/// Branches reached so far, as (reported id, state changed).
#[derive(Clone, Default)]
pub struct Branches(Vec<(Option<i32>, bool)>);

impl Branches {
    /// Whether this branch is new (and remember it).
    pub fn first(&mut self, reported: Option<i32>, state_changed: bool) -> bool {
        let b = (reported, state_changed);
        let new = !self.0.contains(&b);
        if new {
            self.0.push(b);
        }
        new
    }
}

/// The driver's base call again, under the full memory guards: a fault when the routine reads
/// past the end of an input or does not repeat itself. The repeat is also compared bit for
/// bit with the base call the check made (other calls came between them), which shows results
/// that depend on the history of calls even when the guards' two calls in a row agree.
pub fn full_guard(driver: &mut Driver, caller: &mut Caller<'_>) -> Result<(), Box<FaultRecord>> {
    if !caller.guard_next_call_fully() {
        return Ok(());
    }
    let before: Vec<u64> = driver
        .base
        .stress
        .iter()
        .chain(&driver.base.state)
        .chain(&driver.base.tangent)
        .map(|x| x.to_bits())
        .collect();
    let why = "the first call of a newly reached branch, repeated under the full memory guards";
    driver.base_call(caller).map_err(|f: Fault| Box::new(fault_record(&f, driver, Some(why.into()))))?;
    let after =
        driver.base.stress.iter().chain(&driver.base.state).chain(&driver.base.tangent).map(|x| x.to_bits());
    if !before.into_iter().eq(after) {
        let f = Fault::Misbehaved {
            what:
                "gave different results for two identical calls (the base call of an increment, made again \
                   after other calls): its results depend on the history of calls (a static or SAVE variable)"
                    .into(),
        };
        return Err(Box::new(fault_record(&f, driver, Some(why.into()))));
    }
    Ok(())
}
