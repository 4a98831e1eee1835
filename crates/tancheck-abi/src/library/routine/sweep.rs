//! A scheme's perturbed calls of every strain column in one guarded entry
//! (fortran-shim/src/guard_sweep.inc): what a loaded routine offers as
//! [`Routine::sweep_real`](tancheck_core::Routine::sweep_real) with its memory guards off or
//! light. The calls are those of the trampoline one by one (the same inputs, pre-fills and
//! report reset, each counted by the watch; with the light guards the same checks and
//! findings), without the layers around each. The full guards check call by call.

use num_complex::Complex64;
use tancheck_core::routine::{call_at, status_fault, Sweep, SweepEnd};

use super::LibraryRoutine;
use crate::memory_guards::{positive, GuardLevel, Moves, SweepArgs, SweepBlock};
use crate::signal_guard::{self as guard, ComplexFn, GuardArgs, GuardResult, RealFn};

extern "C" {
    fn tc_guard_sweep_real(f: RealFn, pos: *const GuardArgs, s: *mut SweepArgs, r: *mut GuardResult) -> i32;
    fn tc_guard_sweep_complex(
        f: ComplexFn,
        pos: *const GuardArgs,
        s: *mut SweepArgs,
        r: *mut GuardResult,
    ) -> i32;
    fn tc_guard_sweep_guarded_real(
        f: RealFn,
        a: *const GuardArgs,
        s: *mut SweepArgs,
        b: *mut SweepBlock,
        r: *mut GuardResult,
    ) -> i32;
    fn tc_guard_sweep_guarded_complex(
        f: ComplexFn,
        a: *const GuardArgs,
        s: *mut SweepArgs,
        b: *mut SweepBlock,
        r: *mut GuardResult,
    ) -> i32;
    #[cfg(test)]
    fn tc_guard_sweep_layout(out: *mut u64);
    #[cfg(test)]
    fn tc_guard_sweep_block_layout(out: *mut u64);
}

/// The most steps of one column a sweep takes (the five-point stencil's four calls).
const MAX_STEPS: usize = 4;

impl LibraryRoutine {
    /// Whether this routine sweeps `sw` (the lengths the sweep announces are checked here,
    /// in release builds too: the C side trusts them).
    fn sweeps<S>(&self, sw: &Sweep<'_, '_, S>) -> bool {
        let n = self.ncomp;
        // The C side keeps the increment's copy in six entries (a point has at most six).
        if n > 6 || sw.ncols != n || sw.kept.len() != n || sw.steps.is_empty() || sw.steps.len() > MAX_STEPS {
            return false;
        }
        self.check_lengths(&sw.input, sw.output);
        if let Some(o) = sw.output_neg.as_deref() {
            self.check_lengths(&sw.input, o);
        }
        assert!(
            sw.stresses.len() == sw.ncols * sw.steps.len() * n,
            "a sweep's stresses have the wrong length"
        );
        // The full guards check each call on its own, and so does a pending full-guard call.
        match self.guard_level {
            GuardLevel::Off => true,
            GuardLevel::Light => !self.full_next,
            GuardLevel::Full => false,
        }
    }

    /// The sweep through `entry` (the real or the complex trampoline) without guards.
    fn sweep_unguarded<S: Copy>(
        &self,
        sw: Sweep<'_, '_, S>,
        entry: impl FnOnce(&GuardArgs, *mut SweepArgs, &mut GuardResult) -> i32,
    ) -> SweepEnd {
        let Sweep { input, kept, steps, ncols, output, mut output_neg, stresses, counter } = sw;
        let call = self.tc_call(&input);
        let temp = input.temp;
        let pos = self.args(&call, &temp, &input, &mut *output);
        let neg = output_neg.as_deref_mut().map(|o| self.args(&call, &temp, &input, o));
        let neg = neg.as_ref().map_or(std::ptr::null(), std::ptr::from_ref);
        let mut args = SweepArgs::new(ncols, steps, kept, stresses, neg, counter);
        let crash = guard::guarded(|r| entry(&pos, &mut args, r));
        let calls = args.calls.max(0) as usize;
        let result = match crash {
            Err(c) => Err(c.into_fault()),
            Ok(()) if calls == 0 => Ok(()),
            Ok(()) => {
                let (_, step) = call_at(steps, calls - 1);
                match output_neg {
                    Some(o) if !positive(step) => status_fault(o.outcome),
                    _ => status_fault(output.outcome),
                }
            }
        };
        SweepEnd { calls, result }
    }

    pub(super) fn sweep_real_calls(&mut self, sw: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        if !self.sweeps(&sw) {
            return None;
        }
        let real = self.real;
        if self.guard_level == GuardLevel::Off {
            // SAFETY: `real` has the ABI's real signature; every array of the arguments has
            // the length announced in its `tc_call` (`sweeps`), the steps, the kept increment
            // and the stresses the lengths the sweep announces, and all of them outlive the call.
            return Some(self.sweep_unguarded(sw, |a, s, r| unsafe { tc_guard_sweep_real(real, a, s, r) }));
        }
        let call = self.tc_call(&sw.input);
        let moves = Moves { nan: f64::NAN, exact: |x| x, perturbed: |x, step| x + step };
        Some(self.real_guards.sweep(
            &call,
            self.label.as_ptr(),
            self.fp_traps,
            false,
            sw,
            &mut self.findings,
            moves,
            // SAFETY: as above; the arguments point into the guarded block, which holds every
            // array at the announced length, each followed by its zone.
            |a, s, b, r| unsafe { tc_guard_sweep_guarded_real(real, a, s, b, r) },
        ))
    }

    pub(super) fn sweep_complex_calls(&mut self, sw: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        let twin = self.twin?;
        if !self.sweeps(&sw) {
            return None;
        }
        if self.guard_level == GuardLevel::Off {
            // SAFETY: as in `sweep_real_calls`, with the twin's complex signature; Complex64 is
            // repr(C) and laid out as C's double _Complex.
            return Some(
                self.sweep_unguarded(sw, |a, s, r| unsafe { tc_guard_sweep_complex(twin, a, s, r) }),
            );
        }
        let call = self.tc_call(&sw.input);
        let guards = self.complex_guards.as_mut()?;
        let moves = Moves {
            nan: Complex64::new(f64::NAN, f64::NAN),
            exact: |x| Complex64::new(x, 0.0),
            perturbed: Complex64::new,
        };
        Some(guards.sweep(
            &call,
            self.label.as_ptr(),
            self.fp_traps,
            true,
            sw,
            &mut self.findings,
            moves,
            // SAFETY: as in `sweep_real_calls`, with the twin's complex signature.
            |a, s, b, r| unsafe { tc_guard_sweep_guarded_complex(twin, a, s, b, r) },
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_sweep_descriptions_have_the_c_layout() {
        let mut out = [0u64; 3];
        // SAFETY: writes two integers.
        unsafe { tc_guard_sweep_layout(out.as_mut_ptr()) };
        assert_eq!(out[0] as usize, std::mem::size_of::<SweepArgs>());
        assert_eq!(out[1] as usize, std::mem::offset_of!(SweepArgs, calls));
        let mut out = [0u64; 7];
        // SAFETY: writes seven integers.
        unsafe { tc_guard_sweep_block_layout(out.as_mut_ptr()) };
        assert_eq!(out[0] as usize, std::mem::size_of::<SweepBlock>());
        assert_eq!(out[1] as usize, SweepBlock::OFFSETS.0);
        assert_eq!(out[2] as usize, SweepBlock::OFFSETS.1);
        // The constants the C side shares with the guards.
        assert_eq!(out[3], crate::memory_guards::PREFILL_BITS);
        assert_eq!(out[4], f64::NAN.to_bits());
        assert_eq!(out[5] as usize, crate::memory_guards::REPORT_ZONE);
        assert_eq!(out[6] as u8, crate::memory_guards::REPORT_CANARY);
    }
}
