//! Pointing at a failure: the first failing increment of a path, the fraction of that
//! increment at which the error changes class, what the step studies say about the mismatch,
//! and a shrinker that makes a failing path as short and plain as it can.
//!
//! - Along the path: the first increment the check failed ([`first_failure`]); its start
//!   state is rebuilt by walking the path with base calls ([`driver_at`]).
//! - Inside the increment: the increment is scaled by s in (0, 1] and each call is judged
//!   ([`judge::check_call`] with the sharpest scheme) and classed by branch, state change
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

use crate::diagnose::study::{self, StepStudy};
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::path::{Path, PathIncrement};
use crate::report::{CallRecord, IncrementResult, Report};
use crate::routine::{Caller, Fault};
use crate::schemes::Scheme;
use crate::settings::Settings;

/// The per-call check, kept under its old name here (it lives in [`crate::call_check`]).
pub use crate::call_check as judge;
pub mod shrink;

pub use crate::call_check::{check_call, CallCheck};
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
    pub fn validate(&self) -> Result<(), CoreError> {
        if !(self.fraction_tol > 0.0 && self.fraction_tol < 1.0) {
            return Err(CoreError::FractionTolerance(self.fraction_tol));
        }
        if self.grid < 2 {
            return Err(CoreError::GridTooSmall(self.grid));
        }
        if !(self.smallest_fraction > 0.0 && self.smallest_fraction < 1.0 / self.grid as f64) {
            return Err(CoreError::SmallestFraction(self.smallest_fraction));
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

pub use crate::diagnose::study::StepVerdict;

/// The step studies of the failing call and what they show.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct StepFinding {
    pub verdict: StepVerdict,
    /// The plateau level of a mismatch.
    pub plateau: Option<f64>,
    pub studies: Vec<StepStudy>,
}

impl StepFinding {
    /// Classify by the rule the check's diagnosis uses ([`study::classify`]) at the smallest
    /// tolerance among the failed checks.
    fn from_studies(studies: Vec<StepStudy>, failed_tol: f64) -> StepFinding {
        let verdict = study::classify(&studies, failed_tol);
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
            let c = judge::check_call(&mut driver, caller, &quick, None).map_err(fail)?;
            previous = c.best.map(|(_, t)| t);
        }
        driver.advance();
    }
    Ok((driver, previous))
}

/// The increment as set, to scale from: strain and temperature increments.
struct Full {
    dstrain: Vec<f64>,
    dtemp: f64,
}

/// Judge the increment scaled by `s` (strain and temperature increments alike).
fn classify(driver: &mut Driver, caller: &mut Caller<'_>, judge: &Settings, full: &Full, s: f64) -> Sample {
    scale(driver, full, s);
    let (class, error) = match judge::check_call(driver, caller, judge, None) {
        Err(_) => {
            (CallClass { reported_branch: None, state_changed: false, judgement: Judgement::Fault }, 0.0)
        }
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

fn scale(driver: &mut Driver, full: &Full, s: f64) {
    let d: Vec<f64> = full.dstrain.iter().map(|x| s * x).collect();
    driver.set_increment_keep_count(&d, s * full.dtemp);
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
) -> Result<Option<Located>, CoreError> {
    bisect.validate()?;
    let Some(failed) = first_failure(report) else { return Ok(None) };
    let index = failed.index;
    let calls0 = caller.real_calls + caller.complex_calls;
    let (mut driver, _) = driver_at(caller, props, start, path, index, settings)?;
    let has_twin = caller.has_complex();
    let judge = judge::sharpest(settings, has_twin);
    let whole = Full { dstrain: driver.dstrain().to_vec(), dtemp: driver.dtemp() };
    let mut samples = Vec::new();
    let full = classify(&mut driver, caller, &judge, &whole, 1.0);
    samples.push(full);
    let target = full.class;
    // The grid, from the top down: the last class change before s = 1.
    let g = bisect.grid;
    let mut upper = full;
    let mut lower = None;
    for k in (1..g).rev() {
        let s = classify(&mut driver, caller, &judge, &whole, k as f64 / g as f64);
        samples.push(s);
        if s.class != target {
            lower = Some(s);
            break;
        }
        upper = s;
    }
    if lower.is_none() {
        let s = classify(&mut driver, caller, &judge, &whole, bisect.smallest_fraction);
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
                let mid = classify(&mut driver, caller, &judge, &whole, 0.5 * (lo.fraction + hi.fraction));
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
    scale(&mut driver, &whole, 1.0);
    let conv = caller.info().convention.clone();
    // The smallest tolerance among the failed checks: the level a study must reach to clear.
    let failed_tol = failed
        .checks
        .iter()
        .filter_map(|c| match &c.tangent {
            crate::report::CheckOutcome::Compared(x) if !x.pass => Some(x.tol),
            _ => None,
        })
        .fold(f64::INFINITY, f64::min);
    let failed_tol = if failed_tol.is_finite() { failed_tol } else { settings.central.tol };
    let step = match driver.base_call(caller) {
        Err(_) => None,
        // The check's own studies of this increment, when its diagnosis ran: the same
        // evidence and the same classification give the same finding.
        Ok(()) if failed.diagnosis.as_ref().is_some_and(|d| !d.studies.is_empty()) => {
            let studies = failed.diagnosis.as_ref().map(|d| d.studies.clone()).unwrap_or_default();
            Some(StepFinding::from_studies(studies, failed_tol))
        }
        Ok(()) => {
            let returned = driver.base.tangent.clone();
            let strain_scale = driver.strain_scale(settings.step_floor);
            let mut studies = Vec::new();
            for scheme in [Scheme::Central, Scheme::Forward] {
                let tol = settings.scheme(scheme).tol;
                // A study cut short by a faulting call says nothing; the others still do.
                if let Ok(s) = study::run(
                    &mut driver,
                    caller,
                    &conv,
                    &returned,
                    scheme,
                    strain_scale,
                    tol,
                    settings.entry_floor,
                ) {
                    studies.push(s);
                }
            }
            (!studies.is_empty()).then(|| StepFinding::from_studies(studies, failed_tol))
        }
    };
    scale(&mut driver, &whole, 1.0);
    Ok(Some(Located {
        increment: index,
        of: path.increments.len(),
        branch: if failed.fault.is_some() {
            "none (the call faulted)".to_string()
        } else {
            failed.branch_label()
        },
        finding: if failed.fault.is_some() {
            crate::call_check::FAULT_FINDING.to_string()
        } else {
            failed.finding().to_string()
        },
        call: judge::call_record(&driver, None),
        judged_by: judge.schemes[0],
        inside,
        samples,
        step,
        calls: caller.real_calls + caller.complex_calls - calls0,
    }))
}

#[cfg(test)]
pub(crate) mod testing;

#[cfg(test)]
mod tests {
    use super::testing::{Bar, PROPS};
    use super::*;
    use crate::check;
    use crate::path::PathIncrement;
    use crate::routine::{Model, RoutineInfo};

    fn uniaxial(steps: &[f64]) -> Path {
        Path {
            name: "test path".into(),
            increments: steps.iter().map(|&d| PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0])).collect(),
        }
    }

    fn zero(info: &RoutineInfo) -> PointState {
        PointState::zero(info, 0.0)
    }

    // The bar yields at ε = σy/E = 1.25e-3 (Simo & Hughes 1998, Box 1.4): along increments of
    // 5e-4 from zero that is half-way through increment 3. The flawed bar returns E there,
    // the consistent tangent is E H/(E + H): the error changes class at s* = 0.5 exactly.
    #[test]
    fn the_crossing_is_the_yield_fraction() {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = uniaxial(&[5e-4; 8]);
        let settings = Settings::default();
        let report = check::run(&mut caller, &PROPS, zero(&info), &path, &settings).unwrap();
        let bs = BisectSettings::default();
        let l = locate(&mut caller, &PROPS, zero(&info), &path, &report, &settings, &bs).unwrap().unwrap();
        assert_eq!((l.increment, l.of), (3, 8));
        assert_eq!(l.branch, "#1 (state changed)");
        assert_eq!(l.judged_by, Scheme::ComplexStep);
        let Inside::Crossing(c) = l.inside else { panic!("{:?}", l.inside) };
        let s_star = (PROPS[1] / PROPS[0] - 2.0 * 5e-4) / 5e-4;
        assert!((s_star - 0.5).abs() < 1e-12);
        assert!(c.below <= s_star && s_star <= c.above, "{c:?}");
        assert!(c.above - c.below <= bs.fraction_tol);
        assert_eq!(c.class_below.reported_branch, Some(0));
        assert_eq!(c.class_below.judgement, Judgement::Agrees);
        assert_eq!(c.class_above.reported_branch, Some(1));
        assert_eq!(c.class_above.judgement, Judgement::Differs);
        // E against E H/(E + H): relative error (E − E_t)/E_t = E/H = 20.
        assert!((c.error_above - PROPS[0] / PROPS[2]).abs() < 1e-6, "{}", c.error_above);
        let step = l.step.unwrap();
        assert_eq!(step.verdict, StepVerdict::Mismatch);
        assert!((step.plateau.unwrap() / 20.0 - 1.0).abs() < 0.1, "{:?}", step.plateau);
        // The saved inputs are those of increment 3: strain 1e-3 at its start.
        assert_eq!(l.call.strain, vec![1e-3]);
        assert_eq!(l.call.increment, 3);
    }

    // Without a twin the fractions are judged by the central difference; a coarser tolerance
    // of the fraction is met too.
    #[test]
    fn without_a_twin_the_central_difference_judges() {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = uniaxial(&[4e-4; 6]);
        let settings = Settings { schemes: vec![Scheme::Central], ..Settings::default() };
        let report = check::run(&mut caller, &PROPS, zero(&info), &path, &settings).unwrap();
        let bs = BisectSettings { fraction_tol: 1e-3, ..BisectSettings::default() };
        let l = locate(&mut caller, &PROPS, zero(&info), &path, &report, &settings, &bs).unwrap().unwrap();
        assert_eq!(l.judged_by, Scheme::Central);
        assert_eq!(l.increment, 4);
        let Inside::Crossing(c) = l.inside else { panic!("{:?}", l.inside) };
        let s_star = (PROPS[1] / PROPS[0] - 3.0 * 4e-4) / 4e-4;
        assert!((c.fraction() - s_star).abs() <= 1e-3, "{c:?} vs {s_star}");
    }

    // A failure that does not start inside the increment: the flawed bar loaded further
    // after yielding fails at every fraction of a later plastic increment.
    #[test]
    fn a_failure_throughout_the_increment_is_said_so() {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        // Yield inside increment 1 (1.5e-3 > 1.25e-3); increment 2 starts plastic.
        let path = uniaxial(&[1.5e-3, 5e-4]);
        let settings = Settings::default();
        let report = check::run(&mut caller, &PROPS, zero(&info), &path, &settings).unwrap();
        // Shift the question to increment 2 by checking from the end of increment 1.
        let (mut d, previous) = driver_at(&mut caller, &PROPS, zero(&info), &path, 2, &settings).unwrap();
        assert!(previous.is_some());
        d.base_call(&mut caller).unwrap();
        let later = Path { name: "later".into(), increments: path.increments[1..].to_vec() };
        let start = d.start().clone();
        let r2 = check::run(&mut caller, &PROPS, start.clone(), &later, &settings).unwrap();
        let l = locate(&mut caller, &PROPS, start, &later, &r2, &settings, &BisectSettings::default())
            .unwrap()
            .unwrap();
        assert!(matches!(l.inside, Inside::Throughout { .. }), "{:?}", l.inside);
        assert_eq!(report.increments.len(), 2);
    }

    // The rebuilt start state has the bits the check reached: the end of increment k − 1.
    #[test]
    fn the_walk_rebuilds_the_start_state_bit_for_bit() {
        let mut bar = Bar::new(false);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = uniaxial(&[7e-4, 9e-4, -3e-4, -2.5e-3, 1e-4]);
        let settings = Settings::default();
        let report = check::run(&mut caller, &PROPS, zero(&info), &path, &settings).unwrap();
        for k in 2..=5 {
            let (d, _) = driver_at(&mut caller, &PROPS, zero(&info), &path, k, &settings).unwrap();
            assert_eq!(d.start().stress[0].to_bits(), report.increments[k - 2].stress[0].to_bits(), "{k}");
            assert_eq!(d.start().strain[0].to_bits(), report.increments[k - 2].strain[0].to_bits(), "{k}");
            assert_eq!(d.increment(), k as i32);
        }
        assert!(driver_at(&mut caller, &PROPS, zero(&info), &path, 6, &settings).is_err());
        assert!(locate(
            &mut caller,
            &PROPS,
            zero(&info),
            &path,
            &report,
            &settings,
            &BisectSettings::default()
        )
        .unwrap()
        .is_none());
    }

    /// A random walk with a slight drift (xorshift64*, seeded): the bar first yields late.
    fn random_walk(n: usize, seed: u64) -> Vec<f64> {
        let mut x = seed;
        (0..n)
            .map(|_| {
                x ^= x >> 12;
                x ^= x << 25;
                x ^= x >> 27;
                let u = (x.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64;
                -1e-4 + 2.2e-4 * u
            })
            .collect()
    }

    #[test]
    fn a_long_random_path_shrinks_to_one_increment() {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = uniaxial(&random_walk(200, 0x5eed_b15e));
        let settings = Settings::default();
        let report = check::run(&mut caller, &PROPS, zero(&info), &path, &settings).unwrap();
        let first = first_failure(&report).expect("the walk yields").index;
        assert!(first > 20, "the first failure is late enough to need shrinking: {first}");
        let s = shrink(&mut caller, &PROPS, &zero(&info), &path, &report, &settings, ShrinkLimits::default())
            .unwrap()
            .unwrap();
        assert_eq!(s.stop, ShrinkStop::Done);
        assert_eq!(s.original_increments, 200);
        assert_eq!(s.path.increments.len(), 1, "{:?}", s.path.increments);
        // One increment from zero past the yield strain, rounded to a short decimal.
        let d = s.path.increments[0].dstrain[0];
        assert!(d > PROPS[1] / PROPS[0], "{d}");
        assert!(format!("{d}").len() <= 8, "{d}");
        // The shrunk path still fails, the same way.
        let again = check::run(&mut caller, &PROPS, zero(&info), &s.path, &settings).unwrap();
        assert_eq!(again.verdict, crate::report::Verdict::TangentFailure);
        assert_eq!(first_failure(&again).unwrap().finding(), s.finding);
        assert_eq!(s.finding, first_failure(&report).unwrap().finding());
        assert!(s.iterations <= ShrinkLimits::default().max_iterations);
    }

    #[test]
    fn the_limits_stop_the_shrink_and_say_which() {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = uniaxial(&random_walk(200, 0x5eed_b15e));
        let settings = Settings::default();
        let report = check::run(&mut caller, &PROPS, zero(&info), &path, &settings).unwrap();
        let first = first_failure(&report).unwrap().index;
        let limits = ShrinkLimits { max_iterations: 3, max_seconds: 600.0 };
        let s =
            shrink(&mut caller, &PROPS, &zero(&info), &path, &report, &settings, limits).unwrap().unwrap();
        assert_eq!(s.stop, ShrinkStop::IterationLimit { limit: 3 });
        assert_eq!(s.iterations, 3);
        assert!(s.path.increments.len() <= first);
        let again = check::run(&mut caller, &PROPS, zero(&info), &s.path, &settings).unwrap();
        assert_eq!(first_failure(&again).map(|f| f.index), Some(s.path.increments.len()));
        let limits = ShrinkLimits { max_iterations: 1000, max_seconds: 1e-12 };
        let s =
            shrink(&mut caller, &PROPS, &zero(&info), &path, &report, &settings, limits).unwrap().unwrap();
        assert_eq!(s.stop, ShrinkStop::TimeLimit { seconds: 1e-12 });
        assert_eq!(s.iterations, 0);
        // Cut after the first failure, which needs no search.
        assert_eq!(s.path.increments.len(), first);
        // A passing path has nothing to shrink.
        let mut good = Bar::new(false);
        let mut c2 = Caller::new(&mut good);
        let r = check::run(&mut c2, &PROPS, zero(&info), &path, &settings).unwrap();
        assert!(shrink(&mut c2, &PROPS, &zero(&info), &path, &r, &settings, ShrinkLimits::default())
            .unwrap()
            .is_none());
    }
}
