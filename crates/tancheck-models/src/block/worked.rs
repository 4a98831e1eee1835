//! The worked block cases that the block models' tests, the block checks' tests and the
//! selftest all run: the J2 case (properties, path, conditions) and the Johnson–Cook case into
//! damage and deletion. One home, so that the three runs check the same thing.

use tancheck_core::block::{BlockSettings, Conditions, EnergyRule, RateLaw};
use tancheck_core::path::{Path, Shape};

/// The worked J2 case of REFERENCES.md (E 200 GPa, ν 0.3, σy 250 MPa, K' 1000, H' 500 MPa).
pub const J2_PROPS: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

/// The J2 case's path: tension with shear to 6e-3 (6 increments out, 3 back).
pub fn j2_path() -> Path {
    Path::ramp(Shape::TensionShear, 6e-3, 6, 3)
}

/// The J2 case's conditions (steel at 293 K, ρ 7.85e-9 t/mm³, L 2 mm, zero start state),
/// its internal energy integrated by `rule`.
pub fn j2_settings(rule: EnergyRule) -> BlockSettings {
    BlockSettings {
        conditions: Conditions {
            temperature: 293.0,
            temperature_increment: 0.0,
            density: 7.85e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0; 13],
        energy_rule: rule,
        ..BlockSettings::default()
    }
}

/// 4340 steel Johnson–Cook constants of REFERENCES.md (read, secondary copies) with typical E,
/// ν, T_r, reference rate, density and heat capacity (common practice), χ 0.9, k_E 0.3,
/// G_f 20 N/mm, d_max 0.99; `c` the rate coefficient (0.014 published).
pub fn jc_steel(c: f64) -> [f64; 21] {
    [
        200_000.0, 0.29, 792.0, 510.0, 0.26, c, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
        -2.12, 0.002, 0.61, 0.3, 20.0, 0.99,
    ]
}

/// The Johnson–Cook case's path: uniaxial strain to ε11 = 0.3 (30 increments) and back (10),
/// at 200/s.
pub fn jc_path() -> Path {
    let mut path = Path::ramp(Shape::UniaxialStrain, 0.3, 30, 10);
    for inc in &mut path.increments {
        inc.dtime = 5e-5;
    }
    path
}

/// The Johnson–Cook case's conditions at `temperature` (ρ 7.83e-9 t/mm³, L 2 mm, zero start
/// state), softening allowed, the rate law declared with the published C = 0.014.
pub fn jc_settings(temperature: f64) -> BlockSettings {
    BlockSettings {
        conditions: Conditions {
            temperature,
            temperature_increment: 0.0,
            density: 7.83e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0; 13],
        softening: true,
        rate_law: Some(RateLaw { reference_rate: 1.0, coefficient: 0.014 }),
        ..BlockSettings::default()
    }
}
