//! Memory guards around every routine call: what a routine did to memory it was not meant to
//! touch, and what it left undone.
//!
//! With guards on, the routine never sees the caller's buffers. It gets copies laid out in one
//! block that [`GuardBuffers`] allocates when the routine is made, each array followed by a
//! zone of [`ZONE`] guard entries:
//!
//! ```text
//! props | zone | strain | zone | dstrain | zone | temp | zone | stress0 | zone | state0 | zone |
//! stress | zone | state | zone | tangent | zone | dstress_dtemp | zone | energy | zone
//! ```
//!
//! - The zones after the read-only arrays hold a poison value; after the outputs, a canary.
//!   A changed zone entry is a write past the end of that array ([`FindingKind::Overrun`]).
//! - The read-only copies are compared with the caller's inputs after the call
//!   ([`FindingKind::InputWritten`]); the call description (`tc_call`) too.
//! - The outputs are pre-filled with a signalling NaN (a bit pattern no arithmetic produces);
//!   entries that still hold it after a successful call were never written
//!   ([`FindingKind::Unwritten`]); in the complex-step twin, an entry either of whose parts
//!   still holds it. The tangent counts only when the call asked for it, and
//!   `dstress_dtemp` and `energy` only when the routine says it provides them.
//! - At [`GuardLevel::Full`] every call runs a second time with another poison value. When
//!   the results differ, the routine reads past the end of a read-only array: further calls
//!   with one zone changed at a time name the array ([`FindingKind::OverRead`]); a repeat with
//!   the first poison tells such a read from a routine that does not repeat itself
//!   ([`FindingKind::Unrepeatable`]).
//!
//! Findings are kept in a [`Findings`] list, one entry per kind and array, with the first
//! call that showed it and how many calls did. Nothing is allocated per call: the buffers are
//! made once, and a finding allocates only the first time it is seen.

use std::fmt;

mod buffers;
mod findings;
pub mod report;

pub(crate) use buffers::{positive, GuardBuffers, Moves, SweepArgs, SweepBlock};
pub use findings::{FindingKind, Findings, GuardFinding};

/// Guard entries after every array.
pub const ZONE: usize = 8;

/// Bytes of guard zone after the routine's report struct (after its message buffer).
pub const REPORT_ZONE: usize = 64;

/// Bit pattern of the signalling NaN the outputs are pre-filled with: exponent all ones,
/// quiet bit (51) clear, a nonzero payload. Arithmetic never produces a signalling NaN (an
/// operation on one gives a quiet NaN), so an entry holding exactly these bits after the call
/// was never written.
pub const PREFILL_BITS: u64 = 0x7FF4_0000_7C4E_C001;

/// Bit pattern of the canary after each output array: another signalling NaN.
pub const CANARY_BITS: u64 = 0x7FF2_C0DE_0BAD_F00D;

/// Poison after the read-only arrays in the first call, and in the rerun of the full level.
/// Finite, of different sign and size, so that a read of them changes any result that uses it.
pub const POISON: [f64; 2] = [3.75e5, -7.25e-3];

/// Byte written into the zone after the report struct.
pub(crate) const REPORT_CANARY: u8 = 0xA5;

/// How much checking every call gets.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub enum GuardLevel {
    /// No guards: the routine works on the caller's buffers directly.
    Off,
    /// Canaries after the outputs, poison zones after the inputs (writes to them), inputs
    /// compared after the call, outputs pre-filled with a signalling NaN. One call per call.
    #[default]
    Light,
    /// Light, and every call made twice with different poison, to find reads past the end of
    /// the read-only arrays. Twice the calls.
    Full,
}

impl GuardLevel {
    pub const ALL: [GuardLevel; 3] = [GuardLevel::Off, GuardLevel::Light, GuardLevel::Full];

    pub fn name(self) -> &'static str {
        match self {
            GuardLevel::Off => "off",
            GuardLevel::Light => "light",
            GuardLevel::Full => "full",
        }
    }

    pub fn from_name(s: &str) -> Result<GuardLevel, crate::error::SettingError> {
        GuardLevel::ALL
            .into_iter()
            .find(|l| l.name() == s)
            .ok_or_else(|| crate::error::SettingError::UnknownGuardLevel(s.into()))
    }
}

impl fmt::Display for GuardLevel {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// An array (or struct) of the routine ABI that a finding is about.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum GuardedArray {
    Props,
    Strain,
    Dstrain,
    Temp,
    Stress0,
    State0,
    Stress,
    State,
    Tangent,
    DstressDtemp,
    Energy,
    /// The `tc_report` struct (its message buffer is the last field).
    Report,
    /// The `tc_call` struct.
    Call,
}

/// The arrays in block order; the first [`N_INPUTS`] are read-only.
const ARRAYS: [GuardedArray; 11] = [
    GuardedArray::Props,
    GuardedArray::Strain,
    GuardedArray::Dstrain,
    GuardedArray::Temp,
    GuardedArray::Stress0,
    GuardedArray::State0,
    GuardedArray::Stress,
    GuardedArray::State,
    GuardedArray::Tangent,
    GuardedArray::DstressDtemp,
    GuardedArray::Energy,
];
const N_INPUTS: usize = 6;

impl GuardedArray {
    /// The argument's name in the routine ABI.
    pub fn name(self) -> &'static str {
        match self {
            GuardedArray::Props => "properties",
            GuardedArray::Strain => "strain",
            GuardedArray::Dstrain => "dstrain",
            GuardedArray::Temp => "temperature",
            GuardedArray::Stress0 => "stress0",
            GuardedArray::State0 => "state0",
            GuardedArray::Stress => "stress",
            GuardedArray::State => "state",
            GuardedArray::Tangent => "tangent",
            GuardedArray::DstressDtemp => "dstress_dtemp",
            GuardedArray::Energy => "energy",
            GuardedArray::Report => "report",
            GuardedArray::Call => "call",
        }
    }

    /// What `n` entries of it are, in words: "7 properties", "13 state variables".
    fn counted(self, n: usize) -> String {
        let (one, many) = match self {
            GuardedArray::Props => ("property", "properties"),
            GuardedArray::State0 | GuardedArray::State => ("state variable", "state variables"),
            GuardedArray::Strain => ("strain component", "strain components"),
            GuardedArray::Dstrain => ("strain-increment component", "strain-increment components"),
            GuardedArray::Temp => ("temperature value", "temperature values"),
            GuardedArray::Stress0 => ("start-stress component", "start-stress components"),
            GuardedArray::Stress => ("stress component", "stress components"),
            GuardedArray::Tangent => ("tangent entry", "tangent entries"),
            GuardedArray::DstressDtemp => ("dstress_dtemp entry", "dstress_dtemp entries"),
            GuardedArray::Energy => ("energy value", "energy values"),
            GuardedArray::Report => ("message byte", "message bytes"),
            GuardedArray::Call => ("field", "fields"),
        };
        format!("{n} {}", if n == 1 { one } else { many })
    }
}

#[cfg(test)]
mod tests {
    use num_complex::Complex64;

    use super::buffers::mismatch;
    use super::*;

    #[test]
    fn the_fill_patterns_are_signalling_nans() {
        for bits in [PREFILL_BITS, CANARY_BITS] {
            let v = f64::from_bits(bits);
            assert!(v.is_nan());
            assert_eq!(bits >> 52 & 0x7FF, 0x7FF, "exponent all ones");
            assert_eq!(bits >> 51 & 1, 0, "quiet bit clear: signalling");
            // Arithmetic quiets it: the result never has these bits.
            let r = std::hint::black_box(v) + 1.0;
            assert_ne!(r.to_bits(), bits);
        }
        assert_ne!(PREFILL_BITS, CANARY_BITS);
        assert!(POISON.iter().all(|p| p.is_finite()) && POISON[0] != POISON[1]);
    }

    #[test]
    fn the_block_has_a_zone_after_every_array() {
        let g = GuardBuffers::<f64>::new(6, 13, 7);
        assert_eq!(g.len, [7, 6, 6, 2, 6, 13, 6, 13, 36, 6, 2]);
        for k in 1..ARRAYS.len() {
            assert_eq!(g.start[k], g.start[k - 1] + g.len[k - 1] + ZONE);
        }
        assert_eq!(g.data.len(), g.start[10] + 2 + ZONE);
        // An empty array still has its zone.
        let g = GuardBuffers::<Complex64>::new(1, 0, 0);
        assert_eq!(g.start[1], ZONE);
    }

    #[test]
    fn mismatch_counts_and_finds_the_first() {
        assert_eq!(mismatch(&[1, 2, 3, 2], |_, v| v != 2), Some((1, 2)));
        assert_eq!(mismatch(&[1, 1], |_, v| v == 1), None);
    }

    #[test]
    fn findings_are_kept_once_per_kind_and_array() {
        let f = GuardFinding {
            kind: FindingKind::Unwritten,
            array: GuardedArray::Tangent,
            len: 36,
            first: 1,
            entries: 1,
            ncomp: 6,
            increment: 2,
            complex: false,
            calls: 1,
        };
        let mut all = Findings::default();
        all.record(f.clone());
        all.record(GuardFinding { increment: 3, first: 7, ..f.clone() });
        all.record(GuardFinding { array: GuardedArray::Stress, len: 6, ..f.clone() });
        assert_eq!(all.list().len(), 2);
        assert_eq!(all.list()[0].calls, 2);
        assert_eq!(all.list()[0].increment, 2, "the first occurrence is kept");
        let text = all.list()[0].to_string();
        assert!(text.starts_with("the routine left tangent[1] unwritten (row 2, column 1"), "{text}");
        assert!(text.ends_with("(first in a call told increment 2 in tc_call; 2 calls)"), "{text}");
        assert_eq!(all.take().len(), 2);
        assert!(all.list().is_empty());
    }

    #[test]
    fn levels_have_names() {
        for l in GuardLevel::ALL {
            assert_eq!(GuardLevel::from_name(l.name()), Ok(l));
        }
        assert!(GuardLevel::from_name("heavy").unwrap_err().to_string().contains("off, light or full"));
        assert_eq!(GuardLevel::default(), GuardLevel::Light);
    }
}
