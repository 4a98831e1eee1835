//! The HTML report: one self-contained page (inline CSS and SVG, no script, nothing fetched)
//! per check, probe suite or bisection. Pure functions of the report data: each takes the
//! core's report (a [`tancheck_core::Report`], a [`tancheck_core::probe::SuiteReport`], a
//! bisection's [`tancheck_core::bisect::Located`]) and returns the page as a string; the plots
//! come from [`plots`].

use std::fmt::Write as _;

use tancheck_core::report::CAUTIONS;

mod block;
mod check;
pub mod plots;
mod suite;

pub use block::block_page;
pub use check::check_page;
pub use suite::{bisect_page, probe_page, selftest_page, BisectView};

/// Failing increments shown in full (step-size curve, heatmap, worst entries); the others are
/// listed in one line each.
pub const DETAILED_FAILURES: usize = 6;

/// A table cell's HTML (the caller escapes text): plain, or a number (right-aligned).
pub enum Cell {
    Text(String),
    Num(String),
}

/// One table: the header row, then a row of cells per item. Written once so that every
/// page's tables have the same markup.
pub fn table(o: &mut String, head: &[&str], rows: impl IntoIterator<Item = Vec<Cell>>) {
    o.push_str("<table>\n<tr>");
    for h in head {
        let _ = write!(o, "<th>{h}</th>");
    }
    o.push_str("</tr>\n");
    for row in rows {
        o.push_str("<tr>");
        for cell in row {
            let _ = match cell {
                Cell::Text(html) => write!(o, "<td>{html}</td>"),
                Cell::Num(html) => write!(o, "<td class=\"num\">{html}</td>"),
            };
        }
        o.push_str("</tr>\n");
    }
    o.push_str("</table>\n");
}

/// Escape text for HTML (element content and attribute values). Control characters but new
/// lines and tabs are left out, a terminal colour sequence (ESC [ … letter) whole: a routine's
/// message with them showed boxes and "[31m" on the page (a user-style sweep).
pub fn esc(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    let mut chars = s.chars().peekable();
    while let Some(c) = chars.next() {
        if c == '\u{1b}' && chars.peek() == Some(&'[') {
            chars.next();
            for x in chars.by_ref() {
                if ('\u{40}'..='\u{7e}').contains(&x) {
                    break;
                }
            }
            continue;
        }
        if c.is_control() && c != '\n' && c != '\t' {
            continue;
        }
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
.badge { display: inline-block; white-space: nowrap; padding: 2px 12px; border-radius: 4px; color: #fff; font-weight: 700;
         letter-spacing: .04em; margin-right: 8px; }
.badge.pass { background: var(--pass); } .badge.fail { background: var(--fail); }
.badge.fault, .badge.twin { background: var(--warn); } .badge.skipped { background: #7a8190; }
.badge.expected { background: #fff; color: #4a5568; border: 1px solid #9aa3b2; font-weight: 600; white-space: nowrap; }
.summary { display: grid; grid-template-columns: max-content 1fr; gap: 4px 18px; background: var(--card);
           border: 1px solid var(--line); border-radius: 6px; padding: 14px 18px; margin: 0; }
.summary dt { color: var(--muted); } .summary dd { margin: 0; }
table { border-collapse: collapse; width: 100%; margin: 8px 0 4px; font-size: 14px; }
th, td { text-align: left; padding: 5px 8px; border-bottom: 1px solid var(--line); vertical-align: top; }
th { background: var(--card); font-weight: 600; }
td.num { font-variant-numeric: tabular-nums; text-align: right; white-space: nowrap; }
.nowrap { white-space: nowrap; }
table.items { table-layout: fixed; width: 100%; }
table.items td { overflow-wrap: anywhere; }
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

pub(crate) fn page(title: &str, body: &str) -> String {
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>{}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n<main>\n{body}</main>\n</body>\n</html>\n",
        esc(title)
    )
}

pub(crate) fn badge(word: &str) -> String {
    let class = match word {
        "PASS" | "pass" => "pass",
        "FAIL" => "fail",
        "TWIN" => "twin",
        "skipped" | "NOT RUN" => "skipped",
        _ => "fault",
    };
    format!("<span class=\"badge {class}\">{}</span>", esc(word))
}

/// A badge for an outcome that was expected (a planted flaw caught): the word in a plain
/// outlined badge, so that a page of campaign items shows red only where something is not as
/// expected.
pub(crate) fn expected_badge(word: &str) -> String {
    format!("<span class=\"badge expected\">{} · expected</span>", esc(word))
}

pub(crate) fn cautions(list: &[String]) -> String {
    let list: Vec<String> =
        if list.is_empty() { CAUTIONS.iter().map(|s| s.to_string()).collect() } else { list.to_vec() };
    let mut o = String::from("<section class=\"cautions\" aria-label=\"cautions\">\n");
    for c in &list {
        let _ = writeln!(o, "<p><strong>Caution.</strong> {}</p>", esc(c));
    }
    o.push_str("</section>\n");
    o
}

pub(crate) fn figure(svg: Option<String>, caption: &str, class: &str) -> String {
    match svg {
        Some(s) => {
            format!("<figure class=\"{class}\">\n{s}\n<figcaption>{}</figcaption>\n</figure>\n", esc(caption))
        }
        None => String::new(),
    }
}

pub(crate) fn footer(tool: &str) -> String {
    format!(
        "<footer>Written by {} — a self-contained page: no script, nothing loaded from elsewhere.</footer>\n",
        esc(tool)
    )
}

pub(crate) fn sci(x: f64) -> String {
    crate::report::sci(x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn text_is_escaped() {
        assert_eq!(esc("a<b & \"c\""), "a&lt;b &amp; &quot;c&quot;");
        // Control characters and a terminal colour sequence are left out; lines stay.
        assert_eq!(esc("\u{1b}[31mred\u{1b}[0m\u{1}\u{2} ok\nnext\tcol"), "red ok\nnext\tcol");
    }
}
