//! One call of a model does not allocate (DEVELOPERS.md: the hot path), in any scalar type
//! and on either branch. A counting allocator counts the allocations of the test's own thread.

use std::alloc::{GlobalAlloc, Layout, System};
use std::cell::Cell;

use num_complex::Complex64;
use num_dual::Dual64;
use tancheck_core::{CallInput, CallOutput, Model, Outcome, PointKind, Scalar};

use crate::{AnyModel, NAMES};

struct Counting;

thread_local! {
    static ALLOCATIONS: Cell<usize> = const { Cell::new(0) };
}

// SAFETY: forwards to the system allocator; the counter is a thread-local Cell that never
// allocates (const-initialized).
unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let _ = ALLOCATIONS.try_with(|c| c.set(c.get() + 1));
        // SAFETY: same contract as the caller's.
        unsafe { System.alloc(layout) }
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        // SAFETY: same contract as the caller's.
        unsafe { System.dealloc(ptr, layout) }
    }
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        let _ = ALLOCATIONS.try_with(|c| c.set(c.get() + 1));
        // SAFETY: same contract as the caller's.
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

#[global_allocator]
static GLOBAL: Counting = Counting;

fn allocations() -> usize {
    ALLOCATIONS.with(|c| c.get())
}

/// Allocations made by `calls` evaluations of `m` (buffers made beforehand), and the
/// branches reached.
fn count<S: Scalar>(m: &AnyModel, props: &[f64], dstrain: &[f64]) -> (usize, i32) {
    let info = m.info();
    let n = info.convention.ncomp();
    let lift = |v: &[f64]| v.iter().map(|&x| S::cst(x)).collect::<Vec<S>>();
    let (props, dstrain) = (lift(props), lift(dstrain));
    let zeros_n = vec![S::zero(); n];
    let state0 = vec![S::zero(); info.nstate];
    let nan = S::cst(f64::NAN);
    let (mut stress, mut state, mut tangent, mut dtemp) =
        (vec![nan; n], vec![nan; info.nstate], vec![nan; n * n], vec![nan; n]);
    let mut energy = [nan; 2];
    let mut outcome = Outcome::default();
    let input = CallInput {
        props: &props,
        strain: &zeros_n,
        dstrain: &dstrain,
        temp: [S::zero(); 2],
        stress0: &zeros_n,
        state0: &state0,
        time: [0.0, 1.0],
        increment: 1,
        want_tangent: true,
    };
    let before = allocations();
    for _ in 0..10 {
        let mut output = CallOutput {
            stress: &mut stress,
            state: &mut state,
            tangent: &mut tangent,
            dstress_dtemp: &mut dtemp,
            energy: &mut energy,
            outcome: &mut outcome,
        };
        m.evaluate(&input, &mut output).unwrap();
    }
    let made = allocations() - before;
    assert_eq!(outcome.status, 0, "{}", outcome.message_text());
    (made, outcome.branch)
}

#[test]
fn no_call_allocates() {
    // A bad property takes the failure path, which must not allocate either.
    let j2_props = [200_000.0, 0.3, 250.0, 1000.0, 50.0, 20.0, 500.0];
    for name in NAMES {
        for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
            let m = AnyModel::new(name, kind).unwrap();
            let n = kind.ncomp();
            let props: &[f64] = if name == "elastic" { &j2_props[..2] } else { &j2_props };
            for size in [1e-4, 3e-3] {
                let mut de = vec![0.0; n];
                de[0] = size;
                de[n - 1] = size;
                let want_branch = if name == "elastic" || size < 1e-3 { 0 } else { 1 };
                assert_eq!(count::<f64>(&m, props, &de), (0, want_branch), "{name} {kind} f64");
                assert_eq!(count::<Dual64>(&m, props, &de), (0, want_branch), "{name} {kind} dual");
                assert_eq!(count::<Complex64>(&m, props, &de), (0, want_branch), "{name} {kind} complex");
            }
        }
    }
}
