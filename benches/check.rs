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
}

criterion_group!(benches, bench);
criterion_main!(benches);
