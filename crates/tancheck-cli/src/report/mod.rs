//! Reporters: views of one [`Report`] for the terminal and as JSON.

use std::io::{self, Write};
use std::path::Path;

use tancheck_core::Report;

pub mod block;
pub mod json;
pub mod terminal;

/// A view of a report.
pub trait Reporter {
    fn write(&mut self, report: &Report, out: &mut dyn Write) -> io::Result<()>;
}

/// Write `bytes` to `path` atomically: a temporary file in the same folder, then a rename,
/// so an interrupted run never leaves a half-written report.
/// A SIGINT or SIGTERM while it is written removes the temporary file (see [`temporary_name`]).
pub fn write_atomic(path: &Path, bytes: &[u8]) -> io::Result<()> {
    let tmp = temporary_name(path);
    let result = (|| {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

/// The temporary name [`write_atomic`] writes `path` under before the rename: a hidden file
/// in the same folder, named after the process.
pub fn temporary_name(path: &Path) -> std::path::PathBuf {
    let dir = path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "report".into());
    dir.join(format!(".{name}.tmp-{}", std::process::id()))
}

/// Compact number for tables: 3 significant digits in exponent form.
pub(crate) fn sci(x: f64) -> String {
    if x == 0.0 {
        "0".into()
    } else if x.is_finite() {
        format!("{x:.2e}")
    } else {
        format!("{x}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_whole_files_and_leaves_no_temporary() {
        let dir = std::env::temp_dir().join(format!("tancheck-atomic-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("r.json");
        write_atomic(&p, b"first").unwrap();
        write_atomic(&p, b"second").unwrap();
        assert_eq!(std::fs::read(&p).unwrap(), b"second");
        let names: Vec<_> = std::fs::read_dir(&dir).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(names.len(), 1, "{names:?}");
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
