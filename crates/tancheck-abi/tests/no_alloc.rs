//! One call through the guarded shim allocates nothing: the hot path of every check.
//! A counting global allocator counts per thread, so other test threads do not interfere.

mod common;

use common::*;
use num_complex::Complex64;
use tancheck_core::Caller;

tancheck_testkit::counting_allocator!();
use tancheck_core::driver::Outputs;
use tancheck_testkit::alloc::allocations;
use tancheck_testkit::call::Call;

#[test]
fn the_counter_counts() {
    let before = allocations();
    let v = std::hint::black_box(vec![1u8; 100]);
    assert_eq!(allocations(), before + 1);
    drop(v);
}

#[test]
fn a_guarded_call_allocates_nothing() {
    // Everything that may allocate happens before: building, loading, buffers.
    let mut r = load("bad_divide_by_zero");
    let mut b = Real::new();
    let mut z = Call::new(&[E, NU], 6, 0).temp(293.0, 0.0).complex();
    z.dstrain[0].im = 1e-30;
    let mut co = Outputs::new(6, 0, Complex64::new(0.0, 0.0));

    let before = allocations();
    // The routine's first call on this thread, then many more; plain and through Caller.
    for inc in [1, 1, 1] {
        b.call(&mut r, inc).unwrap();
    }
    {
        let (input, mut output) = b.views([293.0, 0.0], 1);
        let mut caller = Caller::new(&mut r);
        for _ in 0..100 {
            caller.call(&input, &mut output).unwrap();
        }
        let cinput = z.input(true);
        let mut coutput = co.view();
        for _ in 0..100 {
            caller.call_complex(&cinput, &mut coutput).unwrap();
        }
        assert_eq!(caller.real_calls, 100);
        assert_eq!(caller.complex_calls, 100);
    }
    // With traps on as well, on the normal path.
    r.set_fp_traps(tancheck_abi::signal_guard::fp_traps_available()).unwrap();
    b.call(&mut r, 1).unwrap();
    let after = allocations();
    assert_eq!(after - before, 0, "the guarded calls allocated {} times", after - before);
    b.assert_elastic();
    assert!((co.stress[0].im / 1e-30 - b.tangent[0]).abs() <= 1e-9 * b.tangent[0]);

    // Only the failure path describes the crash, and that allocates: the counter sees it.
    if r.fp_traps() {
        let before = allocations();
        assert!(b.call(&mut r, 2).is_err());
        assert!(allocations() > before);
    }
}

/// The memory guards allocate their buffers when the routine is made, not per call: at the
/// full level (which reruns every call) and for the twin too. A finding allocates, once.
#[test]
fn guarded_calls_allocate_nothing_at_any_level() {
    use tancheck_abi::GuardLevel;
    use tancheck_core::Routine;
    let mut r = load("bad_tangent_hole");
    let mut b = Real::new();
    let z = Call::new(&[E, NU], 6, 0).temp(293.0, 0.0).complex();
    let cinput = z.input(true);
    let mut co = Outputs::new(6, 0, Complex64::new(0.0, 0.0));
    for level in GuardLevel::ALL {
        r.set_guard_level(level);
        let before = allocations();
        for _ in 0..20 {
            b.call(&mut r, 1).unwrap();
            r.complex().unwrap().call_complex(&cinput, &mut co.view()).unwrap();
        }
        assert_eq!(allocations() - before, 0, "guard level {level}");
        b.assert_elastic();
    }
    assert!(r.findings().is_empty());
    // The first tangent hole is a finding (allocates, and ends its call with a fault naming
    // it); the same again only counts.
    r.set_guard_level(GuardLevel::Light);
    assert!(matches!(b.call(&mut r, 2), Err(tancheck_core::Fault::Misbehaved { .. })));
    let before = allocations();
    for _ in 0..20 {
        b.call(&mut r, 2).unwrap();
    }
    assert_eq!(allocations() - before, 0, "a repeated finding only counts");
    assert_eq!(r.findings()[0].calls, 21);
}
