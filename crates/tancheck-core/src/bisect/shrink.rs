//! Shrinking a failing path: the shortest, plainest path found that still fails the same way.
//!
//! The invariant of the loop: the current path fails, with the verdict and the first
//! increment's finding and branch of the original, and by a margin in every comparison (scheme, tangent
//! or ∂σ/∂T) that failed in the original: its error at least [`MARGIN`] times the tolerance,
//! or as many times as the original's when that was fewer (a case that fails
//! at twice the tolerance may pass under another machine's rounding). Every candidate is checked with [`crate::check::run`]
//! and replaces the current path only when it keeps the invariant; a path that fails is cut
//! after its first failing increment (the increments after it change nothing before it).
//! Two phases, repeated while either changes something:
//! 1. fewer increments: drop runs of increments (halving the run length down to one), then
//!    merge neighbours into one increment (their sum);
//! 2. plainer increments: each component, the temperature increment and the time increment
//!    toward zero (zero, then halving), then rounded to one, two or three significant digits.
//!
//! The search stops when neither phase finds a smaller failing path, or at
//! [`ShrinkLimits::max_iterations`] checks or [`ShrinkLimits::max_seconds`] seconds; then the
//! result says which limit stopped it, so the caller can name the setting that raises it.

use std::time::Instant;

use serde::{Deserialize, Serialize};

use crate::check;
use crate::driver::PointState;
use crate::error::CoreError;
use crate::path::{Path, PathIncrement};
use crate::report::{CheckOutcome, Report, Verdict};
use crate::routine::Caller;
use crate::schemes::Scheme;
use crate::settings::Settings;

/// Bounds of a shrink.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields, default)]
pub struct ShrinkLimits {
    /// Candidate paths checked at most.
    pub max_iterations: usize,
    /// Wall-clock seconds at most (checked before each candidate).
    pub max_seconds: f64,
}

impl Default for ShrinkLimits {
    fn default() -> Self {
        ShrinkLimits { max_iterations: 2000, max_seconds: 120.0 }
    }
}

/// Why the shrink stopped.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case", tag = "stop")]
pub enum ShrinkStop {
    /// No smaller candidate fails the same way: the path is as small as this search makes it.
    Done,
    /// The iteration limit was reached; a larger one may shrink further.
    IterationLimit { limit: usize },
    /// The time limit was reached; a larger one may shrink further.
    TimeLimit { seconds: f64 },
    /// A stop signal (Ctrl-C, SIGTERM, SIGHUP) arrived: the path shrunk so far is kept.
    Signal { signal: i32 },
}

/// The result of a shrink.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Shrunk {
    /// The smallest failing path found; its last increment is its first failing one.
    pub path: Path,
    /// The check of that path.
    pub report: Report,
    pub original_increments: usize,
    /// The failure kept: the verdict and the finding of the first failing increment.
    pub verdict: Verdict,
    pub finding: String,
    /// Candidates checked, and how many of them were kept.
    pub iterations: usize,
    pub accepted: usize,
    pub seconds: f64,
    pub stop: ShrinkStop,
}

struct Shrinker<'a, 'r> {
    caller: &'a mut Caller<'r>,
    props: &'a [f64],
    start: &'a PointState,
    settings: &'a Settings,
    name: &'a str,
    verdict: Verdict,
    finding: String,
    branch: String,
    /// The margin every kept path fails by, per comparison that failed in the original (see
    /// [`MARGIN`] and [`margins`]).
    min_margins: Vec<(Scheme, bool, f64)>,
    limits: ShrinkLimits,
    /// A stop signal that arrived (0: none), asked before each candidate.
    stop_signal: &'a dyn Fn() -> i32,
    t0: Instant,
    iterations: usize,
    accepted: usize,
    stop: Option<ShrinkStop>,
    current: Vec<PathIncrement>,
    report: Report,
    /// Per slot group (strain components, temperature increment, time increment): the size
    /// below which halving toward the goal stops, [`FLOOR`] of the original path's largest
    /// distance from it.
    floors: [f64; 3],
}

/// Halving a value toward its goal stops within this share of the original path's largest
/// distance from the goal in the same slot group: a failure that holds however small the
/// value (a tangent wrong on one side of zero) is shown at a value that reads as such, not
/// at 1e-83 (a user-style sweep's shrunk case).
const FLOOR: f64 = 1e-3;

/// The verdict, the first failing increment's finding and branch (the branch it reported and
/// whether its state changed), and its index; `None` for a pass. The branch is part of the
/// failure kept: a failure in a plastic branch shrunk to a zero increment of the elastic one
/// was another failure (explore listed three distinct failures, of two branches, each with
/// the same zero-increment case; a user-style sweep).
fn signature(r: &Report) -> Option<(Verdict, String, String, usize)> {
    let f = super::first_failure(r)?;
    let branch = if f.fault.is_some() { String::new() } else { f.branch_label() };
    Some((r.verdict, f.finding().to_string(), branch, f.index))
}

/// A shrunk path fails by at least this many tolerances, or by as many as the original did
/// when that was fewer. Why 10: a case that fails by a tenfold margin keeps failing under
/// another compiler's or mathematical library's rounding, where one at 2× the tolerance may
/// pass (common practice for regression thresholds, not a derived figure).
const MARGIN: f64 = 10.0;

/// Per failed comparison of the first failing increment — its scheme, and whether it is the
/// ∂σ/∂T one — the error over the tolerance.
fn margins(r: &Report) -> Vec<(Scheme, bool, f64)> {
    let Some(inc) = super::first_failure(r) else { return Vec::new() };
    let mut out = Vec::new();
    for c in &inc.checks {
        for (o, dtemp) in [(Some(&c.tangent), false), (c.dstress_dtemp.as_ref(), true)] {
            if let Some(CheckOutcome::Compared(x)) = o {
                if !x.pass && x.tol > 0.0 {
                    out.push((c.scheme, dtemp, x.error() / x.tol));
                }
            }
        }
    }
    out
}

/// Whether `r` fails every comparison of `need` (scheme, ∂σ/∂T or not, margin) by its margin:
/// a shrunk path keeps the failure of each scheme that failed, not only of the sharpest (a
/// time-increment flaw shrunk to a time increment where it nearly vanishes failed the complex
/// step alone, and the central difference agreed).
fn keeps_margins(r: &Report, need: &[(Scheme, bool, f64)]) -> bool {
    let have = margins(r);
    need.iter().all(|(s, dt, m)| have.iter().any(|(hs, hdt, hm)| hs == s && hdt == dt && hm >= m))
}

impl Shrinker<'_, '_> {
    fn path(&self, incs: Vec<PathIncrement>) -> Path {
        let n = incs.len();
        let name = format!("{} (shrunk to {n} increment{})", self.name, if n == 1 { "" } else { "s" });
        Path { name, increments: incs }
    }

    /// Check a candidate; keep it (cut after its first failure) when it fails the same way.
    fn attempt(&mut self, candidate: Vec<PathIncrement>) -> bool {
        if self.stop.is_some() || candidate.is_empty() || candidate == self.current {
            return false;
        }
        if self.iterations >= self.limits.max_iterations {
            self.stop = Some(ShrinkStop::IterationLimit { limit: self.limits.max_iterations });
            return false;
        }
        if self.t0.elapsed().as_secs_f64() >= self.limits.max_seconds {
            self.stop = Some(ShrinkStop::TimeLimit { seconds: self.limits.max_seconds });
            return false;
        }
        let signal = (self.stop_signal)();
        if signal != 0 {
            self.stop = Some(ShrinkStop::Signal { signal });
            return false;
        }
        self.iterations += 1;
        let path = self.path(candidate);
        // Each candidate is a run of its own: a guard that found the fault in an earlier run
        // must find it again here.
        self.caller.forget_guard_findings();
        let Ok(r) = check::run(self.caller, self.props, self.start.clone(), &path, self.settings) else {
            return false;
        };
        // A candidate with an increment the routine refuses as too large (the check cut it
        // back) is no smaller case: its report's increments are not the candidate's.
        if r.checked_path.is_some() {
            return false;
        }
        match signature(&r) {
            Some((v, f, b, index))
                if v == self.verdict
                    && f == self.finding
                    && b == self.branch
                    && keeps_margins(&r, &self.min_margins) =>
            {
                let mut incs = path.increments;
                incs.truncate(index);
                let report = if index == r.increments.len() {
                    r
                } else {
                    self.caller.forget_guard_findings();
                    match check::run(
                        self.caller,
                        self.props,
                        self.start.clone(),
                        &self.path(incs.clone()),
                        self.settings,
                    ) {
                        Ok(r) => r,
                        Err(_) => return false,
                    }
                };
                self.current = incs;
                self.report = report;
                self.accepted += 1;
                true
            }
            _ => false,
        }
    }

    fn drop_runs(&mut self) -> bool {
        let mut changed = false;
        let mut size = (self.current.len() / 2).max(1);
        loop {
            let mut i = 0;
            while i + size <= self.current.len() && self.current.len() > 1 && self.stop.is_none() {
                let mut c = self.current.clone();
                c.drain(i..i + size);
                if self.attempt(c) {
                    changed = true;
                } else {
                    i += if size == 1 { 1 } else { size };
                }
            }
            if size == 1 || self.stop.is_some() {
                return changed;
            }
            size /= 2;
        }
    }

    fn merge_neighbours(&mut self) -> bool {
        let mut changed = false;
        let mut i = 0;
        while i + 1 < self.current.len() && self.stop.is_none() {
            let mut c = self.current.clone();
            let b = c.remove(i + 1);
            let a = &mut c[i];
            for (x, y) in a.dstrain.iter_mut().zip(b.dstrain) {
                *x += y;
            }
            a.dtemp += b.dtemp;
            a.dtime += b.dtime;
            // The merged increment ends where the second one did.
            a.hold_stress = b.hold_stress;
            if self.attempt(c) {
                changed = true;
            } else {
                i += 1;
            }
        }
        changed
    }

    /// Slot `k` of an increment: 0–5 the strain components, 6 dtemp, 7 dtime.
    fn get(inc: &PathIncrement, k: usize) -> f64 {
        match k {
            0..=5 => inc.dstrain[k],
            6 => inc.dtemp,
            _ => inc.dtime,
        }
    }

    fn with(&self, i: usize, k: usize, v: f64) -> Vec<PathIncrement> {
        let mut c = self.current.clone();
        match k {
            0..=5 => c[i].dstrain[k] = v,
            6 => c[i].dtemp = v,
            _ => c[i].dtime = v,
        }
        c
    }

    fn simplify_values(&mut self) -> bool {
        let mut changed = false;
        let mut i = 0;
        while i < self.current.len() && self.stop.is_none() {
            for k in 0..8 {
                if i >= self.current.len() {
                    break;
                }
                let x = Self::get(&self.current[i], k);
                // The time increment moves toward 1 (the default), the others toward 0.
                let goal = if k == 7 { 1.0 } else { 0.0 };
                if x == goal || x == 0.0 {
                    continue;
                }
                if self.attempt(self.with(i, k, goal)) {
                    changed = true;
                    continue;
                }
                let mut y = x;
                let floor = self.floors[k.saturating_sub(5)];
                for _ in 0..16 {
                    let half = goal + 0.5 * (y - goal);
                    if (half - goal).abs() < floor {
                        break;
                    }
                    if half != y && i < self.current.len() && self.attempt(self.with(i, k, half)) {
                        y = half;
                        changed = true;
                    } else {
                        break;
                    }
                }
                for digits in 1..=3 {
                    if i >= self.current.len() {
                        break;
                    }
                    let r = round_to(y, digits);
                    if r == y {
                        break;
                    }
                    if self.attempt(self.with(i, k, r)) {
                        changed = true;
                        break;
                    }
                }
            }
            i += 1;
        }
        changed
    }
}

/// `x` rounded to `digits` significant decimal digits (through its decimal form, so the
/// result prints short).
fn round_to(x: f64, digits: usize) -> f64 {
    format!("{:.*e}", digits.saturating_sub(1), x).parse().unwrap_or(x)
}

/// Shrink `path` (checked from `start` in `report`) to the smallest path found that still fails
/// with the report's verdict and the finding of its first failing increment. `None` when the
/// report has no failing increment.
pub fn shrink(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    path: &Path,
    report: &Report,
    settings: &Settings,
    limits: ShrinkLimits,
) -> Result<Option<Shrunk>, CoreError> {
    shrink_until(caller, props, start, path, report, settings, limits, &|| 0)
}

/// [`shrink`], stopping before its next candidate once `stop_signal` gives a signal's number
/// (not 0): the path shrunk so far is the result, its stop [`ShrinkStop::Signal`] (a bisect
/// stopped by Ctrl-C kept nothing; a user-style sweep).
#[allow(clippy::too_many_arguments)]
pub fn shrink_until(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    path: &Path,
    report: &Report,
    settings: &Settings,
    limits: ShrinkLimits,
    stop_signal: &dyn Fn() -> i32,
) -> Result<Option<Shrunk>, CoreError> {
    if limits.max_seconds.is_nan() || limits.max_seconds <= 0.0 {
        return Err(CoreError::ShrinkTime(limits.max_seconds));
    }
    let Some((verdict, finding, branch, index)) = signature(report) else { return Ok(None) };
    // The increments of a report checked on a cut path are that path's.
    let path = report.checked_path.as_ref().unwrap_or(path);
    let t0 = Instant::now();
    let original_increments = path.increments.len();
    let mut incs = path.increments.clone();
    incs.truncate(index);
    let report = if index == report.increments.len() {
        report.clone()
    } else {
        let cut = Path { name: path.name.clone(), increments: incs.clone() };
        caller.forget_guard_findings();
        check::run(caller, props, start.clone(), &cut, settings)?
    };
    let mut s = Shrinker {
        caller,
        props,
        start,
        settings,
        name: &path.name,
        verdict,
        finding: finding.clone(),
        branch,
        min_margins: margins(&report).into_iter().map(|(s, dt, m)| (s, dt, m.min(MARGIN))).collect(),
        limits,
        stop_signal,
        t0,
        iterations: 0,
        accepted: 0,
        stop: None,
        floors: {
            let widest = |f: &dyn Fn(&PathIncrement) -> f64| {
                FLOOR * path.increments.iter().map(|i| f(i).abs()).fold(0.0, f64::max)
            };
            [
                widest(&|i| i.dstrain.iter().fold(0.0, |a: f64, x| a.max(x.abs()))),
                widest(&|i| i.dtemp),
                widest(&|i| i.dtime - 1.0),
            ]
        },
        current: incs,
        report,
    };
    loop {
        let mut changed = s.drop_runs();
        changed |= s.merge_neighbours();
        changed |= s.simplify_values();
        if !changed || s.stop.is_some() {
            break;
        }
    }
    let stop = s.stop.unwrap_or(ShrinkStop::Done);
    let path = s.path(s.current.clone());
    let mut report = s.report;
    report.path = path.name.clone();
    Ok(Some(Shrunk {
        path,
        report,
        original_increments,
        verdict,
        finding,
        iterations: s.iterations,
        accepted: s.accepted,
        seconds: s.t0.elapsed().as_secs_f64(),
        stop,
    }))
}

#[cfg(test)]
mod tests {
    use super::{margins, round_to};
    use crate::bisect::testing::{Bar, PROPS};
    use crate::routine::{Caller, Model};

    // The margin is the first failing increment's largest error over its tolerance: the bar
    // that returns E where E H/(E + H) is its derivative is off by E/H = 20 relative (Simo &
    // Hughes 1998, Box 1.4), 2e7 central tolerances of 1e-6; a path that passes has none.
    #[test]
    fn the_margin_is_the_first_failures_error_over_its_tolerance() {
        let path = |d: f64| crate::path::Path {
            name: "p".into(),
            increments: vec![crate::path::PathIncrement::strain([d, 0.0, 0.0, 0.0, 0.0, 0.0]); 4],
        };
        let settings = crate::settings::Settings {
            schemes: vec![crate::schemes::Scheme::Central],
            ..Default::default()
        };
        let mut bar = Bar::new(true);
        let start = crate::driver::PointState::zero(bar.0.info(), 0.0);
        let mut caller = Caller::new(&mut bar);
        let failing = crate::check::run(&mut caller, &PROPS, start.clone(), &path(5e-4), &settings).unwrap();
        let m = margins(&failing);
        assert_eq!(m.len(), 1, "{m:?}");
        assert_eq!((m[0].0, m[0].1), (crate::schemes::Scheme::Central, false));
        assert!((m[0].2 / 2e7 - 1.0).abs() < 1e-3, "{m:?}");
        let passing = crate::check::run(&mut caller, &PROPS, start, &path(1e-4), &settings).unwrap();
        assert!(margins(&passing).is_empty());
    }

    // A flaw that vanishes at the default time increment (the viscous bar's tangent of Δt = 1,
    // E + η where E + η/Δt is the derivative of its backward-Euler update): the shrink moves
    // Δt toward 1 while the failure stays, and must keep it in both schemes that failed, each
    // by ten tolerances (it kept only the sharpest, and shrank to a Δt where the central
    // difference agreed).
    #[test]
    fn a_shrunk_path_keeps_the_failure_of_every_scheme() {
        use crate::bisect::testing::ViscousBar;
        use crate::schemes::Scheme;
        let mut inc = crate::path::PathIncrement::strain([1e-4, 0.0, 0.0, 0.0, 0.0, 0.0]);
        inc.dtime = 0.1;
        let path = crate::path::Path { name: "p".into(), increments: vec![inc; 3] };
        let settings = crate::settings::Settings::default();
        let props = [1000.0, 1000.0];
        let mut bar = ViscousBar::new(true);
        let start = crate::driver::PointState::zero(bar.0.info(), 0.0);
        let mut caller = Caller::new(&mut bar);
        let report = crate::check::run(&mut caller, &props, start.clone(), &path, &settings).unwrap();
        let original = margins(&report);
        let schemes: Vec<Scheme> = original.iter().map(|m| m.0).collect();
        assert_eq!(schemes, [Scheme::Central, Scheme::ComplexStep], "{original:?}");
        let limits = super::ShrinkLimits::default();
        let s =
            super::shrink(&mut caller, &props, &start, &path, &report, &settings, limits).unwrap().unwrap();
        let last = s.path.increments.last().unwrap();
        assert!(last.dtime != 1.0 && last.dtime > 0.1, "Δt moved toward 1 but not onto it: {:?}", s.path);
        let kept = margins(&s.report);
        for scheme in [Scheme::Central, Scheme::ComplexStep] {
            let m = kept.iter().find(|m| m.0 == scheme && !m.1).map(|m| m.2);
            assert!(m.is_some_and(|m| m >= super::MARGIN), "{scheme:?}: {kept:?} at {:?}", s.path);
        }
    }

    /// A uniaxial bimodulus bar, σ = E ε in tension and 2E ε in compression (made up), that
    /// returns E in both: wrong at any compression, however small.
    struct Bimodulus(crate::routine::RoutineInfo);

    impl crate::routine::Model for Bimodulus {
        fn info(&self) -> &crate::routine::RoutineInfo {
            &self.0
        }
        fn evaluate<S: crate::scalar::Scalar>(
            &self,
            input: &crate::routine::CallInput<'_, S>,
            out: &mut crate::routine::CallOutput<'_, S>,
        ) -> Result<(), crate::routine::Fault> {
            let e = input.props[0];
            let eps = input.strain[0] + input.dstrain[0];
            out.stress[0] = if eps.re() < 0.0 { e * eps * S::cst(2.0) } else { e * eps };
            out.tangent[0] = e;
            out.dstress_dtemp[0] = S::zero();
            out.energy[0] = S::zero();
            out.energy[1] = S::zero();
            out.outcome.status = 0;
            out.outcome.branch = i32::from(eps.re() < 0.0);
            Ok(())
        }
    }

    // A failure that holds however small the compression is shrunk to a value that reads as
    // such, within a thousandth of the path's largest strain increment, not halved on to
    // 1e-83 (a user-style sweep's shrunk case).
    #[test]
    fn a_failure_at_any_small_value_stops_at_a_floor() {
        use crate::convention::{Convention, PointKind, ShearMeasure};
        let info = crate::routine::RoutineInfo {
            name: "bimodulus".into(),
            convention: Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering),
            nstate: 0,
            nprop: 1,
        };
        let mut bar = crate::routine::ModelRoutine(Bimodulus(info));
        let inc = crate::path::PathIncrement::strain([-1e-3, 0.0, 0.0, 0.0, 0.0, 0.0]);
        let path = crate::path::Path { name: "p".into(), increments: vec![inc; 2] };
        let settings = crate::settings::Settings::default();
        let props = [1000.0];
        let start = crate::driver::PointState::zero(bar.0.info(), 0.0);
        let mut caller = Caller::new(&mut bar);
        let report = crate::check::run(&mut caller, &props, start.clone(), &path, &settings).unwrap();
        assert_eq!(report.verdict, crate::report::Verdict::TangentFailure);
        let limits = super::ShrinkLimits::default();
        let s =
            super::shrink(&mut caller, &props, &start, &path, &report, &settings, limits).unwrap().unwrap();
        let x = s.path.increments.iter().map(|i| i.dstrain[0]).fold(0.0, f64::min);
        assert!(x < 0.0 && x.abs() >= 1e-6, "{:?}", s.path);
    }

    #[test]
    fn rounding_keeps_the_leading_digits() {
        assert_eq!(round_to(3.7416e-4, 1), 4e-4);
        assert_eq!(round_to(-3.7416e-4, 2), -3.7e-4);
        assert_eq!(round_to(0.0, 3), 0.0);
    }
}
