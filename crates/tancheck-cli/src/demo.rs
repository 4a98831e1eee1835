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
use tancheck_core::report::CheckOutcome;
use tancheck_core::{Report, Verdict};

use crate::manifest::Manifest;
use crate::report::sci;
use crate::report::terminal::Detail;
use crate::session::{default_path, emit, run_manifest};

#[derive(Args, Debug)]
pub struct DemoArgs {
    /// Keep the built libraries and manifests in this folder.
    #[arg(long, value_name = "DIR")]
    pub keep: Option<PathBuf>,
    /// Print the full report of every routine.
    #[arg(short, long)]
    pub verbose: bool,
    /// Print only the routines that did not get the verdict they should, and the verdict.
    #[arg(short, long, conflicts_with = "verbose")]
    pub quiet: bool,
}

const C_SOURCES: [(&str, &str); 4] = [
    ("elastic.c", include_str!("../../../fortran-shim/examples/c/elastic.c")),
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
const PLY_C_SOURCES: [(&str, &str); 1] = [("ply.c", include_str!("../../../fortran-shim/examples/c/ply.c"))];
const PLY_FORTRAN_SOURCES: [(&str, &str); 2] = [
    ("ply.F90", include_str!("../../../fortran-shim/examples/fortran/ply.F90")),
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

/// Build the ply examples and check the bracket ply with them; true when every routine got
/// the verdict it should.
fn ply_scenario(dir: &FsPath, fortran: bool, verbose: bool) -> Result<bool> {
    let mut out = crate::survive::stdout();
    let c_lib = build(dir, "ply_c", &PLY_C_SOURCES)?;
    writeln!(out, "   built {} (C ply, with complex-step twins)", c_lib.display())?;
    let f_lib = if fortran {
        let l = build(dir, "ply_fortran", &PLY_FORTRAN_SOURCES)?;
        writeln!(out, "   built {} (Fortran ply, with complex-step twins)", l.display())?;
        Some(l)
    } else {
        None
    };
    writeln!(out)?;
    let name = |p: &PathBuf| p.file_name().unwrap().to_string_lossy().into_owned();
    let mut all = true;
    for (title, file, text, expect) in ply_cases(&name(&c_lib), f_lib.as_ref().map(name).as_deref()) {
        let mpath = dir.join(&file);
        std::fs::write(&mpath, &text)?;
        let m = Manifest::parse(&text, &mpath)?;
        let path = m.path_or(default_path(m.routine.kind)).map_err(anyhow::Error::msg)?;
        let report = run_manifest(&m, dir, &path)?;
        let ok = report.verdict == expect;
        all &= ok;
        writeln!(out, "-- {title} --")?;
        writeln!(out, "   manifest: {}", mpath.display())?;
        if verbose {
            drop(out);
            emit(&report, Detail::Normal, None)?;
            out = crate::survive::stdout();
        } else {
            summary(&mut out, &report)?;
        }
        writeln!(
            out,
            "   expected {}, got {}: {}\n",
            expect.word(),
            report.verdict.word(),
            if ok { "as it should be" } else { "NOT AS EXPECTED" }
        )?;
    }
    Ok(all)
}

struct Case {
    title: &'static str,
    file: &'static str,
    routine: String,
    expect: Verdict,
}

fn cases(c_lib: Option<&str>, f_lib: Option<&str>) -> Vec<Case> {
    let j2 = |src: &str| format!(r#""kind": "solid-3d", "states": 13, "properties": {J2_PROPS}, {src}"#);
    let el = |src: &str| format!(r#""kind": "solid-3d", "states": 0, "properties": {ELASTIC_PROPS}, {src}"#);
    let lib = |l: &str, s: &str| format!(r#""library": "{l}", "symbol": "{s}""#);
    let mut v = vec![Case {
        title: "J2 plasticity, Rust reference model",
        file: "rust_j2.json",
        routine: format!(r#""model": "j2", "kind": "solid-3d", "properties": {J2_PROPS}"#),
        expect: Verdict::Pass,
    }];
    if let Some(l) = c_lib {
        v.push(Case {
            title: "elasticity, C",
            file: "c_elastic.json",
            routine: el(&lib(l, "c_elastic")),
            expect: Verdict::Pass,
        });
        v.push(Case {
            title: "J2 plasticity, C",
            file: "c_j2.json",
            routine: j2(&lib(l, "c_j2")),
            expect: Verdict::Pass,
        });
        v.push(Case {
            title: "J2 plasticity with the continuum tangent (flawed on purpose), C",
            file: "c_j2_continuum.json",
            routine: j2(&lib(l, "c_j2_continuum")),
            expect: Verdict::TangentFailure,
        });
    }
    if let Some(l) = f_lib {
        v.push(Case {
            title: "elasticity, Fortran",
            file: "f_elastic.json",
            routine: el(&lib(l, "f_elastic")),
            expect: Verdict::Pass,
        });
        v.push(Case {
            title: "J2 plasticity, Fortran",
            file: "f_j2.json",
            routine: j2(&lib(l, "f_j2")),
            expect: Verdict::Pass,
        });
        v.push(Case {
            title: "J2 plasticity with the continuum tangent (flawed on purpose), Fortran",
            file: "f_j2_continuum.json",
            routine: j2(&lib(l, "f_j2_continuum")),
            expect: Verdict::TangentFailure,
        });
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

/// Run the demo; exit 0 when every routine got the verdict it should, 1 otherwise.
pub fn run(a: &DemoArgs) -> Result<i32> {
    let keep = a.keep.is_some();
    let dir = a
        .keep
        .clone()
        .unwrap_or_else(|| std::env::temp_dir().join(format!("tancheck-demo-{}", std::process::id())));
    std::fs::create_dir_all(&dir).with_context(|| format!("creating {}", dir.display()))?;
    let mut out = crate::survive::stdout();
    writeln!(out, "tancheck demo: building the bundled example routines in {}", dir.display())?;
    let c_lib = build(&dir, "examples_c", &C_SOURCES)?;
    writeln!(out, "   built {} (C, with complex-step twins)", c_lib.display())?;
    let f_lib = if fortran_available() {
        let l = build(&dir, "examples_fortran", &FORTRAN_SOURCES)?;
        writeln!(out, "   built {} (Fortran, with complex-step twins)", l.display())?;
        Some(l)
    } else {
        writeln!(
            out,
            "   SKIPPED the Fortran examples: gfortran was not found (install it, e.g. `apt-get install gfortran`, \
             or set FC)"
        )?;
        None
    };
    writeln!(out)?;
    let name = |p: &PathBuf| p.file_name().unwrap().to_string_lossy().into_owned();
    let cs = cases(Some(&name(&c_lib)), f_lib.as_ref().map(name).as_deref());
    let mut all_as_expected = true;
    for case in &cs {
        let text = format!("{{\n  \"routine\": {{ {} }}\n}}\n", case.routine);
        let mpath = dir.join(case.file);
        std::fs::write(&mpath, &text)?;
        let m = Manifest::parse(&text, &mpath)?;
        let report = run_manifest(&m, &dir, &default_path(m.routine.kind))?;
        let ok = report.verdict == case.expect;
        all_as_expected &= ok;
        if a.quiet {
            if !ok {
                writeln!(
                    out,
                    "FAIL {}: expected {}, got {}",
                    case.title,
                    case.expect.word(),
                    report.verdict.word()
                )?;
            }
            continue;
        }
        writeln!(out, "-- {} --", case.title)?;
        writeln!(out, "   manifest: {}", mpath.display())?;
        if a.verbose {
            drop(out);
            emit(&report, Detail::Normal, None)?;
            out = crate::survive::stdout();
        } else {
            summary(&mut out, &report)?;
        }
        writeln!(
            out,
            "   expected {}, got {}: {}\n",
            case.expect.word(),
            report.verdict.word(),
            if ok { "as it should be" } else { "NOT AS EXPECTED" }
        )?;
    }
    // Explicit dynamics: a block routine passing and a flawed one.
    all_as_expected &= crate::demo_block::run(&dir, &mut out, a.verbose)?;
    drop(out);
    all_as_expected &= ply_scenario(&dir, f_lib.is_some(), a.verbose)?;
    all_as_expected &= crate::demo_finite::run_scenario(&dir, a.verbose)?;
    let mut out = crate::survive::stdout();
    for c in tancheck_core::report::CAUTIONS.iter().filter(|_| !a.quiet) {
        writeln!(out, "caution: {c}")?;
    }
    if keep {
        if !a.quiet {
            writeln!(
                out,
                "\nThe libraries and manifests are in {}; rerun one with `tancheck check <manifest>`.",
                dir.display()
            )?;
        }
    } else {
        let _ = std::fs::remove_dir_all(&dir);
    }
    writeln!(
        out,
        "demo: {}",
        if all_as_expected {
            "every routine got the verdict it should (exit 0)"
        } else {
            "some routine did NOT get the verdict it should (exit 1)"
        }
    )?;
    Ok(if all_as_expected { 0 } else { 1 })
}

/// A short view: per scheme, the worst errors; for a failure, the first failing increment's
/// worst entries.
fn summary(out: &mut dyn Write, r: &Report) -> Result<()> {
    writeln!(out, "   routine {} along {}", r.routine.name, r.path)?;
    for s in &r.summary {
        if s.checks == 0 {
            writeln!(out, "   {:<13} skipped", s.scheme.name())?;
            continue;
        }
        writeln!(
            out,
            "   {:<13} {:>2} of {:>2} increments failed; worst norm error {}, worst entry error {} (tolerance {})",
            s.scheme.name(),
            s.failed,
            s.checks,
            sci(s.worst_norm_error),
            sci(s.worst_entry_error),
            sci(s.tol)
        )?;
    }
    if let Some(inc) = r.increments.iter().find(|i| !i.passed()) {
        for c in inc.checks.iter().filter(|c| !c.passed()).take(1) {
            if let CheckOutcome::Compared(cmp) = &c.tangent {
                writeln!(
                    out,
                    "   first failure: increment {} ({}), {}: wrong entries (row/column)",
                    inc.index,
                    inc.branch_label(),
                    c.scheme.name()
                )?;
                for e in cmp.worst.iter().filter(|e| e.error > cmp.tol) {
                    writeln!(
                        out,
                        "     {:<7} returned {:>13.6e}   derivative {:>13.6e}   error {}",
                        e.label,
                        e.returned,
                        e.numerical,
                        sci(e.error)
                    )?;
                }
            }
        }
        if let Some(d) = &inc.diagnosis {
            writeln!(out, "   diagnosis: {}", d.reason)?;
            if let Some(h) = d.causes.iter().find(|h| h.explains) {
                writeln!(out, "   likely cause: {} — {}", h.cause.name(), h.detail)?;
            }
        }
        writeln!(
            out,
            "   finding over the path: {} (the cause that explains the most failing increments)",
            r.finding()
        )?;
        if let Some(f) = r.first_fault() {
            writeln!(out, "   fault: {}", f.message)?;
        }
    }
    for n in &r.notes {
        writeln!(out, "   note: {n}")?;
    }
    Ok(())
}
