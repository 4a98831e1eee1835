//! The finite-strain scenario of `tancheck demo`: the C neo-Hookean routine checked in the
//! spatial Jaumann measure divided by J along a stretch with a rigid rotation superposed
//! (it passes), and the same routine returning the Truesdell tangent where the Jaumann one is
//! declared (it fails, with the stress terms that tell the rates apart named). Properties
//! are demo numbers (a soft rubber-like solid, E = 10 MPa, ν = 0.45), not data for a real
//! material.

use std::io::Write;
use std::path::Path as FsPath;

use anyhow::{Context, Result};
use tancheck_abi::{build_library, BuildOptions};
use tancheck_core::finite::check::run;
use tancheck_core::Verdict;

use crate::finite_load::{open, FiniteManifest};

const SOURCE: &str = include_str!("../../../fortran-shim/examples/c/finite_nh.c");

/// Build, write the two manifests, check both; true when both got the verdict they should.
pub fn run_scenario(dir: &FsPath, verbose: bool) -> Result<bool> {
    let src_dir = dir.join("finite-src");
    std::fs::create_dir_all(&src_dir)?;
    let src = src_dir.join("finite_nh.c");
    std::fs::write(&src, SOURCE)?;
    let lib = dir.join("libexamples_finite.so");
    build_library(&BuildOptions::new([src], &lib)).context("building the finite-strain example")?;
    let mut all = true;
    for (title, file, symbol, expect) in [
        ("neo-Hookean at finite strain, C (sigma-jaumann)", "c_nh.json", "c_nh", Verdict::Pass),
        (
            "neo-Hookean returning the Truesdell tangent where Jaumann is declared (flawed on purpose), C",
            "c_nh_truesdell_for_jaumann.json",
            "c_nh_truesdell_for_jaumann",
            Verdict::TangentFailure,
        ),
    ] {
        let text = format!(
            "{{\n  \"finite\": {{ \"stress\": \"cauchy\", \"tangent\": \"sigma-jaumann\" }},\n  \
             \"routine\": {{ \"library\": \"libexamples_finite.so\", \"symbol\": \"{symbol}\", \"properties\": [10, 0.45] }},\n  \
             \"path\": {{ \"shape\": \"uniaxial-stretch\", \"stretch\": 1.8, \"increments\": 4, \
             \"rotation\": {{ \"axis\": [0, 0, 1], \"angle\": 0.8 }} }}\n}}\n"
        );
        let mpath = dir.join(file);
        std::fs::write(&mpath, &text)?;
        let (m, d, mdir) = FiniteManifest::load(&mpath)?;
        let mut r = open(&m, &d, &mdir, &mpath.display().to_string())?;
        let path = m.path.build().map_err(anyhow::Error::msg)?;
        let report = run(r.as_mut(), &m.routine.properties, &[], &path, m.check);
        let ok = report.verdict == expect;
        all &= ok;
        {
            let mut out = crate::survive::stdout();
            writeln!(out, "-- {title} --")?;
            writeln!(out, "   manifest: {}", mpath.display())?;
        }
        if verbose || !ok || report.verdict != Verdict::Pass {
            let mut out = crate::survive::stdout();
            let plain = crate::report::style::Palette { on: false };
            crate::report::finite::write_check(&mut out, &report, !verbose, false, plain)?;
        } else {
            let worst = report.increments.iter().filter_map(|i| i.error_complex).fold(0.0, f64::max);
            let mut out = crate::survive::stdout();
            writeln!(
                out,
                "   {} increments in F, largest error against the complex step {worst:.1e}",
                report.increments.len()
            )?;
        }
        let mut out = crate::survive::stdout();
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
