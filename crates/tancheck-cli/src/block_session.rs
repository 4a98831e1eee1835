//! One session with a block routine: load the block routine a manifest names (a library's
//! symbol or a built-in block model), run the block checks along the path, and compare with
//! the point counterpart the manifest names.

use std::path::Path as FsPath;

use anyhow::{bail, Context, Result};
use tancheck_abi::{GuardLevel, Library};
use tancheck_core::block::{self, BlockInfo, BlockReport, BlockRoutine};
use tancheck_core::path::Path;
use tancheck_core::{Routine, RoutineInfo};

use crate::block_manifest::settings;
use crate::manifest::{Guards, Manifest};
use crate::report::Reporter;
use crate::session::OutputArgs;

/// Whether the manifest names a block routine.
pub fn is_block(m: &Manifest) -> bool {
    m.routine.interface == crate::block_manifest::Interface::Block
}

fn library_path(m: &Manifest, dir: &FsPath) -> Option<std::path::PathBuf> {
    m.routine.library.as_ref().map(|l| if l.is_relative() { dir.join(l) } else { l.clone() })
}

/// The block routine of a manifest.
pub fn load_block(m: &Manifest, dir: &FsPath) -> Result<Box<dyn BlockRoutine>> {
    let r = &m.routine;
    let ncomp = m.convention().map_err(anyhow::Error::msg)?.ncomp();
    if let Some(name) = &r.model {
        let Some(model) = tancheck_models::block::by_name(name, r.kind) else {
            bail!(
                "no built-in block model is called `{name}`; the block models are {}",
                tancheck_models::block::NAMES.join(", ")
            );
        };
        let model = model?;
        if r.properties.len() != model.info().nproperties {
            bail!(
                "the block model `{name}` takes {} properties; the manifest gives {}",
                model.info().nproperties,
                r.properties.len()
            );
        }
        return Ok(model);
    }
    let lib_path = library_path(m, dir).expect("validated: library or model");
    let symbol = r.symbol.as_ref().expect("validated: symbol with library");
    let lib = Library::open(&lib_path)?;
    let info = BlockInfo {
        name: format!("{}:{symbol}", lib_path.file_name().map(|f| f.to_string_lossy()).unwrap_or_default()),
        ncomp,
        nstate: r.states.expect("validated: states with library"),
        nproperties: r.properties.len(),
    };
    let mut routine = lib.block_routine(symbol, info)?;
    if crate::load::traps_wanted(&lib, m.fp_traps, &lib_path, true) {
        routine.set_fp_traps(true).context("switching floating-point traps on")?;
    }
    routine.set_guard_level(match m.guards {
        Guards::Off => GuardLevel::Off,
        Guards::Light => GuardLevel::Light,
        Guards::Full => GuardLevel::Full,
    });
    Ok(Box::new(routine))
}

/// The point counterpart of a manifest's block section, if it names one.
fn load_counterpart(m: &Manifest, dir: &FsPath, nstate: usize) -> Result<Option<(Box<dyn Routine>, f64)>> {
    let Some(c) = m.block.as_ref().and_then(|b| b.counterpart.as_ref()) else { return Ok(None) };
    let conv = m.convention().map_err(anyhow::Error::msg)?;
    if let Some(model) = &c.model {
        let r = tancheck_models::zoo::zoo_model(model, m.routine.kind)?;
        return Ok(Some((Box::new(r), c.tolerance)));
    }
    let Some(lib_path) = library_path(m, dir) else {
        bail!("block.counterpart.symbol needs the block routine's library; a built-in block model takes counterpart.model");
    };
    let symbol = c.symbol.as_ref().expect("validated: symbol or model");
    let lib = Library::open(&lib_path)?;
    let info =
        RoutineInfo { name: symbol.clone(), convention: conv, nstate, nprop: m.routine.properties.len() };
    let point = lib.routine(symbol, info).map_err(|e| anyhow::anyhow!("block.counterpart.symbol: {e}"))?;
    Ok(Some((Box::new(point), c.tolerance)))
}

/// `path` with a plane-strain point's ε33 left out, and the note saying so; `(None, None)`
/// when nothing is left out.
fn plane_strain_path(kind: tancheck_core::PointKind, path: &Path) -> (Option<Path>, Option<String>) {
    let first = path.increments.iter().position(|inc| inc.dstrain[2] != 0.0);
    match first {
        Some(at) if kind == tancheck_core::PointKind::PlaneStrain => {
            let mut p = path.clone();
            for inc in &mut p.increments {
                inc.dstrain[2] = 0.0;
            }
            let note = format!(
                "the path's strain increments have entries in slot 33 (first at increment {}); a plane-strain \
                 point's ε33 stays 0 and σ33 is the reaction to it: they were left out",
                at + 1
            );
            (Some(p), Some(note))
        }
        _ => (None, None),
    }
}

/// Load and check the block routine a manifest names.
pub fn run_block_manifest(m: &Manifest, dir: &FsPath, path: &Path) -> Result<BlockReport> {
    let mut routine = load_block(m, dir)?;
    let nstate = routine.info().nstate;
    let state0 = match &m.start.state {
        Some(s) if s.len() != nstate => {
            bail!("start.state has {} entries; the routine needs {nstate}", s.len())
        }
        Some(s) => s.clone(),
        None => vec![0.0; nstate],
    };
    if m.start.strain.is_some() || m.start.stress.is_some() {
        bail!("a block routine starts from zero strain and stress: leave start.strain and start.stress out");
    }
    let spec = m.block.as_ref().expect("validated: block section with interface block");
    if let Some(&i) = spec.damage.iter().find(|&&i| i >= nstate) {
        bail!(
            "block.damage names state[{i}]; the routine has {nstate} state variables (indices from 0 to {})",
            nstate.saturating_sub(1)
        );
    }
    let s = settings(spec, m.start.temperature, state0);
    // A plane-strain point's ε33 stays 0, as at a point routine (`PointKind::path_slots`): a
    // path's ε33 is left out, with a note.
    let (kept, left_out) = plane_strain_path(m.routine.kind, path);
    let path = kept.as_ref().unwrap_or(path);
    // The counterpart is loaded, and its sizes compared, before any check runs: sizes that do
    // not fit are bad input (they were a finding, exit 1, after the whole check; a user-style
    // sweep).
    let counterpart = load_counterpart(m, dir, nstate)?;
    if let Some((point, _)) = &counterpart {
        let (pi, bi) = (point.info(), routine.info());
        if pi.convention.ncomp() != bi.ncomp || pi.nstate != nstate || pi.nprop != m.routine.properties.len()
        {
            bail!(
                "block.counterpart: {} has {} components, {} state variables and {} properties; the block \
                 routine {}, {} and {}: a counterpart takes the block routine's state variables and \
                 properties, in the same order",
                pi.name,
                pi.convention.ncomp(),
                pi.nstate,
                pi.nprop,
                bi.ncomp,
                nstate,
                m.routine.properties.len()
            );
        }
    }
    crate::survive::checking(true);
    let report = block::run(routine.as_mut(), &m.routine.properties, path, &s).map_err(anyhow::Error::msg);
    let mut report = match report {
        Ok(r) => r,
        Err(e) => {
            crate::survive::checking(false);
            return Err(e);
        }
    };
    report.notes.splice(0..0, left_out);
    if let Some((mut point, tol)) = counterpart {
        let incs = block::block_increments(path, routine.info().ncomp).map_err(anyhow::Error::msg)?;
        block::counterpart::check(
            routine.as_mut(),
            point.as_mut(),
            &m.routine.properties,
            path,
            &incs,
            &s,
            tol,
            &mut report,
        );
    }
    crate::survive::checking(false);
    Ok(report)
}

/// `check` and `probe` of a block manifest: the block checks, through the command's reporters
/// (terminal, `--json`, `--html`, `--junit`, `-q`, `--color`); the exit code.
/// The default path of a block routine: the point check's (its entries in slots the kind
/// does not have left out, as for a point routine; a plane-strain block routine was refused
/// its default path, naming increments its manifest never gave; a user-style sweep).
pub fn default_block_path(kind: tancheck_core::PointKind) -> Path {
    crate::session::default_path(kind)
}

pub fn check_block_command(
    m: &Manifest,
    dir: &FsPath,
    file: &str,
    path: Option<Path>,
    output: &OutputArgs,
    json: Option<&FsPath>,
) -> Result<i32> {
    let path = match path {
        Some(p) => p,
        None => m.path_or(default_block_path(m.routine.kind)).map_err(|e| anyhow::anyhow!("{file}: {e}"))?,
    };
    let report =
        run_block_manifest(m, dir, &path).with_context(|| format!("checking the block routine of {file}"))?;
    let mut reporters = crate::session::reporters(output, json);
    reporters.block(&report)?;
    reporters.finish()?;
    Ok(report.exit_code())
}
