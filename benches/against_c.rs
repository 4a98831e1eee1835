//! tancheck against the check a user would write by hand in C (benches/c/loop_check.c),
//! on the same 20,000-increment cyclic tension–shear path into the plastic range, for the
//! example J2 and elastic C routines.
//!
//! The C loop is compiled here (by tancheck-abi's `build_library`, the same compiler and `-O2`
//! as the routine library), dlopens the same library and per increment makes the base call
//! with the tangent, the central-difference Jacobian (12 calls) and the complex-step Jacobian
//! with the twin (6 calls) at the same relative steps, and compares them entry by entry with
//! the returned tangent, keeping the worst error. Before timing, both sides walk the path once
//! and the benchmark asserts that they made the same real and complex routine calls and that
//! both found the tangent consistent.
//!
//! tancheck runs with its default settings except the first-call looks (a zero increment and
//! one repeated call per newly reached branch, three calls here; `benches/check.rs` measures
//! them), which the C loop does not make. The last benchmark of the J2 group adds what the
//! command line does after the check: the terminal report and the JSON report, in memory.
//!
//! At the end the ratios tancheck / C loop are printed, from the fastest of each
//! benchmark's samples (the least disturbed by other work on a shared machine) and from the
//! medians.

mod common;

use std::rc::Rc;
use std::time::{Duration, Instant};

use criterion::{criterion_group, criterion_main, Criterion, SamplingMode};
use tancheck::cli::load::Loaded;
use tancheck::cli::report::terminal::{Detail, Terminal};
use tancheck::cli::report::Reporter;
use tancheck::core::path::Path;
use tancheck::core::{check, Caller, Scheme, Verdict};

use common::{loop_library, stats, CLoop, Example, Times, ELASTIC, J2};

/// Increments of the path.
const INCREMENTS: usize = 20_000;

/// The check as `tancheck check` makes it, without the first-call looks; returns the report
/// and the calls made (real, complex, extra calls of the guards).
fn tancheck_walk(
    l: &mut Loaded,
    start: &tancheck::core::PointState,
    ex: Example,
    path: &Path,
) -> (tancheck::core::Report, u64, u64, u64) {
    let settings = settings();
    let mut caller = Caller::new(l.routine());
    let report = check::run(&mut caller, ex.props, start.clone(), path, &settings).expect("a valid check");
    let (real, complex) = (caller.real_calls, caller.complex_calls);
    let extra = match l {
        Loaded::Library(r) => r.guard_calls(),
        Loaded::Model(_) => 0,
    };
    (report, real, complex, extra)
}

fn settings() -> tancheck::core::Settings {
    tancheck::core::Settings { first_calls: false, ..Default::default() }
}

fn bench(crit: &mut Criterion) {
    let dir = common::work_dir();
    let lib_path = common::routine_library(&dir);
    let (_loop_lib, run) = loop_library(&dir);
    let path = common::cyclic_path(INCREMENTS);
    common::write_path_file(&path, &dir.join(format!("cyclic-{INCREMENTS}.json")));
    let s = settings();
    let mut lines = Vec::new();

    for ex in [J2, ELASTIC] {
        let mut loaded = Vec::new();
        for guards in ["off", "light"] {
            let (m, _) = common::manifest(&dir, &lib_path, ex, guards);
            let (l, start) = common::loaded(&m, &dir);
            loaded.push((guards, l, start));
        }
        let (conv, temp) = (loaded[0].1.routine().info().convention.clone(), loaded[0].2.temp);
        let c_loop = CLoop::new(run, &lib_path, ex, &conv, temp, &path, &s);

        // The same work on both sides: the same routine calls, and both find the tangent
        // consistent along the whole path.
        let c = c_loop.walk();
        assert_eq!(c.failed_increment, 0, "{}: the routine failed in the C loop", ex.label);
        assert!(
            c.worst_central <= s.central.tol,
            "{}: C loop, central: worst entry error {:e}",
            ex.label,
            c.worst_central
        );
        assert!(
            c.worst_complex <= s.complex_step.tol,
            "{}: C loop, complex step: worst entry error {:e}",
            ex.label,
            c.worst_complex
        );
        assert_eq!(c.real_calls as usize, 13 * INCREMENTS, "{}: C loop real calls", ex.label);
        assert_eq!(c.complex_calls as usize, 6 * INCREMENTS, "{}: C loop complex calls", ex.label);
        for (guards, l, start) in &mut loaded {
            let (report, real, complex, extra) = tancheck_walk(l, start, ex, &path);
            assert_eq!(report.verdict, Verdict::Pass, "{} with guards {guards}", ex.label);
            assert_eq!(report.increments.len(), INCREMENTS);
            assert_eq!(real, c.real_calls as u64, "{} with guards {guards}: real calls", ex.label);
            assert_eq!(complex, c.complex_calls as u64, "{} with guards {guards}: complex calls", ex.label);
            assert_eq!(extra, 0, "{} with guards {guards}: extra calls of the guards", ex.label);
            assert_eq!(report.settings.schemes, vec![Scheme::Central, Scheme::ComplexStep]);
            if ex.states > 0 && *guards == "off" {
                let plastic = report.increments.iter().filter(|i| i.state_changed).count();
                assert!(plastic * 4 >= INCREMENTS, "{}: only {plastic} plastic increments", ex.label);
                lines.push(format!("   {}: {plastic} of {INCREMENTS} increments plastic", ex.label));
            }
        }
        lines.push(format!(
            "   {}: {} real + {} complex routine calls on each side",
            ex.label, c.real_calls, c.complex_calls
        ));

        let mut g = crit.benchmark_group(format!("{} C routine, {INCREMENTS} cyclic increments", ex.label));
        g.sampling_mode(SamplingMode::Flat).sample_size(10).warm_up_time(Duration::from_secs(1));
        g.measurement_time(Duration::from_secs(if ex.states > 0 { 8 } else { 4 }));
        let mut times: Vec<(String, Times)> = Vec::new();
        let t: Times = Rc::default();
        {
            let t = t.clone();
            let c_loop = &c_loop;
            g.bench_function("C loop", move |b| {
                b.iter_custom(|iters| {
                    let start = Instant::now();
                    for _ in 0..iters {
                        std::hint::black_box(c_loop.walk());
                    }
                    let e = start.elapsed();
                    t.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    e
                })
            });
        }
        times.push(("C loop".into(), t));
        for (guards, l, start) in &mut loaded {
            let name = format!("tancheck, guards {guards}");
            let t: Times = Rc::default();
            let tt = t.clone();
            g.bench_function(&name, |b| {
                b.iter_custom(|iters| {
                    let begin = Instant::now();
                    for _ in 0..iters {
                        std::hint::black_box(tancheck_walk(l, start, ex, &path));
                    }
                    let e = begin.elapsed();
                    tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    e
                })
            });
            times.push((name, t));
        }
        if ex.states > 0 {
            // What the command line adds: both reports, written to memory.
            let (guards, l, start) = &mut loaded[1];
            let name = format!("tancheck, guards {guards}, terminal and JSON reports");
            let t: Times = Rc::default();
            let tt = t.clone();
            g.bench_function(&name, |b| {
                b.iter_custom(|iters| {
                    let begin = Instant::now();
                    for _ in 0..iters {
                        let (report, ..) = tancheck_walk(l, start, ex, &path);
                        let mut text = std::io::sink();
                        Terminal::new(Detail::Normal, &mut text).check(&report).unwrap();
                        let mut json = Vec::new();
                        tancheck::cli::report::json::write_check(&report, &mut json).unwrap();
                        std::hint::black_box(json.len());
                    }
                    let e = begin.elapsed();
                    tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    e
                })
            });
            times.push((name, t));
        }
        g.finish();

        let (c_min, c_med) = stats(&times[0].1);
        lines.push(format!(
            "   {}: C loop {:.1} ms per walk ({:.0} ns per routine call, fastest sample)",
            ex.label,
            c_min * 1e3,
            c_min * 1e9 / (c.real_calls + c.complex_calls) as f64
        ));
        for (name, t) in &times[1..] {
            let (min, med) = stats(t);
            lines.push(format!(
                "   {}: {name}: {:.1} ms, ratio to the C loop {:.2} (fastest samples), {:.2} (medians)",
                ex.label,
                min * 1e3,
                min / c_min,
                med / c_med
            ));
        }
    }
    println!("\ntancheck / C loop, {INCREMENTS}-increment cyclic tension-shear path, one thread:");
    for l in lines {
        println!("{l}");
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
