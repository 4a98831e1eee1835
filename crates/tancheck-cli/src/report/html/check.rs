//! The check's page: summary, schemes, branches and coverage, the plots along the path, and
//! each failing increment with its step-size curve and heatmap.

use std::fmt::Write as _;

use tancheck_core::compare::Comparison;
use tancheck_core::report::{CheckOutcome, IncrementResult, SchemeCheck};
use tancheck_core::Report;
use tancheck_core::Scheme;

use super::{badge, cautions, esc, figure, footer, page, plots, sci, table, Cell, DETAILED_FAILURES};

/// The summary, plots and failing increments of one check report.
pub(super) fn check_sections(report: &Report, o: &mut String) {
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
        // Of the path, as the terminal says it: a path that stopped at a fault has records of
        // the increments checked only (the page said "6 of 6" where the terminal said "6 of
        // 12"; a user-style sweep).
        let path = report
            .path_increments
            .max(report.records.iter().filter(|r| r.index > 0).count())
            .max(report.increments.len());
        format!("increment {} of {path} (branch {})", i.index, i.branch_label())
    });
    let _ = writeln!(o, "<dt>first failing increment</dt><dd>{}</dd>", esc(&first));
    // The regression cases replayed with the check (`check --cases`), which join its verdict.
    if let Some(t) = &report.cases {
        let failed: Vec<String> = t.failed.iter().map(|c| format!("{} ({})", c.file, c.finding)).collect();
        let _ = writeln!(
            o,
            "<dt>regression cases</dt><dd>{} of {} still fail{}</dd>",
            t.failed.len(),
            t.failed.len() + t.passed.len(),
            if failed.is_empty() { String::new() } else { format!(": {}", esc(&failed.join(", "))) }
        );
    }
    let _ = writeln!(
        o,
        "<dt>routine</dt><dd>{} — {}, order {}, {}, {} state variables, {} properties{}</dd>",
        esc(&r.name),
        esc(&r.kind),
        esc(&r.order.join(" ")),
        esc(&if r.shear.starts_with("none") {
            "slips, no shear measure".to_string()
        } else {
            format!("{} shear", r.shear)
        }),
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

    let _ = writeln!(o, "<h2>Schemes</h2>\n<table>\n<tr><th>scheme</th><th>checks</th><th>failed</th><th>cleared</th><th>skipped</th><th>worst norm error</th><th>worst entry error</th><th>tolerance</th><th>∂σ/∂T failed (worst error)</th></tr>");
    for s in &report.summary {
        let dtemp = if s.dtemp_failed > 0 {
            format!("{} ({})", s.dtemp_failed, sci(s.dtemp_worst_error))
        } else {
            "0".into()
        };
        let _ = writeln!(
            o,
            "<tr{}><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{dtemp}</td></tr>",
            if s.failed > 0 { " class=\"bad\"" } else { "" },
            s.scheme.name(),
            s.checks,
            s.failed,
            s.cleared,
            s.skipped,
            sci(s.worst_norm_error),
            sci(s.worst_entry_error),
            sci(s.tol)
        );
    }
    let _ = writeln!(o, "</table>");
    let _ = writeln!(o, "<h2>Branches and coverage</h2>\n<table>\n<tr><th>branch</th><th>increments</th><th>failed</th><th>cleared</th><th>worst error</th></tr>");
    for b in &report.branches {
        let _ = writeln!(
            o,
            "<tr{}><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            if b.failed > 0 { " class=\"bad\"" } else { "" },
            esc(&b.branch),
            b.increments,
            b.failed,
            b.cleared,
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
        "The routine's response from the start of the path and at the end of each increment, per component that moves.",
        "wide",
    ));

    if let Some((k, f)) = report.first_fault_at() {
        let _ = writeln!(o, "<h2>Fault</h2>\n<p>At increment {k}: {}</p>", esc(&f.message));
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

/// The failing comparison with the largest error among an increment's schemes, of the part
/// `part` picks (the tangent, or ∂σ/∂T).
fn worst_failing<'a>(
    inc: &'a IncrementResult,
    part: impl Fn(&'a SchemeCheck) -> Option<&'a CheckOutcome>,
) -> Option<(Scheme, &'a Comparison)> {
    inc.checks
        .iter()
        .filter_map(|c| match part(c) {
            Some(CheckOutcome::Compared(cmp)) if !cmp.pass => Some((c.scheme, cmp)),
            _ => None,
        })
        .max_by(|a, b| a.1.error().total_cmp(&b.1.error()))
}

/// The table of a comparison's worst entries; `first` heads the label column.
fn worst_entries(o: &mut String, cmp: &Comparison, first: &str) {
    let rows = cmp.worst.iter().map(|e| {
        vec![
            Cell::Text(format!("<code>{}</code>", esc(&e.label))),
            Cell::Num(format!("{:.6e}", e.returned)),
            Cell::Num(format!("{:.6e}", e.numerical)),
            Cell::Num(sci(e.error)),
        ]
    });
    table(o, &[first, "returned", "numerical", "error"], rows);
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
        // The tangent's causes, then those of ∂σ/∂T.
        let explaining: Vec<_> = d.causes.iter().chain(&d.dtemp_causes).filter(|h| h.explains).collect();
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
    let worst = worst_failing(inc, |c| Some(&c.tangent));
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
        worst_entries(o, cmp, "entry (row/column)");
    }
    // The worst failing ∂σ/∂T comparison (a column of its own: "row/T").
    let worst_dtemp = worst_failing(inc, |c| c.dstress_dtemp.as_ref());
    if let Some((scheme, cmp)) = worst_dtemp {
        let _ = writeln!(
            o,
            "<p>∂σ/∂T against {}: norm error {}, worst entry {} (tolerance {}).</p>",
            scheme.name(),
            sci(cmp.norm_error),
            sci(cmp.worst_entry_error),
            sci(cmp.tol)
        );
        worst_entries(o, cmp, "entry (row/T)");
    }
    // The step studies are of the tangent: shown where it failed.
    if let (Some(d), Some(_)) = (&inc.diagnosis, worst) {
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
