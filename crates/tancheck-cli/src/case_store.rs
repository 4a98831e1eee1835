//! Case files on disk and the routine they are about: open the routine a manifest names (a
//! built-in model or a loaded library) with the routine part of a case, name and write case
//! files. Shared by `tancheck bisect` and `tancheck explore` (write cases) and `tancheck replay`
//! (reads them).

use std::path::{Component as PathPart, Path as FsPath, PathBuf};

use anyhow::{bail, Context, Result};
use sha2::{Digest, Sha256};

use tancheck_abi::{GuardLevel, LibraryRoutine};
use tancheck_core::bisect::{self, Located};
use tancheck_core::case::{Case, CaseOrigin, CaseRoutine};
use tancheck_core::path::Path;
use tancheck_core::{Caller, PointState, Settings};
use tancheck_core::{ModelRoutine, Routine};
use tancheck_models::zoo::{zoo_model, ZooModel};

use crate::manifest::{Guards, Manifest};

/// A routine opened for a bisection or a replay: a built-in model (the zoo's variants
/// included) or a loaded library.
pub enum Opened {
    Model(Box<ModelRoutine<ZooModel>>),
    Library(Box<LibraryRoutine>),
}

impl Opened {
    pub fn routine(&mut self) -> &mut dyn Routine {
        match self {
            Opened::Model(m) => m.as_mut(),
            Opened::Library(l) => l.as_mut(),
        }
    }
}

/// SHA-256 of a file, as 64 hex digits.
pub fn sha256_file(path: &FsPath) -> std::io::Result<String> {
    let bytes = std::fs::read(path)?;
    Ok(Sha256::digest(&bytes).iter().map(|b| format!("{b:02x}")).collect())
}

pub fn sha256_text(text: &str) -> String {
    Sha256::digest(text.as_bytes()).iter().map(|b| format!("{b:02x}")).collect()
}

/// The routine a manifest names, and the routine part of a case about it (the library's
/// path absolute; [`write_case`] makes it relative to the case folder). Built-in models are
/// looked up among the zoo's, which include every reference model.
pub fn open_for_manifest(m: &Manifest, dir: &FsPath) -> Result<(Opened, CaseRoutine)> {
    let r = &m.routine;
    if let Some(name) = &r.model {
        let model = zoo_model(name, r.kind)?;
        let info = model.info().clone();
        let conv = m.convention().map_err(anyhow::Error::msg)?;
        if info.convention != conv {
            bail!(
                "the built-in model `{name}` works in the default component order with engineering shear; \
                 remove routine.order and routine.shear from the manifest"
            );
        }
        crate::load::check_model_sizes(name, r, &info)?;
        let mut spec = CaseRoutine::from_info(&info, true);
        spec.model = Some(name.clone());
        return Ok((Opened::Model(Box::new(model)), spec));
    }
    let loaded = crate::load::load(m, dir)?;
    let crate::load::Loaded::Library(mut lib) = loaded else {
        bail!("the manifest names a library, but a model was loaded");
    };
    let lib_path = r.library.as_ref().expect("validated: library or model");
    let lib_path = if lib_path.is_relative() { dir.join(lib_path) } else { lib_path.clone() };
    let lib_path = std::path::absolute(&lib_path).unwrap_or(lib_path);
    let mut spec = CaseRoutine::from_info(lib.info(), lib.has_twin());
    spec.library = Some(lib_path.display().to_string());
    spec.library_sha256 =
        Some(sha256_file(&lib_path).with_context(|| format!("reading {} to hash it", lib_path.display()))?);
    spec.symbol = r.symbol.clone();
    // As the routine runs (a library built with --debug switches the traps on itself).
    spec.fp_traps = lib.fp_traps();
    if m.guards == Guards::Off {
        lib.set_guard_level(GuardLevel::Off);
    }
    Ok((Opened::Library(lib), spec))
}

/// `target` relative to the folder `base` when they share more than the root, else `target`.
pub fn relative_to(target: &FsPath, base: &FsPath) -> PathBuf {
    let (Ok(t), Ok(b)) = (target.canonicalize(), base.canonicalize()) else { return target.to_path_buf() };
    let tc: Vec<PathPart> = t.components().collect();
    let bc: Vec<PathPart> = b.components().collect();
    let common = tc.iter().zip(&bc).take_while(|(x, y)| x == y).count();
    if common <= 1 {
        return t;
    }
    let mut out = PathBuf::new();
    for _ in common..bc.len() {
        out.push("..");
    }
    for p in &tc[common..] {
        out.push(p);
    }
    out
}

/// A routine's name as the start of a file name: letters, digits, `-` and `_` kept, every
/// other character a `-`, none at either end.
pub fn file_stem_of(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() || c == '-' || c == '_' { c } else { '-' })
        .collect();
    s.trim_matches('-').to_string()
}

/// A file name for a case: the routine's name, the increment, and 12 hex digits of a hash of
/// the call's bits (the same call gives the same name, so writing it again replaces it).
pub fn case_file_name(case: &Case) -> String {
    let name = file_stem_of(&case.routine.name);
    let c = &case.call;
    let key = format!(
        "{:?}{:?}{:?}{:?}{:?}{:?}{:?}{:?}{}",
        c.props.bits,
        c.strain.bits,
        c.dstrain.bits,
        c.stress0.bits,
        c.state0.bits,
        c.temp.bits,
        c.time.bits,
        case.routine.symbol,
        c.increment
    );
    format!("{}-inc{}-{}.json", name, c.increment, &sha256_text(&key)[..12])
}

/// Write `case` into `dir` (created when missing), the library path made relative to `dir`.
pub fn write_case(dir: &FsPath, case: &Case) -> Result<PathBuf> {
    std::fs::create_dir_all(dir).with_context(|| format!("creating the case folder {}", dir.display()))?;
    let mut case = case.clone();
    if let Some(lib) = case.routine.library.clone() {
        case.routine.library = Some(relative_to(FsPath::new(&lib), dir).display().to_string());
        case.routine.library_absolute = Some(lib);
    }
    let file = dir.join(case_file_name(&case));
    crate::report::write_atomic(&file, case.to_json().as_bytes())
        .with_context(|| format!("writing the case {}", file.display()))?;
    Ok(file)
}

/// The options of the commands that look for failures along a manifest's paths and keep them
/// as case files (`bisect`, `explore`): declared once so both take them alike.
#[derive(clap::Args, Debug)]
pub struct CaseRunArgs {
    /// Folder for the case files (default: tancheck-cases/<manifest name>/ next to the manifest,
    /// the folder `check --cases` replays).
    #[arg(long, value_name = "DIR")]
    pub case_dir: Option<PathBuf>,
    /// Write the report as JSON to FILE (`-` for standard output, replacing the readable one).
    #[arg(long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    /// Switch floating-point traps (invalid, division by zero, overflow) on inside the routine.
    #[arg(long)]
    pub fp_traps: bool,
    #[command(flatten)]
    pub output: crate::session::OutputArgs,
}

impl CaseRunArgs {
    /// The folder for the case files: --case-dir, else [`default_case_dir`] of `manifest`.
    pub fn case_dir_of(&self, manifest: &FsPath, dir: &FsPath) -> PathBuf {
        self.case_dir.clone().unwrap_or_else(|| default_case_dir(manifest, dir))
    }
}

/// The default case folder of a manifest: `tancheck-cases/<manifest file name without
/// extension>/` in the manifest's folder `dir`, so the cases of manifests side by side (one
/// routine each) never mix.
/// The files of the case folder `check --cases [DIR]` replays (`cases`: the option as given;
/// without DIR the manifest's own folder), for the check that no report is written over one
/// (a report named one replaced it before it was read; a user-style sweep).
pub fn case_files_of(manifest: &FsPath, cases: Option<&Option<PathBuf>>) -> Vec<PathBuf> {
    let Some(c) = cases else { return Vec::new() };
    let folder =
        c.clone().unwrap_or_else(|| default_case_dir(manifest, manifest.parent().unwrap_or(FsPath::new(""))));
    std::fs::read_dir(folder)
        .map(|d| d.filter_map(|e| e.ok().map(|e| e.path())).collect())
        .unwrap_or_default()
}

pub fn default_case_dir(manifest: &FsPath, dir: &FsPath) -> PathBuf {
    let stem =
        manifest.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| "manifest".into());
    dir.join("tancheck-cases").join(stem)
}

/// The routine part of a case about the routine a manifest names (to pick its cases out of
/// a folder).
pub fn case_routine_of(m: &Manifest, dir: &FsPath) -> Result<CaseRoutine> {
    open_for_manifest(m, dir).map(|(_, spec)| spec)
}

/// The case of the located increment of `path` (from `start`): walk there, check the call
/// with the full settings (diagnosis included), capture it. A call that passes when checked
/// again on its own adds a warning (`tancheck bisect` and `tancheck explore` both write cases).
#[allow(clippy::too_many_arguments)]
pub fn capture(
    caller: &mut Caller<'_>,
    spec: &CaseRoutine,
    props: &[f64],
    start: &PointState,
    path: &Path,
    located: &Located,
    settings: &Settings,
    manifest: &FsPath,
    shrunk_from: Option<usize>,
    warnings: &mut Vec<String>,
) -> Result<Case> {
    let index = located.increment;
    let (mut driver, previous) =
        bisect::driver_at(caller, props, start.clone(), path, index, settings).map_err(anyhow::Error::msg)?;
    // The call made again is a run of its own: a guard that found the fault in the check
    // finds it again here (it reports a finding once per run).
    caller.forget_guard_findings();
    let judged = tancheck_core::call_check::check_call(&mut driver, caller, settings, previous.as_deref());
    let faulted = located.finding == tancheck_core::call_check::FAULT_FINDING;
    let passed_again = judged.as_ref().is_ok_and(|c| c.passed());
    if passed_again && faulted {
        // The guards forgot their findings before the call made again, so a memory fault
        // shows again; one that does not was found by the full guards of a branch's first
        // call (the call made again has the run's level), or the routine does not repeat itself.
        warnings.push(format!(
            "increment {index} faulted in the check, and its call made again on its own did not (a fault \
             found by the full guards of a branch's first call, or a routine that does not repeat its \
             results; `tancheck replay` of the case makes the call again)"
        ));
    } else if passed_again {
        warnings.push(format!(
            "increment {index} passed when checked again on its own: the routine does not repeat its results \
             (hidden state between calls?)"
        ));
    }
    let prefix = Path { name: path.name.clone(), increments: path.increments[..index].to_vec() };
    let origin = CaseOrigin {
        manifest: Some(manifest.display().to_string()),
        path: path.name.clone(),
        increment: index,
        of: path.increments.len(),
        branch: located.branch.clone(),
        crossing: CaseOrigin::crossing_of(&located.inside),
        shrunk_from,
    };
    let mut case = Case::capture(
        spec.clone(),
        &driver,
        judged.as_ref(),
        previous.as_deref(),
        settings,
        origin,
        Some((start, &prefix)),
    );
    // The case records what the check found at the increment.
    if faulted && case.probe.pass {
        case.probe.pass = false;
        case.probe.finding = tancheck_core::call_check::FAULT_FINDING.to_string();
        case.probe.reason = Some("the increment faulted in the check (see its report)".into());
    }
    Ok(case)
}
