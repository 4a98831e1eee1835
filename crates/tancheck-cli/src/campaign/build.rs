//! The libraries a campaign builds once before its items run: each is rebuilt only when its
//! sources changed (a stamp file beside it holds their SHA-256), written under a temporary
//! name and renamed into place, so shards that start together on a shared folder never load
//! half a library. A library with Fortran sources is skipped, and said so, when no Fortran
//! compiler runs; one whose sources do not compile makes its routines' items bad input, and
//! the others run.

use std::path::{Path as FsPath, PathBuf};

use anyhow::{Context, Result};

use super::file::{normalize, Campaign};
use super::stamp::sources_hash;

/// A library of the campaign, where it is, and whether it could be built.
#[derive(Clone, Debug)]
pub struct Built {
    /// Where the manifests name it (absolute, normalized): the campaign's `output`.
    pub declared: PathBuf,
    /// Where it was built (the same, or in `--build-dir`).
    pub actual: PathBuf,
    /// Why it was not built (no Fortran compiler), when it was not.
    pub skipped: Option<String>,
    /// The build's error when its sources did not compile: its routines' items are bad input
    /// with these words, and the other items run (one typo stopped the whole campaign before
    /// any item ran, with no report; a user-style sweep).
    pub failed: Option<String>,
}

fn is_fortran(p: &FsPath) -> bool {
    p.extension().and_then(|x| x.to_str()).is_some_and(|x| {
        matches!(x, "f" | "F" | "f90" | "F90" | "f95" | "F95" | "f03" | "F03" | "f08" | "F08" | "for")
    })
}

/// Build (or find up to date) every library of `c`; `build_dir` replaces the folder of each
/// output. `notes` gets a line per skipped library; builds are told on standard error.
pub fn build_all(
    c: &Campaign,
    build_dir: Option<&FsPath>,
    tell: bool,
    notes: &mut Vec<String>,
) -> Result<Vec<Built>> {
    let fortran = tancheck_abi::compile::fortran_available();
    let mut out = Vec::new();
    for (k, lib) in c.libraries.iter().enumerate() {
        let declared = normalize(&c.dir.join(&lib.output));
        let actual = match build_dir {
            Some(d) => normalize(&d.join(declared.file_name().unwrap_or_default())),
            None => declared.clone(),
        };
        let sources: Vec<PathBuf> = lib.sources.iter().map(|s| normalize(&c.dir.join(s))).collect();
        if !fortran && sources.iter().any(|s| is_fortran(s)) {
            let why = format!(
                "{} has Fortran sources and no Fortran compiler runs here (FC, default gfortran): its routines are skipped",
                lib.output
            );
            notes.push(why.clone());
            out.push(Built { declared, actual, skipped: Some(why), failed: None });
            continue;
        }
        let hash =
            sources_hash(&sources).with_context(|| format!("{}: libraries[{k}]", c.source.display()))?;
        let stamp = super::stamp::stamp_of(&actual);
        let fresh = actual.is_file() && std::fs::read_to_string(&stamp).is_ok_and(|s| s.trim() == hash);
        if fresh {
            if tell {
                crate::say!("tancheck: campaign library {}: up to date", lib.output);
            }
        } else {
            if let Some(d) = actual.parent() {
                std::fs::create_dir_all(d).with_context(|| format!("creating {}", d.display()))?;
            }
            let tmp = actual.with_file_name(format!(
                ".{}.tmp-{}.so",
                actual.file_name().unwrap_or_default().to_string_lossy(),
                std::process::id()
            ));
            // Only the sources are compiled; headers and include files are found beside them.
            let compiled: Vec<PathBuf> = sources
                .iter()
                .filter(|s| !s.extension().is_some_and(|x| x == "h" || x == "inc"))
                .cloned()
                .collect();
            let opts = tancheck_abi::compile::BuildOptions {
                sources: compiled,
                output: tmp.clone(),
                ..Default::default()
            };
            let built = tancheck_abi::compile::build_library(&opts)
                .with_context(|| format!("{}: libraries[{k}]: building {}", c.source.display(), lib.output));
            if let Err(e) = built {
                let _ = std::fs::remove_file(&tmp);
                let words = format!("{e:#}");
                if tell {
                    crate::say!("tancheck: campaign library {}: build failed: {words}", lib.output);
                }
                notes.push(format!(
                    "{} did not build (its routines' items are bad input, exit 2): {words}",
                    lib.output
                ));
                out.push(Built { declared, actual, skipped: None, failed: Some(words) });
                continue;
            }
            std::fs::rename(&tmp, &actual)
                .with_context(|| format!("moving the build to {}", actual.display()))?;
            crate::report::write_atomic(&stamp, hash.as_bytes())
                .with_context(|| format!("writing {}", stamp.display()))?;
            if tell {
                crate::say!("tancheck: campaign library {}: built", lib.output);
            }
        }
        out.push(Built { declared, actual, skipped: None, failed: None });
    }
    Ok(out)
}
