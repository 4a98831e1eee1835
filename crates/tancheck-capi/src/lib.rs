//! The C API of tancheck (`fortran-shim/include/tancheck.h`): a C or Fortran test program
//! checks a material routine's tangent in-process.
//!
//! The program passes the routine as a function pointer of the routine ABI
//! (`tc_routine_fn`), optionally its complex-step twin, and a `tck_options` struct; tancheck
//! makes the routine a [`tancheck_abi::LibraryRoutine`] from the function pointers (so every
//! call goes through the guarded trampoline and the memory guards), runs
//! [`tancheck_core::check::run`] and hands back a `tck_result`: verdict, exit code, a summary
//! line, the guard findings and the report as JSON.
//!
//! Every exported function catches panics (`TCK_ERROR_INTERNAL`) and keeps the message of a
//! failure for [`tck_last_error`], per thread. The Fortran module `tancheck_api`
//! (`fortran-shim/fortran/tancheck_api.f90`) wraps these functions.
//!
//! Built as a cdylib (`libtancheck_capi.so`) and a staticlib (`libtancheck_capi.a`), and as
//! an rlib for Rust callers and the tests.

pub mod check;
pub mod options;
pub mod status;

use std::ffi::{c_char, c_int};

use tancheck_abi::signal_guard::RealFn;

pub use check::{CheckResult, TwinFn};
pub use options::{Options, OPTIONS_VERSION};
pub use status::code;

use status::Failure;

/// `tck_verdict` values: the exit codes of the tancheck command.
pub mod verdict {
    use std::ffi::c_int;
    pub const PASS: c_int = 0;
    pub const TANGENT_FAILURE: c_int = 1;
    pub const ROUTINE_FAULT: c_int = 3;
    pub const TWIN_NOT_SAFE: c_int = 4;
}

/// The version of this library as text, NUL-terminated.
const VERSION: &str = concat!(env!("CARGO_PKG_VERSION"), "\0");

/// The library's version (`tck_version`).
///
/// # Safety
/// Each pointer is NULL or writable.
#[no_mangle]
pub unsafe extern "C" fn tck_version(major: *mut i32, minor: *mut i32, patch: *mut i32) {
    let part = |s: &str| s.parse::<i32>().unwrap_or(-1);
    for (p, v) in [
        (major, part(env!("CARGO_PKG_VERSION_MAJOR"))),
        (minor, part(env!("CARGO_PKG_VERSION_MINOR"))),
        (patch, part(env!("CARGO_PKG_VERSION_PATCH"))),
    ] {
        if !p.is_null() {
            // SAFETY: non-NULL and writable by the caller's contract.
            unsafe { p.write(v) };
        }
    }
}

/// The library's version as text (`tck_version_string`); static.
#[no_mangle]
pub extern "C" fn tck_version_string() -> *const c_char {
    VERSION.as_ptr().cast()
}

/// The message of the last failed call on this thread (`tck_last_error`). Never NULL.
#[no_mangle]
pub extern "C" fn tck_last_error() -> *const c_char {
    status::last_error_ptr()
}

/// Fill `opts` with the version and every default (`tck_options_init`).
///
/// # Safety
/// `opts` is NULL or points to writable memory for one `tck_options`.
#[no_mangle]
pub unsafe extern "C" fn tck_options_init(opts: *mut Options) -> c_int {
    // SAFETY: forwarded.
    unsafe { options::init(opts) }
}

/// Run a check (`tck_check`).
///
/// # Safety
/// `out` is writable; `routine` and `twin` have the routine ABI's real and complex signatures;
/// every pointer in `opts` points to as many values as its count says.
#[no_mangle]
pub unsafe extern "C" fn tck_check(
    out: *mut *mut CheckResult,
    routine: Option<RealFn>,
    twin: Option<TwinFn>,
    opts: *const Options,
) -> c_int {
    status::run("tck_check", || {
        if out.is_null() {
            return Err(Failure::null("tck_check", "out"));
        }
        // SAFETY: non-NULL and writable.
        unsafe { out.write(std::ptr::null_mut()) };
        let routine = routine.ok_or_else(|| Failure::null("tck_check", "routine"))?;
        if opts.is_null() {
            return Err(Failure::null("tck_check", "opts"));
        }
        // SAFETY: non-NULL; the caller's contract covers the pointers inside.
        let plan = unsafe { (*opts).plan() }?;
        // SAFETY: the caller's contract on the routine pointers.
        let result = unsafe { check::check(routine, twin, plan) }?;
        // SAFETY: as above.
        unsafe { out.write(Box::into_raw(Box::new(result))) };
        Ok(())
    })
}

/// Free a result (`tck_result_free`); NULL is allowed.
///
/// # Safety
/// `result` is NULL or came from `tck_check` and was not freed yet.
#[no_mangle]
pub unsafe extern "C" fn tck_result_free(result: *mut CheckResult) {
    if !result.is_null() {
        // SAFETY: made by Box::into_raw in tck_check, freed once by the caller's contract.
        status::get((), || drop(unsafe { Box::from_raw(result) }));
    }
}

/// # Safety
/// `result` is NULL or a live result from `tck_check`.
unsafe fn with<T: Copy>(result: *const CheckResult, fallback: T, f: impl FnOnce(&CheckResult) -> T) -> T {
    if result.is_null() {
        return fallback;
    }
    // SAFETY: live by the caller's contract.
    let r = unsafe { &*result };
    status::get(fallback, || f(r))
}

/// The verdict (`tck_result_verdict`), or -1 for NULL.
///
/// # Safety
/// `result` is NULL or a live result.
#[no_mangle]
pub unsafe extern "C" fn tck_result_verdict(result: *const CheckResult) -> c_int {
    // SAFETY: forwarded.
    unsafe { with(result, -1, |r| r.verdict().exit_code()) }
}

/// The exit code (`tck_result_exit_code`), 2 for NULL.
///
/// # Safety
/// `result` is NULL or a live result.
#[no_mangle]
pub unsafe extern "C" fn tck_result_exit_code(result: *const CheckResult) -> c_int {
    // SAFETY: forwarded.
    unsafe { with(result, 2, |r| r.verdict().exit_code()) }
}

/// One line for people (`tck_result_summary`); NULL for NULL.
///
/// # Safety
/// `result` is NULL or a live result.
#[no_mangle]
pub unsafe extern "C" fn tck_result_summary(result: *const CheckResult) -> *const c_char {
    // SAFETY: forwarded.
    unsafe { with(result, std::ptr::null(), |r| r.summary.as_ptr()) }
}

/// The report as JSON (`tck_result_json`); NULL for NULL.
///
/// # Safety
/// `result` is NULL or a live result.
#[no_mangle]
pub unsafe extern "C" fn tck_result_json(result: *const CheckResult) -> *const c_char {
    // SAFETY: forwarded.
    unsafe { with(result, std::ptr::null(), |r| r.json.as_ptr()) }
}

/// The JSON into a caller's buffer (`tck_result_json_copy`).
///
/// # Safety
/// `result` is NULL or a live result; `buf` is NULL or writable for `size` bytes; `length`
/// is NULL or writable.
#[no_mangle]
pub unsafe extern "C" fn tck_result_json_copy(
    result: *const CheckResult,
    buf: *mut c_char,
    size: usize,
    length: *mut usize,
) -> c_int {
    status::run("tck_result_json_copy", || {
        if result.is_null() {
            return Err(Failure::null("tck_result_json_copy", "result"));
        }
        // SAFETY: live by the caller's contract.
        let json = unsafe { &*result }.json.as_bytes();
        if !length.is_null() {
            // SAFETY: writable by the caller's contract.
            unsafe { length.write(json.len()) };
        }
        if size == 0 {
            return Ok(());
        }
        if buf.is_null() {
            return Err(Failure::null("tck_result_json_copy", "buf"));
        }
        {
            let n = json.len().min(size - 1);
            // SAFETY: buf has `size` bytes; n + 1 <= size.
            unsafe {
                std::ptr::copy_nonoverlapping(json.as_ptr(), buf.cast::<u8>(), n);
                buf.add(n).write(0);
            }
        }
        if size <= json.len() {
            return Err(Failure::new(
                code::ERROR_BUFFER,
                format!(
                    "tck_result_json_copy: the JSON has {} bytes and needs a buffer of {} (NUL included); \
                     the buffer has {size}",
                    json.len(),
                    json.len() + 1
                ),
            ));
        }
        Ok(())
    })
}

/// Number of guard findings (`tck_result_finding_count`); 0 for NULL.
///
/// # Safety
/// `result` is NULL or a live result.
#[no_mangle]
pub unsafe extern "C" fn tck_result_finding_count(result: *const CheckResult) -> usize {
    // SAFETY: forwarded.
    unsafe { with(result, 0, |r| r.finding_texts.len()) }
}

/// Finding `index` as a sentence (`tck_result_finding`), NULL when out of range.
///
/// # Safety
/// `result` is NULL or a live result.
#[no_mangle]
pub unsafe extern "C" fn tck_result_finding(result: *const CheckResult, index: usize) -> *const c_char {
    // SAFETY: forwarded.
    unsafe {
        with(result, std::ptr::null(), |r| {
            r.finding_texts.get(index).map_or(std::ptr::null(), |s| s.as_ptr())
        })
    }
}
