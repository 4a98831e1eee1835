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
//! them), which the C loop does not make, and keeps what `tancheck check` keeps without
//! `--verbose`: a fixed-size record per increment, the full detail of failing ones. The last benchmark of the J2 group adds what the
//! command line does after the check: the terminal report and the JSON report, in memory.
//!
//! The J2 group also runs the check on two threads (`--jobs 2`; the setup asserts that its
//! JSON report is byte for byte the one of one thread), against the single-threaded C loop.
//!
//! At the end the ratios tancheck / C loop are printed, from the fastest of each
//! benchmark's samples (the least disturbed by other work on a shared machine), from the
//! medians, and, for the one-thread runs, from the CPU time of the benchmark's thread (which
//! does not count the time other work on a shared machine held the core).

mod common;

use std::rc::Rc;
use std::time::{Duration, Instant};

use criterion::{criterion_group, criterion_main, Criterion, SamplingMode};
use tancheck::cli::load::Loaded;
use tancheck::cli::report::terminal::{Detail, Terminal};
use tancheck::cli::report::Reporter;
use tancheck::core::path::Path;
use tancheck::core::report::Keep;
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
    jobs: usize,
) -> (tancheck::core::Report, u64, u64, u64) {
    let settings = tancheck::core::Settings { jobs, ..settings() };
    let mut caller = Caller::new(l.routine());
    // As `tancheck check` keeps it (without `--verbose`): a record per increment, the full
    // detail of failures only.
    let report =
        check::run_with(&mut caller, ex.props, start.clone(), path, &settings, Keep::Failures, &mut |_| {})
            .expect("a valid check");
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
            let (report, real, complex, extra) = tancheck_walk(l, start, ex, &path, 1);
            assert_eq!(report.verdict, Verdict::Pass, "{} with guards {guards}", ex.label);
            assert_eq!(report.records.len(), INCREMENTS);
            assert_eq!(real, c.real_calls as u64, "{} with guards {guards}: real calls", ex.label);
            assert_eq!(complex, c.complex_calls as u64, "{} with guards {guards}: complex calls", ex.label);
            assert_eq!(extra, 0, "{} with guards {guards}: extra calls of the guards", ex.label);
            assert_eq!(report.settings.schemes, vec![Scheme::Central, Scheme::ComplexStep]);
            if ex.states > 0 && *guards == "off" {
                let plastic = report.records.iter().filter(|i| i.state_changed).count();
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
        // (name, wall times, thread CPU times; empty for the two-thread run)
        let mut times: Vec<(String, Times, Times)> = Vec::new();
        let t: Times = Rc::default();
        let cpu: Times = Rc::default();
        {
            let (t, cpu) = (t.clone(), cpu.clone());
            let c_loop = &c_loop;
            g.bench_function("C loop", move |b| {
                b.iter_custom(|iters| {
                    let c0 = common::thread_cpu();
                    let start = Instant::now();
                    for _ in 0..iters {
                        std::hint::black_box(c_loop.walk());
                    }
                    let e = start.elapsed();
                    t.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    cpu.borrow_mut().push((common::thread_cpu() - c0) / iters as f64);
                    e
                })
            });
        }
        times.push(("C loop".into(), t, cpu));
        for (guards, l, start) in &mut loaded {
            let name = format!("tancheck, guards {guards}");
            let t: Times = Rc::default();
            let cpu: Times = Rc::default();
            let (tt, cc) = (t.clone(), cpu.clone());
            g.bench_function(&name, |b| {
                b.iter_custom(|iters| {
                    let c0 = common::thread_cpu();
                    let begin = Instant::now();
                    for _ in 0..iters {
                        std::hint::black_box(tancheck_walk(l, start, ex, &path, 1));
                    }
                    let e = begin.elapsed();
                    tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    cc.borrow_mut().push((common::thread_cpu() - c0) / iters as f64);
                    e
                })
            });
            times.push((name, t, cpu));
        }
        {
            // Two threads, light guards: the same report, byte for byte, as one thread.
            let (guards, l, start) = &mut loaded[1];
            let json = |r: &tancheck::core::Report| {
                let mut v = Vec::new();
                tancheck::cli::report::json::write_check(r, &mut v).unwrap();
                v
            };
            let one = tancheck_walk(l, start, ex, &path, 1);
            let two = tancheck_walk(l, start, ex, &path, 2);
            assert!(json(&one.0) == json(&two.0), "{}: two threads gave another report", ex.label);
            assert_eq!((one.1, one.2), (two.1, two.2), "{}: two threads made other calls", ex.label);
            assert!(
                !two.0.notes.iter().any(|n| n.contains("checked on one thread")),
                "{}: {:?}",
                ex.label,
                two.0.notes
            );
            let name = format!("tancheck, guards {guards}, 2 threads");
            let t: Times = Rc::default();
            let tt = t.clone();
            g.bench_function(&name, |b| {
                b.iter_custom(|iters| {
                    let begin = Instant::now();
                    for _ in 0..iters {
                        std::hint::black_box(tancheck_walk(l, start, ex, &path, 2));
                    }
                    let e = begin.elapsed();
                    tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    e
                })
            });
            times.push((name, t, Rc::default()));
        }
        if ex.states > 0 {
            // What the command line adds: both reports, written to memory.
            let (guards, l, start) = &mut loaded[1];
            let name = format!("tancheck, guards {guards}, terminal and JSON reports");
            let t: Times = Rc::default();
            let cpu: Times = Rc::default();
            let (tt, cc) = (t.clone(), cpu.clone());
            g.bench_function(&name, |b| {
                b.iter_custom(|iters| {
                    let c0 = common::thread_cpu();
                    let begin = Instant::now();
                    for _ in 0..iters {
                        let (report, ..) = tancheck_walk(l, start, ex, &path, 1);
                        let mut text = std::io::sink();
                        Terminal::new(Detail::Normal, &mut text).check(&report).unwrap();
                        let mut json = Vec::new();
                        tancheck::cli::report::json::write_check(&report, &mut json).unwrap();
                        std::hint::black_box(json.len());
                    }
                    let e = begin.elapsed();
                    tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                    cc.borrow_mut().push((common::thread_cpu() - c0) / iters as f64);
                    e
                })
            });
            times.push((name, t, cpu));
        }
        g.finish();

        let (c_min, c_med) = stats(&times[0].1);
        let (c_cpu, _) = stats(&times[0].2);
        lines.push(format!(
            "   {}: C loop {:.1} ms per walk ({:.0} ns per routine call, fastest sample; {:.1} ms thread CPU)",
            ex.label,
            c_min * 1e3,
            c_min * 1e9 / (c.real_calls + c.complex_calls) as f64,
            c_cpu * 1e3
        ));
        for (name, t, cpu) in &times[1..] {
            let (min, med) = stats(t);
            let by_cpu = if cpu.borrow().is_empty() {
                String::new()
            } else {
                format!(", {:.2} (thread CPU)", stats(cpu).0 / c_cpu)
            };
            lines.push(format!(
                "   {}: {name}: {:.1} ms, ratio to the C loop {:.2} (fastest samples), {:.2} (medians){by_cpu}",
                ex.label,
                min * 1e3,
                min / c_min,
                med / c_med
            ));
        }
    }
    for increments in CLI_INCREMENTS {
        lines.extend(command_line(crit, &dir, increments));
    }
    println!("\ntancheck / C loop (one thread), {INCREMENTS}-increment cyclic tension-shear path:");
    for l in lines {
        println!("{l}");
    }
}

/// Increments of the command-line runs (each starts a process, `--isolate` two): a short
/// check, where the worker's start counts, and the whole path.
const CLI_INCREMENTS: [usize; 2] = [2_000, INCREMENTS];

/// `tancheck check` as a user runs it, plain (without and with `--json FILE`) and with
/// `--isolate` (one thread each, light guards, quiet), on the first `increments` increments of
/// the cyclic path: the ratios to the plain check, from wall-clock times and from the CPU time
/// of the processes.
fn command_line(crit: &mut Criterion, dir: &std::path::Path, increments: usize) -> Vec<String> {
    let path_file = dir.join(format!("cyclic-{increments}.json"));
    common::write_path_file(&common::cyclic_path(increments), &path_file);
    let manifest = dir.join("j2-light.json");
    let json = dir.join("command-line-report.json");
    let run = |isolate: bool, with_json: bool| {
        let mut c = std::process::Command::new(env!("CARGO_BIN_EXE_tancheck"));
        c.arg("check").arg(&manifest).arg("--path").arg(&path_file).args(["--jobs", "1", "-q"]);
        if isolate {
            c.arg("--isolate");
        }
        if with_json {
            c.arg("--json").arg(&json);
        }
        let o = c.output().expect("running tancheck");
        assert_eq!(o.status.code(), Some(0), "{}", String::from_utf8_lossy(&o.stderr));
    };
    let mut g = crit.benchmark_group(format!("command line, j2 C routine, {increments} increments"));
    g.sampling_mode(SamplingMode::Flat).sample_size(10).warm_up_time(Duration::from_secs(1));
    g.measurement_time(Duration::from_secs(6));
    let mut out = Vec::new();
    let mut results = Vec::new();
    // The worker of --isolate hands its report to the parent as JSON, so the plain check is
    // measured with and without --json.
    for (isolate, with_json) in [(false, false), (false, true), (true, false)] {
        let name = match (isolate, with_json) {
            (true, _) => "tancheck check --isolate",
            (false, true) => "tancheck check --json FILE",
            (false, false) => "tancheck check",
        };
        let (t, cpu): (Times, Times) = (Rc::default(), Rc::default());
        let (tt, cc) = (t.clone(), cpu.clone());
        g.bench_function(name, |b| {
            b.iter_custom(|iters| {
                let c0 = common::children_cpu();
                let begin = Instant::now();
                for _ in 0..iters {
                    run(isolate, with_json);
                }
                let e = begin.elapsed();
                tt.borrow_mut().push(e.as_secs_f64() / iters as f64);
                cc.borrow_mut().push((common::children_cpu() - c0) / iters as f64);
                e
            })
        });
        results.push((name, stats(&t), stats(&cpu)));
    }
    g.finish();
    let (_, (w0, m0), (c0, _)) = results[0];
    for (name, (w, m), (c, _)) in &results {
        out.push(format!(
            "   command line, j2, {increments} increments: {name}: {:.0} ms, ratio to plain {:.2} (fastest), {:.2} (medians), {:.2} (process CPU)",
            w * 1e3,
            w / w0,
            m / m0,
            c / c0
        ));
    }
    out
}

criterion_group!(benches, bench);
criterion_main!(benches);
