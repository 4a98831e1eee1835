//! Exploring random load paths (`tancheck explore`): seeded random paths, steered towards
//! what the routine has not done yet, each checked as `check` checks one; every distinct
//! failure shrunk to a short path.
//!
//! Data flow: `random` (the seeded generator) → `scale` (the routine's elastic range, measured
//! with single calls) → `generate` (fresh paths and mutations at that scale) → `coverage`
//! (the signature of each increment: reported branch and the state variables that changed;
//! a walk with base calls; the tally) → `report` (the report data) → `run` (the loop: path,
//! walk, check, shrink, within the budget).
//!
//! Coverage steering is a small corpus search: a path whose walk reaches a signature no path
//! reached before joins the corpus; six paths in ten continue a prefix of a corpus path
//! (newer entries preferred), the others are fresh.

pub mod coverage;
pub mod generate;
pub mod random;
pub mod report;
pub mod run;
pub mod scale;

pub use coverage::{Reached, Signature};
pub use report::{Budget, ExploreReport, Finding, NamedBranch, NeverReached, ShrunkFailure, Stop};
pub use run::{run, ExploreSettings, Progress, PropertyRange, DEFAULT_PATHS};
pub use scale::Scale;
