//! Selftest rows of the block routines, in Rust, C and Fortran: the J2 block (kinematic
//! hardening) and the Johnson–Cook block (damage, deletion) pass; each flawed variant is caught
//! with its finding: a point reading its neighbour's state (`point-dependence`), internal energy
//! from the start stress only (`energy-work-mismatch`), dissipation with the wrong sign
//! (`dissipation-decreases`), a deleted point revived (`deleted-point-revived`), a rate term not
//! guarded at zero rate (`zero-rate-not-finite`), the elastic response (wave speed) at the wrong
//! temperature (`elastic-response-mismatch`).

use std::path::Path as FsPath;

use anyhow::{Context, Result};
use tancheck_abi::{build_library, BuildOptions, Library};
use tancheck_core::block::{self, BlockInfo, BlockReport, BlockRoutine, BlockSettings, Conditions, RateLaw};
use tancheck_core::path::{Path, Shape};
use tancheck_core::{PointKind, Verdict};

use super::Row;

/// The worked J2 case of REFERENCES.md (E 200 GPa, ν 0.3, σy 250 MPa, K' 1000, H' 500 MPa).
const J2: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];
/// 4340 steel Johnson–Cook constants (REFERENCES.md, read, secondary) with typical E, ν, T_r,
/// reference rate, density, heat capacity, χ = 0.9 (common practice) and k_E = 0.3,
/// G_f = 20 N/mm, d_max = 0.99 for the selftest.
const STEEL: [f64; 21] = [
    200_000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
    -2.12, 0.002, 0.61, 0.3, 20.0, 0.99,
];

/// (model, symbol without the language prefix, expected finding).
const J2_ROWS: [(&str, &str, &str); 4] = [
    ("j2-block", "j2_block", "none"),
    ("j2-block-neighbour-state", "j2_block_neighbour_state", "point-dependence"),
    ("j2-block-old-stress-energy", "j2_block_old_stress_energy", "energy-work-mismatch"),
    ("j2-block-dissipation-sign", "j2_block_dissipation_sign", "dissipation-decreases"),
];
const JC_ROWS: [(&str, &str, &str); 4] = [
    ("johnson-cook-block", "jc_block", "none"),
    ("johnson-cook-block-revived", "jc_block_revived", "deleted-point-revived"),
    ("johnson-cook-block-unguarded-rate", "jc_block_unguarded_rate", "zero-rate-not-finite"),
    ("johnson-cook-block-wrong-temperature", "jc_block_wrong_temperature", "elastic-response-mismatch"),
];

fn j2_check(r: &mut dyn BlockRoutine) -> Result<BlockReport> {
    let s = BlockSettings {
        conditions: Conditions {
            temperature: 293.0,
            temperature_increment: 0.0,
            density: 7.85e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0; 13],
        ..BlockSettings::default()
    };
    block::run(r, &J2, &Path::ramp(Shape::TensionShear, 6e-3, 6, 3), &s).map_err(anyhow::Error::msg)
}

/// Into damage and deletion in uniaxial strain (to ε11 = 0.3) and back, at 200/s.
fn jc_check(r: &mut dyn BlockRoutine) -> Result<BlockReport> {
    let mut path = Path::ramp(Shape::UniaxialStrain, 0.3, 30, 10);
    for inc in &mut path.increments {
        inc.dtime = 5e-5;
    }
    let s = BlockSettings {
        conditions: Conditions {
            temperature: 500.0,
            temperature_increment: 0.0,
            density: 7.83e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0; 13],
        softening: true,
        rate_law: Some(RateLaw { reference_rate: 1.0, coefficient: 0.014 }),
        ..BlockSettings::default()
    };
    block::run(r, &STEEL, &path, &s).map_err(anyhow::Error::msg)
}

fn row(variant: &str, language: &'static str, expected: &str, r: &BlockReport) -> Row {
    let found = r.finding().to_string();
    Row {
        variant: variant.into(),
        language,
        expected: expected.into(),
        verdict: match r.exit_code() {
            0 => Verdict::Pass,
            3 => Verdict::RoutineFault,
            _ => Verdict::TangentFailure,
        },
        right: found == expected,
        found,
        first_increment: r.findings.first().and_then(|f| f.increment),
    }
}

type Check = fn(&mut dyn BlockRoutine) -> Result<BlockReport>;
/// The rows of one family, its check, its source's stem and its number of properties.
type Family = (&'static [(&'static str, &'static str, &'static str); 4], Check, &'static str, usize);

/// The rows, for Rust, C and (when gfortran is there) Fortran; libraries go to `dir`.
pub(super) fn rows(dir: &FsPath, root: &FsPath, fortran: bool) -> Result<Vec<Row>> {
    let kind = PointKind::Solid3d;
    let mut rows = Vec::new();
    let families: [Family; 2] = [(&J2_ROWS, j2_check, "j2_block", 7), (&JC_ROWS, jc_check, "jc_block", 21)];
    for (table, check, _, _) in families {
        for (model, _, expected) in table.iter() {
            let mut m =
                tancheck_models::block::by_name(model, kind).context("a block model of the zoo")??;
            rows.push(row(model, "Rust", expected, &check(m.as_mut())?));
        }
    }
    let mut languages = vec![("C", "c", "fortran-shim/examples/c/{}.c")];
    if fortran {
        languages.push(("Fortran", "f", "fortran-shim/examples/fortran/{}.F90"));
    }
    for (language, prefix, pattern) in languages {
        for (table, check, source, nprop) in families {
            let lib_path = dir.join(format!("lib{source}_{prefix}.so"));
            let src = root.join(pattern.replace("{}", source));
            build_library(&BuildOptions::new([src], &lib_path))
                .with_context(|| format!("building the {language} block rows ({source})"))?;
            let lib = Library::open(&lib_path)?;
            for (model, sym, expected) in table.iter() {
                let symbol = format!("{prefix}_{sym}");
                let info = BlockInfo { name: symbol.clone(), ncomp: 6, nstate: 13, nproperties: nprop };
                let mut r = lib.block_routine(&symbol, info)?;
                rows.push(row(model, language, expected, &check(&mut r)?));
            }
        }
    }
    Ok(rows)
}
