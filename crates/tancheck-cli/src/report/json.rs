//! The machine-readable report: each report kind as a versioned JSON document (core's
//! `report::document`, the same writer the C API uses), streamed to a file or to standard
//! output.

use std::io::{self, Write};
use std::path::{Path, PathBuf};

use serde::Serialize;
use tancheck_core::probe::SuiteReport;
use tancheck_core::report::document::{self, Kind};
use tancheck_core::Report;

use super::model::{BisectOutcome, CaseFolderResult, DemoReport, ReplayReport, SelftestReport, SuiteContext};
use super::{write_atomic_with, Reporter};

/// Writes each report it gets as a JSON document to a file (atomically), or to `stdout` for
/// `-`.
pub struct Json<'a> {
    target: PathBuf,
    stdout: Box<dyn Write + 'a>,
}

impl<'a> Json<'a> {
    /// `stdout` is where `-` writes (tancheck's own standard output).
    pub fn new(target: &Path, stdout: impl Write + 'a) -> Json<'a> {
        Json { target: target.to_path_buf(), stdout: Box::new(stdout) }
    }

    /// Whether the document goes to standard output (replacing the readable report).
    pub fn to_stdout(target: &Path) -> bool {
        target.as_os_str() == "-"
    }

    fn put<T: Serialize>(&mut self, kind: Kind, body: &T) -> io::Result<()> {
        if Json::to_stdout(&self.target) {
            document::write(&mut self.stdout, kind, body)?;
            self.stdout.flush()
        } else {
            write_atomic_with(&self.target, |w| document::write(w, kind, body)).map_err(|e| {
                io::Error::new(e.kind(), format!("writing the JSON report to {}: {e}", self.target.display()))
            })
        }
    }
}

/// The JSON document of a check report, to any writer (benchmarks, tests).
pub fn write_check(report: &Report, out: &mut dyn Write) -> io::Result<()> {
    document::write(out, Kind::Check, &document::CheckDocument::of(report))
}

impl Reporter for Json<'_> {
    fn campaign(&mut self, report: &super::campaign::CampaignReport) -> io::Result<()> {
        let text = report.to_json();
        if Json::to_stdout(&self.target) {
            self.stdout.write_all(text.as_bytes())?;
            self.stdout.flush()
        } else {
            write_atomic_with(&self.target, |w| w.write_all(text.as_bytes())).map_err(|e| {
                io::Error::new(e.kind(), format!("writing the JSON report to {}: {e}", self.target.display()))
            })
        }
    }
    fn check(&mut self, report: &Report) -> io::Result<()> {
        if crate::worker_env::verdict_only() {
            // An `--isolate` worker whose parent writes no JSON report reads only the verdict.
            #[derive(Serialize)]
            struct VerdictOnly {
                verdict: tancheck_core::Verdict,
            }
            return self.put(Kind::Check, &VerdictOnly { verdict: report.verdict });
        }
        self.put(Kind::Check, &document::CheckDocument::of(report))
    }
    fn suite(&mut self, report: &SuiteReport, _context: &SuiteContext) -> io::Result<()> {
        self.put(Kind::ProbeSuite, report)
    }
    fn bisect(&mut self, outcome: &BisectOutcome) -> io::Result<()> {
        self.put(Kind::Bisect, outcome)
    }
    fn replay(&mut self, report: &ReplayReport) -> io::Result<()> {
        self.put(Kind::Replay, report)
    }
    fn cases(&mut self, result: &CaseFolderResult) -> io::Result<()> {
        self.put(Kind::Cases, result)
    }
    fn selftest(&mut self, report: &SelftestReport) -> io::Result<()> {
        self.put(Kind::Selftest, report)
    }
    fn finite_check(&mut self, report: &tancheck_core::finite::check::FiniteReport) -> io::Result<()> {
        self.put(Kind::FiniteCheck, report)
    }
    fn finite_bisect(&mut self, outcome: &crate::report::model::FiniteBisectOutcome) -> io::Result<()> {
        self.put(Kind::FiniteBisect, outcome)
    }
    fn finite_replay(&mut self, report: &crate::report::model::FiniteReplayReport) -> io::Result<()> {
        self.put(Kind::FiniteReplay, report)
    }
    fn finite_probes(&mut self, report: &tancheck_core::finite::probe::FiniteProbeReport) -> io::Result<()> {
        self.put(Kind::FiniteProbes, report)
    }
    fn explore(&mut self, report: &tancheck_core::explore::ExploreReport) -> io::Result<()> {
        self.put(Kind::Explore, &tancheck_core::explore::report::ExploreDocument::of(report))
    }
    fn block(&mut self, report: &tancheck_core::block::BlockReport) -> io::Result<()> {
        self.put(Kind::Block, &super::block::BlockDocument::of(report))
    }
    fn demo(&mut self, report: &DemoReport) -> io::Result<()> {
        self.put(Kind::Demo, report)
    }
}
