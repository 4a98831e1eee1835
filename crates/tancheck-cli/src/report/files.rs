//! The thin adapter between the commands and the file reporters (HTML, JUnit): check the
//! output folder before the work starts, and write a rendered report atomically, naming the
//! file in any error.

use std::path::Path;

use anyhow::{bail, Context, Result};

use super::write_atomic;

/// Fail early (before a routine is run) when an output file could not be written at the
/// end, so that no work is lost to a mistyped path: its folder is missing or is a file, it
/// is a folder itself, or the report's temporary file cannot be made beside it (a read-only
/// folder or file system). A device or pipe is written in place and needs none of that.
pub fn check_output(path: Option<&Path>, option: &str) -> Result<()> {
    let Some(p) = path else { return Ok(()) };
    if p.as_os_str().is_empty() {
        bail!("{option} needs a file name");
    }
    let target = match super::destination(p) {
        super::Destination::Stream(_) => return Ok(()),
        super::Destination::Replace(t) => t,
    };
    let dir = target.parent().filter(|d| !d.as_os_str().is_empty()).unwrap_or(Path::new("."));
    if dir.exists() && !dir.is_dir() {
        bail!("{option} {}: {} is a file, not a folder", p.display(), dir.display());
    }
    if !dir.is_dir() {
        bail!("{option} {}: the folder {} does not exist", p.display(), dir.display());
    }
    if target.is_dir() {
        bail!("{option} {}: is a folder, not a file", p.display());
    }
    // The temporary name the report is written under, made and removed at once.
    let probe = super::temporary_name(&target);
    match std::fs::OpenOptions::new().write(true).create_new(true).open(&probe) {
        Ok(_) => {
            let _ = std::fs::remove_file(&probe);
        }
        // Another run of this process's id left it: the folder is writable.
        Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {}
        Err(e) => bail!("{option} {}: cannot write in the folder {} ({e})", p.display(), dir.display()),
    }
    Ok(())
}

/// The file a report at `path` would replace, as one name for one file: the canonical path
/// of the file, or of its folder joined with its name when it does not exist yet; `None` for
/// standard output and for a device or pipe (written in place, shared harmlessly).
fn identity(path: &Path) -> Option<std::path::PathBuf> {
    if path.as_os_str() == "-" {
        return None;
    }
    match super::destination(path) {
        super::Destination::Stream(_) => None,
        super::Destination::Replace(t) => std::fs::canonicalize(&t).ok().or_else(|| {
            let dir = t.parent().filter(|d| !d.as_os_str().is_empty()).unwrap_or(Path::new("."));
            Some(std::fs::canonicalize(dir).ok()?.join(t.file_name()?))
        }),
    }
}

/// Every report file given in `outputs` (option, path) names a file of its own, and none
/// names one of `inputs`: otherwise one report would overwrite another, or the run's own
/// input, and it is refused before anything is written.
pub fn distinct(outputs: &[(&str, Option<&Path>)], inputs: &[&Path]) -> Result<()> {
    // A name for a descriptor of this process: tancheck keeps its own standard output apart
    // from the routine's (descriptor 1 goes to standard error around calls), and a report
    // renamed onto such a name would replace the name itself.
    for (o, p) in outputs.iter().filter_map(|&(o, p)| p.map(|p| (o, p))) {
        let s = p.to_string_lossy();
        if ["/dev/stdout", "/dev/stderr", "/dev/stdin"].contains(&s.as_ref())
            || s.starts_with("/dev/fd/")
            || (s.starts_with("/proc/") && s.contains("/fd/"))
        {
            bail!("{o} {s}: names a descriptor of this process; write `-` for standard output");
        }
    }
    let named: Vec<(&str, &Path, std::path::PathBuf)> =
        outputs.iter().filter_map(|&(o, p)| p.and_then(|p| identity(p).map(|id| (o, p, id)))).collect();
    for (k, (o, p, id)) in named.iter().enumerate() {
        if let Some((o2, _, _)) = named[..k].iter().find(|(_, _, other)| other == id) {
            bail!("{o2} and {o} name the same file {}: each report needs a file of its own", p.display());
        }
        // An input that does not exist yet (a library a campaign is to build) is named as a
        // report's file is: its folder's canonical path joined with its name.
        if let Some(input) = inputs.iter().find(|i| identity(i).is_some_and(|c| &c == id)) {
            bail!(
                "{o} {}: is {}, an input of this run; the report would overwrite it",
                p.display(),
                input.display()
            );
        }
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_output_that_could_not_be_written_is_refused_before_the_work() {
        let d = std::env::temp_dir().join(format!("tancheck-files-{}", std::process::id()));
        std::fs::create_dir_all(&d).unwrap();
        let file = d.join("c.json");
        std::fs::write(&file, "{}").unwrap();
        // A file where the folder should be: named as a file, not as a missing folder.
        let e = check_output(Some(&file.join("x.json")), "--json").unwrap_err().to_string();
        assert!(e.contains("is a file, not a folder"), "{e}");
        // A missing folder, and a folder given as the file.
        let e = check_output(Some(&d.join("no/x.json")), "--html").unwrap_err().to_string();
        assert!(e.contains("does not exist"), "{e}");
        let e = check_output(Some(&d), "--junit").unwrap_err().to_string();
        assert!(e.contains("is a folder"), "{e}");
        // A writable folder passes and is left as it was; so does a device, written in place.
        check_output(Some(&d.join("r.json")), "--json").unwrap();
        assert_eq!(std::fs::read_dir(&d).unwrap().count(), 1);
        check_output(Some(Path::new("/dev/null")), "--json").unwrap();
        // A folder nothing can be created in (procfs refuses new files, even to root).
        #[cfg(target_os = "linux")]
        {
            let e = check_output(Some(Path::new("/proc/tancheck-report.json")), "--json")
                .unwrap_err()
                .to_string();
            assert!(e.contains("cannot write in the folder /proc"), "{e}");
        }
        std::fs::remove_dir_all(&d).unwrap();
    }
}
