//! The routine ABI's headers and Fortran modules as shipped inside tancheck, written into a
//! build directory (a fresh temporary one unless the caller names one).

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};

use crate::error::BuildError;

/// The routine ABI's files, as shipped with this tancheck.
pub(super) const SHIM_INCLUDE: [(&str, &str); 6] = [
    ("tancheck_routine.h", include_str!("../../../../fortran-shim/include/tancheck_routine.h")),
    ("tancheck_cstep.h", include_str!("../../../../fortran-shim/include/tancheck_cstep.h")),
    ("tancheck_finite.h", include_str!("../../../../fortran-shim/include/tancheck_finite.h")),
    ("tancheck_twin.inc", include_str!("../../../../fortran-shim/include/tancheck_twin.inc")),
    ("tancheck_block.h", include_str!("../../../../fortran-shim/include/tancheck_block.h")),
    ("tancheck_block_twin.inc", include_str!("../../../../fortran-shim/include/tancheck_block_twin.inc")),
];
/// The Fortran modules, in the order they must be compiled.
pub(super) const SHIM_MODULES: [(&str, &str); 4] = [
    ("tancheck_routine.f90", include_str!("../../../../fortran-shim/fortran/tancheck_routine.f90")),
    ("tancheck_cstep.f90", include_str!("../../../../fortran-shim/fortran/tancheck_cstep.f90")),
    ("tancheck_finite.f90", include_str!("../../../../fortran-shim/fortran/tancheck_finite.f90")),
    ("tancheck_block.f90", include_str!("../../../../fortran-shim/fortran/tancheck_block.f90")),
];
pub(super) const SHIM_MODULE_NAMES: [&str; 4] =
    ["tancheck_routine", "tancheck_cstep", "tancheck_finite", "tancheck_block"];

/// Write the routine ABI's headers (`tancheck_routine.h`, `tancheck_cstep.h`,
/// `tancheck_twin.inc`) and Fortran module sources into `dir`, for builds by hand.
pub fn write_shim_files(dir: &Path) -> Result<Vec<PathBuf>, BuildError> {
    std::fs::create_dir_all(dir).map_err(|source| BuildError::Io {
        action: "create the directory",
        path: dir.into(),
        source,
    })?;
    let mut written = Vec::new();
    for (name, text) in SHIM_INCLUDE.iter().chain(SHIM_MODULES.iter()) {
        let p = dir.join(name);
        std::fs::write(&p, text).map_err(|source| BuildError::Io {
            action: "write",
            path: p.clone(),
            source,
        })?;
        written.push(p);
    }
    Ok(written)
}

pub(super) static BUILD_COUNTER: AtomicUsize = AtomicUsize::new(0);

pub(super) fn fresh_build_dir() -> PathBuf {
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.subsec_nanos())
        .unwrap_or(0);
    std::env::temp_dir().join(format!(
        "tancheck-build-{}-{}-{nanos}",
        std::process::id(),
        BUILD_COUNTER.fetch_add(1, Ordering::Relaxed)
    ))
}

/// Removes a temporary build directory when the build ends, however it ends.
pub(super) struct Cleanup(pub(super) Option<PathBuf>);

impl Drop for Cleanup {
    fn drop(&mut self) {
        if let Some(d) = &self.0 {
            let _ = std::fs::remove_dir_all(d);
        }
    }
}
