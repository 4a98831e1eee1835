//! What users run, on the example C routines (fortran-shim/examples/c: j2.c, elastic.c)
//! compiled into a library and loaded as `tancheck check` loads them from a manifest:
//!
//! - the default check (default settings and path) at each guard level: off, light, full;
//! - one routine call of a plastic J2 increment (the base call with its tangent, a perturbed
//!   real call, a complex-step call) at guard levels off and light, so that the difference
//!   is the light guards' cost per call;
//! - the comparison of a returned tangent with a numerical one, alone;
//! - a default check along a 20,000-increment cyclic tension–shear path into the plastic
//!   range, with the terminal and JSON reports written to memory (what `tancheck check
//!   --path FILE --json FILE` does besides writing the file);
//! - the default probe suite for solid points on its own path, with its call floor: the
//!   suite's routine calls times the time of one call in the hand-written C loop
//!   (benches/c/loop_check.c) on the same path; the ratio is printed at the end.
//!
//! Each group is kept to a few seconds (flat sampling, 10 samples for the long ones) so that
//! `cargo bench --bench loaded` finishes in a couple of minutes on two shared cores.

mod common;

use std::rc::Rc;
use std::time::{Duration, Instant};

use criterion::{criterion_group, criterion_main, Criterion, SamplingMode};
use tancheck::cli::load::Loaded;
use tancheck::cli::report::terminal::{Detail, Terminal};
use tancheck::cli::report::Reporter;
use tancheck::cli::suite::Suite;
use tancheck::core::compare::{compare_along, Limits};
use tancheck::core::path::Shape;
use tancheck::core::{
    check, Caller, Direction, Driver, PointKind, PointState, Routine, Scheme, Settings, Verdict,
};

use common::{loop_library, stats, CLoop, Times, ELASTIC, J2};

/// Routine calls so far of a loaded routine's guards beyond the calls made (the full level's
/// repeats).
fn guard_calls(l: &Loaded) -> u64 {
    match l {
        Loaded::Library(r) => r.guard_calls(),
        Loaded::Model(_) => 0,
    }
}

fn bench(c: &mut Criterion) {
    let dir = common::work_dir();
    let lib_path = common::routine_library(&dir);
    let settings = Settings::default();
    let default_path = tancheck::cli::session::default_path(PointKind::Solid3d);

    // The default check at each guard level.
    let mut g = c.benchmark_group("default check of a loaded C routine");
    g.sample_size(20).warm_up_time(Duration::from_millis(500)).measurement_time(Duration::from_secs(2));
    for ex in [J2, ELASTIC] {
        for guards in ["off", "light", "full"] {
            let (m, _) = common::manifest(&dir, &lib_path, ex, guards);
            let (mut l, start) = common::loaded(&m, &dir);
            let report =
                check::run(&mut Caller::new(l.routine()), ex.props, start.clone(), &default_path, &settings)
                    .expect("a valid check");
            assert_eq!(report.verdict, Verdict::Pass, "{} with guards {guards}", ex.label);
            // The full level repeats every call; light repeats only the first-call looks' few.
            let (made, repeated) = (report.calls.real + report.calls.complex, guard_calls(&l));
            match guards {
                "off" => assert_eq!(repeated, 0),
                "light" => assert!(repeated > 0 && repeated <= 4, "{repeated} repeats at light"),
                _ => assert_eq!(repeated, made, "at the full level every call is repeated"),
            }
            g.bench_function(format!("{}, guards {guards}", ex.label), |b| {
                b.iter(|| {
                    let mut caller = Caller::new(l.routine());
                    check::run(&mut caller, ex.props, start.clone(), &default_path, &settings).unwrap()
                })
            });
        }
    }
    g.finish();

    // One call at a time, at guard levels off and light: a plastic J2 increment's base call
    // (tangent asked for), a perturbed real call and a complex-step call.
    {
        let mut g = c.benchmark_group("one call of the j2 C routine, plastic increment");
        g.warm_up_time(Duration::from_millis(300)).measurement_time(Duration::from_secs(1));
        for guards in ["off", "light"] {
            let (m, _) = common::manifest(&dir, &lib_path, J2, guards);
            let (mut l, start) = common::loaded(&m, &dir);
            let info = l.routine().info().clone();
            let conv = info.convention.clone();
            let mut dstrain = vec![0.0; conv.ncomp()];
            conv.strain_from_canonical(&Shape::TensionShear.direction().map(|x| x * 4e-3), &mut dstrain);
            let mut driver = Driver::new(&info, J2.props, start).unwrap();
            driver.set_increment(&dstrain, 0.0, 1.0);
            let mut caller = Caller::new(l.routine());
            driver.base_call(&mut caller).unwrap();
            assert!(driver.base.state != driver.start().state, "the increment is plastic");
            let h = settings.central.rel_step * driver.strain_scale(settings.step_floor);
            g.bench_function(format!("base call, guards {guards}"), |b| {
                b.iter(|| driver.base_call(&mut caller))
            });
            g.bench_function(format!("perturbed call, guards {guards}"), |b| {
                b.iter(|| driver.perturbed_call(&mut caller, Direction::Strain(3), h))
            });
            g.bench_function(format!("complex-step call, guards {guards}"), |b| {
                b.iter(|| driver.complex_call(&mut caller, Direction::Strain(3), 1e-30))
            });
        }
        g.finish();
    }

    // The comparison alone: the J2 tangent of a plastic increment against central differences.
    {
        let mut r = tancheck::models::reference("j2", PointKind::Solid3d).unwrap();
        let info = r.info().clone();
        let conv = info.convention.clone();
        let n = conv.ncomp();
        let mut caller = Caller::new(&mut r);
        let mut driver = Driver::new(&info, &common::J2_PROPS, PointState::zero(&info, 20.0)).unwrap();
        let mut dstrain = vec![0.0; n];
        conv.strain_from_canonical(&Shape::TensionShear.direction().map(|x| x * 4e-3), &mut dstrain);
        driver.set_increment(&dstrain, 0.0, 1.0);
        driver.base_call(&mut caller).unwrap();
        assert!(driver.base.state != driver.start().state, "the increment is plastic");
        let returned = driver.base.tangent.clone();
        let h = settings.central.rel_step * driver.strain_scale(settings.step_floor);
        let mut numerical = vec![0.0; n * n];
        for j in 0..n {
            Scheme::Central
                .column(&mut driver, &mut caller, Direction::Strain(j), h, &mut numerical[j * n..(j + 1) * n])
                .unwrap();
        }
        let tol = settings.central.tol;
        let along = Some(driver.dstrain());
        let check =
            compare_along(&conv, &returned, &numerical, Limits::new(tol, settings.entry_floor, 4), along);
        assert!(check.pass, "the J2 tangent agrees with central differences: {check:?}");
        let mut g = c.benchmark_group("comparison");
        g.warm_up_time(Duration::from_millis(500)).measurement_time(Duration::from_secs(2));
        g.bench_function("j2 plastic tangent against central differences (6 x 6)", |b| {
            b.iter(|| {
                compare_along(
                    &conv,
                    std::hint::black_box(&returned),
                    std::hint::black_box(&numerical),
                    Limits::new(tol, settings.entry_floor, settings.worst_entries),
                    along,
                )
            })
        });
        g.finish();
    }

    // A default check of 20,000 cyclic increments, with both reports.
    {
        let path = common::cyclic_path(20_000);
        common::write_path_file(&path, &dir.join("cyclic-20000.json"));
        let (m, _) = common::manifest(&dir, &lib_path, J2, "light");
        let (mut l, start) = common::loaded(&m, &dir);
        let mut g = c.benchmark_group("long check");
        g.sampling_mode(SamplingMode::Flat)
            .sample_size(10)
            .warm_up_time(Duration::from_secs(1))
            .measurement_time(Duration::from_secs(9));
        g.bench_function(
            "j2 C routine, 20,000 cyclic increments, default check, terminal and JSON reports",
            |b| {
                b.iter(|| {
                    let mut caller = Caller::new(l.routine());
                    let report = check::run(&mut caller, J2.props, start.clone(), &path, &settings).unwrap();
                    assert_eq!(report.verdict, Verdict::Pass);
                    Terminal::new(Detail::Normal, std::io::sink()).check(&report).unwrap();
                    let mut json = Vec::new();
                    tancheck::cli::report::json::write_check(&report, &mut json).unwrap();
                    json.len()
                })
            },
        );
        g.finish();
    }

    // The default probe suite, against its call floor.
    {
        let mut suite = Suite::default_for(PointKind::Solid3d, false);
        let path = suite.path().unwrap();
        suite.fit_at(&path);
        let (m, _) = common::manifest(&dir, &lib_path, J2, "light");
        let (mut l, start) = common::loaded(&m, &dir);
        let run_suite = |l: &mut Loaded| {
            let before = guard_calls(l);
            let mut caller = Caller::new(l.routine());
            let r = tancheck::core::probe::run_suite(
                &mut caller,
                &suite.suite,
                &suite.probes,
                J2.props,
                &start,
                &path,
                &settings,
            )
            .unwrap();
            let calls = caller.real_calls + caller.complex_calls;
            (r, calls + guard_calls(l) - before)
        };
        let (report, calls) = run_suite(&mut l);
        assert!(report.pass, "the default suite passes the example J2 routine: {report:?}");

        // The time of one routine call: the C loop on the suite's path, fastest of many walks.
        let (_loop_lib, run) = loop_library(&dir);
        let conv = l.routine().info().convention.clone();
        let c_loop = CLoop::new(run, &lib_path, J2, &conv, start.temp, &path, &settings);
        let per_call = (0..200)
            .map(|_| {
                let t = Instant::now();
                let r = c_loop.walk();
                t.elapsed().as_secs_f64() / (r.real_calls + r.complex_calls) as f64
            })
            .fold(f64::INFINITY, f64::min);

        let mut g = c.benchmark_group("probe suite");
        g.sampling_mode(SamplingMode::Flat)
            .sample_size(10)
            .warm_up_time(Duration::from_secs(1))
            .measurement_time(Duration::from_secs(5));
        let t: Times = Rc::default();
        let tt = t.clone();
        g.bench_function("default solid suite, j2 C routine, guards light", |b| {
            b.iter_custom(|iters| {
                let begin = Instant::now();
                for _ in 0..iters {
                    std::hint::black_box(run_suite(&mut l));
                }
                let e = begin.elapsed();
                tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                e
            })
        });
        g.finish();
        let (fastest, median) = stats(&t);
        if fastest.is_nan() {
            return; // the suite's benchmark was left out by a name filter
        }
        let floor = calls as f64 * per_call;
        println!(
            "\nprobe suite: {calls} routine calls; the call floor {:.2} ms ({:.0} ns per call, the C loop on the \
             suite's path); the suite {:.2} ms: {:.2}x its floor (fastest sample), {:.2}x (median)",
            floor * 1e3,
            per_call * 1e9,
            fastest * 1e3,
            fastest / floor,
            median / floor
        );
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
