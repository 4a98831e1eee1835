//! A scheme's perturbed calls of every strain column in one guarded entry
//! (fortran-shim/src/guard_sweep.inc): what a loaded routine offers as
//! [`Routine::sweep_real`](tancheck_core::Routine::sweep_real) when its memory guards are off.
//! The calls are those of the trampoline one by one (the same inputs, pre-fills and report
//! reset, each counted by the watch), without the layers around each.

use std::ffi::c_void;

use num_complex::Complex64;
use tancheck_core::routine::{call_at, status_fault, Sweep, SweepEnd};

use super::LibraryRoutine;
use crate::memory_guards::GuardLevel;
use crate::signal_guard::{self as guard, ComplexFn, GuardArgs, GuardResult, RealFn};

/// A sweep's description (`struct tc_guard_sweep`).
#[repr(C)]
struct SweepArgs {
    steps: *const f64,
    kept: *const f64,
    stresses: *mut c_void,
    neg: *const GuardArgs,
    ncols: i32,
    nsteps: i32,
    calls: i32,
    reserved: i32,
}

extern "C" {
    fn tc_guard_sweep_real(f: RealFn, pos: *const GuardArgs, s: *mut SweepArgs, r: *mut GuardResult) -> i32;
    fn tc_guard_sweep_complex(
        f: ComplexFn,
        pos: *const GuardArgs,
        s: *mut SweepArgs,
        r: *mut GuardResult,
    ) -> i32;
    #[cfg(test)]
    fn tc_guard_sweep_layout(out: *mut u64);
}

/// The most steps of one column a sweep takes (the five-point stencil's four calls).
const MAX_STEPS: usize = 4;

impl LibraryRoutine {
    /// The sweep through `entry` (the real or the complex trampoline), or `None` when the
    /// guards are on (their checks are made call by call).
    fn sweep_through<S: Copy>(
        &mut self,
        sw: Sweep<'_, '_, S>,
        entry: impl FnOnce(&GuardArgs, *mut SweepArgs, &mut GuardResult) -> i32,
    ) -> Option<SweepEnd> {
        if self.guard_level != GuardLevel::Off {
            return None;
        }
        let Sweep { input, kept, steps, ncols, output, mut output_neg, stresses } = sw;
        let n = self.ncomp;
        if ncols != n || kept.len() != n || steps.is_empty() || steps.len() > MAX_STEPS {
            return None;
        }
        self.check_lengths(&input, output);
        if let Some(o) = output_neg.as_deref() {
            self.check_lengths(&input, o);
        }
        assert!(stresses.len() == ncols * steps.len() * n, "a sweep's stresses have the wrong length");
        let call = self.tc_call(&input);
        let temp = input.temp;
        let pos = self.args(&call, &temp, &input, &mut *output);
        let neg = output_neg.as_deref_mut().map(|o| self.args(&call, &temp, &input, o));
        let mut args = SweepArgs {
            steps: steps.as_ptr(),
            kept: kept.as_ptr(),
            stresses: stresses.as_mut_ptr().cast(),
            neg: neg.as_ref().map_or(std::ptr::null(), std::ptr::from_ref),
            ncols: ncols as i32,
            nsteps: steps.len() as i32,
            calls: 0,
            reserved: 0,
        };
        let crash = guard::guarded(|r| entry(&pos, &mut args, r));
        let calls = args.calls.max(0) as usize;
        let result = match crash {
            Err(c) => Err(c.into_fault()),
            Ok(()) if calls == 0 => Ok(()),
            Ok(()) => {
                let (_, step) = call_at(steps, calls - 1);
                match output_neg {
                    Some(o) if step <= 0.0 => status_fault(o.outcome),
                    _ => status_fault(output.outcome),
                }
            }
        };
        Some(SweepEnd { calls, result })
    }

    pub(super) fn sweep_real_calls(&mut self, sw: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        let real = self.real;
        // SAFETY: `real` has the ABI's real signature; every array of `pos` and `neg` has the
        // length announced in its `tc_call` (check_lengths), the steps, the kept increment
        // and the stresses the lengths the sweep announces (checked above), and all of them
        // outlive the call.
        self.sweep_through(sw, |pos, s, r| unsafe { tc_guard_sweep_real(real, pos, s, r) })
    }

    pub(super) fn sweep_complex_calls(&mut self, sw: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        let twin = self.twin?;
        // SAFETY: as in `sweep_real_calls`, with the twin's complex signature; Complex64 is
        // repr(C) and laid out as C's double _Complex.
        self.sweep_through(sw, |pos, s, r| unsafe { tc_guard_sweep_complex(twin, pos, s, r) })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_sweep_description_has_the_c_layout() {
        let mut out = [0u64; 2];
        // SAFETY: writes two integers.
        unsafe { tc_guard_sweep_layout(out.as_mut_ptr()) };
        assert_eq!(out[0] as usize, std::mem::size_of::<SweepArgs>());
        assert_eq!(out[1] as usize, std::mem::offset_of!(SweepArgs, calls));
    }
}
