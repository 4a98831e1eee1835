//! The C API called from Rust, as a C program would call it, with routines written in Rust
//! against the routine ABI: verdicts, guard findings, the JSON, errors.

use std::ffi::{c_char, CStr};
use std::ptr;

use serde_json::Value;
use tancheck_abi::signal_guard::{TcCall, TcEnergy, TcTemperature};
use tancheck_capi::*;
use tancheck_core::Outcome;

const E: f64 = 210_000.0;
const NU: f64 = 0.3;

/// Isotropic elastic stiffness, Voigt form with engineering shear, column-major 6×6.
fn stiffness(e: f64, nu: f64) -> [f64; 36] {
    tancheck_testkit::tangent::isotropic_stiffness(e, nu)
}

/// σ = σ0 + C Δε for a 6-component, stateless point; `HOLE` leaves tangent[1] unwritten.
///
/// # Safety
/// The routine ABI's contract: the arrays have the lengths `call` announces (6 components).
unsafe fn elastic<const HOLE: bool>(
    call: *const TcCall,
    properties: *const f64,
    dstrain: *const f64,
    stress0: *const f64,
    stress: *mut f64,
    tangent: *mut f64,
    report: *mut Outcome,
) {
    // SAFETY: the lengths are the ABI's (6 components, 2 properties).
    unsafe {
        assert_eq!((*call).ncomp, 6);
        let c = stiffness(*properties, *properties.add(1));
        for i in 0..6 {
            let mut s = *stress0.add(i);
            for j in 0..6 {
                s += c[i + 6 * j] * *dstrain.add(j);
            }
            *stress.add(i) = s;
        }
        for (k, v) in c.iter().enumerate() {
            if !(HOLE && k == 1) {
                *tangent.add(k) = *v;
            }
        }
        (*report).branch = 0;
    }
}

macro_rules! routine {
    ($name:ident, $hole:expr) => {
        /// # Safety
        /// The routine ABI's contract.
        unsafe extern "C" fn $name(
            call: *const TcCall,
            properties: *const f64,
            _strain: *const f64,
            dstrain: *const f64,
            _temperature: *const TcTemperature<f64>,
            stress0: *const f64,
            _state0: *const f64,
            stress: *mut f64,
            _state: *mut f64,
            tangent: *mut f64,
            _dstress_dtemp: *mut f64,
            _energy: *mut TcEnergy<f64>,
            report: *mut Outcome,
        ) {
            // SAFETY: forwarded.
            unsafe { elastic::<$hole>(call, properties, dstrain, stress0, stress, tangent, report) }
        }
    };
}
routine!(rust_elastic, false);
routine!(rust_elastic_hole, true);

const PROPS: [f64; 2] = [E, NU];

fn options() -> Options {
    let mut o = Options::default();
    // SAFETY: a valid struct to write to.
    assert_eq!(unsafe { tck_options_init(&mut o) }, code::OK);
    o.nproperties = 2;
    o.properties = PROPS.as_ptr();
    o.schemes = 1 << 2; // central only: these routines have no twin
    o
}

fn text(p: *const c_char) -> String {
    assert!(!p.is_null());
    // SAFETY: the library's NUL-terminated strings.
    unsafe { CStr::from_ptr(p) }.to_string_lossy().into_owned()
}

fn last_error() -> String {
    text(tck_last_error())
}

/// Run a check; panics with the last error when it cannot run.
fn check(routine: tancheck_abi::signal_guard::RealFn, o: &Options) -> *mut CheckResult {
    let mut r = ptr::null_mut();
    // SAFETY: valid pointers; the routine has the ABI's signature.
    let status = unsafe { tck_check(&mut r, Some(routine), None, o) };
    assert_eq!(status, code::OK, "{}", last_error());
    assert!(!r.is_null());
    r
}

fn json(r: *const CheckResult) -> Value {
    // SAFETY: a live result.
    serde_json::from_str(&text(unsafe { tck_result_json(r) })).expect("the JSON parses")
}

#[test]
fn a_consistent_routine_passes() {
    let r = check(rust_elastic, &options());
    // SAFETY: a live result, freed once at the end.
    unsafe {
        assert_eq!(tck_result_verdict(r), verdict::PASS);
        assert_eq!(tck_result_exit_code(r), 0);
        assert_eq!(tck_result_finding_count(r), 0);
        assert!(tck_result_finding(r, 0).is_null());
        let s = text(tck_result_summary(r));
        assert!(s.starts_with("PASS routine: central: 0 of 12 checks failed, worst error "), "{s}");
        let j = json(r);
        assert_eq!(j["verdict"], "pass");
        assert_eq!(j["guard"]["level"], "light");
        assert_eq!(j["guard"]["findings"].as_array().unwrap().len(), 0);
        assert_eq!(j["routine"]["nprop"], 2);
        assert_eq!(j["format"], "tancheck-report");
        assert_eq!(j["version"], 1);
        assert_eq!(j["kind"], "check");
        assert_eq!(j["records"].as_array().unwrap().len(), 12);
        tck_result_free(r);
    }
}

#[test]
fn a_tangent_hole_is_a_routine_fault_with_a_finding() {
    let r = check(rust_elastic_hole, &options());
    // SAFETY: a live result, freed once at the end.
    unsafe {
        assert_eq!(tck_result_verdict(r), verdict::ROUTINE_FAULT);
        assert_eq!(tck_result_exit_code(r), 3);
        assert_eq!(tck_result_finding_count(r), 1);
        let f = text(tck_result_finding(r, 0));
        assert!(f.starts_with("the routine left tangent[1] unwritten (row 2, column 1"), "{f}");
        // The first finding ends the call that showed it, and the path stops there.
        assert!(f.ends_with("(first in a call told increment 1 in tc_call; 1 call)"), "{f}");
        let s = text(tck_result_summary(r));
        assert!(s.starts_with("FAULT routine: "), "{s}");
        // The fault of the zero-increment look says which call that is.
        assert!(
            s.contains("; fault in increment 0 (the zero increment from the start state; the routine was told increment 1)"),
            "{s}"
        );
        assert!(s.contains("; memory guard: the routine left tangent[1] unwritten"), "{s}");
        let j = json(r);
        assert_eq!(j["verdict"], "routine-fault");
        let g = &j["guard"]["findings"][0];
        assert_eq!(g["kind"], "unwritten");
        assert_eq!(g["array"], "tangent");
        assert_eq!(g["index"], 1);
        assert_eq!(g["length"], 36);
        assert!(j["notes"]
            .as_array()
            .unwrap()
            .iter()
            .any(|n| n.as_str().unwrap().starts_with("memory guard: ")));
        tck_result_free(r);
    }
}

/// Without guards the hole is only a NaN in the returned tangent, which the comparison fails.
#[test]
fn without_guards_a_tangent_hole_is_a_tangent_failure() {
    let mut o = options();
    o.guard_level = 0;
    let r = check(rust_elastic_hole, &o);
    // SAFETY: a live result, freed once at the end.
    unsafe {
        assert_eq!(tck_result_finding_count(r), 0);
        assert_eq!(tck_result_verdict(r), verdict::TANGENT_FAILURE, "{}", text(tck_result_summary(r)));
        assert_eq!(json(r)["guard"]["level"], "off");
        tck_result_free(r);
    }
}

#[test]
fn explicit_increments_a_name_and_the_full_level_are_used() {
    let mut o = options();
    let inc = [1e-3, 0.0, 0.0, 0.0, 0.0, 5e-4, -1e-3, 0.0, 0.0, 0.0, 0.0, -5e-4];
    o.increments = inc.as_ptr();
    o.nincrements = 2;
    o.guard_level = 2;
    o.name = c"my elastic".as_ptr();
    let r = check(rust_elastic, &o);
    // SAFETY: a live result, freed once at the end.
    unsafe {
        let j = json(r);
        assert_eq!(j["path"], "explicit (2 increments)");
        assert_eq!(j["routine"]["name"], "my elastic");
        assert_eq!(j["guard"]["level"], "full");
        // The full level runs every call once more.
        assert_eq!(j["guard"]["extra_calls"], j["calls"]["real"]);
        assert_eq!(j["verdict"], "pass");
        assert!(text(tck_result_summary(r)).starts_with("PASS my elastic: "));
        tck_result_free(r);
    }
    // What the path did not reach is in the summary too, as in the JSON: a pass along a path
    // that never unloads read as a plain pass (a user-style sweep).
    let inc = [1e-3, 0.0, 0.0, 0.0, 0.0, 0.0, 1e-3, 0.0, 0.0, 0.0, 0.0, 0.0];
    o.increments = inc.as_ptr();
    let r = check(rust_elastic, &o);
    // SAFETY: a live result, freed once at the end.
    unsafe {
        let j = json(r);
        let s = text(tck_result_summary(r));
        let first = j["coverage"][0].as_str().unwrap_or_else(|| panic!("no coverage warning: {j:#}"));
        assert!(
            s.starts_with("PASS my elastic: ") && s.contains("; coverage warning: ") && s.contains(first),
            "{s}"
        );
        tck_result_free(r);
    }
}

#[test]
fn errors_are_codes_with_messages() {
    let o = options();
    // Not NULL: a failing call must reset it to NULL.
    let mut r = std::ptr::dangling_mut::<CheckResult>();
    // SAFETY: NULL arguments are what is tested; the rest is valid.
    unsafe {
        assert_eq!(tck_check(ptr::null_mut(), Some(rust_elastic), None, &o), code::ERROR_NULL);
        assert_eq!(last_error(), "tck_check: `out` is NULL; pass a valid pointer");
        assert_eq!(tck_check(&mut r, None, None, &o), code::ERROR_NULL);
        assert!(r.is_null());
        assert!(last_error().contains("`routine` is NULL"));
        assert_eq!(tck_check(&mut r, Some(rust_elastic), None, ptr::null()), code::ERROR_NULL);
        assert_eq!(tck_options_init(ptr::null_mut()), code::ERROR_NULL);

        let mut old = o;
        old.version = 0;
        assert_eq!(tck_check(&mut r, Some(rust_elastic), None, &old), code::ERROR_VERSION);
        assert!(last_error().contains("fill the struct with tck_options_init"), "{}", last_error());

        let mut wrong = o;
        wrong.nproperties = 3; // the properties array has 2, and the routine is told 3
        let properties3 = [E, NU, 1.0];
        wrong.properties = properties3.as_ptr();
        wrong.peak = f64::NAN;
        assert_eq!(tck_check(&mut r, Some(rust_elastic), None, &wrong), code::ERROR_INVALID);
        assert!(last_error().starts_with("tck_options.peak is NaN"), "{}", last_error());

        // Getters on NULL.
        assert_eq!(tck_result_verdict(ptr::null()), -1);
        assert_eq!(tck_result_exit_code(ptr::null()), 2);
        assert!(tck_result_json(ptr::null()).is_null());
        assert!(tck_result_summary(ptr::null()).is_null());
        assert_eq!(tck_result_finding_count(ptr::null()), 0);
        tck_result_free(ptr::null_mut());
    }
}

#[test]
fn the_json_copies_into_a_buffer() {
    let r = check(rust_elastic, &options());
    // SAFETY: a live result, buffers of the sizes given; freed once at the end.
    unsafe {
        let full = text(tck_result_json(r));
        let mut len = 0usize;
        assert_eq!(tck_result_json_copy(r, ptr::null_mut(), 0, &mut len), code::OK);
        assert_eq!(len, full.len());
        let mut small = [1 as c_char; 5];
        assert_eq!(tck_result_json_copy(r, small.as_mut_ptr(), 5, ptr::null_mut()), code::ERROR_BUFFER);
        assert_eq!(text(small.as_ptr()), &full[..4]);
        assert!(last_error().contains(&format!("needs a buffer of {}", full.len() + 1)), "{}", last_error());
        let mut buf = vec![0 as c_char; len + 1];
        assert_eq!(tck_result_json_copy(r, buf.as_mut_ptr(), buf.len(), &mut len), code::OK);
        assert_eq!(text(buf.as_ptr()), full);
        assert_eq!(tck_result_json_copy(ptr::null(), buf.as_mut_ptr(), 1, &mut len), code::ERROR_NULL);
        tck_result_free(r);
    }
}

#[test]
fn the_versions_agree() {
    let (mut a, mut b, mut c) = (-1, -1, -1);
    // SAFETY: writable integers.
    unsafe { tck_version(&mut a, &mut b, &mut c) };
    assert_eq!(format!("{a}.{b}.{c}"), text(tck_version_string()));
    assert_eq!(text(tck_version_string()), env!("CARGO_PKG_VERSION"));
    // SAFETY: NULL pointers are allowed.
    unsafe { tck_version(ptr::null_mut(), ptr::null_mut(), ptr::null_mut()) };
}

/// Checks on several threads at once: the guard, the routine path and the last error are
/// per thread.
#[test]
fn checks_run_on_several_threads() {
    let handles: Vec<_> = (0..4)
        .map(|k| {
            std::thread::spawn(move || {
                let o = options();
                let r = check(if k % 2 == 0 { rust_elastic } else { rust_elastic_hole }, &o);
                // SAFETY: a live result, freed once.
                let v = unsafe { tck_result_verdict(r) };
                // SAFETY: as above.
                unsafe { tck_result_free(r) };
                (k, v)
            })
        })
        .collect();
    for h in handles {
        let (k, v) = h.join().unwrap();
        assert_eq!(v, if k % 2 == 0 { verdict::PASS } else { verdict::ROUTINE_FAULT }, "thread {k}");
    }
}
