//! A scheme's perturbed calls in one guarded entry (fortran-shim/src/guard_sweep.inc), and the
//! same with the light guards: the block loaded once for the sweep and restored before every
//! call on the C side, a call whose inputs, zones and tc_call are as loaded and whose required
//! outputs are written stored there; any other call is looked at here, entry by entry, exactly
//! as after a single guarded call ([`GuardBuffers::call`]), and the sweep goes on after it
//! unless it faulted.

use std::ffi::{c_char, c_void};
use std::sync::atomic::AtomicU64;

use tancheck_core::routine::{call_at, status_fault, Sweep, SweepEnd};
use tancheck_core::{CallInput, CallOutput, Fault, Outcome};

use super::{CallPlace, Element, GuardBuffers};
use crate::memory_guards::{Findings, N_INPUTS, REPORT_ZONE, ZONE};
use crate::signal_guard::{guarded, GuardArgs, GuardResult, TcCall};

/// A sweep's description (`struct tc_guard_sweep`).
#[repr(C)]
pub(crate) struct SweepArgs {
    pub steps: *const f64,
    pub kept: *const f64,
    pub stresses: *mut c_void,
    pub neg: *const GuardArgs,
    pub counter: *const AtomicU64,
    pub ncols: i32,
    pub nsteps: i32,
    pub calls: i32,
    pub reserved: i32,
}

/// The guarded block of a sweep with the light guards (`struct tc_guard_sweep_block`).
#[repr(C)]
pub(crate) struct SweepBlock {
    block: *mut u64,
    loaded: *mut u64,
    report: *mut Outcome,
    call: *const TcCall,
    made: *mut TcCall,
    outputs: [[*mut c_void; 4]; 2],
    reports: [*mut Outcome; 2],
    words: u64,
    prefix: u64,
    dstrain_at: u64,
    out_at: [u64; 5],
    out_len: [u64; 5],
    zone_words: i32,
    report_zone: i32,
    element_words: i32,
    first: i32,
    closer: i32,
    reserved: i32,
}

impl SweepArgs {
    /// A sweep's description.
    pub(crate) fn new<S>(
        ncols: usize,
        steps: &[f64],
        kept: &[f64],
        stresses: &mut [S],
        neg: *const GuardArgs,
        counter: Option<&AtomicU64>,
    ) -> SweepArgs {
        SweepArgs {
            steps: steps.as_ptr(),
            kept: kept.as_ptr(),
            stresses: stresses.as_mut_ptr().cast(),
            neg,
            counter: counter.map_or(std::ptr::null(), std::ptr::from_ref),
            ncols: ncols as i32,
            nsteps: steps.len() as i32,
            calls: 0,
            reserved: 0,
        }
    }
}

impl SweepBlock {
    /// The offsets of `first` and `closer`, for the layout test.
    #[cfg(test)]
    pub(crate) const OFFSETS: (usize, usize) =
        (std::mem::offset_of!(SweepBlock, first), std::mem::offset_of!(SweepBlock, closer));
}

/// The NaN a call's outputs are pre-filled with (`Caller::call`), an entry of the increment as
/// set (`exact`), and one moved by a step (`perturbed`).
pub(crate) struct Moves<E, X, P> {
    pub nan: E,
    pub exact: X,
    pub perturbed: P,
}

/// Whether a step writes the outputs of a step above 0 (`plus`); any other, a NaN included,
/// writes those of the others, as on the C side.
pub(crate) fn positive(step: f64) -> bool {
    step > 0.0
}

/// The caller's stress, state, ∂σ/∂T and energy, and its report, as the C side writes them.
fn output_pointers<E>(o: &mut CallOutput<'_, E>) -> ([*mut c_void; 4], *mut Outcome) {
    (
        [
            o.stress.as_mut_ptr().cast(),
            o.state.as_mut_ptr().cast(),
            o.dstress_dtemp.as_mut_ptr().cast(),
            o.energy.as_mut_ptr().cast(),
        ],
        std::ptr::from_mut(o.outcome),
    )
}

impl<E: Element> GuardBuffers<E> {
    /// The calls of `sw` with the light guards through `entry` (the real or complex guarded
    /// sweep), as [`GuardBuffers::call`] would make them one by one at
    /// [`GuardLevel::Light`](crate::memory_guards::GuardLevel::Light): the same findings, the
    /// same outputs, the same faults.
    #[allow(clippy::too_many_arguments)] // one sweep's whole context, as in `call`
    pub(crate) fn sweep(
        &mut self,
        call: &TcCall,
        label: *const c_char,
        fp_traps: bool,
        complex: bool,
        sw: Sweep<'_, '_, E>,
        findings: &mut Findings,
        moves: Moves<E, impl Fn(f64) -> E, impl Fn(f64, f64) -> E>,
        mut entry: impl FnMut(&GuardArgs, &mut SweepArgs, &mut SweepBlock, &mut GuardResult) -> i32,
    ) -> SweepEnd {
        let Sweep { input, kept, steps, ncols, output, mut output_neg, stresses, counter } = sw;
        let n = kept.len();
        let total = ncols * steps.len();
        let ew = std::mem::size_of::<E>() / 8;
        let place = CallPlace { increment: input.increment, complex };
        let mut first = 0;
        loop {
            // Loaded as a first call of the sweep would be (the caller's report reset).
            self.report_before = Outcome::default();
            self.load_first(&input);
            self.clean = false;
            self.snapshot.copy_from_slice(&self.data);
            let mut made = *call;
            let args = self.args(&raw mut made, label, fp_traps);
            let (pos, pos_report) = output_pointers(output);
            let (neg, neg_report) = match output_neg.as_deref_mut() {
                Some(o) => output_pointers(o),
                None => (pos, pos_report),
            };
            let words = |k: usize| (self.start[k] * ew) as u64;
            let mut block = SweepBlock {
                block: self.data.as_mut_ptr().cast(),
                loaded: self.snapshot.as_mut_ptr().cast(),
                report: args.report,
                call,
                made: &raw mut made,
                outputs: [pos, neg],
                reports: [pos_report, neg_report],
                words: (self.data.len() * ew) as u64,
                prefix: words(N_INPUTS),
                dstrain_at: words(2),
                out_at: std::array::from_fn(|o| words(N_INPUTS + o)),
                out_len: std::array::from_fn(|o| (self.len[N_INPUTS + o] * ew) as u64),
                zone_words: (ZONE * ew) as i32,
                report_zone: REPORT_ZONE as i32,
                element_words: ew as i32,
                first: first as i32,
                closer: 0,
                reserved: 0,
            };
            let mut sa = SweepArgs::new(ncols, steps, kept, stresses, std::ptr::null(), counter);
            let crash = guarded(|r| entry(&args, &mut sa, &mut block, r));
            let calls = sa.calls.max(0) as usize;
            let last = calls.checked_sub(1).map(|k| call_at(steps, k));
            let out: &mut CallOutput<'_, E> = match (output_neg.as_deref_mut(), last) {
                (Some(o), Some((_, step))) if !positive(step) => o,
                _ => &mut *output,
            };
            if let Err(c) = crash {
                // The outputs of the call that crashed as a single call leaves them: pre-filled.
                out.stress.fill(moves.nan);
                out.state.fill(moves.nan);
                *out.outcome = Outcome::default();
                return SweepEnd { calls, result: Err(c.into_fault()) };
            }
            if block.closer == 0 {
                // Every call made passed the light checks on the C side; the last one made may
                // have returned a status (the C side stops after it).
                self.clean = true;
                let result = if calls > 0 { status_fault(out.outcome) } else { Ok(()) };
                return SweepEnd { calls, result };
            }
            // The last call made needs the entry-by-entry look of a single guarded call.
            let (j, step) = last.expect("a closer look follows a call");
            let mut d = [moves.nan; 6];
            for (x, &k) in d.iter_mut().zip(kept) {
                *x = (moves.exact)(k);
            }
            d[j] = (moves.perturbed)(kept[j], step);
            let input_k = CallInput { dstrain: &d[..n], ..input };
            let loaded = self.as_loaded(&input_k);
            let prefilled = self.prefilled(false);
            let known = findings.list().len();
            self.inspect(&input_k, call, &made, loaded, prefilled, place, findings);
            self.store(out, false, prefilled);
            let k = calls - 1;
            stresses[k * n..(k + 1) * n].copy_from_slice(out.stress);
            self.clean = loaded;
            if let Some(f) = findings.list().get(known) {
                return SweepEnd { calls, result: Err(Fault::Misbehaved { what: f.to_string() }) };
            }
            if let Err(f) = status_fault(out.outcome) {
                return SweepEnd { calls, result: Err(f) };
            }
            if calls == total {
                return SweepEnd { calls, result: Ok(()) };
            }
            first = calls;
        }
    }
}
