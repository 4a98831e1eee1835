//! The guarded block itself: copying a call's arrays into it between fill patterns, making the
//! call, and checking zones, inputs and outputs afterwards.

use std::ffi::c_char;

use num_complex::Complex64;
use tancheck_core::routine::provides;
use tancheck_core::{CallInput, CallOutput, Outcome};

use crate::signal_guard::{Crash, GuardArgs, TcCall};

use super::*;

/// An element of a guarded array: real or complex.
///
/// # Safety
/// An implementing type is made of f64 only (one or more, `repr(C)` or a plain f64), without
/// padding: [`Element::bits`] reads its bytes as u64 words.
pub(crate) unsafe trait Element: Copy {
    const PREFILL: Self;
    const CANARY: Self;
    const POISON: [Self; 2];
    const QUIET_NAN: Self;
    /// Bitwise equality (NaN payloads included).
    fn same(self, other: Self) -> bool;
    /// Zero exactly when [`Element::same`] holds (the bits that differ).
    fn differ(self, other: Self) -> u64;
    /// Whether the entry was never written: it still holds the pre-fill's bits; for a complex
    /// entry, either half does (a twin that writes only the real or only the imaginary part
    /// of an output leaves the other half unwritten).
    fn unwritten(self) -> bool;
    /// The bits of `values`, 64 at a time (an element is one or two f64 without padding), so
    /// that two arrays compare bit for bit on these.
    fn bits(values: &[Self]) -> &[u64] {
        const { assert!(std::mem::size_of::<Self>() % 8 == 0 && std::mem::align_of::<Self>() >= 8) };
        // SAFETY: `Self` is made of f64 only, without padding (the trait's contract), and
        // aligned at least as u64: the bytes of `values` are valid u64s.
        unsafe {
            std::slice::from_raw_parts(values.as_ptr().cast::<u64>(), std::mem::size_of_val(values) / 8)
        }
    }
}

// SAFETY: one f64.
unsafe impl Element for f64 {
    const PREFILL: f64 = f64::from_bits(PREFILL_BITS);
    const CANARY: f64 = f64::from_bits(CANARY_BITS);
    const POISON: [f64; 2] = POISON;
    const QUIET_NAN: f64 = f64::NAN;
    fn same(self, other: f64) -> bool {
        self.to_bits() == other.to_bits()
    }
    fn differ(self, other: f64) -> u64 {
        self.to_bits() ^ other.to_bits()
    }
    fn unwritten(self) -> bool {
        self.to_bits() == PREFILL_BITS
    }
}

// SAFETY: `Complex64` is `repr(C)` with two f64 fields, no padding.
unsafe impl Element for Complex64 {
    const PREFILL: Complex64 = Complex64::new(f64::PREFILL, f64::PREFILL);
    const CANARY: Complex64 = Complex64::new(f64::CANARY, f64::CANARY);
    const POISON: [Complex64; 2] = [Complex64::new(POISON[0], 0.0), Complex64::new(POISON[1], 0.0)];
    const QUIET_NAN: Complex64 = Complex64::new(f64::NAN, f64::NAN);
    fn same(self, other: Complex64) -> bool {
        self.re.same(other.re) && self.im.same(other.im)
    }
    fn differ(self, other: Complex64) -> u64 {
        self.re.differ(other.re) | self.im.differ(other.im)
    }
    fn unwritten(self) -> bool {
        self.re.unwritten() || self.im.unwritten()
    }
}

/// A call's read-only arrays in block order (the first [`N_INPUTS`] of [`ARRAYS`]).
fn inputs<'a, E>(input: &'a CallInput<'_, E>) -> [&'a [E]; N_INPUTS] {
    [input.props, input.strain, input.dstrain, &input.temp, input.stress0, input.state0]
}

/// The pattern of zone k as a first call loads it: the first poison after a read-only array,
/// the canary after an output.
fn first_pattern<E: Element>(k: usize) -> E {
    if k < N_INPUTS {
        E::POISON[0]
    } else {
        E::CANARY
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
    pub(super) data: Vec<E>,
    /// Start of each array of [`ARRAYS`] in `data`; its zone follows its `len` entries.
    pub(super) start: [usize; 11],
    pub(super) len: [usize; 11],
    ncomp: usize,
    report: ReportZone,
    /// The caller's outcome as it was before the call (restored before a rerun).
    report_before: Outcome,
    /// The block as a first call loads it, but for the inputs: the first poison after each
    /// input, canaries after each output and pre-filled outputs (the input regions hold the
    /// pre-fill and are always overwritten). A load after a call that was not clean (see
    /// `clean`) restores the block from it before writing the inputs.
    image: Vec<E>,
    /// Whether `data` holds the zones and pre-filled outputs as [`GuardBuffers::load_first`]
    /// leaves them apart from the outputs the last call wrote: the last call was a first-poison
    /// call whose checks found every input, zone and the report's zone untouched. Then the next
    /// load writes the inputs and pre-fills the outputs in place, without restoring the block.
    clean: bool,
    /// The block as loaded for a sweep (see `sweep`), made once with the block.
    snapshot: Vec<E>,
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
        let mut image = vec![E::PREFILL; at];
        for k in 0..ARRAYS.len() {
            let (s, l) = (start[k], len[k]);
            image[s + l..s + l + ZONE].fill(first_pattern(k));
        }
        GuardBuffers {
            data: image.clone(),
            start,
            len,
            ncomp,
            report: ReportZone { report: Outcome::default(), zone: [REPORT_CANARY; REPORT_ZONE] },
            report_before: Outcome::default(),
            snapshot: image.clone(),
            image,
            clean: false,
        }
    }

    /// [`GuardBuffers::load`] with the first poison. After a clean call (see `clean`) only the
    /// inputs are written and the outputs pre-filled, in place; otherwise the block is first
    /// restored from its image. A tangent the call does not ask for is pre-filled too (a
    /// routine that reads it without forming it gets the signalling NaN, not the tangent an
    /// earlier call left), but neither checked nor copied back.
    fn load_first(&mut self, input: &CallInput<'_, E>) {
        if !self.clean {
            self.data.copy_from_slice(&self.image);
        }
        for (k, src) in inputs(input).iter().enumerate() {
            self.array_mut(k).copy_from_slice(src);
        }
        if self.clean {
            for k in N_INPUTS..ARRAYS.len() {
                self.array_mut(k).fill(E::PREFILL);
            }
        }
        self.report.report = self.report_before;
        self.report.zone = [REPORT_CANARY; REPORT_ZONE];
    }

    /// Whether the inputs and every zone are as [`GuardBuffers::load_first`] left them: each
    /// input equal to the caller's, bit for bit, each zone holding its pattern (the first
    /// poison after an input, the canary after an output), the report's zone its canary
    /// bytes. One branch-free pass of bit differences per array (no call, no early exit: on
    /// arrays this short it measured faster than slice equality, which calls `memcmp`).
    fn as_loaded(&self, input: &CallInput<'_, E>) -> bool {
        let differ = |a: &[E], b: &[E]| {
            let (a, b) = (E::bits(a), E::bits(b));
            a.iter().zip(b).fold((a.len() ^ b.len()) as u64, |acc, (x, y)| acc | (x ^ y))
        };
        // A zone as a fixed-size array, so that its comparison is unrolled.
        let zone_differs = |k: usize, v: E| {
            let z: &[E; ZONE] = self.zone(k).try_into().expect("a zone has ZONE entries");
            z.iter().fold(0, |a, &x| a | x.differ(v))
        };
        let mut acc = 0u64;
        for (k, original) in inputs(input).iter().enumerate() {
            acc |= differ(self.array(k), original);
        }
        for k in 0..ARRAYS.len() {
            acc |= zone_differs(k, first_pattern(k));
        }
        let canary = u64::from_ne_bytes([REPORT_CANARY; 8]);
        acc |= self
            .report
            .zone
            .chunks_exact(8)
            .fold(0, |a, c| a | (u64::from_ne_bytes(c.try_into().expect("eight bytes")) ^ canary));
        acc == 0
    }

    /// Which outputs hold an unwritten entry (bit k − [`N_INPUTS`] for array k; see
    /// [`Element::unwritten`]); a tangent the call did not ask for is left out (it is neither
    /// checked nor copied back). An array is first looked at for a word whose exponent bits
    /// are all set (a NaN or an infinity) in one branch-free pass of integer operations (a
    /// floating-point comparison would raise the invalid-operation flag on the signalling
    /// pre-fill); only such an array is searched for the pre-fill's bits.
    fn prefilled(&self, want_tangent: bool) -> u32 {
        const EXPONENT: u64 = 0x7FF0_0000_0000_0000;
        (N_INPUTS..ARRAYS.len()).fold(0, |m, k| {
            if ARRAYS[k] == GuardedArray::Tangent && !want_tangent {
                return m;
            }
            let a = E::bits(self.array(k));
            // The exponent plus one in its lowest bit carries into bit 63 exactly when the
            // exponent is all ones.
            let special = a.iter().fold(0u64, |acc, &w| acc | ((w & EXPONENT) + (1 << 52))) >> 63;
            // Any half of a complex entry with the pre-fill's bits (see `Element::unwritten`).
            let any = special != 0 && a.contains(&PREFILL_BITS);
            m | (u32::from(any) << (k - N_INPUTS))
        })
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
        for (k, src) in inputs(input).iter().enumerate() {
            self.array_mut(k).copy_from_slice(src);
            self.zone_mut(k).fill(poison[k]);
        }
        for k in N_INPUTS..ARRAYS.len() {
            // A tangent the call does not ask for is pre-filled too (see `load_first`).
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

    /// The light checks of the call just made. `loaded` is [`GuardBuffers::as_loaded`] (when
    /// it holds, no input, zone or report zone needs a closer look) and `prefilled` is
    /// [`GuardBuffers::prefilled`].
    #[allow(clippy::too_many_arguments)] // one call's whole context; a struct would only repackage it
    fn inspect(
        &self,
        input: &CallInput<'_, E>,
        call_before: &TcCall,
        call_after: &TcCall,
        loaded: bool,
        prefilled: u32,
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
        if !loaded {
            self.inspect_zones(input, place, findings, &finding);
        }
        let ok = self.report.report.status == tancheck_core::routine::status::OK;
        if ok && prefilled != 0 {
            for k in N_INPUTS..ARRAYS.len() {
                if prefilled & (1 << (k - N_INPUTS)) != 0 && self.required(k, input.want_tangent) {
                    if let Some((first, n)) = mismatch(self.array(k), |_, v| !v.unwritten()) {
                        findings.record(finding(FindingKind::Unwritten, k, first, n));
                    }
                }
            }
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

    /// The inputs, zones and report zone entry by entry, when [`GuardBuffers::as_loaded`]
    /// found a difference somewhere: a finding for each array that changed.
    #[cold]
    fn inspect_zones(
        &self,
        input: &CallInput<'_, E>,
        place: CallPlace,
        findings: &mut Findings,
        finding: &impl Fn(FindingKind, usize, usize, usize) -> GuardFinding,
    ) {
        let originals = inputs(input);
        // Per array, the read-only copy before its zone (the order findings are recorded in).
        for k in 0..ARRAYS.len() {
            if let Some(original) = originals.get(k) {
                if let Some((first, n)) = mismatch(self.array(k), |i, v| v.same(original[i])) {
                    findings.record(finding(FindingKind::InputWritten, k, first, n));
                }
            }
            let pattern = first_pattern::<E>(k);
            if let Some((first, n)) = mismatch(self.zone(k), |_, v| v.same(pattern)) {
                findings.record(finding(FindingKind::Overrun, k, self.len[k] + first, n));
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
    }

    /// Copy the outputs to the caller; never-written entries become a quiet NaN (an array
    /// without pre-fill entries, as `prefilled` says, is copied as it is). A tangent the call
    /// did not ask for stays as the caller left it (see `Caller::call`).
    fn store(&self, output: &mut CallOutput<'_, E>, want_tangent: bool, prefilled: u32) {
        let quiet = |v: E| if v.unwritten() { E::QUIET_NAN } else { v };
        let outs: [&mut [E]; 5] = [
            &mut *output.stress,
            &mut *output.state,
            &mut *output.tangent,
            &mut *output.dstress_dtemp,
            &mut output.energy[..],
        ];
        for (k, dst) in outs.into_iter().enumerate() {
            if ARRAYS[N_INPUTS + k] == GuardedArray::Tangent && !want_tangent {
                continue;
            }
            let src = self.array(N_INPUTS + k);
            if prefilled & (1 << k) == 0 {
                dst.copy_from_slice(src);
            } else {
                for (d, &s) in dst.iter_mut().zip(src) {
                    *d = quiet(s);
                }
            }
        }
        *output.outcome = self.report.report;
    }

    /// Whether the call just made gave other results than those stored in `output`.
    fn differs(&self, output: &CallOutput<'_, E>, want_tangent: bool) -> bool {
        let quiet = |v: E| if v.unwritten() { E::QUIET_NAN } else { v };
        let r = &self.report.report;
        let o = &*output.outcome;
        if r.status != o.status
            || r.branch != o.branch
            || r.provides != o.provides
            || r.largest_fraction.to_bits() != o.largest_fraction.to_bits()
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
        self.load_first(input);
        // Until the checks below find the block as loaded, the next load restores it.
        self.clean = false;
        let args = self.args(&raw mut made, label, fp_traps);
        invoke(&args)?;
        let loaded = self.as_loaded(input);
        let prefilled = self.prefilled(input.want_tangent);
        self.inspect(input, call, &made, loaded, prefilled, place, findings);
        self.store(output, input.want_tangent, prefilled);
        if level != GuardLevel::Full {
            self.clean = loaded;
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
pub(super) fn mismatch<E: Copy>(values: &[E], ok: impl Fn(usize, E) -> bool) -> Option<(usize, usize)> {
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
        && a.nproperties == b.nproperties
        && a.increment == b.increment
        && a.flags == b.flags
        && a.time.to_bits() == b.time.to_bits()
        && a.dtime.to_bits() == b.dtime.to_bits()
}

mod sweep;
pub(crate) use sweep::{positive, Moves, SweepArgs, SweepBlock};

#[cfg(test)]
mod tests;
