//! The block-routine interface from the Rust side: what one call of a block routine
//! (fortran-shim/include/tancheck_block.h) passes and returns, the [`BlockRoutine`] capability
//! every caller uses, and [`BlockModel`], a block model written once over [`Scalar`] (real,
//! complex step, dual numbers) as a [`BlockRoutine`] with its twin.

use num_complex::Complex64;

use crate::routine::Fault;
use crate::scalar::Scalar;

/// Version of the block layout this tancheck speaks (`TC_BLOCK_ABI_VERSION`).
pub const BLOCK_ABI_VERSION: i32 = 1;
/// Bit of [`BlockCall::flags`]: the first call, the elastic response only.
pub const ELASTIC_RESPONSE: i32 = 1;
/// Length of the message buffer (`TC_BLOCK_MESSAGE_LEN`).
pub const BLOCK_MESSAGE_LEN: usize = 96;

/// Status codes of [`BlockOutcome::status`] (`TC_BLOCK_STATUS_*`).
pub mod block_status {
    pub const OK: i32 = 0;
    pub const SMALLER_INCREMENT: i32 = 1;
    pub const FAILED: i32 = 2;
}

/// The read-only description of one call (`struct tc_block`).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
#[repr(C)]
pub struct BlockCall {
    pub abi_version: i32,
    pub npoints: i32,
    pub ncomp: i32,
    pub nstate: i32,
    pub nproperties: i32,
    pub increment: i32,
    pub flags: i32,
    pub reserved: i32,
    pub time: f64,
    pub time_increment: f64,
}

/// The conditions of one point (`struct tc_point_conditions`); real in the twin too.
#[derive(Clone, Copy, Debug, PartialEq)]
#[repr(C)]
pub struct Conditions {
    pub temperature: f64,
    pub temperature_increment: f64,
    pub density: f64,
    pub characteristic_length: f64,
}

/// Specific energies of one point (`struct tc_specific_energy`), per unit mass.
#[derive(Clone, Copy, Debug, PartialEq)]
#[repr(C)]
pub struct SpecificEnergy<S> {
    /// Work done on the point so far, per unit mass.
    pub internal: S,
    /// The dissipated part of it.
    pub dissipated: S,
}

impl<S: Scalar> SpecificEnergy<S> {
    pub fn zero() -> Self {
        SpecificEnergy { internal: S::cst(0.0), dissipated: S::cst(0.0) }
    }
}

/// What the routine reports for the block (`struct tc_block_report`).
#[derive(Clone, Copy, Debug)]
#[repr(C)]
pub struct BlockOutcome {
    pub status: i32,
    /// 0-based point the status is about, or -1.
    pub point: i32,
    pub reserved: [i32; 2],
    pub largest_fraction: f64,
    pub message: [u8; BLOCK_MESSAGE_LEN],
}

impl Default for BlockOutcome {
    fn default() -> Self {
        BlockOutcome {
            status: block_status::OK,
            point: -1,
            reserved: [0; 2],
            largest_fraction: 1.0,
            message: [0; BLOCK_MESSAGE_LEN],
        }
    }
}

impl BlockOutcome {
    /// Set before every call, whoever the caller is.
    pub fn reset(&mut self) {
        self.status = block_status::OK;
        self.point = -1;
        self.reserved = [0; 2];
        self.largest_fraction = 1.0;
        self.message[0] = 0;
    }

    /// The message up to its NUL (lossy UTF-8). Allocates: for the failure path.
    pub fn message_text(&self) -> String {
        let end = self.message.iter().position(|&b| b == 0).unwrap_or(BLOCK_MESSAGE_LEN);
        String::from_utf8_lossy(&self.message[..end]).into_owned()
    }

    /// Write a message (cut to fit, NUL-terminated). For Rust models.
    pub fn set_message(&mut self, text: &str) {
        let n = text.len().min(BLOCK_MESSAGE_LEN - 1);
        self.message[..n].copy_from_slice(&text.as_bytes()[..n]);
        self.message[n] = 0;
    }

    /// The status as a fault, or `Ok`.
    pub fn fault(&self) -> Result<(), Fault> {
        if self.status == block_status::OK {
            return Ok(());
        }
        let at = if self.point >= 0 { format!(" at point {}", self.point) } else { String::new() };
        let text = self.message_text();
        Err(Fault::Status {
            status: self.status,
            message: if text.is_empty() { at.trim_start().to_string() } else { format!("{text}{at}") },
            largest_fraction: self.largest_fraction,
        })
    }
}

/// Sizes of a block routine.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct BlockInfo {
    pub name: String,
    /// 6 (solid 3D) or 4 (11, 22, 33, 12).
    pub ncomp: usize,
    pub nstate: usize,
    pub nproperties: usize,
}

/// The inputs of one block call: every array point by point.
#[derive(Clone, Copy, Debug)]
pub struct BlockInput<'a, S> {
    pub properties: &'a [S],
    pub strain: &'a [S],
    pub strain_increment: &'a [S],
    pub stress_start: &'a [S],
    pub state_start: &'a [S],
    pub energy_start: &'a [SpecificEnergy<S>],
    pub conditions: &'a [Conditions],
    pub time: f64,
    pub time_increment: f64,
    /// Increment number, from 1; 0 for the elastic response.
    pub increment: i32,
    /// The first call: the elastic response only (see the header).
    pub elastic_response: bool,
}

impl<S> BlockInput<'_, S> {
    pub fn npoints(&self) -> usize {
        self.conditions.len()
    }
}

/// The outputs of one block call.
#[derive(Debug)]
pub struct BlockOutput<'a, S> {
    pub stress: &'a mut [S],
    pub state: &'a mut [S],
    pub energy: &'a mut [SpecificEnergy<S>],
    pub deleted: &'a mut [i32],
    pub outcome: &'a mut BlockOutcome,
}

/// A block routine tancheck can call: a loaded library's or a Rust model.
pub trait BlockRoutine {
    fn info(&self) -> &BlockInfo;
    /// One real call. Must not allocate: the hot path.
    fn call(&mut self, input: &BlockInput<'_, f64>, output: &mut BlockOutput<'_, f64>) -> Result<(), Fault>;
    /// Whether [`BlockRoutine::call_complex`] reaches a complex-step twin.
    fn has_twin(&self) -> bool {
        false
    }
    /// One call of the complex-step twin.
    fn call_complex(
        &mut self,
        _input: &BlockInput<'_, Complex64>,
        _output: &mut BlockOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        Err(Fault::Unsupported(format!("`{}` has no complex-step twin", self.info().name)))
    }
    /// The same routine with its static and SAVE variables as at load (its library loaded
    /// anew), to tell results that depend on the calls made before; `None` where there is no
    /// such thing to offer (a built-in model keeps nothing between calls), `Some(Err(why))`
    /// where it could not be made.
    fn new_instance(&self) -> Option<Result<Box<dyn BlockRoutine>, String>> {
        None
    }
}

/// The lengths of a call must be those of the routine; checked in release builds too (a
/// wrong length would let a routine write past a buffer).
pub fn check_block_lengths<S>(info: &BlockInfo, i: &BlockInput<'_, S>, o: &BlockOutput<'_, S>) {
    let n = i.npoints();
    let (c, s) = (info.ncomp, info.nstate);
    assert!(
        n >= 1
            && i.properties.len() == info.nproperties
            && i.strain.len() == n * c
            && i.strain_increment.len() == n * c
            && i.stress_start.len() == n * c
            && i.state_start.len() == n * s
            && i.energy_start.len() == n
            && o.stress.len() == n * c
            && o.state.len() == n * s
            && o.energy.len() == n
            && o.deleted.len() == n,
        "block call to `{}` with arrays of the wrong length (npoints = {n}, ncomp = {c}, nstate = {s}, \
         nproperties = {})",
        info.name,
        info.nproperties
    );
}

/// A block model written once over [`Scalar`].
pub trait BlockModel {
    fn info(&self) -> &BlockInfo;
    fn evaluate<S: Scalar>(
        &self,
        input: &BlockInput<'_, S>,
        output: &mut BlockOutput<'_, S>,
    ) -> Result<(), Fault>;
}

/// A [`BlockModel`] as a [`BlockRoutine`] with its complex twin.
#[derive(Clone, Debug)]
pub struct BlockModelRoutine<M>(pub M);

impl<M: BlockModel> BlockRoutine for BlockModelRoutine<M> {
    fn info(&self) -> &BlockInfo {
        self.0.info()
    }

    fn call(&mut self, input: &BlockInput<'_, f64>, output: &mut BlockOutput<'_, f64>) -> Result<(), Fault> {
        check_block_lengths(self.0.info(), input, output);
        output.outcome.reset();
        self.0.evaluate(input, output)?;
        output.outcome.fault()
    }

    fn has_twin(&self) -> bool {
        true
    }

    fn call_complex(
        &mut self,
        input: &BlockInput<'_, Complex64>,
        output: &mut BlockOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        check_block_lengths(self.0.info(), input, output);
        output.outcome.reset();
        self.0.evaluate(input, output)?;
        output.outcome.fault()
    }
}
