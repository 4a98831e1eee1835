//! Pointing at a failure: the first failing increment of a path, the fraction of that
//! increment at which the error changes class, what the step studies say about the mismatch,
//! and a shrinker that makes a failing path as short and plain as it can.
//!
//! - Along the path: the first increment the check failed ([`first_failure`]); its start
//!   state is rebuilt by walking the path with base calls ([`driver_at`]).
//! - Inside the increment: the increment is scaled by s in (0, 1] and each call is judged
//!   ([`call_check::check_call`] with the sharpest scheme) and classed by branch, state change
//!   and verdict ([`CallClass`]). A grid of fractions finds the last class change before
//!   s = 1, and bisection narrows it to [`BisectSettings::fraction_tol`] ([`locate`]). For a
//!   tangent wrong in one branch only, that is where the increment enters the branch, e.g.
//!   the fraction at which the yield surface is crossed.
//! - In the step: step studies ([`crate::diagnose::study`]) of the full increment separate
//!   a true mismatch (the discrepancy levels off) from truncation (it converges: the default
//!   step was poor) and from noise (it scatters) ([`StepFinding`]).
//! - Shrinking ([`shrink`]): drop and merge increments, then move components toward zero,
//!   keeping "the path still fails the same way", within iteration and time limits.
//!
//! Data flow: `settings`, `outcome` (what a search finds) → `walk` (along the path) →
//! `inside` (inside the increment, [`locate`]) → [`shrink`] (which reruns the check).

mod inside;
mod outcome;
mod settings;
pub mod shrink;
mod walk;

pub use crate::diagnose::study::StepVerdict;
pub use inside::locate;
pub use outcome::{CallClass, Crossing, Inside, Judgement, Located, Sample, StepFinding};
pub use settings::BisectSettings;
pub use shrink::{shrink, shrink_until, ShrinkLimits, ShrinkStop, Shrunk};
pub use walk::{base_call_of, driver_at, first_failure};

#[cfg(test)]
pub(crate) mod testing;
#[cfg(test)]
mod tests;
