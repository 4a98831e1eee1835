//! What the memory guards saw over one check, put into the report model, the same way for
//! the command line and the C API.

use tancheck_core::report::{GuardFindingRecord, GuardSummary};
use tancheck_core::{Report, Verdict};

use super::{FindingKind, GuardFinding, GuardLevel};

/// One finding as the report records it.
pub fn finding_record(f: &GuardFinding) -> GuardFindingRecord {
    GuardFindingRecord {
        kind: match f.kind {
            FindingKind::Overrun => "overrun",
            FindingKind::InputWritten => "input-written",
            FindingKind::Unwritten => "unwritten",
            FindingKind::OverRead => "over-read",
            FindingKind::Unrepeatable => "unrepeatable",
        }
        .into(),
        array: f.array.name().into(),
        length: f.len,
        index: f.first,
        entries: f.entries,
        increment: f.increment,
        complex: f.complex,
        calls: f.calls,
        message: f.to_string(),
    }
}

/// Put the guards' level, extra calls and findings into `report`. A finding makes the verdict
/// a routine fault and is named in the notes.
pub fn add_to_report(report: &mut Report, level: GuardLevel, extra_calls: u64, findings: &[GuardFinding]) {
    if !findings.is_empty() {
        report.verdict = Verdict::RoutineFault;
        for f in findings {
            report.notes.push(format!("memory guard: {f}"));
        }
    }
    report.guard = Some(GuardSummary {
        level: level.name().into(),
        extra_calls,
        findings: findings.iter().map(finding_record).collect(),
    });
}
