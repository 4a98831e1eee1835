//! The ply suite's path (`probes/ply.json`) reaches every mode of the ply: along it the damage
//! of fibre tension, fibre compression, matrix tension and matrix compression each grows,
//! stops while the mode unloads, and grows again when it is reloaded past its largest load —
//! in solid-3d and plane stress. The correct ply routine passes the tangent check along it in
//! Rust, C and Fortran (with and without viscous damage), the whole suite passes on it, and a
//! secant tangent is caught in the growth of every mode. Properties are demo numbers (a
//! made-up carbon/epoxy ply, MPa, N/mm, mm).

use std::path::{Path as FsPath, PathBuf};
use std::sync::OnceLock;

use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::cli::suite::Suite;
use tancheck::core::driver::Driver;
use tancheck::core::path::Path;
use tancheck::core::probe::{run_suite, ProbeStatus};
use tancheck::core::{
    check, Caller, Model, ModelRoutine, PointState, Routine, RoutineInfo, Settings, Verdict,
};
use tancheck::models::ply::mode;
use tancheck::models::{Ply, PlyFlaw};

fn suite() -> Suite {
    Suite::parse(include_str!("../probes/ply.json"), FsPath::new("probes/ply.json")).unwrap()
}

fn ply_path() -> Path {
    suite().path().unwrap()
}

fn props(eta: f64) -> Vec<f64> {
    vec![
        138000.0, 11000.0, 11000.0, 0.28, 0.28, 0.4, 5500.0, 5500.0, 3928.57, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0,
        1500.0, 900.0, 27.0, 200.0, 80.0, 90.0, 80.0, 0.25, 2.0, 0.5, eta,
    ]
}

/// The increments (1-based) where each mode's damage grows (`offset` 4), or its failure
/// measure r grows beyond 1 (`offset` 0: with viscous damage, the damage itself keeps
/// relaxing towards that of r while the mode unloads).
fn growth(routine: &mut dyn Routine, props: &[f64], path: &Path, offset: usize) -> [Vec<usize>; 4] {
    let info = routine.info().clone();
    let conv = info.convention.clone();
    let mut caller = Caller::new(routine);
    let mut d = Driver::new(&info, props, PointState::zero(&info, 20.0)).unwrap();
    let mut de = vec![0.0; conv.ncomp()];
    let mut grew: [Vec<usize>; 4] = Default::default();
    for (k, inc) in path.increments.iter().enumerate() {
        conv.strain_from_canonical(&inc.dstrain, &mut de);
        d.set_increment(&de, inc.dtemp, inc.dtime);
        d.base_call(&mut caller).unwrap();
        for (m, g) in grew.iter_mut().enumerate() {
            assert!(d.base.state[4 + m] < 1.0, "{}: mode {m} fully failed at increment {}", info.name, k + 1);
            let (before, after) = (d.start().state[offset + m], d.base.state[offset + m]);
            if after > before && (offset == 4 || after > 1.0) {
                g.push(k + 1);
            }
        }
        d.advance();
    }
    grew
}

/// Runs of consecutive increments.
fn runs(v: &[usize]) -> Vec<(usize, usize)> {
    let mut out: Vec<(usize, usize)> = Vec::new();
    for &k in v {
        match out.last_mut() {
            Some((_, end)) if *end + 1 == k => *end = k,
            _ => out.push((k, k)),
        }
    }
    out
}

/// Where each mode's segment lies on the path (probes/ply.json, its description).
const SEGMENTS: [(usize, std::ops::RangeInclusive<usize>); 4] =
    [(mode::MT, 1..=16), (mode::MC, 17..=32), (mode::FC, 38..=48), (mode::FT, 49..=62)];

fn assert_every_mode(grew: &[Vec<usize>; 4], who: &str) {
    for (m, range) in SEGMENTS {
        let own: Vec<usize> = grew[m].iter().copied().filter(|k| range.contains(k)).collect();
        let r = runs(&own);
        assert!(
            r.len() >= 2,
            "{who}: {} must grow, stop while unloading and grow again on reloading in {range:?}: grows at {:?}",
            mode::NAMES[m],
            grew[m]
        );
    }
}

#[test]
fn every_mode_grows_stops_on_unloading_and_grows_on_reloading() {
    for kind in Ply::KINDS {
        for (eta, offset) in [(0.0, 4), (0.02, 0)] {
            let mut m = ModelRoutine(Ply::new(kind).unwrap());
            let grew = growth(&mut m, &props(eta), &ply_path(), offset);
            assert_every_mode(&grew, &format!("Rust {kind}, eta {eta}"));
        }
    }
}

fn assert_passes(routine: &mut dyn Routine, eta: f64) {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    let r = check::run(
        &mut caller,
        &props(eta),
        PointState::zero(&info, 20.0),
        &ply_path(),
        &Settings::default(),
    )
    .unwrap();
    let failed: Vec<_> = r.increments.iter().filter(|i| !i.passed()).map(|i| i.index).collect();
    assert_eq!(r.verdict, Verdict::Pass, "{} (eta {eta}): failed at {failed:?}, {}", info.name, r.finding());
    // Every branch of the model is reached: elastic, growth, damaged without growth.
    for b in [0, 1, 2] {
        let reached = r.increments.iter().any(|i| i.reported_branch == Some(b));
        assert!(reached, "{}: branch {b} not reached", info.name);
    }
}

#[test]
fn the_rust_ply_passes_the_check_along_the_path_and_a_secant_is_caught_in_every_mode() {
    for kind in Ply::KINDS {
        for eta in [0.0, 0.02] {
            assert_passes(&mut ModelRoutine(Ply::new(kind).unwrap()), eta);
        }
        let mut bad = ModelRoutine(Ply::with_flaw(kind, PlyFlaw::Secant).unwrap());
        let info = bad.info().clone();
        let mut caller = Caller::new(&mut bad);
        let r = check::run(
            &mut caller,
            &props(0.0),
            PointState::zero(&info, 20.0),
            &ply_path(),
            &Settings::default(),
        )
        .unwrap();
        let failed: Vec<usize> = r.increments.iter().filter(|i| !i.passed()).map(|i| i.index).collect();
        for (m, range) in SEGMENTS {
            assert!(
                failed.iter().any(|k| range.contains(k)),
                "{kind}: the secant tangent must fail in {} ({range:?}); failed at {failed:?}",
                mode::NAMES[m]
            );
        }
        assert_eq!(r.finding(), "secant", "{kind}");
    }
}

#[test]
fn the_ply_suite_passes_the_rust_ply() {
    let s = suite();
    for kind in Ply::KINDS {
        let mut m = ModelRoutine(Ply::new(kind).unwrap());
        let info = m.info().clone();
        let mut caller = Caller::new(&mut m);
        let rep = run_suite(
            &mut caller,
            &s.suite,
            &s.probes,
            &props(0.0),
            &PointState::zero(&info, 20.0),
            &ply_path(),
            &Settings::default(),
        )
        .unwrap();
        for r in &rep.results {
            assert_ne!(r.status, ProbeStatus::Fail, "{kind}: {}: {}", r.probe, r.summary);
            assert_ne!(r.status, ProbeStatus::Skipped, "{kind}: {} applies here: {}", r.probe, r.summary);
        }
        assert!(rep.pass);
    }
}

fn examples() -> PathBuf {
    FsPath::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples")
}

fn build(name: &str, source: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("tancheck-plypaths-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join(format!("lib{name}.so"));
    build_library(&BuildOptions::new([examples().join(source)], &out))
        .unwrap_or_else(|e| panic!("building {name}: {e}"));
    out
}

fn c_lib() -> &'static FsPath {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("ply_c", "c/ply.c"))
}

fn f_lib() -> &'static FsPath {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("ply_f", "fortran/ply.F90"))
}

fn compiled(lib_path: &FsPath, prefix: &str) {
    let lib = Library::open(lib_path).unwrap();
    let sym = format!("{prefix}_ply");
    for kind in Ply::KINDS {
        let info = Ply::new(kind).unwrap().info().clone();
        let mut r = lib.routine(&sym, RoutineInfo { name: sym.clone(), ..info }).unwrap();
        let grew = growth(&mut r, &props(0.0), &ply_path(), 4);
        assert_every_mode(&grew, &format!("{sym} {kind}"));
        for eta in [0.0, 0.02] {
            assert_passes(&mut r, eta);
        }
    }
}

#[test]
fn the_c_ply_passes_the_check_along_the_path() {
    compiled(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn the_fortran_ply_passes_the_check_along_the_path() {
    compiled(f_lib(), "f");
}
