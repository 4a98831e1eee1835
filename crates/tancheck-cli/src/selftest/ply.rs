//! Selftest rows of the composite ply damage model, in Rust, C and Fortran: the correct
//! routine (with and without viscous damage) must pass along a path through damage growth,
//! unloading and reloading in plane stress and solid-3d; the flawed tangents must be caught
//! with their finding; the healing and length-dropping variants, whose tangents are consistent
//! with their own updates, must be caught by the irreversibility and regularisation probes.
//! Properties are demo numbers (a made-up carbon/epoxy ply).

use std::path::Path as FsPath;

use anyhow::Result;
use tancheck_core::path::{Path, PathIncrement};
use tancheck_core::probe::{run_suite, ProbeSpec, ProbeStatus};
use tancheck_core::{check, Caller, Model, PointKind, PointState, Routine, RoutineInfo, Settings, Verdict};
use tancheck_models::{Ply, PlyFlaw};

use super::{compiled_examples, report_row, Row};

/// Demo ply properties (MPa, N/mm, mm): axes at `deg` in the 1-2 plane, L = 0.5, η set per row.
fn props(eta: f64, deg: f64) -> Vec<f64> {
    let (c, s) = (deg.to_radians().cos(), deg.to_radians().sin());
    vec![
        138000.0, 11000.0, 11000.0, 0.28, 0.28, 0.4, 5500.0, 5500.0, 3928.57, c, s, 0.0, -s, c, 0.0, 1500.0,
        900.0, 27.0, 200.0, 80.0, 90.0, 80.0, 0.25, 2.0, 0.5, eta,
    ]
}

/// Transverse tension with in-plane shear into matrix damage growth, unloading, reloading past
/// the largest load, then transverse compression: time increment `dt`.
fn path(dt: f64) -> Path {
    let mut p = Path {
        name: "transverse tension + shear into damage growth, unload, reload, compress".into(),
        increments: Vec::new(),
    };
    let mut push = |e22: f64, g12: f64, e11: f64| {
        p.increments.push(PathIncrement {
            dstrain: [e11, e22, 0.0, 0.0, 0.0, g12],
            dtemp: 0.0,
            dtime: dt,
            hold_stress: None,
        })
    };
    for _ in 0..8 {
        push(6e-4, 5e-4, 1e-4);
    }
    for _ in 0..3 {
        push(-8e-4, -5e-4, 0.0);
    }
    for _ in 0..5 {
        push(8e-4, 6e-4, 1e-4);
    }
    for _ in 0..4 {
        push(-2.5e-3, 0.0, 0.0);
    }
    p
}

/// (variant, flaw, η, expected finding). On the material axes the missing growth of the shear
/// damage (which couples the four modes) is one wrong row of the tangent, the shear row; the
/// viscous tangent without Δt/(η + Δt) carries the growth term scaled by (η + Δt)/Δt. Off the
/// axes the same flaws are rank-one terms whose label depends on the angle (term-missing at
/// 15°, rank-two in some languages by rounding), so the rows use a 0° ply.
const ROWS: [(&str, PlyFlaw, f64, &str); 5] = [
    ("ply", PlyFlaw::None, 0.0, "none"),
    ("ply, viscous", PlyFlaw::None, 0.02, "none"),
    ("ply-secant", PlyFlaw::Secant, 0.0, "secant"),
    ("ply-no-coupling", PlyFlaw::NoCoupling, 0.0, "one-row"),
    ("ply-viscous-no-factor", PlyFlaw::ViscousNoFactor, 0.02, "term-scaled"),
];

fn one(
    routine: &mut dyn Routine,
    language: &'static str,
    variant: &str,
    eta: f64,
    expected: &str,
) -> Result<Row> {
    let info = routine.info().clone();
    let kind = info.convention.kind();
    let mut caller = Caller::new(routine);
    let r = check::run(
        &mut caller,
        &props(eta, 0.0),
        PointState::zero(&info, 20.0),
        &path(0.01),
        &Settings::default(),
    )
    .map_err(anyhow::Error::msg)?;
    let variant = format!("{variant} ({})", if kind == PointKind::PlaneStress { "ps" } else { "3d" });
    Ok(report_row(&variant, language, expected, &r))
}

/// The softening probes' rows: (variant, flaw, probe, expected status). Irreversibility runs
/// on the check's path (load, unload, reload) with the damage state [4..8] declared;
/// regularisation on transverse strain to full failure of a ply with ν12 = ν13 = ν23 = 0
/// (a uniaxial material stress in either kind), L at property 24, G_mt = 0.25 declared.
/// Softening runs where irreversibility does (the healing ply softens on unloading, where its
/// damage falls); viscous-limit on the check's path with η = 0.02 and Δt = 0.01 (property 25);
/// snap-back where regularisation does (the length is admissible, and the ply refuses
/// 1.05 L_max).
const PROBE_ROWS: [(&str, PlyFlaw, &str, ProbeStatus); 9] = [
    ("ply, irreversibility", PlyFlaw::None, "irreversibility", ProbeStatus::Pass),
    ("ply-healing", PlyFlaw::Healing, "irreversibility", ProbeStatus::Fail),
    ("ply, regularisation", PlyFlaw::None, "regularisation", ProbeStatus::Pass),
    ("ply-length-dropped", PlyFlaw::LengthDropped, "regularisation", ProbeStatus::Fail),
    ("ply, softening", PlyFlaw::None, "softening", ProbeStatus::Pass),
    ("ply-healing", PlyFlaw::Healing, "softening", ProbeStatus::Fail),
    ("ply, viscous limit", PlyFlaw::None, "viscous-limit", ProbeStatus::Pass),
    ("ply-viscous-no-factor", PlyFlaw::ViscousNoFactor, "viscous-limit", ProbeStatus::Fail),
    ("ply, snap-back", PlyFlaw::None, "snap-back", ProbeStatus::Pass),
];

fn probe_row(
    routine: &mut dyn Routine,
    language: &'static str,
    variant: &str,
    probe: &str,
    expected: ProbeStatus,
) -> Result<Row> {
    let info = routine.info().clone();
    let kind = info.convention.kind();
    let damage = Some(vec![4, 5, 6, 7]);
    let (spec, props, path) = if probe == "irreversibility" || probe == "softening" {
        (ProbeSpec { damage, ..ProbeSpec::named(probe) }, props(0.0, 0.0), path(1.0))
    } else if probe == "viscous-limit" {
        (ProbeSpec { viscosity: Some(25), ..ProbeSpec::named(probe) }, props(0.02, 0.0), path(0.01))
    } else {
        let mut p = props(0.0, 0.0);
        p[3] = 0.0;
        p[4] = 0.0;
        p[5] = 0.0;
        let mut to_failure =
            Path { name: "transverse strain to full failure".into(), increments: Vec::new() };
        for _ in 0..60 {
            to_failure.increments.push(PathIncrement {
                dstrain: [0.0, 7.5e-4, 0.0, 0.0, 0.0, 0.0],
                dtemp: 0.0,
                dtime: 1.0,
                hold_stress: None,
            });
        }
        let damage = if probe == "snap-back" { damage } else { None };
        (
            ProbeSpec { length: Some(24), fracture_energy: Some(0.25), damage, ..ProbeSpec::named(probe) },
            p,
            to_failure,
        )
    };
    let mut caller = Caller::new(routine);
    let rep = run_suite(
        &mut caller,
        "ply",
        &[spec],
        &props,
        &PointState::zero(&info, 20.0),
        &path,
        &Settings::default(),
    )
    .map_err(anyhow::Error::msg)?;
    let r = &rep.results[0];
    Ok(Row {
        variant: format!("{variant} ({})", if kind == PointKind::PlaneStress { "ps" } else { "3d" }),
        language,
        expected: format!("{probe} {}", expected.word()),
        verdict: if rep.pass { Verdict::Pass } else { Verdict::TangentFailure },
        found: format!("{probe} {}", r.status.word()),
        first_increment: r.increment,
        right: r.status == expected,
    })
}

fn symbol(prefix: &str, flaw: PlyFlaw) -> String {
    format!("{prefix}_{}", Ply::name_of(flaw).replace('-', "_"))
}

/// The rows, for Rust, C and (when gfortran is there) Fortran; libraries go to `dir`.
pub(super) fn rows(dir: &FsPath, root: &FsPath, fortran: bool) -> Result<Vec<Row>> {
    let mut rows = Vec::new();
    for kind in Ply::KINDS {
        for (variant, flaw, eta, expected) in ROWS {
            let mut m = tancheck_core::ModelRoutine(Ply::with_flaw(kind, flaw)?);
            rows.push(one(&mut m, "Rust", variant, eta, expected)?);
        }
        for (variant, flaw, probe, expected) in PROBE_ROWS {
            let mut m = tancheck_core::ModelRoutine(Ply::with_flaw(kind, flaw)?);
            rows.push(probe_row(&mut m, "Rust", variant, probe, expected)?);
        }
    }
    for (language, prefix, lib) in compiled_examples(dir, root, fortran, "ply", "ply rows")? {
        for kind in Ply::KINDS {
            for (variant, flaw, eta, expected) in ROWS {
                let sym = symbol(prefix, flaw);
                let info = Ply::with_flaw(kind, flaw)?.info().clone();
                let mut r = lib.routine(&sym, RoutineInfo { name: sym.clone(), ..info })?;
                rows.push(one(&mut r, language, variant, eta, expected)?);
            }
            for (variant, flaw, probe, expected) in PROBE_ROWS {
                let sym = symbol(prefix, flaw);
                let info = Ply::with_flaw(kind, flaw)?.info().clone();
                let mut r = lib.routine(&sym, RoutineInfo { name: sym.clone(), ..info })?;
                rows.push(probe_row(&mut r, language, variant, probe, expected)?);
            }
        }
    }
    Ok(rows)
}
