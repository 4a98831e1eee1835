//! `tancheck selftest`: run the zoo of routines with known flaws (and correct ones with
//! kinks) and print what the checker found, so a user can see what it catches before
//! trusting it.
//!
//! Properties are demo numbers inside each model's valid range.

use std::io::Write;
use std::path::PathBuf;

use anyhow::{Context, Result};
use tancheck_abi::{build_library, fortran_available, BuildOptions, Library};
use tancheck_core::path::{Path, PathIncrement, Shape};
use tancheck_core::{check, Caller, PointKind, PointState, Report, Routine, Settings, Verdict};
use tancheck_models::zoo::{self, ZooEntry};

/// Demo properties for a zoo entry.
fn props(name: &str) -> Vec<f64> {
    if name.starts_with("j2") {
        vec![210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0]
    } else if name.starts_with("bimodulus") {
        vec![200000.0, 50000.0, 0.25]
    } else if name.starts_with("thermo") {
        // E20, ν0, ν1, EN 1993-1-2 Table 3.1 modulus reduction, EN 1993-1-2 elongation, α unused.
        vec![210000.0, 0.3, 1e-5, 1.0, 1.0, 0.0]
    } else if name.starts_with("cohesive") {
        // K (N/mm³), N, S (MPa), G_Ic, G_IIc (N/mm), η: demo numbers of a carbon/epoxy interface.
        vec![1e5, 60.0, 90.0, 0.3, 0.9, 2.0]
    } else {
        vec![70000.0, 0.33]
    }
}

/// The path a zoo entry is checked along.
fn path_for(e: &ZooEntry) -> Path {
    if e.name.starts_with("bimodulus") {
        // Out and back so the end of increment 4 is exactly ε11 = 0, on the kink.
        let mut p = Path::ramp(Shape::UniaxialStrain, 1e-3, 2, 2);
        p.increments.push(PathIncrement {
            dstrain: [-5e-4, 0.0, 0.0, 0.0, 0.0, 0.0],
            dtemp: 0.0,
            dtime: 1.0,
            hold_stress: None,
        });
        p.name = "uniaxial strain out to 1e-3, back through 0 (the kink) to -5e-4".into();
        p
    } else if e.name.starts_with("thermo") {
        // Heating from 20 °C to 620 °C while straining: every temperature range of the laws.
        let mut p = Path::ramp(Shape::TensionShear, 2e-3, 10, 0);
        for (k, inc) in p.increments.iter_mut().enumerate() {
            inc.dtemp = 60.0 + 0.37 * k as f64;
        }
        p.name = "tension-shear to 2e-3 while heating by about 600 K (10 increments)".into();
        p
    } else if e.name.starts_with("cohesive") {
        // Mixed-mode opening into damage growth, then unloading: opening with two slips.
        let mut p =
            Path { name: "mixed-mode separation into damage growth and back".into(), increments: Vec::new() };
        for k in 0..12 {
            let s = if k < 8 { 1.0 } else { -1.0 };
            p.increments.push(PathIncrement {
                dstrain: [s * 4e-4, s * 3e-4, s * 1.5e-4, 0.0, 0.0, 0.0],
                dtemp: 0.0,
                dtime: 1.0,
                hold_stress: None,
            });
        }
        p
    } else {
        Path::ramp(Shape::TensionShear, 4e-3, 8, 4)
    }
}

struct Row {
    variant: String,
    language: &'static str,
    expected: String,
    verdict: Verdict,
    found: String,
    first_increment: Option<usize>,
    right: bool,
}

fn check_one(routine: &mut dyn Routine, e: &ZooEntry) -> Result<Report> {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    check::run(&mut caller, &props(e.name), PointState::zero(&info, 20.0), &path_for(e), &Settings::default())
        .map_err(anyhow::Error::msg)
}

fn row(e: &ZooEntry, language: &'static str, r: &Report) -> Row {
    let found = r.finding();
    let right = found == e.expected;
    Row {
        variant: e.name.into(),
        language,
        expected: e.expected.into(),
        verdict: r.verdict,
        found,
        first_increment: r.increments.iter().find(|i| !i.passed()).map(|i| i.index),
        right,
    }
}

fn kind_of(e: &ZooEntry) -> PointKind {
    if e.kinds.contains(&PointKind::Solid3d) {
        PointKind::Solid3d
    } else {
        e.kinds[0]
    }
}

fn repo_root() -> PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

/// Run the zoo; exit 0 when every row is right.
pub fn run(verbose: bool) -> Result<i32> {
    let mut out = crate::survive::stdout();
    let mut rows = Vec::new();
    let entries = zoo::zoo();
    for e in &entries {
        let kind = kind_of(e);
        let mut m = zoo::zoo_model(e.name, kind)?;
        let r = check_one(&mut m, e)?;
        if verbose {
            drop(out);
            crate::cli::emit(&r, crate::report::terminal::Detail::Normal, None)?;
            out = crate::survive::stdout();
        }
        rows.push(row(e, "Rust", &r));
    }
    let dir = std::env::temp_dir().join(format!("tancheck-selftest-{}", std::process::id()));
    std::fs::create_dir_all(&dir)?;
    let root = repo_root();
    type SymbolOf = fn(&ZooEntry) -> Option<&'static str>;
    let mut libs: Vec<(&'static str, PathBuf, SymbolOf)> = Vec::new();
    let c_lib = dir.join("libzoo_c.so");
    build_library(&BuildOptions::new(zoo::C_SOURCES.iter().map(|s| root.join(s)), &c_lib))
        .context("building the C zoo (selftest runs from a checkout of tancheck)")?;
    libs.push(("C", c_lib, |e| e.c_symbol));
    if fortran_available() {
        let f_lib = dir.join("libzoo_f.so");
        build_library(&BuildOptions::new(zoo::FORTRAN_SOURCES.iter().map(|s| root.join(s)), &f_lib))
            .context("building the Fortran zoo")?;
        libs.push(("Fortran", f_lib, |e| e.fortran_symbol));
    } else {
        writeln!(out, "SKIPPED the Fortran rows: gfortran was not found (install it or set FC)")?;
    }
    for (language, lib_path, symbol) in &libs {
        let lib = Library::open(lib_path)?;
        for e in &entries {
            let Some(sym) = symbol(e) else { continue };
            let kind = kind_of(e);
            let info = zoo::zoo_model(e.name, kind)?.info().clone();
            let mut r = lib.routine(sym, tancheck_core::RoutineInfo { name: sym.into(), ..info })?;
            let rep = check_one(&mut r, e)?;
            rows.push(row(e, language, &rep));
        }
    }
    let _ = std::fs::remove_dir_all(&dir);

    writeln!(out, "tancheck selftest: routines with known flaws, and correct ones that must pass\n")?;
    writeln!(
        out,
        "{:<26} {:<8} {:<20} {:<7} {:<20} {:<6} right",
        "variant", "language", "expected", "verdict", "found", "at inc"
    )?;
    for r in &rows {
        writeln!(
            out,
            "{:<26} {:<8} {:<20} {:<7} {:<20} {:<6} {}",
            r.variant,
            r.language,
            r.expected,
            r.verdict.word(),
            r.found,
            r.first_increment.map_or("-".into(), |i| i.to_string()),
            if r.right { "yes" } else { "NO" }
        )?;
    }
    let wrong = rows.iter().filter(|r| !r.right).count();
    writeln!(out, "\n{} of {} rows right", rows.len() - wrong, rows.len())?;
    for e in &entries {
        if verbose {
            writeln!(out, "  {:<26} {}", e.name, e.description)?;
        }
    }
    Ok(if wrong == 0 { 0 } else { 1 })
}
