//! A zoo of misbehaving compiled routines, each reported with the right finding and the
//! documented exit code (3: the routine crashed, misbehaved or failed; 70: it ended the
//! process itself, without --isolate), and the tool never hangs or dies.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-misbehave-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn build(name: &str, src: &str) -> PathBuf {
    let d = scratch(name);
    let lib = d.join(format!("lib{name}.so"));
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join(src);
    let o = bin().arg("build").arg(&src).arg("-o").arg(&lib).output().unwrap();
    assert!(o.status.success(), "{}", text(&o));
    lib
}

fn c_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("misbehave_c", "fortran-shim/examples/c/misbehave.c"))
}

/// misbehave.c built by `tancheck build --debug`.
fn c_debug_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| {
        let d = scratch("debug-build");
        let lib = d.join("libmisbehave_g.so");
        let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/misbehave.c");
        let o = bin().arg("build").arg(&src).arg("-o").arg(&lib).arg("--debug").output().unwrap();
        assert!(o.status.success(), "{}", text(&o));
        assert!(text(&o).contains("floating-point traps on"), "{}", text(&o));
        lib
    })
}

fn check(lib: &Path, symbol: &str, flags: &[&str]) -> (Option<i32>, String) {
    check_along(lib, symbol, "uniaxial-strain", flags)
}

/// [`check`] along a path of another shape.
fn check_along(lib: &Path, symbol: &str, shape: &str, flags: &[&str]) -> (Option<i32>, String) {
    let d = scratch(&format!("{symbol}-{shape}"));
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "solid-3d", "states": 2, "properties": [210000, 0.3] }},
  "path": {{ "shape": "{shape}", "peak": 0.001, "steps": 3 }} }}"#,
            lib.display()
        ),
    )
    .unwrap();
    let o = bin().arg("check").arg(&m).args(flags).output().unwrap();
    (o.status.code(), text(&o))
}

fn expect(symbol: &str, flags: &[&str], code: i32, finding: &str) {
    let (c, t) = check(c_lib(), symbol, flags);
    assert_eq!(c, Some(code), "{symbol} {flags:?}: {t}");
    assert!(t.contains(finding), "{symbol} {flags:?}: expected `{finding}` in\n{t}");
}

#[test]
fn memory_misbehaviour_is_reported_by_the_guards() {
    expect("bad_state_overrun", &[], 3, "wrote past the end of state");
    expect("bad_props_overread", &["--guards", "full"], 3, "reads beyond its 2 properties");
    expect("bad_tangent_hole", &[], 3, "left tangent[1] unwritten");
    expect("bad_writes_strain", &[], 3, "wrote to its read-only input strain");
    expect("bad_scratch_increment", &[], 3, "wrote to its read-only input dstrain");
}

/// A routine that forms its tangent only when asked but reads the tangent array in every call
/// works on a stale tangent in its perturbed calls: the guards give it the signalling NaN
/// instead of the tangent an earlier call left, so the perturbed stresses and the derivative
/// are not finite and the check fails at both guard levels (it passed with the light and full
/// guards when they left the last call's tangent in place).
#[test]
fn a_routine_reading_a_tangent_it_was_not_asked_for_fails() {
    for level in ["light", "full"] {
        let (c, t) = check(c_lib(), "bad_unasked_tangent", &["--guards", level, "--jobs", "1"]);
        assert_eq!(c, Some(1), "{level}: {t}");
        assert!(t.contains("derivative          NaN"), "{level}: {t}");
        assert!(t.contains("-> non-finite-derivative"), "{level}: {t}");
        assert!(t.contains("the difference quotients are not finite numbers"), "{level}: {t}");
        assert!(t.contains("verdict: FAIL"), "{level}: {t}");
    }
}

/// With the guards off a routine works on the check's own buffers. One that uses its
/// increment as work space after its update (its tangent is the true one) must not change
/// what the other calls of the increment see: every call gets the increment as set, so the
/// check passes instead of comparing differences taken around a cleared increment. (A path
/// whose increments move two components: with one, a difference around the cleared increment
/// happens to be the right one.)
#[test]
fn with_the_guards_off_a_routine_that_writes_its_increment_does_not_move_the_other_calls() {
    for shape in ["biaxial", "tension-shear"] {
        let (c, t) =
            check_along(c_lib(), "bad_scratch_increment", shape, &["--guards", "off", "--jobs", "1"]);
        assert_eq!(c, Some(0), "{shape}: {t}");
        assert!(t.contains("verdict: PASS"), "{shape}: {t}");
    }
}

// A default check (no options) looks at first calls: the full guards on the first call of a
// newly reached branch find a read past the properties there, and one zero increment from the
// start finds a NaN of an unguarded normalisation.
#[test]
fn a_default_check_catches_misbehaviour_in_a_new_branch_and_on_a_zero_increment() {
    expect("bad_branch_overread", &[], 3, "reads beyond its 2 properties");
    expect("bad_branch_overread", &[], 3, "newly reached branch");
    expect("bad_unguarded_norm", &[], 1, "stress[0] = NaN for a zero increment from the start state");
    expect("bad_unguarded_norm", &[], 1, "increment 0 is a zero strain increment");
    // Its call's inputs are under increment 0, with the number the routine was told.
    expect(
        "bad_unguarded_norm",
        &[],
        1,
        "inputs of that call (increment 0; the routine was told increment 1)",
    );
    expect(
        "bad_unguarded_norm",
        &[],
        1,
        "verdict: FAIL — the routine returned values that are not finite numbers",
    );
    // The quiet line names increment 0 as the zero increment (beside "the routine was told
    // increment 1" elsewhere it read as two answers; a user-style sweep).
    let (_, q) = check(c_lib(), "bad_unguarded_norm", &["-q"]);
    assert!(q.contains("increment 0 (the zero increment from the start state) ("), "{q}");
    // Bisect works on the path's increments and says why it has nothing to do.
    let d = scratch("bisect-zero");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_unguarded_norm", "kind": "solid-3d", "states": 0, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 3 }} }}"#,
            c_lib().display()
        ),
    )
    .unwrap();
    let o = bin().arg("bisect").arg(&m).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    assert!(t.contains("the zero increment from the start state"), "{t}");
    // With the guards off, the branch's over-read (a constant shift of the stress) goes unseen:
    // the guards do the finding.
    expect("bad_branch_overread", &["--guards", "off"], 0, "PASS");
}

/// A guard finding in the schemes' calls (not the base call) marks the scheme's cell as a
/// fault, not a crash (no signal ended the call), and the verdict names the guards.
#[test]
fn a_guard_finding_in_a_schemes_call_reads_as_a_fault_not_a_crash() {
    let (c, t) = check(c_lib(), "bad_perturbed_overrun", &[]);
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains("wrote past the end of state"), "{t}");
    let row = t.lines().find(|l| l.trim_start().starts_with("2 ")).expect("the row of increment 2");
    assert!(row.contains("FAULT") && !row.contains("CRASH"), "{row}\n{t}");
    assert!(t.contains("or was flagged by the memory guards"), "{t}");
    let (_, q) = check(c_lib(), "bad_perturbed_overrun", &["-q"]);
    let line = q.lines().find(|l| l.contains("increment 2")).expect("the increment's line");
    assert!(line.starts_with("FAULT ") && !line.contains("undiagnosed"), "{q}");
    // The HTML page names the faulted increment's finding as the terminal does (it said
    // "undiagnosed"; a user-style sweep).
    let page = scratch("overrun-page").join("r.html");
    let (c, t) = check(c_lib(), "bad_perturbed_overrun", &["-q", "--html", page.to_str().unwrap()]);
    assert_eq!(c, Some(3), "{t}");
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(html.contains("finding <code>routine-fault</code>"), "{t}");
    assert!(!html.contains("undiagnosed"), "{t}");
}

/// A twin that is not complex-step safe in many increments: each increment says why, and the
/// usual culprits are listed once, at the first, the later ones referring to it.
#[test]
fn the_usual_culprits_of_an_unsafe_twin_are_listed_once() {
    let zoo = build("culprits-zoo-j2", "fortran-shim/examples/c/zoo_j2.c");
    let d = scratch("culprits");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "c_twin_real_sqrt", "kind": "solid-3d", "states": 13, "properties": [210000, 0.3, 355, 1200, 150, 12, 2500] }},
  "path": {{ "shape": "tension-shear", "peak": 0.004, "steps": 8 }} }}"#,
            zoo.display()
        ),
    )
    .unwrap();
    let o = bin().arg("check").arg(&m).args(["--jobs", "1"]).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(4), "{t}");
    let set_aside: Vec<&str> = t.lines().filter(|l| l.contains("twin set aside:")).collect();
    assert!(set_aside.len() > 1, "{t}");
    assert_eq!(t.matches("Usual culprits: conjugating intrinsics").count(), 1, "{t}");
    assert!(set_aside[1..].iter().all(|l| l.contains("Usual culprits: as listed at increment ")), "{t}");
}

/// An unsafe twin whose complex tangent is soft where the true one is not: the check's error
/// is largest along that direction (or the increment's), and the twin's own gap to the real
/// reference must be measured there too. Measured along the real reference's directions it
/// looked small, and a correct tangent failed as `term-scaled` or `rank-one-term` (exit 1).
#[test]
fn an_unsafe_twin_is_blamed_where_its_error_is_along_a_soft_direction() {
    let zoo = build("soft-twin-zoo-j2", "fortran-shim/examples/c/zoo_j2.c");
    let d = scratch("soft-twin");
    let cases = [
        // (routine, path): the Rust model on a mixed-mode path, the C routines under uniaxial stress.
        (
            r#""model": "twin-conjugate""#.to_string(),
            r#""shape": "mixed-mode", "peak": 0.004, "steps": 8, "back": 4"#,
        ),
        (
            format!(r#""library": "{}", "symbol": "c_twin_conjugate", "states": 13"#, zoo.display()),
            r#""shape": "uniaxial-stress", "peak": 0.004, "steps": 8, "back": 4"#,
        ),
        (
            format!(r#""library": "{}", "symbol": "c_twin_real_sqrt", "states": 13"#, zoo.display()),
            r#""shape": "uniaxial-stress", "peak": 0.004, "steps": 8, "back": 4"#,
        ),
    ];
    for (k, (routine, path)) in cases.iter().enumerate() {
        let props = if k == 0 {
            "200000, 0.3, 250, 1000, 50, 20, 500"
        } else {
            "210000, 0.3, 355, 1200, 150, 12, 2500"
        };
        let m = d.join(format!("m{k}.json"));
        std::fs::write(
            &m,
            format!(r#"{{ "routine": {{ {routine}, "kind": "solid-3d", "properties": [{props}] }}, "path": {{ {path} }} }}"#),
        )
        .unwrap();
        let o = bin().arg("check").arg(&m).args(["--jobs", "1"]).output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(4), "{routine}: {t}");
        assert!(t.contains("twin set aside") && !t.contains("FAIL"), "{routine}: {t}");
    }
}

#[test]
fn crashes_are_faults_with_the_inputs_of_the_call() {
    expect("bad_null_deref", &[], 3, "SIGSEGV");
    expect("bad_divide_by_zero", &["--fp-traps"], 3, "SIGFPE");
    expect("bad_abort", &[], 3, "SIGABRT");
    expect("bad_deep_recursion", &[], 3, "stack");
    expect("bad_null_deref", &[], 3, "inputs of that call (increment 2)");
    // The path stopped at the crash: the coverage warning says so, and does not claim the path
    // never changed the state variables (the manifest declares two).
    let (_, t) = check(c_lib(), "bad_null_deref", &[]);
    assert!(t.contains("the path stopped at a fault at increment 2 of 3"), "{t}");
    // With -q a fault reads as one, with no diagnosis to name.
    let (_, q) = check(c_lib(), "bad_null_deref", &["-q"]);
    let line = q.lines().find(|l| l.contains("increment 2")).expect("the fault's line");
    assert!(line.starts_with("FAULT ") && !line.contains("undiagnosed"), "{q}");
    assert!(!t.contains("never changed the state") && !t.contains("never unloaded"), "{t}");
    // The crashed increment reached no branch: its row says so, and the branch summaries
    // count only the increment that returned (it passed).
    let row = t.lines().find(|l| l.trim_start().starts_with("2 ")).expect("increment 2's row");
    assert!(row.contains("none (call faulted)"), "{t}");
    let branches: Vec<&str> = t.lines().filter(|l| l.trim_start().starts_with("branch ")).collect();
    assert!(!branches.is_empty() && branches.iter().all(|l| l.contains("passed at 1 increment (")), "{t}");
}

#[test]
fn an_infinite_loop_needs_isolation_and_is_then_reported() {
    expect("bad_infinite_loop", &["--isolate", "--call-timeout", "2"], 3, "did not return within 2 s");
    expect("bad_infinite_loop", &["--isolate", "--call-timeout", "2"], 3, "during increment 2");
    // The parent names the routine, which the worker wrote into the shared record at load.
    expect(
        "bad_infinite_loop",
        &["--isolate", "--call-timeout", "2"],
        3,
        ":bad_infinite_loop (isolated check) ==",
    );
    // Without --isolate the watchdog ends it; under -q without its "still checking" lines.
    let (c, t) = check(c_lib(), "bad_infinite_loop", &["--call-timeout", "2", "-q"]);
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains("did not return within 2 s") && !t.contains("still checking"), "{t}");
}

#[test]
fn exit_ends_the_process_without_isolation_and_is_reported_with_it() {
    expect("bad_exit", &[], 70, "ended the process");
    expect("bad_exit", &["--isolate"], 3, "ended the worker process");
    // A crash under isolation is still the worker's own report.
    expect("bad_null_deref", &["--isolate"], 3, "SIGSEGV");
}

/// A routine that ends the process leaves no earlier run's PASS in the HTML and JUnit files
/// (they were left as they were, and a CI dashboard showed green): they say the run did not
/// finish, with and without --isolate. A run that ends on bad input puts them back. (The
/// passing routine is `bad_printf`: a correct update that prints.)
#[test]
fn a_routine_that_ends_the_process_leaves_no_earlier_pass_in_the_html_and_junit() {
    let d = scratch("stale-pages");
    let (xml, html) = (d.join("r.xml"), d.join("r.html"));
    let pages = ["--junit", xml.to_str().unwrap(), "--html", html.to_str().unwrap()];
    for flags in [&[][..], &["--isolate"][..]] {
        let (c, t) = check(c_lib(), "bad_printf", &pages);
        assert_eq!(c, Some(0), "{t}");
        assert!(std::fs::read_to_string(&xml).unwrap().contains("errors=\"0\""));
        let (c, t) = check(c_lib(), "bad_exit", &[&pages[..], flags].concat());
        assert!(c == Some(70) || c == Some(3), "{flags:?}: {t}");
        let x = std::fs::read_to_string(&xml).unwrap();
        assert!(x.contains("errors=\"1\"") && x.contains("type=\"incomplete\""), "{flags:?}: {x}");
        assert!(std::fs::read_to_string(&html).unwrap().contains("Incomplete run"), "{flags:?}");
    }
    let (c, _) = check(c_lib(), "bad_printf", &pages);
    assert_eq!(c, Some(0));
    let kept = (std::fs::read(&xml).unwrap(), std::fs::read(&html).unwrap());
    let (c, t) = check(c_lib(), "bad_printf", &[&pages[..], &["--tol", "central=-1"]].concat());
    assert_eq!(c, Some(2), "{t}");
    assert_eq!(
        (std::fs::read(&xml).unwrap(), std::fs::read(&html).unwrap()),
        kept,
        "bad input lost the pages"
    );
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn a_fortran_stop_is_reported_under_isolation() {
    let lib = build("misbehave_f", "fortran-shim/examples/fortran/misbehave.F90");
    let (c, t) = check(&lib, "f_bad_stop", &["--isolate"]);
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains("ended the worker process"), "{t}");
    assert!(t.contains("during increment 2"), "{t}");
    let (c, t) = check(&lib, "f_bad_stop", &[]);
    assert_eq!(c, Some(70), "without --isolate a STOP ends tancheck with the documented code 70: {t}");
}

/// The line of `needle` in a source file (1-based), so the test follows edits of the file.
fn line_of(src: &str, needle: &str) -> usize {
    let text = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(src)).unwrap();
    1 + text.lines().position(|l| l.contains(needle)).expect("the needle is in the source")
}

#[test]
fn a_crash_names_the_function_file_and_line_when_the_library_has_debug_information() {
    let src = "fortran-shim/examples/c/misbehave.c";
    let lib = c_debug_lib();
    let (c, t) = check(lib, "bad_null_deref", &[]);
    assert_eq!(c, Some(3), "{t}");
    // The store through the null pointer is the line after the declaration of `nowhere`.
    let line = line_of(src, "volatile tc_real *volatile nowhere = NULL;") + 1;
    let want = "in `bad_null_deref` at ";
    assert!(t.contains(want), "expected `{want}` in\n{t}");
    assert!(t.contains(&format!("misbehave.c:{line} (libmisbehave_g.so+0x")), "expected line {line} in\n{t}");
    assert!(t.contains("address 0x0"), "the faulting address stays beside the place:\n{t}");
    // The same under --isolate (the worker resolves it).
    let (c, t) = check(lib, "bad_null_deref", &["--isolate"]);
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains(&format!("misbehave.c:{line}")), "{t}");
}

#[test]
fn without_debug_information_a_crash_names_the_exported_function_and_says_how_to_get_the_line() {
    let (c, t) = check(c_lib(), "bad_null_deref", &[]);
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains("in `bad_null_deref` (libmisbehave_c.so+0x"), "{t}");
    assert!(t.contains("no debug information for file and line"), "{t}");
}

#[test]
#[cfg_attr(tancheck_no_fp_traps, ignore = "needs floating-point traps (this machine has none)")]
fn a_debug_build_runs_with_floating_point_traps_without_being_asked() {
    // Optimised build: the division by zero gives an infinite stress, no signal.
    let (c, t) = check(c_lib(), "bad_divide_by_zero", &[]);
    assert!(!t.contains("SIGFPE"), "{t}");
    assert_ne!(c, Some(0), "{t}");
    // Debug build: the same routine traps at the division, and the report names the line.
    let src = "fortran-shim/examples/c/misbehave.c";
    let (c, t) = check(c_debug_lib(), "bad_divide_by_zero", &[]);
    assert_eq!(c, Some(3), "{t}");
    assert!(t.contains("SIGFPE") && t.contains("division by zero"), "{t}");
    assert!(t.contains("floating-point traps on") && t.contains("built with --debug"), "{t}");
    let line = line_of(src, "stress[0] = stress[0] + e / zero;");
    assert!(t.contains("in `bad_divide_by_zero` at ") && t.contains(&format!("misbehave.c:{line} ")), "{t}");
}

/// A routine whose results depend on the calls before it (a call counter kept between calls),
/// checked without the first calls' repeat under the full guards: its diagnosis made every
/// increment a kink whose columns match neither side (exit 1). The diagnosis now makes the base
/// call again first and finds the difference: a fault naming the history of calls (exit 3).
#[test]
fn hidden_state_is_a_fault_without_the_first_calls_too() {
    let d = scratch("hidden-nofirst");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_hidden_state", "kind": "solid-3d", "states": 2, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 3 }}, "check": {{ "first_calls": false }} }}"#,
            c_lib().display()
        ),
    )
    .unwrap();
    let o = bin().arg("check").arg(&m).args(["--jobs", "1"]).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(3), "{t}");
    assert!(t.contains("depend on the history of calls") && !t.contains("kink-neither-side"), "{t}");
}

/// A memory guard reports a kind of misbehaviour once per run. `bisect` makes runs of its own
/// after the check (the scaled calls inside the increment, every candidate of the shrink, the
/// call made again for the case), and each of them must see the fault again: before, the
/// scaled calls read as agreeing, the shrinker kept none of its candidates and the case came
/// with a warning that the call made again did not fault.
#[test]
fn bisect_finds_a_guard_fault_again_in_each_run_of_its_own() {
    let d = scratch("bisect-guard-fault");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_state_overrun", "kind": "solid-3d", "states": 2, "properties": [210000, 0.3] }},
  "path": {{ "shape": "tension-shear", "peak": 0.003, "steps": 6 }} }}"#,
            c_lib().display()
        ),
    )
    .unwrap();
    let o = bin().current_dir(&d).arg("bisect").arg(&m).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(3), "{}", text(&o));
    let v: serde_json::Value =
        serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", text(&o)));
    // The routine overruns its state from its second increment on, whatever the strain.
    let l = &v["located"];
    assert_eq!(l["increment"], 2, "{l:#}");
    assert_eq!(l["finding"], "routine-fault");
    let samples = l["samples"].as_array().unwrap();
    assert!(samples.len() > 2, "{l:#}");
    for s in samples {
        assert_eq!(s["class"]["judgement"], "fault", "every scaled call faults: {s:#}");
    }
    assert_eq!(l["inside"]["found"], "throughout", "{l:#}");
    // The shrink keeps candidates: two increments, each as plain as it gets.
    let s = &v["shrunk"];
    assert!(s["accepted"].as_u64().unwrap() > 0, "{s:#}");
    let incs = s["path"]["increments"].as_array().unwrap();
    assert_eq!(incs.len(), 2, "{s:#}");
    for inc in incs {
        assert!(inc["dstrain"].as_array().unwrap().iter().all(|x| x.as_f64() == Some(0.0)), "{inc:#}");
    }
    assert_eq!(s["located"]["finding"], "routine-fault");
    // The call made again for each case faults again: no warning.
    assert_eq!(v["cases"].as_array().unwrap().len(), 2, "{:#}", v["cases"]);
    assert!(v["warnings"].as_array().unwrap().is_empty(), "{:#}", v["warnings"]);
}

/// `explore` runs many paths, each a run of its own: a memory-guard fault shows in the first
/// path that meets it (the scale's probe calls, made first, used up the guard's one report and
/// explore passed a routine `check` faults).
#[test]
fn explore_finds_a_guard_fault() {
    let d = scratch("explore-guard-fault");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_state_overrun", "kind": "solid-3d", "states": 2, "properties": [210000, 0.3] }} }}"#,
            c_lib().display()
        ),
    )
    .unwrap();
    let o =
        bin().current_dir(&d).arg("explore").arg(&m).args(["--paths", "4", "--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(3), "{}", text(&o));
    let v: serde_json::Value =
        serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", text(&o)));
    let f = &v["findings"][0];
    assert_eq!(f["finding"], "routine-fault", "{v:#}");
    assert_eq!(f["first_path"], 1, "the first path meets it: {f:#}");
}

// A probe in which the routine faults ends the probe command as a check's routine fault does
// (exit 3, `exit_code` 3 in the JSON, the verdict FAULT), not as a finding about its results
// (exit 1); a crash is caught and the other probes still run.
#[test]
fn a_routine_fault_in_a_probe_is_exit_3() {
    let d = scratch("probe-fault");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_null_deref", "kind": "solid-3d", "states": 2, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 3 }} }}"#,
            c_lib().display()
        ),
    )
    .unwrap();
    let json = d.join("p.json");
    let o = bin().arg("probe").arg(&m).arg("--json").arg(&json).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(3), "{t}");
    assert!(t.contains("verdict: FAULT"), "{t}");
    // The crash ends most probes; its words are told once, the later probes name the first.
    assert_eq!(t.matches("SIGSEGV").count(), 1, "{t}");
    assert!(t.contains("the routine failed at increment 2: the same fault as in `tangent`"), "{t}");
    assert!(t.contains("energy") && t.contains("in the closed elastic cycle from the start state"), "{t}");
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["exit_code"], 3, "{v:#}");
    assert_eq!(v["pass"], false);
    assert!(v["results"].as_array().unwrap().iter().any(|r| r["fault"] == true), "{v:#}");
    // A correct routine's probes: exit 0 and `exit_code` 0.
    std::fs::write(
        &m,
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
  "path": { "shape": "uniaxial-strain", "peak": 0.004, "steps": 4 } }"#,
    )
    .unwrap();
    let o = bin().arg("probe").arg(&m).arg("--json").arg(&json).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["exit_code"], 0);
}
