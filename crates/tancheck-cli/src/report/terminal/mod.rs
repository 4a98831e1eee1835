//! The readable report for a terminal: every report kind, at three levels of detail, with
//! colour when asked for (see `style`).

use std::io::{self, Write};

use tancheck_core::probe::SuiteReport;
use tancheck_core::Report;

use super::model::{BisectOutcome, CaseFolderResult, DemoReport, ReplayReport, SelftestReport, SuiteContext};
pub use super::style::Palette;
use super::Reporter;

pub mod block;
pub mod campaign;
pub mod check;
pub mod commands;
pub mod demo;
pub mod explore;

pub use check::diagnosis;

/// How much the terminal report says.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Detail {
    /// One line per failing check, and the verdict.
    Quiet,
    /// Rows for what needs one (runs of passing increments folded), details of failures.
    Normal,
    /// Details of every check, a row per increment.
    Verbose,
}

/// The terminal reporter: writes each report it gets to `out`.
pub struct Terminal<'a> {
    pub detail: Detail,
    pub palette: Palette,
    out: Box<dyn Write + 'a>,
}

impl<'a> Terminal<'a> {
    /// Without colour.
    pub fn new(detail: Detail, out: impl Write + 'a) -> Terminal<'a> {
        Terminal { detail, palette: Palette { on: false }, out: Box::new(out) }
    }

    /// With colour when `color` (escape codes stripped otherwise, whoever wrote them).
    pub fn colored(detail: Detail, out: impl Write + 'a, color: bool) -> Terminal<'a> {
        Terminal { detail, palette: Palette { on: color }, out: super::style::stream(out, color) }
    }
}

impl Reporter for Terminal<'_> {
    fn campaign(&mut self, report: &super::campaign::CampaignReport) -> io::Result<()> {
        campaign::write(&mut self.out, report, self.detail, self.palette)
    }
    fn check(&mut self, report: &Report) -> io::Result<()> {
        check::write(&mut self.out, report, self.detail, self.palette)
    }
    fn suite(&mut self, report: &SuiteReport, context: &SuiteContext) -> io::Result<()> {
        commands::suite(&mut self.out, report, context, self.detail, self.palette)
    }
    fn bisect(&mut self, outcome: &BisectOutcome) -> io::Result<()> {
        commands::bisect(&mut self.out, outcome, self.detail, self.palette)
    }
    fn replay(&mut self, report: &ReplayReport) -> io::Result<()> {
        commands::replay(&mut self.out, report, self.detail, self.palette)
    }
    fn cases(&mut self, result: &CaseFolderResult) -> io::Result<()> {
        commands::cases(&mut self.out, result, self.detail, self.palette)
    }
    fn selftest(&mut self, report: &SelftestReport) -> io::Result<()> {
        commands::selftest(&mut self.out, report, self.detail, self.palette)
    }
    fn finite_check(&mut self, report: &tancheck_core::finite::check::FiniteReport) -> io::Result<()> {
        let (quiet, verbose) = (self.detail == Detail::Quiet, self.detail == Detail::Verbose);
        super::finite::write_check(&mut self.out, report, quiet, verbose, self.palette)
    }
    fn finite_bisect(&mut self, outcome: &crate::report::model::FiniteBisectOutcome) -> io::Result<()> {
        super::finite::write_bisect(&mut self.out, outcome, self.detail == Detail::Quiet, self.palette)
    }
    fn finite_replay(&mut self, report: &crate::report::model::FiniteReplayReport) -> io::Result<()> {
        super::finite::write_replay(&mut self.out, report, self.detail == Detail::Quiet, self.palette)
    }
    fn finite_probes(&mut self, report: &tancheck_core::finite::probe::FiniteProbeReport) -> io::Result<()> {
        super::finite::write_probes(&mut self.out, report, self.detail == Detail::Quiet, self.palette)
    }
    fn explore(&mut self, report: &tancheck_core::explore::ExploreReport) -> io::Result<()> {
        explore::write(&mut self.out, report, self.detail, self.palette)
    }
    fn block(&mut self, report: &tancheck_core::block::BlockReport) -> io::Result<()> {
        block::BlockTerminal { detail: self.detail, palette: self.palette }.write(report, &mut self.out)
    }
    fn demo(&mut self, report: &DemoReport) -> io::Result<()> {
        demo::write(&mut self.out, report, self.detail, self.palette)
    }
    fn finish(&mut self) -> io::Result<()> {
        self.out.flush()
    }
}

/// One increment, short: its strain increment and what else it carries (the time increment
/// when it is not 1), each number in full (a shrunk value such as 9.9999976e-1 must not read 1).
pub(crate) fn increment_text(i: &tancheck_core::path::PathIncrement) -> String {
    // A zero that shrinking left negative reads 0e0, not -0e0.
    let d: Vec<String> = i.dstrain.iter().map(|&x| format!("{:e}", if x == 0.0 { 0.0 } else { x })).collect();
    let mut s = format!("Δε [{}]", d.join(", "));
    if i.dtemp != 0.0 {
        s.push_str(&format!(", ΔT {:e}", i.dtemp));
    }
    if i.dtime != 1.0 {
        s.push_str(&format!(", Δt {:e}", i.dtime));
    }
    if let Some(h) = &i.hold_stress {
        s.push_str(&format!(", held {}", held_text(h)));
    }
    s
}

/// The held stresses of a path increment, by the path's component names (its six slots are
/// 11 22 33 23 13 12, as the strain's): "σ22 = 0.000e0, …". They read σ[1] (0-based) where
/// every other message says 22 (a user-style sweep).
pub(crate) fn held_text(h: &[Option<f64>; 6]) -> String {
    const SLOTS: [&str; 6] = ["11", "22", "33", "23", "13", "12"];
    let held: Vec<String> =
        h.iter().zip(SLOTS).filter_map(|(v, l)| v.map(|v| format!("σ{l} = {v:.3e}"))).collect();
    held.join(", ")
}

#[cfg(test)]
mod tests {
    // Held stresses read by the names every other message uses (they read σ[1], 0-based).
    #[test]
    fn held_stresses_are_named_by_component() {
        let h = [None, Some(0.0), Some(0.0), None, None, Some(-2.5)];
        assert_eq!(super::held_text(&h), "σ22 = 0.000e0, σ33 = 0.000e0, σ12 = -2.500e0");
    }
}
