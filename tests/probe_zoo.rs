//! Compiled routines with one flaw each beyond the tangent (fortran-shim/examples/c/
//! probe_zoo.c) are caught by the probe that targets them: a saved variable by hidden-state,
//! a write to the strain input by immutability, a response that does not rotate with the frame
//! by frame, negative dissipation by energy.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use tancheck::abi::{build_library, BuildOptions, GuardLevel, Library};
use tancheck::cli::suite::Suite;
use tancheck::core::probe::{run_suite, ProbeSpec, ProbeStatus, SuiteReport};
use tancheck::core::{Caller, Convention, PointKind, PointState, RoutineInfo, Settings, ShearMeasure};

fn lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| {
        let d = std::env::temp_dir().join(format!("tancheck-probe-zoo-{}", std::process::id()));
        std::fs::create_dir_all(&d).unwrap();
        let out = d.join("libprobe_zoo.so");
        let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/probe_zoo.c");
        build_library(&BuildOptions::new([src], &out)).unwrap();
        out
    })
}

fn run(symbol: &str, nstate: usize, guards: GuardLevel, extra: &[ProbeSpec]) -> SuiteReport {
    let info = RoutineInfo {
        name: symbol.into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate,
        nprop: 2,
    };
    let library = Library::open(lib()).unwrap();
    let mut r = library.routine(symbol, info.clone()).unwrap();
    r.set_guard_level(guards);
    let suite = Suite::default_for(PointKind::Solid3d, false);
    let mut probes = suite.probes.clone();
    probes.extend_from_slice(extra);
    let mut caller = Caller::new(&mut r);
    let start = PointState::zero(&info, 20.0);
    run_suite(
        &mut caller,
        "solid+",
        &probes,
        &[210000.0, 0.3],
        &start,
        &suite.path().unwrap(),
        &Settings::default(),
    )
    .unwrap()
}

fn status(r: &SuiteReport, probe: &str) -> ProbeStatus {
    // The last result of that probe: an extra entry comes after the default suite's.
    r.results.iter().rev().find(|p| p.probe == probe).unwrap_or_else(|| panic!("no {probe} in {r:#?}")).status
}

#[test]
fn a_saved_variable_is_caught_by_the_hidden_state_probe() {
    let r = run("pz_saved_state", 0, GuardLevel::Light, &[]);
    assert_eq!(status(&r, "hidden-state"), ProbeStatus::Fail, "{r:#?}");
    assert_eq!(status(&r, "symmetry"), ProbeStatus::Pass);
    // The summary gives the size of the difference and where: a kept result changes the value,
    // not only its last bits (a warm start read the same as a saved result; a user-style sweep).
    let p = r.results.iter().rev().find(|p| p.probe == "hidden-state").unwrap();
    assert!(p.summary.contains("stress[") && p.summary.contains("relative"), "{}", p.summary);
    assert!(!p.summary.contains("only in the last bits"), "{}", p.summary);
    assert!(p.value.is_some_and(|v| v > 1e-12), "{p:#?}");
}

#[test]
fn a_write_to_the_strain_input_is_caught_by_immutability_and_by_the_guards() {
    // Without guards the routine writes into the caller's strain: the probe sees it.
    let r = run("pz_writes_strain", 0, GuardLevel::Off, &[]);
    let p = r.results.iter().find(|p| p.probe == "immutability").unwrap();
    assert_eq!(p.status, ProbeStatus::Fail, "{p:#?}");
    assert!(p.summary.contains("strain["), "{p:?}");
    // With guards (the default), the guard reports it at the first call.
    let r = run("pz_writes_strain", 0, GuardLevel::Light, &[]);
    let t = r.results.iter().find(|p| p.probe == "tangent").unwrap();
    assert_eq!(t.status, ProbeStatus::Fail);
    assert!(r.results.iter().any(|p| p.summary.contains("read-only input strain")), "{r:#?}");
}

#[test]
fn a_response_that_does_not_rotate_is_caught_by_the_frame_probe() {
    // It claims isotropy (properties [E, ν] only): declared isotropic, the frame probe fails it.
    let declared = ProbeSpec { anisotropic: Some(false), ..ProbeSpec::named("frame") };
    let r = run("pz_not_objective", 0, GuardLevel::Light, &[declared]);
    assert_eq!(status(&r, "frame"), ProbeStatus::Fail, "{r:#?}");
    // Its tangent is exact: the tangent probe passes.
    assert_eq!(status(&r, "tangent"), ProbeStatus::Pass, "{r:#?}");
}

#[test]
fn negative_dissipation_is_caught_by_the_energy_probe() {
    let r = run("pz_negative_dissipation", 1, GuardLevel::Light, &[]);
    let e = r.results.iter().find(|p| p.probe == "energy").unwrap();
    assert_eq!(e.status, ProbeStatus::Fail, "{e:#?}");
    assert!(e.summary.contains("dissipated energy decreases"), "{e:?}");
    assert_eq!(status(&r, "tangent"), ProbeStatus::Pass);
}

// pz_saved_state under a default check (light guards, default settings): the full guards on
// the first call of the first branch repeat that call and see another result. Without the
// first-call looks, the increment its saved state makes fail is diagnosed, and the diagnosis
// makes the base call again first: the same fault (it was a tangent failure before).
#[test]
fn a_default_check_finds_results_that_depend_on_call_history() {
    use tancheck::core::{check, Verdict};
    let info = RoutineInfo {
        name: "pz_saved_state".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 0,
        nprop: 2,
    };
    let library = Library::open(lib()).unwrap();
    let path = tancheck::core::Path::ramp(tancheck::core::Shape::TensionShear, 1e-3, 3, 0);
    let run = |settings: &Settings| {
        let mut r = library.routine("pz_saved_state", info.clone()).unwrap();
        let mut caller = Caller::new(&mut r);
        check::run(&mut caller, &[210000.0, 0.3], PointState::zero(&info, 20.0), &path, settings).unwrap()
    };
    let rep = run(&Settings::default());
    assert_eq!(rep.verdict, Verdict::RoutineFault, "{rep:#?}");
    let f = rep.first_fault().unwrap();
    assert!(f.message.contains("different results for two identical calls"), "{}", f.message);
    let without = run(&Settings { first_calls: false, ..Settings::default() });
    assert_eq!(without.verdict, Verdict::RoutineFault, "{without:#?}");
    let f = without.first_fault().unwrap();
    assert!(f.message.contains("its results depend on the history of calls"), "{}", f.message);
}
