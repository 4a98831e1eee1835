//! Views of the finite-strain reports (core's [`FiniteReport`] of a check and
//! [`FiniteProbeReport`] of the probes): the readable text for the terminal, the HTML page and
//! the JUnit XML. The reporters of the other modules call these for their `finite_check` and
//! `finite_probes` methods; the JSON is the report itself under the common envelope.

use std::fmt::Write as _;
use std::io::{self, Write};

use quick_junit::{NonSuccessKind, Property, Report as JReport, TestCase, TestCaseStatus, TestSuite};
use tancheck_core::finite::check::{FiniteIncrement, FiniteReport};
use tancheck_core::finite::probe::FiniteProbeReport;
use tancheck_core::finite::TangentMeasure;
use tancheck_core::Verdict;

use super::html::{badge, cautions, esc, footer, page};
use super::sci;
use super::style::Palette;

/// The verdict word and, after a failure, the finding.
fn verdict_word(report: &FiniteReport) -> (String, String) {
    let word =
        if report.verdict == Verdict::Pass { "PASS".to_string() } else { report.verdict.word().to_string() };
    (word, report.finding.clone().unwrap_or_default())
}

/// The readable report of a check. `quiet`: failing increments and the verdict only;
/// `verbose`: the gradient of every increment too.
pub fn write_check(
    out: &mut dyn Write,
    report: &FiniteReport,
    quiet: bool,
    verbose: bool,
    p: Palette,
) -> io::Result<()> {
    if quiet {
        return write_check_quiet(out, report, p);
    }
    let measure = TangentMeasure::parse(&report.tangent_measure).map_or("", |m| m.describe());
    writeln!(
        out,
        "{} {}: {} stress, tangent {} ({measure}), frame {}",
        p.head("finite-strain check of"),
        report.routine,
        report.stress_measure,
        report.tangent_measure,
        report.frame
    )?;
    if !quiet {
        writeln!(
            out,
            "   numerical tangent: {}central differences on F (step {})",
            if report.complex_twin { "complex step with the twin (the reference), and " } else { "" },
            report.settings.central_step
        )?;
    }
    for inc in &report.increments {
        if quiet && inc.passed {
            continue;
        }
        let cx = inc.error_complex.map_or(String::new(), |e| format!("complex {}, ", sci(e)));
        let word = if inc.passed { p.pass("ok") } else { p.fail("FAIL") };
        writeln!(
            out,
            "   increment {:>3}: error {cx}central {}  {word}",
            inc.increment,
            sci(inc.error_central)
        )?;
        if verbose {
            let g: Vec<String> = inc.gradient.iter().map(|x| format!("{x:.6}")).collect();
            writeln!(out, "      {}", p.dim(&format!("F (column-major) = [{}]", g.join(", "))))?;
        }
        if !inc.passed {
            let size =
                tancheck_core::finite::TangentMeasure::parse(&report.tangent_measure).map_or(6, |m| m.size());
            if let Some(w) = &inc.worst {
                writeln!(
                    out,
                    "      largest difference at entry {}: returned {:.6e}, numerical {:.6e}",
                    w.label(size),
                    w.returned,
                    w.numerical
                )?;
            }
            // The next largest: a flaw in one term shows in several entries.
            let next: Vec<String> = inc
                .worst_entries
                .iter()
                .skip(1)
                .map(|w| {
                    format!("{} ({:.4e} returned, {:.4e} numerical)", w.label(size), w.returned, w.numerical)
                })
                .collect();
            if !next.is_empty() {
                writeln!(out, "      next: {}", next.join(", "))?;
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
            "   {}",
            p.warn(&format!(
                "the complex-step twin disagrees with the central differences from increment {k} on: it is \
                 not complex-step safe, and was set aside"
            ))
        )?;
    }
    if let Some(f) = &report.fault {
        writeln!(out, "   fault: {f}")?;
    }
    for n in &report.notes {
        writeln!(out, "   note: {n}")?;
    }
    let (word, finding) = verdict_word(report);
    let finding = if finding.is_empty() { String::new() } else { format!(" ({finding})") };
    writeln!(
        out,
        "verdict: {}{finding} (exit {})   ({} calls, {} complex)",
        p.verdict(&word),
        report.verdict.exit_code(),
        report.calls,
        report.complex_calls
    )?;
    if !quiet {
        for c in &report.cautions {
            writeln!(out, "   caution: {c}")?;
        }
    }
    Ok(())
}

/// `-q`: one line per failing increment (its errors, the largest entry's difference and the
/// cause), the fault if any, and the verdict.
fn write_check_quiet(out: &mut dyn Write, report: &FiniteReport, p: Palette) -> io::Result<()> {
    let size = TangentMeasure::parse(&report.tangent_measure).map_or(6, |m| m.size());
    for inc in report.increments.iter().filter(|i| !i.passed) {
        let cx = inc.error_complex.map_or(String::new(), |e| format!("complex {}, ", sci(e)));
        let worst = inc.worst.as_ref().map_or(String::new(), |w| {
            format!(
                "; largest difference at entry {} ({:.6e} returned, {:.6e} numerical)",
                w.label(size),
                w.returned,
                w.numerical
            )
        });
        let cause = inc.cause.as_ref().map_or("unexplained", |c| c.name.as_str());
        writeln!(
            out,
            "{} {} increment {}: error {cx}central {}{worst} -> {cause}",
            p.fail("FAIL"),
            report.routine,
            inc.increment,
            sci(inc.error_central)
        )?;
    }
    if let Some(f) = &report.fault {
        writeln!(out, "{} {}: {f}", p.fail("FAULT"), report.routine)?;
    }
    let (word, finding) = verdict_word(report);
    let finding = if finding.is_empty() { String::new() } else { format!(" ({finding})") };
    writeln!(out, "verdict: {}{finding} (exit {})", p.verdict(&word), report.verdict.exit_code())
}

/// The readable report of the probes. `quiet`: one line per failing probe and the verdict.
pub fn write_probes(
    out: &mut dyn Write,
    report: &FiniteProbeReport,
    quiet: bool,
    p: Palette,
) -> io::Result<()> {
    if quiet {
        for r in report.probes.iter().filter(|r| !r.passed) {
            writeln!(out, "{} {} {}: {}", p.fail("FAIL"), report.routine, r.name, r.summary)?;
        }
    } else {
        writeln!(out, "{} {}", p.head("finite-strain probes of"), report.routine)?;
    }
    for r in &report.probes {
        if quiet {
            continue;
        }
        let word = if r.passed { p.pass("ok  ") } else { p.fail("FAIL") };
        writeln!(out, "   {:<20} {word}  {}", r.name, r.summary)?;
        for d in &r.details {
            writeln!(out, "      {d}")?;
        }
    }
    if !quiet {
        for n in &report.notes {
            writeln!(out, "   note: {n}")?;
        }
    }
    let failed = report.probes.iter().filter(|r| !r.passed).count();
    let probes = if failed == 1 { "1 probe".to_string() } else { format!("{failed} probes") };
    let word = if failed == 0 {
        format!("{} (exit 0)", p.pass("PASS"))
    } else if report.exit_code == 3 {
        format!("{} — a routine call failed ({probes}; exit 3)", p.fail("FAULT"))
    } else {
        format!("{} ({probes}; exit 1)", p.fail("FAIL"))
    };
    writeln!(out, "verdict: {word}")?;
    if !quiet {
        for c in &report.cautions {
            writeln!(out, "   caution: {c}")?;
        }
    }
    Ok(())
}

/// The HTML page of a check: the summary, a table of the increments with their causes.
pub fn check_page(report: &FiniteReport) -> String {
    let (word, finding) = verdict_word(report);
    let mut b = String::new();
    let _ = writeln!(
        b,
        "<header><h1>{}Finite-strain check of <code>{}</code></h1>\n<p class=\"sub\">{} stress, tangent \
         <code>{}</code>, frame {}</p></header>",
        badge(&word),
        esc(&report.routine),
        esc(&report.stress_measure),
        esc(&report.tangent_measure),
        esc(&report.frame)
    );
    let measure = TangentMeasure::parse(&report.tangent_measure).map_or("", |m| m.describe());
    let _ = writeln!(
        b,
        "<dl class=\"summary\"><dt>measure</dt><dd>{}</dd><dt>verdict</dt><dd>{} (exit {})</dd><dt>finding</dt><dd>{}</dd><dt>numerical \
         tangent</dt><dd>{}central differences on F, step {}</dd><dt>calls</dt><dd>{} real, {} complex</dd></dl>",
        esc(measure),
        esc(&word),
        report.exit_code,
        esc(if finding.is_empty() { "none" } else { &finding }),
        if report.complex_twin { "complex step with the twin (the reference), and " } else { "" },
        report.settings.central_step,
        report.calls,
        report.complex_calls
    );
    if let Some(f) = &report.fault {
        let _ = writeln!(b, "<p><strong>Fault.</strong> {}</p>", esc(f));
    }
    b.push_str(
        "<h2>Increments</h2>\n<table>\n<tr><th>increment</th><th>error (complex)</th><th>error (central)</th>\
         <th>result</th><th>largest differences (returned / numerical)</th><th>cause</th></tr>\n",
    );
    let size = TangentMeasure::parse(&report.tangent_measure).map_or(6, |m| m.size());
    // A cause's explanation in full at its first increment, its name after (the same words
    // filled every row of a long path).
    let mut told: Vec<(&str, usize)> = Vec::new();
    for inc in &report.increments {
        let cause =
            inc.cause.as_ref().map_or(String::new(), |c| match told.iter().find(|(n, _)| *n == c.name) {
                Some((_, k)) => format!("<code>{}</code> (as at increment {k})", esc(&c.name)),
                None => {
                    told.push((&c.name, inc.increment));
                    format!("<code>{}</code>: {}", esc(&c.name), esc(&c.explanation))
                }
            });
        let entries: Vec<String> = inc
            .worst_entries
            .iter()
            .take(3)
            .map(|w| {
                format!(
                    "<span class=\"nowrap\">{} {:.4e} / {:.4e}</span>",
                    esc(&w.label(size)),
                    w.returned,
                    w.numerical
                )
            })
            .collect();
        let _ = writeln!(
            b,
            "<tr><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td><td>{cause}</td></tr>",
            inc.increment,
            inc.error_complex.map_or("-".into(), sci),
            sci(inc.error_central),
            badge(if inc.passed { "PASS" } else { "FAIL" }),
            entries.join("<br>")
        );
    }
    for n in &report.notes {
        let _ = writeln!(b, "<p class=\"note\">{}</p>", esc(n));
    }
    b.push_str("</table>\n");
    b.push_str(&cautions(&report.cautions));
    b.push_str(&footer(&format!("tancheck {}", env!("CARGO_PKG_VERSION"))));
    page(&format!("tancheck finite-strain check: {}", report.routine), &b)
}

/// The HTML page of the probes: a table of the probes with their details.
pub fn probes_page(report: &FiniteProbeReport) -> String {
    let mut b = String::new();
    let _ = writeln!(
        b,
        "<header><h1>{}Finite-strain probes of <code>{}</code></h1></header>",
        badge(if report.passed { "PASS" } else { "FAIL" }),
        esc(&report.routine)
    );
    b.push_str("<table>\n<tr><th>probe</th><th>result</th><th>what it found</th></tr>\n");
    for r in &report.probes {
        let details: String = r.details.iter().map(|d| format!("<br>{}", esc(d))).collect();
        let _ = writeln!(
            b,
            "<tr><td><code>{}</code></td><td>{}</td><td>{}{details}</td></tr>",
            esc(&r.name),
            badge(if r.passed { "PASS" } else { "FAIL" }),
            esc(&r.summary)
        );
    }
    b.push_str("</table>\n");
    for n in &report.notes {
        let _ = writeln!(b, "<p class=\"note\">{}</p>", esc(n));
    }
    b.push_str(&cautions(&report.cautions));
    b.push_str(&footer(&format!("tancheck {}", env!("CARGO_PKG_VERSION"))));
    page(&format!("tancheck finite-strain probes: {}", report.routine), &b)
}

fn failure(message: String) -> TestCaseStatus {
    let mut s = TestCaseStatus::non_success(NonSuccessKind::Failure);
    s.set_message(message.clone());
    s.set_type("tangent-finding");
    s.set_description(message);
    s
}

fn xml(r: &JReport) -> io::Result<String> {
    super::junit::to_string(r)
}

/// JUnit XML of a check: a test case per increment, the cause in a failure's message.
pub fn check_junit(report: &FiniteReport) -> io::Result<String> {
    let mut suite = TestSuite::new(format!("tancheck finite-strain check {}", report.routine));
    suite.add_property(Property::new("tangent_measure", report.tangent_measure.as_str()));
    suite.add_property(Property::new("verdict", report.verdict.word()));
    for inc in &report.increments {
        let status = if inc.passed {
            TestCaseStatus::success()
        } else {
            let cause = inc
                .cause
                .as_ref()
                .map_or("unexplained".to_string(), |c| format!("{}: {}", c.name, c.explanation));
            failure(format!("increment {}: error {} ({cause})", inc.increment, sci(inc.error_central)))
        };
        suite.add_test_case(TestCase::new(format!("increment {}", inc.increment), status));
    }
    if let Some(f) = &report.fault {
        let mut s = TestCaseStatus::non_success(NonSuccessKind::Error);
        s.set_message(f.clone());
        s.set_type("routine-fault");
        suite.add_test_case(TestCase::new("routine", s));
    }
    let mut r = JReport::new("tancheck");
    r.add_test_suite(suite);
    xml(&r)
}

/// JUnit XML of the probes: a test case per probe.
pub fn probes_junit(report: &FiniteProbeReport) -> io::Result<String> {
    let mut suite = TestSuite::new(format!("tancheck finite-strain probes {}", report.routine));
    for p in &report.probes {
        let status = if p.passed { TestCaseStatus::success() } else { failure(p.summary.clone()) };
        suite.add_test_case(TestCase::new(p.name.clone(), status));
    }
    let mut r = JReport::new("tancheck");
    r.add_test_suite(suite);
    xml(&r)
}

/// The lines of one judged increment: errors, the largest entries, the cause.
fn judged_lines(out: &mut dyn Write, inc: &FiniteIncrement, size: usize, p: Palette) -> io::Result<()> {
    let cx = inc.error_complex.map_or(String::new(), |e| format!("complex {}, ", sci(e)));
    let word = if inc.passed { p.pass("passes") } else { p.fail("FAILS") };
    writeln!(out, "   judged again on its own: error {cx}central {}  {word}", sci(inc.error_central))?;
    for w in inc.worst_entries.iter().take(3) {
        writeln!(
            out,
            "      entry {}: returned {:.6e}, numerical {:.6e}",
            w.label(size),
            w.returned,
            w.numerical
        )?;
    }
    match &inc.cause {
        Some(c) => writeln!(out, "      cause {}: {}", c.name, c.explanation)?,
        // As the check says it (replay said nothing where no cause fits; a user-style sweep).
        None if !inc.passed => writeln!(out, "      cause: none of the measure confusions explains it")?,
        None => {}
    }
    Ok(())
}

/// `tancheck bisect` on a finite-strain manifest.
pub fn write_bisect(
    out: &mut dyn Write,
    o: &crate::report::model::FiniteBisectOutcome,
    quiet: bool,
    p: Palette,
) -> io::Result<()> {
    let size = TangentMeasure::parse(&o.check.tangent_measure).map_or(6, |m| m.size());
    if !quiet {
        writeln!(out, "{} {}", p.head("finite-strain bisect of"), o.routine)?;
    }
    match (o.increment, &o.judged) {
        (Some(k), Some(j)) => {
            let n = o.check.increments.len();
            writeln!(out, "   first failing increment: {k} of {n}")?;
            if !quiet {
                judged_lines(out, j, size, p)?;
            }
            if let Some(f) = &o.fraction {
                writeln!(out, "   inside it: {}", f.words())?;
            }
        }
        _ if o.verdict == Verdict::Pass => writeln!(out, "   every increment passes: nothing to bisect")?,
        _ => {
            if let Some(f) = &o.check.fault {
                writeln!(out, "   fault: {f}")?;
            }
        }
    }
    if let Some(c) = &o.case {
        writeln!(out, "   case written: {c}")?;
        writeln!(out, "   rerun it with: tancheck replay {c}")?;
    }
    for w in &o.warnings {
        writeln!(out, "   {}", p.warn(&format!("warning: {w}")))?;
    }
    let finding = o.finding.as_ref().map_or(String::new(), |f| format!(" ({f})"));
    let word = if o.verdict == Verdict::Pass { "PASS" } else { o.verdict.word() };
    writeln!(out, "verdict: {}{finding} (exit {})", p.verdict(word), o.exit_code)?;
    if !quiet {
        for c in &o.cautions {
            writeln!(out, "   caution: {c}")?;
        }
    }
    Ok(())
}

/// `tancheck replay` of a finite-strain case.
pub fn write_replay(
    out: &mut dyn Write,
    r: &crate::report::model::FiniteReplayReport,
    quiet: bool,
    p: Palette,
) -> io::Result<()> {
    let word = match r.exit_code {
        0 => "PASS",
        3 => "FAULT",
        _ => "FAIL",
    };
    if quiet {
        if !r.pass {
            let cause =
                r.judged.as_ref().and_then(|j| j.cause.as_ref()).map_or("unexplained", |c| c.name.as_str());
            writeln!(out, "{} {}: {cause} ({})", p.fail(word), r.case, r.origin)?;
        }
        return writeln!(out, "   verdict: {} (exit {})", p.verdict(word), r.exit_code);
    }
    writeln!(out, "{}", p.head(&format!("== replay of the finite-strain case {} ==", r.case)))?;
    writeln!(out, "   routine: {}", r.routine)?;
    writeln!(out, "   call: {}", r.origin)?;
    for w in &r.warnings {
        writeln!(out, "   warning: {w}")?;
    }
    let c = &r.call;
    let line = |n: &tancheck_core::case::Numbers| {
        n.values
            .iter()
            .map(|v| v.map_or("nan".to_string(), |x| format!("{x:e}")))
            .collect::<Vec<_>>()
            .join(", ")
    };
    writeln!(out, "   inputs (increment {}):", c.increment)?;
    for (what, v) in [
        ("F0", &c.f0),
        ("F1", &c.f1),
        ("stress0", &c.stress0),
        ("state0", &c.state0),
        ("props", &c.properties),
        ("temp", &c.temperature),
        ("time", &c.time),
    ] {
        if !v.values.is_empty() {
            writeln!(out, "     {what:<8}[{}]", line(v))?;
        }
    }
    if let Some(f) = &r.fault {
        writeln!(out, "   the call faulted: {f}")?;
    } else if r.identical {
        writeln!(out, "   outputs: the same as in the case, bit for bit (status, stress, state, tangent)")?;
    } else {
        writeln!(out, "   outputs DIFFER from the case: {}", r.differences.join(", "))?;
    }
    if !r.stress.is_empty() {
        let s: Vec<String> = r.stress.iter().map(|x| format!("{x:e}")).collect();
        writeln!(out, "   stress  [{}]", s.join(", "))?;
    }
    if let Some(j) = &r.judged {
        let size = if j.worst.as_ref().is_some_and(|w| w.row > 5 || w.column > 5) { 9 } else { 6 };
        judged_lines(out, j, size, p)?;
    }
    if let Some(f) = &r.recorded_finding {
        writeln!(out, "   the case recorded: {f}")?;
    }
    writeln!(out, "   debug it with: {}", r.debugger)?;
    writeln!(out, "verdict: {} (exit {})", p.verdict(word), r.exit_code)
}

#[cfg(test)]
mod replay_words {
    use tancheck_core::finite::check::FiniteIncrement;

    // A failing call no cause explains says so, as the check does (replay said nothing; a
    // user-style sweep).
    #[test]
    fn a_failure_without_a_cause_says_none_explains_it() {
        let inc = FiniteIncrement {
            increment: 1,
            gradient: [1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0],
            error_central: 0.1,
            error_complex: None,
            passed: false,
            worst: None,
            worst_entries: Vec::new(),
            cause: None,
        };
        let mut out = Vec::new();
        super::judged_lines(&mut out, &inc, 6, super::Palette { on: false }).unwrap();
        let t = String::from_utf8(out).unwrap();
        assert!(t.contains("cause: none of the measure confusions explains it"), "{t}");
    }
}
