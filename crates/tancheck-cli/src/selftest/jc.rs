//! Selftest rows of the Johnson–Cook point routine, in Rust, C and Fortran: the correct routine
//! passes along a fast tension-shear path (plastic rates far above the reference rate, so the
//! rate term of the tangent matters), and the routine whose tangent leaves the rate term out
//! is caught.

use std::path::Path as FsPath;

use anyhow::Result;
use tancheck_core::path::{Path, Shape};
use tancheck_core::{check, Caller, PointKind, PointState, Report, Routine, RoutineInfo, Settings};

use super::{compiled_examples, report_row, Row};

/// 4340 steel Johnson–Cook constants (REFERENCES.md, read, secondary) with demo elastic,
/// thermal and damage-free-heating entries: [E, ν, A, B, n, C, m, T_room, T_melt, rate0,
/// density, heat_capacity, taylor_quinney, D1..D5].
const STEEL: [f64; 18] = [
    200_000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
    -2.12, 0.002, 0.61,
];
/// Start temperature (K), above T_room so that thermal softening is active too.
const TEMP: f64 = 400.0;
/// Time increment of every increment of the path: plastic rates of order 10³ /s.
const DTIME: f64 = 1e-6;

/// The correct routine passes; the one without the rate term in its tangent is caught. The
/// finding of the flawed routine: its tangent misses part of the hardening slope K' of the
/// return map (∂σ_y/∂ε̇* / (Δt rate0)), so the plastic correction 2μθ̄ n⊗n keeps its direction
/// with the wrong factor θ̄: `term-scaled`, as for the J2 zoo routine that leaves the kinematic
/// modulus out of θ̄ (`j2-no-kinematic`).
const VARIANTS: [(&str, &str, &str); 2] =
    [("johnson-cook", "jc", "none"), ("johnson-cook-no-rate-term", "jc_no_rate_term", "term-scaled")];

fn path() -> Path {
    let mut p = Path::ramp(Shape::TensionShear, 1.2e-2, 8, 4);
    for inc in &mut p.increments {
        inc.dtime = DTIME;
    }
    p.name = format!("{}, each in {DTIME:e} s", p.name);
    p
}

fn check_jc(routine: &mut dyn Routine) -> Result<Report> {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    check::run(&mut caller, &STEEL, PointState::zero(&info, TEMP), &path(), &Settings::default())
        .map_err(anyhow::Error::msg)
}

/// The rows, for Rust, C and (when gfortran is there) Fortran; libraries go to `dir`.
pub(super) fn rows(dir: &FsPath, root: &FsPath, fortran: bool) -> Result<Vec<Row>> {
    let kind = PointKind::Solid3d;
    let mut rows = Vec::new();
    for (model, _, expected) in VARIANTS {
        let mut m = tancheck_models::reference(model, kind)?;
        rows.push(report_row(model, "Rust", expected, &check_jc(&mut m)?));
    }
    for (language, prefix, lib) in compiled_examples(dir, root, fortran, "jc", "Johnson–Cook rows")? {
        for (model, sym, expected) in VARIANTS {
            let symbol = format!("{prefix}_{sym}");
            let info = tancheck_models::reference(model, kind)?.info().clone();
            let mut r = lib.routine(&symbol, RoutineInfo { name: symbol.clone(), ..info })?;
            rows.push(report_row(model, language, expected, &check_jc(&mut r)?));
        }
    }
    Ok(rows)
}
