//! The HTML page and the JUnit XML of `tancheck explore`: pure functions of its report. The
//! page: the summary (seed, budget, scale), the signatures reached, what was never reached,
//! and each distinct failure with its shrunk path and case file. JUnit: one test suite with a
//! test case per distinct failure, one for the coverage the manifest or the vocabulary asks
//! for, and one for the verdict.

use std::fmt::Write as _;
use std::io;

use quick_junit::{NonSuccessKind, Property, Report as JReport, TestCase, TestCaseStatus, TestSuite};

use tancheck_core::explore::{coverage::ranges_text, ExploreReport};
use tancheck_core::path::Path;
use tancheck_core::Verdict;

use super::html::{badge, cautions, esc, footer, page, table, Cell};
use super::junit::{failure, to_string};

fn path_table(o: &mut String, p: &Path) {
    let _ = writeln!(o, "<table>\n<tr><th>#</th><th>Δε (11 22 33 23 13 12)</th><th>ΔT</th><th>Δt</th><th>held stresses</th></tr>");
    for (k, i) in p.increments.iter().enumerate() {
        let d: Vec<String> = i.dstrain.iter().map(|x| format!("{x:.3e}")).collect();
        let held = i.hold_stress.map_or(String::new(), |h| super::terminal::held_text(&h));
        let _ = writeln!(
            o,
            "<tr><td class=\"num\">{}</td><td><code>{}</code></td><td class=\"num\">{:.3e}</td><td class=\"num\">{:.3e}</td><td>{}</td></tr>",
            k + 1,
            esc(&d.join(" ")),
            i.dtemp,
            i.dtime,
            esc(&held)
        );
    }
    let _ = writeln!(o, "</table>");
}

/// The HTML page of an exploration.
pub fn explore_page(r: &ExploreReport) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "<header>\n<h1>Explore: {}</h1>\n<p class=\"sub\">random load paths from seed {}</p>\n</header>",
        esc(&r.routine.name),
        r.seed
    );
    let _ = writeln!(o, "<dl class=\"summary\">");
    let _ = writeln!(
        o,
        "<dt>verdict</dt><dd>{}{} distinct failure(s) (exit {})</dd>",
        badge(r.verdict.word()),
        r.findings.len(),
        r.exit_code()
    );
    let _ = writeln!(
        o,
        "<dt>paths</dt><dd>{} ({} continued from a corpus of {}), {} increments; stopped by {}</dd>",
        r.paths,
        r.mutated,
        r.corpus,
        r.increments,
        esc(&r.stopped_by.words())
    );
    let _ = writeln!(
        o,
        "<dt>routine calls</dt><dd>{} real, {} complex, {:.1} s</dd>",
        r.calls.real, r.calls.complex, r.seconds
    );
    let _ = writeln!(
        o,
        "<dt>scale</dt><dd>strain {:.3e}{}, stress {:.3e}</dd>",
        r.scale.strain,
        if r.scale.declared {
            " (declared)"
        } else if r.scale.measured {
            " (measured)"
        } else {
            " (fallback)"
        },
        r.scale.stress
    );
    if let Some((lo, hi)) = r.temperature {
        let _ = writeln!(o, "<dt>temperature</dt><dd>between {lo} and {hi}</dd>");
    }
    for n in &r.notes {
        let _ = writeln!(o, "<dt>note</dt><dd>{}</dd>", esc(n));
    }
    let _ = writeln!(o, "</dl>");
    o.push_str(&cautions(&r.cautions));
    o.push_str("<h2>Reached</h2>\n");
    let rows = r.reached.iter().map(|x| {
        vec![
            Cell::Text(esc(&x.label)),
            Cell::Num(x.increments.to_string()),
            Cell::Num(x.paths.to_string()),
            Cell::Num(x.first_path.to_string()),
            Cell::Num(x.first_increment.to_string()),
        ]
    });
    table(&mut o, &["signature", "increments", "paths", "first path", "at increment"], rows);
    let _ = writeln!(o, "<h2>Never reached</h2>\n<ul class=\"plain\">");
    for b in &r.never.branches {
        let _ = writeln!(o, "<li>branch {} ({})</li>", b.branch, esc(&b.name));
    }
    if !r.never.state.is_empty() {
        let _ =
            writeln!(o, "<li>state variables that never changed: {}</li>", esc(&ranges_text(&r.never.state)));
    }
    if r.never.branches.is_empty() && r.never.state.is_empty() {
        let state = if r.routine.nstate == 0 {
            "the routine has no state variables"
        } else {
            "every state variable changed"
        };
        let _ = writeln!(o, "<li class=\"note\">nothing known to the vocabulary; {state}</li>");
    }
    let _ = writeln!(o, "</ul>\n<h2>Failures</h2>");
    if r.findings.is_empty() {
        let _ = writeln!(o, "<p class=\"note\">No failure within the budget.</p>");
    }
    for f in &r.findings {
        let _ = writeln!(
            o,
            "<h3>{}<code>{}</code> in {}</h3>\n<p>{} path(s); first path {} at increment {} of {}.{}</p>",
            badge(f.verdict.word()),
            esc(&f.finding),
            esc(&f.branch),
            f.paths,
            f.first_path,
            f.first_increment,
            f.path.increments.len(),
            f.case.as_ref().map_or(String::new(), |c| format!(
                " Case file: <code>{}</code> (<code>tancheck replay</code>).",
                esc(&c.display().to_string())
            ))
        );
        if let Some(s) = &f.shrunk {
            let _ = writeln!(o, "<p>Shrunk to {} increment(s):</p>", s.path.increments.len());
            path_table(&mut o, &s.path);
        }
    }
    o.push_str(&footer(&r.tool));
    page(&format!("tancheck explore {} — {}", r.routine.name, r.verdict.word()), &o)
}

/// The JUnit XML of an exploration.
pub fn explore_junit(r: &ExploreReport) -> io::Result<String> {
    let mut j = JReport::new("tancheck explore");
    let mut suite = TestSuite::new(format!("tancheck explore {}", r.routine.name));
    suite.add_property(Property::new("seed", r.seed.to_string()));
    suite.add_property(Property::new("paths", r.paths.to_string()));
    suite.add_property(Property::new("verdict", r.verdict.word()));
    for f in &r.findings {
        let kind =
            if f.verdict == Verdict::RoutineFault { NonSuccessKind::Error } else { NonSuccessKind::Failure };
        let msg = format!(
            "finding {} in {}: {} path(s), first path {} (seed {}) at increment {}{}",
            f.finding,
            f.branch,
            f.paths,
            f.first_path,
            r.seed,
            f.first_increment,
            f.case.as_ref().map_or(String::new(), |c| format!("; case {}", c.display()))
        );
        let mut case = TestCase::new(format!("{} in {}", f.finding, f.branch), failure(msg, kind, None));
        case.set_classname("explore.failure");
        suite.add_test_case(case);
    }
    let coverage = if r.never.branches.is_empty() {
        TestCaseStatus::success()
    } else {
        let names: Vec<String> =
            r.never.branches.iter().map(|b| format!("{} ({})", b.branch, b.name)).collect();
        failure(format!("never reached: branch {}", names.join(", ")), NonSuccessKind::Failure, None)
    };
    let mut case = TestCase::new("branches reached", coverage);
    case.set_classname("explore.coverage");
    suite.add_test_case(case);
    // A fault is an error, as in a check's JUnit (it was filed as a tangent failure; a
    // user-style sweep).
    let verdict = if r.findings.is_empty() {
        TestCaseStatus::success()
    } else if r.verdict == Verdict::RoutineFault {
        failure(
            format!("{} distinct failure(s), a routine fault among them", r.findings.len()),
            NonSuccessKind::Error,
            None,
        )
    } else {
        failure(format!("{} distinct failure(s)", r.findings.len()), NonSuccessKind::Failure, None)
    };
    let mut case = TestCase::new("verdict", verdict);
    case.set_classname("explore.verdict");
    suite.add_test_case(case);
    j.add_test_suite(suite);
    to_string(&j)
}
