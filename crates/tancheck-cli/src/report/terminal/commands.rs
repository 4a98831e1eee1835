//! The readable reports of the commands besides `check`: probe suite, bisect, replay, a
//! folder of cases, selftest.

use std::io::{self, Write};

use tancheck_core::bisect::{Inside, Located, StepVerdict};
use tancheck_core::case::Numbers;
use tancheck_core::probe::{ProbeStatus, SuiteReport};
use tancheck_core::Verdict;

use super::{Detail, Palette};
use crate::report::model::{BisectOutcome, CaseFolderResult, ReplayReport, SelftestReport, SuiteContext};

/// The verdict word of an exit code.
fn verdict_word(code: i32) -> &'static str {
    match code {
        crate::exit::PASS => "PASS",
        crate::exit::TANGENT_FAILURE => "FAIL",
        _ => "FAULT",
    }
}

/// A faulted probe's summary split into where ("the routine failed at increment 2") and the
/// fault's own words; None for any other result.
fn fault_text(r: &tancheck_core::probe::ProbeResult) -> Option<(&str, &str)> {
    if !r.fault {
        return None;
    }
    r.summary.split_once(": ")
}

/// Detail lines of a failed probe shown without `-v` (besides those of the increment it
/// failed at and coverage warnings).
const FAILED_DETAILS: usize = 6;

/// A probe suite: a line per probe (only the failed ones with `-q`), details of failures.
pub fn suite(
    out: &mut dyn Write,
    report: &SuiteReport,
    ctx: &SuiteContext,
    detail: Detail,
    p: Palette,
) -> io::Result<()> {
    let quiet = detail == Detail::Quiet;
    if !quiet {
        writeln!(out, "{}", p.head(&format!("== {} — suite {} ==", report.routine, report.suite)))?;
        writeln!(out, "   path ({}): {}", ctx.path_source, report.path)?;
        for n in ctx.notes.iter().chain(&report.notes) {
            writeln!(out, "   note: {n}")?;
        }
        writeln!(out)?;
    }
    // A fault that ends several probes (a crash at the same call of the same path) is told in
    // full once; the later probes refer to the first that met it.
    let mut faults: Vec<(&str, &str)> = Vec::new();
    for r in &report.results {
        let failed = r.status == ProbeStatus::Fail;
        if quiet && !failed {
            continue;
        }
        let shown;
        let summary = match fault_text(r) {
            Some((at, why)) => match faults.iter().find(|(w, _)| *w == why) {
                Some((_, first)) => {
                    shown = format!("{at}: the same fault as in `{first}`");
                    shown.as_str()
                }
                None => {
                    faults.push((why, r.probe.as_str()));
                    r.summary.as_str()
                }
            },
            None => r.summary.as_str(),
        };
        let word = format!("{:<8}", r.status.word());
        let word = match r.status {
            ProbeStatus::Fail => p.fail(&word),
            ProbeStatus::Pass => p.pass(&word),
            _ => p.dim(&word),
        };
        if quiet {
            writeln!(out, "{} {} probe {}: {}", p.fail("FAIL"), report.routine, r.probe, summary)?;
            continue;
        }
        writeln!(out, "   {:<15} {word} {}", r.probe, summary)?;
        // A coverage warning is shown as a check shows it: always (a passing probe that did
        // not look at something says so). A failed probe's details are shown, up to
        // FAILED_DETAILS lines and those of the increment it failed at without `-v` (a newton
        // probe printed every increment's residuals, dozens of lines; a user-style sweep).
        let shown: Vec<&String> = r
            .details
            .iter()
            .filter(|d| detail == Detail::Verbose || failed || d.starts_with("coverage warning"))
            .collect();
        let at = r.increment.map(|k| format!("increment {k}"));
        // "increment 9 (…", "increment 9:", not "increment 90".
        let of_at = |d: &str| {
            at.as_ref().is_some_and(|a| {
                d.strip_prefix(a.as_str()).is_some_and(|rest| !rest.starts_with(|c: char| c.is_ascii_digit()))
            })
        };
        let mut left = 0;
        for (i, d) in shown.iter().enumerate() {
            let keep = detail == Detail::Verbose
                || i < FAILED_DETAILS
                || d.starts_with("coverage warning")
                || of_at(d);
            if keep {
                writeln!(out, "                            {d}")?;
            } else {
                left += 1;
            }
        }
        if left > 0 {
            writeln!(out, "                            … {left} more detail line(s): -v shows them, and the JSON report has them all")?;
        }
    }
    let failed = report.results.iter().filter(|r| r.status == ProbeStatus::Fail).count();
    writeln!(
        out,
        "{}   verdict: {} — {} of {} probes failed (exit {})",
        if quiet { "" } else { "\n" },
        p.verdict(verdict_word(report.exit_code)),
        failed,
        report.results.len(),
        report.exit_code
    )?;
    if !quiet {
        for c in &report.cautions {
            writeln!(out, "   caution: {c}")?;
        }
    }
    Ok(())
}

/// The errors on the two sides of a crossing, to three digits, or to seven when they read the
/// same at three (a crossing of the tolerance inside a branch read "agrees (error 1.00e-10)"
/// beside "differs (error 1.00e-10)").
fn crossing_errors(below: f64, above: f64) -> (String, String) {
    let (b, a) = (format!("{below:.2e}"), format!("{above:.2e}"));
    if b == a {
        (format!("{below:.6e}"), format!("{above:.6e}"))
    } else {
        (b, a)
    }
}

fn write_located(out: &mut dyn Write, l: &Located, indent: &str) -> io::Result<()> {
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
            let (below, above) = crossing_errors(c.error_below, c.error_above);
            writeln!(
                out,
                "{indent}  below: branch {}, {} (error {below})",
                c.class_below.branch_label(),
                c.class_below.word(),
            )?;
            writeln!(
                out,
                "{indent}  above: branch {}, {} (error {above})",
                c.class_above.branch_label(),
                c.class_above.word(),
            )?;
            if c.within_branch() {
                writeln!(out, "{indent}  {}", tancheck_core::bisect::Crossing::WITHIN_BRANCH)?;
            }
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
pub fn bisect(out: &mut dyn Write, o: &BisectOutcome, detail: Detail, p: Palette) -> io::Result<()> {
    if detail == Detail::Quiet {
        if let Some(l) = &o.located {
            writeln!(
                out,
                "{} {} increment {} of {}, branch {}: {}",
                p.fail("FAIL"),
                o.routine,
                l.increment,
                l.of,
                l.branch,
                l.finding
            )?;
        }
        return writeln!(out, "   verdict: {} (exit {})", p.verdict(o.verdict.word()), o.exit_code);
    }
    writeln!(out, "{}", p.head(&format!("== bisect {} ==", o.routine)))?;
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
                    writeln!(out, "     {:>3}  {}", k + 1, super::increment_text(inc))?;
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
    writeln!(out, "   verdict: {} (exit {})", p.verdict(o.verdict.word()), o.exit_code)?;
    for c in &o.cautions {
        writeln!(out, "   caution: {c}")?;
    }
    Ok(())
}

fn numbers_line(v: &Numbers) -> String {
    v.bits
        .iter()
        .map(|b| format!("{:>24e}", f64::from_bits(u64::from_str_radix(b, 16).unwrap_or(0))))
        .collect::<Vec<_>>()
        .join(" ")
}

/// Print a replay for the terminal.
pub fn replay(out: &mut dyn Write, r: &ReplayReport, detail: Detail, p: Palette) -> io::Result<()> {
    let n = r.stress.bits.len();
    if detail == Detail::Quiet {
        if !r.pass {
            let word = if r.exit_code == crate::exit::ROUTINE_FAULT { "FAULT" } else { "FAIL" };
            writeln!(out, "{} {}: {} ({})", p.fail(word), r.case, r.finding, r.origin)?;
        }
        return writeln!(out, "   verdict: {} (exit {})", p.verdict(verdict_word(r.exit_code)), r.exit_code);
    }
    writeln!(out, "{}", p.head(&format!("== replay of {} ==", r.case)))?;
    writeln!(out, "   routine: {}", r.routine)?;
    writeln!(out, "   call: {}", r.origin)?;
    for w in &r.warnings {
        writeln!(out, "   warning: {w}")?;
    }
    // The call's inputs (the case's decimals; its bits are what the call was given).
    let c = &r.inputs;
    writeln!(out, "   inputs (increment {}):", c.increment)?;
    for (what, v) in [
        ("strain", &c.strain),
        ("dstrain", &c.dstrain),
        ("stress0", &c.stress0),
        ("state0", &c.state0),
        ("props", &c.props),
    ] {
        if !v.bits.is_empty() {
            writeln!(out, "     {what:<8}{}", numbers_line(v))?;
        }
    }
    let pair = |v: &Numbers| {
        let x = |k: usize| {
            v.bits.get(k).map_or(f64::NAN, |b| f64::from_bits(u64::from_str_radix(b, 16).unwrap_or(0)))
        };
        (x(0), x(1))
    };
    let ((t, dt), (time, dtime)) = (pair(&c.temp), pair(&c.time));
    writeln!(out, "     temperature {t:e} + {dt:e}, time {time:e} + {dtime:e}")?;
    if let Some(f) = &r.fault {
        writeln!(out, "   the call faulted: {f}")?;
    }
    if r.identical {
        writeln!(
            out,
            "   outputs: the same as in the case, bit for bit (status, branch, stress, state, tangent)"
        )?;
    } else {
        writeln!(out, "   outputs DIFFER from the case:")?;
        for d in &r.differences {
            writeln!(out, "     {d}")?;
        }
    }
    writeln!(out, "   status {}, branch {}", r.status, r.branch)?;
    writeln!(out, "   stress  {}", numbers_line(&r.stress))?;
    writeln!(out, "   tangent (row i: ∂σ_i/∂Δε_j, j = 1 … {n})")?;
    for i in 0..n {
        let row: Vec<String> = (0..n)
            .map(|j| {
                let b = r.tangent.bits.get(i + j * n).map(String::as_str).unwrap_or("0");
                format!("{:>24e}", f64::from_bits(u64::from_str_radix(b, 16).unwrap_or(0)))
            })
            .collect();
        writeln!(out, "     {}", row.join(" "))?;
    }
    for c in &r.checks {
        let tangent_pass = c.tangent_pass();
        match c.outcome.as_str() {
            "compared" => writeln!(
                out,
                "   {:<13} {}  norm error {:e}, worst entry error {:e} (tolerance {:e}){}",
                c.scheme.name(),
                if tangent_pass { "agrees " } else { "DIFFERS" },
                c.norm_error.unwrap_or(f64::NAN),
                c.worst_entry_error.unwrap_or(f64::NAN),
                c.tol.unwrap_or(f64::NAN),
                worst_two(&c.worst, tangent_pass, c.tol)
            )?,
            other => {
                writeln!(out, "   {:<13} {other}: {}", c.scheme.name(), c.detail.as_deref().unwrap_or(""))?
            }
        }
        if let Some(d) = &c.dtemp {
            writeln!(
                out,
                "   {:<13} {}  ∂σ/∂T norm error {:e}, worst entry error {:e} (tolerance {:e}){}",
                "",
                if d.pass { "agrees " } else { "DIFFERS" },
                d.norm_error.unwrap_or(f64::NAN),
                d.worst_entry_error.unwrap_or(f64::NAN),
                d.tol.unwrap_or(f64::NAN),
                worst_two(&d.worst, d.pass, d.tol)
            )?;
        }
    }
    if let Some(k) = &r.kink {
        writeln!(out, "   {k}")?;
    }
    writeln!(out, "   finding: {} (the case recorded {})", r.finding, r.recorded_finding)?;
    if let Some(p) = &r.path_leads_here {
        if p == "yes" {
            writeln!(out, "   path: walking the case's path reaches this call bit for bit")?;
        } else {
            writeln!(out, "   path: {p}")?;
        }
    }
    let what = match r.exit_code {
        crate::exit::PASS => "PASS — the returned tangent is the derivative at this call now",
        crate::exit::TANGENT_FAILURE if r.checks.iter().all(|c| c.tangent_pass()) => {
            "FAIL — the returned ∂σ/∂T still differs from the temperature derivative at this call"
        }
        crate::exit::TANGENT_FAILURE => {
            "FAIL — the returned tangent still differs from the derivative at this call"
        }
        _ => "FAULT — the routine crashed or failed at this call",
    };
    writeln!(out, "   verdict: {what} (exit {})", r.exit_code)?;
    writeln!(out, "   to rerun it under a debugger: {}", r.debugger)?;
    for c in tancheck_core::report::CAUTIONS {
        writeln!(out, "   caution: {c}")?;
    }
    Ok(())
}

/// A summary for the terminal: one line per case, then the counts.
pub fn cases(out: &mut dyn Write, s: &CaseFolderResult, detail: Detail, p: Palette) -> io::Result<()> {
    if detail != Detail::Quiet {
        writeln!(out, "{}", p.head(&format!("== cases in {} ==", s.folder.display())))?;
    }
    for c in s.failed.iter().chain(&s.passed).filter(|c| detail != Detail::Quiet || !c.report.pass) {
        let r = &c.report;
        writeln!(
            out,
            "   {} {}: {}{}",
            if r.pass {
                p.pass("pass")
            } else if r.exit_code == crate::exit::ROUTINE_FAULT {
                p.fail("FAULT")
            } else {
                p.fail("FAIL")
            },
            c.file.file_name().map(|f| f.to_string_lossy()).unwrap_or_default(),
            r.finding,
            if r.identical { String::new() } else { " (outputs differ from the case)".into() }
        )?;
    }
    for b in &s.broken {
        writeln!(out, "   warning: broken case {b}")?;
    }
    for w in &s.warnings {
        writeln!(out, "   warning: {w}")?;
    }
    if !s.other_routines.is_empty() && detail != Detail::Quiet {
        writeln!(
            out,
            "   set aside: {} case(s) of other routines (--all-cases runs them too)",
            s.other_routines.len()
        )?;
    }
    writeln!(
        out,
        "   cases: {} pass, {} fail, {} broken{}",
        s.passed.len(),
        s.failed.len(),
        s.broken.len(),
        if s.other_routines.is_empty() {
            String::new()
        } else {
            format!(", {} of other routines", s.other_routines.len())
        }
    )
}

/// The selftest table: a row per routine (only the wrong ones with `-q`), and the count.
pub fn selftest(out: &mut dyn Write, r: &SelftestReport, detail: Detail, p: Palette) -> io::Result<()> {
    let quiet = detail == Detail::Quiet;
    for s in &r.skipped {
        writeln!(out, "SKIPPED {s}")?;
    }
    if !quiet {
        writeln!(out, "tancheck selftest: routines with known flaws, and correct ones that must pass\n")?;
        writeln!(
            out,
            "{:<36} {:<8} {:<27} {:<7} {:<27} {:<6} right",
            "variant", "language", "expected", "verdict", "found", "at inc"
        )?;
    }
    for row in r.rows.iter().filter(|row| !quiet || !row.right) {
        let verdict = format!("{:<7}", row.verdict.word());
        writeln!(
            out,
            "{:<36} {:<8} {:<27} {} {:<27} {:<6} {}",
            row.variant,
            row.language,
            row.expected,
            if row.verdict == Verdict::Pass { p.pass(&verdict) } else { p.warn(&verdict) },
            row.found,
            row.first_increment.map_or("-".into(), |i| i.to_string()),
            if row.right { p.pass("yes") } else { p.fail("NO") }
        )?;
    }
    let wrong = r.wrong();
    let line = format!("{} of {} rows right", r.rows.len() - wrong, r.rows.len());
    writeln!(
        out,
        "{}{}",
        if quiet { "" } else { "\n" },
        if wrong == 0 { p.pass(&line) } else { p.fail(&line) }
    )?;
    if detail == Detail::Verbose {
        for (name, what) in &r.descriptions {
            writeln!(out, "  {name:<26} {what}")?;
        }
    }
    Ok(())
}

/// The two worst entries beyond the tolerance of a failed comparison, as "; label returned …,
/// derivative …" (nothing for one that passed).
fn worst_two(worst: &[tancheck_core::case::ProbeEntry], pass: bool, tol: Option<f64>) -> String {
    worst
        .iter()
        .filter(|e| !pass && e.error.is_some_and(|x| x > tol.unwrap_or(0.0)))
        .take(2)
        .map(|e| {
            format!(
                "; {} returned {:e}, derivative {:e}",
                e.label,
                e.returned.unwrap_or(f64::NAN),
                e.numerical.unwrap_or(f64::NAN)
            )
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use tancheck_core::probe::{ProbeResult, ProbeStatus, SuiteReport};

    use super::{Detail, Palette, SuiteContext};

    // A failed probe shows its first details and those of the increment it failed at, and
    // says how many it left out, without `-v`; with `-v` every line (a newton probe printed
    // every increment's residuals, dozens of lines; a user-style sweep).
    #[test]
    fn a_failed_probe_shows_its_first_details_and_its_increment() {
        let mut r = ProbeResult::new("newton", ProbeStatus::Fail, "order 1.00 at increment 9");
        r.increment = Some(9);
        r.details = (1..=12).map(|k| format!("increment {k}: residuals of {k}")).collect();
        let report = SuiteReport {
            tool: "t".into(),
            suite: "s".into(),
            routine: "r".into(),
            path: "p".into(),
            results: vec![r],
            pass: false,
            exit_code: 1,
            notes: vec![],
            cautions: vec![],
        };
        let ctx = SuiteContext { path_source: "the suite's".into(), notes: vec![] };
        let text = |detail| {
            let mut out = Vec::new();
            super::suite(&mut out, &report, &ctx, detail, Palette { on: false }).unwrap();
            String::from_utf8(out).unwrap()
        };
        let t = text(Detail::Normal);
        for k in [1, 6, 9] {
            assert!(t.contains(&format!("increment {k}: residuals of {k}\n")), "{k}: {t}");
        }
        for k in [7, 8, 10, 12] {
            assert!(!t.contains(&format!("increment {k}: residuals")), "{k}: {t}");
        }
        assert!(t.contains("… 5 more detail line(s): -v shows them"), "{t}");
        let t = text(Detail::Verbose);
        assert!((1..=12).all(|k| t.contains(&format!("increment {k}: residuals of {k}\n"))), "{t}");
        assert!(!t.contains("more detail line"), "{t}");
    }

    #[test]
    fn errors_that_read_the_same_get_more_digits() {
        assert_eq!(
            super::crossing_errors(9.9996e-11, 1.00002e-10),
            ("9.999600e-11".into(), "1.000020e-10".into())
        );
        assert_eq!(super::crossing_errors(1e-12, 3e-3), ("1.00e-12".into(), "3.00e-3".into()));
    }
}
