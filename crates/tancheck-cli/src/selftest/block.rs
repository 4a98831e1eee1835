//! Selftest rows of the block routines, in Rust, C and Fortran: the J2 block (kinematic
//! hardening) and the Johnson–Cook block (damage, deletion) pass; each flawed variant is caught
//! with its finding: a point reading its neighbour's state (`point-dependence`), internal energy
//! from the start stress only (`energy-work-mismatch`), dissipation with the wrong sign
//! (`dissipation-decreases`), a deleted point revived (`deleted-point-revived`), a rate term not
//! guarded at zero rate (`zero-rate-not-finite`), the elastic response (wave speed) at the wrong
//! temperature (`elastic-response-mismatch`), the back stress from the total plastic strain
//! (`refinement-order`), the plastic corrector added (`stiffer-than-elastic`) or applied twice
//! (`negative-stiffness`), a deleted point that keeps its stress (`deleted-point-stress`), an
//! unclipped homologous temperature below room temperature (`non-finite-stiffness`); the
//! midpoint-rule J2 block passes by the midpoint rule, the trapezoid one is caught by it.

use std::path::Path as FsPath;

use anyhow::{Context, Result};
use tancheck_abi::{build_library, BuildOptions, Library};
use tancheck_core::block::{self, BlockInfo, BlockReport, BlockRoutine, EnergyRule};
use tancheck_core::{PointKind, Verdict};
use tancheck_models::block::worked::{j2_path, j2_settings, jc_path, jc_settings, jc_steel, J2_PROPS};

use super::Row;

/// One row: the model, the finding expected and how it is checked. Its symbol is the model's
/// name in the family's source (see [`Family`]).
type BlockRow = (&'static str, &'static str, Check);

/// How a row is checked, and the note its label gets after the model's name.
#[derive(Clone, Copy)]
struct Check {
    run: fn(&mut dyn BlockRoutine) -> Result<BlockReport>,
    note: &'static str,
}

const J2: Check = Check { run: j2_check, note: "" };
const J2_MIDPOINT: Check = Check { run: j2_midpoint_check, note: " (midpoint rule)" };
const JC: Check = Check { run: jc_check, note: "" };
const JC_COLD: Check = Check { run: jc_cold_check, note: " (250 K)" };
/// Below the room temperature, for a flawed row whose model's name says it already.
const JC_COLD_FLAW: Check = Check { run: jc_cold_check, note: "" };

const J2_ROWS: [BlockRow; 9] = [
    ("j2-block", "none", J2),
    ("j2-block-neighbour-state", "point-dependence", J2),
    ("j2-block-old-stress-energy", "energy-work-mismatch", J2),
    ("j2-block-dissipation-sign", "dissipation-decreases", J2),
    ("j2-block-total-back-stress", "refinement-order", J2),
    ("j2-block-corrector-sign", "stiffer-than-elastic", J2),
    ("j2-block-double-correction", "negative-stiffness", J2),
    ("j2-block-midpoint", "none", J2_MIDPOINT),
    ("j2-block", "energy-work-mismatch", J2_MIDPOINT),
];
const JC_ROWS: [BlockRow; 7] = [
    ("johnson-cook-block", "none", JC),
    ("johnson-cook-block-revived", "deleted-point-revived", JC),
    ("johnson-cook-block-unguarded-rate", "zero-rate-not-finite", JC),
    ("johnson-cook-block-wrong-temperature", "elastic-response-mismatch", JC),
    ("johnson-cook-block-deleted-stress", "deleted-point-stress", JC),
    ("johnson-cook-block", "none", JC_COLD),
    ("johnson-cook-block-unclipped-temperature", "non-finite-stiffness", JC_COLD_FLAW),
];

fn j2_check(r: &mut dyn BlockRoutine) -> Result<BlockReport> {
    block::run(r, &J2_PROPS, &j2_path(), &j2_settings(EnergyRule::Trapezoid)).map_err(anyhow::Error::msg)
}

fn j2_midpoint_check(r: &mut dyn BlockRoutine) -> Result<BlockReport> {
    block::run(r, &J2_PROPS, &j2_path(), &j2_settings(EnergyRule::Midpoint)).map_err(anyhow::Error::msg)
}

/// Into damage and deletion in uniaxial strain (to ε11 = 0.3) and back, at 200/s, at `temperature`.
fn jc_check_at(r: &mut dyn BlockRoutine, temperature: f64) -> Result<BlockReport> {
    block::run(r, &jc_steel(0.014), &jc_path(), &jc_settings(temperature)).map_err(anyhow::Error::msg)
}

fn jc_check(r: &mut dyn BlockRoutine) -> Result<BlockReport> {
    jc_check_at(r, 500.0)
}

/// Below the room temperature (T_r 293 K): Johnson & Cook's thermal factor is 1 there.
fn jc_cold_check(r: &mut dyn BlockRoutine) -> Result<BlockReport> {
    jc_check_at(r, 250.0)
}

fn row(variant: &str, language: &'static str, expected: &str, r: &BlockReport) -> Row {
    let verdict = match r.exit_code() {
        0 => Verdict::Pass,
        3 => Verdict::RoutineFault,
        _ => Verdict::TangentFailure,
    };
    Row::new(
        variant,
        language,
        expected,
        verdict,
        r.finding().to_string(),
        r.findings.first().and_then(|f| f.increment),
    )
}

/// The rows of one family, its models' common name, its source's stem (also the symbols'
/// stem) and its number of properties.
type Family = (&'static [BlockRow], &'static str, &'static str, usize);

/// A model's symbol without the language prefix: the family's stem, then the rest of the
/// model's name with `_` for `-` (`johnson-cook-block-revived` → `jc_block_revived`).
fn symbol_of(model: &str, family_name: &str, stem: &str) -> String {
    format!("{stem}{}", model.strip_prefix(family_name).unwrap_or(model).replace('-', "_"))
}

/// The rows, for Rust, C and (when gfortran is there) Fortran; libraries go to `dir`.
pub(super) fn rows(dir: &FsPath, root: &FsPath, fortran: bool) -> Result<Vec<Row>> {
    let kind = PointKind::Solid3d;
    let mut rows = Vec::new();
    let families: [Family; 2] =
        [(&J2_ROWS, "j2-block", "j2_block", 7), (&JC_ROWS, "johnson-cook-block", "jc_block", 21)];
    for (table, _, _, _) in families {
        for (model, expected, check) in table.iter() {
            let mut m =
                tancheck_models::block::by_name(model, kind).context("a block model of the zoo")??;
            rows.push(row(&format!("{model}{}", check.note), "Rust", expected, &(check.run)(m.as_mut())?));
        }
    }
    let mut languages = vec![("C", "c", "fortran-shim/examples/c/{}.c")];
    if fortran {
        languages.push(("Fortran", "f", "fortran-shim/examples/fortran/{}.F90"));
    }
    for (language, prefix, pattern) in languages {
        for (table, family_name, source, nprop) in families {
            let lib_path = dir.join(format!("lib{source}_{prefix}.so"));
            let src = root.join(pattern.replace("{}", source));
            build_library(&BuildOptions::new([src], &lib_path))
                .with_context(|| format!("building the {language} block rows ({source})"))?;
            let lib = Library::open(&lib_path)?;
            for (model, expected, check) in table.iter() {
                let symbol = format!("{prefix}_{}", symbol_of(model, family_name, source));
                let info = BlockInfo { name: symbol.clone(), ncomp: 6, nstate: 13, nproperties: nprop };
                let mut r = lib.block_routine(&symbol, info)?;
                rows.push(row(&format!("{model}{}", check.note), language, expected, &(check.run)(&mut r)?));
            }
        }
    }
    Ok(rows)
}
