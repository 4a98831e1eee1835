//! The stamp of a campaign library's sources: their SHA-256, with the headers and include
//! files beside them and every file they include by name, so that a library is rebuilt when
//! anything it is compiled from changed.

use std::path::PathBuf;

use anyhow::{Context, Result};
use sha2::{Digest, Sha256};

/// The file beside a built library that holds the hash of what it was built from.
pub(super) fn stamp_of(library: &std::path::Path) -> PathBuf {
    library.with_extension("so.sources-sha256")
}

/// SHA-256 over the sources and the headers and include files beside them.
pub(super) fn sources_hash(sources: &[PathBuf]) -> Result<String> {
    let mut h = Sha256::new();
    for s in sources {
        h.update(s.display().to_string().as_bytes());
        h.update(std::fs::read(s).with_context(|| format!("reading {}", s.display()))?);
    }
    for p in &companions(sources) {
        h.update(p.display().to_string().as_bytes());
        h.update(std::fs::read(p).unwrap_or_default());
    }
    Ok(h.finalize().iter().map(|b| format!("{b:02x}")).collect())
}

/// The files a library is compiled from besides its sources: the headers and include files
/// beside them and every file they include by name, sorted. Inputs of a campaign too: a
/// report written over one was a lost header (a user-style sweep).
pub(super) fn companions(sources: &[PathBuf]) -> Vec<PathBuf> {
    let mut extra: Vec<PathBuf> = Vec::new();
    for s in sources {
        if let Some(folder) = s.parent() {
            for e in std::fs::read_dir(folder).into_iter().flatten().flatten() {
                let p = e.path();
                if p.extension().is_some_and(|x| x == "h" || x == "inc") && !extra.contains(&p) {
                    extra.push(p);
                }
            }
        }
    }
    // The files the sources include by name, wherever they are (a variant made as a wrapper
    // that defines a flag and includes the base source from another folder: editing the base
    // left the library "up to date" and the campaign reported the old flaw; a user-style
    // sweep), and the files those include.
    let mut queue: Vec<PathBuf> = sources.to_vec();
    while let Some(f) = queue.pop() {
        for inc in included(&f) {
            if !extra.contains(&inc) && !sources.contains(&inc) {
                extra.push(inc.clone());
                queue.push(inc);
            }
        }
    }
    extra.sort();
    extra.dedup();
    extra
}

/// The files `file` includes by a quoted name (`#include "x"`, and Fortran's `include 'x'`),
/// found beside it; names in angle brackets (the system's) and files not found are left out.
fn included(file: &std::path::Path) -> Vec<PathBuf> {
    let Ok(text) = std::fs::read_to_string(file) else { return Vec::new() };
    let dir = file.parent().unwrap_or(std::path::Path::new("."));
    let mut out = Vec::new();
    for line in text.lines() {
        let l = line.trim_start();
        let rest = if let Some(r) = l.strip_prefix('#') {
            r.trim_start().strip_prefix("include")
        } else if l.len() >= 7 && l[..7].eq_ignore_ascii_case("include") {
            Some(&l[7..])
        } else {
            None
        };
        let Some(rest) = rest.map(str::trim_start) else { continue };
        let Some(q) = rest.chars().next().filter(|c| *c == '"' || *c == '\'') else { continue };
        let Some(name) = rest[1..].split(q).next().filter(|n| !n.is_empty()) else { continue };
        // Canonical, so that one file reached by two relative names is hashed once.
        if let Ok(p) = std::fs::canonicalize(dir.join(name)) {
            if p.is_file() {
                out.push(p);
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    // A variant made as a wrapper that includes the base source from another folder: editing
    // the base changes the stamp (the library was "up to date" and the campaign reported the
    // old flaw; a user-style sweep); a system header in angle brackets is not followed.
    #[test]
    fn a_file_included_from_elsewhere_changes_the_stamp() {
        let d = std::env::temp_dir().join(format!("tancheck-stamp-{}", std::process::id()));
        let (base, variants) = (d.join("base"), d.join("variants"));
        std::fs::create_dir_all(&base).unwrap();
        std::fs::create_dir_all(&variants).unwrap();
        std::fs::write(base.join("law.F90"), "x = 1\n").unwrap();
        let wrapper = variants.join("flawed.F90");
        std::fs::write(&wrapper, "#define FLAW 1\n#include <stdio.h>\n#include \"../base/law.F90\"\n")
            .unwrap();
        let before = super::sources_hash(std::slice::from_ref(&wrapper)).unwrap();
        assert_eq!(before, super::sources_hash(std::slice::from_ref(&wrapper)).unwrap());
        std::fs::write(base.join("law.F90"), "x = 2\n").unwrap();
        assert_ne!(before, super::sources_hash(std::slice::from_ref(&wrapper)).unwrap());
        // Fortran's own include, quoted either way.
        std::fs::write(&wrapper, "      include 'inc/more.f'\n").unwrap();
        std::fs::create_dir_all(variants.join("inc")).unwrap();
        std::fs::write(variants.join("inc/more.f"), "a\n").unwrap();
        let one = super::sources_hash(std::slice::from_ref(&wrapper)).unwrap();
        std::fs::write(variants.join("inc/more.f"), "b\n").unwrap();
        assert_ne!(one, super::sources_hash(std::slice::from_ref(&wrapper)).unwrap());
        let _ = std::fs::remove_dir_all(&d);
    }
}
