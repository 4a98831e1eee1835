//! Loading a finite-strain routine from a library (through the guarded shim).

use std::path::Path as FsPath;

use anyhow::{bail, Result};
use tancheck_core::finite::FiniteRoutine;

use crate::cmd_finite::{Declared, FiniteManifest};

/// The finite-strain routine `symbol` of `library`.
pub fn open_library(
    _m: &FiniteManifest,
    _d: &Declared,
    library: &FsPath,
    symbol: &str,
    file: &str,
) -> Result<Box<dyn FiniteRoutine>> {
    bail!("{file}: loading the finite-strain routine {symbol} from {} is not built yet", library.display())
}
