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
//!   ([`FindingKind::Unwritten`]). The tangent counts only when the call asked for it, and
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

use std::ffi::c_char;
use std::fmt;

use num_complex::Complex64;
use tancheck_core::routine::provides;
use tancheck_core::{CallInput, CallOutput, Outcome};

use crate::signal_guard::{Crash, GuardArgs, TcCall};

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
const REPORT_CANARY: u8 = 0xA5;

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

    pub fn from_name(s: &str) -> Result<GuardLevel, String> {
        GuardLevel::ALL
            .into_iter()
            .find(|l| l.name() == s)
            .ok_or_else(|| format!("unknown guard level `{s}`; expected off, light or full"))
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
            GuardedArray::Props => "props",
            GuardedArray::Strain => "strain",
            GuardedArray::Dstrain => "dstrain",
            GuardedArray::Temp => "temp",
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
        match self.kind {
            FindingKind::Overrun if self.array == GuardedArray::Report => format!(
                "wrote past the end of report->message: byte {} of a {}-byte buffer (message \
                 text must fit in TC_MESSAGE_LEN bytes, NUL included)",
                self.first, self.len
            ),
            FindingKind::Overrun => format!(
                "wrote past the end of {a}: {a}[{}], but {a} has {}{}; check the loop bounds and \
                 the sizes ncomp, nstate and nprop of tc_call",
                self.first,
                self.array.counted(self.len),
                if self.entries > 1 {
                    format!(" ({} entries past the end changed)", self.entries)
                } else {
                    String::new()
                }
            ),
            FindingKind::InputWritten if self.array == GuardedArray::Call => {
                "wrote to its read-only call description (tc_call); it must only read it".into()
            }
            FindingKind::InputWritten => format!(
                "wrote to its read-only input {a}: {a}[{}] changed ({} of {}); inputs are const, \
                 copy them before changing them",
                self.first,
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
                    String::new()
                };
                format!(
                    "left {a}[{}] unwritten{at}: {} of {} never written in a successful call; \
                     outputs arrive filled with NaN and the routine must write every entry",
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

impl fmt::Display for GuardFinding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "the routine {} (first in increment {}{}; {} call{})",
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
    fn record(&mut self, f: GuardFinding) {
        match self.list.iter_mut().find(|g| g.kind == f.kind && g.array == f.array) {
            Some(g) => g.calls += 1,
            None => self.list.push(f),
        }
    }
}

/// An element of a guarded array: real or complex.
pub(crate) trait Element: Copy {
    const PREFILL: Self;
    const CANARY: Self;
    const POISON: [Self; 2];
    const QUIET_NAN: Self;
    /// Bitwise equality (NaN payloads included).
    fn same(self, other: Self) -> bool;
}

impl Element for f64 {
    const PREFILL: f64 = f64::from_bits(PREFILL_BITS);
    const CANARY: f64 = f64::from_bits(CANARY_BITS);
    const POISON: [f64; 2] = POISON;
    const QUIET_NAN: f64 = f64::NAN;
    fn same(self, other: f64) -> bool {
        self.to_bits() == other.to_bits()
    }
}

impl Element for Complex64 {
    const PREFILL: Complex64 = Complex64::new(f64::PREFILL, f64::PREFILL);
    const CANARY: Complex64 = Complex64::new(f64::CANARY, f64::CANARY);
    const POISON: [Complex64; 2] = [Complex64::new(POISON[0], 0.0), Complex64::new(POISON[1], 0.0)];
    const QUIET_NAN: Complex64 = Complex64::new(f64::NAN, f64::NAN);
    fn same(self, other: Complex64) -> bool {
        self.re.same(other.re) && self.im.same(other.im)
    }
}

/// The routine's report struct followed by its guard zone.
#[derive(Clone, Copy)]
#[repr(C)]
struct ReportZone {
    report: Outcome,
    zone: [u8; REPORT_ZONE],
}

/// The block of guarded copies for one element type, made once per routine.
pub(crate) struct GuardBuffers<E> {
    data: Vec<E>,
    /// Start of each array of [`ARRAYS`] in `data`; its zone follows its `len` entries.
    start: [usize; 11],
    len: [usize; 11],
    ncomp: usize,
    report: ReportZone,
    /// The caller's outcome as it was before the call (restored before a rerun).
    report_before: Outcome,
}

/// Where a guarded call is: what a finding records besides the array.
#[derive(Clone, Copy)]
struct CallPlace {
    increment: i32,
    complex: bool,
}

impl<E: Element> GuardBuffers<E> {
    /// Buffers for a routine with `ncomp` components, `nstate` state variables and `nprop`
    /// properties.
    pub(crate) fn new(ncomp: usize, nstate: usize, nprop: usize) -> Self {
        let len = [nprop, ncomp, ncomp, 2, ncomp, nstate, ncomp, nstate, ncomp * ncomp, ncomp, 2];
        let mut start = [0; 11];
        let mut at = 0;
        for (s, l) in start.iter_mut().zip(len) {
            *s = at;
            at += l + ZONE;
        }
        GuardBuffers {
            data: vec![E::PREFILL; at],
            start,
            len,
            ncomp,
            report: ReportZone { report: Outcome::default(), zone: [REPORT_CANARY; REPORT_ZONE] },
            report_before: Outcome::default(),
        }
    }

    fn array(&self, k: usize) -> &[E] {
        &self.data[self.start[k]..self.start[k] + self.len[k]]
    }

    fn zone(&self, k: usize) -> &[E] {
        let z = self.start[k] + self.len[k];
        &self.data[z..z + ZONE]
    }

    fn array_mut(&mut self, k: usize) -> &mut [E] {
        let s = self.start[k];
        &mut self.data[s..s + self.len[k]]
    }

    fn zone_mut(&mut self, k: usize) -> &mut [E] {
        let z = self.start[k] + self.len[k];
        &mut self.data[z..z + ZONE]
    }

    /// Copy the inputs in (poison `poison[k]` after input k), pre-fill the outputs and set
    /// the canaries.
    fn load(&mut self, input: &CallInput<'_, E>, poison: &[E; N_INPUTS]) {
        let inputs: [&[E]; N_INPUTS] =
            [input.props, input.strain, input.dstrain, &input.temp, input.stress0, input.state0];
        for (k, src) in inputs.iter().enumerate() {
            self.array_mut(k).copy_from_slice(src);
            self.zone_mut(k).fill(poison[k]);
        }
        for k in N_INPUTS..ARRAYS.len() {
            self.array_mut(k).fill(E::PREFILL);
            self.zone_mut(k).fill(E::CANARY);
        }
        self.report.report = self.report_before;
        self.report.zone = [REPORT_CANARY; REPORT_ZONE];
    }

    /// The arguments pointing into the block. `call` is the caller's copy of `tc_call`, which
    /// the routine might write to (it is compared afterwards).
    fn args(&mut self, call: *mut TcCall, label: *const c_char, fp_traps: bool) -> GuardArgs {
        let base = self.data.as_mut_ptr();
        // SAFETY: every start is within `data` (made from the same lengths), so each pointer
        // stays inside the allocation.
        let at = |k: usize| unsafe { base.add(self.start[k]) }.cast::<std::ffi::c_void>();
        GuardArgs {
            call: call.cast_const(),
            props: at(0),
            strain: at(1),
            dstrain: at(2),
            temp: at(3),
            stress0: at(4),
            state0: at(5),
            stress: at(6),
            state: at(7),
            tangent: at(8),
            dstress_dtemp: at(9),
            energy: at(10),
            report: std::ptr::from_mut(&mut self.report.report),
            label,
            fp_traps: i32::from(fp_traps),
            reserved: 0,
        }
    }

    /// Which outputs the routine had to write in this call: all but the tangent when it was
    /// not asked for, and the optional ones only when provided.
    fn required(&self, k: usize, want_tangent: bool) -> bool {
        let provided = self.report.report.provides;
        match ARRAYS[k] {
            GuardedArray::Tangent => want_tangent,
            GuardedArray::DstressDtemp => provided & provides::DSTRESS_DTEMP != 0,
            GuardedArray::Energy => provided & provides::ENERGY != 0,
            _ => true,
        }
    }

    /// The light checks of the call just made.
    fn inspect(
        &self,
        input: &CallInput<'_, E>,
        call_before: &TcCall,
        call_after: &TcCall,
        poison: &[E; N_INPUTS],
        place: CallPlace,
        findings: &mut Findings,
    ) {
        let finding = |kind, k: usize, first, entries| GuardFinding {
            kind,
            array: ARRAYS[k],
            len: self.len[k],
            first,
            entries,
            ncomp: self.ncomp,
            increment: place.increment,
            complex: place.complex,
            calls: 1,
        };
        let inputs: [&[E]; N_INPUTS] =
            [input.props, input.strain, input.dstrain, &input.temp, input.stress0, input.state0];
        for (k, original) in inputs.iter().enumerate() {
            if let Some((first, n)) = mismatch(self.array(k), |i, v| v.same(original[i])) {
                findings.record(finding(FindingKind::InputWritten, k, first, n));
            }
            if let Some((first, n)) = mismatch(self.zone(k), |_, v| v.same(poison[k])) {
                findings.record(finding(FindingKind::Overrun, k, self.len[k] + first, n));
            }
        }
        let ok = self.report.report.status == tancheck_core::routine::status::OK;
        for k in N_INPUTS..ARRAYS.len() {
            if let Some((first, n)) = mismatch(self.zone(k), |_, v| v.same(E::CANARY)) {
                findings.record(finding(FindingKind::Overrun, k, self.len[k] + first, n));
            }
            if ok && self.required(k, input.want_tangent) {
                if let Some((first, n)) = mismatch(self.array(k), |_, v| !v.same(E::PREFILL)) {
                    findings.record(finding(FindingKind::Unwritten, k, first, n));
                }
            }
        }
        if let Some(first) = self.report.zone.iter().position(|&b| b != REPORT_CANARY) {
            let n = self.report.zone.iter().filter(|&&b| b != REPORT_CANARY).count();
            findings.record(GuardFinding {
                kind: FindingKind::Overrun,
                array: GuardedArray::Report,
                len: tancheck_core::routine::MESSAGE_LEN,
                first: tancheck_core::routine::MESSAGE_LEN + first,
                entries: n,
                ncomp: self.ncomp,
                increment: place.increment,
                complex: place.complex,
                calls: 1,
            });
        }
        if !same_call(call_before, call_after) {
            findings.record(GuardFinding {
                kind: FindingKind::InputWritten,
                array: GuardedArray::Call,
                len: 0,
                first: 0,
                entries: 1,
                ncomp: self.ncomp,
                increment: place.increment,
                complex: place.complex,
                calls: 1,
            });
        }
    }

    /// Copy the outputs to the caller; never-written entries become a quiet NaN.
    fn store(&self, output: &mut CallOutput<'_, E>) {
        let quiet = |v: E| if v.same(E::PREFILL) { E::QUIET_NAN } else { v };
        let outs: [&mut [E]; 5] = [
            &mut *output.stress,
            &mut *output.state,
            &mut *output.tangent,
            &mut *output.dstress_dtemp,
            &mut output.energy[..],
        ];
        for (k, dst) in outs.into_iter().enumerate() {
            for (d, &s) in dst.iter_mut().zip(self.array(N_INPUTS + k)) {
                *d = quiet(s);
            }
        }
        *output.outcome = self.report.report;
    }

    /// Whether the call just made gave other results than those stored in `output`.
    fn differs(&self, output: &CallOutput<'_, E>, want_tangent: bool) -> bool {
        let quiet = |v: E| if v.same(E::PREFILL) { E::QUIET_NAN } else { v };
        let r = &self.report.report;
        let o = &*output.outcome;
        if r.status != o.status
            || r.branch != o.branch
            || r.provides != o.provides
            || r.step_ratio.to_bits() != o.step_ratio.to_bits()
            || r.message != o.message
        {
            return true;
        }
        let outs: [&[E]; 5] =
            [&*output.stress, &*output.state, &*output.tangent, &*output.dstress_dtemp, &output.energy[..]];
        outs.iter().enumerate().any(|(k, stored)| {
            let k = N_INPUTS + k;
            let compared = ARRAYS[k] != GuardedArray::Tangent || want_tangent;
            compared && self.array(k).iter().zip(stored.iter()).any(|(&a, &b)| !quiet(a).same(b))
        })
    }

    /// One guarded call: load, call through `invoke`, check, store; at the full level the
    /// reruns. A crash in the first call ends it with that crash.
    #[allow(clippy::too_many_arguments)] // one call's whole context; a struct would only repackage it
    pub(crate) fn call(
        &mut self,
        level: GuardLevel,
        call: &TcCall,
        label: *const c_char,
        fp_traps: bool,
        complex: bool,
        input: &CallInput<'_, E>,
        output: &mut CallOutput<'_, E>,
        findings: &mut Findings,
        mut invoke: impl FnMut(&GuardArgs) -> Result<(), Crash>,
    ) -> Result<(), Crash> {
        let place = CallPlace { increment: input.increment, complex };
        let ncomp = self.ncomp;
        let first = [E::POISON[0]; N_INPUTS];
        self.report_before = *output.outcome;
        let mut made = *call;
        self.load(input, &first);
        let args = self.args(&raw mut made, label, fp_traps);
        invoke(&args)?;
        self.inspect(input, call, &made, &first, place, findings);
        self.store(output);
        if level != GuardLevel::Full {
            return Ok(());
        }

        // The rerun: every poison zone changed at once. Only when the results differ are the
        // zones tried one at a time (the failure path).
        let mut rerun = |this: &mut Self, poison: &[E; N_INPUTS], findings: &mut Findings| -> bool {
            findings.extra_calls += 1;
            made = *call;
            this.load(input, poison);
            let args = this.args(&raw mut made, label, fp_traps);
            invoke(&args).is_err() || this.differs(output, input.want_tangent)
        };
        if !rerun(self, &[E::POISON[1]; N_INPUTS], findings) {
            return Ok(());
        }
        let finding = |kind, array, len| GuardFinding {
            kind,
            array,
            len,
            first: len,
            entries: 1,
            ncomp,
            increment: place.increment,
            complex,
            calls: 1,
        };
        if rerun(self, &first, findings) {
            findings.record(finding(FindingKind::Unrepeatable, GuardedArray::Call, 0));
            return Ok(());
        }
        let mut named = false;
        for k in 0..N_INPUTS {
            let mut one = first;
            one[k] = E::POISON[1];
            if rerun(self, &one, findings) {
                let len = self.len[k];
                findings.record(finding(FindingKind::OverRead, ARRAYS[k], len));
                named = true;
            }
        }
        if !named {
            // Only all zones together change the results: no single array to name.
            findings.record(finding(FindingKind::Unrepeatable, GuardedArray::Call, 0));
        }
        Ok(())
    }
}

/// The first index where `ok` fails, and how many entries fail.
fn mismatch<E: Copy>(values: &[E], ok: impl Fn(usize, E) -> bool) -> Option<(usize, usize)> {
    let mut first = None;
    let mut n = 0;
    for (i, &v) in values.iter().enumerate() {
        if !ok(i, v) {
            first.get_or_insert(i);
            n += 1;
        }
    }
    first.map(|f| (f, n))
}

fn same_call(a: &TcCall, b: &TcCall) -> bool {
    a.abi_version == b.abi_version
        && a.ncomp == b.ncomp
        && a.nstate == b.nstate
        && a.nprop == b.nprop
        && a.increment == b.increment
        && a.flags == b.flags
        && a.time.to_bits() == b.time.to_bits()
        && a.dtime.to_bits() == b.dtime.to_bits()
}

#[cfg(test)]
mod tests {
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
        assert!(text.ends_with("(first in increment 2; 2 calls)"), "{text}");
        assert_eq!(all.take().len(), 2);
        assert!(all.list().is_empty());
    }

    #[test]
    fn levels_have_names() {
        for l in GuardLevel::ALL {
            assert_eq!(GuardLevel::from_name(l.name()), Ok(l));
        }
        assert!(GuardLevel::from_name("heavy").unwrap_err().contains("off, light or full"));
        assert_eq!(GuardLevel::default(), GuardLevel::Light);
    }
}
