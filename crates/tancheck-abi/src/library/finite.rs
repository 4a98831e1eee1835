//! One finite-strain routine of a loaded library (tancheck_finite.h) as a
//! [`FiniteRoutine`]: every real and complex call through the guarded finite-strain
//! trampoline of the shim (signals, floating-point traps, the process watch and its last
//! words), with light checks of its own: inputs compared bit for bit after the call, the
//! outputs written into a block of the routine's own where each array is followed by a zone
//! of canaries (a write past an array's end), and outputs left unwritten (still holding the
//! signalling NaN they were filled with). A call allocates nothing (only a finding does).
//!
//! Not yet here: the read-past-the-end check of the point routine's full guard level.

use std::ffi::{c_void, CString};

use num_complex::Complex64;
use tancheck_core::finite::{
    FiniteInfo, FiniteInput, FiniteOutput, FiniteRoutine, Frame, StressMeasure, TangentMeasure,
};
use tancheck_core::routine::status_fault;
use tancheck_core::{Fault, Outcome};

use crate::error::LoadError;
use crate::signal_guard::{
    self as guard, FiniteComplexFn, FiniteFn, GuardArgs, TcCall, LAYOUT_FINITE, TWIN_SUFFIX, WANT_TANGENT,
};

use super::Library;
use crate::memory_guards::{CANARY_BITS, PREFILL_BITS, ZONE};

/// The outputs of a checked call in one block, each array followed by [`ZONE`] canaries:
/// stress (6), state, tangent, energy (2).
struct OutputBlock<S> {
    data: Vec<S>,
    /// (name, start, length) of each array.
    arrays: [(&'static str, usize, usize); 4],
}

impl<S: Copy> OutputBlock<S> {
    fn new(nstate: usize, ntangent: usize, zero: S) -> OutputBlock<S> {
        let mut arrays = [("stress", 0, 6), ("state", 0, nstate), ("tangent", 0, ntangent), ("energy", 0, 2)];
        let mut at = 0;
        for a in &mut arrays {
            a.1 = at;
            at += a.2 + ZONE;
        }
        OutputBlock { data: vec![zero; at], arrays }
    }

    /// Outputs filled with `fill`, zones with `canary`.
    fn arm(&mut self, fill: S, canary: S) {
        for &(_, start, len) in &self.arrays {
            self.data[start..start + len].fill(fill);
            self.data[start + len..start + len + ZONE].fill(canary);
        }
    }

    /// Pointers to the stress, state, tangent and energy arrays.
    fn pointers(&mut self) -> [*mut c_void; 4] {
        let base = self.data.as_mut_ptr();
        // SAFETY: every start lies inside `data` (new).
        self.arrays.map(|(_, start, _)| unsafe { base.add(start) }.cast::<c_void>())
    }

    /// The first zone entry the call changed, as "name[index]" (`intact`: a canary as set).
    fn overrun(&self, intact: impl Fn(S) -> bool) -> Option<String> {
        self.arrays.iter().find_map(|&(name, start, len)| {
            let zone = &self.data[start + len..start + len + ZONE];
            zone.iter().position(|x| !intact(*x)).map(|k| format!("{name}[{}]", len + k))
        })
    }

    /// The arrays, copied into the caller's outputs.
    fn deliver(&self, output: &mut FiniteOutput<'_, S>) {
        let a = |i: usize| &self.data[self.arrays[i].1..self.arrays[i].1 + self.arrays[i].2];
        output.stress.copy_from_slice(a(0));
        output.state.copy_from_slice(a(1));
        output.tangent.copy_from_slice(a(2));
        output.energy.copy_from_slice(a(3));
    }
}

/// `TC_FINITE_ABI_VERSION`.
pub const FINITE_ABI_VERSION: i32 = 1;

/// `struct tc_finite_call`.
#[derive(Clone, Copy, Debug)]
#[repr(C)]
pub struct TcFiniteCall {
    pub abi_version: i32,
    pub nstate: i32,
    pub nproperties: i32,
    pub increment: i32,
    pub flags: i32,
    pub stress_measure: i32,
    pub tangent_measure: i32,
    pub frame: i32,
    pub ntangent: i32,
    pub reserved: i32,
    pub time: f64,
    pub dtime: f64,
}

/// `TC_STRESS_*`.
pub fn stress_code(m: StressMeasure) -> i32 {
    match m {
        StressMeasure::Cauchy => 0,
        StressMeasure::Kirchhoff => 1,
    }
}

/// `TC_TANGENT_*`: the position in [`TangentMeasure::ALL`].
pub fn tangent_code(m: TangentMeasure) -> i32 {
    TangentMeasure::ALL.iter().position(|x| *x == m).unwrap_or(0) as i32
}

/// `TC_FRAME_*`.
pub fn frame_code(f: Frame) -> i32 {
    Frame::ALL.iter().position(|x| *x == f).unwrap_or(0) as i32
}

/// A finite-strain routine of a loaded library.
pub struct FiniteLibraryRoutine {
    info: FiniteInfo,
    symbol: String,
    real: FiniteFn,
    twin: Option<FiniteComplexFn>,
    label: CString,
    _library: Library,
    checks: bool,
    fp_traps: bool,
    properties_copy: Vec<f64>,
    state0_copy: Vec<f64>,
    complex_properties_copy: Vec<Complex64>,
    complex_state0_copy: Vec<Complex64>,
    real_block: OutputBlock<f64>,
    complex_block: OutputBlock<Complex64>,
}

impl std::fmt::Debug for FiniteLibraryRoutine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("FiniteLibraryRoutine")
            .field("symbol", &self.symbol)
            .field("twin", &self.twin.is_some())
            .finish()
    }
}

impl Library {
    /// The finite-strain routine exported as `symbol`, with its twin `symbol_cx` when the
    /// library exports one. The sizes in `info` are the lengths every call passes.
    pub fn finite_routine(&self, symbol: &str, info: FiniteInfo) -> Result<FiniteLibraryRoutine, LoadError> {
        if symbol.is_empty() || symbol.contains('\0') {
            return Err(LoadError::BadSymbolName {
                symbol: symbol.into(),
                why: if symbol.is_empty() { "it is empty" } else { "it contains a NUL byte" },
            });
        }
        let real = self.lookup::<FiniteFn>(symbol).ok_or_else(|| self.missing_symbol(symbol))?;
        let twin = self.lookup::<FiniteComplexFn>(&format!("{symbol}{TWIN_SUFFIX}"));
        guard::prepare().map_err(|source| LoadError::Guard { source })?;
        let label = CString::new(format!("{}:{symbol}", self.path.display()).replace('\0', " "))
            .expect("NUL bytes were replaced");
        let (np, ns) = (info.nproperties, info.nstate);
        let nn = info.tangent.size() * info.tangent.size();
        let zero = Complex64::new(0.0, 0.0);
        Ok(FiniteLibraryRoutine {
            real_block: OutputBlock::new(ns, nn, 0.0),
            complex_block: OutputBlock::new(ns, nn, zero),
            info,
            symbol: symbol.into(),
            real,
            twin,
            label,
            _library: self.clone(),
            checks: true,
            fp_traps: false,
            properties_copy: vec![0.0; np],
            state0_copy: vec![0.0; ns],
            complex_properties_copy: vec![Complex64::new(0.0, 0.0); np],
            complex_state0_copy: vec![Complex64::new(0.0, 0.0); ns],
        })
    }
}

/// Which input changed, if any (compared bit for bit).
fn changed<S: Bits>(name: &'static str, before: &[S], after: &[S]) -> Option<&'static str> {
    // Bit for bit: an input may hold a NaN the routine computed in the increment before (its
    // stress or state, now the start's), which `==` would call changed.
    (before.len() != after.len() || before.iter().zip(after).any(|(a, b)| !a.same_bits(*b))).then_some(name)
}

/// Bitwise equality of an element (NaN payloads included).
trait Bits: Copy {
    fn same_bits(self, other: Self) -> bool;
}

impl Bits for f64 {
    fn same_bits(self, other: f64) -> bool {
        self.to_bits() == other.to_bits()
    }
}

impl Bits for Complex64 {
    fn same_bits(self, other: Complex64) -> bool {
        self.re.to_bits() == other.re.to_bits() && self.im.to_bits() == other.im.to_bits()
    }
}

impl FiniteLibraryRoutine {
    /// Switch the light checks (inputs compared, unwritten outputs) on or off.
    pub fn set_checks(&mut self, on: bool) {
        self.checks = on;
    }

    /// Run the calls with floating-point traps (invalid, division by zero, overflow).
    pub fn set_fp_traps(&mut self, on: bool) {
        self.fp_traps = on;
    }

    fn tc_call(&self, input_increment: i32, time: [f64; 2]) -> TcFiniteCall {
        TcFiniteCall {
            abi_version: FINITE_ABI_VERSION,
            nstate: self.info.nstate as i32,
            nproperties: self.info.nproperties as i32,
            increment: input_increment,
            flags: WANT_TANGENT,
            stress_measure: stress_code(self.info.stress),
            tangent_measure: tangent_code(self.info.tangent),
            frame: frame_code(self.info.frame),
            ntangent: self.info.tangent.size() as i32,
            reserved: 0,
            time: time[0],
            dtime: time[1],
        }
    }

    fn check_lengths<S>(&self, input: &FiniteInput<'_, S>, output: &FiniteOutput<'_, S>) {
        let n = self.info.tangent.size();
        assert!(
            input.properties.len() == self.info.nproperties
                && input.state0.len() == self.info.nstate
                && output.state.len() == self.info.nstate
                && output.tangent.len() == n * n,
            "call to `{}` with arrays of the wrong length",
            self.info.name
        );
    }

    /// The trampoline's arguments; `outputs`: where the routine writes stress, state, tangent
    /// and energy (the caller's arrays, or the zoned block of a checked call).
    fn args<S>(
        &self,
        call: &TcFiniteCall,
        input: &FiniteInput<'_, S>,
        outputs: [*mut c_void; 4],
        outcome: &mut Outcome,
        temperature: &[S; 2],
    ) -> GuardArgs {
        GuardArgs {
            call: std::ptr::from_ref(call).cast::<TcCall>(),
            props: input.properties.as_ptr().cast(),
            strain: input.f0.as_ptr().cast(),
            dstrain: input.f1.as_ptr().cast(),
            temp: temperature.as_ptr().cast(),
            stress0: input.stress0.as_ptr().cast(),
            state0: input.state0.as_ptr().cast(),
            stress: outputs[0].cast(),
            state: outputs[1].cast(),
            tangent: outputs[2].cast(),
            dstress_dtemp: input.rotation.as_ptr().cast::<c_void>().cast_mut(),
            energy: outputs[3].cast(),
            report: std::ptr::from_mut::<Outcome>(outcome),
            label: self.label.as_ptr(),
            fp_traps: i32::from(self.fp_traps),
            reserved: LAYOUT_FINITE,
        }
    }
}

/// The caller's own output arrays (a call without checks writes straight into them).
fn direct<S>(output: &mut FiniteOutput<'_, S>) -> [*mut c_void; 4] {
    [
        output.stress.as_mut_ptr().cast(),
        output.state.as_mut_ptr().cast(),
        output.tangent.as_mut_ptr().cast(),
        output.energy.as_mut_ptr().cast(),
    ]
}

/// The finding of a changed canary after `entry` ("state[2]").
fn overrun(entry: &str) -> Fault {
    let name = entry.split('[').next().unwrap_or(entry);
    Fault::Misbehaved {
        what: format!(
            "wrote past the end of {name}: {entry} (an index past the array's end, or a size that does not \
             match nstate or ntangent)"
        ),
    }
}

fn reset(o: &mut Outcome) {
    o.status = tancheck_core::routine::status::OK;
    o.branch = -1;
    o.provides = 0;
}

/// Copies of the inputs made before a call: properties, state0, f0, f1, rotation, stress0.
type InputCopies<'a, S> = (&'a [S], &'a [S], [S; 9], [S; 9], [S; 9], [S; 6]);

/// After a call: an input that changed, or an output left unwritten (`unwritten`: it still
/// holds the fill of [`OutputBlock::arm`], a signalling NaN no arithmetic produces, so that a
/// NaN the routine computes is a non-finite output, which the check reports as such).
fn findings<S: Bits>(
    input: &FiniteInput<'_, S>,
    output: &FiniteOutput<'_, S>,
    copies: InputCopies<'_, S>,
    unwritten: impl Fn(S) -> bool,
) -> Result<(), Fault> {
    let (p, s0, f0, f1, rot, st0) = copies;
    let which = changed("properties", p, input.properties)
        .or_else(|| changed("state0", s0, input.state0))
        .or_else(|| changed("f0", &f0, input.f0))
        .or_else(|| changed("f1", &f1, input.f1))
        .or_else(|| changed("rotation", &rot, input.rotation))
        .or_else(|| changed("stress0", &st0, input.stress0));
    if let Some(w) = which {
        return Err(Fault::Misbehaved { what: format!("wrote to its read-only input {w}") });
    }
    if output.outcome.status != tancheck_core::routine::status::OK {
        return Ok(());
    }
    for (name, arr) in
        [("stress", &output.stress[..]), ("state", &output.state[..]), ("tangent", &output.tangent[..])]
    {
        if let Some(i) = arr.iter().position(|x| unwritten(*x)) {
            return Err(Fault::Misbehaved {
                what: format!("left {name}[{i}] unwritten (it still holds the guard's fill value)"),
            });
        }
    }
    Ok(())
}

impl FiniteRoutine for FiniteLibraryRoutine {
    fn info(&self) -> &FiniteInfo {
        &self.info
    }

    fn call(
        &mut self,
        input: &FiniteInput<'_, f64>,
        output: &mut FiniteOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.check_lengths(input, output);
        reset(output.outcome);
        let call = self.tc_call(input.increment, input.time);
        let temperature = input.temperature;
        if self.checks {
            self.properties_copy.copy_from_slice(input.properties);
            self.state0_copy.copy_from_slice(input.state0);
            self.real_block.arm(f64::from_bits(PREFILL_BITS), f64::from_bits(CANARY_BITS));
        }
        let (f0, f1, rot, st0) = (*input.f0, *input.f1, *input.rotation, *input.stress0);
        let outputs = if self.checks { self.real_block.pointers() } else { direct(output) };
        let args = self.args(&call, input, outputs, output.outcome, &temperature);
        // SAFETY: `real` has the finite-strain signature (looked up by its name); every array
        // has the length `call` announces (check_lengths: properties, state; the others are
        // fixed-size arrays), and `call`, `temperature` outlive the call.
        unsafe { guard::call_finite(self.real, &args) }.map_err(guard::Crash::into_fault)?;
        if self.checks {
            if let Some(w) = self.real_block.overrun(|x| x.to_bits() == CANARY_BITS) {
                return Err(overrun(&w));
            }
            self.real_block.deliver(output);
            findings(
                input,
                output,
                (&self.properties_copy, &self.state0_copy, f0, f1, rot, st0),
                |x: f64| x.to_bits() == PREFILL_BITS,
            )?;
        }
        status_fault(output.outcome)
    }

    fn has_complex(&self) -> bool {
        self.twin.is_some()
    }

    fn call_complex(
        &mut self,
        input: &FiniteInput<'_, Complex64>,
        output: &mut FiniteOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let Some(twin) = self.twin else {
            return Err(Fault::Unsupported(format!(
                "the library exports no complex-step twin `{}{TWIN_SUFFIX}`",
                self.symbol
            )));
        };
        self.check_lengths(input, output);
        reset(output.outcome);
        let call = self.tc_call(input.increment, input.time);
        let temperature = input.temperature;
        if self.checks {
            self.complex_properties_copy.copy_from_slice(input.properties);
            self.complex_state0_copy.copy_from_slice(input.state0);
            let (fill, canary) = (f64::from_bits(PREFILL_BITS), f64::from_bits(CANARY_BITS));
            self.complex_block.arm(Complex64::new(fill, fill), Complex64::new(canary, canary));
        }
        let (f0, f1, rot, st0) = (*input.f0, *input.f1, *input.rotation, *input.stress0);
        let outputs = if self.checks { self.complex_block.pointers() } else { direct(output) };
        let args = self.args(&call, input, outputs, output.outcome, &temperature);
        // SAFETY: as in `call`, with the twin's complex signature; Complex64 is repr(C) and
        // laid out as C's double _Complex.
        unsafe { guard::call_finite_complex(twin, &args) }.map_err(guard::Crash::into_fault)?;
        if self.checks {
            let intact = |z: Complex64| z.re.to_bits() == CANARY_BITS && z.im.to_bits() == CANARY_BITS;
            if let Some(w) = self.complex_block.overrun(intact) {
                return Err(overrun(&w));
            }
            self.complex_block.deliver(output);
            let copies = (&self.complex_properties_copy[..], &self.complex_state0_copy[..], f0, f1, rot, st0);
            let unwritten = |z: Complex64| z.re.to_bits() == PREFILL_BITS || z.im.to_bits() == PREFILL_BITS;
            findings(input, output, copies, unwritten)?;
        }
        status_fault(output.outcome)
    }
}

#[cfg(test)]
mod tests {
    // The Rust mirror of tc_finite_call has the C layout the guard's last words read.
    #[test]
    fn finite_call_layout_matches_c() {
        let c = crate::signal_guard::finite_layout();
        assert_eq!(c[0] as usize, std::mem::size_of::<super::TcFiniteCall>());
        assert_eq!(c[1] as usize, std::mem::offset_of!(super::TcFiniteCall, time));
    }
}
