//! Pointing at a failure: the first failing increment of a path, the fraction of that
//! increment at which the error changes class, what the step studies say about the mismatch,
//! and a shrinker that makes a failing path as short and plain as it can.
//!
//! - Along the path: the first increment the check failed ([`first_failure`]); its start
//!   state is rebuilt by walking the path with base calls ([`driver_at`]).
//! - Inside the increment: the increment is scaled by s in (0, 1] and each call is judged
//!   ([`probe::check_call`] with the sharpest scheme) and classed by branch, state change
//!   and verdict ([`CallClass`]). A grid of fractions finds the last class change before
//!   s = 1, and bisection narrows it to [`BisectSettings::fraction_tol`] ([`locate`]). For a
//!   tangent wrong in one branch only, that is where the increment enters the branch, e.g.
//!   the fraction at which the yield surface is crossed.
//! - In the step: step studies ([`crate::diagnose::study`]) of the full increment separate
//!   a true mismatch (the discrepancy levels off) from truncation (it converges: the default
//!   step was poor) and from noise (it scatters) ([`StepFinding`]).
//! - Shrinking ([`shrink`]): drop and merge increments, then move components toward zero,
//!   keeping "the path still fails the same way", within iteration and time limits.

use serde::{Deserialize, Serialize};

use crate::diagnose::study::{self, Behaviour, StepStudy};
use crate::driver::{Driver, PointState};
use crate::path::Path;
use crate::report::{CallRecord, IncrementResult, Report};
use crate::routine::Caller;
use crate::schemes::Scheme;
use crate::settings::Settings;

pub mod probe;
pub mod shrink;

pub use probe::{check_call, CallCheck};
pub use shrink::{shrink, ShrinkLimits, ShrinkStop, Shrunk};

/// How finely the inside of an increment is searched.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct BisectSettings {
    /// Bisection stops when the bracket of the class change is at most this fraction of the
    /// increment wide.
    pub fraction_tol: f64,
    /// Fractions k/grid (k = 1 … grid) are judged first; the last class change among them is
    /// then narrowed.
    pub grid: usize,
    /// The smallest fraction judged when the whole grid has the class of the full increment.
    pub smallest_fraction: f64,
}

impl Default for BisectSettings {
    fn default() -> Self {
        BisectSettings { fraction_tol: 1e-6, grid: 16, smallest_fraction: 1.0 / 1048576.0 }
    }
}

impl BisectSettings {
    pub fn validate(&self) -> Result<(), String> {
        if !(self.fraction_tol > 0.0 && self.fraction_tol < 1.0) {
            return Err(format!("the fraction tolerance must lie in (0, 1), got {}", self.fraction_tol));
        }
        if self.grid < 2 {
            return Err(format!("the grid of fractions needs at least 2 points, got {}", self.grid));
        }
        if !(self.smallest_fraction > 0.0 && self.smallest_fraction < 1.0 / self.grid as f64) {
            return Err(format!(
                "the smallest fraction must lie in (0, 1/grid), got {}",
                self.smallest_fraction
            ));
        }
        Ok(())
    }
}

/// How a call came out.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Judgement {
    /// The returned tangent is the derivative.
    Agrees,
    /// It is not.
    Differs,
    /// An output is not a finite number.
    NonFinite,
    /// The call (or a perturbed call) crashed or returned a failed status.
    Fault,
}

/// The class of a call: branch, state change and judgement. The error changes class where
/// any of the three changes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct CallClass {
    pub reported_branch: Option<i32>,
    pub state_changed: bool,
    pub judgement: Judgement,
}

impl CallClass {
    /// The branch label of [`IncrementResult::branch_label`].
    pub fn branch_label(&self) -> String {
        let changed = if self.state_changed { "state changed" } else { "state unchanged" };
        match self.reported_branch {
            Some(b) => format!("#{b} ({changed})"),
            None => changed.to_string(),
        }
    }

    pub fn word(&self) -> &'static str {
        match self.judgement {
            Judgement::Agrees => "the tangent agrees",
            Judgement::Differs => "the tangent differs",
            Judgement::NonFinite => "an output is not finite",
            Judgement::Fault => "the call faults",
        }
    }
}

/// One judged fraction of the increment.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Sample {
    pub fraction: f64,
    pub class: CallClass,
    /// The tangent error of the judging scheme (0 when it did not compare).
    pub error: f64,
}

/// Where inside the increment the error takes the class of the full increment.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Crossing {
    /// The largest fraction judged with another class, and the smallest above it judged with
    /// the class of the full increment; `above − below` is at most the fraction tolerance.
    pub below: f64,
    pub above: f64,
    pub class_below: CallClass,
    pub class_above: CallClass,
    pub error_below: f64,
    pub error_above: f64,
}

impl Crossing {
    /// The best estimate of the fraction: the middle of the bracket.
    pub fn fraction(&self) -> f64 {
        0.5 * (self.below + self.above)
    }
}

/// What the search inside the increment found.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case", tag = "found")]
pub enum Inside {
    /// The class changes at a fraction of the increment.
    Crossing(Crossing),
    /// Every fraction judged, down to `smallest`, has the class of the full increment: the
    /// failure does not start inside this increment.
    Throughout { smallest: f64 },
}

/// What the step studies of the full increment say about the mismatch.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum StepVerdict {
    /// The discrepancy levels off as the step shrinks: the tangent is not the derivative.
    Mismatch,
    /// A difference converges to the returned tangent: the default step was poor.
    Truncation,
    /// Neither: the discrepancy scatters (noisy inner solves or rounding).
    Noise,
}

/// The step studies of the failing call and what they show.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct StepFinding {
    pub verdict: StepVerdict,
    /// The plateau level of a mismatch.
    pub plateau: Option<f64>,
    pub studies: Vec<StepStudy>,
}

impl StepFinding {
    fn from_studies(studies: Vec<StepStudy>) -> StepFinding {
        let verdict = if studies.iter().any(|s| s.behaviour == Behaviour::Converges) {
            StepVerdict::Truncation
        } else if studies.iter().any(|s| s.behaviour == Behaviour::Plateau) {
            StepVerdict::Mismatch
        } else {
            StepVerdict::Noise
        };
        let plateau = studies.iter().find_map(|s| s.plateau);
        StepFinding { verdict, plateau, studies }
    }
}

/// The located failure.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Located {
    /// The first failing increment (1-based) and the number of increments of the path.
    pub increment: usize,
    pub of: usize,
    /// Its branch label and what its diagnosis found.
    pub branch: String,
    pub finding: String,
    /// The inputs of its base call.
    pub call: CallRecord,
    /// The scheme that judged the fractions.
    pub judged_by: Scheme,
    pub inside: Inside,
    /// Every fraction judged, in the order judged.
    pub samples: Vec<Sample>,
    /// The step studies of the full increment (none when its base call faults).
    pub step: Option<StepFinding>,
    /// Routine calls the search made (besides the check that found the increment).
    pub calls: u64,
}

/// The first increment of a report that did not pass.
pub fn first_failure(report: &Report) -> Option<&IncrementResult> {
    report.increments.iter().find(|i| !i.passed())
}

/// A driver at the start of increment `index` (1-based) of `path` from `start`, with that
/// increment set (not yet called), and the best numerical tangent at the end of the increment
/// before it (the tangent at the start of this one; `None` for the first). The path is walked
/// with base calls, as [`crate::check::run`] walks it, so the start state has the same bits.
pub fn driver_at(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    index: usize,
    settings: &Settings,
) -> Result<(Driver, Option<Vec<f64>>), String> {
    if index == 0 || index > path.increments.len() {
        return Err(format!("increment {index} is not on the path ({} increments)", path.increments.len()));
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
        if k + 1 == index {
            break;
        }
        let walked = if k + 2 == index {
            probe::check_call(&mut driver, caller, &quick, None).map(|c| {
                previous = c.best.map(|(_, t)| t);
            })
        } else {
            driver.base_call(caller)
        };
        walked.map_err(|f| format!("walking the path to increment {index}: increment {} failed: {f}", k + 1))?;
        driver.advance();
    }
    Ok((driver, previous))
}

fn classify(driver: &mut Driver, caller: &mut Caller<'_>, judge: &Settings, s: f64) -> Sample {
    driver.rescale(s);
    let (class, error) = match probe::check_call(driver, caller, judge, None) {
        Err(_) => (CallClass { reported_branch: None, state_changed: false, judgement: Judgement::Fault }, 0.0),
        Ok(c) => {
            let judgement = if !c.non_finite.is_empty() {
                Judgement::NonFinite
            } else if c.faulted() {
                Judgement::Fault
            } else if c.passed() {
                Judgement::Agrees
            } else {
                Judgement::Differs
            };
            (
                CallClass { reported_branch: c.reported_branch, state_changed: c.state_changed, judgement },
                c.worst_error(),
            )
        }
    };
    Sample { fraction: s, class, error }
}

/// Locate the first failure of `report` (the check of `path` from `start`): its increment,
/// the fraction inside it where the error takes its class, and the step studies of the full
/// increment. `None` when every increment passed.
pub fn locate(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: PointState,
    path: &Path,
    report: &Report,
    settings: &Settings,
    bisect: &BisectSettings,
) -> Result<Option<Located>, String> {
    bisect.validate()?;
    let Some(failed) = first_failure(report) else { return Ok(None) };
    let index = failed.index;
    let calls0 = caller.real_calls + caller.complex_calls;
    let (mut driver, _) = driver_at(caller, props, start, path, index, settings)?;
    let has_twin = caller.has_complex();
    let judge = probe::sharpest(settings, has_twin);
    let mut samples = Vec::new();
    let full = classify(&mut driver, caller, &judge, 1.0);
    samples.push(full);
    let target = full.class;
    // The grid, from the top down: the last class change before s = 1.
    let g = bisect.grid;
    let mut upper = full;
    let mut lower = None;
    for k in (1..g).rev() {
        let s = classify(&mut driver, caller, &judge, k as f64 / g as f64);
        samples.push(s);
        if s.class != target {
            lower = Some(s);
            break;
        }
        upper = s;
    }
    if lower.is_none() {
        let s = classify(&mut driver, caller, &judge, bisect.smallest_fraction);
        samples.push(s);
        if s.class != target {
            lower = Some(s);
        }
    }
    let inside = match lower {
        None => Inside::Throughout { smallest: bisect.smallest_fraction },
        Some(mut lo) => {
            let mut hi = upper;
            while hi.fraction - lo.fraction > bisect.fraction_tol {
                let mid = classify(&mut driver, caller, &judge, 0.5 * (lo.fraction + hi.fraction));
                samples.push(mid);
                if mid.class == target {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            Inside::Crossing(Crossing {
                below: lo.fraction,
                above: hi.fraction,
                class_below: lo.class,
                class_above: hi.class,
                error_below: lo.error,
                error_above: hi.error,
            })
        }
    };
    // The step studies of the full increment.
    driver.rescale(1.0);
    let conv = caller.info().convention.clone();
    let step = match driver.base_call(caller) {
        Err(_) => None,
        Ok(()) => {
            let returned = driver.base.tangent.clone();
            let scale = driver.strain_scale(settings.step_floor);
            let mut studies = Vec::new();
            for scheme in [Scheme::Central, Scheme::Forward] {
                let tol = settings.scheme(scheme).tol;
                // A study cut short by a faulting call says nothing; the others still do.
                if let Ok(s) =
                    study::run(&mut driver, caller, &conv, &returned, scheme, scale, tol, settings.entry_floor)
                {
                    studies.push(s);
                }
            }
            (!studies.is_empty()).then(|| StepFinding::from_studies(studies))
        }
    };
    driver.rescale(1.0);
    Ok(Some(Located {
        increment: index,
        of: path.increments.len(),
        branch: failed.branch_label(),
        finding: failed.finding().to_string(),
        call: probe::call_record(&driver, None),
        judged_by: judge.schemes[0],
        inside,
        samples,
        step,
        calls: caller.real_calls + caller.complex_calls - calls0,
    }))
}
