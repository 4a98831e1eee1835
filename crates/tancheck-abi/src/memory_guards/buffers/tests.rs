//! The guarded block's loads and checks, call after call.

use super::*;
use crate::signal_guard::{CrashDetail, SignalKind, TcCall};

/// A block for a routine of one component, one property and `nstate` (0 or 1) state
/// variables, with its findings: light calls one after the other, as a check makes them.
struct OnePoint<E: Element> {
    g: GuardBuffers<E>,
    findings: Findings,
    nstate: usize,
}

/// What one call gave: its result, the findings new to it, and the stress and ∂σ/∂T the
/// caller got.
struct Seen<E> {
    result: Result<(), Crash>,
    new_findings: usize,
    stress: E,
    dstress_dtemp: E,
}

impl<E: Element> OnePoint<E> {
    fn new(nstate: usize) -> Self {
        OnePoint { g: GuardBuffers::new(1, nstate, 1), findings: Findings::default(), nstate }
    }

    /// One light call of increment `k` (strain k/1000, the entries made by `v`; the caller's
    /// outputs filled with `nan` before it), `routine` standing for the routine.
    fn call(
        &mut self,
        k: i32,
        want_tangent: bool,
        v: impl Fn(f64) -> E,
        nan: E,
        routine: impl FnMut(&GuardArgs) -> Result<(), Crash>,
    ) -> Seen<E> {
        let call = TcCall {
            abi_version: 1,
            ncomp: 1,
            nstate: self.nstate as i32,
            nproperties: 1,
            increment: k,
            flags: 0,
            time: 0.0,
            dtime: 1.0,
        };
        let (props, strain, dstrain, stress0) =
            ([v(210_000.0)], [v(1e-3 * f64::from(k))], [v(1e-4)], [v(0.0)]);
        let state0 = [v(0.0)];
        let input = CallInput {
            props: &props,
            strain: &strain,
            dstrain: &dstrain,
            temp: [v(20.0), v(0.0)],
            stress0: &stress0,
            state0: &state0[..self.nstate],
            time: [0.0, 1.0],
            increment: k,
            want_tangent,
        };
        let (mut stress, mut state, mut tangent, mut dtemp, mut energy) =
            ([nan], [nan], [nan], [nan], [nan; 2]);
        let mut outcome = Outcome::default();
        let mut output = CallOutput {
            stress: &mut stress,
            state: &mut state[..self.nstate],
            tangent: &mut tangent,
            dstress_dtemp: &mut dtemp,
            energy: &mut energy,
            outcome: &mut outcome,
        };
        let before = self.findings.list().len();
        let complex = std::mem::size_of::<E>() > 8;
        let result = self.g.call(
            GuardLevel::Light,
            &call,
            std::ptr::null(),
            false,
            complex,
            &input,
            &mut output,
            &mut self.findings,
            routine,
        );
        Seen {
            result,
            new_findings: self.findings.list().len() - before,
            stress: stress[0],
            dstress_dtemp: dtemp[0],
        }
    }
}

/// A real call on [`OnePoint`].
fn real(
    p: &mut OnePoint<f64>,
    k: i32,
    want_tangent: bool,
    routine: impl FnMut(&GuardArgs) -> Result<(), Crash>,
) -> Seen<f64> {
    p.call(k, want_tangent, |x| x, 0.0, routine)
}

/// A zone written on the third of five calls is found on that call only, and the call
/// after it finds the block whole again (a load after a call with a finding restores the
/// block from its image). Each call writes its one stress (uniaxial, no state variables).
#[test]
fn a_zone_written_on_a_later_call_is_found_then_and_the_block_is_whole_again() {
    let mut p = OnePoint::<f64>::new(0);
    let mut per_call = Vec::new();
    for k in 1..=5 {
        let seen = real(&mut p, k, false, |a| {
            // SAFETY: the block holds one stress and one property, each followed by its zone
            // of ZONE entries.
            unsafe {
                *a.stress.cast::<f64>() = 1.0;
                if k == 3 {
                    *a.props.cast::<f64>().cast_mut().add(1) = 7.0;
                }
            }
            Ok(())
        });
        assert!(seen.result.is_ok());
        assert_eq!(seen.stress, 1.0);
        per_call.push(seen.new_findings);
    }
    let f = p.findings.list();
    assert_eq!(per_call, [0, 0, 1, 0, 0], "{f:?}");
    assert_eq!((f[0].kind, f[0].array, f[0].calls), (FindingKind::Overrun, GuardedArray::Props, 1));
}

/// After a clean call the next one is loaded in place (inputs written, outputs pre-filled
/// again, the block not restored): an output the routine stops writing is found unwritten
/// on that call, the caller gets a quiet NaN there, not what the call before wrote, and a
/// tangent not asked for reads as the pre-fill. An input written on a later call is found
/// then, and the calls after it are clean again.
#[test]
fn a_call_after_a_clean_one_starts_from_pre_filled_outputs() {
    let mut p = OnePoint::<f64>::new(1);
    // (findings new on the call, stress seen by the caller, tangent read by the routine)
    let mut seen = Vec::new();
    for k in 1..=6 {
        let mut tangent_read = 0.0;
        let s = real(&mut p, k, k == 1, |a| {
            // SAFETY: the block holds one entry per array, each followed by its zone.
            unsafe {
                tangent_read = *a.tangent.cast::<f64>();
                *a.state.cast::<f64>() = 1.0;
                if k == 1 {
                    *a.tangent.cast::<f64>() = 5.0;
                }
                if k != 3 {
                    *a.stress.cast::<f64>() = f64::from(k);
                }
                if k == 5 {
                    *a.stress0.cast::<f64>().cast_mut() = 9.0;
                }
            }
            Ok(())
        });
        assert!(s.result.is_ok());
        seen.push((s.new_findings, s.stress, tangent_read.to_bits() == PREFILL_BITS));
    }
    assert_eq!(seen[0], (0, 1.0, true));
    assert_eq!(seen[1], (0, 2.0, true), "the tangent the first call wrote is not seen by the second");
    assert_eq!(seen[2].0, 1);
    assert!(seen[2].1.is_nan() && seen[2].1.to_bits() != PREFILL_BITS, "a quiet NaN, not 2");
    assert_eq!(seen[3], (0, 4.0, true));
    assert_eq!(seen[4], (1, 5.0, true));
    assert_eq!(seen[5], (0, 6.0, true));
    let kinds: Vec<_> = p.findings.list().iter().map(|f| (f.kind, f.array, f.increment)).collect();
    assert_eq!(
        kinds,
        [
            (FindingKind::Unwritten, GuardedArray::Stress, 3),
            (FindingKind::InputWritten, GuardedArray::Stress0, 5)
        ]
    );
}

/// A call that writes a zone and then crashes leaves the block as the crash left it: the next
/// call restores it first, so the write is not blamed on that (innocent) call. Each call is
/// a clean one but the second.
#[test]
fn a_crash_after_a_clean_call_is_not_blamed_on_the_next_call() {
    let mut p = OnePoint::<f64>::new(0);
    let mut crashed = Vec::new();
    for k in 1..=3 {
        let seen = real(&mut p, k, false, |a| {
            // SAFETY: the block holds one stress and one property, each followed by its zone
            // of ZONE entries.
            unsafe {
                *a.stress.cast::<f64>() = 1.0;
                if k == 2 {
                    *a.props.cast::<f64>().cast_mut().add(1) = 7.0;
                    return Err(Crash {
                        signal: 11,
                        kind: SignalKind::Segmentation,
                        detail: CrashDetail::Unmapped,
                        code: 1,
                        address: None,
                        pc: None,
                        caller: None,
                    });
                }
            }
            Ok(())
        });
        crashed.push(seen.result.is_err());
    }
    assert_eq!(crashed, [false, true, false]);
    assert!(p.findings.list().is_empty(), "{:?}", p.findings.list());
}

/// The checks after a call leave the floating-point exception flags as the routine left
/// them: the outputs' pre-fill is a signalling NaN, and a floating-point comparison of it would
/// raise the invalid-operation flag for the next routine to find as its own.
#[cfg(all(target_os = "linux", any(target_arch = "x86_64", target_arch = "aarch64")))]
#[test]
fn the_checks_raise_no_floating_point_flag() {
    extern "C" {
        fn feclearexcept(excepts: i32) -> i32;
        fn fetestexcept(excepts: i32) -> i32;
    }
    // FE_INVALID in glibc's fenv.h on x86-64 and on aarch64 (from memory; both are 1).
    const FE_INVALID: i32 = 1;
    let mut p = OnePoint::<Complex64>::new(1);
    let c = |x: f64| Complex64::new(x, 0.0);
    for k in 1..=2 {
        // SAFETY: plain C library calls on the calling thread's floating-point environment.
        unsafe { feclearexcept(FE_INVALID) };
        let seen = p.call(k, true, c, Complex64::new(f64::NAN, f64::NAN), |a| {
            // SAFETY: one entry per array. The routine writes stress, state and tangent
            // (not ∂σ/∂T nor the energies, which it does not provide: they keep the pre-fill).
            unsafe {
                *a.stress.cast::<Complex64>() = c(1.0);
                *a.state.cast::<Complex64>() = c(0.0);
                *a.tangent.cast::<Complex64>() = c(1.0);
            }
            Ok(())
        });
        // SAFETY: as above.
        let raised = unsafe { fetestexcept(FE_INVALID) };
        assert_eq!(raised, 0, "the checks raised the invalid-operation flag");
        assert!(seen.result.is_ok());
        assert_eq!(seen.stress, c(1.0));
        assert!(seen.dstress_dtemp.re.is_nan(), "an output not provided reaches the caller as a quiet NaN");
    }
    assert!(p.findings.list().is_empty(), "{:?}", p.findings.list());
}
