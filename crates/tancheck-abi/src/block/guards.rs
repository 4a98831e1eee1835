//! Memory guards of block calls: the routine works on copies laid out in one buffer made
//! with the routine (grown only when a block larger than any before arrives), each array
//! followed by a zone. After the call: zones after the inputs must still hold the poison and
//! zones after the outputs the canary (a write past the end), the inputs must equal the
//! caller's (a write to a read-only input), and in a successful call no output may still hold
//! the signalling NaN it arrived with (an output left unwritten). The first finding of a kind
//! and array ends the call with `Fault::Misbehaved`. At the full guard level every call runs
//! again with the other poison after the read-only arrays: when the outputs change, the routine
//! reads past the end of one of them, and calls with one zone changed at a time name it (a
//! repeat with the first poison tells this from a routine that does not repeat itself).

use num_complex::Complex64;
use tancheck_core::block::{BlockCall, BlockInput, BlockOutcome, BlockOutput, Conditions, SpecificEnergy};

use crate::memory_guards::{CANARY_BITS, POISON, PREFILL_BITS, ZONE};

/// Value of an unwritten `deleted` entry and of the zone after it.
const DELETED_PREFILL: i32 = 0x5A5A_1D1D;
const DELETED_CANARY: i32 = 0x7C7C_2E2E;
/// Bytes of zone after the report.
const REPORT_ZONE: usize = 64;
const REPORT_CANARY: u8 = 0xA5;

/// An element type of the block arrays: f64 or Complex64.
pub(crate) trait Element: Copy {
    fn fill(bits: u64) -> Self;
    /// The poison after the read-only arrays: one of two values (`which` 0 or 1).
    fn poison_of(which: usize) -> Self;
    fn poison() -> Self {
        Self::poison_of(0)
    }
    fn same(a: Self, b: Self) -> bool;
}

impl Element for f64 {
    fn fill(bits: u64) -> Self {
        f64::from_bits(bits)
    }
    fn poison_of(which: usize) -> Self {
        POISON[which & 1]
    }
    fn same(a: Self, b: Self) -> bool {
        a.to_bits() == b.to_bits()
    }
}

impl Element for Complex64 {
    fn fill(bits: u64) -> Self {
        Complex64::new(f64::from_bits(bits), f64::from_bits(bits))
    }
    fn poison_of(which: usize) -> Self {
        Complex64::new(POISON[which & 1], POISON[1 - (which & 1)])
    }
    fn same(a: Self, b: Self) -> bool {
        a.re.to_bits() == b.re.to_bits() && a.im.to_bits() == b.im.to_bits()
    }
}

/// The arrays of a block call, in buffer order; the first six are read-only.
pub(crate) const NAMES: [&str; 9] = [
    "properties",
    "strain",
    "strain_increment",
    "stress_start",
    "state_start",
    "energy_start",
    "stress",
    "state",
    "energy",
];
pub(crate) const N_INPUTS: usize = 6;

#[repr(C)]
struct GuardedReport {
    report: BlockOutcome,
    zone: [u8; REPORT_ZONE],
}

/// The guarded copies of one call's arrays.
pub(crate) struct BlockGuards<S> {
    data: Vec<S>,
    start: [usize; 9],
    len: [usize; 9],
    conditions: Vec<Conditions>,
    deleted: Vec<i32>,
    report: Box<GuardedReport>,
    npoints: usize,
    /// Which poison each read-only zone holds in this call (index 6: the conditions').
    poison: [usize; N_INPUTS + 1],
    /// The outputs of the first call at the full level, to compare the reruns with.
    saved: Vec<S>,
    saved_deleted: Vec<i32>,
}

fn poison_conditions(which: usize) -> Conditions {
    let (a, b) = (POISON[which & 1], POISON[1 - (which & 1)]);
    Conditions { temperature: a, temperature_increment: b, density: a, characteristic_length: b }
}

/// First index where `ok` fails, and how many do.
fn mismatch<T: Copy>(v: &[T], ok: impl Fn(T) -> bool) -> Option<(usize, usize)> {
    let mut first = None;
    let mut count = 0;
    for (i, &x) in v.iter().enumerate() {
        if !ok(x) {
            first.get_or_insert(i);
            count += 1;
        }
    }
    first.map(|f| (f, count))
}

impl<S: Element> BlockGuards<S> {
    pub(crate) fn new() -> Self {
        BlockGuards {
            data: Vec::new(),
            start: [0; 9],
            len: [0; 9],
            conditions: Vec::new(),
            deleted: Vec::new(),
            report: Box::new(GuardedReport {
                report: BlockOutcome::default(),
                zone: [REPORT_CANARY; REPORT_ZONE],
            }),
            npoints: 0,
            poison: [0; N_INPUTS + 1],
            saved: Vec::new(),
            saved_deleted: Vec::new(),
        }
    }

    /// The poison of the next `load`: `which` after every read-only array, or after the one
    /// array `only` (an index of [`NAMES`] below 6, or 6 for the conditions) and the first
    /// poison elsewhere.
    pub(crate) fn set_poison(&mut self, which: usize, only: Option<usize>) {
        match only {
            None => self.poison = [which; N_INPUTS + 1],
            Some(k) => {
                self.poison = [0; N_INPUTS + 1];
                self.poison[k] = which;
            }
        }
    }

    /// The outputs of this call, bit for bit: kept (`save`) or compared with those kept.
    fn outputs(&self) -> (&[S], &[i32]) {
        (&self.data[self.start[6]..self.start[8] + self.len[8]], &self.deleted[..self.npoints])
    }

    pub(crate) fn save(&mut self) {
        let end = self.start[8] + self.len[8];
        self.saved.clear();
        self.saved.extend_from_slice(&self.data[self.start[6]..end]);
        self.saved_deleted.clear();
        self.saved_deleted.extend_from_slice(&self.deleted[..self.npoints]);
    }

    pub(crate) fn same_as_saved(&self) -> bool {
        let (v, d) = self.outputs();
        v.len() == self.saved.len()
            && v.iter().zip(&self.saved).all(|(a, b)| S::same(*a, *b))
            && d == self.saved_deleted
    }

    /// Lay the buffer out for `lens` (allocates only when it grows).
    fn layout(&mut self, lens: [usize; 9], npoints: usize) {
        let mut at = 0;
        for (k, &len) in lens.iter().enumerate() {
            self.start[k] = at;
            self.len[k] = len;
            at += len + ZONE;
        }
        if self.data.len() < at {
            self.data.resize(at, S::poison());
        }
        if self.conditions.len() < npoints + ZONE {
            self.conditions.resize(npoints + ZONE, poison_conditions(0));
            self.deleted.resize(npoints + ZONE, DELETED_CANARY);
        }
        self.npoints = npoints;
    }

    fn slot(&mut self, k: usize) -> &mut [S] {
        &mut self.data[self.start[k]..self.start[k] + self.len[k]]
    }

    fn zone(&self, k: usize) -> &[S] {
        let e = self.start[k] + self.len[k];
        &self.data[e..e + ZONE]
    }

    /// Copy the inputs in, pre-fill the outputs, set the zones. Returns the pointers.
    pub(crate) fn load(
        &mut self,
        i: &BlockInput<'_, S>,
        o: &BlockOutput<'_, S>,
    ) -> super::call::BlockGuardArgs {
        let n = i.npoints();
        let energy = |e: &[SpecificEnergy<S>]| 2 * e.len();
        let lens = [
            i.properties.len(),
            i.strain.len(),
            i.strain_increment.len(),
            i.stress_start.len(),
            i.state_start.len(),
            energy(i.energy_start),
            o.stress.len(),
            o.state.len(),
            energy(o.energy),
        ];
        self.layout(lens, n);
        let inputs: [&[S]; 5] = [i.properties, i.strain, i.strain_increment, i.stress_start, i.state_start];
        for (k, v) in inputs.into_iter().enumerate() {
            self.slot(k).copy_from_slice(v);
        }
        for (p, e) in i.energy_start.iter().enumerate() {
            let s = self.start[5];
            self.data[s + 2 * p] = e.internal;
            self.data[s + 2 * p + 1] = e.dissipated;
        }
        for k in 0..9 {
            let e = self.start[k] + self.len[k];
            let z = if k < N_INPUTS { S::poison_of(self.poison[k]) } else { S::fill(CANARY_BITS) };
            self.data[e..e + ZONE].fill(z);
            if k >= N_INPUTS {
                self.slot(k).fill(S::fill(PREFILL_BITS));
            }
        }
        self.conditions[..n].copy_from_slice(i.conditions);
        self.conditions[n..n + ZONE].fill(poison_conditions(self.poison[N_INPUTS]));
        self.deleted[..n].fill(DELETED_PREFILL);
        self.deleted[n..n + ZONE].fill(DELETED_CANARY);
        self.report.report = *o.outcome;
        self.report.zone = [REPORT_CANARY; REPORT_ZONE];
        let base = self.data.as_mut_ptr();
        let at = |k: usize| base.wrapping_add(self.start[k]).cast::<std::ffi::c_void>();
        super::call::BlockGuardArgs {
            block: std::ptr::null(),
            properties: at(0),
            strain: at(1),
            strain_increment: at(2),
            stress_start: at(3),
            state_start: at(4),
            energy_start: at(5),
            conditions: self.conditions.as_ptr(),
            stress: at(6),
            state: at(7),
            energy: at(8),
            deleted: self.deleted.as_mut_ptr(),
            report: std::ptr::from_mut(&mut self.report.report),
            label: std::ptr::null(),
            fp_traps: 0,
            reserved: 0,
        }
    }

    /// After the call: the first misbehaviour in words (allocates only then), and the outputs
    /// copied back to the caller.
    pub(crate) fn unload(
        &self,
        i: &BlockInput<'_, S>,
        o: &mut BlockOutput<'_, S>,
        call: &BlockCall,
        sent: &BlockCall,
    ) -> Option<String> {
        let n = self.npoints;
        *o.outcome = self.report.report;
        // Outputs back, whatever happened (the caller decides what to trust).
        let s6 = self.start[6];
        o.stress.copy_from_slice(&self.data[s6..s6 + self.len[6]]);
        let s7 = self.start[7];
        o.state.copy_from_slice(&self.data[s7..s7 + self.len[7]]);
        let s8 = self.start[8];
        for (p, e) in o.energy.iter_mut().enumerate() {
            e.internal = self.data[s8 + 2 * p];
            e.dissipated = self.data[s8 + 2 * p + 1];
        }
        o.deleted.copy_from_slice(&self.deleted[..n]);

        if call != sent {
            return Some("wrote to its read-only block description (tc_block); it must only read it".into());
        }
        for (k, name) in NAMES.iter().enumerate() {
            let z = if k < N_INPUTS { S::poison_of(self.poison[k]) } else { S::fill(CANARY_BITS) };
            if let Some((f, c)) = mismatch(self.zone(k), |x| S::same(x, z)) {
                return Some(overrun(name, self.len[k], f, c));
            }
        }
        if self.deleted[n..n + ZONE].iter().any(|&d| d != DELETED_CANARY) {
            return Some(overrun("deleted", n, 0, 1));
        }
        if self.conditions[n..n + ZONE].iter().any(|c| c != &poison_conditions(self.poison[N_INPUTS])) {
            return Some(overrun("conditions", n, 0, 1));
        }
        if self.report.zone.iter().any(|&b| b != REPORT_CANARY) {
            return Some(
                "wrote past the end of report->message (text must fit in TC_BLOCK_MESSAGE_LEN bytes, NUL \
                 included)"
                    .into(),
            );
        }
        let inputs: [&[S]; 5] = [i.properties, i.strain, i.strain_increment, i.stress_start, i.state_start];
        for (k, v) in inputs.into_iter().enumerate() {
            let s = self.start[k];
            let copy = &self.data[s..s + v.len()];
            if let Some(j) = (0..v.len()).find(|&j| !S::same(copy[j], v[j])) {
                return Some(format!("wrote to its read-only input {}: {}[{j}] changed", NAMES[k], NAMES[k]));
            }
        }
        if self.conditions[..n] != *i.conditions {
            return Some("wrote to its read-only input conditions".into());
        }
        if o.outcome.status == tancheck_core::block::block_status::OK {
            let fill = S::fill(PREFILL_BITS);
            for (k, name) in NAMES.iter().enumerate().skip(N_INPUTS) {
                let s = self.start[k];
                if let Some((f, c)) = mismatch(&self.data[s..s + self.len[k]], |x| !S::same(x, fill)) {
                    return Some(format!(
                        "left {name}[{f}] unwritten ({c} of {} entries) in a successful call; outputs \
                         arrive filled with NaN and the routine must write every entry of every point",
                        self.len[k]
                    ));
                }
            }
            if let Some((f, _)) = mismatch(&self.deleted[..n], |d| d != DELETED_PREFILL) {
                return Some(format!("left deleted[{f}] unwritten in a successful call"));
            }
        }
        None
    }
}

fn overrun(name: &str, len: usize, first: usize, count: usize) -> String {
    format!(
        "wrote past the end of {name}: {name}[{}], but {name} has {len} entries ({count} zone entries \
         changed); check the loop bounds and npoints, ncomp, nstate of tc_block",
        len + first
    )
}
