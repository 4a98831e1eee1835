//! `tancheck demo`: build the bundled example routines and check them, so a user sees
//! correct routines pass and a flawed one fail with its wrong entries named.
//!
//! The properties here are demo numbers (a generic structural steel and a generic light
//! alloy), not data for any real material.

use std::io::Write;
use std::path::{Path as FsPath, PathBuf};

use anyhow::{Context, Result};
use clap::Args;
use tancheck_abi::compile::{build_library, fortran_available, BuildOptions};
use tancheck_core::Verdict;

use crate::manifest::Manifest;
use crate::report::model::{DemoCase, DemoReport};
use crate::report::Reporter;
use crate::session::{default_path, run_manifest, OutputArgs};

#[derive(Args, Debug)]
pub struct DemoArgs {
    /// Keep the built libraries and manifests in this folder.
    #[arg(long, value_name = "DIR")]
    pub keep: Option<PathBuf>,
    /// Write the demo's report as JSON to FILE (`-` for standard output, replacing the readable
    /// report).
    #[arg(long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    #[command(flatten)]
    pub output: OutputArgs,
}

const C_SOURCES: [(&str, &str); 5] = [
    ("elastic.c", include_str!("../../../fortran-shim/examples/c/elastic.c")),
    ("isotropic_elastic.h", include_str!("../../../fortran-shim/examples/c/isotropic_elastic.h")),
    ("j2.c", include_str!("../../../fortran-shim/examples/c/j2.c")),
    ("j2_energy.h", include_str!("../../../fortran-shim/examples/c/j2_energy.h")),
    ("j2_return_map.h", include_str!("../../../fortran-shim/examples/c/j2_return_map.h")),
];
const FORTRAN_SOURCES: [(&str, &str); 3] = [
    ("elastic.F90", include_str!("../../../fortran-shim/examples/fortran/elastic.F90")),
    ("j2.F90", include_str!("../../../fortran-shim/examples/fortran/j2.F90")),
    ("j2_return_map.inc", include_str!("../../../fortran-shim/examples/fortran/j2_return_map.inc")),
];

/// Demo properties: J2 [E, ν, σy0, H_iso, Q, b, H_kin] in MPa; elastic [E, ν].
const J2_PROPS: &str = "[210000, 0.3, 355, 1200, 150, 12, 2500]";
const ELASTIC_PROPS: &str = "[70000, 0.33]";

/// The ply scenario's sources (built as their own libraries, beside the examples above).
const PLY_C_SOURCES: [(&str, &str); 3] = [
    ("ply.c", include_str!("../../../fortran-shim/examples/c/ply.c")),
    ("isotropic_elastic.h", include_str!("../../../fortran-shim/examples/c/isotropic_elastic.h")),
    ("material_axes.h", include_str!("../../../fortran-shim/examples/c/material_axes.h")),
];
const PLY_FORTRAN_SOURCES: [(&str, &str); 3] = [
    ("ply.F90", include_str!("../../../fortran-shim/examples/fortran/ply.F90")),
    ("ply_variant.inc", include_str!("../../../fortran-shim/examples/fortran/ply_variant.inc")),
    ("ply_update.inc", include_str!("../../../fortran-shim/examples/fortran/ply_update.inc")),
];

/// A made-up bracket flange ply (demo numbers, no real material): a glass/epoxy-like ply with
/// its fibres at 30° in the 1-2 plane, plane stress, in MPa, N/mm and mm —
/// [E1 E2 E3, ν12 ν13 ν23, G12 G13 G23, axis 1, axis 2, Xt Xc Yt Yc SL, fracture energies of
/// fibre tension, fibre compression, matrix tension, matrix compression, L = 0.8 mm, η = 0].
const BRACKET_PLY_PROPS: &str = "[40000, 9000, 9000, 0.27, 0.27, 0.4, 3800, 3800, 3200, \
    0.866025, 0.5, 0, -0.5, 0.866025, 0, 1000, 600, 40, 140, 70, 40, 50, 0.3, 1.2, 0.8, 0]";

/// The bracket's combined loading at the point: stretch along the bracket (11) with lateral
/// contraction and in-plane shear, into matrix damage; half unloaded; reloaded past it.
/// (tensor components 11 22 33 23 13 12 with engineering shear, increments.)
const BRACKET_PATH: [([f64; 3], usize); 3] =
    [([8e-4, -2e-4, -1.2e-3], 8), ([-1e-3, 2.5e-4, 1.5e-3], 3), ([8e-4, -2e-4, -1.2e-3], 6)];

fn bracket_path() -> String {
    let mut incs = Vec::new();
    for ([e11, e22, g12], n) in BRACKET_PATH {
        for _ in 0..n {
            incs.push(format!(r#"{{"dstrain": [{e11:e}, {e22:e}, 0, 0, 0, {g12:e}], "dtime": 0.01}}"#));
        }
    }
    format!(
        r#"{{"name": "bracket ply: stretch, contraction and shear into matrix damage, unload, reload", "increments": [{}]}}"#,
        incs.join(", ")
    )
}

/// The ply scenario's cases: (title, manifest file, manifest text, expected verdict).
fn ply_cases(c_lib: &str, f_lib: Option<&str>) -> Vec<(String, String, String, Verdict)> {
    let mut libs = vec![("C", "c", c_lib)];
    if let Some(l) = f_lib {
        libs.push(("Fortran", "f", l));
    }
    let mut v = Vec::new();
    for (language, prefix, lib) in libs {
        for (symbol, what, expect) in [
            ("ply", "composite ply damage (Hashin modes, crack-band softening)", Verdict::Pass),
            (
                "ply_secant",
                "composite ply damage with the secant tangent (flawed on purpose)",
                Verdict::TangentFailure,
            ),
        ] {
            let text = format!(
                "{{\n  \"routine\": {{ \"library\": \"{lib}\", \"symbol\": \"{prefix}_{symbol}\", \"kind\": \"plane-stress\", \
                 \"states\": 8, \"properties\": {BRACKET_PLY_PROPS} }},\n  \"path\": {}\n}}\n",
                bracket_path()
            );
            v.push((
                format!("bracket ply: {what}, {language}"),
                format!("{prefix}_bracket_{symbol}.json"),
                text,
                expect,
            ));
        }
    }
    v
}

/// Build the ply examples and check the bracket ply with them, one case per routine.
fn ply_scenario(dir: &FsPath, fortran: bool, progress: &mut dyn Write) -> Result<Vec<DemoCase>> {
    let c_lib = build(dir, "ply_c", &PLY_C_SOURCES)?;
    writeln!(progress, "   built {} (C ply, with complex-step twins)", c_lib.display())?;
    let f_lib = if fortran {
        let l = build(dir, "ply_fortran", &PLY_FORTRAN_SOURCES)?;
        writeln!(progress, "   built {} (Fortran ply, with complex-step twins)", l.display())?;
        Some(l)
    } else {
        None
    };
    writeln!(progress)?;
    let name = |p: &PathBuf| p.file_name().unwrap().to_string_lossy().into_owned();
    let mut cases = Vec::new();
    for (title, file, text, expect) in ply_cases(&name(&c_lib), f_lib.as_ref().map(name).as_deref()) {
        let language = if title.ends_with(", C") { "C" } else { "Fortran" };
        cases.push(check_case(dir, title, language, &file, &text, expect, true)?);
    }
    Ok(cases)
}

/// Write one case's manifest into `dir`, check it (along its own path when `own_path`, else
/// the default path) and note whether the verdict is the expected one.
fn check_case(
    dir: &FsPath,
    title: String,
    language: &str,
    file: &str,
    text: &str,
    expected: Verdict,
    own_path: bool,
) -> Result<DemoCase> {
    let mpath = dir.join(file);
    std::fs::write(&mpath, text)?;
    let m = Manifest::parse(text, &mpath)?;
    let path = if own_path {
        m.path_or(default_path(m.routine.kind)).map_err(anyhow::Error::msg)?
    } else {
        default_path(m.routine.kind)
    };
    let report = run_manifest(&m, dir, &path)?;
    let right = report.verdict == expected;
    let manifest = mpath.display().to_string();
    Ok(DemoCase { title, language: language.into(), manifest, expected, report, right })
}

struct Case {
    title: String,
    language: &'static str,
    file: String,
    routine: String,
    expect: Verdict,
}

/// The routines of the demo's libraries, each built in C (`c_…`) and in Fortran (`f_…`): what
/// it is, its name after the prefix, its state count and properties, the verdict it should get.
const COMPILED: [(&str, &str, usize, &str, Verdict); 3] = [
    ("elasticity", "elastic", 0, ELASTIC_PROPS, Verdict::Pass),
    ("J2 plasticity", "j2", 13, J2_PROPS, Verdict::Pass),
    (
        "J2 plasticity with the continuum tangent (flawed on purpose)",
        "j2_continuum",
        13,
        J2_PROPS,
        Verdict::TangentFailure,
    ),
];

fn cases(c_lib: Option<&str>, f_lib: Option<&str>) -> Vec<Case> {
    let mut v = vec![Case {
        title: "J2 plasticity, Rust reference model".into(),
        language: "Rust",
        file: "rust_j2.json".into(),
        routine: format!(r#""model": "j2", "kind": "solid-3d", "properties": {J2_PROPS}"#),
        expect: Verdict::Pass,
    }];
    for (language, prefix, lib) in [("C", "c", c_lib), ("Fortran", "f", f_lib)] {
        let Some(lib) = lib else { continue };
        for (what, name, states, props, expect) in COMPILED {
            let symbol = format!("{prefix}_{name}");
            v.push(Case {
                title: format!("{what}, {language}"),
                language,
                file: format!("{symbol}.json"),
                routine: format!(
                    r#""kind": "solid-3d", "states": {states}, "properties": {props}, "library": "{lib}", "symbol": "{symbol}""#
                ),
                expect,
            });
        }
    }
    v
}

fn build(dir: &FsPath, name: &str, sources: &[(&str, &str)]) -> Result<PathBuf> {
    let src_dir = dir.join(format!("{name}-src"));
    std::fs::create_dir_all(&src_dir)?;
    let mut paths = Vec::new();
    for (file, text) in sources {
        let p = src_dir.join(file);
        std::fs::write(&p, text)?;
        // Included files are written beside the sources, not compiled on their own.
        if !file.ends_with(".inc") && !file.ends_with(".h") {
            paths.push(p);
        }
    }
    let output = dir.join(format!("lib{name}.so"));
    build_library(&BuildOptions {
        sources: paths,
        output: output.clone(),
        debug: false,
        twin: true,
        ..Default::default()
    })
    .with_context(|| format!("building the {name} examples"))?;
    Ok(output)
}

/// Run the demo; exit 0 when every routine got the verdict it should, 1 otherwise. The routines'
/// checks go to the reporters (`--json`, `--html`, `--junit`, the terminal).
pub fn run(a: &DemoArgs) -> Result<i32> {
    a.output.prepare()?;
    a.output.guard(a.json.as_deref(), &[])?;
    // With the JSON on standard output (or --quiet), the builds' progress and the lines the
    // block and finite-strain scenarios print go to standard error.
    let json_on_stdout = a.json.as_deref().is_some_and(crate::report::json::Json::to_stdout);
    crate::survive::own_output_to_stderr(json_on_stdout || a.output.quiet);
    let result = run_cases(a);
    crate::survive::own_output_to_stderr(false);
    let report = result?;
    let mut reporters = crate::session::reporters(&a.output, a.json.as_deref());
    reporters.demo(&report)?;
    reporters.finish()?;
    Ok(report.exit_code)
}

/// Build the examples, check every routine, and gather what the reporters show.
fn run_cases(a: &DemoArgs) -> Result<DemoReport> {
    let mut progress = crate::survive::stdout();
    let keep = a.keep.is_some();
    let dir = a
        .keep
        .clone()
        .unwrap_or_else(|| std::env::temp_dir().join(format!("tancheck-demo-{}", std::process::id())));
    std::fs::create_dir_all(&dir).with_context(|| format!("creating {}", dir.display()))?;
    writeln!(progress, "tancheck demo: building the bundled example routines in {}", dir.display())?;
    let c_lib = build(&dir, "examples_c", &C_SOURCES)?;
    writeln!(progress, "   built {} (C, with complex-step twins)", c_lib.display())?;
    let mut skipped = Vec::new();
    let f_lib = if fortran_available() {
        let l = build(&dir, "examples_fortran", &FORTRAN_SOURCES)?;
        writeln!(progress, "   built {} (Fortran, with complex-step twins)", l.display())?;
        Some(l)
    } else {
        skipped.push(
            "the Fortran examples: gfortran was not found (install it, e.g. `apt-get install gfortran`, \
             or set FC)"
                .to_string(),
        );
        None
    };
    writeln!(progress)?;
    let name = |p: &PathBuf| p.file_name().unwrap().to_string_lossy().into_owned();
    let mut checked = Vec::new();
    for case in cases(Some(&name(&c_lib)), f_lib.as_ref().map(name).as_deref()) {
        let text = format!("{{\n  \"routine\": {{ {} }}\n}}\n", case.routine);
        checked.push(check_case(&dir, case.title, case.language, &case.file, &text, case.expect, false)?);
    }
    // Explicit dynamics and finite strain print their own lines (their reports are their
    // commands'); the bracket ply's checks join the others.
    let mut all_as_expected = crate::demo_block::run(&dir, &mut progress, a.output.verbose)?;
    drop(progress);
    checked.extend(ply_scenario(&dir, f_lib.is_some(), &mut crate::survive::stdout())?);
    all_as_expected &= crate::demo_finite::run_scenario(&dir, a.output.verbose)?;
    all_as_expected &= checked.iter().all(|c| c.right);
    if !keep {
        let _ = std::fs::remove_dir_all(&dir);
    }
    Ok(DemoReport {
        cases: checked,
        skipped,
        kept: keep.then(|| dir.display().to_string()),
        exit_code: if all_as_expected { 0 } else { 1 },
    })
}
