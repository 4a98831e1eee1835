//! Block routines of a loaded library (fortran-shim/include/tancheck_block.h) as
//! [`BlockRoutine`]s: every real and twin call through the memory guards of [`guards`] and
//! the guarded trampoline (`tc_guard_call_block`, fortran-shim/src/guard_block.inc).

use std::ffi::CString;

use num_complex::Complex64;
use tancheck_core::block::{
    block_status, BlockCall, BlockInfo, BlockInput, BlockOutput, BlockRoutine, BLOCK_ABI_VERSION,
};
use tancheck_core::Fault;

use crate::error::LoadError;
use crate::memory_guards::GuardLevel;
use crate::signal_guard as guard;
use crate::{Library, TWIN_SUFFIX};

mod call;
mod guards;

pub use call::BlockFn;
use guards::{BlockGuards, Element};

/// A block routine of a loaded library.
pub struct LibraryBlockRoutine {
    info: BlockInfo,
    symbol: String,
    real: BlockFn,
    twin: Option<BlockFn>,
    label: CString,
    library: Library,
    guard_level: GuardLevel,
    fp_traps: bool,
    real_guards: BlockGuards<f64>,
    complex_guards: BlockGuards<Complex64>,
    findings: Vec<String>,
}

impl std::fmt::Debug for LibraryBlockRoutine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("LibraryBlockRoutine")
            .field("library", &self.library.path())
            .field("symbol", &self.symbol)
            .field("twin", &self.twin.is_some())
            .finish()
    }
}

impl Library {
    /// The block routine `symbol` (and its twin `symbol_cx`, when exported).
    pub fn block_routine(&self, symbol: &str, info: BlockInfo) -> Result<LibraryBlockRoutine, LoadError> {
        if symbol.is_empty() || symbol.contains('\0') {
            return Err(LoadError::BadSymbolName {
                symbol: symbol.into(),
                why: "it is empty or contains a NUL byte",
            });
        }
        for (what, value) in
            [("ncomp", info.ncomp), ("nstate", info.nstate), ("nproperties", info.nproperties)]
        {
            if i32::try_from(value).is_err() {
                return Err(LoadError::SizeTooLarge {
                    routine: info.name.clone(),
                    what,
                    value,
                    max: i32::MAX,
                });
            }
        }
        let real = self.lookup::<BlockFn>(symbol).ok_or_else(|| self.missing_symbol(symbol))?;
        let twin = self.lookup::<BlockFn>(&format!("{symbol}{TWIN_SUFFIX}"));
        guard::prepare().map_err(|source| LoadError::Guard { source })?;
        let label = format!("{}:{symbol}", self.path().display());
        Ok(LibraryBlockRoutine {
            info,
            symbol: symbol.into(),
            real,
            twin,
            label: CString::new(label.replace('\0', " ")).expect("NUL bytes were replaced"),
            library: self.clone(),
            guard_level: GuardLevel::default(),
            fp_traps: false,
            real_guards: BlockGuards::new(),
            complex_guards: BlockGuards::new(),
            findings: Vec::new(),
        })
    }
}

impl LibraryBlockRoutine {
    pub fn symbol(&self) -> &str {
        &self.symbol
    }

    pub fn library(&self) -> &Library {
        &self.library
    }

    /// Guards off: the routine works on the caller's buffers; light or full: on guarded copies
    /// (block calls are not repeated at the full level).
    pub fn set_guard_level(&mut self, level: GuardLevel) {
        self.guard_level = level;
    }

    pub fn guard_level(&self) -> GuardLevel {
        self.guard_level
    }

    /// Calls with floating-point traps (invalid, division by zero, overflow).
    pub fn set_fp_traps(&mut self, on: bool) -> Result<(), crate::TrapError> {
        if on && !guard::fp_traps_available() {
            return Err(crate::TrapError::Unavailable { arch: std::env::consts::ARCH });
        }
        self.fp_traps = on;
        Ok(())
    }

    /// What the guards found so far, one sentence each.
    pub fn findings(&self) -> &[String] {
        &self.findings
    }

    fn block_call<S>(&self, i: &BlockInput<'_, S>) -> BlockCall {
        BlockCall {
            abi_version: BLOCK_ABI_VERSION,
            npoints: i32::try_from(i.npoints()).unwrap_or(i32::MAX),
            ncomp: self.info.ncomp as i32,
            nstate: self.info.nstate as i32,
            nproperties: self.info.nproperties as i32,
            increment: i.increment,
            flags: if i.elastic_response { tancheck_core::block::ELASTIC_RESPONSE } else { 0 },
            reserved: 0,
            time: i.time,
            time_increment: i.time_increment,
        }
    }

    /// A new finding ends the call (allocates only then); a known one is counted silently.
    fn note(&mut self, what: Option<String>) -> Result<(), Fault> {
        match what {
            Some(w) if !self.findings.contains(&w) => {
                self.findings.push(w.clone());
                Err(Fault::Misbehaved { what: w })
            }
            _ => Ok(()),
        }
    }
}

/// One call of `f` with the arrays of `i` and `o`, guarded or not.
#[allow(clippy::too_many_arguments)]
fn call_with<S: Element>(
    f: BlockFn,
    complex: bool,
    level: GuardLevel,
    guards: &mut BlockGuards<S>,
    label: &CString,
    fp_traps: bool,
    call: &BlockCall,
    i: &BlockInput<'_, S>,
    o: &mut BlockOutput<'_, S>,
) -> Result<Option<String>, Fault> {
    o.outcome.reset();
    if level == GuardLevel::Off {
        let args = call::BlockGuardArgs {
            block: call,
            properties: i.properties.as_ptr().cast(),
            strain: i.strain.as_ptr().cast(),
            strain_increment: i.strain_increment.as_ptr().cast(),
            stress_start: i.stress_start.as_ptr().cast(),
            state_start: i.state_start.as_ptr().cast(),
            energy_start: i.energy_start.as_ptr().cast(),
            conditions: i.conditions.as_ptr(),
            stress: o.stress.as_mut_ptr().cast(),
            state: o.state.as_mut_ptr().cast(),
            energy: o.energy.as_mut_ptr().cast(),
            deleted: o.deleted.as_mut_ptr(),
            report: std::ptr::from_mut(o.outcome),
            label: label.as_ptr(),
            fp_traps: i32::from(fp_traps),
            reserved: 0,
        };
        // SAFETY: `f` has the block ABI's signature (looked up by name); every array has the
        // length announced in `call` (check_block_lengths), SpecificEnergy<S> is repr(C) with
        // two S, and all of it outlives the call.
        unsafe { call::call_block(f, &args, complex) }.map_err(guard::Crash::into_fault)?;
        return Ok(None);
    }
    let g = Guarded { f, complex, label, fp_traps, call };
    let found = g.once(guards, 0, None, i, o)?;
    if level != GuardLevel::Full || found.is_some() || o.outcome.status != block_status::OK {
        return Ok(found);
    }
    // Full: again with the other poison after every read-only array; outputs that change read
    // past an end. Only when they do: one zone at a time names the array, and a repeat with the
    // first poison tells it from a routine that does not repeat itself.
    guards.save();
    if let Some(w) = g.once(guards, 1, None, i, o)? {
        return Ok(Some(w));
    }
    if guards.same_as_saved() {
        return Ok(None);
    }
    g.once(guards, 0, None, i, o)?;
    if !guards.same_as_saved() {
        return Ok(Some(
            "returned other outputs for the same inputs in two calls in a row: it keeps something of its own \
             between calls (a saved variable, an uninitialised local) that the solver does not pass in"
                .into(),
        ));
    }
    let named = (0..=guards::N_INPUTS).find_map(|k| match g.once(guards, 1, Some(k), i, o) {
        Err(e) => Some(Err(e)),
        Ok(_) if !guards.same_as_saved() => Some(Ok(guards::NAMES.get(k).copied().unwrap_or("conditions"))),
        Ok(_) => None,
    });
    // The caller gets the outputs of the first poison.
    g.once(guards, 0, None, i, o)?;
    Ok(Some(match named.transpose()? {
        Some(name) => format!(
            "reads past the end of its read-only input {name}: its outputs change with the values after the \
             last entry; check the loop bounds and npoints, ncomp, nstate of tc_block"
        ),
        None => {
            "reads past the end of its read-only inputs: its outputs change with the values after them".into()
        }
    }))
}

/// What stays the same in the guarded calls of one call.
struct Guarded<'a> {
    f: BlockFn,
    complex: bool,
    label: &'a CString,
    fp_traps: bool,
    call: &'a BlockCall,
}

impl Guarded<'_> {
    /// One call through the memory guards, poison `which` after the read-only arrays (after
    /// the one array `only`, when given).
    fn once<S: Element>(
        &self,
        guards: &mut BlockGuards<S>,
        which: usize,
        only: Option<usize>,
        i: &BlockInput<'_, S>,
        o: &mut BlockOutput<'_, S>,
    ) -> Result<Option<String>, Fault> {
        guards.set_poison(which, only);
        o.outcome.reset();
        let sent = *self.call;
        let mut args = guards.load(i, o);
        let guarded_call = *self.call;
        args.block = &guarded_call;
        args.label = self.label.as_ptr();
        args.fp_traps = i32::from(self.fp_traps);
        // SAFETY: `f` has the block ABI's signature (looked up by name); the guarded buffer holds
        // every array at the announced length, each followed by its zone, and lives in `guards`
        // across the call.
        unsafe { call::call_block(self.f, &args, self.complex) }.map_err(guard::Crash::into_fault)?;
        Ok(guards.unload(i, o, &guarded_call, &sent))
    }
}

impl BlockRoutine for LibraryBlockRoutine {
    fn info(&self) -> &BlockInfo {
        &self.info
    }

    fn call(&mut self, input: &BlockInput<'_, f64>, output: &mut BlockOutput<'_, f64>) -> Result<(), Fault> {
        self.call_entry(self.real, input, output)
    }

    fn has_twin(&self) -> bool {
        self.twin.is_some()
    }

    fn call_complex(
        &mut self,
        input: &BlockInput<'_, Complex64>,
        output: &mut BlockOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let Some(twin) = self.twin else {
            return Err(Fault::Unsupported(format!(
                "the library exports no complex-step twin `{}{TWIN_SUFFIX}`",
                self.symbol
            )));
        };
        self.call_entry(twin, input, output)
    }

    /// The library loaded anew ([`Library::open_fresh`]), the same symbol, guard level and
    /// traps.
    fn new_instance(&self) -> Option<Result<Box<dyn BlockRoutine>, String>> {
        let made = Library::open_fresh(self.library.path())
            .and_then(|lib| lib.block_routine(&self.symbol, self.info.clone()))
            .map(|mut r| {
                r.guard_level = self.guard_level;
                r.fp_traps = self.fp_traps;
                Box::new(r) as Box<dyn BlockRoutine>
            });
        Some(made.map_err(|e| e.to_string()))
    }
}

/// The arithmetic of a call: real calls and twin calls each keep their own guard buffers.
trait Arithmetic: Element {
    /// Whether `f` takes complex arrays.
    const COMPLEX: bool;
    /// This arithmetic's guard buffers of the two.
    fn pick<'g>(
        real: &'g mut BlockGuards<f64>,
        twin: &'g mut BlockGuards<Complex64>,
    ) -> &'g mut BlockGuards<Self>;
}

impl Arithmetic for f64 {
    const COMPLEX: bool = false;
    fn pick<'g>(
        real: &'g mut BlockGuards<f64>,
        _: &'g mut BlockGuards<Complex64>,
    ) -> &'g mut BlockGuards<f64> {
        real
    }
}

impl Arithmetic for Complex64 {
    const COMPLEX: bool = true;
    fn pick<'g>(
        _: &'g mut BlockGuards<f64>,
        twin: &'g mut BlockGuards<Complex64>,
    ) -> &'g mut BlockGuards<Complex64> {
        twin
    }
}

impl LibraryBlockRoutine {
    /// One call of the entry `f` (the real one or the twin, by `S`): the lengths checked, the
    /// guarded call, a new finding noted; written once for both entries.
    fn call_entry<S: Arithmetic>(
        &mut self,
        f: BlockFn,
        input: &BlockInput<'_, S>,
        output: &mut BlockOutput<'_, S>,
    ) -> Result<(), Fault> {
        tancheck_core::block::routine::check_block_lengths(&self.info, input, output);
        let call = self.block_call(input);
        let guards = S::pick(&mut self.real_guards, &mut self.complex_guards);
        let found = call_with(
            f,
            S::COMPLEX,
            self.guard_level,
            guards,
            &self.label,
            self.fp_traps,
            &call,
            input,
            output,
        )?;
        self.note(found)?;
        output.outcome.fault()
    }
}
