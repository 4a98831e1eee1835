//! The routine's frame that called into a system library where a signal was caught: found
//! among the words the guard kept from the top of the interrupted stack (see guard.c's
//! `record_stack`), as a debugger's stack scan finds a return address.

extern "C" {
    fn tc_guard_fault_stack(out: *mut u64, max: i32) -> i32;
}

/// Words of the interrupted stack the guard keeps (`GUARD_STACK_WORDS` of guard.c).
const STACK_WORDS: usize = 64;

/// The routine's frame that called the system library holding `pc`: the first word, from the
/// top of the interrupted stack the guard kept, that is an address in a loaded object that is
/// neither a system library nor this program (the routine's library, as a debugger's stack
/// scan finds a return address). `None` when `pc` is not in a system library, or no word
/// points into other code. A trap in libm's log or sqrt of a negative number was placed in
/// libm, its nearest export named, with advice to rebuild with debug information that the
/// routine's library already had (a user-style sweep). Reads the calling thread's words: call
/// it on the thread whose call was caught, before its next guarded call.
pub(super) fn caller_of(pc: u64) -> Option<u64> {
    let object = crate::locate::object_of(pc)?;
    if !crate::locate::is_system_library(&object) {
        return None;
    }
    let mut words = [0u64; STACK_WORDS];
    // SAFETY: `words` holds STACK_WORDS entries, the most the guard writes.
    let n =
        unsafe { tc_guard_fault_stack(words.as_mut_ptr(), STACK_WORDS as i32) }.clamp(0, STACK_WORDS as i32);
    let exe = std::env::current_exe().ok().and_then(|e| e.canonicalize().ok());
    words[..n as usize].iter().copied().find(|&w| {
        w > 4096
            && crate::locate::object_of(w).is_some_and(|o| {
                !crate::locate::is_system_library(&o)
                    && o.canonicalize().ok().zip(exe.as_ref()).is_none_or(|(o, e)| &o != e)
            })
            // The project's Fortran module of complex-step functions (compiled into the
            // routine's library) passes the call on: its caller is the routine's line.
            && !crate::locate::locate(w).is_some_and(|l| {
                l.function.as_deref().or(l.symbol.as_deref()).is_some_and(|f| f.contains("tancheck_cstep"))
            })
    })
}
