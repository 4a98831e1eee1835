//! `tancheck selftest`: run the zoo of routines with known flaws (and correct ones with
//! kinks) and print what the checker found, so a user can see what it catches before
//! trusting it.
//!
//! Properties are demo numbers inside each model's valid range.

use std::path::{Path as FsPath, PathBuf};

use anyhow::{Context, Result};
use tancheck_abi::{build_library, fortran_available, BuildOptions, Library};
use tancheck_core::path::{Path, PathIncrement, Shape};
use tancheck_core::{check, Caller, PointKind, PointState, Report, Routine, Settings, Verdict};
use tancheck_models::zoo::{self, ZooEntry};

use crate::report::model::{SelftestReport, SelftestRow};
use crate::report::style::Progress;
use crate::report::Reporter;

mod block;
mod conventions;
mod finite;
mod jc;
mod ply;

/// Demo properties for a zoo entry (also what tests/compact_records.rs checks the zoo with).
pub fn props(name: &str) -> Vec<f64> {
    if name.starts_with("j2") || name.starts_with("twin-") {
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
pub fn path_for(e: &ZooEntry) -> Path {
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

/// Correct routines checked where an increment ends exactly on a branch boundary: each must
/// pass (its complex step, or each column's own one-sided derivative, stands at the kink).
struct Boundary {
    variant: &'static str,
    model: &'static str,
    props: Vec<f64>,
    path: Path,
}

fn boundaries() -> Vec<Boundary> {
    // J2 in uniaxial strain ending on the yield surface: ε11 = σy/2μ = 0.001625 for
    // E = 200 GPa, ν = 0.3, σy = 250 MPa (2μ = E/(1 + ν); the numbers of the worked case in
    // REFERENCES.md, Simo & Hughes 1998, Box 3.2).
    let j2 = Path {
        name: "one increment of uniaxial strain 0.001625, ending on the yield surface".into(),
        increments: vec![PathIncrement {
            dstrain: [0.001625, 0.0, 0.0, 0.0, 0.0, 0.0],
            dtemp: 0.0,
            dtime: 1.0,
            hold_stress: None,
        }],
    };
    // The cohesive law at mixed-mode onset: opening = slip, λ = δ₀ₘ with
    // δ₀ₘ = δ₀₃δ₀ₛ/√((1 − B)δ₀ₛ² + Bδ₀₃²), B = ½ (Camanho & Dávila 2002; DEVELOPERS.md).
    let cp = props("cohesive");
    let (d03, d0s) = (cp[1] / cp[0], cp[2] / cp[0]);
    let d0m = d03 * d0s / (0.5 * d0s * d0s + 0.5 * d03 * d03).sqrt();
    let c = d0m / 2f64.sqrt();
    let cohesive = Path {
        name: "one mixed-mode increment (opening = slip) ending at damage onset".into(),
        increments: vec![PathIncrement {
            dstrain: [c, c, 0.0, 0.0, 0.0, 0.0],
            dtemp: 0.0,
            dtime: 1.0,
            hold_stress: None,
        }],
    };
    vec![
        Boundary {
            variant: "j2@yield-surface",
            model: "j2",
            props: vec![200000.0, 0.3, 250.0, 0.0, 0.0, 0.0, 0.0],
            path: j2,
        },
        Boundary { variant: "cohesive@mixed-onset", model: "cohesive", props: cp, path: cohesive },
    ]
}

fn check_with(routine: &mut dyn Routine, props: &[f64], path: &Path) -> Result<Report> {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    check::run(&mut caller, props, PointState::zero(&info, 20.0), path, &Settings::default())
        .map_err(anyhow::Error::msg)
}

fn check_one(routine: &mut dyn Routine, e: &ZooEntry) -> Result<Report> {
    check_with(routine, &props(e.name), &path_for(e))
}

fn row(e: &ZooEntry, language: &'static str, r: &Report) -> Row {
    report_row(e.name, language, e.expected, r)
}

impl Row {
    /// What a check found against what was expected: every family's rows are made so.
    fn new(
        variant: &str,
        language: &'static str,
        expected: &str,
        verdict: Verdict,
        found: String,
        first_increment: Option<usize>,
    ) -> Row {
        let right = found == expected;
        Row {
            variant: variant.into(),
            language,
            expected: expected.into(),
            verdict,
            found,
            first_increment,
            right,
        }
    }
}

/// The row of a point check's report (the zoo's, Johnson–Cook's and ply's rows).
fn report_row(variant: &str, language: &'static str, expected: &str, r: &Report) -> Row {
    let first = r.increments.iter().find(|i| !i.passed()).map(|i| i.index);
    Row::new(variant, language, expected, r.verdict, r.finding(), first)
}

/// The example routines `stem` in C and (when gfortran is there) Fortran, built into `dir` and
/// opened, as (language, symbol prefix, library): how each family's compiled rows begin.
fn compiled_examples(
    dir: &FsPath,
    root: &FsPath,
    fortran: bool,
    stem: &str,
    what: &str,
) -> Result<Vec<(&'static str, &'static str, Library)>> {
    let mut languages = vec![("C", "c", format!("fortran-shim/examples/c/{stem}.c"))];
    if fortran {
        languages.push(("Fortran", "f", format!("fortran-shim/examples/fortran/{stem}.F90")));
    }
    let mut libs = Vec::new();
    for (language, prefix, source) in languages {
        let lib_path = dir.join(format!("lib{stem}_{prefix}.so"));
        build_library(&BuildOptions::new([root.join(source)], &lib_path))
            .with_context(|| format!("building the {language} {what}"))?;
        libs.push((language, prefix, Library::open(&lib_path)?));
    }
    Ok(libs)
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

/// Run the zoo; exit 0 when every row is right. `verbose` also prints each Rust row's report.
pub fn run(verbose: bool) -> Result<i32> {
    let output = crate::session::OutputArgs { verbose, ..Default::default() };
    run_with(&output, None)
}

/// Run the zoo and report its rows to the terminal and, when asked, as JSON.
pub fn run_with(output: &crate::session::OutputArgs, json: Option<&std::path::Path>) -> Result<i32> {
    output.prepare()?;
    output.guard(json, &[])?;
    let report = rows_of_zoo(output)?;
    let mut reporters = crate::session::reporters(output, json);
    reporters.selftest(&report)?;
    reporters.finish()?;
    Ok(report.exit_code)
}

fn rows_of_zoo(output: &crate::session::OutputArgs) -> Result<SelftestReport> {
    let verbose = output.verbose;
    let mut rows = Vec::new();
    let mut skipped = Vec::new();
    let entries = zoo::zoo();
    let progress = Progress::new(0, "selftest: Rust rows", output.shows_progress());
    for e in &entries {
        let kind = kind_of(e);
        let mut m = zoo::zoo_model(e.name, kind)?;
        let r = check_one(&mut m, e)?;
        if verbose {
            let mut t = output.terminal();
            t.check(&r)?;
            t.finish()?;
        }
        rows.push(row(e, "Rust", &r));
        progress.inc();
    }
    let bounds = boundaries();
    for b in &bounds {
        let e = zoo::zoo_entry(b.model).context("a boundary row's model is in the zoo")?;
        let mut m = zoo::zoo_model(b.model, kind_of(&e))?;
        let r = check_with(&mut m, &b.props, &b.path)?;
        rows.push(Row { variant: b.variant.into(), ..row(&e, "Rust", &r) });
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
        skipped.push("the Fortran rows: gfortran was not found (install it or set FC)".to_string());
    }
    for (language, lib_path, symbol) in &libs {
        progress.message(&format!("selftest: {language} rows"));
        let lib = Library::open(lib_path)?;
        for e in &entries {
            let Some(sym) = symbol(e) else { continue };
            let kind = kind_of(e);
            let info = zoo::zoo_model(e.name, kind)?.info().clone();
            let mut r = lib.routine(sym, tancheck_core::RoutineInfo { name: sym.into(), ..info })?;
            let rep = check_one(&mut r, e)?;
            rows.push(row(e, language, &rep));
            progress.inc();
        }
        for b in &bounds {
            let e = zoo::zoo_entry(b.model).context("a boundary row's model is in the zoo")?;
            let Some(sym) = symbol(&e) else { continue };
            let info = zoo::zoo_model(b.model, kind_of(&e))?.info().clone();
            let mut r = lib.routine(sym, tancheck_core::RoutineInfo { name: sym.into(), ..info })?;
            let rep = check_with(&mut r, &b.props, &b.path)?;
            rows.push(Row { variant: b.variant.into(), ..row(&e, language, &rep) });
        }
    }
    progress.message("selftest: conventions, Johnson–Cook and ply rows");
    rows.extend(conventions::rows(&dir, &root, fortran_available())?);
    rows.extend(jc::rows(&dir, &root, fortran_available())?);
    rows.extend(ply::rows(&dir, &root, fortran_available())?);
    rows.extend(finite::rows(&dir, &root, fortran_available())?);
    rows.extend(block::rows(&dir, &root, fortran_available())?);
    let _ = std::fs::remove_dir_all(&dir);

    drop(progress);
    let mut descriptions: Vec<(String, String)> =
        entries.iter().map(|e| (e.name.to_string(), e.description.to_string())).collect();
    descriptions.extend(
        bounds.iter().map(|b| (b.variant.to_string(), format!("correct {}: {}", b.model, b.path.name))),
    );
    let rows: Vec<SelftestRow> = rows
        .into_iter()
        .map(|r| SelftestRow {
            variant: r.variant,
            language: r.language.to_string(),
            expected: r.expected,
            verdict: r.verdict,
            found: r.found,
            first_increment: r.first_increment,
            right: r.right,
        })
        .collect();
    let wrong = rows.iter().filter(|r| !r.right).count();
    Ok(SelftestReport {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        rows,
        skipped,
        descriptions,
        exit_code: if wrong == 0 { 0 } else { 1 },
    })
}
