//! One perturbed call allocates nothing on the heap: the driver's perturbed real and complex
//! calls, through the counting `Caller`, into a Rust model and into a compiled routine through
//! the guarded shim. A counting global allocator measures it.

use std::path::Path;

use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::core::{Caller, Direction, Driver, PointState, Routine};
use tancheck::models::reference;

tancheck_testkit::counting_allocator!();
use tancheck_testkit::alloc::allocations;

const PROPS: [f64; 7] = [200000.0, 0.3, 250.0, 1000.0, 100.0, 10.0, 500.0];

/// Perturbed calls at a plastic increment allocate nothing.
fn perturbed_calls_allocate_nothing(routine: &mut dyn Routine) {
    let info = routine.info().clone();
    let mut driver = Driver::new(&info, &PROPS, PointState::zero(&info, 20.0)).unwrap();
    let mut caller = Caller::new(routine);
    driver.set_increment(&[3e-3, 0.0, 0.0, 1e-3, 0.0, 2e-3], 0.0, 1.0);
    driver.base_call(&mut caller).unwrap();
    assert_eq!(driver.base.outcome.branch, 1, "the increment is plastic");
    // Warm up once (lazy one-time set-up such as signal handlers is not per call).
    driver.perturbed_call(&mut caller, Direction::Strain(0), 1e-9).unwrap();
    driver.complex_call(&mut caller, Direction::Strain(0), 1e-20).unwrap();
    let before = allocations();
    for j in 0..6 {
        driver.perturbed_call(&mut caller, Direction::Strain(j), 1e-9).unwrap();
        driver.perturbed_call(&mut caller, Direction::Strain(j), -1e-9).unwrap();
        driver.complex_call(&mut caller, Direction::Strain(j), 1e-20).unwrap();
    }
    let after = allocations();
    assert_eq!(after - before, 0, "{}: perturbed calls allocated", info.name);
    assert_eq!(caller.real_calls, 14);
    assert_eq!(caller.complex_calls, 7);
    // The counter does count: a Vec allocates.
    let v = vec![1u8; 16];
    assert!(allocations() > after, "{v:?}");
}

#[test]
fn perturbed_calls_into_a_rust_model_allocate_nothing() {
    let mut m = reference("j2", tancheck::core::PointKind::Solid3d).unwrap();
    perturbed_calls_allocate_nothing(&mut m);
}

#[test]
fn perturbed_calls_into_a_compiled_routine_allocate_nothing() {
    let dir = std::env::temp_dir().join(format!("tancheck-noalloc-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join("libj2.so");
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/j2.c");
    build_library(&BuildOptions::new([src], &out)).unwrap();
    let model = reference("j2", tancheck::core::PointKind::Solid3d).unwrap();
    let info = tancheck::core::RoutineInfo { name: "c_j2".into(), ..model.info().clone() };
    let lib = Library::open(&out).unwrap();
    let mut r = lib.routine("c_j2", info).unwrap();
    perturbed_calls_allocate_nothing(&mut r);
}
