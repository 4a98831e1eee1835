//! A campaign's report as JUnit XML (a test suite per routine, a test case per item) and as
//! one self-contained HTML page (a table per routine): pure functions of the report data.

use std::fmt::Write as _;
use std::io;

use quick_junit::{NonSuccessKind, Property, Report as JReport, TestCase, TestCaseStatus, TestSuite};

use super::campaign::{headline, item_line, list, verdict_line, CampaignReport, ItemResult};
use super::html::{badge, cautions, esc, expected_badge, footer, page};

fn case_name(it: &ItemResult) -> String {
    let mut s = it.task.clone();
    if it.properties != "manifest" {
        s.push_str(&format!(" [properties {}]", it.properties));
    }
    if it.path != "manifest" {
        s.push_str(&format!(" [path {}]", it.path));
    }
    s
}

fn status(it: &ItemResult) -> TestCaseStatus {
    if it.outcome == "skipped" && it.as_expected || it.outcome == "not-run" {
        let mut s = TestCaseStatus::skipped();
        if let Some(m) = &it.message {
            s.set_message(m.clone());
        }
        return s;
    }
    if it.as_expected {
        return TestCaseStatus::success();
    }
    let kind = if it.code == 1 || it.code == 4 { NonSuccessKind::Failure } else { NonSuccessKind::Error };
    let mut s = TestCaseStatus::non_success(kind);
    let message = item_line(it).replace('\n', " ").split_whitespace().collect::<Vec<_>>().join(" ");
    s.set_message(format!("finding {}: {message}", it.finding));
    // The type names the class of the exit code, as the other reports do: bad input (a library
    // that could not be built or loaded) is no routine fault (it read so; a user-style sweep).
    s.set_type(match it.code {
        1 | 4 => "tangent-finding",
        c if c == crate::exit::BAD_INPUT => "bad-input",
        c if c == crate::exit::ROUTINE_FAULT => "routine-fault",
        _ => "stopped",
    });
    s
}

/// JUnit XML: one test suite per routine, one test case per item; an item not as expected
/// fails (a finding, a broken twin) or is an error (a fault, bad input); a skip is skipped.
pub fn campaign_junit(r: &CampaignReport) -> io::Result<String> {
    let mut j = JReport::new(format!("tancheck campaign {}", r.campaign.name));
    for (routine, items) in r.routines() {
        let mut suite = TestSuite::new(format!("tancheck campaign {} {routine}", r.campaign.name));
        suite.add_property(Property::new("routine", items[0].name.as_str()));
        suite.add_property(Property::new("campaign-digest", r.campaign.digest.as_str()));
        for it in items {
            let mut case = TestCase::new(case_name(it), status(it));
            case.set_classname(format!("campaign.{}", routine.replace(['/', '.'], "_")));
            // An item as expected keeps its finding when it failed (an expected failure said
            // nothing of what it found) and its message (a conventions warning) as its output.
            if it.as_expected && it.outcome != "skipped" {
                let mut out = Vec::new();
                if it.outcome != "pass" {
                    out.push(format!("finding {}: {} as expected", it.finding, it.outcome));
                }
                out.extend(it.message.clone());
                if !out.is_empty() {
                    case.set_system_out(out.join("\n"));
                }
            }
            suite.add_test_case(case);
        }
        j.add_test_suite(suite);
    }
    if let Some(m) = r.merged.as_ref().filter(|m| !m.missing.is_empty()) {
        // Missing shards are an error of their own, so a dashboard never shows them green.
        let mut suite = TestSuite::new(format!("tancheck campaign {} shards", r.campaign.name));
        let mut s = TestCaseStatus::non_success(NonSuccessKind::Error);
        s.set_message(format!("missing shards {} of {}", list(&m.missing), m.shards));
        suite.add_test_case(TestCase::new("every shard reported", s));
        j.add_test_suite(suite);
    }
    super::junit::to_xml(&j)
}

/// The HTML page: the headline, a table per routine, the notes and the cautions.
pub fn campaign_page(r: &CampaignReport) -> String {
    let mut b = String::new();
    let _ = writeln!(b, "<h1>{}</h1>", esc(&format!("Campaign {}", r.campaign.name)));
    let _ = writeln!(b, "<p>{}</p>", esc(&headline(r)));
    let _ = writeln!(b, "<p><strong>{}</strong></p>", esc(&verdict_line(r)));
    for (routine, items) in r.routines() {
        let _ = writeln!(b, "<h2>{} <span class=\"note\">{}</span></h2>", esc(routine), esc(&items[0].name));
        b.push_str(
            // One set of column widths for every routine's table, so that the columns line up
            // down the page (each table sized its own; a user-style sweep).
            "<table class=\"items\">\n<colgroup><col style=\"width:17%\"><col style=\"width:18%\">\
             <col style=\"width:13%\"><col style=\"width:9%\"><col style=\"width:10%\"><col style=\"width:12%\">\
             <col style=\"width:21%\"></colgroup>\n<tr><th>item</th><th>outcome</th><th>finding</th><th>first failing increment</th>\
             <th>increments failed</th><th>expected</th><th>message</th></tr>\n",
        );
        for it in items {
            let expected = match (&it.expected, &it.expected_finding) {
                (Some(e), Some(f)) => format!("{e} {f}"),
                (Some(e), None) => e.clone(),
                _ => "pass".into(),
            };
            let word = match it.outcome.as_str() {
                "pass" => "PASS",
                "fail" => "FAIL",
                "twin" => "TWIN",
                "skipped" => "skipped",
                "not-run" => "NOT RUN",
                _ => "FAULT",
            };
            let _ = writeln!(
                b,
                "<tr{}><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{} of {}</td>\
                 <td>{}{}</td><td>{}</td></tr>",
                if it.as_expected { "" } else { " class=\"bad\"" },
                esc(&case_name(it)),
                if it.as_expected && !matches!(word, "PASS" | "skipped") { expected_badge(word) } else { badge(word) },
                esc(&it.finding),
                it.first_failing_increment.map_or(String::from("–"), |k| k.to_string()),
                it.failed,
                // A probe item counts probes, not increments.
                if it.task.starts_with("probe") { format!("{} probes", it.increments) } else { it.increments.to_string() },
                esc(&expected),
                if it.as_expected { "" } else { " (not as expected)" },
                esc(it.message.as_deref().unwrap_or("")),
            );
        }
        b.push_str("</table>\n");
    }
    if !r.notes.is_empty() {
        b.push_str("<h2>Notes</h2>\n<ul class=\"plain\">\n");
        for n in &r.notes {
            let _ = writeln!(b, "<li>{}</li>", esc(n));
        }
        b.push_str("</ul>\n");
    }
    b.push_str(&cautions(&r.cautions));
    b.push_str(&footer(&r.tool));
    page(&format!("tancheck campaign {}", r.campaign.name), &b)
}
