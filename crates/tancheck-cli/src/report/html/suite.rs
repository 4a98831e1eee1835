//! The pages of a probe suite, a bisection and the selftest.

use std::fmt::Write as _;

use tancheck_core::bisect::{Inside, Located};
use tancheck_core::probe::{ProbeStatus, SuiteReport};
use tancheck_core::{Report, Verdict};

use super::check::check_sections;
use super::{badge, cautions, esc, figure, footer, page, plots, sci};
use crate::report::model::SelftestRow;

/// The HTML page of a probe suite: a table of the probes, then a plot of every curve a probe
/// measured (Newton residuals, the acoustic determinant, the energies).
pub fn probe_page(report: &SuiteReport) -> String {
    let mut o = String::new();
    let verdict = match report.exit_code {
        crate::exit::PASS => "PASS",
        crate::exit::TANGENT_FAILURE => "FAIL",
        _ => "FAULT",
    };
    let failed = report.results.iter().filter(|r| r.status == ProbeStatus::Fail).count();
    let _ = writeln!(
        o,
        "<header>\n<h1>Probe suite {}: {}</h1>\n<p class=\"sub\">{} · {}</p>\n</header>",
        esc(&report.suite),
        esc(&report.routine),
        esc(&report.path),
        esc(&report.tool)
    );
    let _ = writeln!(o, "<dl class=\"summary\">");
    let _ = writeln!(
        o,
        "<dt>verdict</dt><dd>{}{failed} of {} probes failed, exit code {}</dd>",
        badge(verdict),
        report.results.len(),
        report.exit_code
    );
    let _ = writeln!(o, "<dt>routine</dt><dd>{}</dd>", esc(&report.routine));
    let _ = writeln!(o, "<dt>path</dt><dd>{}</dd>", esc(&report.path));
    let _ = writeln!(o, "</dl>");
    if !report.notes.is_empty() {
        let _ = writeln!(o, "<ul class=\"plain\">");
        for n in &report.notes {
            let _ = writeln!(o, "<li>note: {}</li>", esc(n));
        }
        let _ = writeln!(o, "</ul>");
    }
    o.push_str(&cautions(&report.cautions));
    let _ =
        writeln!(o, "<h2>Probes</h2>\n<table>\n<tr><th>probe</th><th>status</th><th>what it found</th></tr>");
    for r in &report.results {
        let _ = writeln!(
            o,
            "<tr{}><td><a href=\"#probe-{}\">{}</a></td><td>{}</td><td>{}</td></tr>",
            if r.status == ProbeStatus::Fail { " class=\"bad\"" } else { "" },
            esc(&r.probe),
            esc(&r.probe),
            badge(word(r)),
            esc(&r.summary)
        );
    }
    let _ = writeln!(o, "</table>");
    for r in &report.results {
        let _ = writeln!(o, "<h2 id=\"probe-{}\">{} {}</h2>", esc(&r.probe), esc(&r.probe), badge(word(r)));
        let _ = writeln!(o, "<p>{}</p>", esc(&r.summary));
        // One plot per quantity (series that share their y axis).
        let mut axes: Vec<&str> = Vec::new();
        for s in &r.series {
            if !axes.contains(&s.y.as_str()) {
                axes.push(&s.y);
            }
        }
        for y in axes {
            let group: Vec<_> = r.series.iter().filter(|s| s.y == y).cloned().collect();
            let (title, caption) = probe_plot_words(&r.probe, y);
            o.push_str(&figure(plots::probe_series(&title, &group), &caption, "wide"));
        }
        if !r.details.is_empty() {
            let _ = writeln!(o, "<ul class=\"plain\">");
            for d in &r.details {
                let _ = writeln!(o, "<li>{}</li>", esc(d));
            }
            let _ = writeln!(o, "</ul>");
        }
    }
    o.push_str(&footer(&report.tool));
    page(&format!("tancheck probes: {} — {verdict}", report.routine), &o)
}

/// The title and caption of a plot of a probe's curves of quantity `y`.
fn probe_plot_words(probe: &str, y: &str) -> (String, String) {
    match probe {
        "newton" => (
            "Newton residual history".into(),
            "Residual of the mixed-control Newton solve per iteration with the routine's tangent (log \
             scale), for each increment that needed more than one iteration; its observed order is in the \
             legend. The exact derivative gives order 2."
                .into(),
        ),
        "stability" if y.starts_with("min det") => (
            "minimum acoustic-tensor determinant along the path".into(),
            "The smallest determinant of the acoustic tensor Q(n) over directions n, relative to the \
             stiffness scale s, per increment: ellipticity is lost where it reaches zero. Where the \
             tangent's symmetric part is positive definite the directions are not searched and the point \
             is its lower bound (λmin/2s)^d, which no direction can go below (the probe's details say \
             \"≥\" there)."
                .into(),
        ),
        "stability" => (
            "smallest eigenvalue of the tangent's symmetric part along the path".into(),
            "The smallest eigenvalue of the tangent's symmetric part relative to the stiffness scale, per \
             increment: negative values mean softening."
                .into(),
        ),
        "energy" => (
            "energy balance along the path".into(),
            "The work done along the path, as the balance is judged (Simpson's rule within each increment \
             whose balance is checked, the trapezoid rule elsewhere), beside the stored and dissipated \
             energies the routine reports; Ψ + D is matched to the work at increment 1, whose start \
             energies are not reported, so a mismatch in increment 1 alone does not show here."
                .into(),
        ),
        other => (format!("{other} probe: {y}"), format!("Curves measured by the {other} probe.")),
    }
}

/// What a bisection found, for [`bisect_page`]: the check it started from, the first failing
/// increment located in it, and the one located in the shrunk path (if it shrank).
pub struct BisectView<'a> {
    pub report: &'a Report,
    pub located: Option<&'a Located>,
    pub shrunk: Option<(&'a Located, usize)>,
}

fn located_section(l: &Located, o: &mut String, heading: &str) {
    let _ = writeln!(o, "<h2>{}</h2>", esc(heading));
    let _ = writeln!(
        o,
        "<p>First failing increment {} of {}, branch {}, finding <code>{}</code>.</p>",
        l.increment,
        l.of,
        esc(&l.branch),
        esc(&l.finding)
    );
    match &l.inside {
        Inside::Crossing(c) => {
            let _ = writeln!(
                o,
                "<p>The error takes its class at fraction <strong>{:.7}</strong> of the increment \
                 (bracketed between {:.7} and {:.7}): below, branch {} and {} (error {}); above, branch {} and {} (error {}).</p>",
                c.fraction(),
                c.below,
                c.above,
                esc(&c.class_below.branch_label()),
                esc(c.class_below.word()),
                sci(c.error_below),
                esc(&c.class_above.branch_label()),
                esc(c.class_above.word()),
                sci(c.error_above)
            );
            if c.within_branch() {
                let _ = writeln!(o, "<p>{}.</p>", esc(tancheck_core::bisect::Crossing::WITHIN_BRANCH));
            }
        }
        Inside::Throughout { smallest } => {
            let _ = writeln!(
                o,
                "<p>Every fraction judged, down to {smallest:.1e}, has the class of the whole increment: \
                 the failure does not start inside it.</p>"
            );
        }
    }
    o.push_str(&figure(
        plots::bisect_fractions(l),
        "Each judged fraction of the increment with the error of the judging scheme (log scale), \
         coloured by class; the band marks where the class changes.",
        "wide",
    ));
    if let Some(s) = &l.step {
        o.push_str(&figure(
            plots::step_studies(&s.studies, None, l.increment),
            "Step studies of the full increment (log–log), with the slope of each scheme's order dashed.",
            "wide",
        ));
    }
}

/// The HTML page of a bisection: the check's summary and plots, then where inside the
/// failing increment the class changes.
pub fn bisect_page(v: &BisectView<'_>) -> String {
    let report = v.report;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "<header>\n<h1>Bisection: {}</h1>\n<p class=\"sub\">{} · {}</p>\n</header>",
        esc(&report.routine.name),
        esc(&report.path),
        esc(&report.tool)
    );
    match v.located {
        Some(l) => located_section(l, &mut o, "Where the failure starts"),
        None if report.verdict == Verdict::Pass => {
            let _ = writeln!(o, "<p>Every increment passed: nothing to bisect.</p>");
        }
        None => {
            let _ = writeln!(o, "<p>No increment of the path failed; nothing to bisect on the path.</p>");
        }
    }
    if let Some((l, from)) = v.shrunk {
        located_section(l, &mut o, &format!("In the shrunk path ({from} increments shrunk to {})", l.of));
    }
    let _ = writeln!(o, "<h2>The check</h2>");
    check_sections(report, &mut o);
    o.push_str(&footer(&report.tool));
    page(&format!("tancheck bisect: {}", report.routine.name), &o)
}

/// The HTML page of the selftest: every row with its expected and found finding, the wrong
/// ones first.
pub fn selftest_page(rows: &[SelftestRow], tool: &str) -> String {
    let mut o = String::new();
    let wrong = rows.iter().filter(|r| !r.right).count();
    let _ = writeln!(
        o,
        "<header>\n<h1>Selftest: routines with known flaws, and correct ones that must pass</h1>\n<p class=\"sub\">{}</p>\n</header>",
        esc(tool)
    );
    let _ = writeln!(o, "<dl class=\"summary\">");
    let _ = writeln!(
        o,
        "<dt>verdict</dt><dd>{}{} of {} rows right (exit {})</dd>",
        badge(if wrong == 0 { "PASS" } else { "FAIL" }),
        rows.len() - wrong,
        rows.len(),
        if wrong == 0 { 0 } else { 1 }
    );
    let mut groups: Vec<&str> = Vec::new();
    for r in rows {
        if !groups.contains(&r.language.as_str()) {
            groups.push(&r.language);
        }
    }
    for g in &groups {
        let n = rows.iter().filter(|r| r.language == *g).count();
        let w = rows.iter().filter(|r| r.language == *g && !r.right).count();
        let _ = writeln!(o, "<dt>{}</dt><dd>{} of {n} rows right</dd>", esc(g), n - w);
    }
    let _ = writeln!(o, "</dl>");
    o.push_str(&cautions(&[]));
    let _ = writeln!(
        o,
        "<h2>Rows</h2>\n<table>\n<tr><th>variant</th><th>language</th><th>expected</th><th>verdict</th><th>found</th><th>first failing increment</th><th>right</th></tr>"
    );
    let mut ordered: Vec<&SelftestRow> = rows.iter().filter(|r| !r.right).collect();
    ordered.extend(rows.iter().filter(|r| r.right));
    for r in ordered {
        let _ = writeln!(
            o,
            "<tr{}><td><code>{}</code></td><td>{}</td><td><code>{}</code></td><td>{}</td><td><code>{}</code></td><td class=\"num\">{}</td><td>{}</td></tr>",
            if r.right { "" } else { " class=\"bad\"" },
            esc(&r.variant),
            esc(&r.language),
            esc(&r.expected),
            esc(r.verdict.word()),
            esc(&r.found),
            r.first_increment.map_or("-".to_string(), |i| i.to_string()),
            if r.right { "yes" } else { "NO" }
        );
    }
    let _ = writeln!(o, "</table>");
    o.push_str(&footer(tool));
    page(&format!("tancheck selftest — {}", if wrong == 0 { "PASS" } else { "FAIL" }), &o)
}

/// A probe's badge: FAULT where the routine faulted in it (the page showed FAIL beside a
/// verdict of FAULT; a user-style sweep), else its status.
fn word(r: &tancheck_core::probe::ProbeResult) -> &'static str {
    if r.fault {
        "FAULT"
    } else {
        r.status.word()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_selftest_page_puts_wrong_rows_first() {
        let row = |variant: &str, right| SelftestRow {
            language: "C".into(),
            variant: variant.into(),
            expected: "shear-factor".into(),
            verdict: Verdict::TangentFailure,
            found: if right { "shear-factor".into() } else { "uniform-scale".into() },
            first_increment: Some(3),
            right,
        };
        let page = selftest_page(&[row("good-row", true), row("bad<row>", false)], "tancheck test");
        assert!(page.contains("1 of 2 rows right (exit 1)"), "{page}");
        let (bad, good) = (page.find("bad&lt;row&gt;").unwrap(), page.find("good-row").unwrap());
        assert!(bad < good, "the wrong row first");
        assert!(page.contains("licensed engineering judgement"));
    }
}
