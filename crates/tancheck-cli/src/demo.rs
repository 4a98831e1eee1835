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
}

const C_SOURCES: [(&str, &str); 3] = [
    ("elastic.c", include_str!("../../../fortran-shim/examples/c/elastic.c")),
    ("j2.c", include_str!("../../../fortran-shim/examples/c/j2.c")),
    ("j2_energy.h", include_str!("../../../fortran-shim/examples/c/j2_energy.h")),
];
const FORTRAN_SOURCES: [(&str, &str); 3] = [
    ("elastic.F90", include_str!("../../../fortran-shim/examples/fortran/elastic.F90")),
    ("j2.F90", include_str!("../../../fortran-shim/examples/fortran/j2.F90")),
    ("j2_return_map.inc", include_str!("../../../fortran-shim/examples/fortran/j2_return_map.inc")),
];

/// Demo properties: J2 [E, ν, σy0, H_iso, Q, b, H_kin] in MPa; elastic [E, ν].
const J2_PROPS: &str = "[210000, 0.3, 355, 1200, 150, 12, 2500]";
const ELASTIC_PROPS: &str = "[70000, 0.33]";

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
    for c in tancheck_core::report::CAUTIONS {
        writeln!(out, "caution: {c}")?;
    }
    if keep {
        writeln!(
            out,
            "\nThe libraries and manifests are in {}; rerun one with `tancheck check <manifest>`.",
            dir.display()
        )?;
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
