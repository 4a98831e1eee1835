//! Status codes, the per-thread last error, and the wrapper that keeps a panic from crossing
//! into C.

use std::cell::RefCell;
use std::ffi::{c_char, c_int, CString};
use std::panic::{catch_unwind, AssertUnwindSafe};

/// `tck_status`: what a fallible call returns. The numbers are fixed; new codes only append.
pub mod code {
    use std::ffi::c_int;
    pub const OK: c_int = 0;
    pub const ERROR_NULL: c_int = 1;
    pub const ERROR_VERSION: c_int = 2;
    pub const ERROR_INVALID: c_int = 3;
    pub const ERROR_GUARD: c_int = 4;
    pub const ERROR_BUFFER: c_int = 5;
    pub const ERROR_INTERNAL: c_int = 6;
}

/// A failed call: its status code and the message for `tck_last_error`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Failure {
    pub code: c_int,
    pub message: String,
}

impl Failure {
    pub fn new(code: c_int, message: impl Into<String>) -> Failure {
        Failure { code, message: message.into() }
    }

    pub fn null(function: &str, argument: &str) -> Failure {
        Failure::new(code::ERROR_NULL, format!("{function}: `{argument}` is NULL; pass a valid pointer"))
    }

    pub fn invalid(message: impl Into<String>) -> Failure {
        Failure::new(code::ERROR_INVALID, message)
    }
}

thread_local! {
    static LAST_ERROR: RefCell<CString> = RefCell::new(CString::default());
}

/// Keep `message` as this thread's last error.
fn set_last_error(message: &str) {
    let text = CString::new(message.replace('\0', " ")).expect("NUL bytes were replaced");
    LAST_ERROR.with(|e| *e.borrow_mut() = text);
}

/// This thread's last error; valid until the next failing call on the thread replaces it.
pub fn last_error_ptr() -> *const c_char {
    LAST_ERROR.with(|e| e.borrow().as_ptr())
}

/// This thread's last error as text (for Rust callers and tests).
pub fn last_error() -> String {
    LAST_ERROR.with(|e| e.borrow().to_string_lossy().into_owned())
}

/// Run `f` for the C function `function`: a failure becomes its status code and the last
/// error, a panic becomes `TCK_ERROR_INTERNAL`.
pub fn run(function: &str, f: impl FnOnce() -> Result<(), Failure>) -> c_int {
    match catch_unwind(AssertUnwindSafe(f)) {
        Ok(Ok(())) => code::OK,
        Ok(Err(failure)) => {
            set_last_error(&failure.message);
            failure.code
        }
        Err(panic) => {
            let what = panic
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| panic.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "no message".into());
            set_last_error(&format!(
                "{function}: tancheck failed inside ({what}); this is a bug in tancheck, please report it \
                 with the options that caused it"
            ));
            code::ERROR_INTERNAL
        }
    }
}

/// Run a getter that cannot fail but must not unwind into C: `fallback` on a panic.
pub fn get<T>(fallback: T, f: impl FnOnce() -> T) -> T {
    catch_unwind(AssertUnwindSafe(f)).unwrap_or(fallback)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn failures_and_panics_become_codes_and_messages() {
        assert_eq!(run("f", || Ok(())), code::OK);
        assert_eq!(run("f", || Err(Failure::invalid("bad kind"))), code::ERROR_INVALID);
        assert_eq!(last_error(), "bad kind");
        // A success leaves the last error as it was.
        assert_eq!(run("f", || Ok(())), code::OK);
        assert_eq!(last_error(), "bad kind");
        let c = run("tck_thing", || panic!("index out of range"));
        assert_eq!(c, code::ERROR_INTERNAL);
        assert!(last_error().starts_with("tck_thing: tancheck failed inside (index out of range)"));
        assert_eq!(get(7, || panic!("x")), 7);
    }

    #[test]
    fn the_last_error_is_per_thread() {
        run("f", || Err(Failure::null("tck_check", "opts")));
        std::thread::spawn(|| assert_eq!(last_error(), "")).join().unwrap();
        assert_eq!(last_error(), "tck_check: `opts` is NULL; pass a valid pointer");
    }
}
