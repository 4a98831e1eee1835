//! Block routines through the guarded trampoline and the block memory guards
//! (fortran-shim/examples/c/misbehave_block.c): a write past the end, a write to a read-only
//! input, an output left unwritten and a crash each end the call with the fault that names
//! them; a correct routine's block call, real and twin, allocates nothing.

use std::path::Path;

use num_complex::Complex64;
use tancheck::abi::{GuardLevel, Library, LibraryBlockRoutine};
use tancheck::core::block::walk::{BlockBuffers, ComplexPoint};
use tancheck::core::block::{BlockInfo, Conditions};
use tancheck::core::Fault;
use tancheck_testkit::alloc::allocations;

tancheck_testkit::counting_allocator!();

const PROPS: [f64; 2] = [200_000.0, 0.3];

fn lib() -> &'static Path {
    tancheck_testkit::libs::build_examples("mb_block", &["c/misbehave_block.c"])
}

fn open(symbol: &str) -> LibraryBlockRoutine {
    let info = BlockInfo { name: symbol.into(), ncomp: 6, nstate: 0, nproperties: 2 };
    Library::open(lib()).unwrap().block_routine(symbol, info).unwrap()
}

fn block(npoints: usize) -> BlockBuffers {
    let c = Conditions {
        temperature: 293.0,
        temperature_increment: 0.0,
        density: 7.85e-9,
        characteristic_length: 1.0,
    };
    let mut b = BlockBuffers::new(npoints, 6, &[], c);
    for p in 0..npoints {
        b.increment_of(p).copy_from_slice(&[1e-4, -2e-5, 3e-5, 1e-5, 0.0, 2e-5]);
    }
    b
}

fn misbehaved(symbol: &str) -> String {
    let mut r = open(symbol);
    let mut b = block(5);
    match b.call(&mut r, &PROPS, 1e-6, 1) {
        Err(Fault::Misbehaved { what }) => what,
        other => panic!("{symbol}: expected a guard finding, got {other:?}"),
    }
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn the_block_guards_name_each_misbehaviour() {
    let w = misbehaved("mb_block_overrun");
    assert!(w.starts_with("wrote past the end of stress: stress[30]"), "{w}");
    let w = misbehaved("mb_block_writes_input");
    assert!(w.contains("read-only input strain_increment: strain_increment[0]"), "{w}");
    let w = misbehaved("mb_block_unwritten");
    assert!(w.starts_with("left energy[8] unwritten"), "{w}");
    // The correct routine: no finding, the outputs reach the caller.
    let mut r = open("mb_block_ok");
    let mut b = block(5);
    b.call(&mut r, &PROPS, 1e-6, 1).unwrap();
    assert!(r.findings().is_empty());
    assert!(b.stress.iter().all(|x| x.is_finite()) && b.energy[4].internal > 0.0);
}

/// At the full level every call runs again with other values after the read-only arrays: a
/// routine that reads past the end of one is named with that array; the light level (one
/// call) cannot see it, and a correct routine passes both.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn the_full_guard_level_names_a_read_past_the_end() {
    let mut r = open("mb_block_overread");
    let mut b = block(5);
    b.call(&mut r, &PROPS, 1e-6, 1).unwrap();
    assert!(r.findings().is_empty(), "light: {:?}", r.findings());
    r.set_guard_level(GuardLevel::Full);
    match b.call(&mut r, &PROPS, 1e-6, 2) {
        Err(Fault::Misbehaved { what }) => {
            assert!(what.starts_with("reads past the end of its read-only input strain_increment"), "{what}")
        }
        other => panic!("expected a guard finding, got {other:?}"),
    }
    let mut ok = open("mb_block_ok");
    ok.set_guard_level(GuardLevel::Full);
    b.call(&mut ok, &PROPS, 1e-6, 1).unwrap();
    assert!(ok.findings().is_empty(), "{:?}", ok.findings());
    // The twin too.
    let mut cx = ComplexPoint::new(2, 6, 0);
    cx.load(&PROPS, &b, 0);
    cx.call(&mut ok, &b.conditions[..1], 0.0, 1e-6, 1).unwrap();
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn a_crash_in_a_block_call_is_a_fault() {
    let mut r = open("mb_block_crash");
    let mut b = block(3);
    match b.call(&mut r, &PROPS, 1e-6, 1) {
        Err(Fault::Crashed { what, .. }) => {
            assert!(what.contains("SIGSEGV") || what.contains("segmentation"), "{what}")
        }
        other => panic!("expected a crash, got {other:?}"),
    }
    // The guard is ready for the next call.
    let mut ok = open("mb_block_ok");
    b.call(&mut ok, &PROPS, 1e-6, 1).unwrap();
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn one_block_call_allocates_nothing() {
    let mut r = open("mb_block_ok");
    let mut b = block(128);
    let mut cx = ComplexPoint::new(2, 6, 0);
    // Warm up: the guarded buffers are laid out for the largest block once.
    b.call(&mut r, &PROPS, 1e-6, 1).unwrap();
    cx.load(&PROPS, &b, 0);
    cx.call(&mut r, &b.conditions[..1], 0.0, 1e-6, 1).unwrap();
    let before = allocations();
    for inc in 2..12 {
        b.call(&mut r, &PROPS, 1e-6, inc).unwrap();
        cx.strain_increment[0] = Complex64::new(1e-4, 1e-20);
        cx.call(&mut r, &b.conditions[..1], 0.0, 1e-6, inc).unwrap();
    }
    assert_eq!(allocations() - before, 0, "block calls allocated");
}
