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

/// One comparison of a plastic tangent with a numerical one (default `worst_entries`, the
/// increment direction measured too) allocates nothing when it passes (only the entry errors
/// of a failing one), and keeps the same worst entries, in
/// the same order, as sorting every entry by decreasing error (a stable sort) would.
#[test]
fn one_comparison_allocates_nothing() {
    use tancheck::core::compare::{compare_along, compare_dtemp_floor, Limits};
    use tancheck::core::{Convention, ShearMeasure};
    let mut m = reference("j2", tancheck::core::PointKind::Solid3d).unwrap();
    let info = m.info().clone();
    let conv = info.convention.clone();
    let mut driver = Driver::new(&info, &PROPS, PointState::zero(&info, 20.0)).unwrap();
    let mut caller = Caller::new(&mut m);
    driver.set_increment(&[3e-3, 0.0, 0.0, 1e-3, 0.0, 2e-3], 0.0, 1.0);
    driver.base_call(&mut caller).unwrap();
    let returned = driver.base.tangent.clone();
    // A numerical tangent off in a few entries (several ties, so the order of ties shows).
    let mut numerical = returned.clone();
    for (k, f) in [(0, 1.01), (7, 0.99), (14, 1.01), (21, 1.02), (35, 0.97)] {
        numerical[k] *= f;
    }
    let dir = driver.dstrain().to_vec();
    let s = tancheck::core::Settings::default();
    let warm = compare_along(
        &conv,
        &returned,
        &numerical,
        Limits::new(1e-6, s.entry_floor, s.worst_entries),
        Some(&dir),
    );
    let before = allocations();
    let c = compare_along(
        &conv,
        &returned,
        &numerical,
        Limits::new(1e-6, s.entry_floor, s.worst_entries),
        Some(&dir),
    );
    let d = compare_dtemp_floor(
        &conv,
        &returned[..6],
        &numerical[..6],
        Limits::new(1e-6, s.entry_floor, s.worst_entries),
        1.0,
    );
    let after = allocations();
    // A failing comparison keeps every entry's error for the report's heatmap: one vector,
    // and nothing else; a passing one (every increment of a correct routine) allocates nothing.
    assert_eq!(
        after - before,
        2,
        "a failing comparison allocated more than its entry errors (one vector each)"
    );
    assert_eq!(c.entry_errors.len(), 36);
    let before = allocations();
    let same = compare_along(
        &conv,
        &returned,
        &returned,
        Limits::new(1e-6, s.entry_floor, s.worst_entries),
        Some(&dir),
    );
    assert_eq!(allocations() - before, 0, "a passing comparison allocated");
    assert!(same.pass && same.entry_errors.is_empty());
    assert_eq!(c, warm);
    assert!(!c.pass && !d.pass);
    assert_eq!(c.worst.len(), s.worst_entries);
    // The same selection by sorting all entries (stable, decreasing error).
    let mut all: Vec<(f64, usize)> = Vec::new();
    let mut r = returned.clone();
    let mut n = numerical.clone();
    conv.tangent_to_mandel(&mut r);
    conv.tangent_to_mandel(&mut n);
    let norm = n.iter().map(|x| x * x).sum::<f64>().sqrt();
    for k in 0..36 {
        all.push(((r[k] - n[k]).abs() / n[k].abs().max(s.entry_floor * norm), k));
    }
    all.sort_by(|a, b| b.0.total_cmp(&a.0));
    for (e, (err, k)) in c.worst.iter().zip(&all) {
        assert_eq!((e.row + 6 * e.col, e.error), (*k, *err));
        assert_eq!(e.label, conv.entry_label(e.row, e.col));
    }
    assert_eq!(c.worst_entry_error, all[0].0);
    // A label reads back from JSON as written.
    let back: tancheck::core::compare::Comparison =
        serde_json::from_str(&serde_json::to_string(&c).unwrap()).unwrap();
    let labels = |c: &tancheck::core::compare::Comparison| {
        c.worst.iter().map(|e| e.label.to_string()).collect::<Vec<_>>()
    };
    assert_eq!(labels(&back), labels(&c));
    assert_eq!(labels(&c)[0], "12/12");
    // In a convention with tensor shear and another order, the labels follow it.
    let other = Convention::from_labels(
        tancheck::core::PointKind::Solid3d,
        &["11", "22", "33", "12", "13", "23"],
        ShearMeasure::Tensor,
    )
    .unwrap();
    let c2 =
        compare_along(&other, &returned, &numerical, Limits::new(1e-6, s.entry_floor, s.worst_entries), None);
    assert_eq!(c2.worst[0].label, other.entry_label(c2.worst[0].row, c2.worst[0].col));
}

/// A whole increment of a check that keeps only the failures in detail (what `tancheck check`
/// keeps without `--verbose`) allocates nothing when it passes: the base call, both schemes'
/// calls, the comparisons along the soft directions and the increment's fixed-size record.
#[test]
fn a_passing_increment_of_a_check_allocates_nothing() {
    use tancheck::core::increment::Walk;
    use tancheck::core::path::{Path as LoadPath, PathIncrement};
    use tancheck::core::report::{Collector, Keep};
    use tancheck::core::Settings;

    let mut m = reference("j2", tancheck::core::PointKind::Solid3d).unwrap();
    let info = m.info().clone();
    let settings = Settings { first_calls: false, ..Settings::default() };
    // Tension with shear, every increment plastic after the second (the same branch).
    let path = LoadPath {
        name: "plastic tension-shear".into(),
        increments: (0..12).map(|_| PathIncrement::strain([1e-3, 0.0, 0.0, 5e-4, 0.0, 0.0])).collect(),
    };
    let driver = Driver::new(&info, &PROPS, PointState::zero(&info, 20.0)).unwrap();
    let mut walk = Walk::new(driver, &settings);
    let mut caller = Caller::new(&mut m);
    let mut collected = Collector::new(&settings, Keep::Failures, path.increments.len());
    // Warm up: the first increments reach the elastic and the plastic branch (a branch's
    // summary is made when first reached) and set up what is made once per thread.
    for k in 0..4 {
        let step = walk.step(k, &path.increments[k], &mut caller, &mut collected);
        assert!(!step.stops);
    }
    let before = allocations();
    for k in 4..path.increments.len() {
        let step = walk.step(k, &path.increments[k], &mut caller, &mut collected);
        assert!(!step.stops && step.state_changed, "increment {} is plastic", k + 1);
    }
    let after = allocations();
    assert_eq!(after - before, 0, "passing increments of a check allocated");
    assert_eq!(collected.len(), path.increments.len());
    assert_eq!(caller.real_calls as usize, 13 * path.increments.len());
}
