//! JUnit XML for CI dashboards, written with the quick-junit crate: pure functions of the
//! report data. A check gives one test suite per routine with a test case per scheme (the
//! tangent against that scheme along the whole path), one per scheme for a returned ∂σ/∂T,
//! and one for the routine's verdict; a
//! probe suite one test case per probe; the selftest one test case per row. A failure's
//! message carries the finding.

use std::io;

use quick_junit::{NonSuccessKind, Property, Report as JReport, TestCase, TestCaseStatus, TestSuite};

use tancheck_core::probe::{ProbeStatus, SuiteReport};
use tancheck_core::report::{CheckOutcome, SchemeCheck, SchemeSummary};
use tancheck_core::{Report, Scheme, Verdict};

/// The XML of a report. quick-junit writes a `skipped` count on the root `testsuites`
/// element, which the JUnit schema CI dashboards read (see tests/junit_report.rs) does not
/// declare there (it is declared on each `testsuite`, where it stays): it is left out.
pub(crate) fn to_string(r: &JReport) -> io::Result<String> {
    // Every suite carries the cautions every other report carries, as properties (JUnit had
    // none; a user-style sweep): a block routine's suite its own.
    let mut r = r.clone();
    for suite in &mut r.test_suites {
        let cautions = if suite.name.starts_with("tancheck block ") {
            tancheck_core::block::BLOCK_CAUTIONS
        } else {
            tancheck_core::report::CAUTIONS
        };
        for c in cautions {
            suite.add_property(Property::new("caution", c));
        }
    }
    let xml = r.to_string().map_err(io::Error::other)?;
    Ok(drop_root_skipped(&xml))
}

/// [`to_string`] for the other JUnit writers of this module's parent (campaigns).
pub(crate) fn to_xml(r: &JReport) -> io::Result<String> {
    to_string(r)
}

fn drop_root_skipped(xml: &str) -> String {
    let Some(start) = xml.find("<testsuites") else { return xml.to_string() };
    let Some(len) = xml[start..].find('>') else { return xml.to_string() };
    let tag = &xml[start..start + len];
    let Some(at) = tag.find(" skipped=\"") else { return xml.to_string() };
    let Some(close) = tag[at + 10..].find('"') else { return xml.to_string() };
    let cut = (start + at)..(start + at + 10 + close + 1);
    format!("{}{}", &xml[..cut.start], &xml[cut.end..])
}

/// The JUnit marker of a run that started its report and has not finished it (see
/// `survive::begin_side_reports`): one test case in error, of type `incomplete`, so a
/// dashboard never shows an earlier run's pass for a run that ended without its reports.
pub(crate) fn incomplete(routine: &str, message: &str) -> io::Result<String> {
    let mut status = TestCaseStatus::non_success(NonSuccessKind::Error);
    status.set_message(message);
    status.set_type("incomplete");
    let mut case = TestCase::new("the run finished", status);
    case.set_classname(routine);
    let mut suite = TestSuite::new(format!("tancheck {routine}"));
    suite.add_test_case(case);
    let mut r = JReport::new("tancheck");
    r.add_test_suite(suite);
    to_string(&r)
}

pub(crate) fn failure(message: String, kind: NonSuccessKind, description: Option<String>) -> TestCaseStatus {
    let mut s = TestCaseStatus::non_success(kind);
    s.set_message(message.clone());
    s.set_type(match kind {
        NonSuccessKind::Failure => "tangent-finding",
        NonSuccessKind::Error => "routine-fault",
    });
    s.set_description(description.unwrap_or(message));
    s
}

/// The failing increments where `part` of `scheme`'s check was compared and failed
/// (increments the closer look cleared are no failure).
fn failed_increments(
    report: &Report,
    scheme: Scheme,
    part: impl Fn(&SchemeCheck) -> Option<&CheckOutcome>,
) -> Vec<usize> {
    report
        .increments
        .iter()
        .filter(|i| {
            !i.passed()
                && i.checks.iter().any(|c| {
                    c.scheme == scheme && matches!(part(c), Some(CheckOutcome::Compared(cmp)) if !cmp.pass)
                })
        })
        .map(|i| i.index)
        .collect()
}

/// "finding …: `what` fails against the scheme at k of n increments, first at …".
fn scheme_failure(report: &Report, s: &SchemeSummary, failed: &[usize], what: &str) -> String {
    let first = report.increments.iter().find(|i| i.index == failed[0]);
    format!(
        "finding {}: {what} fails against {} at {} of {} increments, first at increment {}{}",
        report.finding(),
        s.scheme.name(),
        failed.len(),
        report.records.len().max(report.increments.len()),
        failed[0],
        first.map_or(String::new(), |i| format!(
            " (branch {}, where the diagnosis says {})",
            i.branch_label(),
            i.finding()
        )),
    )
}

/// The test suite of one check report.
fn check_suite(report: &Report) -> TestSuite {
    let routine = &report.routine.name;
    let mut suite = TestSuite::new(format!("tancheck check {routine}"));
    suite.add_property(Property::new("path", report.path.as_str()));
    suite.add_property(Property::new("finding", report.finding()));
    suite.add_property(Property::new("verdict", report.verdict.word()));
    for s in &report.summary {
        // The tangent's case counts the increments where the tangent itself failed; a
        // returned ∂σ/∂T has a case of its own, so that a failure in one does not read as a
        // failure of the other.
        let tangent_failed = failed_increments(report, s.scheme, |c| Some(&c.tangent));
        let status = if tangent_failed.is_empty() {
            TestCaseStatus::success()
        } else {
            failure(
                scheme_failure(report, s, &tangent_failed, "the tangent")
                    + &format!(
                        "; worst norm error {:.2e}, worst entry error {:.2e}, tolerance {:.1e}",
                        s.worst_norm_error, s.worst_entry_error, s.tol
                    ),
                NonSuccessKind::Failure,
                None,
            )
        };
        let mut case = TestCase::new(format!("tangent against {}", s.scheme.name()), status);
        case.set_classname(routine.as_str());
        suite.add_test_case(case);
        if s.dtemp_checks == 0 && s.dtemp_failed == 0 {
            continue;
        }
        let dtemp_failed = failed_increments(report, s.scheme, |c| c.dstress_dtemp.as_ref());
        let status = if dtemp_failed.is_empty() {
            TestCaseStatus::success()
        } else {
            failure(
                scheme_failure(report, s, &dtemp_failed, "∂σ/∂T")
                    + &format!("; worst ∂σ/∂T error {:.2e}, tolerance {:.1e}", s.dtemp_worst_error, s.tol),
                NonSuccessKind::Failure,
                None,
            )
        };
        let mut case = TestCase::new(format!("∂σ/∂T against {}", s.scheme.name()), status);
        case.set_classname(routine.as_str());
        suite.add_test_case(case);
    }
    let status = match report.verdict {
        Verdict::Pass => TestCaseStatus::success(),
        Verdict::RoutineFault => {
            let why =
                report.first_fault().map_or_else(|| "the routine faulted".to_string(), |f| f.message.clone());
            failure(format!("finding routine-fault: {why}"), NonSuccessKind::Error, None)
        }
        v => {
            let first = report.increments.iter().find(|i| !i.passed());
            failure(
                format!(
                    "finding {}: verdict {} (exit {}){}",
                    report.finding(),
                    v.word(),
                    v.exit_code(),
                    first.map_or(String::new(), |i| format!(", first failing increment {}", i.index))
                ),
                NonSuccessKind::Failure,
                None,
            )
        }
    };
    let mut case = TestCase::new("verdict", status);
    case.set_classname(routine.as_str());
    // The coverage and conventions warnings, which the test cases' statuses do not carry.
    let warnings = report.warnings();
    if !warnings.is_empty() {
        case.set_system_out(warnings.iter().map(|w| format!("warning: {w}")).collect::<Vec<_>>().join("\n"));
    }
    suite.add_test_case(case);
    // The regression cases replayed with the check, a test case each.
    if let Some(t) = &report.cases {
        for f in &t.passed {
            let mut case = TestCase::new(format!("regression case {f}"), TestCaseStatus::success());
            case.set_classname(routine.as_str());
            suite.add_test_case(case);
        }
        for c in &t.failed {
            let kind = if c.exit_code == Verdict::RoutineFault.exit_code() {
                NonSuccessKind::Error
            } else {
                NonSuccessKind::Failure
            };
            let status = failure(
                format!("finding {}: the case's call still fails (exit {})", c.finding, c.exit_code),
                kind,
                None,
            );
            let mut case = TestCase::new(format!("regression case {}", c.file), status);
            case.set_classname(routine.as_str());
            suite.add_test_case(case);
        }
    }
    suite
}

/// JUnit XML of check reports: one test suite per routine.
pub fn check_junit<'a>(reports: impl IntoIterator<Item = &'a Report>) -> io::Result<String> {
    let mut r = JReport::new("tancheck check");
    for rep in reports {
        r.add_test_suite(check_suite(rep));
    }
    to_string(&r)
}

/// JUnit XML of probe suite reports: one test suite per routine, a test case per probe
/// (a skipped probe is skipped, with its reason).
pub fn probe_junit<'a>(reports: impl IntoIterator<Item = &'a SuiteReport>) -> io::Result<String> {
    let mut r = JReport::new("tancheck probe");
    for rep in reports {
        let mut suite = TestSuite::new(format!("tancheck probe {} ({})", rep.routine, rep.suite));
        suite.add_property(Property::new("path", rep.path.as_str()));
        for p in &rep.results {
            let status = match p.status {
                ProbeStatus::Pass => TestCaseStatus::success(),
                ProbeStatus::Skipped => {
                    let mut s = TestCaseStatus::skipped();
                    s.set_message(p.summary.as_str());
                    s
                }
                // A routine fault is an error, as in a check's report; a finding is a failure
                // typed by its probe.
                ProbeStatus::Fail if p.fault => failure(
                    format!("probe {}: {}", p.probe, p.summary),
                    NonSuccessKind::Error,
                    (!p.details.is_empty()).then(|| p.details.join("\n")),
                ),
                ProbeStatus::Fail => {
                    // The message starts with the finding, as the README says of every failure
                    // (it started "probe tangent: ..."; a user-style sweep): the tangent probe's
                    // own finding where its summary names one, else the probe's name.
                    let finding = (p.probe == "tangent")
                        .then(|| p.summary.rsplit_once("finding: "))
                        .flatten()
                        .map(|(_, f)| {
                            f.split(|c: char| !(c.is_ascii_alphanumeric() || c == '-')).next().unwrap_or(f)
                        })
                        .filter(|f| !f.is_empty())
                        .unwrap_or(p.probe.as_str());
                    let mut s = failure(
                        format!("finding {finding}: probe {}: {}", p.probe, p.summary),
                        NonSuccessKind::Failure,
                        (!p.details.is_empty()).then(|| p.details.join("\n")),
                    );
                    s.set_type(format!("{}-finding", p.probe));
                    s
                }
            };
            let mut case = TestCase::new(p.probe.as_str(), status);
            case.set_classname(rep.routine.as_str());
            suite.add_test_case(case);
        }
        r.add_test_suite(suite);
    }
    to_string(&r)
}

use super::model::SelftestRow;

/// JUnit XML of the selftest: one test suite per language, a test case per row; a row whose
/// finding is not the expected one fails, naming both.
pub fn selftest_junit(rows: &[SelftestRow]) -> io::Result<String> {
    let mut r = JReport::new("tancheck selftest");
    let mut groups: Vec<&str> = Vec::new();
    for row in rows {
        if !groups.contains(&row.language.as_str()) {
            groups.push(&row.language);
        }
    }
    for g in groups {
        let mut suite = TestSuite::new(format!("tancheck selftest {g}"));
        for row in rows.iter().filter(|r| r.language == g) {
            let status = if row.right {
                TestCaseStatus::success()
            } else {
                failure(
                    format!(
                        "expected finding {}, found {} (verdict {}{})",
                        row.expected,
                        row.found,
                        row.verdict.word(),
                        row.first_increment
                            .map_or(String::new(), |i| format!(", first failing increment {i}"))
                    ),
                    NonSuccessKind::Failure,
                    None,
                )
            };
            let mut case = TestCase::new(row.variant.as_str(), status);
            case.set_classname(format!("selftest.{g}"));
            suite.add_test_case(case);
        }
        r.add_test_suite(suite);
    }
    to_string(&r)
}

/// The XML of a block routine's checks: one test suite with a test case per check (its
/// findings fail it; a failed or crashed call is an error).
pub fn block_junit(r: &tancheck_core::block::BlockReport) -> io::Result<String> {
    use tancheck_core::block::BlockCheck;
    let mut suite = TestSuite::new(format!("tancheck block {}", r.routine));
    suite.add_property(Property::new("path", r.path.as_str()));
    suite.add_property(Property::new("finding", r.finding()));
    suite.add_property(Property::new("energy rule", r.energy_rule));
    for check in BlockCheck::ALL {
        let found: Vec<_> = r.findings.iter().filter(|f| f.check == check).collect();
        // A check that did not run is skipped, with why: its note says so, or (for the checks
        // a declaration turns on: a rate law, a counterpart; or off) there is no note of it.
        // They read as passed before (found by a user-style sweep).
        let prefix = format!("{}:", check.name());
        let note = r.notes.iter().find(|n| n.starts_with(&prefix));
        let optional = matches!(
            check,
            BlockCheck::Deletion
                | BlockCheck::Damage
                | BlockCheck::Independence
                | BlockCheck::Rate
                | BlockCheck::Refinement
                | BlockCheck::Counterpart
        );
        let not_run = match note {
            Some(n) if n.contains("did not run") || n.contains("not checked") => Some(n.clone()),
            None if optional => Some(match check {
                BlockCheck::Rate => "rate: no rate law declared (block.rate_law); not checked".to_string(),
                BlockCheck::Counterpart => {
                    "counterpart: none named (block.counterpart); not checked".to_string()
                }
                BlockCheck::Damage => {
                    "damage: no state variable declared as damage (block.damage); not checked".to_string()
                }
                _ => format!("{}: turned off in the manifest's block section; not checked", check.name()),
            }),
            _ => None,
        };
        let status = match found.first() {
            None if not_run.is_some() => {
                let mut s = TestCaseStatus::skipped();
                s.set_message(not_run.unwrap_or_default());
                s
            }
            None => TestCaseStatus::success(),
            Some(f) => {
                let kind =
                    if check == BlockCheck::Call { NonSuccessKind::Error } else { NonSuccessKind::Failure };
                let text: Vec<String> = found
                    .iter()
                    .map(|f| match f.increment {
                        Some(k) => format!("{} (increment {k}): {}", f.finding, f.what),
                        None => format!("{}: {}", f.finding, f.what),
                    })
                    .collect();
                let mut s = failure(format!("finding {}", f.finding), kind, Some(text.join("\n")));
                // A block check's finding is no tangent's (deletion, energy, counterpart, …).
                if kind == NonSuccessKind::Failure {
                    s.set_type("block-finding");
                }
                s
            }
        };
        suite.add_test_case(TestCase::new(check.name(), status));
    }
    let mut report = JReport::new("tancheck");
    report.add_test_suite(suite);
    to_string(&report)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_root_loses_only_its_skipped_count() {
        let xml = "<?xml version=\"1.0\"?>\n<testsuites name=\"a\" tests=\"2\" skipped=\"0\" failures=\"1\" errors=\"0\">\n<testsuite name=\"s\" tests=\"2\" skipped=\"0\" errors=\"0\" failures=\"1\">";
        let out = drop_root_skipped(xml);
        assert!(out.contains("<testsuites name=\"a\" tests=\"2\" failures=\"1\" errors=\"0\">"), "{out}");
        assert!(out.contains("<testsuite name=\"s\" tests=\"2\" skipped=\"0\""), "{out}");
    }

    // A block routine whose point is deleted along the path: its deletion check ran and
    // passed, and is a passed test case (it was skipped as "turned off in the manifest's block
    // section"; a user-style sweep). The worked Johnson–Cook block path of the selftest.
    #[test]
    fn a_deletion_check_that_ran_is_no_skipped_case() {
        use tancheck_core::block;
        use tancheck_models::block::worked::{jc_path, jc_settings, jc_steel};
        let mut r = tancheck_models::block::by_name("johnson-cook-block", tancheck_core::PointKind::Solid3d)
            .unwrap()
            .unwrap();
        let report = block::run(r.as_mut(), &jc_steel(0.014), &jc_path(), &jc_settings(293.0)).unwrap();
        assert!(report.passed(), "{:?}", report.findings);
        assert!(report.increments.iter().any(|i| i.deleted), "a point is deleted on this path");
        let xml = block_junit(&report).unwrap();
        assert!(!xml.contains("turned off"), "{xml}");
        let case = xml.split("<testcase name=\"deletion\"").nth(1).unwrap();
        let case = &case[..case
            .find("</testcase>")
            .unwrap_or(case.len())
            .min(case.find("<testcase").unwrap_or(usize::MAX))];
        assert!(!case.contains("<skipped"), "{xml}");
    }
}
