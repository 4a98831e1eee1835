//! The readable report of `tancheck demo`: per routine its manifest, a short view of the check
//! (or the full report with `--verbose`) and whether it got the verdict it should; with
//! `--quiet` only the routines that did not.

use std::io::{self, Write};

use tancheck_core::report::CheckOutcome;
use tancheck_core::Report;

use super::{check, Detail, Palette};
use crate::report::model::DemoReport;
use crate::report::sci;

pub fn write(out: &mut dyn Write, r: &DemoReport, detail: Detail, p: Palette) -> io::Result<()> {
    for s in r.skipped.iter().filter(|_| detail != Detail::Quiet) {
        writeln!(out, "   SKIPPED {s}")?;
    }
    for c in &r.cases {
        let (expected, got) = (c.expected.word(), c.report.verdict.word());
        if detail == Detail::Quiet {
            if !c.right {
                writeln!(out, "FAIL {}: expected {expected}, got {got}", c.title)?;
            }
            continue;
        }
        writeln!(out, "-- {} --", c.title)?;
        writeln!(out, "   manifest: {}", c.manifest)?;
        if detail == Detail::Verbose {
            check::write(out, &c.report, Detail::Normal, p)?;
        } else {
            summary(out, &c.report)?;
        }
        let how = if c.right { "as it should be" } else { "NOT AS EXPECTED" };
        writeln!(out, "   expected {expected}, got {got}: {how}\n")?;
    }
    if detail != Detail::Quiet {
        for c in tancheck_core::report::CAUTIONS {
            writeln!(out, "caution: {c}")?;
        }
        if let Some(dir) = &r.kept {
            writeln!(
                out,
                "\nThe libraries and manifests are in {dir}; rerun one with `tancheck check <manifest>`."
            )?;
        }
    }
    let end = if r.exit_code == 0 {
        "every routine got the verdict it should (exit 0)"
    } else {
        "some routine did NOT get the verdict it should (exit 1)"
    };
    writeln!(out, "demo: {end}")
}

/// A short view: per scheme, the worst errors; for a failure, the first failing increment's
/// worst entries, the diagnosis and the finding.
fn summary(out: &mut dyn Write, r: &Report) -> io::Result<()> {
    writeln!(out, "   routine {} along {}", r.routine.name, r.path)?;
    for s in &r.summary {
        if s.checks == 0 {
            writeln!(out, "   {:<13} skipped", s.scheme.name())?;
            continue;
        }
        writeln!(
            out,
            "   {:<13} {:>2} of {:>2} increments failed; worst norm error {}, worst entry error {} (tolerance {})",
            s.scheme.name(),
            s.failed,
            s.checks,
            sci(s.worst_norm_error),
            sci(s.worst_entry_error),
            sci(s.tol)
        )?;
    }
    if let Some(inc) = r.increments.iter().find(|i| !i.passed()) {
        for c in inc.checks.iter().filter(|c| !c.passed()).take(1) {
            if let CheckOutcome::Compared(cmp) = &c.tangent {
                writeln!(
                    out,
                    "   first failure: increment {} ({}), {}: wrong entries (row/column)",
                    inc.index,
                    inc.branch_label(),
                    c.scheme.name()
                )?;
                for e in cmp.worst.iter().filter(|e| e.error > cmp.tol) {
                    writeln!(
                        out,
                        "     {:<7} returned {:>13.6e}   derivative {:>13.6e}   error {}",
                        e.label,
                        e.returned,
                        e.numerical,
                        sci(e.error)
                    )?;
                }
            }
        }
        if let Some(d) = &inc.diagnosis {
            writeln!(out, "   diagnosis: {}", d.reason)?;
            if let Some(h) = d.causes.iter().find(|h| h.explains) {
                writeln!(out, "   likely cause: {} — {}", h.cause.name(), h.detail)?;
            }
        }
        writeln!(
            out,
            "   finding over the path: {} (the cause that explains the most failing increments)",
            r.finding()
        )?;
        if let Some(f) = r.first_fault() {
            writeln!(out, "   fault: {}", f.message)?;
        }
    }
    for n in &r.notes {
        writeln!(out, "   note: {n}")?;
    }
    Ok(())
}
