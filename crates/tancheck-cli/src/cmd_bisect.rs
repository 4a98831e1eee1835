//! `tancheck bisect MANIFEST`: check the routine along the path, then point at the first
//! failure: the increment and its branch, the fraction of the increment where the error
//! changes class (e.g. where the yield surface is crossed), what the step studies say
//! (mismatch, truncation or noise), and a shrunk path that still fails. The failing calls are
//! written as case files for `tancheck replay`.

use std::io::Write;
use std::path::{Path as FsPath, PathBuf};

use anyhow::{Context, Result};
use clap::Args;
use serde::Serialize;

use tancheck_core::bisect::{self, BisectSettings, Inside, Located, ShrinkLimits, ShrinkStop, StepVerdict};
use tancheck_core::case::{Case, CaseOrigin, CaseRoutine};
use tancheck_core::path::Path;
use tancheck_core::{check, Caller, PointState, Settings, Verdict};

use crate::case_store::{open_for_manifest, write_case};
use crate::exit;
use crate::load::start_state;
use crate::manifest::{parse_path_arg, Manifest};
use crate::session::default_path;

#[derive(Args, Debug)]
pub struct BisectArgs {
    /// The manifest (JSON) that names the routine, its properties and the path.
    pub manifest: PathBuf,
    /// Path to walk instead of the manifest's: SHAPE:PEAK:STEPS[:BACK]
    /// (shapes: uniaxial-strain, shear-12, biaxial, hydrostatic, tension-shear, mixed-mode).
    #[arg(long, value_name = "SPEC")]
    pub path: Option<String>,
    /// Folder for the case files (default: tancheck-cases next to the manifest).
    #[arg(long, value_name = "DIR")]
    pub case_dir: Option<PathBuf>,
    /// Candidate paths the shrinker checks at most; 0 skips shrinking.
    #[arg(long, value_name = "N", default_value_t = ShrinkLimits::default().max_iterations)]
    pub max_shrink_iterations: usize,
    /// Seconds the shrinker runs at most.
    #[arg(long, value_name = "S", default_value_t = ShrinkLimits::default().max_seconds)]
    pub max_shrink_seconds: f64,
    /// Narrow the class change inside the failing increment to this fraction of it.
    #[arg(long, value_name = "F", default_value_t = BisectSettings::default().fraction_tol)]
    pub fraction_tol: f64,
    /// Write the result as JSON to FILE (`-` for standard output, replacing the readable one).
    #[arg(long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    /// Switch floating-point traps (invalid, division by zero, overflow) on inside the routine.
    #[arg(long)]
    pub fp_traps: bool,
}

/// A shrink and what it located.
#[derive(Clone, Debug, Serialize)]
pub struct ShrinkSummary {
    pub path: Path,
    pub original_increments: usize,
    pub iterations: usize,
    pub accepted: usize,
    pub seconds: f64,
    pub stop: ShrinkStop,
    /// The stop in words, naming the option that raises the limit that stopped it.
    pub stopped: String,
    pub located: Option<Located>,
}

/// What `tancheck bisect` found.
#[derive(Clone, Debug, Serialize)]
pub struct BisectOutcome {
    pub routine: String,
    pub path: String,
    pub verdict: Verdict,
    pub finding: String,
    pub located: Option<Located>,
    pub shrunk: Option<ShrinkSummary>,
    /// Case files written.
    pub cases: Vec<PathBuf>,
    /// Things that went wrong without stopping the bisection (a case that could not be
    /// written, a call that did not repeat).
    pub warnings: Vec<String>,
    pub exit_code: i32,
}

/// The stop of a shrink in words, naming the option that raises its limit.
pub fn stop_words(stop: &ShrinkStop) -> String {
    match stop {
        ShrinkStop::Done => "no smaller path fails the same way".into(),
        ShrinkStop::IterationLimit { limit } => format!(
            "stopped at the limit of {limit} candidate checks; raise it with --max-shrink-iterations to shrink further"
        ),
        ShrinkStop::TimeLimit { seconds } => {
            format!("stopped at the limit of {seconds} s; raise it with --max-shrink-seconds to shrink further")
        }
    }
}

/// Write the case of increment `index` of `path` (from `start`): walk there, check the call
/// with the full settings (diagnosis included), capture it.
#[allow(clippy::too_many_arguments)]
fn capture(
    caller: &mut Caller<'_>,
    spec: &CaseRoutine,
    props: &[f64],
    start: &PointState,
    path: &Path,
    located: &Located,
    settings: &Settings,
    manifest: &FsPath,
    shrunk_from: Option<usize>,
    warnings: &mut Vec<String>,
) -> Result<Case> {
    let index = located.increment;
    let (mut driver, previous) =
        bisect::driver_at(caller, props, start.clone(), path, index, settings).map_err(anyhow::Error::msg)?;
    let judged = tancheck_core::call_check::check_call(&mut driver, caller, settings, previous.as_deref());
    if judged.as_ref().is_ok_and(|c| c.passed()) {
        warnings.push(format!(
            "increment {index} passed when checked again on its own: the routine does not repeat its results \
             (hidden state between calls?)"
        ));
    }
    let prefix = Path { name: path.name.clone(), increments: path.increments[..index].to_vec() };
    let origin = CaseOrigin {
        manifest: Some(manifest.display().to_string()),
        path: path.name.clone(),
        increment: index,
        of: path.increments.len(),
        branch: located.branch.clone(),
        crossing: CaseOrigin::crossing_of(&located.inside),
        shrunk_from,
    };
    Ok(Case::capture(
        spec.clone(),
        &driver,
        judged.as_ref(),
        previous.as_deref(),
        settings,
        origin,
        Some((start, &prefix)),
    ))
}

fn write_located(out: &mut dyn Write, l: &Located, indent: &str) -> std::io::Result<()> {
    writeln!(
        out,
        "{indent}first failing increment: {} of {}, branch {}, finding {}",
        l.increment, l.of, l.branch, l.finding
    )?;
    match &l.inside {
        Inside::Crossing(c) => {
            writeln!(
                out,
                "{indent}inside increment {}: the error takes its class at fraction {:.7} of the increment \
                 (between {:.7} and {:.7}, width {:.1e})",
                l.increment,
                c.fraction(),
                c.below,
                c.above,
                c.above - c.below
            )?;
            writeln!(
                out,
                "{indent}  below: branch {}, {} (error {:.2e})",
                c.class_below.branch_label(),
                c.class_below.word(),
                c.error_below
            )?;
            writeln!(
                out,
                "{indent}  above: branch {}, {} (error {:.2e})",
                c.class_above.branch_label(),
                c.class_above.word(),
                c.error_above
            )?;
        }
        Inside::Throughout { smallest } => writeln!(
            out,
            "{indent}inside increment {}: every fraction judged, down to {smallest:.1e}, has the class of the whole \
             increment; the failure does not start inside it",
            l.increment
        )?,
    }
    writeln!(out, "{indent}  (fractions judged by {}: {})", l.judged_by.name(), l.samples.len())?;
    if let Some(s) = &l.step {
        let words = match s.verdict {
            StepVerdict::Mismatch => format!(
                "the discrepancy levels off at {:.2e} as the step shrinks: a true mismatch, not truncation or noise",
                s.plateau.unwrap_or(f64::NAN)
            ),
            StepVerdict::Truncation => {
                "a difference converges to the returned tangent: truncation of the default step, not a mismatch".into()
            }
            StepVerdict::Noise => {
                "the discrepancy neither converges nor levels off: noise (inner solves, rounding) hides it".into()
            }
        };
        writeln!(out, "{indent}in the step: {words}")?;
        for st in &s.studies {
            writeln!(
                out,
                "{indent}  {:<8} best error {:.2e} at relative step {:.0e}, slope {}, noise floor {:.2e}",
                st.scheme.name(),
                st.best_error,
                st.best_rel_step,
                st.slope.map_or("-".into(), |x| format!("{x:.2}")),
                st.noise_floor
            )?;
        }
    }
    Ok(())
}

/// Print the outcome for the terminal.
pub fn write_outcome(o: &BisectOutcome, out: &mut dyn Write) -> std::io::Result<()> {
    writeln!(out, "== bisect {} ==", o.routine)?;
    writeln!(out, "   path: {}", o.path)?;
    match &o.located {
        None if o.verdict == Verdict::Pass => {
            writeln!(out, "   every increment passed: nothing to bisect")?;
        }
        None => {
            // The check failed before the path: the zero increment from the start state.
            writeln!(
                out,
                "   no increment of the path failed the check; the zero increment from the start state \
                 (increment 0 of `tancheck check`) did, and it is not on the path: nothing to bisect"
            )?;
        }
        Some(l) => {
            write_located(out, l, "   ")?;
            if let Some(s) = &o.shrunk {
                writeln!(
                    out,
                    "   shrunk: {} increments to {} ({} candidates checked, {} kept, {:.1} s); {}",
                    s.original_increments,
                    s.path.increments.len(),
                    s.iterations,
                    s.accepted,
                    s.seconds,
                    s.stopped
                )?;
                for (k, inc) in s.path.increments.iter().enumerate() {
                    writeln!(
                        out,
                        "     {:>3}  dstrain {:?}{}{}",
                        k + 1,
                        inc.dstrain,
                        if inc.dtemp != 0.0 { format!("  dtemp {}", inc.dtemp) } else { String::new() },
                        if inc.hold_stress.is_some() { "  (mixed control)" } else { "" }
                    )?;
                }
                if let Some(l) = &s.located {
                    write_located(out, l, "     ")?;
                }
            }
        }
    }
    for c in &o.cases {
        writeln!(out, "   case written: {}  (rerun: tancheck replay {})", c.display(), c.display())?;
    }
    for w in &o.warnings {
        writeln!(out, "   warning: {w}")?;
    }
    writeln!(out, "   verdict: {} (exit {})", o.verdict.word(), o.exit_code)?;
    Ok(())
}

/// `tancheck bisect`.
pub fn run(a: &BisectArgs) -> Result<i32> {
    crate::survive::begin_report(a.json.as_deref(), &a.manifest.display().to_string())?;
    let (mut m, dir) = Manifest::load(&a.manifest)?;
    crate::survive::set_routine(a.json.as_deref(), &crate::session::routine_name(&m));
    crate::survive::start_watchdog(crate::survive::DEFAULT_CALL_TIMEOUT, None);
    m.fp_traps |= a.fp_traps;
    let bs = BisectSettings { fraction_tol: a.fraction_tol, ..BisectSettings::default() };
    bs.validate().map_err(|e| anyhow::anyhow!("--fraction-tol: {e}"))?;
    if !a.max_shrink_seconds.is_finite()
        || a.max_shrink_seconds <= 0.0
        || a.max_shrink_seconds > crate::survive::MAX_SECONDS
    {
        anyhow::bail!(
            "--max-shrink-seconds must be a number of seconds above 0 and at most {}",
            crate::survive::MAX_SECONDS
        );
    }
    let path = match &a.path {
        Some(p) => parse_path_arg(p).map_err(anyhow::Error::msg)?,
        None => m
            .path_or(default_path(m.routine.kind))
            .map_err(|e| anyhow::anyhow!("{}: {e}", a.manifest.display()))?,
    };
    let file = a.manifest.display().to_string();
    let (mut opened, spec) =
        open_for_manifest(&m, &dir).with_context(|| format!("loading the routine of {file}"))?;
    crate::survive::checking(true);
    let routine = opened.routine();
    let info = routine.info().clone();
    let start = start_state(&m, &info).with_context(|| file.clone())?;
    let props = m.routine.properties.clone();
    let settings = m.check.clone();
    let mut caller = Caller::new(routine);
    let report =
        check::run(&mut caller, &props, start.clone(), &path, &settings).map_err(anyhow::Error::msg)?;
    let located = bisect::locate(&mut caller, &props, start.clone(), &path, &report, &settings, &bs)
        .map_err(anyhow::Error::msg)?;
    let case_dir = a.case_dir.clone().unwrap_or_else(|| dir.join("tancheck-cases"));
    let mut warnings = Vec::new();
    let mut cases = Vec::new();
    let mut to_write = Vec::new();
    let mut shrunk = None;
    if let Some(l) = &located {
        let c = capture(
            &mut caller,
            &spec,
            &props,
            &start,
            &path,
            l,
            &settings,
            &a.manifest,
            None,
            &mut warnings,
        )?;
        to_write.push(c);
        if a.max_shrink_iterations > 0 {
            let limits =
                ShrinkLimits { max_iterations: a.max_shrink_iterations, max_seconds: a.max_shrink_seconds };
            if let Some(s) = bisect::shrink(&mut caller, &props, &start, &path, &report, &settings, limits)
                .map_err(anyhow::Error::msg)?
            {
                let l2 =
                    bisect::locate(&mut caller, &props, start.clone(), &s.path, &s.report, &settings, &bs)
                        .map_err(anyhow::Error::msg)?;
                if let Some(l2) = &l2 {
                    let c = capture(
                        &mut caller,
                        &spec,
                        &props,
                        &start,
                        &s.path,
                        l2,
                        &settings,
                        &a.manifest,
                        Some(s.original_increments),
                        &mut warnings,
                    )?;
                    to_write.push(c);
                }
                shrunk = Some(ShrinkSummary {
                    stopped: stop_words(&s.stop),
                    path: s.path,
                    original_increments: s.original_increments,
                    iterations: s.iterations,
                    accepted: s.accepted,
                    seconds: s.seconds,
                    stop: s.stop,
                    located: l2,
                });
            }
        }
    }
    for c in &to_write {
        // Saving a case never fails the run.
        match write_case(&case_dir, c) {
            Ok(f) => {
                if !cases.contains(&f) {
                    cases.push(f);
                }
            }
            Err(e) => warnings.push(format!("{e:#}")),
        }
    }
    crate::survive::checking(false);
    let outcome = BisectOutcome {
        routine: info.name.clone(),
        path: path.name.clone(),
        verdict: report.verdict,
        finding: report.finding(),
        located,
        shrunk,
        cases,
        warnings,
        exit_code: report.exit_code(),
    };
    let mut out = crate::survive::stdout();
    match &a.json {
        Some(p) if p.as_os_str() == "-" => {
            serde_json::to_writer_pretty(&mut out, &outcome)?;
            writeln!(out)?;
        }
        other => {
            write_outcome(&outcome, &mut out)?;
            for c in tancheck_core::report::CAUTIONS {
                writeln!(out, "   caution: {c}")?;
            }
            if let Some(p) = other {
                let mut buf = serde_json::to_vec_pretty(&outcome)?;
                buf.push(b'\n');
                crate::report::write_atomic(p, &buf).with_context(|| format!("writing {}", p.display()))?;
            }
        }
    }
    Ok(if outcome.located.is_none() && outcome.exit_code == exit::PASS {
        exit::PASS
    } else {
        outcome.exit_code
    })
}
