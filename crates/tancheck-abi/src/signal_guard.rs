//! The guarded trampoline (fortran-shim/src/guard.c) seen from Rust.
//!
//! Every call into a loaded routine goes through [`call_real`] or [`call_complex`]. A
//! SIGSEGV, SIGBUS, SIGFPE, SIGILL or SIGABRT raised inside the routine ends that call with a
//! [`Crash`] instead of ending the process. The jump back from the signal handler lands in the
//! trampoline's own C frame, so no Rust frame is ever skipped.

use std::ffi::{c_char, c_void};
use std::fmt::Write as _;

use num_complex::Complex64;
use tancheck_core::{Fault, Outcome};

/// `TC_ROUTINE_ABI_VERSION`: the layout version tancheck speaks.
pub const ABI_VERSION: i32 = 2;
/// `TC_WANT_TANGENT`: the caller uses the tangent of this call.
pub const WANT_TANGENT: i32 = 1;
/// `TC_TWIN_SUFFIX`: the complex-step twin of symbol `x` is `x_cx`.
pub const TWIN_SUFFIX: &str = "_cx";
/// Exit status of the process when a routine calls `exit()` during a guarded call (a
/// Fortran `STOP`, `ERROR STOP` or failed run-time check). The guard prints a message first.
pub const EXIT_STATUS_ROUTINE_EXITED: i32 = 70;

/// The read-only description of one call (`struct tc_call`).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
#[repr(C)]
pub struct TcCall {
    pub abi_version: i32,
    pub ncomp: i32,
    pub nstate: i32,
    pub nproperties: i32,
    pub increment: i32,
    pub flags: i32,
    pub time: f64,
    pub dtime: f64,
}

/// Temperature at the start of the increment and its increment (`struct tc_temperature`;
/// `S` is `f64`, or [`Complex64`] in the complex-step twin). The layout of `[S; 2]`.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
#[repr(C)]
pub struct TcTemperature<S> {
    pub start: S,
    pub increment: S,
}

/// Stored and dissipated energy densities at the end of the increment (`struct tc_energy`).
/// The layout of `[S; 2]`.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
#[repr(C)]
pub struct TcEnergy<S> {
    pub stored: S,
    pub dissipated: S,
}

/// A routine's real entry point (`tc_routine_fn`).
pub type RealFn = unsafe extern "C" fn(
    call: *const TcCall,
    properties: *const f64,
    strain: *const f64,
    dstrain: *const f64,
    temperature: *const TcTemperature<f64>,
    stress0: *const f64,
    state0: *const f64,
    stress: *mut f64,
    state: *mut f64,
    tangent: *mut f64,
    dstress_dtemp: *mut f64,
    energy: *mut TcEnergy<f64>,
    report: *mut Outcome,
);

/// The complex-step twin's entry point (`tc_routine_fn` with `tc_real = double _Complex`).
pub type ComplexFn = unsafe extern "C" fn(
    call: *const TcCall,
    properties: *const Complex64,
    strain: *const Complex64,
    dstrain: *const Complex64,
    temperature: *const TcTemperature<Complex64>,
    stress0: *const Complex64,
    state0: *const Complex64,
    stress: *mut Complex64,
    state: *mut Complex64,
    tangent: *mut Complex64,
    dstress_dtemp: *mut Complex64,
    energy: *mut TcEnergy<Complex64>,
    report: *mut Outcome,
);

/// One call's arguments for the trampoline (`struct tc_guard_args`).
#[derive(Clone, Copy, Debug)]
#[repr(C)]
pub(crate) struct GuardArgs {
    pub call: *const TcCall,
    pub props: *const c_void,
    pub strain: *const c_void,
    pub dstrain: *const c_void,
    pub temp: *const c_void,
    pub stress0: *const c_void,
    pub state0: *const c_void,
    pub stress: *mut c_void,
    pub state: *mut c_void,
    pub tangent: *mut c_void,
    pub dstress_dtemp: *mut c_void,
    pub energy: *mut c_void,
    pub report: *mut Outcome,
    pub label: *const c_char,
    pub fp_traps: i32,
    pub reserved: i32,
}

/// How a guarded call ended (`struct tc_guard_result`).
#[derive(Clone, Copy, Debug, Default)]
#[repr(C)]
pub(crate) struct GuardResult {
    caught: i32,
    signal: i32,
    kind: i32,
    detail: i32,
    code: i32,
    reserved: i32,
    address: u64,
    pc: u64,
}

mod caller;
extern "C" {
    fn tc_guard_prepare() -> i32;
    fn tc_guard_has_altstack() -> i32;
    fn tc_guard_fp_traps_available() -> i32;
    fn tc_guard_call_real(f: RealFn, args: *const GuardArgs, result: *mut GuardResult) -> i32;
    fn tc_guard_call_complex(f: ComplexFn, args: *const GuardArgs, result: *mut GuardResult) -> i32;
    fn tc_guard_call_finite(f: FiniteFn, args: *const GuardArgs, result: *mut GuardResult) -> i32;
    fn tc_guard_call_finite_complex(
        f: FiniteComplexFn,
        args: *const GuardArgs,
        result: *mut GuardResult,
    ) -> i32;
    #[cfg(test)]
    fn tc_guard_finite_layout(out: *mut u64);
    #[cfg(test)]
    fn tc_guard_layout(out: *mut u64);
    #[cfg(test)]
    fn tc_guard_drop_altstack() -> i32;
}

/// Install the guard's signal handlers (once per process) and prepare the calling thread
/// (an alternate signal stack when it has none). The trampolines do this lazily; calling it
/// early only surfaces a failure sooner.
pub fn prepare() -> std::io::Result<()> {
    // SAFETY: no arguments; the C side is idempotent and thread-safe (pthread_once).
    let err = unsafe { tc_guard_prepare() };
    if err == 0 {
        Ok(())
    } else {
        Err(std::io::Error::from_raw_os_error(err))
    }
}

/// Whether the calling thread has an alternate signal stack, so that a stack overflow in a
/// routine can be caught. True on every thread after [`prepare`].
pub fn has_alternate_stack() -> bool {
    // SAFETY: reads the thread's signal-stack settings only.
    unsafe { tc_guard_has_altstack() != 0 }
}

/// Whether this machine can trap floating-point invalid operation, division by zero and
/// overflow (x86-64 can; many ARM cores cannot).
pub fn fp_traps_available() -> bool {
    // SAFETY: enables the traps briefly on this thread and restores the previous mask.
    unsafe { tc_guard_fp_traps_available() != 0 }
}

/// The kind of signal that ended a call.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum SignalKind {
    /// SIGSEGV: an access to memory the routine does not own.
    Segmentation,
    /// SIGBUS: an access the memory system cannot do (misaligned, past a mapped file).
    Bus,
    /// SIGFPE: an arithmetic exception.
    Arithmetic,
    /// SIGILL: an illegal instruction.
    IllegalInstruction,
    /// SIGABRT: abort() was called.
    Abort,
}

/// What the signal's code says, in portable terms.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum CrashDetail {
    /// Nothing more is known.
    None,
    /// SIGSEGV: no memory is mapped at the address.
    Unmapped,
    /// SIGSEGV: memory is mapped there, but not for that kind of access.
    AccessDenied,
    /// SIGSEGV in the thread's stack guard region: the stack overflowed.
    StackOverflow,
    /// SIGBUS: a misaligned address.
    Misaligned,
    /// SIGBUS: an address with no physical backing (e.g. past the end of a mapped file).
    NoBacking,
    /// SIGBUS: a hardware error.
    Hardware,
    IntegerDivideByZero,
    IntegerOverflow,
    FloatDivideByZero,
    FloatOverflow,
    FloatUnderflow,
    FloatInexact,
    FloatInvalid,
    SubscriptOutOfRange,
    /// SIGILL: an illegal opcode or operand (also what a compiler-inserted trap raises).
    IllegalOpcode,
    /// SIGILL: a privileged instruction or register.
    Privileged,
    /// SIGILL: another illegal-instruction cause.
    OtherIllegal,
}

/// A signal caught during a routine call.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Crash {
    /// The signal number on this system.
    pub signal: i32,
    pub kind: SignalKind,
    pub detail: CrashDetail,
    /// The raw `si_code`.
    pub code: i32,
    /// The faulting address (SIGSEGV, SIGBUS; the instruction for SIGFPE and SIGILL).
    pub address: Option<u64>,
    /// The interrupted instruction, from the signal context (where the routine was), when the
    /// platform gives it. Resolved to a function, file and line by [`Crash::into_fault`].
    pub pc: Option<u64>,
    /// When `pc` lies in a system library (libm, libc, a compiler's run time): the routine's
    /// frame that called it, the first return address into other code on the stack.
    pub caller: Option<u64>,
}

impl Crash {
    pub(crate) fn from_result(r: &GuardResult) -> Crash {
        let kind = match r.kind {
            1 => SignalKind::Segmentation,
            2 => SignalKind::Bus,
            3 => SignalKind::Arithmetic,
            4 => SignalKind::IllegalInstruction,
            _ => SignalKind::Abort,
        };
        let detail = match (kind, r.detail) {
            (SignalKind::Segmentation, 1) => CrashDetail::Unmapped,
            (SignalKind::Segmentation, 2) => CrashDetail::AccessDenied,
            (SignalKind::Segmentation, 3) => CrashDetail::StackOverflow,
            (SignalKind::Bus, 1) => CrashDetail::Misaligned,
            (SignalKind::Bus, 2) => CrashDetail::NoBacking,
            (SignalKind::Bus, 3) => CrashDetail::Hardware,
            (SignalKind::Arithmetic, 1) => CrashDetail::IntegerDivideByZero,
            (SignalKind::Arithmetic, 2) => CrashDetail::IntegerOverflow,
            (SignalKind::Arithmetic, 3) => CrashDetail::FloatDivideByZero,
            (SignalKind::Arithmetic, 4) => CrashDetail::FloatOverflow,
            (SignalKind::Arithmetic, 5) => CrashDetail::FloatUnderflow,
            (SignalKind::Arithmetic, 6) => CrashDetail::FloatInexact,
            (SignalKind::Arithmetic, 7) => CrashDetail::FloatInvalid,
            (SignalKind::Arithmetic, 8) => CrashDetail::SubscriptOutOfRange,
            (SignalKind::IllegalInstruction, 1) => CrashDetail::IllegalOpcode,
            (SignalKind::IllegalInstruction, 2) => CrashDetail::Privileged,
            (SignalKind::IllegalInstruction, 3) => CrashDetail::OtherIllegal,
            _ => CrashDetail::None,
        };
        let address = match kind {
            SignalKind::Abort => None,
            _ if r.code > 0 => Some(r.address),
            _ => None,
        };
        let pc = (r.pc != 0).then_some(r.pc);
        let caller = pc.and_then(caller::caller_of);
        Crash { signal: r.signal, kind, detail, code: r.code, address, pc, caller }
    }

    /// A plain description of what happened and what usually causes it.
    pub fn describe(&self) -> String {
        let mut s = String::new();
        let at = |s: &mut String| {
            if let Some(a) = self.address {
                let _ = write!(s, " at address {a:#x}");
            }
        };
        match self.kind {
            SignalKind::Segmentation if self.detail == CrashDetail::StackOverflow => {
                s.push_str("stack overflow (SIGSEGV");
                at(&mut s);
                s.push_str(
                    "): the routine used more stack than the thread has; look for deep \
                     recursion or large local arrays (gfortran puts local arrays on the stack \
                     with -fstack-arrays or -Ofast; make big ones allocatable)",
                );
            }
            SignalKind::Segmentation => {
                s.push_str("segmentation fault (SIGSEGV)");
                at(&mut s);
                s.push_str(": the routine read or wrote memory it does not own");
                match self.address {
                    Some(a) if a < 4096 => {
                        s.push_str(" (an address this small is a null pointer or an offset from one)")
                    }
                    _ if self.detail == CrashDetail::AccessDenied => {
                        s.push_str(" (the memory exists but does not allow that access)")
                    }
                    _ => {}
                }
                s.push_str(
                    "; an index past an array's end or an array size that does not match \
                     nstate, nprop or ncomp is the usual cause; rebuild with bound checks \
                     (tancheck build --debug) to find the line",
                );
            }
            SignalKind::Bus => {
                s.push_str("bus error (SIGBUS)");
                at(&mut s);
                s.push_str(match self.detail {
                    CrashDetail::Misaligned => ": the routine accessed memory through a misaligned address",
                    CrashDetail::NoBacking => {
                        ": the routine accessed memory that has nothing behind it (e.g. past the end of a mapped file)"
                    }
                    CrashDetail::Hardware => ": the memory system reported a hardware error",
                    _ => ": the routine accessed memory in a way the machine cannot do",
                });
            }
            SignalKind::Arithmetic => {
                let what = match self.detail {
                    CrashDetail::FloatDivideByZero => "floating-point exception (SIGFPE): division by zero",
                    CrashDetail::FloatInvalid => {
                        "floating-point exception (SIGFPE): invalid operation (0/0, inf - inf, \
                         0 * inf, the square root or logarithm of a negative number)"
                    }
                    CrashDetail::FloatOverflow => {
                        "floating-point exception (SIGFPE): overflow (a result too large for a double)"
                    }
                    CrashDetail::FloatUnderflow => "floating-point exception (SIGFPE): underflow",
                    CrashDetail::FloatInexact => "floating-point exception (SIGFPE): inexact result",
                    CrashDetail::SubscriptOutOfRange => {
                        "arithmetic exception (SIGFPE): subscript out of range"
                    }
                    CrashDetail::IntegerDivideByZero => {
                        "arithmetic exception (SIGFPE): integer division by zero"
                    }
                    CrashDetail::IntegerOverflow => "arithmetic exception (SIGFPE): integer overflow",
                    _ => "arithmetic exception (SIGFPE)",
                };
                s.push_str(what);
                if self.code > 0 {
                    if let Some(a) = self.address {
                        let _ = write!(s, " in the instruction at {a:#x}");
                    }
                }
            }
            SignalKind::IllegalInstruction => {
                s.push_str("illegal instruction (SIGILL)");
                if let Some(a) = self.address {
                    let _ = write!(s, " at {a:#x}");
                }
                s.push_str(
                    ": the routine executed an instruction this processor cannot run; either \
                     the compiler put a trap on a path it found undefined (a null pointer, a \
                     missing return), or the library was built for a newer processor \
                     (-march=native on another machine)",
                );
            }
            SignalKind::Abort => {
                s.push_str(
                    "abort (SIGABRT): the routine called abort(), or something it uses did (a \
                     failed assert, or the C library finding the heap corrupted, which leaves \
                     the process in doubt: treat results after this with suspicion)",
                );
            }
        }
        s
    }

    /// Where the routine was when the signal arrived: the library and offset, the function,
    /// and with debug information the source file and line. Reads the library's file.
    pub fn location(&self) -> Option<crate::locate::CodeLocation> {
        self.pc
            .or(match self.kind {
                // For these the signal's address is the instruction itself.
                SignalKind::Arithmetic | SignalKind::IllegalInstruction => self.address,
                _ => None,
            })
            .and_then(crate::locate::locate)
    }

    /// The crash as a [`Fault`], with the place it happened. Allocates (the description)
    /// and reads the library's debug information: only on the failure path, after the
    /// guarded call has returned (never in the signal handler).
    pub fn into_fault(self) -> Fault {
        let mut what = self.describe();
        if let Some(loc) = self.location() {
            what = format!("{what}; the routine was {loc}");
            if let Some(c) = self.caller.and_then(crate::locate::locate) {
                let c = c.to_string();
                let c = c.strip_prefix("in ").unwrap_or(&c);
                what = format!(
                    "{what}, called from {c} (the first return address into other code on the stack)"
                );
            }
        }
        Fault::Crashed { signal: self.signal, what }
    }
}

/// Run one trampoline call with a fresh result slot and turn a caught signal into a [`Crash`];
/// every guarded entry (point, finite, block; real or complex) ends the same way.
pub(crate) fn guarded(call: impl FnOnce(&mut GuardResult) -> i32) -> Result<(), Crash> {
    let mut r = GuardResult::default();
    if call(&mut r) == 0 {
        Ok(())
    } else {
        Err(Crash::from_result(&r))
    }
}

/// Call a routine's real entry point through the guard.
///
/// # Safety
/// `f` must be a routine with the ABI's signature, and every pointer in `args` must be valid
/// for the lengths the `tc_call` in `args` announces.
pub(crate) unsafe fn call_real(f: RealFn, args: &GuardArgs) -> Result<(), Crash> {
    // SAFETY: forwarded from the caller's contract; `r` is a valid out-pointer.
    guarded(|r| unsafe { tc_guard_call_real(f, args, r) })
}

/// A finite-strain routine's entry point (`tc_finite_fn` of tancheck_finite.h, real).
pub type FiniteFn = unsafe extern "C" fn(
    call: *const c_void,
    properties: *const f64,
    f0: *const f64,
    f1: *const f64,
    rotation: *const f64,
    temperature: *const c_void,
    stress0: *const f64,
    state0: *const f64,
    stress: *mut f64,
    state: *mut f64,
    tangent: *mut f64,
    energy: *mut c_void,
    report: *mut Outcome,
);

/// The finite-strain twin's entry point (`tc_real` = `double _Complex`).
pub type FiniteComplexFn = unsafe extern "C" fn(
    call: *const c_void,
    properties: *const Complex64,
    f0: *const Complex64,
    f1: *const Complex64,
    rotation: *const Complex64,
    temperature: *const c_void,
    stress0: *const Complex64,
    state0: *const Complex64,
    stress: *mut Complex64,
    state: *mut Complex64,
    tangent: *mut Complex64,
    energy: *mut c_void,
    report: *mut Outcome,
);

/// `tc_guard_args.reserved` of a finite-strain call (`TC_GUARD_LAYOUT_FINITE`).
pub(crate) const LAYOUT_FINITE: i32 = 1;

/// Call a finite-strain routine through the guard; `args` in the finite layout (properties,
/// f0, f1 in strain and dstrain, the rotation in dstress_dtemp, `reserved` = LAYOUT_FINITE).
///
/// # Safety
/// `f` must have the finite-strain real signature and every pointer of `args` the length
/// its `tc_finite_call` announces.
pub(crate) unsafe fn call_finite(f: FiniteFn, args: &GuardArgs) -> Result<(), Crash> {
    // SAFETY: forwarded from the caller's contract; `r` is a valid out-pointer.
    guarded(|r| unsafe { tc_guard_call_finite(f, args, r) })
}

/// As [`call_finite`], for the complex-step twin.
///
/// # Safety
/// As [`call_finite`], with complex arrays.
pub(crate) unsafe fn call_finite_complex(f: FiniteComplexFn, args: &GuardArgs) -> Result<(), Crash> {
    // SAFETY: forwarded from the caller's contract; `r` is a valid out-pointer.
    guarded(|r| unsafe { tc_guard_call_finite_complex(f, args, r) })
}

/// Size of the finite call header and offset of its time field, as the C side sees them.
#[cfg(test)]
pub(crate) fn finite_layout() -> [u64; 2] {
    let mut out = [0u64; 2];
    // SAFETY: writes two u64.
    unsafe { tc_guard_finite_layout(out.as_mut_ptr()) };
    out
}

/// Call a complex-step twin through the guard.
///
/// # Safety
/// As [`call_real`], with complex arrays.
pub(crate) unsafe fn call_complex(f: ComplexFn, args: &GuardArgs) -> Result<(), Crash> {
    // SAFETY: forwarded from the caller's contract; `r` is a valid out-pointer.
    guarded(|r| unsafe { tc_guard_call_complex(f, args, r) })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::mem::{offset_of, size_of};

    /// `tc_temperature` and `tc_energy` have the layout of two values in a row, so the
    /// caller may pass the address of an `[S; 2]` for either.
    #[test]
    fn the_named_pairs_have_the_layout_of_two_slots() {
        use std::mem::align_of;
        assert_eq!(size_of::<TcTemperature<f64>>(), size_of::<[f64; 2]>());
        assert_eq!(align_of::<TcTemperature<f64>>(), align_of::<[f64; 2]>());
        assert_eq!(offset_of!(TcTemperature<f64>, increment), size_of::<f64>());
        assert_eq!(size_of::<TcEnergy<Complex64>>(), size_of::<[Complex64; 2]>());
        assert_eq!(offset_of!(TcEnergy<Complex64>, dissipated), size_of::<Complex64>());
        assert_eq!(size_of::<TcTemperature<Complex64>>(), size_of::<[Complex64; 2]>());
        assert_eq!(offset_of!(TcEnergy<f64>, dissipated), size_of::<f64>());
    }

    /// The structs shared with C have the same layout on both sides.
    #[test]
    fn layouts_match_the_c_side() {
        let mut c = [0u64; 13];
        // SAFETY: the C side writes exactly 12 values.
        unsafe { tc_guard_layout(c.as_mut_ptr()) };
        let rust = [
            size_of::<TcCall>(),
            offset_of!(TcCall, time),
            offset_of!(TcCall, dtime),
            size_of::<Outcome>(),
            offset_of!(Outcome, largest_fraction),
            offset_of!(Outcome, message),
            size_of::<GuardArgs>(),
            offset_of!(GuardArgs, label),
            offset_of!(GuardArgs, fp_traps),
            size_of::<GuardResult>(),
            offset_of!(GuardResult, address),
            offset_of!(GuardResult, pc),
            EXIT_STATUS_ROUTINE_EXITED as usize,
        ];
        let rust: Vec<u64> = rust.iter().map(|&v| v as u64).collect();
        assert_eq!(rust, c.to_vec());
    }

    #[test]
    fn every_thread_gets_an_alternate_stack() {
        // A std thread usually has one already; drop it to look like a thread made outside
        // Rust, which has none. prepare() must then give the thread its own.
        std::thread::spawn(|| {
            // SAFETY: this thread has made no guarded call yet and has no handler running.
            assert_eq!(unsafe { tc_guard_drop_altstack() }, 0);
            assert!(!has_alternate_stack());
            prepare().expect("the guard installs");
            assert!(has_alternate_stack());
        })
        .join()
        .unwrap();
    }

    #[test]
    fn descriptions_name_the_signal_and_the_cause() {
        let segv = Crash {
            signal: 11,
            kind: SignalKind::Segmentation,
            detail: CrashDetail::Unmapped,
            code: 1,
            address: Some(0),
            pc: None,
            caller: None,
        };
        let d = segv.describe();
        assert!(d.starts_with("segmentation fault (SIGSEGV) at address 0x0: the routine read or wrote memory it does not own"), "{d}");
        assert!(d.contains("null pointer"), "{d}");
        let fpe = Crash {
            signal: 8,
            kind: SignalKind::Arithmetic,
            detail: CrashDetail::FloatInvalid,
            code: 7,
            address: Some(0x1234),
            pc: None,
            caller: None,
        };
        assert!(fpe.describe().starts_with("floating-point exception (SIGFPE): invalid operation"));
        match fpe.into_fault() {
            Fault::Crashed { signal, what } => {
                assert_eq!(signal, 8);
                assert!(what.contains("0x1234"), "{what}");
            }
            other => panic!("expected a crash, got {other:?}"),
        }
    }
}
