//! Which language a source is in, and the order Fortran sources must be compiled in (after the
//! sources that define the modules they use).

use std::path::{Path, PathBuf};

use super::shim_files::SHIM_MODULE_NAMES;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Language {
    C,
    Fortran,
}

impl Language {
    pub(super) fn of(path: &Path) -> Option<Language> {
        let ext = path.extension()?.to_str()?;
        match ext.to_ascii_lowercase().as_str() {
            "c" => Some(Language::C),
            "f" | "f90" | "f95" | "f03" | "f08" => Some(Language::Fortran),
            _ => None,
        }
    }
}

/// Modules a Fortran source defines and uses (lower case), by a line scan that ignores
/// comments and continuation subtleties; good enough to order sources.
pub(super) fn fortran_modules(path: &Path) -> (Vec<String>, Vec<String>) {
    let Ok(text) = std::fs::read_to_string(path) else { return (Vec::new(), Vec::new()) };
    let mut defines = Vec::new();
    let mut uses = Vec::new();
    for raw in text.lines() {
        let line = raw.split('!').next().unwrap_or("").trim().to_ascii_lowercase();
        let mut words =
            line.split(|c: char| c.is_whitespace() || c == ',' || c == ':').filter(|w| !w.is_empty());
        match words.next() {
            Some("module") => {
                if let Some(name) = words.next() {
                    if !matches!(name, "procedure" | "function" | "subroutine")
                        && name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_')
                    {
                        defines.push(name.to_string());
                    }
                }
            }
            Some("use") => {
                let rest: Vec<&str> = words.collect();
                let (intrinsic, name) = match rest.as_slice() {
                    ["intrinsic", name, ..] => (true, Some(*name)),
                    ["non_intrinsic", name, ..] => (false, Some(*name)),
                    [name, ..] => (false, Some(*name)),
                    [] => (false, None),
                };
                if let (false, Some(n)) = (intrinsic, name) {
                    let n: String =
                        n.chars().take_while(|c| c.is_ascii_alphanumeric() || *c == '_').collect();
                    if !n.is_empty() {
                        uses.push(n);
                    }
                }
            }
            _ => {}
        }
    }
    (defines, uses)
}

/// Sources with every Fortran source after the sources that define the modules it uses; the
/// given order otherwise. A cycle keeps the given order (the compiler will explain).
pub(super) fn order_by_modules(sources: Vec<(PathBuf, Language)>) -> Vec<(PathBuf, Language)> {
    let info: Vec<(Vec<String>, Vec<String>)> = sources
        .iter()
        .map(|(p, l)| if *l == Language::Fortran { fortran_modules(p) } else { (Vec::new(), Vec::new()) })
        .collect();
    let provider = |m: &str| info.iter().position(|(d, _)| d.iter().any(|x| x == m));
    let n = sources.len();
    let mut placed = vec![false; n];
    let mut order = Vec::with_capacity(n);
    while order.len() < n {
        let next = (0..n).find(|&i| {
            !placed[i]
                && info[i].1.iter().all(|m| {
                    SHIM_MODULE_NAMES.contains(&m.as_str())
                        || match provider(m) {
                            Some(p) => p == i || placed[p],
                            None => true,
                        }
                })
        });
        match next {
            Some(i) => {
                placed[i] = true;
                order.push(i);
            }
            None => {
                // A cycle: keep the rest in the given order.
                order.extend((0..n).filter(|&i| !placed[i]));
                break;
            }
        }
    }
    let mut slots: Vec<Option<(PathBuf, Language)>> = sources.into_iter().map(Some).collect();
    order.into_iter().map(|i| slots[i].take().expect("each index once")).collect()
}
