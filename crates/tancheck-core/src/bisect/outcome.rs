//! What a search finds: how one call came out (its class), the judged fractions, where the
//! class changes inside the increment, what the step studies show, and the located failure.

use serde::{Deserialize, Serialize};

use crate::diagnose::study::{self, StepStudy, StepVerdict};
use crate::report::CallRecord;
use crate::schemes::Scheme;

/// How a call came out.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Judgement {
    /// The returned tangent is the derivative.
    Agrees,
    /// It is not.
    Differs,
    /// The tangent is, but the returned ∂σ/∂T is not the temperature derivative.
    DtempDiffers,
    /// An output is not a finite number.
    NonFinite,
    /// The call (or a perturbed call) crashed or returned a failed status.
    Fault,
}

/// The class of a call: branch, state change and judgement. The error changes class where
/// any of the three changes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct CallClass {
    pub reported_branch: Option<i32>,
    pub state_changed: bool,
    pub judgement: Judgement,
}

impl CallClass {
    /// The branch label of [`IncrementResult::branch_label`].
    pub fn branch_label(&self) -> String {
        crate::report::branch_label(self.reported_branch, self.state_changed)
    }

    pub fn word(&self) -> &'static str {
        match self.judgement {
            Judgement::Agrees => "the tangent agrees",
            Judgement::Differs => "the tangent differs",
            Judgement::DtempDiffers => "∂σ/∂T differs",
            Judgement::NonFinite => "an output is not finite",
            Judgement::Fault => "the call faults",
        }
    }
}

/// One judged fraction of the increment.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Sample {
    pub fraction: f64,
    pub class: CallClass,
    /// The tangent error of the judging scheme (0 when it did not compare); its ∂σ/∂T error
    /// when only that failed.
    pub error: f64,
}

/// Where inside the increment the error takes the class of the full increment.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Crossing {
    /// The largest fraction judged with another class, and the smallest above it judged with
    /// the class of the full increment; `above − below` is at most the fraction tolerance.
    pub below: f64,
    pub above: f64,
    pub class_below: CallClass,
    pub class_above: CallClass,
    pub error_below: f64,
    pub error_above: f64,
}

impl Crossing {
    /// What a crossing inside one branch means, in words (see [`Crossing::within_branch`]).
    pub const WITHIN_BRANCH: &'static str =
        "the same branch on both sides: no change of branch inside the increment; the error grows with the \
         fraction and passes the tolerance here, so the tangent is off in the whole branch, by less than the \
         tolerance over the smallest fractions";

    /// Both sides in the same branch, the tangent agreeing below and differing above: no change
    /// of branch inside the increment, the error grows with it and passes the tolerance here.
    pub fn within_branch(&self) -> bool {
        let (b, a) = (&self.class_below, &self.class_above);
        b.reported_branch == a.reported_branch
            && b.state_changed == a.state_changed
            && b.judgement == Judgement::Agrees
            && a.judgement == Judgement::Differs
    }

    /// The best estimate of the fraction: the middle of the bracket.
    pub fn fraction(&self) -> f64 {
        0.5 * (self.below + self.above)
    }
}

/// What the search inside the increment found.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case", tag = "found")]
pub enum Inside {
    /// The class changes at a fraction of the increment.
    Crossing(Crossing),
    /// Every fraction judged, down to `smallest`, has the class of the full increment: the
    /// failure does not start inside this increment.
    Throughout { smallest: f64 },
}

/// The step studies of the failing call and what they show.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct StepFinding {
    pub verdict: StepVerdict,
    /// The plateau level of a mismatch.
    pub plateau: Option<f64>,
    pub studies: Vec<StepStudy>,
}

impl StepFinding {
    /// Classify by the rule the check's diagnosis uses ([`study::classify`]) at the smallest
    /// tolerance among the failed checks.
    pub(super) fn from_studies(studies: Vec<StepStudy>, failed_tol: f64) -> StepFinding {
        let verdict = study::classify(&studies, failed_tol);
        let plateau = studies.iter().find_map(|s| s.plateau);
        StepFinding { verdict, plateau, studies }
    }
}

/// The located failure.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct Located {
    /// The first failing increment (1-based) and the number of increments of the path.
    pub increment: usize,
    pub of: usize,
    /// Its branch label and what its diagnosis found.
    pub branch: String,
    pub finding: String,
    /// The inputs of its base call.
    pub call: CallRecord,
    /// The scheme that judged the fractions.
    pub judged_by: Scheme,
    pub inside: Inside,
    /// Every fraction judged, in the order judged.
    pub samples: Vec<Sample>,
    /// The step studies of the full increment (none when its base call faults).
    pub step: Option<StepFinding>,
    /// Routine calls the search made (besides the check that found the increment).
    pub calls: u64,
}

#[cfg(test)]
mod tests {
    use super::*;

    fn class(branch: i32, changed: bool, judgement: Judgement) -> CallClass {
        CallClass { reported_branch: Some(branch), state_changed: changed, judgement }
    }

    // A crossing in one branch (a sweep's tangent built from the trial normal: the error grows
    // from the branch's start and passes the complex step's tolerance at 7e-4 of the increment)
    // is told from a change of branch (the first plastic increment of an elastic tangent).
    #[test]
    fn a_crossing_within_one_branch_is_told_from_a_change_of_branch() {
        let c = |below: CallClass, above: CallClass| Crossing {
            below: 0.5,
            above: 0.5 + 1e-6,
            class_below: below,
            class_above: above,
            error_below: 9.99e-11,
            error_above: 1.0e-10,
        };
        let plastic = |j| class(1, true, j);
        assert!(c(plastic(Judgement::Agrees), plastic(Judgement::Differs)).within_branch());
        assert!(!c(class(0, false, Judgement::Agrees), plastic(Judgement::Differs)).within_branch());
        assert!(!c(plastic(Judgement::Agrees), plastic(Judgement::Fault)).within_branch());
        assert!(!c(class(1, false, Judgement::Agrees), plastic(Judgement::Differs)).within_branch());
    }
}
