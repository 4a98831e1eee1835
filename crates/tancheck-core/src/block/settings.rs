//! What a block check is told: the point's conditions, the energy rule, the tolerances, and
//! what the routine declares (softening, a residual stress of deleted points, its update's
//! order, a reference rate law).

use serde::{Deserialize, Serialize};

use super::routine::Conditions;

/// How the work of the stress over an increment is integrated.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum EnergyRule {
    /// ½ (σ_n + σ_{n+1}) · Δε / ρ.
    #[default]
    Trapezoid,
    /// σ(Δε/2) · Δε / ρ, with the stress of a call over half the increment from the same start.
    Midpoint,
}

impl EnergyRule {
    pub fn name(self) -> &'static str {
        match self {
            EnergyRule::Trapezoid => "trapezoid",
            EnergyRule::Midpoint => "midpoint",
        }
    }
}

/// A rate law the routine declares, for the rate check (Johnson–Cook's: the flow stress
/// scales with 1 + C ln(ε̇/ε̇₀) above the reference rate ε̇₀).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct RateLaw {
    /// ε̇₀, in 1/time unit of the path.
    pub reference_rate: f64,
    /// C of 1 + C ln(ε̇/ε̇₀).
    pub coefficient: f64,
}

/// Settings of a block check.
#[derive(Clone, Debug, PartialEq)]
pub struct BlockSettings {
    /// The conditions of every point at the start of the path. Its `temperature_increment`
    /// is not used: each call's is the path increment's `dtemp`, and the temperature moves on
    /// by it from increment to increment.
    pub conditions: Conditions,
    /// The routine's start state of every point.
    pub state0: Vec<f64>,
    pub energy_rule: EnergyRule,
    /// Relative tolerance of the energy balance per increment (of |σ|·|Δε|/ρ).
    pub energy_tolerance: f64,
    /// Relative tolerance between a point alone and in a block (of the array's size).
    pub independence_tolerance: f64,
    /// Relative margin by which an effective modulus may exceed the elastic one.
    pub stiffness_tolerance: f64,
    /// The routine declares softening: a negative effective stiffness is expected.
    pub softening: bool,
    /// The routine declares stiffening (a modulus that rises as it cools, compaction): an
    /// effective stiffness above the first call's elastic one is expected and reported in a
    /// note with the stable time increment it gives, not as `stiffer-than-elastic`.
    pub stiffening: bool,
    /// Largest stress magnitude a deleted point may keep (0: none).
    pub deleted_stress: f64,
    /// Order of the update in the increment size (1 for backward Euler), for refinement.
    pub update_order: f64,
    /// The declared rate law, when the routine is rate dependent.
    pub rate_law: Option<RateLaw>,
    /// Run the independence check (blocks of 1, 7 and 128 points).
    pub independence: bool,
    /// Run the refinement check.
    pub refinement: bool,
    /// State variables (0-based indices) declared as damage: they must never decrease.
    pub damage: Vec<usize>,
}

impl Default for BlockSettings {
    fn default() -> Self {
        BlockSettings {
            conditions: Conditions {
                temperature: 293.0,
                temperature_increment: 0.0,
                density: 7.85e-9,
                characteristic_length: 1.0,
            },
            state0: Vec::new(),
            energy_rule: EnergyRule::Trapezoid,
            energy_tolerance: 1e-7,
            independence_tolerance: 1e-12,
            stiffness_tolerance: 1e-4,
            softening: false,
            stiffening: false,
            deleted_stress: 0.0,
            update_order: 1.0,
            rate_law: None,
            independence: true,
            refinement: true,
            damage: Vec::new(),
        }
    }
}
