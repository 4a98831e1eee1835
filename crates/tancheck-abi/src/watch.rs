//! The process-wide watch of `fortran-shim/src/guard.c`, for the tancheck program.
//!
//! Armed ([`arm`]), the guard turns every way a routine can end the process from inside into a
//! reported fault with "last words": an `exit()` from any thread or from a library's
//! constructor while it loads (status [`crate::EXIT_STATUS_ROUTINE_EXITED`]), a SIGABRT inside
//! a call (heap corruption found by the C library) and a fatal signal outside any call
//! (status 3). The last words are the fault line with when it happened and the inputs of the
//! running call, and a JSON report naming the fault ([`set_report`]), written from static
//! buffers. A watchdog thread reads the call counters ([`watch`]) to see a call that never
//! returns and ends the process with [`die`]. None of this adds work to a call beyond two
//! atomic increments and two stores in the trampoline.
//!
//! What no process can see from inside: `_exit()` (no exit hooks run), SIGKILL, and a routine
//! that switches the guard's handlers off. `--isolate` sees those too.

use std::ffi::{c_char, CString};

extern "C" {
    fn tc_guard_arm() -> i32;
    fn tc_guard_set_phase(phase: i32);
    fn tc_guard_loading(on: i32);
    fn tc_guard_set_label(label: *const c_char);
    fn tc_guard_set_report(
        head: *const c_char,
        report: *const c_char,
        tmp: *const c_char,
        to_stdout: i32,
    ) -> i32;
    fn tc_guard_remove_on_stop(path: *const c_char) -> i32;
    fn tc_guard_defer_stop(on: i32);
    fn tc_guard_stop_signal() -> i32;
    fn tc_guard_protect_stdout() -> i32;
    fn tc_guard_follow_parent(parent: i32) -> i32;
    fn tc_guard_watch(out: *mut u64);
    fn tc_guard_die(status: i32, what: *const c_char) -> !;
    fn tc_guard_watch_slots(begun: *mut u64, ended: *mut u64, max: i32) -> i32;
    fn tc_guard_die_slot(status: i32, slot: i32, what: *const c_char) -> !;
    fn tc_guard_finish(status: i32) -> !;
    fn tc_guard_dying() -> i32;
}

/// What the program is doing, for the words "when it happened".
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[repr(i32)]
pub enum Phase {
    /// Not armed: an exit is the program's own.
    Off = 0,
    /// Armed, before any library is loaded.
    Starting = 1,
    /// Loading a routine's library (its constructors run).
    Loading = 2,
    /// Calling the routine.
    Checking = 3,
    /// The check is over; the report is being written.
    Reporting = 4,
}

/// Arm the watch: from now on an `exit()` before [`set_phase`]`(Phase::Off)` is a fault, and
/// SIGINT, SIGTERM and SIGHUP remove the temporary files before the process dies of them.
pub fn arm() -> std::io::Result<()> {
    // SAFETY: no arguments; idempotent.
    let err = unsafe { tc_guard_arm() };
    if err == 0 {
        Ok(())
    } else {
        Err(std::io::Error::from_raw_os_error(err))
    }
}

/// Say what the program is doing ([`Phase::Off`] disarms).
pub fn set_phase(phase: Phase) {
    // SAFETY: a plain store on the C side.
    unsafe { tc_guard_set_phase(phase as i32) }
}

fn c(s: &str) -> CString {
    CString::new(s.replace('\0', " ")).expect("NUL bytes were replaced")
}

/// Around loading a library: while armed, the phase is [`Phase::Loading`] until
/// `loading(false)` restores the one before. Unarmed (the C API), nothing happens.
pub fn loading(on: bool) {
    // SAFETY: plain stores on the C side.
    unsafe { tc_guard_loading(i32::from(on)) }
}

/// The routine's name, for last words outside a call.
pub fn set_label(label: &str) {
    let l = c(label);
    // SAFETY: a NUL-terminated string, copied on the C side.
    unsafe { tc_guard_set_label(l.as_ptr()) }
}

/// Where the last words' JSON report goes: `head` is the report object's opening without the
/// closing brace (`{"tool": ..., "routine": ...`), `report` the file and `tmp` its temporary
/// name (empty: no file), or standard output. Returns false when a string is too long.
pub fn set_report(head: &str, report: &str, tmp: &str, to_stdout: bool) -> bool {
    let (h, r, t) = (c(head), c(report), c(tmp));
    // SAFETY: NUL-terminated strings, copied on the C side.
    unsafe { tc_guard_set_report(h.as_ptr(), r.as_ptr(), t.as_ptr(), i32::from(to_stdout)) == 0 }
}

/// A file or folder to remove when a stop signal ends the process (give a folder before the
/// files in it: files are removed first, folders last). Returns false when there is no room.
pub fn remove_on_stop(path: &std::path::Path) -> bool {
    let p = c(&path.to_string_lossy());
    // SAFETY: a NUL-terminated string, copied on the C side.
    unsafe { tc_guard_remove_on_stop(p.as_ptr()) == 0 }
}

/// Record the first stop signal instead of dying of it; [`stop_signal`] says which arrived. A
/// second one ends the process as usual.
pub fn defer_stop(on: bool) {
    // SAFETY: a plain store on the C side.
    unsafe { tc_guard_defer_stop(i32::from(on)) }
}

/// The stop signal that arrived while deferred, or 0.
pub fn stop_signal() -> i32 {
    // SAFETY: a plain load on the C side.
    unsafe { tc_guard_stop_signal() }
}

/// Keep routines off the program's standard output: descriptor 1 becomes a copy of
/// standard error, and the returned descriptor is the program's own standard output
/// (`None` when it could not be done). Once per process; later calls return the same.
pub fn protect_stdout() -> Option<i32> {
    // SAFETY: descriptor juggling on the C side, once.
    let fd = unsafe { tc_guard_protect_stdout() };
    (fd >= 0).then_some(fd)
}

/// A worker follows its parent: when `parent` dies, this process gets SIGTERM (which removes
/// the files given to [`remove_on_stop`] and ends it). Returns false when the parent is
/// already gone (the caller should end), true otherwise (also where the system cannot).
pub fn follow_parent(parent: u32) -> bool {
    // SAFETY: prctl and getppid on the C side.
    unsafe { tc_guard_follow_parent(parent as i32) != 1 }
}

/// The call counters, for a watchdog.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Watch {
    pub calls_begun: u64,
    pub calls_ended: u64,
    /// The increment of the last call begun (-1 before any).
    pub increment: i64,
    /// Whether a library is being loaded (its constructors run).
    pub loading: bool,
}

impl Watch {
    /// Whether a call is running.
    pub fn in_call(&self) -> bool {
        self.calls_begun != self.calls_ended
    }
}

/// Read the call counters.
pub fn watch() -> Watch {
    let mut out = [0u64; 4];
    // SAFETY: a valid out-array of 4.
    unsafe { tc_guard_watch(out.as_mut_ptr()) };
    Watch {
        calls_begun: out[0],
        calls_ended: out[1],
        increment: out[2] as i64,
        loading: out[3] == Phase::Loading as u64,
    }
}

/// The call counters of each thread that called a routine, (begun, ended) per thread: a call
/// runs on a thread while they differ. Into `out` (cleared first), at most 64 threads.
pub fn slots(out: &mut Vec<(u64, u64)>) {
    let (mut b, mut e) = ([0u64; 64], [0u64; 64]);
    // SAFETY: two valid out-arrays of 64.
    let n = unsafe { tc_guard_watch_slots(b.as_mut_ptr(), e.as_mut_ptr(), 64) };
    out.clear();
    out.extend((0..n.max(0) as usize).map(|i| (b[i], e[i])));
}

/// [`die`] naming the call running on thread slot `slot` (an index of [`slots`]).
pub fn die_slot(status: i32, slot: usize, what: &str) -> ! {
    let w = c(what);
    // SAFETY: a NUL-terminated string; the C side never returns.
    unsafe { tc_guard_die_slot(status, slot as i32, w.as_ptr()) }
}

/// Last words for a fault the program found (`what`, e.g. a call that never returns), with
/// the inputs of the running call, then end the process with `status`.
pub fn die(status: i32, what: &str) -> ! {
    let w = c(what);
    // SAFETY: a NUL-terminated string; the C side never returns.
    unsafe { tc_guard_die(status, w.as_ptr()) }
}

/// The program's own end with `status`, which never races a routine's thread calling `exit`
/// at the same moment: last words already being said win; a later `exit` from a thread waits
/// while this ends the process (`_exit`, after flushing the C library's streams).
pub fn finish(status: i32) -> ! {
    // SAFETY: the C side never returns.
    unsafe { tc_guard_finish(status) }
}

/// Whether the process is ending: last words are being said (a routine's thread ended the
/// process, or a fault outside a call), or [`finish`] was called. A report the program is
/// writing then must not be put in place: the last words write their own.
pub fn dying() -> bool {
    // SAFETY: an atomic load on the C side.
    unsafe { tc_guard_dying() != 0 }
}
