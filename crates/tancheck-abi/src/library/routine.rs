//! One routine of a loaded library as a [`Routine`]: every real and complex call through the
//! memory guards and the guarded trampoline.

use std::ffi::CString;

use num_complex::Complex64;
use tancheck_core::routine::{status_fault, Sweep, SweepEnd};
use tancheck_core::{CallInput, CallOutput, ComplexRoutine, Fault, Outcome, Routine, RoutineInfo};

use crate::error::{LoadError, TrapError};
use crate::memory_guards::{Findings, GuardBuffers, GuardFinding, GuardLevel};
use crate::signal_guard::{
    self as guard, ComplexFn, GuardArgs, RealFn, TcCall, ABI_VERSION, TWIN_SUFFIX, WANT_TANGENT,
};

use super::{call_sizes, Library};

mod sweep;

/// One routine of a loaded library (or given by its function pointers), callable as a
/// [`Routine`] through the guarded trampoline and the memory guards of [`crate::guards`].
///
/// It keeps the library loaded as long as it lives. Every call, real or complex, goes through
/// the same path: the lengths are checked, the memory guards (at the routine's
/// [`GuardLevel`], [`GuardLevel::Light`] unless set otherwise) copy the arrays into the
/// guarded block made with the routine, and the trampoline makes the call. What the guards
/// find is collected in [`LibraryRoutine::findings`].
pub struct LibraryRoutine {
    info: RoutineInfo,
    symbol: String,
    ncomp: usize,
    nstate: usize,
    nprop: usize,
    /// ncomp, nstate, nprop as the ABI's 32-bit fields.
    call_sizes: (i32, i32, i32),
    real: RealFn,
    twin: Option<ComplexFn>,
    fp_traps: bool,
    label: CString,
    library: Option<Library>,
    guard_level: GuardLevel,
    /// The next real call runs at [`GuardLevel::Full`] (see `guard_next_call_fully`).
    full_next: bool,
    real_guards: GuardBuffers<f64>,
    complex_guards: Option<GuardBuffers<Complex64>>,
    findings: Findings,
}

impl std::fmt::Debug for LibraryRoutine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("LibraryRoutine")
            .field("library", &self.library.as_ref().map(|l| &l.path))
            .field("symbol", &self.symbol)
            .field("twin", &self.twin.is_some())
            .field("fp_traps", &self.fp_traps)
            .field("guard_level", &self.guard_level)
            .finish()
    }
}

impl LibraryRoutine {
    /// A routine given by its entry points instead of a library's symbols: a routine linked
    /// into this process (the C API's way in). `info.name` names it in reports and in the
    /// guard's message when the routine calls exit().
    ///
    /// # Safety
    /// `real` must have the routine ABI's real signature and `twin`, when given, the complex
    /// one (`tc_real` = `double _Complex`); both must stay callable while the routine lives.
    pub unsafe fn from_fn_pointers(
        info: RoutineInfo,
        real: RealFn,
        twin: Option<ComplexFn>,
    ) -> Result<LibraryRoutine, LoadError> {
        let call_sizes = call_sizes(&info)?;
        let name = info.name.replace('\0', " ");
        LibraryRoutine::assemble(info, call_sizes, &name, real, twin, name.clone(), None)
    }

    pub(super) fn assemble(
        info: RoutineInfo,
        call_sizes: (i32, i32, i32),
        symbol: &str,
        real: RealFn,
        twin: Option<ComplexFn>,
        label: String,
        library: Option<Library>,
    ) -> Result<LibraryRoutine, LoadError> {
        guard::prepare().map_err(|source| LoadError::Guard { source })?;
        let label = CString::new(label.replace('\0', " ")).expect("NUL bytes were replaced");
        let (ncomp, nstate, nprop) = (info.convention.ncomp(), info.nstate, info.nprop);
        Ok(LibraryRoutine {
            ncomp,
            nstate,
            nprop,
            call_sizes,
            info,
            symbol: symbol.to_string(),
            real,
            twin,
            fp_traps: false,
            label,
            library,
            guard_level: GuardLevel::default(),
            full_next: false,
            real_guards: GuardBuffers::new(ncomp, nstate, nprop),
            complex_guards: twin.map(|_| GuardBuffers::new(ncomp, nstate, nprop)),
            findings: Findings::default(),
        })
    }

    /// The symbol this routine was loaded from (for one made from function pointers: its name).
    pub fn symbol(&self) -> &str {
        &self.symbol
    }

    /// The library it lives in; `None` for a routine made from function pointers.
    pub fn library(&self) -> Option<&Library> {
        self.library.as_ref()
    }

    /// Whether the library exports the complex-step twin `symbol_cx`.
    pub fn has_twin(&self) -> bool {
        self.twin.is_some()
    }

    /// Whether calls run with floating-point traps.
    pub fn fp_traps(&self) -> bool {
        self.fp_traps
    }

    /// Run the following calls with traps for invalid operation, division by zero and
    /// overflow, so that the first such operation stops the call with a SIGFPE
    /// ([`Fault::Crashed`]) instead of leaving inf or NaN in the results.
    ///
    /// With guards on, the outputs arrive filled with a signalling NaN: a routine that does
    /// arithmetic on an output before writing it (`stress[i] += ...`) then traps too.
    pub fn set_fp_traps(&mut self, on: bool) -> Result<(), TrapError> {
        if on && !guard::fp_traps_available() {
            return Err(TrapError::Unavailable { arch: std::env::consts::ARCH });
        }
        self.fp_traps = on;
        Ok(())
    }

    /// How much the memory guards check in every call.
    pub fn guard_level(&self) -> GuardLevel {
        self.guard_level
    }

    /// Set the guard level for the following calls. [`GuardLevel::Full`] makes every call
    /// twice; the extra calls are counted in [`LibraryRoutine::guard_calls`].
    pub fn set_guard_level(&mut self, level: GuardLevel) {
        self.guard_level = level;
    }

    /// What the guards found so far: one entry per kind and array, with the first call that
    /// showed it and how many calls did.
    pub fn findings(&self) -> &[GuardFinding] {
        self.findings.list()
    }

    /// The findings so far, leaving none.
    pub fn take_findings(&mut self) -> Vec<GuardFinding> {
        self.findings.take()
    }

    /// Calls the guards made besides the caller's (reruns of [`GuardLevel::Full`]).
    pub fn guard_calls(&self) -> u64 {
        self.findings.extra_calls
    }

    /// Count the guards' extra calls from zero again (a check made anew on the same handle).
    pub fn reset_guard_calls(&mut self) {
        self.findings.extra_calls = 0;
    }

    #[inline(always)]
    fn tc_call<S>(&self, input: &CallInput<'_, S>) -> TcCall {
        TcCall {
            abi_version: ABI_VERSION,
            ncomp: self.call_sizes.0,
            nstate: self.call_sizes.1,
            nproperties: self.call_sizes.2,
            increment: input.increment,
            flags: if input.want_tangent { WANT_TANGENT } else { 0 },
            time: input.time[0],
            dtime: input.time[1],
        }
    }

    /// The lengths every call passes must be the ones announced in `tc_call`: the routine
    /// trusts them. A few integer comparisons, checked in release builds too, because a
    /// wrong length here would let the routine write past a buffer.
    /// Every comparison is made (`|` of differences, no short-circuit branches): one branch,
    /// to the cold panic.
    #[inline(always)]
    fn check_lengths<S>(&self, input: &CallInput<'_, S>, output: &CallOutput<'_, S>) {
        let (n, ns, np) = (self.ncomp, self.nstate, self.nprop);
        let off = (input.props.len() ^ np)
            | (input.strain.len() ^ n)
            | (input.dstrain.len() ^ n)
            | (input.stress0.len() ^ n)
            | (input.state0.len() ^ ns)
            | (output.stress.len() ^ n)
            | (output.state.len() ^ ns)
            | (output.tangent.len() ^ (n * n))
            | (output.dstress_dtemp.len() ^ n);
        if off != 0 {
            self.wrong_lengths();
        }
    }

    #[cold]
    #[inline(never)]
    fn wrong_lengths(&self) -> ! {
        let (n, ns, np) = (self.ncomp, self.nstate, self.nprop);
        panic!(
            "call to `{}` with arrays of the wrong length (expected ncomp = {n}, nstate = {ns}, nproperties = {np})",
            self.info.name
        );
    }

    #[inline(always)]
    fn args<S>(
        &self,
        call: &TcCall,
        temp: &[S; 2],
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> GuardArgs {
        GuardArgs {
            call,
            props: input.props.as_ptr().cast(),
            strain: input.strain.as_ptr().cast(),
            dstrain: input.dstrain.as_ptr().cast(),
            // `[S; 2]` has the layout of `tc_temperature` and `tc_energy` (`TcTemperature`,
            // `TcEnergy`): start then increment, stored then dissipated.
            temp: temp.as_ptr().cast(),
            stress0: input.stress0.as_ptr().cast(),
            state0: input.state0.as_ptr().cast(),
            stress: output.stress.as_mut_ptr().cast(),
            state: output.state.as_mut_ptr().cast(),
            tangent: output.tangent.as_mut_ptr().cast(),
            dstress_dtemp: output.dstress_dtemp.as_mut_ptr().cast(),
            energy: output.energy.as_mut_ptr().cast(),
            report: std::ptr::from_mut::<Outcome>(output.outcome),
            label: self.label.as_ptr(),
            fp_traps: i32::from(self.fp_traps),
            reserved: 0,
        }
    }
}

/// The ABI promises these fields before every call, whoever the caller is.
fn reset_outcome(o: &mut Outcome) {
    o.status = tancheck_core::routine::status::OK;
    o.branch = -1;
    o.provides = 0;
    o.reserved = 0;
}

impl LibraryRoutine {
    /// A guard finding first seen in the call that just returned ends that call with
    /// [`Fault::Misbehaved`], so the report keeps the call's inputs. (Allocates only then.)
    fn new_finding(&self, known: usize) -> Result<(), Fault> {
        match self.findings.list().get(known) {
            None => Ok(()),
            Some(f) => Err(Fault::Misbehaved { what: f.to_string() }),
        }
    }
}

impl Routine for LibraryRoutine {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.check_lengths(input, output);
        reset_outcome(output.outcome);
        let call = self.tc_call(input);
        let real = self.real;
        let level = if std::mem::take(&mut self.full_next) { GuardLevel::Full } else { self.guard_level };
        if level == GuardLevel::Off {
            let temp = input.temp;
            let args = self.args(&call, &temp, input, output);
            // SAFETY: `real` has the ABI's real signature (looked up by name, or promised by
            // the caller of `from_fn_pointers`); every array has the length announced in
            // `call` (check_lengths), and `call`, `temp` outlive the call.
            unsafe { guard::call_real(real, &args) }.map_err(guard::Crash::into_fault)?;
            // No guards, no findings: the status is all there is to look at.
            return status_fault(output.outcome);
        }
        let known = self.findings.list().len();
        self.real_guards
            .call(
                level,
                &call,
                self.label.as_ptr(),
                self.fp_traps,
                false,
                input,
                output,
                &mut self.findings,
                // SAFETY: as above; the guarded block holds every array at the announced
                // length, each followed by its zone.
                |args| unsafe { guard::call_real(real, args) },
            )
            .map_err(guard::Crash::into_fault)?;
        self.new_finding(known)?;
        status_fault(output.outcome)
    }

    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        if self.twin.is_some() {
            Some(self)
        } else {
            None
        }
    }

    /// The same entry points (and library, kept loaded) with guard blocks of its own, at the
    /// same guard level and traps: a handle for another thread.
    fn another(&self) -> Option<Box<dyn Routine + Send>> {
        let label = self.label.to_string_lossy().into_owned();
        let mut r = LibraryRoutine::assemble(
            self.info.clone(),
            self.call_sizes,
            &self.symbol,
            self.real,
            self.twin,
            label,
            self.library.clone(),
        )
        .ok()?;
        r.fp_traps = self.fp_traps;
        r.guard_level = self.guard_level;
        Some(Box::new(r))
    }

    /// With the guards on (light or full), the next real call runs at the full level; with
    /// them off, nothing changes.
    fn guard_next_call_fully(&mut self) -> bool {
        self.full_next = self.guard_level != GuardLevel::Off;
        self.full_next
    }

    fn forget_guard_findings(&mut self) {
        self.findings.take();
    }

    fn guard_extra_calls(&self) -> u64 {
        self.findings.extra_calls
    }

    fn absorb_guard_extra_calls(&mut self, n: u64) {
        self.findings.extra_calls += n;
    }

    /// With the guards off or light: one guarded entry for all the calls (see `sweep`).
    fn sweep_real(&mut self, sweep: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        self.sweep_real_calls(sweep)
    }

    fn sweep_complex(&mut self, sweep: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        self.sweep_complex_calls(sweep)
    }
}

impl ComplexRoutine for LibraryRoutine {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let Some(twin) = self.twin else {
            return Err(Fault::Unsupported(format!(
                "the library exports no complex-step twin `{}{TWIN_SUFFIX}`; rebuild it with \
                 `tancheck build` (without --no-twin)",
                self.symbol
            )));
        };
        self.check_lengths(input, output);
        reset_outcome(output.outcome);
        let call = self.tc_call(input);
        let guards = match (self.guard_level, self.complex_guards.as_mut()) {
            (GuardLevel::Light | GuardLevel::Full, Some(guards)) => guards,
            _ => {
                let temp = input.temp;
                let args = self.args(&call, &temp, input, output);
                // SAFETY: as in `call`, with the twin's complex signature; Complex64 is repr(C)
                // and laid out as C's double _Complex.
                unsafe { guard::call_complex(twin, &args) }.map_err(guard::Crash::into_fault)?;
                // No guards, no findings: the status is all there is to look at.
                return status_fault(output.outcome);
            }
        };
        let known = self.findings.list().len();
        guards
            .call(
                self.guard_level,
                &call,
                self.label.as_ptr(),
                self.fp_traps,
                true,
                input,
                output,
                &mut self.findings,
                // SAFETY: as in `call`, with the twin's complex signature; Complex64 is
                // repr(C) and laid out as C's double _Complex.
                |args| unsafe { guard::call_complex(twin, args) },
            )
            .map_err(guard::Crash::into_fault)?;
        self.new_finding(known)?;
        status_fault(output.outcome)
    }
}
