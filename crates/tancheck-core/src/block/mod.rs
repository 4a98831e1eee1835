//! Block routines (explicit dynamics): the interface of fortran-shim/include/tancheck_block.h
//! from the Rust side and the checks made for them.
//!
//! Data flow: [`routine`] (the call's types, [`BlockRoutine`], [`BlockModel`]) → [`step`]
//! (the path's increments as block routines see them) → [`walk`]
//! (buffers of a block walked along increments) → [`settings`], [`report`] → the checks:
//! [`along`] (elastic response; along the path of one point: numerical tangent, effective
//! moduli, wave speed and stable time increment, energy bookkeeping, deletion, declared
//! damage that must not fall: [`damage`]),
//! [`history`] (results that depend on the calls before), [`independence`] (blocks of 1, 7
//! and 128), [`refine`] (increment halving) → [`run`].

pub mod along;
pub mod counterpart;
mod cutback;
mod damage;
pub mod elastic;
pub mod history;
pub mod independence;
mod numeric;
pub mod rate;
pub mod refine;
pub mod report;
pub mod routine;
pub mod run;
pub mod settings;
pub mod step;
pub mod walk;

pub use report::{BlockCheck, BlockFinding, BlockIncrement, BlockReport, BLOCK_CAUTIONS};
pub use routine::{
    block_status, BlockCall, BlockInfo, BlockInput, BlockModel, BlockModelRoutine, BlockOutcome, BlockOutput,
    BlockRoutine, Conditions, SpecificEnergy, BLOCK_ABI_VERSION, BLOCK_MESSAGE_LEN, ELASTIC_RESPONSE,
};
pub use run::run;
pub use settings::{BlockSettings, EnergyRule, RateLaw};
pub use step::{block_increments, BlockStep};
