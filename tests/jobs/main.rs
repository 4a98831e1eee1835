//! A check on two threads gives the same report as on one, bit for bit (the JSON reports of
//! the bundled C and Fortran example routines, correct and flawed, compared byte for byte),
//! and a routine that is not safe to call from several threads at once is caught by the
//! thread-safety probe and checked on one thread, with the reason in the report.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;

use tancheck::abi::{build_library, BuildOptions, Library};
use tancheck::core::{
    concurrent, Caller, Convention, Driver, PointKind, PointState, RoutineInfo, ShearMeasure,
};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

use tancheck_testkit::libs::{scratch, solid_manifest};

fn repo(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

mod routines;

use routines::{ISOTROPIC_TANGENT_C, LATE_C, SHARED_BUFFER_C};

fn c_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| {
        let d = scratch("c");
        let shared = d.join("shared.c");
        std::fs::write(&shared, SHARED_BUFFER_C.replace("ISOTROPIC_TANGENT", ISOTROPIC_TANGENT_C)).unwrap();
        let late = d.join("late.c");
        std::fs::write(&late, LATE_C.replace("ISOTROPIC_TANGENT", ISOTROPIC_TANGENT_C)).unwrap();
        let out = d.join("libjobs_c.so");
        let sources =
            [repo("fortran-shim/examples/c/elastic.c"), repo("fortran-shim/examples/c/j2.c"), shared, late];
        build_library(&BuildOptions::new(sources, &out)).unwrap_or_else(|e| panic!("{e}"));
        out
    })
}

/// The path of the checks below: long enough for two threads to pay for the walk and the
/// probe (`concurrent::worth_threads`).
const PATH_SPEC: &str = "tension-shear:6e-3:200:200";

const J2_PROPS: &str = "[210000, 0.3, 355, 1200, 150, 12, 2500]";
const ELASTIC_PROPS: &str = "[210000, 0.3]";

/// `tancheck check` of `symbol` on 400 increments into the plastic range and back, with
/// `--jobs jobs`: exit code, JSON report and terminal output.
fn check(lib: &Path, symbol: &str, states: usize, props: &str, jobs: u32) -> (Option<i32>, Vec<u8>, String) {
    check_guarded(lib, symbol, states, props, jobs, "light")
}

/// [`check`] with the memory guards at `guards`.
fn check_guarded(
    lib: &Path,
    symbol: &str,
    states: usize,
    props: &str,
    jobs: u32,
    guards: &str,
) -> (Option<i32>, Vec<u8>, String) {
    let d = scratch(&format!("{symbol}-{jobs}-{guards}"));
    let m = solid_manifest(&d, lib, symbol, states, props, &format!(r#", "guards": "{guards}""#));
    let json = d.join("report.json");
    let o = bin()
        .arg("check")
        .arg(&m)
        .args(["--path", PATH_SPEC, "--json"])
        .arg(&json)
        .args(["--jobs", &jobs.to_string()])
        .output()
        .unwrap();
    (o.status.code(), std::fs::read(&json).unwrap_or_default(), text(&o))
}

fn same_on_one_and_two_threads(lib: &Path, symbol: &str, states: usize, props: &str, want: i32) {
    same_on_one_and_two_threads_guarded(lib, symbol, states, props, want, "light");
}

fn same_on_one_and_two_threads_guarded(
    lib: &Path,
    symbol: &str,
    states: usize,
    props: &str,
    want: i32,
    guards: &str,
) {
    let (c1, j1, t1) = check_guarded(lib, symbol, states, props, 1, guards);
    let (c2, j2, t2) = check_guarded(lib, symbol, states, props, 2, guards);
    assert_eq!(c1, Some(want), "{symbol}, one thread: {t1}");
    assert_eq!(c2, Some(want), "{symbol}, two threads: {t2}");
    assert!(!j1.is_empty());
    assert!(j1 == j2, "{symbol}: the JSON reports differ between --jobs 1 and --jobs 2");
    assert!(!t2.contains("checked on one thread"), "{symbol}: {t2}");
}

#[test]
fn c_examples_give_the_same_report_on_one_and_two_threads() {
    let lib = c_lib();
    same_on_one_and_two_threads(lib, "c_elastic", 0, ELASTIC_PROPS, 0);
    same_on_one_and_two_threads(lib, "c_j2", 13, J2_PROPS, 0);
    // Flawed on purpose: every plastic increment fails and is diagnosed, also the first one
    // of the second thread's share (the stale-tangent hypothesis needs the tangent before it).
    same_on_one_and_two_threads(lib, "c_j2_continuum", 13, J2_PROPS, 1);
    // Under the full guards every call is rerun; the increment a later thread checks before its
    // share makes such reruns too, which one thread makes only once.
    same_on_one_and_two_threads_guarded(lib, "c_elastic", 0, ELASTIC_PROPS, 0, "full");
    same_on_one_and_two_threads_guarded(lib, "c_j2", 13, J2_PROPS, 0, "full");
}

/// A path too short for the walk and the probe to pay for themselves is checked on one thread
/// (no note: nothing is wrong with the routine).
#[test]
fn a_short_path_is_checked_on_one_thread() {
    let lib = Library::open(c_lib()).unwrap();
    let i = info(13, 7);
    let mut j2 = lib.routine("c_j2", i.clone()).unwrap();
    let mut caller = Caller::new(&mut j2);
    let settings = two_threads();
    let short = ramp(40);
    assert!(concurrent::plan(&mut caller, &short, &settings).is_none());
    let long = ramp(200);
    assert!(concurrent::plan(&mut caller, &long, &settings).is_some());
    let report =
        check_from_zero(&mut caller, &i, &[210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0], &short);
    assert_eq!(report.settings.jobs, 1);
    assert!(report.notes.iter().all(|n| !n.contains("one thread")), "{:?}", report.notes);
}

/// A routine that cannot compute an increment of the path ends the walk there: the path is
/// checked on one thread, which meets the fault, and the report says it was made on one
/// thread, so that the command line and the C API do not make it a third time.
#[test]
fn a_walk_that_meets_a_fault_leaves_the_check_to_one_thread() {
    let lib = Library::open(c_lib()).unwrap();
    let i = info(0, 2);
    let mut late = lib.routine("c_late_fails", i.clone()).unwrap();
    let mut caller = Caller::new(&mut late);
    let report = check_from_zero(&mut caller, &i, &[210000.0, 0.3], &ramp(200));
    assert_eq!(report.verdict, tancheck::core::Verdict::RoutineFault);
    assert_eq!(report.settings.jobs, 1);
    let (c1, j1, _) = check(c_lib(), "c_late_fails", 0, ELASTIC_PROPS, 1);
    let (c2, j2, _) = check(c_lib(), "c_late_fails", 0, ELASTIC_PROPS, 2);
    assert_eq!((c1, c2), (Some(3), Some(3)));
    assert!(j1 == j2, "the JSON reports differ between --jobs 1 and --jobs 2");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_examples_give_the_same_report_on_one_and_two_threads() {
    let d = scratch("f");
    let out = d.join("libjobs_f.so");
    let sources =
        [repo("fortran-shim/examples/fortran/elastic.F90"), repo("fortran-shim/examples/fortran/j2.F90")];
    build_library(&BuildOptions::new(sources, &out)).unwrap_or_else(|e| panic!("{e}"));
    same_on_one_and_two_threads(&out, "f_elastic", 0, ELASTIC_PROPS, 0);
    same_on_one_and_two_threads(&out, "f_j2", 13, J2_PROPS, 0);
    same_on_one_and_two_threads(&out, "f_j2_continuum", 13, J2_PROPS, 1);
}

/// The tension–shear ramp to 6e-3 in `steps` increments and back (`PATH_SPEC` for 200).
fn ramp(steps: usize) -> tancheck::core::Path {
    tancheck::core::Path::ramp(tancheck::core::Shape::TensionShear, 6e-3, steps, steps)
}

/// The default settings on two threads.
fn two_threads() -> tancheck::core::Settings {
    tancheck::core::Settings { jobs: 2, ..Default::default() }
}

/// A check on two threads along `path`, from the zero state at 20°.
fn check_from_zero(
    caller: &mut Caller<'_>,
    i: &RoutineInfo,
    props: &[f64],
    path: &tancheck::core::Path,
) -> tancheck::core::Report {
    tancheck::core::check::run(caller, props, PointState::zero(i, 20.0), path, &two_threads()).unwrap()
}

fn info(nstate: usize, nprop: usize) -> RoutineInfo {
    RoutineInfo {
        name: "jobs".into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate,
        nprop,
    }
}

/// The reason the probe gives, or `None` when the routine passed it.
fn probe_verdict(symbol: &str, nstate: usize, props: &[f64]) -> Option<String> {
    let lib = Library::open(c_lib()).unwrap();
    let path = ramp(200);
    let settings = two_threads();
    let i = info(nstate, props.len());
    let mut routine = lib.routine(symbol, i.clone()).unwrap();
    let driver = Driver::new(&i, props, PointState::zero(&i, 20.0)).unwrap();
    let mut caller = Caller::new(&mut routine);
    assert!(concurrent::plan(&mut caller, &path, &settings).is_some_and(|p| p.threads() == 2));
    let verdict = concurrent::probe(&mut caller, &driver, &path, &settings);
    assert_eq!(
        (caller.real_calls, caller.complex_calls),
        (0, 0),
        "{symbol}: the probe's calls are not counted"
    );
    match verdict {
        Ok(()) => None,
        Err(concurrent::Serial::Because(why)) => Some(why),
        Err(concurrent::Serial::Faulted(f)) => panic!("{symbol}: the walk or the probe faulted: {f}"),
    }
}

/// The probe itself: the J2 routine passes, the shared-buffer one fails with a reason.
#[test]
fn the_probe_passes_a_thread_safe_routine_and_catches_a_shared_buffer() {
    assert_eq!(probe_verdict("c_j2", 13, &[210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0]), None);
    // A race shows only when the threads' calls overlap (three probes allowed, as below).
    let why = (0..3)
        .find_map(|_| probe_verdict("c_elastic_shared", 0, &[210000.0, 0.3]))
        .expect("the shared buffer is caught");
    assert!(why.starts_with("calls from several threads at once"), "{why}");
}

/// The probe also calls increments of the path from the states the path reaches: a routine
/// whose work array is shared only in a loaded state is caught.
#[test]
fn the_probe_catches_a_shared_buffer_used_only_once_the_path_has_loaded_the_point() {
    let why = (0..3)
        .find_map(|_| probe_verdict("c_late_shared", 0, &[210000.0, 0.3]))
        .expect("the late shared buffer is caught");
    assert!(
        why.starts_with("calls from several threads at once")
            && why.contains("of the path, from the state the path reached"),
        "{why}"
    );
}

/// The walk and the probe make only calls the check makes itself: a routine that ends the
/// process on an increment no path gives it, or whose guards find something the check on one
/// thread meets too, gives the report of one thread.
#[test]
fn threads_make_no_call_one_thread_would_not_and_keep_its_findings() {
    let (c1, j1, t1) = check(c_lib(), "c_big_abort", 0, ELASTIC_PROPS, 1);
    let (c2, j2, t2) = check(c_lib(), "c_big_abort", 0, ELASTIC_PROPS, 2);
    assert_eq!((c1, c2), (Some(0), Some(0)), "{t1}\n{t2}");
    assert!(j1 == j2, "the JSON reports differ:\n{t2}");
    let (c1, j1, t1) = check(c_lib(), "c_late_skip", 1, ELASTIC_PROPS, 1);
    let (c2, j2, t2) = check(c_lib(), "c_late_skip", 1, ELASTIC_PROPS, 2);
    assert_eq!((c1, c2), (Some(3), Some(3)), "{t1}\n{t2}");
    assert!(t1.contains("unwritten"), "{t1}");
    assert!(j1 == j2, "the JSON reports differ:\n{t2}");
}

/// What a call that asks for the tangent leaves in a static for the calls that do not is
/// caught: the probe calls each increment both ways, as a check does. A race shows only when
/// the threads' calls overlap, which a machine busy with other tests may prevent in one
/// probe: the test allows three.
#[test]
fn the_probe_catches_a_static_passed_from_the_base_call_to_the_perturbed_ones() {
    let why = (0..3)
        .find_map(|_| probe_verdict("c_tangent_then_perturbed", 0, &[210000.0, 0.3]))
        .expect("the static is caught");
    assert!(why.starts_with("calls from several threads at once"), "{why}");
    let (c1, j1, t1) = check(c_lib(), "c_tangent_then_perturbed", 0, ELASTIC_PROPS, 1);
    assert_eq!(c1, Some(0), "{t1}");
    let (c2, j2, t2) = (0..3)
        .map(|_| check(c_lib(), "c_tangent_then_perturbed", 0, ELASTIC_PROPS, 2))
        .find(|(_, _, t)| t.contains("checked on one thread instead of 2"))
        .expect("the two-thread check gives way to one thread");
    assert_eq!(c2, Some(0), "{t2}");
    assert_eq!(without_notes(&j1), without_notes(&j2));
}

/// The JSON report without its notes.
fn without_notes(json: &[u8]) -> serde_json::Value {
    let mut v: serde_json::Value = serde_json::from_slice(json).expect("a JSON report");
    v.as_object_mut().expect("an object").remove("notes");
    v
}

/// Routines whose loaded calls depend on the calls before them. The guards' repeated first
/// call of a newly reached branch catches both (exit 3, on one thread and on two); without the
/// guards, the probe's calls of the path's increments catch the one that counts its calls,
/// and the comparison after the threads catches the one whose base calls within a check
/// differ from a walk's (the calls before them differ): the check is made again on one thread,
/// with the same report as `--jobs 1` but for the note saying why: made on a new instance of
/// the library, since the walk, the probe and the threads have changed the statics of the
/// instance they called.
#[test]
fn a_result_that_depends_on_the_calls_before_has_the_check_made_on_one_thread() {
    for symbol in ["c_late_count", "c_late_after_perturbed"] {
        let (c1, _, t1) = check(c_lib(), symbol, 0, ELASTIC_PROPS, 1);
        let (c2, _, t2) = check(c_lib(), symbol, 0, ELASTIC_PROPS, 2);
        assert_eq!((c1, c2), (Some(3), Some(3)), "{t1}\n{t2}");
        assert!(t2.contains("gave different results for two identical calls"), "{t2}");
    }

    let (c1, j1, t1) = check_guarded(c_lib(), "c_late_count", 0, ELASTIC_PROPS, 1, "off");
    let (code, json, t) = check_guarded(c_lib(), "c_late_count", 0, ELASTIC_PROPS, 2, "off");
    // The increment whose results change fails its check, and the diagnosis's repeat of the
    // base call names the history of calls (it was diagnosed as a cause before): a fault, on
    // one thread and on two.
    assert_eq!((c1, code), (Some(3), Some(3)), "{t1}\n{t}");
    assert!(t.contains("its results depend on the history of calls"), "{t}");
    assert_eq!(without_notes(&j1), without_notes(&json), "the counted calls start from the count at load");
    let json = String::from_utf8(json).unwrap();
    assert!(
        json.contains("checked on one thread instead of 2: the same call gave different results"),
        "{json}"
    );

    let (c1, j1, t1) = check_guarded(c_lib(), "c_late_after_perturbed", 0, ELASTIC_PROPS, 1, "off");
    let (c2, j2, t2) = check_guarded(c_lib(), "c_late_after_perturbed", 0, ELASTIC_PROPS, 2, "off");
    assert_eq!(c1, c2, "{t1}\n{t2}");
    assert_ne!(c1, Some(3), "{t1}");
    let text = String::from_utf8(j2.clone()).unwrap();
    assert!(
        text.contains("checked on one thread instead of 2: increment ")
            && text.contains("ended in another state within the check than in a walk of the path"),
        "{text}"
    );
    assert!(!String::from_utf8(j1.clone()).unwrap().contains("checked on one thread"));
    assert_eq!(without_notes(&j1), without_notes(&j2));
}

/// Through the command line: the shared-buffer routine runs on one thread, says why, and
/// still passes (its serial results are right).
#[test]
fn a_routine_that_fails_the_probe_runs_on_one_thread_and_the_report_says_why() {
    // The attempt on two threads, given up, leaves nothing behind: under every guard level
    // the report is the one of one thread, with the note. (A race shows only when the
    // threads' calls overlap, which a machine busy with other tests may prevent in one run:
    // the test allows three.)
    for guards in ["light", "full"] {
        let (c1, j1, t1) = check_guarded(c_lib(), "c_elastic_shared", 0, ELASTIC_PROPS, 1, guards);
        assert_eq!(c1, Some(0), "{guards}: {t1}");
        let (c2, j2, t2) = (0..3)
            .map(|_| check_guarded(c_lib(), "c_elastic_shared", 0, ELASTIC_PROPS, 2, guards))
            .find(|(_, j, _)| String::from_utf8_lossy(j).contains("checked on one thread instead of 2"))
            .expect("the two-thread check gives way to one thread, with a note");
        assert_eq!(c2, Some(0), "{guards}: {t2}");
        assert_eq!(without_notes(&j1), without_notes(&j2), "{guards}");
    }
}

/// Routines the memory guards catch give the same report on two threads: the fault where one
/// thread meets it, the increments after it dropped (and the probe's own calls leave nothing
/// in the guards of the routine the check calls).
#[test]
fn guard_findings_are_the_same_on_one_and_two_threads() {
    let d = scratch("misbehave");
    let lib = d.join("libmisbehave.so");
    build_library(&BuildOptions::new([repo("fortran-shim/examples/c/misbehave.c")], &lib))
        .unwrap_or_else(|e| panic!("{e}"));
    for symbol in ["bad_writes_strain", "bad_state_overrun", "bad_tangent_hole"] {
        let (c1, j1, t1) = check(&lib, symbol, 2, ELASTIC_PROPS, 1);
        let (c2, j2, t2) = check(&lib, symbol, 2, ELASTIC_PROPS, 2);
        assert_eq!(c1, Some(3), "{symbol}: {t1}");
        assert_eq!(c2, Some(3), "{symbol}: {t2}");
        assert!(j1 == j2, "{symbol}: the JSON reports differ between --jobs 1 and --jobs 2");
    }
}

// A check on two threads reports what one thread reports when the memory guards find
// something or make extra calls: each thread's routine handle keeps its own findings (a
// finding new to a handle ends that call with a fault), so a check whose guards found
// something is made again on one thread, and the full guards' reruns on a later thread's
// handle are counted with the check's (`concurrent::redo_on_one_thread`,
// `Routine::absorb_guard_extra_calls`).

/// Correct linear elasticity; a call without TC_WANT_TANGENT writes stress[n] (past the end)
/// while strain[0] is in (1e-3, 2e-3); with `BASE_TOO`, a call with TC_WANT_TANGENT does the
/// same while strain[0] is in (4e-3, 5e-3).
const GUARD_SRC: &str = r#"
#include "tancheck_cstep.h"
#include "tancheck_routine.h"
TC_ROUTINE(NAME)
{
    (void)temperature; (void)dstress_dtemp;
    const int n = call->ncomp;
    ISOTROPIC_TANGENT
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) s += tangent[i + 6 * j] * dstrain[j];
        stress[i] = s;
    }
    double e0 = tc_re(strain[0]);
    int want = call->flags & TC_WANT_TANGENT;
    if (!BRANCHES && ((!want && e0 > 1e-3 && e0 < 2e-3) || (BASE_TOO && want && e0 > 4e-3 && e0 < 5e-3))) stress[n] = 1.0;
    energy->stored = 0.0;
    energy->dissipated = 0.0;
    report->branch = BRANCHES ? ((e0 < 3e-3 && tc_re(dstrain[0]) < 0.0) ? 1 : 0) : 0;
    report->status = TC_STATUS_OK;
}
"#;

fn guard_lib(name: &str, base_too: bool) -> PathBuf {
    guard_lib_with(name, base_too, false)
}

fn guard_lib_with(name: &str, base_too: bool, branches: bool) -> PathBuf {
    let d = scratch(name);
    let src = d.join(format!("{name}.c"));
    let text = GUARD_SRC
        .replace("ISOTROPIC_TANGENT", ISOTROPIC_TANGENT_C)
        .replace("NAME", name)
        .replace("BASE_TOO", if base_too { "1" } else { "0" })
        .replace("BRANCHES", if branches { "1" } else { "0" });
    std::fs::write(&src, text).unwrap();
    let out = d.join(format!("lib{name}.so"));
    build_library(&BuildOptions::new(vec![src], &out)).unwrap_or_else(|e| panic!("{e}"));
    out
}

/// The finding recurs in the second share: that thread's handle sees it for the first time
/// and faults there, and its calls are missing from the finding's count.
#[test]
fn a_recurring_guard_finding_gives_the_same_report_on_two_threads() {
    let l = guard_lib("jg_perturbed", false);
    let (c1, j1, t1) = check(&l, "jg_perturbed", 0, ELASTIC_PROPS, 1);
    let (c2, j2, t2) = check(&l, "jg_perturbed", 0, ELASTIC_PROPS, 2);
    assert_eq!(c1, c2);
    assert!(j1 == j2, "JSON reports differ\n--- one thread:\n{t1}\n--- two threads:\n{t2}");
}

/// The finding, first seen in a perturbed call, recurs in a base call before the second
/// share: that thread's walk faults and the two-thread report silently loses the share.
#[test]
fn a_guard_finding_in_the_walk_does_not_cut_the_report_short() {
    let l = guard_lib("jg_walk", true);
    let (_, _, t1) = check(&l, "jg_walk", 0, ELASTIC_PROPS, 1);
    let (_, _, t2) = check(&l, "jg_walk", 0, ELASTIC_PROPS, 2);
    assert!(t1.contains("of 400 checks"), "{t1}");
    assert!(t2.contains("of 400 checks"), "two threads checked fewer increments:\n{t2}");
}

/// A correct routine whose branch 1 is first reached in the second share: that thread's
/// handle makes the full-guard rerun, and its extra call is missing from the report.
#[test]
fn the_guards_extra_calls_are_the_same_on_two_threads() {
    let l = guard_lib_with("jg_branch", false, true);
    let (c1, j1, t1) = check(&l, "jg_branch", 0, ELASTIC_PROPS, 1);
    let (c2, j2, t2) = check(&l, "jg_branch", 0, ELASTIC_PROPS, 2);
    assert_eq!((c1, c2), (Some(0), Some(0)), "{t1}\n{t2}");
    assert!(j1 == j2, "JSON reports differ (guard extra_calls)");
}

/// A check on two threads tells its progress as the threads go (the count of increments the
/// shares have checked, never going back), not only once they have all finished.
#[test]
fn a_check_on_two_threads_shows_its_progress_as_it_goes() {
    let lib = Library::open(c_lib()).unwrap();
    let props = [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0];
    let i = info(13, props.len());
    let mut routine = lib.routine("c_j2", i.clone()).unwrap();
    let mut caller = Caller::new(&mut routine);
    let path = ramp(200);
    let mut told = Vec::new();
    let report = tancheck::core::check::run_with(
        &mut caller,
        &props,
        PointState::zero(&i, 20.0),
        &path,
        &two_threads(),
        tancheck::core::report::Keep::Failures,
        &mut |k| told.push(k),
    )
    .unwrap();
    assert_eq!(report.settings.jobs, 2, "checked on two threads");
    let n = path.increments.len();
    assert_eq!(told.last(), Some(&n), "{told:?}");
    assert!(told.windows(2).all(|w| w[0] <= w[1]), "never goes back: {told:?}");
    // The caller's own share alone is more than a tenth of the path, told increment by
    // increment while the other thread works.
    assert!(told.iter().filter(|&&k| k > 0 && k < n).count() > n / 10, "{told:?}");
}

/// A check on two threads adds up the ∂σ/∂T failures and checks of every share (a later
/// share's were left out when its summary was added to the first's): the summary and the JSON
/// report are one thread's. The C thermo routine whose ∂σ/∂T misses its expansion term.
#[test]
fn two_threads_count_the_dtemp_failures_of_every_share() {
    let d = scratch("thermo");
    let lib = d.join("libjobs_thermo.so");
    build_library(&BuildOptions::new([repo("fortran-shim/examples/c/thermo.c")], &lib))
        .unwrap_or_else(|e| panic!("{e}"));
    let lib = Library::open(&lib).unwrap();
    // E20, ν0, ν1, no modulus law, linear expansion, α (the thermo model's properties).
    let props = [210000.0, 0.3, 1e-5, 0.0, 0.0, 1.2e-5];
    let i = info(0, props.len());
    let mut path = ramp(300);
    for inc in &mut path.increments {
        inc.dtemp = 0.05;
    }
    let report = |jobs: usize| {
        let mut routine = lib.routine("c_thermo_partial_dtemp", i.clone()).unwrap();
        let mut caller = Caller::new(&mut routine);
        let settings = tancheck::core::Settings { jobs, ..Default::default() };
        tancheck::core::check::run_with(
            &mut caller,
            &props,
            PointState::zero(&i, 20.0),
            &path,
            &settings,
            tancheck::core::report::Keep::Failures,
            &mut |_| {},
        )
        .unwrap()
    };
    let (one, two) = (report(1), report(2));
    assert_eq!((one.settings.jobs, two.settings.jobs), (1, 2), "checked on two threads");
    assert_eq!(one.summary, two.summary);
    for s in &two.summary {
        assert_eq!(s.dtemp_failed, s.failed, "{s:?}");
        assert_eq!((s.dtemp_checks, s.checks), (path.increments.len(), path.increments.len()), "{s:?}");
    }
    let json = |r: &tancheck::core::Report| {
        let mut v = Vec::new();
        tancheck::cli::report::json::write_check(r, &mut v).unwrap();
        v
    };
    assert!(json(&one) == json(&two), "JSON reports differ");
}
