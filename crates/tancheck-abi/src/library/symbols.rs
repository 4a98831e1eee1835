//! A library's exported function names, and help for a missing symbol: the closest names
//! and how compilers decorate names.

use object::{Object, ObjectSymbol};

use crate::signal_guard::TWIN_SUFFIX;

/// Function names the library exports, without the linker's own.
pub(super) fn exported_functions(data: &[u8]) -> Vec<String> {
    const LINKER_NAMES: [&str; 8] = [
        "_init",
        "_fini",
        "_edata",
        "_end",
        "__bss_start",
        "_DYNAMIC",
        "_GLOBAL_OFFSET_TABLE_",
        "__gmon_start__",
    ];
    let Ok(file) = object::File::parse(data) else { return Vec::new() };
    let strip_underscore = file.format() == object::BinaryFormat::MachO;
    let mut names: Vec<String> = file
        .dynamic_symbols()
        .filter(|s| s.is_definition() && s.is_global() && s.kind() == object::SymbolKind::Text)
        .filter_map(|s| s.name().ok().map(str::to_string))
        .collect();
    if names.is_empty() {
        if let Ok(exports) = file.exports() {
            names = exports
                .filter_map(Result::ok)
                .filter_map(|e| match e.name() {
                    object::read::NameOrOrdinal::Name(n) => Some(String::from_utf8_lossy(n).into_owned()),
                    _ => None,
                })
                .collect();
        }
    }
    let mut names: Vec<String> = names
        .into_iter()
        .map(|n| if strip_underscore { n.strip_prefix('_').map(str::to_string).unwrap_or(n) } else { n })
        .filter(|n| !LINKER_NAMES.contains(&n.as_str()))
        .collect();
    names.sort();
    names.dedup();
    names
}

/// Levenshtein distance between two strings, by characters.
pub(super) fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for i in 1..=a.len() {
        cur[0] = i;
        for j in 1..=b.len() {
            let sub = prev[j - 1] + usize::from(a[i - 1] != b[j - 1]);
            cur[j] = sub.min(prev[j] + 1).min(cur[j - 1] + 1);
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev[b.len()]
}

/// Up to `n` names closest to `symbol`, ignoring case. A name that contains the symbol (as a
/// decorated name does) ranks as if it were one edit away.
pub(crate) fn closest(symbol: &str, names: &[String], n: usize) -> Vec<String> {
    let want = symbol.to_lowercase();
    // A twin `x_cx` beside its `x` only repeats it, unless a twin is what was asked for.
    let asked_twin = want.ends_with(TWIN_SUFFIX);
    let mut scored: Vec<(usize, usize, &String)> = names
        .iter()
        .filter(|name| {
            asked_twin || !name.strip_suffix(TWIN_SUFFIX).is_some_and(|base| names.iter().any(|n| n == base))
        })
        .map(|name| {
            let lower = name.to_lowercase();
            let d = edit_distance(&want, &lower);
            let contained = want.len() >= 3 && (lower.contains(&want) || want.contains(&lower));
            (if contained { d.min(1) } else { d }, d, name)
        })
        .collect();
    scored.sort();
    scored.into_iter().take(n).map(|(_, _, name)| name.clone()).collect()
}

/// A specific explanation when an export is the symbol under a known decoration.
pub(crate) fn decoration_hint(symbol: &str, exports: &[String]) -> String {
    let lower = symbol.to_lowercase();
    let find = |pred: &dyn Fn(&str) -> bool| exports.iter().find(|e| pred(e)).cloned();
    if let Some(e) = find(&|e: &str| e == format!("{lower}_")) {
        return format!(
            "The library exports `{e}`: that is how gfortran names the external procedure \
             `{symbol}` compiled without bind(C). Ask for `{e}`, or better, declare the routine \
             bind(C, name=\"{symbol}\") so that it has the ABI's calling convention for certain."
        );
    }
    if lower.ends_with('_') {
        let bare = lower.trim_end_matches('_');
        if let Some(e) = find(&|e: &str| e.eq_ignore_ascii_case(bare)) {
            return format!(
                "The library exports `{e}` without the trailing underscore: it was compiled \
                 with bind(C) or from C. Ask for `{e}`."
            );
        }
    }
    if let Some(e) = find(&|e: &str| {
        let l = e.to_lowercase();
        l.starts_with("__") && l.ends_with(&format!("_mod_{lower}"))
    }) {
        let module = e.trim_start_matches("__").split("_MOD_").next().unwrap_or("").to_string();
        return format!(
            "The library exports `{e}`: `{symbol}` is a procedure of Fortran module `{module}`, \
             which gfortran names that way. Declare it bind(C, name=\"{symbol}\") in the module \
             (then also compile the twin with its own name, see tancheck_twin.inc), or ask for \
             `{e}`."
        );
    }
    let mangled_piece = format!("{}{}", symbol.len(), symbol);
    if let Some(e) = find(&|e: &str| e.starts_with("_Z") && e.contains(&mangled_piece)) {
        return format!(
            "The library exports `{e}`, the C++ mangled name of `{symbol}`: declare the routine \
             extern \"C\" so that it is exported as `{symbol}`."
        );
    }
    if let Some(e) =
        find(&|e: &str| e.eq_ignore_ascii_case(symbol) || e.eq_ignore_ascii_case(&format!("{symbol}_")))
    {
        return format!(
            "The library exports `{e}`, which differs only in case: symbols are case-sensitive \
             (gfortran exports lower case unless bind(C, name=...) says otherwise). Ask for `{e}`."
        );
    }
    String::new()
}
