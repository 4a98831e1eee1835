//! Selftest rows of the finite-strain zoo: every Rust row (correct routines in each tangent
//! measure and one flawed variant per cause), the C neo-Hookean routine and its flawed
//! variants, and the Fortran one, each checked along the zoo's path in F (biaxial stretch with
//! a rigid rotation superposed).

use std::path::Path as FsPath;

use anyhow::{Context, Result};
use tancheck_abi::{build_library, BuildOptions, Library};
use tancheck_core::finite::check::{run, FiniteReport};
use tancheck_core::finite::{FiniteInfo, FiniteSettings, Frame, StressMeasure, TangentMeasure};
use tancheck_models::finite::{finite_zoo, zoo_path, ZOO_PROPERTIES};

use super::Row;

fn row(variant: &str, language: &'static str, expected: &str, r: &FiniteReport) -> Row {
    let found = r.finding.clone().unwrap_or_else(|| "none".into());
    Row {
        variant: variant.into(),
        language,
        expected: expected.into(),
        verdict: r.verdict,
        right: found == expected,
        found,
        first_increment: r.increments.iter().find(|i| !i.passed).map(|i| i.increment),
    }
}

/// The compiled rows: (variant, symbol, stress, tangent, expected finding).
const C_ROWS: [(&str, &str, StressMeasure, TangentMeasure, &str); 5] = [
    ("nh-sigma-jaumann", "c_nh", StressMeasure::Cauchy, TangentMeasure::SigmaJaumann, "none"),
    ("nh-tau-truesdell", "c_nh", StressMeasure::Kirchhoff, TangentMeasure::TauTruesdell, "none"),
    (
        "nh-truesdell-for-jaumann",
        "c_nh_truesdell_for_jaumann",
        StressMeasure::Kirchhoff,
        TangentMeasure::TauJaumann,
        "other-rate",
    ),
    (
        "nh-missing-over-j",
        "c_nh_missing_over_j",
        StressMeasure::Cauchy,
        TangentMeasure::SigmaJaumann,
        "missing-over-j",
    ),
    (
        "nh-cauchy-for-kirchhoff",
        "c_nh_cauchy_for_kirchhoff",
        StressMeasure::Kirchhoff,
        TangentMeasure::TauJaumann,
        "stress-measure",
    ),
];

pub(super) fn rows(dir: &FsPath, root: &FsPath, fortran: bool) -> Result<Vec<Row>> {
    let path = zoo_path().build().map_err(anyhow::Error::msg)?;
    let settings = FiniteSettings::default();
    let mut rows = Vec::new();
    for e in finite_zoo() {
        let (props, state) = (e.model.properties(), e.model.start_state());
        let mut r = e.model.routine();
        let rep = run(r.as_mut(), props, &state, &path, settings);
        rows.push(row(e.name, "Rust", e.expected.unwrap_or("none"), &rep));
    }
    let mut libs = vec![("C", "fortran-shim/examples/c/finite_nh.c", "libfinite_c.so")];
    if fortran {
        libs.push(("Fortran", "fortran-shim/examples/fortran/finite_nh.F90", "libfinite_f.so"));
    }
    for (language, source, name) in libs {
        let out = dir.join(name);
        build_library(&BuildOptions::new([root.join(source)], &out))
            .with_context(|| format!("building the {language} finite-strain routines"))?;
        let lib = Library::open(&out)?;
        for (variant, symbol, stress, tangent, expected) in C_ROWS {
            let symbol = if language == "C" {
                symbol.to_string()
            } else if symbol == "c_nh" {
                "f_nh".to_string()
            } else {
                continue;
            };
            let info = FiniteInfo {
                name: symbol.clone(),
                stress,
                tangent,
                frame: Frame::None,
                nstate: 0,
                nproperties: 2,
            };
            let mut r = lib.finite_routine(&symbol, info)?;
            let rep = run(&mut r, &ZOO_PROPERTIES, &[], &path, settings);
            rows.push(row(variant, language, expected, &rep));
        }
    }
    Ok(rows)
}
