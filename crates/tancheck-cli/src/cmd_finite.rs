//! `tancheck check` and `tancheck probe` on a finite-strain manifest (one with a `finite`
//! section, see `finite_load`): run the check or the probes and print or write the report.

use std::io::Write;
use std::path::Path as FsPath;

use anyhow::Result;
use tancheck_core::finite::check::{run, FiniteReport};
use tancheck_core::finite::probe::{run_all, FiniteProbeResult};
use tancheck_core::finite::TangentMeasure;
use tancheck_core::Verdict;

use crate::exit;
use crate::finite_load::{open, FiniteManifest};
use crate::report::write_atomic;

/// `tancheck check` on a finite-strain manifest.
pub fn check(manifest: &FsPath, json: Option<&FsPath>, quiet: bool) -> Result<i32> {
    let file = manifest.display().to_string();
    crate::survive::begin_report(json, &file)?;
    crate::survive::start_watchdog(
        crate::survive::DEFAULT_CALL_TIMEOUT,
        Some(crate::survive::DEFAULT_SUITE_TIMEOUT),
    );
    let (m, d, dir) = FiniteManifest::load(manifest)?;
    let mut r = open(&m, &d, &dir, &file)?;
    let path = m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    crate::survive::checking(true);
    let report = run(r.as_mut(), &m.routine.properties, &state0, &path, m.check);
    crate::survive::checking(false);
    emit_check(&report, json, quiet)?;
    Ok(report.verdict.exit_code())
}

/// `tancheck probe` on a finite-strain manifest.
pub fn probe(manifest: &FsPath, json: Option<&FsPath>) -> Result<i32> {
    let file = manifest.display().to_string();
    crate::survive::begin_report(json, &file)?;
    crate::survive::start_watchdog(
        crate::survive::DEFAULT_CALL_TIMEOUT,
        Some(crate::survive::DEFAULT_SUITE_TIMEOUT),
    );
    let (m, d, dir) = FiniteManifest::load(manifest)?;
    let mut r = open(&m, &d, &dir, &file)?;
    let path = m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    crate::survive::checking(true);
    let results = run_all(r.as_mut(), &m.routine.properties, &state0, &path, &m.probes);
    crate::survive::checking(false);
    emit_probes(&r.info().name, &results, json)?;
    Ok(if results.iter().all(|p| p.passed) { exit::PASS } else { exit::TANGENT_FAILURE })
}

fn sci(x: f64) -> String {
    format!("{x:.2e}")
}

/// The readable report of a finite-strain check, and the JSON one to a file or `-`.
pub fn emit_check(report: &FiniteReport, json: Option<&FsPath>, quiet: bool) -> Result<()> {
    let mut out = crate::survive::stdout();
    let text = serde_json::to_vec_pretty(report)?;
    if let Some(p) = json {
        if p.as_os_str() == "-" {
            out.write_all(&text)?;
            writeln!(out)?;
            return Ok(());
        }
        write_atomic(p, &text)?;
    }
    let measure = TangentMeasure::parse(&report.tangent_measure).map_or("", |m| m.describe());
    writeln!(
        out,
        "finite-strain check of {}: {} stress, tangent {} ({measure}), frame {}",
        report.routine, report.stress_measure, report.tangent_measure, report.frame
    )?;
    writeln!(
        out,
        "   numerical tangent: {}central differences on F (step {})",
        if report.complex_twin { "complex step with the twin (the reference), and " } else { "" },
        report.settings.central_step
    )?;
    for inc in &report.increments {
        if quiet && inc.passed {
            continue;
        }
        let cx = inc.error_complex.map_or(String::new(), |e| format!("complex {}, ", sci(e)));
        writeln!(
            out,
            "   increment {:>3}: error {cx}central {}  {}",
            inc.increment,
            sci(inc.error_central),
            if inc.passed { "ok" } else { "FAIL" }
        )?;
        if !inc.passed {
            if let Some(w) = &inc.worst {
                writeln!(
                    out,
                    "      largest difference at ({}, {}): returned {:.6e}, numerical {:.6e}",
                    w.row, w.column, w.returned, w.numerical
                )?;
            }
            match &inc.cause {
                Some(c) => {
                    writeln!(out, "      cause {}: {} (left error {})", c.name, c.explanation, sci(c.error))?
                }
                None => writeln!(out, "      cause: none of the measure confusions explains it")?,
            }
        }
    }
    if let Some(k) = report.twin_not_safe {
        writeln!(
            out,
            "   the complex-step twin disagrees with the central differences from increment {k} on: \
             it is not complex-step safe, and was set aside"
        )?;
    }
    if let Some(f) = &report.fault {
        writeln!(out, "   fault: {f}")?;
    }
    let word = match report.verdict {
        Verdict::Pass => "PASS".to_string(),
        v => format!("{}{}", v.word(), report.finding.as_ref().map_or(String::new(), |f| format!(" ({f})"))),
    };
    writeln!(out, "verdict: {word}   ({} calls, {} complex)", report.calls, report.complex_calls)?;
    if !quiet {
        for c in &report.cautions {
            writeln!(out, "   caution: {c}")?;
        }
    }
    Ok(())
}

fn emit_probes(name: &str, results: &[FiniteProbeResult], json: Option<&FsPath>) -> Result<()> {
    let mut out = crate::survive::stdout();
    let text = serde_json::to_vec_pretty(&serde_json::json!({ "routine": name, "probes": results }))?;
    if let Some(p) = json {
        if p.as_os_str() == "-" {
            out.write_all(&text)?;
            writeln!(out)?;
            return Ok(());
        }
        write_atomic(p, &text)?;
    }
    writeln!(out, "finite-strain probes of {name}")?;
    for p in results {
        writeln!(out, "   {:<20} {}  {}", p.name, if p.passed { "ok  " } else { "FAIL" }, p.summary)?;
        for d in &p.details {
            writeln!(out, "      {d}")?;
        }
    }
    let failed = results.iter().filter(|p| !p.passed).count();
    writeln!(
        out,
        "verdict: {}",
        if failed == 0 { "PASS".to_string() } else { format!("FAIL ({failed} probes)") }
    )?;
    for c in tancheck_core::report::CAUTIONS {
        writeln!(out, "   caution: {c}")?;
    }
    Ok(())
}
