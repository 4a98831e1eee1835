//! What a material routine is to tancheck: capabilities, one call's inputs and outputs.
//!
//! The required capability is [`Routine`]: a real stress update that returns a tangent.
//! A routine that can also run in complex arithmetic (a Rust model, or a library that
//! exports the complex-step twin) offers [`ComplexRoutine`] through [`Routine::complex`].
//! A loaded library offers only what it actually exports.
//!
//! Every call from the checker goes through [`Caller`], which counts calls.

use num_complex::Complex64;

use crate::convention::Convention;
use crate::scalar::Scalar;

/// Length of the routine's message buffer (matches `TC_MESSAGE_LEN` of the C header).
pub const MESSAGE_LEN: usize = 96;

/// Bits of [`Outcome::provides`] (match `TC_PROVIDES_*`).
pub mod provides {
    pub const DSTRESS_DTEMP: i32 = 1;
    pub const ENERGY: i32 = 2;
}

bitflags::bitflags! {
    /// What a routine can do, known when it is loaded: from its symbols (a library's twin is
    /// the `_cx` symbol), or from the Rust model. The per-call bits of [`Outcome::provides`]
    /// still say what one call filled in; these say what a probe may count on.
    #[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
    pub struct Capabilities: u8 {
        /// Returns the tangent (every routine of the ABI does).
        const TANGENT = 1;
        /// Has the complex-step twin.
        const TWIN = 1 << 1;
        /// Fills in the stored and dissipated energies.
        const ENERGY = 1 << 2;
        /// Fills in ∂σ/∂T.
        const DSTRESS_DTEMP = 1 << 3;
    }
}

/// Status codes a routine returns (match `TC_STATUS_*`).
pub mod status {
    pub const OK: i32 = 0;
    /// The increment is too large; `Outcome::largest_fraction` says how much of it the routine
    /// expects to manage.
    pub const SMALLER_INCREMENT: i32 = 1;
    pub const FAILED: i32 = 2;
}

/// The read-only inputs of one call, in the routine's convention.
#[derive(Clone, Copy, Debug)]
pub struct CallInput<'a, S> {
    pub props: &'a [S],
    /// Strain at the start of the increment.
    pub strain: &'a [S],
    /// Strain increment.
    pub dstrain: &'a [S],
    /// Temperature at the start, and its increment.
    pub temp: [S; 2],
    pub stress0: &'a [S],
    pub state0: &'a [S],
    /// Time at the start, and the time increment.
    pub time: [f64; 2],
    /// Increment number along the path, from 1.
    pub increment: i32,
    /// The caller uses the tangent of this call.
    pub want_tangent: bool,
}

/// What the routine reports besides its arrays (the `tc_report` struct of the C ABI).
#[derive(Clone, Copy, Debug)]
#[repr(C)]
pub struct Outcome {
    pub status: i32,
    pub branch: i32,
    pub provides: i32,
    pub reserved: i32,
    /// With [`status::SMALLER_INCREMENT`]: the largest fraction of this increment the routine
    /// expects to manage, in (0, 1).
    pub largest_fraction: f64,
    pub message: [u8; MESSAGE_LEN],
}

impl Default for Outcome {
    fn default() -> Self {
        Outcome {
            status: status::OK,
            branch: -1,
            provides: 0,
            reserved: 0,
            largest_fraction: 1.0,
            message: [0; MESSAGE_LEN],
        }
    }
}

impl Outcome {
    /// The routine's message as text (up to the first NUL).
    pub fn message_text(&self) -> String {
        let end = self.message.iter().position(|&b| b == 0).unwrap_or(MESSAGE_LEN);
        String::from_utf8_lossy(&self.message[..end]).trim_end().to_string()
    }

    /// Set the message (truncated to fit, NUL-terminated).
    pub fn set_message(&mut self, text: &str) {
        self.message = [0; MESSAGE_LEN];
        let b = text.as_bytes();
        let n = b.len().min(MESSAGE_LEN - 1);
        self.message[..n].copy_from_slice(&b[..n]);
    }

    pub fn provides(&self, bit: i32) -> bool {
        self.provides & bit != 0
    }
}

/// The outputs of one call. The caller fills them with NaN before the call.
#[derive(Debug)]
pub struct CallOutput<'a, S> {
    pub stress: &'a mut [S],
    pub state: &'a mut [S],
    /// Column-major, entry (i, j) = ∂σᵢ/∂Δεⱼ.
    pub tangent: &'a mut [S],
    pub dstress_dtemp: &'a mut [S],
    /// Stored and dissipated energy density at the end of the increment.
    pub energy: &'a mut [S; 2],
    pub outcome: &'a mut Outcome,
}

/// Sizes and conventions of a routine.
#[derive(Clone, Debug)]
pub struct RoutineInfo {
    /// A name for reports: a model's name, or `library:symbol`.
    pub name: String,
    pub convention: Convention,
    pub nstate: usize,
    pub nprop: usize,
}

/// Why a call produced no usable result.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum Fault {
    /// The routine set a nonzero status.
    #[error("the routine returned status {status}{}", if .message.is_empty() { String::new() } else { format!(": {}", .message) })]
    Status { status: i32, message: String, largest_fraction: f64 },
    /// The routine crashed (a signal caught by the guarded shim).
    #[error("the routine crashed: {what}")]
    Crashed { signal: i32, what: String },
    /// The routine cannot run in this configuration.
    #[error("{0}")]
    Unsupported(String),
    /// The routine misbehaved in a call that otherwise returned normally: the memory guards
    /// of a loaded routine saw it write past the end of an array, write to a read-only input,
    /// leave an output unwritten, or (at the full guard level) read past the end of an input.
    /// `what` is the finding's sentence, e.g. "wrote past the end of state: state[13], ...".
    #[error("the routine misbehaved: {what}")]
    Misbehaved { what: String },
}

/// Required capability: a real stress update that also returns the tangent.
pub trait Routine {
    fn info(&self) -> &RoutineInfo;

    /// One call. Implementations must not allocate: this is the hot path.
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault>;

    /// The complex-arithmetic twin, when there is one.
    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        None
    }

    /// What this routine can do, asked once when a [`Caller`] is made for it. The default: a
    /// tangent, and the twin when [`Routine::complex`] offers one. A wrapper forwards its
    /// inner routine's; a routine that fills in energies or ∂σ/∂T on every call says so.
    fn capabilities(&mut self) -> Capabilities {
        let mut c = Capabilities::TANGENT;
        if self.complex().is_some() {
            c |= Capabilities::TWIN;
        }
        c
    }

    /// Run the next real call under the full memory guards (reads past the end of the inputs;
    /// the call repeated and compared bit for bit), if this routine has guards and they are
    /// on. Returns whether it will. A routine without guards (a Rust model) ignores it.
    fn guard_next_call_fully(&mut self) -> bool {
        false
    }

    /// Another handle on the same routine, for another thread: the same code and data, its
    /// own call buffers and settings (guard level, traps). `None` (the default) when the
    /// routine cannot be called from another thread at all. Whether the routine's code is safe
    /// to call from several threads at once is for [`crate::concurrent`]'s probe to find out.
    fn another(&self) -> Option<Box<dyn Routine + Send>> {
        None
    }

    /// Calls this handle's guards made besides the caller's (reruns of the full guards); 0 for
    /// a routine without guards.
    fn guard_extra_calls(&self) -> u64 {
        0
    }

    /// Count `n` more such calls, made by another handle of the same routine for the same
    /// check (a later thread's share), so that the check reports what one thread would.
    fn absorb_guard_extra_calls(&mut self, _n: u64) {}

    /// Forget what the guards have found so far. A guard reports a kind of misbehaviour once
    /// (its first call is the fault; later ones only count), so a search that makes many runs
    /// of its own (a shrink's candidate paths) forgets before each run, and a candidate that
    /// misbehaves the same way faults again.
    fn forget_guard_findings(&mut self) {}

    /// The perturbed calls of one derivative scheme's strain columns in one go, where the
    /// routine can make them with less around each call than one [`Routine::call`] each (a
    /// loaded library with its memory guards off or light: one guarded entry for all of them).
    /// `None` (the default): nothing was called, the caller makes the calls one by one. See
    /// [`Sweep`].
    fn sweep_real(&mut self, _sweep: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        None
    }

    /// [`Routine::sweep_real`] for the complex-step twin: the steps are imaginary parts.
    fn sweep_complex(&mut self, _sweep: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        None
    }
}

/// The perturbed calls of one scheme along strain components 0 .. `ncols`: for each column j,
/// for each step in turn, exactly the call [`Caller::call`] (or [`Caller::call_complex`])
/// would make with `input` (whose `dstrain` is the increment as set, and `want_tangent` off)
/// and dstrain[j] moved by the step (real), or given the step as its imaginary part (complex):
/// outputs pre-filled with NaN, the outcome reset. A step above 0 writes `output`, any other
/// `output_neg` when given (else `output` too); every call's stress is also
/// copied into `stresses`, call after call (ncols × steps × ncomp entries). The routine never
/// sees what an earlier call wrote into its increment. The sweep stops after a call that
/// faulted.
pub struct Sweep<'s, 'o, S> {
    pub input: CallInput<'s, S>,
    /// The increment as set, in real numbers (the real parts of a complex input's).
    pub kept: &'s [f64],
    pub steps: &'s [f64],
    pub ncols: usize,
    pub output: &'s mut CallOutput<'o, S>,
    pub output_neg: Option<&'s mut CallOutput<'o, S>>,
    pub stresses: &'s mut [S],
    /// A counter raised by one (release order) before each call of the sweep: a wrapper that
    /// counts calls where another process watches them (`--isolate`'s heartbeat) gives its
    /// own; `None` for none.
    pub counter: Option<&'s std::sync::atomic::AtomicU64>,
}

/// The column and the step of a sweep's call `k` (from 0).
pub fn call_at(steps: &[f64], k: usize) -> (usize, f64) {
    (k / steps.len(), steps[k % steps.len()])
}

/// How a sweep ended: the calls made, and the fault of the last one when it faulted.
#[derive(Debug)]
pub struct SweepEnd {
    pub calls: usize,
    pub result: Result<(), Fault>,
}

/// The [`Routine`] methods a wrapper passes on to the routine it wraps (its field `inner`):
/// written once, so every wrapper keeps the full guard, the capabilities and the twin of what
/// it wraps. Use inside `impl Routine for Wrapper`, which must also implement [`ComplexRoutine`].
#[macro_export]
macro_rules! pass_on_to_inner {
    () => {
        fn guard_next_call_fully(&mut self) -> bool {
            self.inner.guard_next_call_fully()
        }
        fn complex(&mut self) -> Option<&mut dyn $crate::routine::ComplexRoutine> {
            if self.inner.complex().is_some() {
                Some(self)
            } else {
                None
            }
        }
        fn capabilities(&mut self) -> $crate::routine::Capabilities {
            self.inner.capabilities()
        }
        fn guard_extra_calls(&self) -> u64 {
            self.inner.guard_extra_calls()
        }
        fn absorb_guard_extra_calls(&mut self, n: u64) {
            self.inner.absorb_guard_extra_calls(n)
        }
        fn forget_guard_findings(&mut self) {
            self.inner.forget_guard_findings()
        }
    };
}

/// Optional capability: the same stress update in complex arithmetic, for complex-step
/// derivatives.
pub trait ComplexRoutine {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault>;
}

/// A material model written once over [`Scalar`]. Wrap it in [`ModelRoutine`] to check it.
pub trait Model {
    fn info(&self) -> &RoutineInfo;
    fn evaluate<S: Scalar>(
        &self,
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> Result<(), Fault>;

    /// The optional outputs this model fills in on every call ([`Capabilities::ENERGY`],
    /// [`Capabilities::DSTRESS_DTEMP`]); none unless the model says so.
    fn outputs(&self) -> Capabilities {
        Capabilities::empty()
    }
}

/// A [`Model`] as a [`Routine`] with its complex twin.
#[derive(Clone, Debug)]
pub struct ModelRoutine<M>(pub M);

impl<M: Model> Routine for ModelRoutine<M> {
    fn info(&self) -> &RoutineInfo {
        self.0.info()
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.0.evaluate(input, output)?;
        status_fault(output.outcome)
    }
    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        Some(self)
    }
    fn capabilities(&mut self) -> Capabilities {
        Capabilities::TANGENT | Capabilities::TWIN | self.0.outputs()
    }
}

impl<M: Model> ComplexRoutine for ModelRoutine<M> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.0.evaluate(input, output)?;
        status_fault(output.outcome)
    }
}

/// A nonzero status as a [`Fault`]. Allocates only on the failure path (kept out of line,
/// so that the check of a good call is one comparison where it is inlined).
#[inline]
pub fn status_fault(o: &Outcome) -> Result<(), Fault> {
    if o.status == status::OK {
        Ok(())
    } else {
        Err(status_fault_of(o))
    }
}

#[cold]
#[inline(never)]
fn status_fault_of(o: &Outcome) -> Fault {
    Fault::Status { status: o.status, message: o.message_text(), largest_fraction: o.largest_fraction }
}

/// The one way the checker calls a routine: counts every call.
pub struct Caller<'r> {
    routine: &'r mut dyn Routine,
    /// Real calls made so far.
    pub real_calls: u64,
    /// Complex calls made so far.
    pub complex_calls: u64,
    /// What the routine declared when this caller was made.
    capabilities: Capabilities,
    /// The inputs of the last call that faulted (kept on the error path only).
    faulted: Option<Box<FaultedCall>>,
}

/// The inputs of a call that faulted, as the routine got them (a complex call's real parts,
/// with the entries that carried an imaginary part named): what a report needs to say which
/// call it was, wherever in the check it was made.
#[derive(Clone, Debug, PartialEq)]
pub struct FaultedCall {
    pub props: Vec<f64>,
    pub strain: Vec<f64>,
    pub dstrain: Vec<f64>,
    pub temp: [f64; 2],
    pub stress0: Vec<f64>,
    pub state0: Vec<f64>,
    pub time: [f64; 2],
    pub increment: i32,
    /// For a complex call: "dstrain[2] + i 1.0e-20" and the like.
    pub imaginary: Option<String>,
}

impl FaultedCall {
    #[cold]
    fn of_real(i: &CallInput<'_, f64>) -> FaultedCall {
        FaultedCall {
            props: i.props.to_vec(),
            strain: i.strain.to_vec(),
            dstrain: i.dstrain.to_vec(),
            temp: i.temp,
            stress0: i.stress0.to_vec(),
            state0: i.state0.to_vec(),
            time: i.time,
            increment: i.increment,
            imaginary: None,
        }
    }

    #[cold]
    fn of_complex(i: &CallInput<'_, Complex64>) -> FaultedCall {
        let re = |v: &[Complex64]| v.iter().map(|c| c.re).collect::<Vec<f64>>();
        let mut im = Vec::new();
        for (name, v) in
            [("props", i.props), ("strain", i.strain), ("dstrain", i.dstrain), ("temp", &i.temp[..])]
        {
            for (k, c) in v.iter().enumerate().filter(|(_, c)| c.im != 0.0) {
                im.push(format!("{name}[{k}] + i {:.3e}", c.im));
            }
        }
        FaultedCall {
            props: re(i.props),
            strain: re(i.strain),
            dstrain: re(i.dstrain),
            temp: [i.temp[0].re, i.temp[1].re],
            stress0: re(i.stress0),
            state0: re(i.state0),
            time: i.time,
            increment: i.increment,
            imaginary: Some(if im.is_empty() {
                "a complex call, no imaginary part".into()
            } else {
                im.join(", ")
            }),
        }
    }
}

impl<'r> Caller<'r> {
    pub fn new(routine: &'r mut dyn Routine) -> Self {
        let capabilities = routine.capabilities();
        Caller { routine, real_calls: 0, complex_calls: 0, capabilities, faulted: None }
    }

    pub fn info(&self) -> &RoutineInfo {
        self.routine.info()
    }

    /// What the routine declared when it was loaded (see [`Routine::capabilities`]).
    pub fn capabilities(&self) -> Capabilities {
        self.capabilities
    }

    /// Whether the routine declared a complex-step twin.
    pub fn has_complex(&mut self) -> bool {
        self.capabilities.contains(Capabilities::TWIN)
    }

    /// See [`Routine::another`].
    pub fn another(&self) -> Option<Box<dyn Routine + Send>> {
        self.routine.another()
    }

    /// See [`Routine::guard_next_call_fully`].
    pub fn guard_next_call_fully(&mut self) -> bool {
        self.routine.guard_next_call_fully()
    }

    /// See [`Routine::guard_extra_calls`].
    pub fn guard_extra_calls(&self) -> u64 {
        self.routine.guard_extra_calls()
    }

    /// See [`Routine::absorb_guard_extra_calls`].
    pub fn absorb_guard_extra_calls(&mut self, n: u64) {
        self.routine.absorb_guard_extra_calls(n)
    }

    /// See [`Routine::forget_guard_findings`].
    pub fn forget_guard_findings(&mut self) {
        self.routine.forget_guard_findings()
    }

    /// A real call, outputs pre-filled with NaN and the outcome reset, so that an output the
    /// routine leaves unwritten shows. A call that does not ask for the tangent (`want_tangent`
    /// off: the perturbed calls of a derivative scheme) has only its stress and state filled:
    /// the stress is all the check reads back from such a call, and the state is what a routine
    /// may read before it writes (`state[i] += ...`), which must find NaN and not the previous
    /// call's values. Its tangent, ∂σ/∂T and energies are left as they were: the routine need
    /// not write them and nothing reads them (44 stores fewer in each perturbed call).
    #[inline]
    pub fn call(
        &mut self,
        input: &CallInput<'_, f64>,
        output: &mut CallOutput<'_, f64>,
    ) -> Result<(), Fault> {
        self.real_calls += 1;
        prefill(output, f64::NAN, input.want_tangent);
        let r = self.routine.call(input, output);
        if r.is_err() {
            self.faulted = Some(Box::new(FaultedCall::of_real(input)));
        }
        r
    }

    /// A sweep of real calls ([`Routine::sweep_real`]), each call counted; `None` when the
    /// routine makes its calls one by one (then nothing was called).
    pub fn sweep_real(&mut self, sweep: Sweep<'_, '_, f64>) -> Option<SweepEnd> {
        let (input, kept, steps) = (sweep.input, sweep.kept, sweep.steps);
        let end = self.routine.sweep_real(sweep)?;
        self.real_calls += end.calls as u64;
        if end.result.is_err() {
            let (j, step) = call_at(steps, end.calls - 1);
            let mut d = kept.to_vec();
            d[j] += step;
            self.faulted = Some(Box::new(FaultedCall::of_real(&CallInput { dstrain: &d, ..input })));
        }
        Some(end)
    }

    /// A sweep of complex calls ([`Routine::sweep_complex`]), as [`Caller::sweep_real`].
    pub fn sweep_complex(&mut self, sweep: Sweep<'_, '_, Complex64>) -> Option<SweepEnd> {
        let (input, kept, steps) = (sweep.input, sweep.kept, sweep.steps);
        let end = self.routine.sweep_complex(sweep)?;
        self.complex_calls += end.calls as u64;
        if end.result.is_err() {
            let (j, step) = call_at(steps, end.calls - 1);
            let mut d: Vec<Complex64> = kept.iter().map(|&x| Complex64::new(x, 0.0)).collect();
            d[j].im = step;
            self.faulted = Some(Box::new(FaultedCall::of_complex(&CallInput { dstrain: &d, ..input })));
        }
        Some(end)
    }

    /// The inputs of the last call that faulted, taken (see [`FaultedCall`]).
    pub fn take_faulted(&mut self) -> Option<FaultedCall> {
        self.faulted.take().map(|b| *b)
    }

    /// A complex call, outputs pre-filled with NaN (those of a call without the tangent as
    /// in [`Caller::call`]). `Fault::Unsupported` without a twin.
    #[inline]
    pub fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let Some(twin) = self.routine.complex() else {
            return Err(Fault::Unsupported("the routine has no complex-step twin".into()));
        };
        self.complex_calls += 1;
        prefill(output, Complex64::new(f64::NAN, f64::NAN), input.want_tangent);
        let r = twin.call_complex(input, output);
        if r.is_err() {
            self.faulted = Some(Box::new(FaultedCall::of_complex(input)));
        }
        r
    }
}

#[inline]
fn prefill<S: Copy>(o: &mut CallOutput<'_, S>, nan: S, all: bool) {
    o.stress.fill(nan);
    o.state.fill(nan);
    if all {
        o.tangent.fill(nan);
        o.dstress_dtemp.fill(nan);
        o.energy[0] = nan;
        o.energy[1] = nan;
    }
    *o.outcome = Outcome::default();
}
