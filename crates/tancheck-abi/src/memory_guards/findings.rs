//! What the guards found: the kind of each finding, the call that first showed it and how
//! many calls did, collected per routine.

use std::fmt;

use super::*;

/// What a routine did wrong.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum FindingKind {
    /// Wrote past the end of an array (into its guard zone).
    Overrun,
    /// Wrote to a read-only input.
    InputWritten,
    /// Left entries of an output unwritten in a successful call.
    Unwritten,
    /// Its results depend on memory past the end of a read-only array.
    OverRead,
    /// Two identical calls gave different results.
    Unrepeatable,
}

/// One misbehaviour, as first seen, and how many calls showed it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct GuardFinding {
    pub kind: FindingKind,
    pub array: GuardedArray,
    /// Entries of the array (for the report: bytes of the message buffer).
    pub len: usize,
    /// The first offending index, 0-based as in C: past the end (`>= len`) for an overrun,
    /// within the array otherwise. For an over-read, `len` (the first entry past the end).
    pub first: usize,
    /// How many entries were affected in the first call that showed it.
    pub entries: usize,
    /// Components of the tangent's side (to name a tangent entry by row and column).
    pub ncomp: usize,
    /// The increment number of that call.
    pub increment: i32,
    /// Whether that call was to the complex-step twin.
    pub complex: bool,
    /// How many calls showed this finding.
    pub calls: u64,
}

impl GuardFinding {
    /// What happened, without where it was first seen: "wrote past the end of state: ...".
    pub fn what(&self) -> String {
        let a = self.array.name();
        // The entry as a Fortran author counts it too (C's state[19] is Fortran's state(20):
        // "state[19], but state has 19 state variables" read as a contradiction; a user-style
        // sweep of a Fortran library).
        let from_one = |k: usize| format!(" ({a}({}) counted from 1)", k + 1);
        match self.kind {
            FindingKind::Overrun if self.array == GuardedArray::Report => format!(
                "wrote past the end of report->message: byte {} of a {}-byte buffer (message \
                 text must fit in TC_MESSAGE_LEN bytes, NUL included)",
                self.first, self.len
            ),
            FindingKind::Overrun => format!(
                "wrote past the end of {a}: {a}[{}]{}, but {a} has {}{}; check the loop bounds and \
                 the sizes ncomp, nstate and nproperties of tc_call",
                self.first,
                from_one(self.first),
                self.array.counted(self.len),
                if self.entries >= super::ZONE {
                    // The guard zone is this wide: a write that filled it may go further.
                    format!(" (at least {} entries past the end changed: the whole guard zone)", self.entries)
                } else if self.entries > 1 {
                    format!(" ({} entries past the end changed)", self.entries)
                } else {
                    String::new()
                }
            ),
            FindingKind::InputWritten if self.array == GuardedArray::Call => {
                "wrote to its read-only call description (tc_call); it must only read it".into()
            }
            FindingKind::InputWritten => format!(
                "wrote to its read-only input {a}: {a}[{}]{} changed ({} of {}); inputs are const, \
                 copy them before changing them",
                self.first,
                from_one(self.first),
                self.entries,
                self.array.counted(self.len)
            ),
            FindingKind::Unwritten => {
                let at = if self.array == GuardedArray::Tangent && self.ncomp > 0 {
                    format!(
                        " (row {}, column {}, counted from 1)",
                        self.first % self.ncomp + 1,
                        self.first / self.ncomp + 1
                    )
                } else {
                    from_one(self.first)
                };
                // A twin's entry counts as unwritten when either part is.
                let parts = if self.complex { " (both its real and imaginary parts)" } else { "" };
                format!(
                    "left {a}[{}] unwritten{at}: {} of {} never written in a successful call; \
                     outputs arrive filled with NaN and the routine must write every entry{parts} (an \
                     entry it did write may hold that NaN too: written from an output read before \
                     it was set, such as the state array read in place of the start state)",
                    self.first,
                    self.entries,
                    self.array.counted(self.len)
                )
            }
            FindingKind::OverRead => format!(
                "reads beyond its {}: its results change when the memory after {a}[{}] changes; \
                 check the indices it reads and the sizes in tc_call",
                self.array.counted(self.len),
                self.len.saturating_sub(1)
            ),
            FindingKind::Unrepeatable => "gave different results for two identical calls: it keeps \
                 hidden state between calls (a static or SAVE variable) or reads memory it was not \
                 given, so reads past the end of its inputs cannot be told apart"
                .into(),
        }
    }
}

/// The increment is the one the routine was told in `tc_call` (a check's increment 0, the
/// zero-increment look, tells it 1: "fault in increment 0 … (first in increment 1)" read as
/// two answers; a user-style sweep).
impl fmt::Display for GuardFinding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "the routine {} (first in a call told increment {} in tc_call{}; {} call{})",
            self.what(),
            self.increment,
            if self.complex { ", complex-step twin" } else { "" },
            self.calls,
            if self.calls == 1 { "" } else { "s" }
        )
    }
}

/// The findings of one routine, one per kind and array.
#[derive(Clone, Debug, Default)]
pub struct Findings {
    list: Vec<GuardFinding>,
    /// Calls the guards made besides the caller's (the reruns of the full level).
    pub extra_calls: u64,
}

impl Findings {
    pub fn list(&self) -> &[GuardFinding] {
        &self.list
    }

    pub fn take(&mut self) -> Vec<GuardFinding> {
        std::mem::take(&mut self.list)
    }

    /// Count a finding; the first of its kind and array is kept (and allocates).
    pub(super) fn record(&mut self, f: GuardFinding) {
        match self.list.iter_mut().find(|g| g.kind == f.kind && g.array == f.array) {
            Some(g) => g.calls += 1,
            None => self.list.push(f),
        }
    }
}

#[cfg(test)]
mod overrun_words {
    use super::*;
    use crate::memory_guards::{GuardedArray, ZONE};

    // A write that filled the whole guard zone may go further: "at least" (a write of 13 past
    // a zero-length state read "8 entries past the end"; a user-style sweep).
    #[test]
    fn a_full_guard_zone_reads_at_least() {
        let f = |entries| GuardFinding {
            kind: FindingKind::Overrun,
            array: GuardedArray::State,
            len: 0,
            first: 0,
            entries,
            ncomp: 6,
            increment: 1,
            complex: false,
            calls: 1,
        };
        assert!(
            f(ZONE).what().contains(&format!("at least {ZONE} entries past the end")),
            "{}",
            f(ZONE).what()
        );
        assert!(f(3).what().contains("(3 entries past the end changed)"), "{}", f(3).what());
    }
}
