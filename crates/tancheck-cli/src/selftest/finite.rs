//! Selftest rows of the finite-strain zoo: every Rust row (correct routines in each tangent
//! measure and one flawed variant per cause), and the compiled rows in C and in Fortran (the
//! neo-Hookean, j2-log and hypoelastic routines, and one flawed variant per cause), each
//! checked along the zoo's path in F (biaxial stretch with a rigid rotation superposed).

use std::path::Path as FsPath;

use anyhow::{Context, Result};
use tancheck_abi::{build_library, BuildOptions, Library};
use tancheck_core::finite::check::{run, FiniteReport};
use tancheck_core::finite::{FiniteInfo, FiniteSettings, Frame, StressMeasure, TangentMeasure};
use tancheck_models::finite::{finite_zoo, zoo_path, J2_PROPERTIES, ZOO_PROPERTIES};

use super::Row;

fn row(variant: &str, language: &'static str, expected: &str, r: &FiniteReport) -> Row {
    let found = r.finding.clone().unwrap_or_else(|| "none".into());
    let first = r.increments.iter().find(|i| !i.passed).map(|i| i.increment);
    Row::new(variant, language, expected, r.verdict, found, first)
}

/// The routine family of a compiled row: its properties, state size and frame.
#[derive(Clone, Copy)]
enum Family {
    NeoHookean,
    J2Log,
    Hypo,
}

impl Family {
    fn properties(self) -> &'static [f64] {
        match self {
            Family::J2Log => &J2_PROPERTIES,
            _ => &ZOO_PROPERTIES,
        }
    }
    fn nstate(self) -> usize {
        match self {
            Family::J2Log => 7,
            _ => 0,
        }
    }
    fn frame(self) -> Frame {
        match self {
            Family::Hypo => Frame::Jaumann,
            _ => Frame::None,
        }
    }
}

/// A compiled row: variant, C symbol, Fortran symbol, family, stress, tangent, expected finding.
type CompiledRow =
    (&'static str, &'static str, &'static str, Family, StressMeasure, TangentMeasure, &'static str);

/// The compiled rows: a correct routine per family and measure kind, and one flawed variant per
/// finite-strain cause, each in C and in Fortran.
const COMPILED_ROWS: [CompiledRow; 14] = {
    use Family::*;
    use StressMeasure::{Cauchy, Kirchhoff};
    use TangentMeasure::*;
    [
        ("nh-sigma-jaumann", "c_nh", "f_nh", NeoHookean, Cauchy, SigmaJaumann, "none"),
        ("nh-tau-truesdell", "c_nh", "f_nh", NeoHookean, Kirchhoff, TauTruesdell, "none"),
        ("j2-log-sigma-jaumann", "c_j2log", "f_j2log", J2Log, Cauchy, SigmaJaumann, "none"),
        ("j2-log-dp-df", "c_j2log", "f_j2log", J2Log, Kirchhoff, DpDf, "none"),
        ("j2-log-ds-de", "c_j2log", "f_j2log", J2Log, Cauchy, DsDe, "none"),
        ("j2-log-green-naghdi", "c_j2log", "f_j2log", J2Log, Kirchhoff, TauGreenNaghdi, "none"),
        ("hypo-jaumann", "c_hypo", "f_hypo", Hypo, Kirchhoff, TauJaumann, "none"),
        (
            "j2-log-material-as-spatial",
            "c_j2log_material_as_spatial",
            "f_j2log_material_as_spatial",
            J2Log,
            Kirchhoff,
            TauJaumann,
            "material-as-spatial",
        ),
        (
            "nh-truesdell-for-jaumann",
            "c_nh_truesdell_for_jaumann",
            "f_nh_truesdell_for_jaumann",
            NeoHookean,
            Kirchhoff,
            TauJaumann,
            "other-rate",
        ),
        (
            "j2-log-geometric-missing",
            "c_j2log_geometric_missing",
            "f_j2log_geometric_missing",
            J2Log,
            Kirchhoff,
            DpDf,
            "geometric-terms-missing",
        ),
        (
            "nh-missing-over-j",
            "c_nh_missing_over_j",
            "f_nh_missing_over_j",
            NeoHookean,
            Cauchy,
            SigmaJaumann,
            "missing-over-j",
        ),
        (
            "nh-extra-over-j",
            "c_nh_extra_over_j",
            "f_nh_extra_over_j",
            NeoHookean,
            Kirchhoff,
            TauJaumann,
            "extra-over-j",
        ),
        (
            "nh-cauchy-for-kirchhoff",
            "c_nh_cauchy_for_kirchhoff",
            "f_nh_cauchy_for_kirchhoff",
            NeoHookean,
            Kirchhoff,
            TauJaumann,
            "stress-measure",
        ),
        (
            "nh-kirchhoff-for-cauchy",
            "c_nh_kirchhoff_for_cauchy",
            "f_nh_kirchhoff_for_cauchy",
            NeoHookean,
            Cauchy,
            SigmaJaumann,
            "stress-measure",
        ),
    ]
};

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
    let c_sources =
        ["finite_nh.c", "finite_j2.c", "finite_hypo.c"].map(|f| root.join("fortran-shim/examples/c").join(f));
    let f_sources = ["finite_nh.F90", "finite_j2.F90", "finite_hypo.F90"]
        .map(|f| root.join("fortran-shim/examples/fortran").join(f));
    let mut libs = vec![("C", c_sources, "libfinite_c.so")];
    if fortran {
        libs.push(("Fortran", f_sources, "libfinite_f.so"));
    }
    for (language, sources, name) in libs {
        let out = dir.join(name);
        build_library(&BuildOptions::new(sources, &out))
            .with_context(|| format!("building the {language} finite-strain routines"))?;
        let lib = Library::open(&out)?;
        for (variant, c_symbol, f_symbol, family, stress, tangent, expected) in COMPILED_ROWS {
            let symbol = if language == "C" { c_symbol } else { f_symbol };
            let info = FiniteInfo {
                name: symbol.to_string(),
                stress,
                tangent,
                frame: family.frame(),
                nstate: family.nstate(),
                nproperties: family.properties().len(),
            };
            let mut r = lib.finite_routine(symbol, info)?;
            let state = vec![0.0; family.nstate()];
            let rep = run(&mut r, family.properties(), &state, &path, settings);
            rows.push(row(variant, language, expected, &rep));
        }
    }
    Ok(rows)
}
