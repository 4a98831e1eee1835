//! Loading a finite-strain routine from a library (through the guarded shim).

use std::path::Path as FsPath;

use anyhow::{anyhow, Result};
use tancheck_abi::Library;
use tancheck_core::finite::{FiniteInfo, FiniteRoutine};

use crate::cmd_finite::{Declared, FiniteManifest};
use crate::manifest::Guards;

/// The finite-strain routine `symbol` of `library`, with the measures the manifest declares.
pub fn open_library(
    m: &FiniteManifest,
    d: &Declared,
    library: &FsPath,
    symbol: &str,
    file: &str,
) -> Result<Box<dyn FiniteRoutine>> {
    let lib = Library::open(library).map_err(|e| anyhow!("{file}: {e}"))?;
    let info = FiniteInfo {
        name: format!("{}:{symbol}", library.display()),
        stress: d.stress,
        tangent: d.tangent,
        frame: d.frame,
        nstate: m.routine.states,
        nproperties: m.routine.properties.len(),
    };
    let mut r = lib.finite_routine(symbol, info).map_err(|e| anyhow!("{file}: {e}"))?;
    r.set_checks(m.guards != Guards::Off);
    Ok(Box::new(r))
}
