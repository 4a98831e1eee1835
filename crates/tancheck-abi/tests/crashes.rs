//! A routine that crashes ends the call with Fault::Crashed, and the process goes on.
//! The routines are fortran-shim/examples/c/misbehave.c: elastic in increment 1, misbehaving
//! from increment 2 on.

mod common;

use common::*;
use num_complex::Complex64;
use tancheck_core::{Fault, Routine};

fn crashed(r: Result<(), Fault>) -> (i32, String) {
    match r {
        Err(Fault::Crashed { signal, what }) => (signal, what),
        other => panic!("expected a caught crash, got {other:?}"),
    }
}

#[test]
fn null_deref_is_caught_and_the_process_goes_on() {
    let mut r = load("bad_null_deref");
    let mut b = Real::new();

    let (signal, what) = crashed(b.call(&mut r, 2));
    assert_eq!(signal, SIGSEGV);
    assert!(
        what.starts_with(
            "segmentation fault (SIGSEGV) at address 0x0: the routine read or wrote memory it does not own"
        ),
        "{what}"
    );
    assert!(what.contains("null pointer"), "{what}");

    // The same again, then a good call, then a crash, then a good call: nothing is left over.
    for _ in 0..3 {
        let (signal, _) = crashed(b.call(&mut r, 5));
        assert_eq!(signal, SIGSEGV);
    }
    b.call(&mut r, 1).expect("increment 1 is a correct elastic step");
    b.assert_elastic();
    assert_eq!(b.outcome.branch, 0);
    assert_eq!(crashed(b.call(&mut r, 2)).0, SIGSEGV);
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();

    // Another routine of the same library still works, as does ordinary Rust code.
    let mut other = load("bad_abort");
    b.call(&mut other, 1).unwrap();
    b.assert_elastic();
    let v: Vec<u64> = (0..1000).collect();
    assert_eq!(v.iter().sum::<u64>(), 499_500);
}

#[test]
fn division_by_zero_traps_only_when_asked() {
    let mut r = load("bad_divide_by_zero");
    let mut b = Real::new();
    assert!(!r.fp_traps());

    // Without traps: the call returns normally with an infinite stress.
    b.call(&mut r, 2).expect("without traps the division just gives inf");
    assert!(b.stress[0].is_infinite(), "stress[0] = {}", b.stress[0]);
    assert!(b.stress[1].is_finite());
    // Where the machine cannot trap, asking for traps is an error, not a silent no-op.
    if cfg!(tancheck_no_fp_traps) {
        assert!(r.set_fp_traps(true).is_err());
    }
}

#[test]
#[cfg_attr(tancheck_no_fp_traps, ignore = "needs floating-point traps (this machine has none)")]
fn division_by_zero_traps_when_asked() {
    let mut r = load("bad_divide_by_zero");
    let mut b = Real::new();
    r.set_fp_traps(true).unwrap();
    let (signal, what) = crashed(b.call(&mut r, 2));
    assert_eq!(signal, SIGFPE);
    assert!(what.starts_with("floating-point exception (SIGFPE): division by zero"), "{what}");

    // The traps were for the routine only: this thread divides by zero freely afterwards.
    let zero = std::hint::black_box(0.0_f64);
    assert!((1.0 / zero).is_infinite());
    assert!((zero / zero).is_nan());

    // With traps on, a well-behaved call is unaffected.
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();

    // And off again: inf, no crash.
    r.set_fp_traps(false).unwrap();
    b.call(&mut r, 2).unwrap();
    assert!(b.stress[0].is_infinite());
}

// A trap inside the math library (the logarithm of a negative number, taken by libm's log):
// the fault is placed in the system library and, from the words at the top of the
// interrupted stack, in the routine's frame that called it (it named libm's nearest export
// alone, with advice to rebuild with debug information; a user-style sweep).
#[test]
#[cfg_attr(tancheck_no_fp_traps, ignore = "needs floating-point traps (this machine has none)")]
fn a_trap_in_the_math_library_names_the_routine_that_called_it() {
    let mut r = load("bad_log_of_negative");
    let mut b = Real::new();
    r.set_fp_traps(true).unwrap();
    let (signal, what) = crashed(b.call(&mut r, 2));
    assert_eq!(signal, SIGFPE);
    assert!(what.starts_with("floating-point exception (SIGFPE): invalid operation"), "{what}");
    // No advice about the system library's debug information (the routine's own may lack it).
    assert!(what.contains("libm.so") && what.contains("a system library), called from"), "{what}");
    assert!(what.contains("called from `bad_log_of_negative`"), "{what}");
    // The call after it is unaffected.
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
}

#[test]
fn abort_is_caught_and_the_process_can_still_spawn() {
    let mut r = load("bad_abort");
    let mut b = Real::new();
    let (signal, what) = crashed(b.call(&mut r, 2));
    assert_eq!(signal, SIGABRT);
    assert!(what.starts_with("abort (SIGABRT)"), "{what}");
    assert_eq!(crashed(b.call(&mut r, 3)).0, SIGABRT);
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
    // abort() takes no lock that the jump could leave held: starting a process still works.
    let status = std::process::Command::new("sh").args(["-c", "exit 3"]).status().unwrap();
    assert_eq!(status.code(), Some(3));
}

#[test]
fn crashes_are_caught_on_other_threads_too() {
    let handles: Vec<_> = (0..3)
        .map(|k| {
            std::thread::spawn(move || {
                let mut r = load("bad_null_deref");
                let mut b = Real::new();
                b.dstrain[0] = 1e-3 * (k as f64 + 1.0);
                for _ in 0..20 {
                    assert_eq!(crashed(b.call(&mut r, 2)).0, SIGSEGV);
                    b.call(&mut r, 1).unwrap();
                    b.assert_elastic();
                }
            })
        })
        .collect();
    for h in handles {
        h.join().unwrap();
    }
}

#[test]
fn the_twin_is_found_and_gives_the_tangent_by_complex_step() {
    let mut r = load("bad_null_deref");
    assert!(r.has_twin());
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    assert_twin_gives_tangent(&mut r, &b);
    // The twin crashes the same way, and is caught the same way.
    let mut s = [Complex64::new(f64::NAN, f64::NAN); 6];
    match complex_call(&mut r, &b, 0, 1e-30, 2, &mut s) {
        Err(Fault::Crashed { signal, .. }) => assert_eq!(signal, SIGSEGV),
        other => panic!("expected a crash, got {other:?}"),
    }
}

#[test]
fn a_nonzero_status_is_a_status_fault() {
    // Ask for 4 components of plane strain but pass nprop = 1: the routine refuses.
    let lib = tancheck_abi::Library::open(misbehave_library()).unwrap();
    let mut info = elastic_info("bad_abort");
    info.nprop = 1;
    let mut r = lib.routine("bad_abort", info).unwrap();
    let props = [E];
    let zeros = [0.0; 6];
    let mut stress = [f64::NAN; 6];
    let mut tangent = [f64::NAN; 36];
    let mut dsdt = [f64::NAN; 6];
    let mut energy = [f64::NAN; 2];
    let mut outcome = tancheck_core::Outcome::default();
    let input = tancheck_core::CallInput {
        props: &props,
        strain: &zeros,
        dstrain: &zeros,
        temp: [0.0, 0.0],
        stress0: &zeros,
        state0: &[],
        time: [0.0, 1.0],
        increment: 2,
        want_tangent: true,
    };
    let mut output = tancheck_core::CallOutput {
        stress: &mut stress,
        state: &mut [],
        tangent: &mut tangent,
        dstress_dtemp: &mut dsdt,
        energy: &mut energy,
        outcome: &mut outcome,
    };
    match r.call(&input, &mut output) {
        Err(Fault::Status { status, message, .. }) => {
            assert_eq!(status, tancheck_core::routine::status::FAILED);
            assert_eq!(message, "misbehave: needs 2 properties [E, nu]");
        }
        other => panic!("expected a status fault, got {other:?}"),
    }
}

#[test]
#[should_panic(expected = "arrays of the wrong length")]
fn wrong_lengths_are_refused_before_the_routine_sees_them() {
    let mut r = load("bad_null_deref");
    let mut b = Real::new();
    let (mut input, mut output) = b.views([0.0, 0.0], 1);
    input.props = &input.props[..1];
    let _ = r.call(&input, &mut output);
}

/// The handler runs on the alternate signal stack, so even a routine that exhausts the
/// thread's stack is caught, and the thread goes on with the stack it had.
#[test]
fn a_stack_overflow_in_the_routine_is_caught() {
    std::thread::Builder::new()
        .stack_size(512 * 1024)
        .spawn(|| {
            let mut r = load("bad_deep_recursion");
            let mut b = Real::new();
            for _ in 0..3 {
                let (signal, what) = crashed(b.call(&mut r, 2));
                assert_eq!(signal, SIGSEGV);
                assert!(what.starts_with("stack overflow (SIGSEGV at address 0x"), "{what}");
                b.call(&mut r, 1).unwrap();
                b.assert_elastic();
            }
        })
        .unwrap()
        .join()
        .unwrap();
}
