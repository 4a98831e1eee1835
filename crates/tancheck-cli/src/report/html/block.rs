//! The HTML page of a block routine's checks: the verdict and findings, the elastic response
//! and the stable time increment along the path (a plot), the notes of each check, a row per
//! increment, and the cautions.

use std::fmt::Write as _;

use tancheck_core::block::BlockReport;
use tancheck_core::probe::ProbeSeries;

use super::{badge, cautions, esc, figure, footer, page, plots, sci};

fn verdict_word(r: &BlockReport) -> &'static str {
    match r.exit_code() {
        0 => "PASS",
        3 => "ROUTINE FAULT",
        _ => "FAIL",
    }
}

/// L/c per increment from the numerical tangent, against the elastic response's.
fn time_increments(r: &BlockReport) -> Option<String> {
    let tangent: Vec<[f64; 2]> = r
        .increments
        .iter()
        .map(|i| [i.index as f64, i.stable_time_increment])
        .filter(|p| p[1] > 0.0)
        .collect();
    if tangent.is_empty() {
        return None;
    }
    let last = r.increments.last().map_or(1.0, |i| i.index as f64);
    // A log axis only where the values span a decade or more: within one, a log axis of whole
    // decades flattened a 14 % difference the finding was about (a user-style sweep).
    let all = tangent.iter().map(|p| p[1]).chain([r.elastic.stable_time_increment]).filter(|x| *x > 0.0);
    let (lo, hi) = all.fold((f64::INFINITY, 0.0f64), |(a, b), x| (a.min(x), b.max(x)));
    let log_y = hi / lo >= 10.0;
    let series = [
        ProbeSeries {
            name: "L/c of the numerical tangent".into(),
            x: "increment".into(),
            y: "stable time increment L/c".into(),
            log_y,
            points: tangent,
        },
        ProbeSeries {
            name: "L/c of the elastic response (first call)".into(),
            x: "increment".into(),
            y: "stable time increment L/c".into(),
            log_y,
            points: vec![[1.0, r.elastic.stable_time_increment], [last, r.elastic.stable_time_increment]],
        },
    ];
    plots::probe_series("Stable time increment along the path", &series)
}

/// The whole page.
pub fn block_page(r: &BlockReport) -> String {
    let mut o = String::new();
    let word = verdict_word(r);
    let _ = writeln!(o, "<h1>Block routine {} {}</h1>", esc(&r.routine), badge(word));
    let _ = writeln!(
        o,
        "<p>Path <code>{}</code>, {} increments; energy rule: {}; {} real and {} complex-step calls. \
         Finding: <strong>{}</strong> (exit {}).</p>",
        esc(&r.path),
        r.increments.len(),
        esc(r.energy_rule),
        r.real_calls,
        r.complex_calls,
        esc(r.finding()),
        r.exit_code()
    );
    o.push_str(&cautions(&tancheck_core::block::BLOCK_CAUTIONS.map(String::from)));
    if !r.findings.is_empty() {
        o.push_str("<h2>Findings</h2>\n<table>\n<tr><th>finding</th><th>check</th><th>increment</th><th>what</th></tr>\n");
        for f in &r.findings {
            let _ = writeln!(
                o,
                "<tr class=\"bad\"><td>{}</td><td>{}</td><td class=\"num\">{}</td><td>{}</td></tr>",
                esc(f.finding),
                esc(f.check.name()),
                f.increment.map_or("-".into(), |k| k.to_string()),
                esc(&f.what)
            );
        }
        o.push_str("</table>\n");
    }
    let e = &r.elastic;
    if e.measured() {
        let _ = writeln!(
            o,
            "<h2>Elastic response</h2>\n<p>First call (zero time, zero increment): dilatational modulus {}, \
             wave speed {}, stable time increment L/c {}.</p>",
            sci(e.dilatational_modulus),
            sci(e.wave_speed),
            sci(e.stable_time_increment)
        );
    } else {
        o.push_str(
            "<h2>Elastic response</h2>\n<p>First call (zero time, zero increment): not measured (the first call \
             did not give it).</p>\n",
        );
    }
    // L/c falls as the stiffness rises: below the first call's line the point is stiffer than
    // its elastic response (the caption said softer; a user-style sweep).
    o.push_str("<h2>Stable time increment along the path</h2>\n");
    o.push_str(&figure(
        time_increments(r),
        "L/c = characteristic length / sqrt(effective dilatational modulus / density) per increment. \
         Below the elastic line (the first call's L/c) the point is stiffer than its elastic response: \
         a solver that sizes its time increment from the first call steps past the stable one. \
         Above it the point is softer than elastic.",
        "",
    ));
    if !r.notes.is_empty() {
        o.push_str("<h2>What each check did</h2>\n<ul class=\"plain\">\n");
        for n in &r.notes {
            let _ = writeln!(o, "<li>{}</li>", esc(n));
        }
        o.push_str("</ul>\n");
    }
    o.push_str(
        "<h2>Increments</h2>\n<p>The point alone along the path. Effective modulus: the largest normal \
         diagonal entry of its numerical tangent; work / mass by the stated rule beside the routine's own \
         internal and dissipated energy increments; twin Δ: the relative difference of the finite-difference \
         and complex-step tangents (a dash without a twin); a dash where a deleted point has no value.</p>\n\
         <table>\n<tr><th>inc</th><th>effective modulus</th><th>wave speed</th>\
         <th>L/c</th><th>work / mass</th><th>Δ internal</th><th>Δ dissipated</th><th>twin Δ</th><th>deleted</th></tr>\n",
    );
    // A value that is not a number (a deleted point has no modulus or wave speed; the JSON
    // has null) shows as a dash, not as "NaN", which read as a failed computation.
    let num = |x: f64| if x.is_nan() { "—".to_string() } else { sci(x) };
    for i in &r.increments {
        let _ = writeln!(
            o,
            "<tr><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td>\
             <td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td></tr>",
            i.index,
            num(i.effective_modulus),
            num(i.wave_speed),
            num(i.stable_time_increment),
            num(i.work),
            num(i.internal_increment),
            num(i.dissipated_increment),
            i.twin_difference.map_or("-".into(), sci),
            if i.deleted { "deleted" } else { "" }
        );
    }
    o.push_str("</table>\n");
    o.push_str(&footer(concat!("tancheck ", env!("CARGO_PKG_VERSION"))));
    page(&format!("tancheck block {}", r.routine), &o)
}
