//! Selftest rows about conventions, in Rust, C and Fortran: a correct anisotropic routine
//! under the frame probe (skipped or passed, never failed), and a correct isotropic routine
//! declared in a wrong component order or shear measure (the check's warning and the
//! conventions probe must both name the routine's real reading).

use std::path::Path as FsPath;

use anyhow::{Context, Result};
use num_complex::Complex64;
use tancheck_abi::{build_library, BuildOptions, Library};
use tancheck_core::path::{Path, Shape};
use tancheck_core::probe::{run_suite, ProbeSpec, ProbeStatus};
use tancheck_core::{
    check, CallInput, CallOutput, Caller, ComplexRoutine, Convention, Fault, PointKind, PointState, Routine,
    RoutineInfo, ShearMeasure, Verdict,
};

use super::Row;

/// Demo orthotropic properties: a carbon/epoxy-like ply (E1, E2, E3, ν12, ν13, ν23, G12, G13,
/// G23) with material axes a1 = (1, 1, 0), a2 = (−1, 1, 0.5) at properties 9..15.
const ORTHO: [f64; 15] =
    [138000.0, 11000.0, 11000.0, 0.28, 0.28, 0.4, 5500.0, 5500.0, 3928.57, 1.0, 1.0, 0.0, -1.0, 1.0, 0.5];
/// Demo elastic properties [E, ν].
const ELASTIC: [f64; 2] = [70000.0, 0.33];

/// A routine presented under another declaration than its own: calls pass through unchanged,
/// as when a manifest declares the wrong order or shear measure.
struct Misdeclared<'a> {
    inner: &'a mut dyn Routine,
    info: RoutineInfo,
}

impl Routine for Misdeclared<'_> {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.inner.call(input, output)
    }
    tancheck_core::pass_on_to_inner!();
}

impl ComplexRoutine for Misdeclared<'_> {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.inner.complex().expect("checked").call_complex(input, output)
    }
}

/// The wrong declarations of the rows: (variant, declared order, declared shear). The routines
/// are in the default order 11 22 33 23 13 12 with engineering shear.
const WRONG: [(&str, [&str; 6], ShearMeasure); 2] = [
    ("elastic, wrong order", ["11", "22", "23", "33", "13", "12"], ShearMeasure::Engineering),
    ("elastic, wrong shear", ["11", "22", "33", "23", "13", "12"], ShearMeasure::Tensor),
];

/// What the routines really are.
const REAL: &str = "order 11 22 33 23 13 12 with engineering shear";

fn path() -> Path {
    Path::ramp(Shape::TensionShear, 2e-3, 4, 2)
}

/// The frame probe on a correct orthotropic routine, axes not declared.
fn frame_row(routine: &mut dyn Routine, language: &'static str) -> Result<Row> {
    let info = routine.info().clone();
    let mut caller = Caller::new(routine);
    let rep = run_suite(
        &mut caller,
        "frame",
        &[ProbeSpec::named("frame")],
        &ORTHO,
        &PointState::zero(&info, 20.0),
        &path(),
        &tancheck_core::Settings::default(),
    )
    .map_err(anyhow::Error::msg)?;
    let r = &rep.results[0];
    Ok(Row {
        variant: "orthotropic, frame probe".into(),
        language,
        expected: "skipped or pass".into(),
        verdict: if rep.pass { Verdict::Pass } else { Verdict::TangentFailure },
        found: format!("frame {}", r.status.word()),
        first_increment: r.increment,
        right: r.status != ProbeStatus::Fail,
    })
}

/// A correct elastic routine declared wrong: the check passes with a warning naming the real
/// reading, and the conventions probe fails naming it.
fn wrong_row(
    inner: &mut dyn Routine,
    language: &'static str,
    variant: &str,
    order: &[&str; 6],
    shear: ShearMeasure,
) -> Result<Row> {
    let declared = Convention::from_labels(PointKind::Solid3d, order, shear).map_err(anyhow::Error::msg)?;
    let info = RoutineInfo { convention: declared, ..inner.info().clone() };
    let mut r = Misdeclared { inner, info: info.clone() };
    let start = PointState::zero(&info, 20.0);
    let settings = tancheck_core::Settings::default();
    let report = {
        let mut caller = Caller::new(&mut r);
        check::run(&mut caller, &ELASTIC, start.clone(), &path(), &settings).map_err(anyhow::Error::msg)?
    };
    let warned = report.notes.iter().any(|n| n.contains("conventions warning") && n.contains(REAL));
    let mut caller = Caller::new(&mut r);
    let rep = run_suite(
        &mut caller,
        "conventions",
        &[ProbeSpec::named("conventions")],
        &ELASTIC,
        &start,
        &path(),
        &settings,
    )
    .map_err(anyhow::Error::msg)?;
    let p = &rep.results[0];
    let probed = p.status == ProbeStatus::Fail && p.summary.starts_with(&format!("behaves as {REAL}"));
    Ok(Row {
        variant: variant.into(),
        language,
        expected: "mismatch named".into(),
        verdict: report.verdict,
        found: match (warned, probed) {
            (true, true) => "mismatch named".into(),
            (true, false) => "probe missed it".into(),
            (false, true) => "check missed it".into(),
            (false, false) => "not named".into(),
        },
        first_increment: None,
        right: warned && probed && report.verdict == Verdict::Pass,
    })
}

/// The rows, for Rust, C and (when gfortran is there) Fortran; libraries go to `dir`.
pub(super) fn rows(dir: &FsPath, root: &FsPath, fortran: bool) -> Result<Vec<Row>> {
    let mut rows = Vec::new();
    let kind = PointKind::Solid3d;
    let mut ortho = tancheck_models::reference("orthotropic", kind)?;
    rows.push(frame_row(&mut ortho, "Rust")?);
    for (variant, order, shear) in WRONG {
        let mut elastic = tancheck_models::reference("elastic", kind)?;
        rows.push(wrong_row(&mut elastic, "Rust", variant, &order, shear)?);
    }
    let mut libs = vec![(
        "C",
        dir.join("libconventions_c.so"),
        ["fortran-shim/examples/c/elastic.c", "fortran-shim/examples/c/orthotropic.c"],
        ("c_elastic", "c_orthotropic"),
    )];
    if fortran {
        libs.push((
            "Fortran",
            dir.join("libconventions_f.so"),
            ["fortran-shim/examples/fortran/elastic.F90", "fortran-shim/examples/fortran/orthotropic.F90"],
            ("f_elastic", "f_orthotropic"),
        ));
    }
    for (language, lib_path, sources, (elastic, orthotropic)) in libs {
        build_library(&BuildOptions::new(sources.iter().map(|s| root.join(s)), &lib_path))
            .with_context(|| format!("building the {language} conventions rows"))?;
        let lib = Library::open(&lib_path)?;
        let info = tancheck_models::reference("orthotropic", kind)?.info().clone();
        let mut r = lib.routine(orthotropic, RoutineInfo { name: orthotropic.into(), ..info })?;
        rows.push(frame_row(&mut r, language)?);
        for (variant, order, shear) in WRONG {
            let info = tancheck_models::reference("elastic", kind)?.info().clone();
            let mut r = lib.routine(elastic, RoutineInfo { name: elastic.into(), ..info })?;
            rows.push(wrong_row(&mut r, language, variant, &order, shear)?);
        }
    }
    Ok(rows)
}
