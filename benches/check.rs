//! Speed of a tangent check on the Rust J2 model: one increment, and a seeded random walk of
//! 10,000 increments with the tangent checked (central differences and the complex step) at
//! every increment. Numbers quoted in notes and docs come from here.

use criterion::{criterion_group, criterion_main, Criterion};
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck::core::path::{Path, PathIncrement, Shape};
use tancheck::core::{check, Caller, PointKind, PointState, Routine, Settings};
use tancheck::models::reference;

const PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0];

fn random_walk(n: usize) -> Path {
    let mut rng = StdRng::seed_from_u64(42);
    let increments = (0..n)
        .map(|_| PathIncrement {
            dstrain: std::array::from_fn(|_| rng.gen_range(-4e-4..4e-4)),
            dtemp: 0.0,
            dtime: 1.0,
            hold_stress: None,
        })
        .collect();
    Path { name: "random walk".into(), increments }
}

fn bench(c: &mut Criterion) {
    let settings = Settings::default();
    let one = Path::ramp(Shape::TensionShear, 4e-3, 1, 0);
    c.bench_function("j2 check, one plastic increment (central + complex step)", |b| {
        let mut r = reference("j2", PointKind::Solid3d).unwrap();
        let info = r.info().clone();
        b.iter(|| {
            let mut caller = Caller::new(&mut r);
            check::run(&mut caller, &PROPS, PointState::zero(&info, 20.0), &one, &settings).unwrap()
        })
    });
    let walk = random_walk(10_000);
    let mut g = c.benchmark_group("random walk");
    g.sample_size(10);
    g.bench_function("j2 check, 10,000 increments (central + complex step at each)", |b| {
        let mut r = reference("j2", PointKind::Solid3d).unwrap();
        let info = r.info().clone();
        b.iter(|| {
            let mut caller = Caller::new(&mut r);
            check::run(&mut caller, &PROPS, PointState::zero(&info, 20.0), &walk, &settings).unwrap()
        })
    });
    g.finish();

    // The cost of the first-call looks of a default check (a zero increment, full guards on
    // the first call of each new branch) on a compiled routine through the guarded shim, along
    // the default path: with them against without. The ratio of the two is the added cost.
    let dir = std::env::temp_dir().join(format!("tancheck-bench-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let lib_path = dir.join("libj2_bench.so");
    let src = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/j2.c");
    tancheck::abi::build_library(&tancheck::abi::BuildOptions::new([src], &lib_path)).unwrap();
    let lib = tancheck::abi::Library::open(&lib_path).unwrap();
    let info = reference("j2", PointKind::Solid3d).unwrap().info().clone();
    let path = tancheck::cli::session::default_path(PointKind::Solid3d);
    let mut g = c.benchmark_group("first calls");
    for (name, on) in [
        ("compiled j2, default path, default check", true),
        ("compiled j2, default path, without first-call looks", false),
    ] {
        let settings = Settings { first_calls: on, ..Settings::default() };
        let mut r =
            lib.routine("c_j2", tancheck::core::RoutineInfo { name: "c_j2".into(), ..info.clone() }).unwrap();
        g.bench_function(name, |b| {
            b.iter(|| {
                let mut caller = Caller::new(&mut r);
                check::run(&mut caller, &PROPS, PointState::zero(&info, 20.0), &path, &settings).unwrap()
            })
        });
    }
    g.finish();
    let _ = std::fs::remove_dir_all(&dir);
}

criterion_group!(benches, bench);
criterion_main!(benches);
