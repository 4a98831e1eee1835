//! The result of checking a block routine: what was measured per increment of the point under
//! test (effective modulus, wave speed, stable time increment, work and energies) and the
//! findings of each check, each naming the increment and the output it is about.

use serde::Serialize;

/// The finding of a twin that is not complex-step safe (as a point check names it).
pub const TWIN_FINDING: &str = "twin-not-complex-step-safe";

/// The cautions of a block routine's report: its checks are of the routine's own consistency,
/// not of a tangent.
pub const BLOCK_CAUTIONS: [&str; 2] = [
    "These checks test the routine's own consistency (independence, energy, deletion, stiffness); they do \
     not validate the material model against test data.",
    "Structural use of any material model follows the applicable codes and licensed engineering judgement.",
];

/// The checks of a block routine, by the name reports use.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum BlockCheck {
    /// The first call (zero time, zero increment) returns the elastic response.
    ElasticResponse,
    /// A point's results do not depend on the block size, its position or its neighbours.
    Independence,
    /// The numerical tangent of one point: effective moduli, wave speed, stable time increment.
    Tangent,
    /// Internal energy = work of the stress; dissipation never decreases; stored ≥ elastic.
    Energy,
    /// A deleted point stays deleted, carries no stress and stays finite.
    Deletion,
    /// The state variables declared as damage never decrease.
    Damage,
    /// Halving the increments converges with the update's order.
    Refinement,
    /// Two rates change the stress by the declared law.
    Rate,
    /// The block routine's update matches the named point routine's.
    Counterpart,
    /// A call failed, crashed or misbehaved.
    Call,
}

impl BlockCheck {
    /// Every check, in the order the reports list them (the elastic response first, a failed
    /// call last).
    pub const ALL: [BlockCheck; 10] = [
        BlockCheck::ElasticResponse,
        BlockCheck::Tangent,
        BlockCheck::Energy,
        BlockCheck::Deletion,
        BlockCheck::Damage,
        BlockCheck::Independence,
        BlockCheck::Rate,
        BlockCheck::Refinement,
        BlockCheck::Counterpart,
        BlockCheck::Call,
    ];

    pub fn name(self) -> &'static str {
        match self {
            BlockCheck::ElasticResponse => "elastic-response",
            BlockCheck::Independence => "independence",
            BlockCheck::Tangent => "tangent",
            BlockCheck::Energy => "energy",
            BlockCheck::Deletion => "deletion",
            BlockCheck::Damage => "damage",
            BlockCheck::Refinement => "refinement",
            BlockCheck::Rate => "rate",
            BlockCheck::Counterpart => "counterpart",
            BlockCheck::Call => "call",
        }
    }
}

/// One thing a check found wrong.
#[derive(Clone, Debug, PartialEq, Serialize, schemars::JsonSchema)]
pub struct BlockFinding {
    pub check: BlockCheck,
    /// The finding's short name (`point-dependence`, `stiffer-than-elastic`, ...).
    pub finding: &'static str,
    /// The increment (from 1; 0 for the elastic response), when it is about one.
    pub increment: Option<usize>,
    /// What happened, with the numbers.
    pub what: String,
}

/// What the check measured in one increment of the point under test.
#[derive(Clone, Debug, Default, PartialEq, Serialize, schemars::JsonSchema)]
pub struct BlockIncrement {
    pub index: usize,
    /// Largest normal diagonal entry of the numerical tangent ∂σ/∂Δε (the dilatational
    /// effective modulus M). This and the next four are null (NaN in Rust) where the tangent
    /// was not measured: a deleted point, or a tangent with entries that are not finite.
    #[schemars(with = "Option<f64>")]
    pub effective_modulus: f64,
    /// sqrt(M / density).
    #[schemars(with = "Option<f64>")]
    pub wave_speed: f64,
    /// characteristic length / wave speed.
    #[schemars(with = "Option<f64>")]
    pub stable_time_increment: f64,
    /// Stiffness along the increment's direction, Δε·D·Δε / Δε·C·Δε (C the elastic moduli of
    /// the first call): below 0 the point softens.
    #[schemars(with = "Option<f64>")]
    pub along_ratio: f64,
    /// Smallest eigenvalue of the tangent's symmetric part.
    #[schemars(with = "Option<f64>")]
    pub smallest_stiffness: f64,
    /// Relative difference of the finite-difference and complex-step tangents (None without
    /// a twin).
    pub twin_difference: Option<f64>,
    /// Work of the stress over the increment per unit mass, by the stated rule.
    pub work: f64,
    /// The routine's internal and dissipated energy increments.
    pub internal_increment: f64,
    pub dissipated_increment: f64,
    pub deleted: bool,
}

/// The elastic response of the first call.
#[derive(Clone, Debug, Default, PartialEq, Serialize, schemars::JsonSchema)]
pub struct ElasticSummary {
    /// Elastic moduli (ncomp × ncomp, column-major), from the first call; empty when it was
    /// not measured.
    pub moduli: Vec<f64>,
    /// Largest normal diagonal entry: the dilatational modulus λ + 2μ for isotropy. This and
    /// the next two are null (NaN in Rust) when the first call failed: not measured.
    #[schemars(with = "Option<f64>")]
    pub dilatational_modulus: f64,
    #[schemars(with = "Option<f64>")]
    pub wave_speed: f64,
    #[schemars(with = "Option<f64>")]
    pub stable_time_increment: f64,
}

impl ElasticSummary {
    /// Nothing measured: the first call failed (its zeros read as measured moduli and a wave
    /// speed of 0; a user-style sweep).
    pub fn unmeasured() -> ElasticSummary {
        ElasticSummary {
            moduli: Vec::new(),
            dilatational_modulus: f64::NAN,
            wave_speed: f64::NAN,
            stable_time_increment: f64::NAN,
        }
    }

    /// Whether the first call's moduli were measured.
    pub fn measured(&self) -> bool {
        // The moduli, not the wave speed: a first call that returns no stiffness (a wave speed
        // of NaN from a modulus of 0) was measured, and says so.
        !self.moduli.is_empty()
    }
}

/// The whole result.
#[derive(Clone, Debug, Default, PartialEq, Serialize, schemars::JsonSchema)]
pub struct BlockReport {
    pub routine: String,
    pub path: String,
    pub energy_rule: &'static str,
    pub elastic: ElasticSummary,
    pub increments: Vec<BlockIncrement>,
    pub findings: Vec<BlockFinding>,
    /// What each check did, or why it did not run ("no point was deleted along the path").
    pub notes: Vec<String>,
    pub real_calls: u64,
    pub complex_calls: u64,
}

impl BlockReport {
    pub fn passed(&self) -> bool {
        self.findings.is_empty()
    }

    /// The first finding's name, or "none".
    pub fn finding(&self) -> &'static str {
        self.findings.first().map_or("none", |f| f.finding)
    }

    /// Exit code: 0 pass, 3 a call failed or crashed, 1 any other finding.
    pub fn exit_code(&self) -> i32 {
        if self.passed() {
            0
        } else if self.has("routine-fault") {
            3
        } else if self.findings.iter().all(|f| f.finding == TWIN_FINDING) {
            // Only the twin: as a point check's (TWIN, exit 4).
            4
        } else {
            1
        }
    }

    /// Whether some finding of `check` was made.
    pub fn has(&self, finding: &str) -> bool {
        self.findings.iter().any(|f| f.finding == finding)
    }

    pub(crate) fn add(
        &mut self,
        check: BlockCheck,
        finding: &'static str,
        increment: Option<usize>,
        what: String,
    ) {
        // One finding per name is enough to report; later ones are counted in the text.
        if let Some(f) = self.findings.iter_mut().find(|f| f.finding == finding) {
            if !f.what.ends_with(" (and later increments)") {
                f.what.push_str(" (and later increments)");
            }
            return;
        }
        self.findings.push(BlockFinding { check, finding, increment, what });
    }
}
