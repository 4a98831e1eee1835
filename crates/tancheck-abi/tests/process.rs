//! What the guard does about things that end the process: a routine that calls exit(), a
//! crash outside any routine call, a stack overflow in Rust code. Each case runs in a child
//! process (this test binary run again for one helper), and the parent checks how it ended.

mod common;

use std::os::unix::process::ExitStatusExt;
use std::process::{Command, Output};

use common::*;
use tancheck_abi::EXIT_STATUS_ROUTINE_EXITED;

const CHILD: &str = "TANCHECK_ABI_TEST_CHILD";

/// Run helper `name` of this binary in a child process.
fn run_child(name: &str) -> Output {
    Command::new(std::env::current_exe().unwrap())
        .args(["--exact", name, "--ignored", "--nocapture", "--test-threads=1"])
        .env(CHILD, name)
        .env("RUST_BACKTRACE", "0")
        .output()
        .unwrap()
}

/// Helpers act only when their parent test runs them.
fn is_child(name: &str) -> bool {
    if std::env::var(CHILD).as_deref() == Ok(name) {
        true
    } else {
        eprintln!("{name} is a helper: it acts only as a child of its test");
        false
    }
}

fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

#[test]
#[ignore = "helper, run as a child process by routine_calling_exit_is_reported"]
fn child_routine_calls_exit() {
    if !is_child("child_routine_calls_exit") {
        return;
    }
    let mut r = load("bad_exit");
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    let _ = b.call(&mut r, 2); // exit(0) inside
    println!("still running after exit()");
}

#[test]
fn routine_calling_exit_is_reported() {
    misbehave_library(); // build in the parent, so that a build failure shows here
    let out = run_child("child_routine_calls_exit");
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(EXIT_STATUS_ROUTINE_EXITED), "{stderr}");
    assert!(stderr.contains("ended the process by calling exit() during a call"), "{stderr}");
    assert!(stderr.contains(":bad_exit`"), "{stderr}");
    assert!(!text(&out.stdout).contains("still running"));
}

#[test]
#[ignore = "helper, run as a child process by a_crash_outside_a_routine_still_ends_the_process"]
fn child_crash_outside_a_routine() {
    if !is_child("child_crash_outside_a_routine") {
        return;
    }
    let mut r = load("bad_null_deref");
    let mut b = Real::new();
    assert!(b.call(&mut r, 2).is_err()); // handlers are installed, a crash was caught
    b.call(&mut r, 1).unwrap();
    // SAFETY: none; this is the crash under test.
    unsafe { std::ptr::write_volatile(std::ptr::null_mut::<f64>(), 1.0) };
    println!("survived a null write outside the guard");
}

#[test]
fn a_crash_outside_a_routine_still_ends_the_process() {
    misbehave_library();
    let out = run_child("child_crash_outside_a_routine");
    assert_eq!(out.status.signal(), Some(SIGSEGV), "{:?}\n{}", out.status, text(&out.stderr));
    assert!(!text(&out.stdout).contains("survived"));
}

#[inline(never)]
fn recurse(n: u64) -> u64 {
    if n == u64::MAX {
        return 0; // never: the stack runs out long before
    }
    let a = std::hint::black_box([n; 128]);
    std::hint::black_box(recurse(n + 1)) + a[7]
}

#[test]
#[ignore = "helper, run as a child process by rust_stack_overflow_is_still_reported"]
fn child_rust_stack_overflow() {
    if !is_child("child_rust_stack_overflow") {
        return;
    }
    let mut r = load("bad_null_deref");
    let mut b = Real::new();
    assert!(b.call(&mut r, 2).is_err());
    std::thread::Builder::new().stack_size(256 * 1024).spawn(|| recurse(0)).unwrap().join().unwrap();
}

/// The guard chains to the handler installed before it: Rust's own stack-overflow report.
#[test]
fn rust_stack_overflow_is_still_reported() {
    misbehave_library();
    let out = run_child("child_rust_stack_overflow");
    let stderr = text(&out.stderr);
    assert!(stderr.contains("has overflowed its stack"), "{:?}\n{stderr}", out.status);
    assert_eq!(out.status.signal(), Some(SIGABRT), "{:?}\n{stderr}", out.status);
}

#[test]
#[ignore = "helper, run as a child process by fortran_run_time_error_is_reported"]
fn child_fortran_bounds_error() {
    if !is_child("child_fortran_bounds_error") {
        return;
    }
    let lib = std::env::var("TANCHECK_ABI_TEST_LIB").unwrap();
    let lib = tancheck_abi::Library::open(lib).unwrap();
    let mut r = lib.routine("f_bounds", elastic_info("f_bounds")).unwrap();
    let mut b = Real::new();
    let _ = b.call(&mut r, 1);
    println!("still running after the run-time error");
}

const BOUNDS_F90: &str = r#"
subroutine f_bounds(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                    state, tangent, dstress_dtemp, energy, report) bind(C, name="f_bounds")
  use, intrinsic :: iso_c_binding, only: c_double
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy
  implicit none
  type(tc_call), intent(in) :: callinfo
  real(c_double), intent(in) :: properties(callinfo%nproperties)
  real(c_double), intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  real(c_double), intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  real(c_double), intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  real(c_double), intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  real(c_double), intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report
  integer :: k
  k = callinfo%nproperties + callinfo%increment
  stress = properties(k) + strain(1) + dstrain(1) + temperature%start + stress0(1)
  state = 0
  tangent = 0
  report%status = 0
end subroutine f_bounds
"#;

/// A failed run-time check of the Fortran library (here an array bound, with --debug) ends
/// the process through exit(); the guard names the routine and fixes the exit status.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_run_time_error_is_reported() {
    let dir = scratch("bounds");
    let src = dir.join("bounds.f90");
    std::fs::write(&src, BOUNDS_F90).unwrap();
    let out = dir.join("libbounds.so");
    let mut opts = tancheck_abi::BuildOptions::new([&src], &out);
    opts.debug = true;
    opts.twin = false;
    let log = tancheck_abi::build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    assert!(log.commands.iter().any(|s| s.args.iter().any(|a| a == "-fcheck=all")), "{log}");

    let child = Command::new(std::env::current_exe().unwrap())
        .args(["--exact", "child_fortran_bounds_error", "--ignored", "--nocapture", "--test-threads=1"])
        .env(CHILD, "child_fortran_bounds_error")
        .env("TANCHECK_ABI_TEST_LIB", &out)
        .output()
        .unwrap();
    let stderr = text(&child.stderr);
    assert!(stderr.contains("Fortran runtime error"), "{stderr}");
    assert!(stderr.contains("ended the process by calling exit()"), "{stderr}");
    assert_eq!(child.status.code(), Some(EXIT_STATUS_ROUTINE_EXITED), "{stderr}");
    assert!(!text(&child.stdout).contains("still running"));
}
