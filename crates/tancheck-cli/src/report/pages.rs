//! The file reporters: the HTML page (`--html FILE`) and the JUnit XML (`--junit FILE`), written
//! from the same report data as the terminal and the JSON, through the pure renderers of
//! [`super::html`] and [`super::junit`].

use std::io;
use std::path::{Path, PathBuf};

use tancheck_core::probe::SuiteReport;
use tancheck_core::Report;

use super::model::{BisectOutcome, DemoReport, SelftestReport, SuiteContext};
use super::{html, junit, write_atomic, Reporter};

/// Writes the HTML page and the JUnit XML of each report it gets, each file when asked for.
pub struct Pages {
    html: Option<PathBuf>,
    junit: Option<PathBuf>,
}

impl Pages {
    pub fn new(html: Option<PathBuf>, junit: Option<PathBuf>) -> Pages {
        Pages { html, junit }
    }
}

/// Render `text` and write it atomically to `path`, naming the file in an error.
fn write(path: Option<&Path>, what: &str, text: impl FnOnce() -> io::Result<String>) -> io::Result<()> {
    let Some(p) = path else { return Ok(()) };
    let text = text().map_err(|e| io::Error::new(e.kind(), format!("rendering {what}: {e}")))?;
    write_atomic(p, text.as_bytes())
        .map_err(|e| io::Error::new(e.kind(), format!("writing {what} to {}: {e}", p.display())))
}

impl Reporter for Pages {
    fn check(&mut self, report: &Report) -> io::Result<()> {
        write(self.html.as_deref(), "the HTML report", || Ok(html::check_page(report)))?;
        write(self.junit.as_deref(), "the JUnit report", || junit::check_junit([report]))
    }

    fn suite(&mut self, report: &SuiteReport, _context: &SuiteContext) -> io::Result<()> {
        write(self.html.as_deref(), "the HTML report", || Ok(html::probe_page(report)))?;
        write(self.junit.as_deref(), "the JUnit report", || junit::probe_junit([report]))
    }

    fn bisect(&mut self, outcome: &BisectOutcome) -> io::Result<()> {
        // JUnit has no test case per fraction of an increment: the check's cases stand for it.
        if let Some(check) = outcome.check.as_deref() {
            write(self.html.as_deref(), "the HTML report", || {
                Ok(html::bisect_page(&html::BisectView {
                    report: check,
                    located: outcome.located.as_ref(),
                    shrunk: outcome
                        .shrunk
                        .as_ref()
                        .and_then(|s| s.located.as_ref().map(|l| (l, s.original_increments))),
                }))
            })?;
            write(self.junit.as_deref(), "the JUnit report", || junit::check_junit([check]))?;
        }
        Ok(())
    }

    fn campaign(&mut self, report: &super::campaign::CampaignReport) -> io::Result<()> {
        write(self.junit.as_deref(), "the JUnit report", || super::campaign_pages::campaign_junit(report))?;
        write(self.html.as_deref(), "the HTML report", || Ok(super::campaign_pages::campaign_page(report)))
    }

    fn finite_check(&mut self, report: &tancheck_core::finite::check::FiniteReport) -> io::Result<()> {
        write(self.html.as_deref(), "the HTML report", || Ok(super::finite::check_page(report)))?;
        write(self.junit.as_deref(), "the JUnit report", || super::finite::check_junit(report))
    }

    fn finite_probes(&mut self, report: &tancheck_core::finite::probe::FiniteProbeReport) -> io::Result<()> {
        write(self.html.as_deref(), "the HTML report", || Ok(super::finite::probes_page(report)))?;
        write(self.junit.as_deref(), "the JUnit report", || super::finite::probes_junit(report))
    }
    fn explore(&mut self, report: &tancheck_core::explore::ExploreReport) -> io::Result<()> {
        write(self.html.as_deref(), "the HTML report", || Ok(super::explore_pages::explore_page(report)))?;
        write(self.junit.as_deref(), "the JUnit report", || super::explore_pages::explore_junit(report))
    }
    fn block(&mut self, report: &tancheck_core::block::BlockReport) -> io::Result<()> {
        write(self.html.as_deref(), "the HTML report", || Ok(html::block_page(report)))?;
        write(self.junit.as_deref(), "the JUnit report", || junit::block_junit(report))
    }

    fn selftest(&mut self, report: &SelftestReport) -> io::Result<()> {
        write(self.junit.as_deref(), "the JUnit report", || junit::selftest_junit(&report.rows))?;
        write(self.html.as_deref(), "the HTML report", || Ok(html::selftest_page(&report.rows, &report.tool)))
    }

    /// The demo's routines as the selftest's rows: known verdicts and what the check found.
    fn demo(&mut self, report: &DemoReport) -> io::Result<()> {
        let rows = report.rows();
        write(self.junit.as_deref(), "the JUnit report", || junit::selftest_junit(&rows))?;
        write(self.html.as_deref(), "the HTML report", || Ok(html::selftest_page(&rows, "tancheck demo")))
    }
}
