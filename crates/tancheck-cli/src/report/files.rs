//! The thin adapter between the commands and the file reporters (HTML, JUnit): check the
//! output folder before the work starts, and write a rendered report atomically, naming the
//! file in any error.

use std::path::Path;

use anyhow::{bail, Context, Result};

use super::write_atomic;

/// Fail early (before a routine is run) when the folder of an output file does not exist, so
/// that no work is lost to a mistyped path.
pub fn check_output(path: Option<&Path>, option: &str) -> Result<()> {
    let Some(p) = path else { return Ok(()) };
    if p.as_os_str().is_empty() {
        bail!("{option} needs a file name");
    }
    let dir = p.parent().filter(|d| !d.as_os_str().is_empty()).unwrap_or(Path::new("."));
    if !dir.is_dir() {
        bail!("{option} {}: the folder {} does not exist", p.display(), dir.display());
    }
    if p.is_dir() {
        bail!("{option} {}: is a folder, not a file", p.display());
    }
    Ok(())
}

/// Write `text` to `path` (atomically) when a path was given; `what` names the report in an
/// error, e.g. "the HTML report".
pub fn write_report(
    path: Option<&Path>,
    what: &str,
    text: impl FnOnce() -> std::io::Result<String>,
) -> Result<()> {
    let Some(p) = path else { return Ok(()) };
    let text = text().with_context(|| format!("rendering {what}"))?;
    write_atomic(p, text.as_bytes()).with_context(|| format!("writing {what} to {}", p.display()))
}
