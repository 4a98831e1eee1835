//! The exploration loop: make a path (fresh, or a mutation of one that reached a new
//! signature), walk it for its signatures, check it, and shrink every new kind of failure;
//! until the budget is spent.
//!
//! Every path is checked as `tancheck check` checks one, first without the diagnosis (cheap);
//! a failing path is cut after its first failing increment and checked again with it, which
//! names the finding. A failure is new when its verdict, finding and branch are; a new one is
//! shrunk ([`crate::bisect::shrink`]) and located ([`crate::bisect::locate`]), the others are
//! counted. The check runs on one thread, so the report does not depend on the machine.

use std::collections::BTreeMap;
use std::time::Instant;

use super::coverage::{walk, Tally};
use super::generate::{fresh, mutate, Space};
use super::random::Rng;
use super::report::{Budget, ExploreReport, Finding, NamedBranch, NeverReached, ShrunkFailure, Stop};
use super::scale::{measure, Scale};
use crate::bisect::{first_failure, locate, shrink, BisectSettings, ShrinkLimits};
use crate::check;
use crate::driver::PointState;
use crate::error::CoreError;
use crate::path::Path;
use crate::report::{CallCounts, Report, Verdict, CAUTIONS};
use crate::routine::Caller;
use crate::settings::Settings;

/// A property drawn from a range for each fresh path.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PropertyRange {
    pub index: usize,
    pub low: f64,
    pub high: f64,
    /// Log-uniform (both ends positive) instead of uniform.
    pub log: bool,
}

/// How to explore.
#[derive(Clone, Debug)]
pub struct ExploreSettings {
    pub seed: u64,
    pub budget: Budget,
    /// The most increments of a path.
    pub max_increments: usize,
    /// Candidate paths the shrinker checks at most per failure.
    pub shrink_iterations: usize,
    pub property_ranges: Vec<PropertyRange>,
    /// Branches the routine is expected to reach (its vocabulary or the manifest's).
    pub branches: Vec<NamedBranch>,
    /// The temperature window; None: from the start temperature up by 200 when the routine
    /// responds to temperature, no temperature increments otherwise.
    pub temperature: Option<(f64, f64)>,
    /// The strain scale instead of the measured one.
    pub strain_scale: Option<f64>,
}

impl Default for ExploreSettings {
    fn default() -> Self {
        ExploreSettings {
            seed: 1,
            budget: Budget { paths: Some(DEFAULT_PATHS), calls: None, seconds: None },
            max_increments: 40,
            shrink_iterations: 300,
            property_ranges: Vec::new(),
            branches: Vec::new(),
            temperature: None,
            strain_scale: None,
        }
    }
}

/// The default budget: random paths checked.
pub const DEFAULT_PATHS: usize = 500;
/// The temperature window above the start temperature when the routine responds to
/// temperature and none is declared.
pub const DEFAULT_TEMPERATURE_RISE: f64 = 200.0;

impl ExploreSettings {
    pub fn validate(&self, nprop: usize) -> Result<(), CoreError> {
        let b = &self.budget;
        if b.paths.is_none() && b.calls.is_none() && b.seconds.is_none() {
            return Err(CoreError::NoBudget);
        }
        if self.max_increments == 0 {
            return Err(CoreError::TooSmall { what: "the increments of a path", given: 0 });
        }
        for r in &self.property_ranges {
            let reason = if r.index >= nprop {
                Some(format!("the routine has {nprop} properties (indices 0 to {})", nprop.saturating_sub(1)))
            } else if !(r.low.is_finite() && r.high.is_finite()) {
                Some("the ends must be finite numbers".into())
            } else if r.low > r.high {
                Some(format!("the low end {} is above the high end {}", r.low, r.high))
            } else if r.log && r.low <= 0.0 {
                Some(format!("a log range needs a positive low end, got {}", r.low))
            } else {
                None
            };
            if let Some(reason) = reason {
                return Err(CoreError::PropertyRange { index: r.index, reason });
            }
        }
        if let Some((lo, hi)) = self.temperature {
            if !(lo.is_finite() && hi.is_finite() && lo < hi) {
                return Err(CoreError::TemperatureWindow(lo, hi));
            }
        }
        Ok(())
    }
}

/// What the loop tells its caller after each path.
pub struct Progress {
    pub paths: usize,
    pub calls: u64,
    pub signatures: usize,
    pub findings: usize,
}

/// A failure's key: verdict, finding, branch.
type Key = (Verdict, String, String);

fn key_of(r: &Report) -> Key {
    match first_failure(r) {
        // A fault's message holds numbers of its call: every fault is one kind of failure.
        Some(f) if f.fault.is_some() => (r.verdict, "routine-fault".into(), "a faulted call".into()),
        Some(f) => (r.verdict, f.finding().to_string(), f.branch_label()),
        None => (r.verdict, r.finding(), "increment 0".into()),
    }
}

/// Explore the routine behind `caller` from `start` with properties `props`. `progress` is
/// told after each path checked; a stop it returns ends the exploration there (the command
/// line's on a stop signal), with everything found so far.
pub fn run(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    settings: &Settings,
    ex: &ExploreSettings,
    progress: &mut dyn FnMut(&Progress) -> Option<Stop>,
) -> Result<ExploreReport, CoreError> {
    let info = caller.info().clone();
    ex.validate(info.nprop)?;
    let t0 = Instant::now();
    let (real0, cplx0) = (caller.real_calls, caller.complex_calls);
    let calls = |c: &Caller<'_>| c.real_calls - real0 + c.complex_calls - cplx0;
    let mut settings = settings.clone();
    settings.jobs = 1;
    let mut quick = settings.clone();
    quick.diagnose = false;
    // The slots a path drives (a plane-strain point's ε33 stays 0).
    let slots: Vec<usize> = info.convention.kind().path_slots().to_vec();
    let mut notes = Vec::new();
    let mut scales: BTreeMap<Vec<u64>, Scale> = BTreeMap::new();
    let bits = |p: &[f64]| p.iter().map(|x| x.to_bits()).collect::<Vec<u64>>();
    let scale0 = measure(caller, props, start, &slots)?;
    scales.insert(bits(props), scale0.clone());
    if !scale0.measured && ex.strain_scale.is_none() {
        notes.push(format!(
            "no probe direction left the elastic range up to a strain of 1: increments are scaled to {:e} \
             (common practice for metals); declare explore.strain_scale to change it",
            super::scale::FALLBACK_STRAIN
        ));
    }
    let temperature = match ex.temperature {
        Some(w) => Some(w),
        None if scale0.uses_temperature => {
            notes.push(format!(
                "the routine responds to temperature: the paths heat and cool between {} and {} (declare \
                 explore.temperature for another window)",
                start.temp,
                start.temp + DEFAULT_TEMPERATURE_RISE
            ));
            Some((start.temp, start.temp + DEFAULT_TEMPERATURE_RISE))
        }
        None => None,
    };
    let random_properties = !ex.property_ranges.is_empty();
    let mut rng = Rng::new(ex.seed);
    let mut corpus: Vec<(Path, Vec<f64>)> = Vec::new();
    let mut tally = Tally::default();
    let mut findings: Vec<Finding> = Vec::new();
    let (mut paths, mut mutated, mut increments, mut cut) = (0usize, 0usize, 0usize, 0usize);
    let mut routine = None;
    let bisect_settings = BisectSettings::default();
    let stopped_by = loop {
        let b = &ex.budget;
        if b.paths.is_some_and(|n| paths >= n) {
            break Stop::Paths;
        }
        if b.calls.is_some_and(|n| calls(caller) >= n) {
            break Stop::Calls;
        }
        if b.seconds.is_some_and(|s| t0.elapsed().as_secs_f64() >= s) {
            break Stop::Time;
        }
        paths += 1;
        let name = format!("explore seed {} path {paths}", ex.seed);
        // A mutation of a path that reached something new, or a fresh path.
        let parent = (!corpus.is_empty() && rng.chance(0.6)).then(|| {
            let n = corpus.len();
            rng.below(n).max(rng.below(n))
        });
        let these: Vec<f64> = match parent {
            Some(i) => corpus[i].1.clone(),
            None if random_properties && paths > 1 => draw(&mut rng, props, &ex.property_ranges),
            None => props.to_vec(),
        };
        let scale = match scales.get(&bits(&these)) {
            Some(s) => s.clone(),
            None => {
                let s = measure(caller, &these, start, &slots)?;
                scales.insert(bits(&these), s.clone());
                s
            }
        };
        let space = Space {
            slots: slots.clone(),
            strain: ex.strain_scale.unwrap_or(scale.strain),
            stress: scale.stress,
            temperature,
            start_temp: start.temp,
            max_increments: ex.max_increments,
        };
        let path = match parent {
            Some(i) => {
                mutated += 1;
                mutate(&space, &mut rng, &corpus[i].0, name)
            }
            None => fresh(&space, &mut rng, name),
        };
        // Each path is a run of its own: a memory guard that found a fault in an earlier path
        // (or in the scale's probe calls) finds it again here.
        caller.forget_guard_findings();
        let walked = walk(caller, &these, start, &path, &settings)?;
        cut += usize::from(walked.cut_at.is_some());
        let path = walked.path.clone();
        if path.increments.is_empty() {
            continue;
        }
        let shown = random_properties.then_some(these.as_slice());
        if tally.add(paths, &walked, shown) > 0 {
            corpus.push((path.clone(), these.clone()));
        }
        increments += path.increments.len();
        caller.forget_guard_findings();
        let report = check::run(caller, &these, start.clone(), &path, &quick)?;
        routine.get_or_insert_with(|| report.routine.clone());
        if report.verdict != Verdict::Pass {
            failure(
                caller,
                &these,
                start,
                &path,
                &report,
                &settings,
                ex,
                &bisect_settings,
                paths,
                &mut findings,
            )?;
        }
        if let Some(stop) = progress(&Progress {
            paths,
            calls: calls(caller),
            signatures: tally.reached.len(),
            findings: findings.len(),
        }) {
            break stop;
        }
    };
    if cut > 0 {
        notes.push(format!(
            "{cut} path(s) were cut before an increment whose call asked for a smaller increment \
             (a request, not a finding)"
        ));
    }
    notes.extend(super::report::one_flaw_notes(&findings));
    let mut never = NeverReached::default();
    for b in &ex.branches {
        if !tally.reached.keys().any(|s| s.branch == Some(b.branch)) {
            never.branches.push(b.clone());
        }
    }
    let mut changed = vec![false; info.nstate];
    for s in tally.reached.keys() {
        for &(a, b) in &s.changed {
            for c in &mut changed[a as usize..=b as usize] {
                *c = true;
            }
        }
    }
    for (i, c) in changed.iter().enumerate() {
        if !c {
            let i = i as u32;
            match never.state.last_mut() {
                Some(r) if r.1 + 1 == i => r.1 = i,
                _ => never.state.push((i, i)),
            }
        }
    }
    let verdict = [Verdict::RoutineFault, Verdict::TangentFailure, Verdict::TwinNotSafe]
        .into_iter()
        .find(|v| findings.iter().any(|f| f.verdict == *v))
        .unwrap_or(Verdict::Pass);
    let routine = match routine {
        Some(r) => r,
        None => {
            check::run(
                caller,
                props,
                start.clone(),
                &Path::ramp(crate::Shape::UniaxialStrain, 1e-9, 1, 0),
                &quick,
            )?
            .routine
        }
    };
    Ok(ExploreReport {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        routine,
        seed: ex.seed,
        budget: ex.budget,
        stopped_by,
        // The strain the paths were scaled to: the declared one when there is one.
        scale: match ex.strain_scale {
            Some(s) => Scale { strain: s, declared: true, ..scale0 },
            None => scale0,
        },
        temperature,
        random_properties,
        paths,
        mutated,
        corpus: corpus.len(),
        increments,
        calls: CallCounts { real: caller.real_calls - real0, complex: caller.complex_calls - cplx0 },
        seconds: t0.elapsed().as_secs_f64(),
        reached: tally.reached.into_values().collect(),
        never,
        findings,
        verdict,
        notes,
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
    })
}

/// Properties with each declared range drawn.
fn draw(rng: &mut Rng, props: &[f64], ranges: &[PropertyRange]) -> Vec<f64> {
    let mut p = props.to_vec();
    for r in ranges {
        p[r.index] = if r.low == r.high {
            r.low
        } else if r.log {
            rng.log_range(r.low, r.high)
        } else {
            rng.range(r.low, r.high)
        };
    }
    p
}

/// A failing path: name its finding (the path cut after its first failure, checked with the
/// diagnosis), and shrink it when the failure is new.
#[allow(clippy::too_many_arguments)]
fn failure(
    caller: &mut Caller<'_>,
    props: &[f64],
    start: &PointState,
    path: &Path,
    quick: &Report,
    settings: &Settings,
    ex: &ExploreSettings,
    bisect: &BisectSettings,
    number: usize,
    findings: &mut Vec<Finding>,
) -> Result<(), CoreError> {
    let mut failing = path.clone();
    if let Some(f) = first_failure(quick) {
        failing.increments.truncate(f.index);
    }
    caller.forget_guard_findings();
    let mut report = check::run(caller, props, start.clone(), &failing, settings)?;
    if report.verdict == Verdict::Pass && failing.increments.len() < path.increments.len() {
        // The diagnosis cleared that increment (a step study converged): the whole path, then.
        failing = path.clone();
        caller.forget_guard_findings();
        report = check::run(caller, props, start.clone(), &failing, settings)?;
    }
    if report.verdict == Verdict::Pass {
        return Ok(());
    }
    let (verdict, finding, branch) = key_of(&report);
    if let Some(f) =
        findings.iter_mut().find(|f| f.verdict == verdict && f.finding == finding && f.branch == branch)
    {
        f.paths += 1;
        return Ok(());
    }
    let first_increment = first_failure(&report).map_or(0, |f| f.index);
    let limits = ShrinkLimits { max_iterations: ex.shrink_iterations, max_seconds: 86_400.0 };
    let shrunk = if ex.shrink_iterations > 0 && first_increment > 0 {
        match shrink(caller, props, start, &failing, &report, settings, limits)? {
            Some(s) => {
                let located = locate(caller, props, start.clone(), &s.path, &s.report, settings, bisect)?;
                Some(ShrunkFailure {
                    path: s.path,
                    iterations: s.iterations,
                    accepted: s.accepted,
                    stop: s.stop,
                    located,
                })
            }
            None => None,
        }
    } else {
        None
    };
    findings.push(Finding {
        verdict,
        finding,
        branch,
        first_path: number,
        first_increment,
        path: failing,
        properties: props.to_vec(),
        paths: 1,
        shrunk,
        case: None,
    });
    Ok(())
}
