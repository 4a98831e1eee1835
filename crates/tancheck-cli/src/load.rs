//! Turning a manifest into a routine to check: a built-in model or a loaded library.

use std::path::Path as FsPath;

use anyhow::{bail, Context, Result};
use tancheck_abi::{Library, LibraryRoutine};
use tancheck_core::{PointState, Routine, RoutineInfo};

use crate::manifest::{Manifest, RoutineSpec};

/// A routine named by a manifest.
pub enum Loaded {
    Model(Box<dyn Routine>),
    Library(Box<LibraryRoutine>),
}

impl Loaded {
    pub fn routine(&mut self) -> &mut dyn Routine {
        match self {
            Loaded::Model(m) => m.as_mut(),
            Loaded::Library(l) => l.as_mut(),
        }
    }
}

/// Load what the manifest names. `dir` is the manifest's folder (relative library paths).
pub fn load(m: &Manifest, dir: &FsPath) -> Result<Loaded> {
    load_with(m, dir, false)
}

/// [`load`] again, for a check made anew: a library is loaded as a new instance
/// ([`Library::open_fresh`]: its static and SAVE variables as at load, whatever the calls
/// made to the instance loaded first), and the notes printed on the first load are not
/// printed again. A built-in model is made anew.
pub fn load_fresh(m: &Manifest, dir: &FsPath) -> Result<Loaded> {
    load_with(m, dir, true)
}

fn load_with(m: &Manifest, dir: &FsPath, fresh: bool) -> Result<Loaded> {
    let r = &m.routine;
    let conv = m.convention().map_err(anyhow::Error::msg)?;
    if let Some(name) = &r.model {
        let model = tancheck_models::zoo::zoo_model(name, r.kind)?;
        let info = model.info().clone();
        check_model_sizes(name, r, &info)?;
        // A built-in model in another component order or shear measure is presented in it.
        if info.convention != conv {
            let relabelled = tancheck_core::relabel::Relabel::new(model, conv).map_err(anyhow::Error::msg)?;
            return Ok(Loaded::Model(Box::new(relabelled)));
        }
        return Ok(Loaded::Model(Box::new(model)));
    }
    let lib_path = r.library.as_ref().expect("validated: library or model");
    let lib_path = if lib_path.is_relative() { dir.join(lib_path) } else { lib_path.clone() };
    let symbol = r.symbol.as_ref().expect("validated: symbol with library");
    let lib = if fresh { Library::open_fresh(&lib_path)? } else { Library::open(&lib_path)? };
    let info = RoutineInfo {
        name: format!("{}:{symbol}", lib_path.file_name().map(|f| f.to_string_lossy()).unwrap_or_default()),
        convention: conv,
        nstate: r.states.expect("validated: states with library"),
        nprop: r.properties.len(),
    };
    let mut routine = lib.routine(symbol, info)?;
    if traps_wanted(&lib, m.fp_traps, &lib_path, !fresh) {
        routine.set_fp_traps(true).context("switching floating-point traps on")?;
    }
    routine.set_guard_level(match m.guards {
        crate::manifest::Guards::Off => tancheck_abi::GuardLevel::Off,
        crate::manifest::Guards::Light => tancheck_abi::GuardLevel::Light,
        crate::manifest::Guards::Full => tancheck_abi::GuardLevel::Full,
    });
    Ok(Loaded::Library(Box::new(routine)))
}

/// The start state from the manifest (zero where it says nothing).
pub fn start_state(m: &Manifest, info: &RoutineInfo) -> Result<PointState> {
    let mut s = PointState::zero(info, m.start.temperature);
    let n = info.convention.ncomp();
    for (what, given, want, dst) in [
        ("start.strain", &m.start.strain, n, &mut s.strain),
        ("start.stress", &m.start.stress, n, &mut s.stress),
        ("start.state", &m.start.state, info.nstate, &mut s.state),
    ] {
        if let Some(v) = given {
            if v.len() != want {
                bail!("{what} has {} entries; the routine needs {want}", v.len());
            }
            dst.copy_from_slice(v);
        }
    }
    Ok(s)
}

/// The manifest's property count and state count (when given) against the built-in model
/// `name`'s own, for every command that opens a model from a manifest.
pub fn check_model_sizes(name: &str, r: &RoutineSpec, info: &RoutineInfo) -> Result<()> {
    if r.properties.len() != info.nprop {
        bail!(
            "the model `{name}` takes {} properties; the manifest gives {}",
            info.nprop,
            r.properties.len()
        );
    }
    if let Some(n) = r.states {
        if n != info.nstate {
            bail!("the model `{name}` has {} state variables; the manifest says {n}", info.nstate);
        }
    }
    Ok(())
}

/// Whether a library routine gets floating-point traps: asked for (`fp_traps`, `--fp-traps`),
/// or built with `tancheck build --debug` (which asks for them; in a library only the caller
/// can set them) on a machine that can trap. `say` tells the note of a debug build (once, on
/// the first load). The point, block and finite-strain loads share it (a `--debug` library got
/// no traps in a finite-strain check; a user-style sweep).
pub fn traps_wanted(lib: &Library, asked: bool, lib_path: &std::path::Path, say: bool) -> bool {
    if asked {
        return true;
    }
    if !lib.has_symbol(tancheck_abi::DEBUG_MARKER) {
        return false;
    }
    let traps = tancheck_abi::signal_guard::fp_traps_available();
    if say {
        if traps {
            crate::say!(
                "tancheck: note: floating-point traps on (invalid, division by zero, overflow): {} was built with --debug",
                lib_path.display()
            );
        } else {
            crate::say!(
                "tancheck: note: {} was built with --debug, but this machine cannot trap floating-point exceptions",
                lib_path.display()
            );
        }
    }
    traps
}
