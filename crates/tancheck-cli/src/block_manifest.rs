//! The block part of a manifest: `routine.interface` says which interface the routine has,
//! and the `block` section how to check a block routine.
//!
//! ```json
//! {
//!   "routine": { "library": "libplate.so", "symbol": "c_j2_block", "interface": "block",
//!                "kind": "solid-3d", "states": 13, "properties": [200000, 0.3, 250, 1000, 0, 0, 500] },
//!   "start": { "temperature": 293 },
//!   "block": { "density": 7.85e-9, "characteristic_length": 2.0, "energy_rule": "trapezoid",
//!              "counterpart": { "symbol": "c_j2", "tolerance": 1e-10 } }
//! }
//! ```

use serde::Deserialize;
use tancheck_core::block::{BlockSettings, Conditions, EnergyRule, RateLaw};
use tancheck_core::PointKind;

/// Which interface a routine has.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Interface {
    /// One point with its tangent (tancheck_routine.h).
    #[default]
    Point,
    /// A block of points, no tangent (tancheck_block.h).
    Block,
}

/// A point routine of the same model, to compare the block routine's update with.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CounterpartSpec {
    /// Its symbol in the block routine's library.
    pub symbol: Option<String>,
    /// Or a built-in point model.
    pub model: Option<String>,
    /// Largest relative difference of the stresses (of the largest stress) along the path.
    #[serde(default = "default_counterpart_tolerance")]
    pub tolerance: f64,
}

fn default_counterpart_tolerance() -> f64 {
    1e-9
}

/// How to check a block routine.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BlockSpec {
    /// Density of every point (consistent units: t/mm³ with MPa and mm).
    pub density: f64,
    /// Characteristic length of the element every point stands for.
    pub characteristic_length: f64,
    #[serde(default)]
    pub energy_rule: EnergyRule,
    pub energy_tolerance: Option<f64>,
    pub independence_tolerance: Option<f64>,
    pub stiffness_tolerance: Option<f64>,
    /// The routine softens on purpose (a negative effective stiffness is expected).
    #[serde(default)]
    pub softening: bool,
    /// The routine stiffens on purpose (an effective stiffness above the elastic one is expected).
    #[serde(default)]
    pub stiffening: bool,
    /// Largest stress a deleted point may keep.
    #[serde(default)]
    pub deleted_stress: f64,
    /// Order of the update in the increment size.
    pub update_order: Option<f64>,
    /// The routine's declared rate law.
    pub rate_law: Option<RateLaw>,
    #[serde(default = "yes")]
    pub independence: bool,
    #[serde(default = "yes")]
    pub refinement: bool,
    pub counterpart: Option<CounterpartSpec>,
    /// State variables (0-based indices) that are damage: they must never decrease.
    #[serde(default)]
    pub damage: Vec<usize>,
}

fn yes() -> bool {
    true
}

/// The block section agrees with the interface and the kind.
pub fn validate(interface: Interface, kind: PointKind, block: Option<&BlockSpec>) -> Result<(), String> {
    match (interface, block) {
        (Interface::Point, Some(_)) => {
            return Err("a `block` section needs routine.interface \"block\"".into());
        }
        (Interface::Block, None) => {
            return Err("routine.interface \"block\" needs a `block` section with density and \
                        characteristic_length"
                .into())
        }
        _ => {}
    }
    let Some(b) = block else { return Ok(()) };
    if !matches!(kind, PointKind::Solid3d | PointKind::PlaneStrain | PointKind::Axisymmetric) {
        return Err(format!(
            "block routines have 6 or 4 components: kind solid-3d, plane-strain or axisymmetric, not {kind}"
        ));
    }
    let positive = |what: &str, x: f64| {
        if x > 0.0 && x.is_finite() {
            Ok(())
        } else {
            Err(format!("block.{what} must be a positive number, not {x}"))
        }
    };
    positive("density", b.density)?;
    positive("characteristic_length", b.characteristic_length)?;
    for (what, x) in [
        ("energy_tolerance", b.energy_tolerance),
        ("independence_tolerance", b.independence_tolerance),
        ("stiffness_tolerance", b.stiffness_tolerance),
        ("update_order", b.update_order),
    ] {
        if let Some(x) = x {
            positive(what, x)?;
        }
    }
    if !(b.deleted_stress >= 0.0 && b.deleted_stress.is_finite()) {
        return Err("block.deleted_stress must be a finite number ≥ 0".into());
    }
    if let Some(r) = b.rate_law {
        positive("rate_law.reference_rate", r.reference_rate)?;
        if !(r.coefficient >= 0.0 && r.coefficient.is_finite()) {
            return Err("block.rate_law.coefficient must be a finite number ≥ 0".into());
        }
    }
    if let Some(c) = &b.counterpart {
        if c.symbol.is_some() == c.model.is_some() {
            return Err("block.counterpart takes symbol (in the same library) or model, one of them".into());
        }
        positive("counterpart.tolerance", c.tolerance)?;
    }
    Ok(())
}

/// The core's settings from the block section.
pub fn settings(b: &BlockSpec, temperature: f64, state0: Vec<f64>) -> BlockSettings {
    let d = BlockSettings::default();
    BlockSettings {
        conditions: Conditions {
            temperature,
            temperature_increment: 0.0,
            density: b.density,
            characteristic_length: b.characteristic_length,
        },
        state0,
        energy_rule: b.energy_rule,
        energy_tolerance: b.energy_tolerance.unwrap_or(d.energy_tolerance),
        independence_tolerance: b.independence_tolerance.unwrap_or(d.independence_tolerance),
        stiffness_tolerance: b.stiffness_tolerance.unwrap_or(d.stiffness_tolerance),
        softening: b.softening,
        stiffening: b.stiffening,
        deleted_stress: b.deleted_stress,
        update_order: b.update_order.unwrap_or(d.update_order),
        rate_law: b.rate_law,
        independence: b.independence,
        refinement: b.refinement,
        damage: b.damage.clone(),
    }
}
