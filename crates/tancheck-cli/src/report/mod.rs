//! Reporters: views of the report data (core's check [`Report`], the probe suite's
//! [`SuiteReport`], and the data of [`model`]) for the terminal, as JSON, as an HTML page and
//! as JUnit XML. Every command fills its report and hands it to one [`Reporter`], usually a
//! [`Fanout`] of several.

use std::io::{self, Write};
use std::path::Path;

use tancheck_core::finite::check::FiniteReport;
use tancheck_core::finite::probe::FiniteProbeReport;
use tancheck_core::probe::SuiteReport;
use tancheck_core::Report;

pub mod block;
pub mod campaign;
pub mod campaign_pages;
pub mod explore_pages;
pub mod files;
pub mod finite;
pub mod html;
pub mod json;
pub mod junit;
pub mod model;
pub mod pages;
pub mod schema;
pub mod style;
pub mod terminal;

use model::{BisectOutcome, CaseFolderResult, DemoReport, ReplayReport, SelftestReport, SuiteContext};

/// A view of reports. One method per report kind, each doing nothing unless the reporter
/// implements it, so a reporter renders the kinds it knows and a new kind (block routines,
/// finite strain, campaigns) is a new method here with a do-nothing default.
pub trait Reporter {
    /// The report of `tancheck check` (and of each routine of `demo`).
    fn check(&mut self, _report: &Report) -> io::Result<()> {
        Ok(())
    }
    /// The report of a probe suite (`tancheck probe`).
    fn suite(&mut self, _report: &SuiteReport, _context: &SuiteContext) -> io::Result<()> {
        Ok(())
    }
    /// What `tancheck bisect` found.
    fn bisect(&mut self, _outcome: &BisectOutcome) -> io::Result<()> {
        Ok(())
    }
    /// The replay of one case file.
    fn replay(&mut self, _report: &ReplayReport) -> io::Result<()> {
        Ok(())
    }
    /// A folder of cases replayed as a regression suite (`check --cases`).
    fn cases(&mut self, _result: &CaseFolderResult) -> io::Result<()> {
        Ok(())
    }
    /// The rows of `tancheck selftest`.
    fn selftest(&mut self, _report: &SelftestReport) -> io::Result<()> {
        Ok(())
    }
    /// The report of a campaign, of one shard of it, or of merged shards.
    fn campaign(&mut self, _report: &campaign::CampaignReport) -> io::Result<()> {
        Ok(())
    }
    /// A finite-strain check (`tancheck check` on a manifest with a `finite` section).
    fn finite_check(&mut self, _report: &FiniteReport) -> io::Result<()> {
        Ok(())
    }
    /// The finite-strain probes (`tancheck probe` on a finite manifest).
    fn finite_bisect(&mut self, _outcome: &crate::report::model::FiniteBisectOutcome) -> io::Result<()> {
        Ok(())
    }
    fn finite_replay(&mut self, _report: &crate::report::model::FiniteReplayReport) -> io::Result<()> {
        Ok(())
    }
    fn finite_probes(&mut self, _report: &FiniteProbeReport) -> io::Result<()> {
        Ok(())
    }
    /// What `tancheck explore` found: the signatures reached and each distinct failure.
    fn explore(&mut self, _report: &tancheck_core::explore::ExploreReport) -> io::Result<()> {
        Ok(())
    }
    /// The routines `tancheck demo` checked, with the verdicts they should get.
    fn demo(&mut self, _report: &DemoReport) -> io::Result<()> {
        Ok(())
    }
    /// After the last report of a run: flush, close files.
    /// The checks of a block routine (explicit dynamics).
    fn block(&mut self, _report: &tancheck_core::block::BlockReport) -> io::Result<()> {
        Ok(())
    }
    fn finish(&mut self) -> io::Result<()> {
        Ok(())
    }
}

/// Several reporters as one: every report goes to each of them in turn. A reporter that
/// fails does not keep the others from their report; the first error is returned.
#[derive(Default)]
pub struct Fanout<'a> {
    reporters: Vec<Box<dyn Reporter + 'a>>,
}

impl<'a> Fanout<'a> {
    pub fn new() -> Fanout<'a> {
        Fanout { reporters: Vec::new() }
    }

    /// Add a reporter (builder style).
    #[must_use]
    pub fn with(mut self, r: impl Reporter + 'a) -> Fanout<'a> {
        self.reporters.push(Box::new(r));
        self
    }

    /// Add a reporter.
    pub fn push(&mut self, r: Box<dyn Reporter + 'a>) {
        self.reporters.push(r);
    }

    fn each(&mut self, mut f: impl FnMut(&mut dyn Reporter) -> io::Result<()>) -> io::Result<()> {
        let mut first = Ok(());
        for r in &mut self.reporters {
            let result = f(r.as_mut());
            if first.is_ok() {
                first = result;
            }
        }
        first
    }
}

impl Reporter for Fanout<'_> {
    fn check(&mut self, report: &Report) -> io::Result<()> {
        self.each(|r| r.check(report))
    }
    fn suite(&mut self, report: &SuiteReport, context: &SuiteContext) -> io::Result<()> {
        self.each(|r| r.suite(report, context))
    }
    fn bisect(&mut self, outcome: &BisectOutcome) -> io::Result<()> {
        self.each(|r| r.bisect(outcome))
    }
    fn replay(&mut self, report: &ReplayReport) -> io::Result<()> {
        self.each(|r| r.replay(report))
    }
    fn cases(&mut self, result: &CaseFolderResult) -> io::Result<()> {
        self.each(|r| r.cases(result))
    }
    fn selftest(&mut self, report: &SelftestReport) -> io::Result<()> {
        self.each(|r| r.selftest(report))
    }
    fn campaign(&mut self, report: &campaign::CampaignReport) -> io::Result<()> {
        self.each(|r| r.campaign(report))
    }
    fn finite_check(&mut self, report: &FiniteReport) -> io::Result<()> {
        self.each(|r| r.finite_check(report))
    }
    fn finite_bisect(&mut self, outcome: &crate::report::model::FiniteBisectOutcome) -> io::Result<()> {
        self.each(|r| r.finite_bisect(outcome))
    }
    fn finite_replay(&mut self, report: &crate::report::model::FiniteReplayReport) -> io::Result<()> {
        self.each(|r| r.finite_replay(report))
    }
    fn finite_probes(&mut self, report: &FiniteProbeReport) -> io::Result<()> {
        self.each(|r| r.finite_probes(report))
    }
    fn explore(&mut self, report: &tancheck_core::explore::ExploreReport) -> io::Result<()> {
        self.each(|r| r.explore(report))
    }
    fn block(&mut self, report: &tancheck_core::block::BlockReport) -> io::Result<()> {
        self.each(|r| r.block(report))
    }
    fn demo(&mut self, report: &DemoReport) -> io::Result<()> {
        self.each(|r| r.demo(report))
    }
    fn finish(&mut self) -> io::Result<()> {
        self.each(|r| r.finish())
    }
}

/// Write `path` atomically through `fill`, which gets a buffered writer of a temporary file in
/// the same folder; then a rename. Nothing of the file is held in memory.
///
/// The file reaches the disk before the rename (a crash of the machine leaves the old report
/// or the new one), except the report an `--isolate` worker hands to its parent: the parent
/// reads it back at once and removes it, and a crash of the machine ends the parent too, so
/// the worker does not wait for the disk for it (on a busy disk that wait was longer than a
/// short check). The worker's other files (`--html`, `--junit`, cases) do reach the disk.
///
/// A destination that is not a plain file (`/dev/null`, a named pipe) is written into in
/// place, and a symbolic link is followed to the file it names (see [`destination`]).
pub fn write_atomic_with(path: &Path, fill: impl FnOnce(&mut dyn Write) -> io::Result<()>) -> io::Result<()> {
    if tancheck_abi::watch::dying() {
        // The process is ending with last words, which write this report themselves.
        park_for_good();
    }
    let path = match destination(path) {
        Destination::Stream(p) => {
            let f = std::fs::OpenOptions::new().write(true).open(&p)?;
            let mut w = io::BufWriter::with_capacity(64 * 1024, f);
            fill(&mut w)?;
            return w.flush();
        }
        Destination::Replace(p) => p,
    };
    let path = path.as_path();
    let tmp = temporary_name(path);
    let result = (|| {
        let f = std::fs::File::create(&tmp)?;
        let mut w = io::BufWriter::with_capacity(64 * 1024, f);
        fill(&mut w)?;
        let f = w.into_inner().map_err(|e| e.into_error())?;
        if !crate::worker_env::is_handoff_report(path) {
            f.sync_all()?;
        }
        if tancheck_abi::watch::dying() {
            // A routine's thread is ending the process and its last words write this report
            // (they remove this copy): it must not replace theirs. The process ends with them.
            let _ = std::fs::remove_file(&tmp);
            park_for_good();
        }
        std::fs::rename(&tmp, path)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

/// Wait for the end of the process, which the last words being said bring (see
/// [`write_atomic_with`]).
fn park_for_good() -> ! {
    loop {
        std::thread::park();
    }
}

/// Write `bytes` to `path` atomically: a temporary file in the same folder, then a rename,
/// so an interrupted run never leaves a half-written report.
/// A SIGINT or SIGTERM while it is written removes the temporary file (see [`temporary_name`]).
pub fn write_atomic(path: &Path, bytes: &[u8]) -> io::Result<()> {
    write_atomic_with(path, |w| w.write_all(bytes))
}

/// Where [`write_atomic`] puts a file.
#[derive(Debug, PartialEq)]
pub enum Destination {
    /// A plain file (or none yet), replaced whole: a temporary file in its folder, then a
    /// rename. A symbolic link is followed to the file it names, so the link stays a link.
    Replace(std::path::PathBuf),
    /// Something that is not a plain file (a device such as `/dev/null`, a named pipe, a
    /// socket), written into in place: a rename would put a plain file in its place.
    Stream(std::path::PathBuf),
}

/// Where a file written to `path` goes (see [`Destination`]).
pub fn destination(path: &Path) -> Destination {
    match std::fs::metadata(path) {
        Ok(m) if !m.is_file() && !m.is_dir() => Destination::Stream(path.to_path_buf()),
        _ => Destination::Replace(follow_links(path)),
    }
}

/// The file a symbolic link at `path` names, followed link by link (a relative link from the
/// link's own folder), also when that file does not exist yet: a dangling link is written
/// through, not replaced by a plain file. `path` itself when it is not a link; after 40 links
/// (a loop), the last one reached.
fn follow_links(path: &Path) -> std::path::PathBuf {
    let mut at = path.to_path_buf();
    for _ in 0..40 {
        let is_link = std::fs::symlink_metadata(&at).is_ok_and(|m| m.file_type().is_symlink());
        let Some(next) = is_link.then(|| std::fs::read_link(&at).ok()).flatten() else { break };
        at = match at.parent() {
            Some(dir) if next.is_relative() => dir.join(next),
            _ => next,
        };
    }
    at
}

/// The temporary name [`write_atomic`] writes `path` under before the rename: a hidden file
/// in the same folder, named after the process. `path` is a plain file's (see
/// [`destination`]).
pub fn temporary_name(path: &Path) -> std::path::PathBuf {
    let dir = path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "report".into());
    dir.join(format!(".{name}.tmp-{}", std::process::id()))
}

/// Compact number for tables: 3 significant digits in exponent form.
pub fn sci(x: f64) -> String {
    if x == 0.0 {
        "0".into()
    } else if x.is_finite() {
        format!("{x:.2e}")
    } else {
        format!("{x}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_whole_files_and_leaves_no_temporary() {
        let dir = std::env::temp_dir().join(format!("tancheck-atomic-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("r.json");
        write_atomic(&p, b"first").unwrap();
        write_atomic(&p, b"second").unwrap();
        assert_eq!(std::fs::read(&p).unwrap(), b"second");
        let names: Vec<_> = std::fs::read_dir(&dir).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(names.len(), 1, "{names:?}");
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
