//! The HTML report: one self-contained page (inline CSS and SVG, no script, nothing fetched)
//! per check, probe suite or bisection. Pure functions of the report data: each takes the
//! core's report (a [`Report`], a [`SuiteReport`], a bisection's [`Located`]) and returns the
//! page as a string; the plots come from [`plots`].

use std::fmt::Write as _;

use tancheck_core::bisect::{Inside, Located};
use tancheck_core::probe::{ProbeStatus, SuiteReport};
use tancheck_core::report::{CheckOutcome, IncrementResult, CAUTIONS};
use tancheck_core::{Report, Verdict};

use super::junit::KnownRow;

pub mod plots;

/// Failing increments shown in full (step-size curve, heatmap, worst entries); the others are
/// listed in one line each.
pub const DETAILED_FAILURES: usize = 6;

/// Escape text for HTML (element content and attribute values).
pub fn esc(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&#39;"),
            c => o.push(c),
        }
    }
    o
}

const STYLE: &str = r#"
:root { --ink: #1d2330; --muted: #5b6475; --line: #d9dee7; --pass: #1b7a43; --fail: #b4141e;
        --warn: #a35a00; --card: #f6f8fb; }
* { box-sizing: border-box; }
body { margin: 0; font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif;
       color: var(--ink); background: #fff; }
main { max-width: 980px; margin: 0 auto; padding: 24px 28px 48px; }
header { border-bottom: 2px solid var(--line); margin-bottom: 18px; padding-bottom: 10px; }
h1 { font-size: 24px; margin: 0 0 4px; }
h2 { font-size: 19px; margin: 30px 0 10px; border-bottom: 1px solid var(--line); padding-bottom: 4px; }
h3 { font-size: 16px; margin: 22px 0 8px; }
.sub { color: var(--muted); margin: 0; }
.badge { display: inline-block; padding: 2px 12px; border-radius: 4px; color: #fff; font-weight: 700;
         letter-spacing: .04em; margin-right: 8px; }
.badge.pass { background: var(--pass); } .badge.fail { background: var(--fail); }
.badge.fault, .badge.twin { background: var(--warn); } .badge.skipped { background: #7a8190; }
.summary { display: grid; grid-template-columns: max-content 1fr; gap: 4px 18px; background: var(--card);
           border: 1px solid var(--line); border-radius: 6px; padding: 14px 18px; margin: 0; }
.summary dt { color: var(--muted); } .summary dd { margin: 0; }
table { border-collapse: collapse; width: 100%; margin: 8px 0 4px; font-size: 14px; }
th, td { text-align: left; padding: 5px 8px; border-bottom: 1px solid var(--line); vertical-align: top; }
th { background: var(--card); font-weight: 600; }
td.num { font-variant-numeric: tabular-nums; text-align: right; white-space: nowrap; }
tr.bad td { color: var(--fail); }
figure { margin: 14px 0 18px; }
figure svg { width: 100%; height: auto; border: 1px solid var(--line); border-radius: 6px; }
figure.square svg { max-width: 560px; }
figcaption { color: var(--muted); font-size: 13.5px; margin-top: 4px; }
.cautions { border-left: 4px solid var(--warn); background: #fdf6ec; padding: 10px 16px; margin: 18px 0; }
.cautions p { margin: 4px 0; }
.note { color: var(--muted); }
ul.plain { margin: 6px 0; padding-left: 20px; }
code { font-family: ui-monospace, "DejaVu Sans Mono", monospace; font-size: 13.5px; }
footer { color: var(--muted); font-size: 13px; margin-top: 36px; border-top: 1px solid var(--line); padding-top: 8px; }
"#;

fn page(title: &str, body: &str) -> String {
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>{}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n<main>\n{body}</main>\n</body>\n</html>\n",
        esc(title)
    )
}

fn badge(word: &str) -> String {
    let class = match word {
        "PASS" | "pass" => "pass",
        "FAIL" => "fail",
        "TWIN" => "twin",
        "skipped" => "skipped",
        _ => "fault",
    };
    format!("<span class=\"badge {class}\">{}</span>", esc(word))
}

fn cautions(list: &[String]) -> String {
    let list: Vec<String> =
        if list.is_empty() { CAUTIONS.iter().map(|s| s.to_string()).collect() } else { list.to_vec() };
    let mut o = String::from("<section class=\"cautions\" aria-label=\"cautions\">\n");
    for c in &list {
        let _ = writeln!(o, "<p><strong>Caution.</strong> {}</p>", esc(c));
    }
    o.push_str("</section>\n");
    o
}

fn figure(svg: Option<String>, caption: &str, class: &str) -> String {
    match svg {
        Some(s) => {
            format!("<figure class=\"{class}\">\n{s}\n<figcaption>{}</figcaption>\n</figure>\n", esc(caption))
        }
        None => String::new(),
    }
}

fn footer(tool: &str) -> String {
    format!(
        "<footer>Written by {} — a self-contained page: no script, nothing loaded from elsewhere.</footer>\n",
        esc(tool)
    )
}

fn sci(x: f64) -> String {
    crate::report::sci(x)
}

/// The summary, plots and failing increments of one check report.
fn check_sections(report: &Report, o: &mut String) {
    let finding = report.finding();
    let failing: Vec<&IncrementResult> = report.increments.iter().filter(|i| !i.passed()).collect();
    let r = &report.routine;
    let _ = writeln!(o, "<dl class=\"summary\">");
    let _ = writeln!(
        o,
        "<dt>verdict</dt><dd>{}exit code {}</dd>",
        badge(report.verdict.word()),
        report.exit_code()
    );
    let _ = writeln!(o, "<dt>finding</dt><dd><code>{}</code></dd>", esc(&finding));
    let first = failing.first().map_or("none".to_string(), |i| {
        format!("increment {} of {} (branch {})", i.index, report.increments.len(), i.branch_label())
    });
    let _ = writeln!(o, "<dt>first failing increment</dt><dd>{}</dd>", esc(&first));
    let _ = writeln!(
        o,
        "<dt>routine</dt><dd>{} — {}, order {}, {} shear, {} state variables, {} properties{}</dd>",
        esc(&r.name),
        esc(&r.kind),
        esc(&r.order.join(" ")),
        esc(&r.shear),
        r.nstate,
        r.nprop,
        if r.complex_twin { ", complex-step twin" } else { ", no complex-step twin" }
    );
    let _ = writeln!(o, "<dt>path</dt><dd>{}</dd>", esc(&report.path));
    let _ = writeln!(
        o,
        "<dt>routine calls</dt><dd>{} real, {} complex</dd>",
        report.calls.real, report.calls.complex
    );
    let _ = writeln!(o, "</dl>");
    o.push_str(&cautions(&report.cautions));

    let _ = writeln!(o, "<h2>Schemes</h2>\n<table>\n<tr><th>scheme</th><th>checks</th><th>failed</th><th>skipped</th><th>worst norm error</th><th>worst entry error</th><th>tolerance</th></tr>");
    for s in &report.summary {
        let _ = writeln!(
            o,
            "<tr{}><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            if s.failed > 0 { " class=\"bad\"" } else { "" },
            s.scheme.name(),
            s.checks,
            s.failed,
            s.skipped,
            sci(s.worst_norm_error),
            sci(s.worst_entry_error),
            sci(s.tol)
        );
    }
    let _ = writeln!(o, "</table>");
    let _ = writeln!(o, "<h2>Branches and coverage</h2>\n<table>\n<tr><th>branch</th><th>increments</th><th>failed</th><th>worst error</th></tr>");
    for b in &report.branches {
        let _ = writeln!(
            o,
            "<tr{}><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            if b.failed > 0 { " class=\"bad\"" } else { "" },
            esc(&b.branch),
            b.increments,
            b.failed,
            sci(b.worst_error)
        );
    }
    let _ = writeln!(o, "</table>");
    if report.coverage.is_empty() {
        let _ = writeln!(o, "<p class=\"note\">Coverage: no warnings.</p>");
    } else {
        let _ = writeln!(o, "<ul class=\"plain\">");
        for c in &report.coverage {
            let _ = writeln!(o, "<li>coverage: {}</li>", esc(c));
        }
        let _ = writeln!(o, "</ul>");
    }
    if !report.notes.is_empty() {
        let _ = writeln!(o, "<ul class=\"plain\">");
        for n in &report.notes {
            let _ = writeln!(o, "<li>note: {}</li>", esc(n));
        }
        let _ = writeln!(o, "</ul>");
    }

    let _ = writeln!(o, "<h2>Along the path</h2>");
    o.push_str(&figure(
        plots::error_along_path(report),
        "Relative error of the returned tangent per increment and scheme (the largest of the norm, \
         worst-entry and soft-direction errors; log scale). Dashed: each scheme's tolerance. \
         Crosses: failed checks. Background bands: the branch the routine reported.",
        "wide",
    ));
    o.push_str(&figure(
        plots::response_curves(report),
        "The routine's response at the end of each increment, per component that moves.",
        "wide",
    ));

    if let Some(f) = report.first_fault() {
        let _ = writeln!(o, "<h2>Fault</h2>\n<p>At increment {}: {}</p>", f.call.increment, esc(&f.message));
    }
    if failing.is_empty() {
        return;
    }
    let _ = writeln!(o, "<h2>Failing increments</h2>");
    for inc in failing.iter().take(DETAILED_FAILURES) {
        failing_increment(report, inc, o);
    }
    if failing.len() > DETAILED_FAILURES {
        let _ = writeln!(
            o,
            "<p class=\"note\">{} more failing increments:</p>\n<ul class=\"plain\">",
            failing.len() - DETAILED_FAILURES
        );
        for inc in &failing[DETAILED_FAILURES..] {
            let _ = writeln!(
                o,
                "<li>increment {} (branch {}): {}</li>",
                inc.index,
                esc(&inc.branch_label()),
                esc(inc.finding())
            );
        }
        let _ = writeln!(o, "</ul>");
    }
}

fn failing_increment(report: &Report, inc: &IncrementResult, o: &mut String) {
    let _ = writeln!(
        o,
        "<h3 id=\"increment-{}\">Increment {} — branch {} — finding <code>{}</code></h3>",
        inc.index,
        inc.index,
        esc(&inc.branch_label()),
        esc(inc.finding())
    );
    if let Some(d) = &inc.diagnosis {
        let _ = writeln!(o, "<p>{}</p>", esc(&d.reason));
        let explaining: Vec<_> = d.causes.iter().filter(|h| h.explains).collect();
        if !explaining.is_empty() {
            let _ = writeln!(o, "<ul class=\"plain\">");
            for h in explaining {
                let _ = writeln!(
                    o,
                    "<li>cause <code>{}</code>: {} (error left {})</li>",
                    h.cause.name(),
                    esc(&h.detail),
                    sci(h.error_left)
                );
            }
            let _ = writeln!(o, "</ul>");
        }
    }
    if !inc.non_finite.is_empty() {
        let _ = writeln!(o, "<p>Outputs that are not finite: {}</p>", esc(&inc.non_finite.join(", ")));
    }
    if let Some(f) = &inc.fault {
        let _ = writeln!(o, "<p>Fault: {}</p>", esc(&f.message));
    }
    // The worst failing comparison of the increment.
    let worst = inc
        .checks
        .iter()
        .filter_map(|c| match &c.tangent {
            CheckOutcome::Compared(cmp) if !cmp.pass => Some((c.scheme, cmp)),
            _ => None,
        })
        .max_by(|a, b| a.1.error().total_cmp(&b.1.error()));
    if let Some((scheme, cmp)) = worst {
        let _ = writeln!(
            o,
            "<p>Against {}: norm error {}, worst entry {}, {} error {} (tolerance {}).</p>",
            scheme.name(),
            sci(cmp.norm_error),
            sci(cmp.worst_entry_error),
            if cmp.soft_direction.is_empty() {
                "soft-direction".to_string()
            } else {
                esc(&cmp.soft_direction)
            },
            sci(cmp.soft_error),
            sci(cmp.tol)
        );
        let _ = writeln!(
            o,
            "<table>\n<tr><th>entry (row/column)</th><th>returned</th><th>numerical</th><th>error</th></tr>"
        );
        for e in &cmp.worst {
            let _ = writeln!(
                o,
                "<tr><td><code>{}</code></td><td class=\"num\">{:.6e}</td><td class=\"num\">{:.6e}</td><td class=\"num\">{}</td></tr>",
                esc(&e.label),
                e.returned,
                e.numerical,
                sci(e.error)
            );
        }
        let _ = writeln!(o, "</table>");
    }
    if let Some(d) = &inc.diagnosis {
        let tol = worst.map(|w| w.1.tol);
        o.push_str(&figure(
            plots::step_studies(&d.studies, tol, inc.index),
            "Discrepancy between the returned tangent and each scheme as the relative step shrinks \
             (log–log). A consistent tangent follows the dashed slope of the scheme's order down to \
             the rounding floor; a wrong one levels off at the size of its error.",
            "wide",
        ));
    }
    if let Some((scheme, cmp)) = worst {
        o.push_str(&figure(
            plots::entry_heatmap(cmp, &report.routine.order, scheme, inc.index),
            "Relative error of each tangent entry ∂σ(row)/∂Δε(column), routine order. Pale: within the \
             tolerance; yellow to dark red: from the smallest to the largest error above it (log scale).",
            "square",
        ));
    }
}

/// The HTML page of a check report.
pub fn check_page(report: &Report) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "<header>\n<h1>Tangent check: {}</h1>\n<p class=\"sub\">{} · {}</p>\n</header>",
        esc(&report.routine.name),
        esc(&report.path),
        esc(&report.tool)
    );
    check_sections(report, &mut o);
    o.push_str(&footer(&report.tool));
    page(&format!("tancheck: {} — {}", report.routine.name, report.verdict.word()), &o)
}

/// The HTML page of a probe suite: a table of the probes, then a plot of every curve a probe
/// measured (Newton residuals, the acoustic determinant, the energies).
pub fn probe_page(report: &SuiteReport) -> String {
    let mut o = String::new();
    let verdict = if report.pass { "PASS" } else { "FAIL" };
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
        "<dt>verdict</dt><dd>{}{failed} of {} probes failed</dd>",
        badge(verdict),
        report.results.len()
    );
    let _ = writeln!(o, "<dt>routine</dt><dd>{}</dd>", esc(&report.routine));
    let _ = writeln!(o, "<dt>path</dt><dd>{}</dd>", esc(&report.path));
    let _ = writeln!(o, "</dl>");
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
            badge(r.status.word()),
            esc(&r.summary)
        );
    }
    let _ = writeln!(o, "</table>");
    for r in &report.results {
        let _ = writeln!(
            o,
            "<h2 id=\"probe-{}\">{} {}</h2>",
            esc(&r.probe),
            esc(&r.probe),
            badge(r.status.word())
        );
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
             stiffness scale s, per increment: ellipticity is lost where it reaches zero."
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
            "The work done along the path (trapezoid rule over each increment) beside the stored and \
             dissipated energies the routine reports."
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
pub fn selftest_page(rows: &[KnownRow], tool: &str) -> String {
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
        if !groups.contains(&r.group.as_str()) {
            groups.push(&r.group);
        }
    }
    for g in &groups {
        let n = rows.iter().filter(|r| r.group == *g).count();
        let w = rows.iter().filter(|r| r.group == *g && !r.right).count();
        let _ = writeln!(o, "<dt>{}</dt><dd>{} of {n} rows right</dd>", esc(g), n - w);
    }
    let _ = writeln!(o, "</dl>");
    o.push_str(&cautions(&[]));
    let _ = writeln!(
        o,
        "<h2>Rows</h2>\n<table>\n<tr><th>variant</th><th>language</th><th>expected</th><th>verdict</th><th>found</th><th>first failing increment</th><th>right</th></tr>"
    );
    let mut ordered: Vec<&KnownRow> = rows.iter().filter(|r| !r.right).collect();
    ordered.extend(rows.iter().filter(|r| r.right));
    for r in ordered {
        let _ = writeln!(
            o,
            "<tr{}><td><code>{}</code></td><td>{}</td><td><code>{}</code></td><td>{}</td><td><code>{}</code></td><td class=\"num\">{}</td><td>{}</td></tr>",
            if r.right { "" } else { " class=\"bad\"" },
            esc(&r.variant),
            esc(&r.group),
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn text_is_escaped() {
        assert_eq!(esc("a<b & \"c\""), "a&lt;b &amp; &quot;c&quot;");
    }

    #[test]
    fn the_selftest_page_puts_wrong_rows_first() {
        let row = |variant: &str, right| KnownRow {
            group: "C".into(),
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
