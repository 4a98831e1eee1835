//! No import cycles between modules inside a crate: module order is data-flow order.
//!
//! For every crate (`crates/*/src` and the root `src`), each file's `crate::…`, `super::…`
//! and `self::…` paths (in `use` trees, braces expanded, and in code) are resolved to the
//! module file they name. An edge between two modules counts between the two siblings under
//! their lowest common ancestor that contain them (so `walk::step` → `locate::find` is an
//! edge `check` → `bisect` at the crate root); a module using its own parent or child is not
//! an edge (a module and its submodules are one unit). Any strongly connected set of two or
//! more siblings is a cycle, printed with the file and line of each import in it.
//!
//! Run it alone with `cargo test --test module_cycles`.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// A module path inside a crate: `[]` is the crate root, `["walk", "step"]` is walk/step.rs.
type ModPath = Vec<String>;

/// One import: the importing module, the module imported from, and where it is written.
#[derive(Debug, Clone)]
struct Edge {
    from: ModPath,
    to: ModPath,
    file: PathBuf,
    line: usize,
}

/// The module files of one crate's `src` folder.
fn modules(src: &Path) -> BTreeMap<ModPath, PathBuf> {
    let mut out = BTreeMap::new();
    let mut stack = vec![src.to_path_buf()];
    while let Some(dir) = stack.pop() {
        let Ok(entries) = std::fs::read_dir(&dir) else { continue };
        for e in entries.flatten() {
            let p = e.path();
            if p.is_dir() {
                stack.push(p);
                continue;
            }
            if p.extension().is_none_or(|x| x != "rs") {
                continue;
            }
            let rel = p.strip_prefix(src).unwrap();
            let mut parts: Vec<String> =
                rel.iter().map(|c| c.to_string_lossy().trim_end_matches(".rs").to_string()).collect();
            let last = parts.last().cloned().unwrap_or_default();
            if parts.len() == 1 && (last == "lib" || last == "main") {
                parts.clear();
            } else if last == "mod" {
                parts.pop();
            } else if parts.first().is_some_and(|f| f == "bin") {
                continue; // a binary target is a crate of its own
            }
            out.insert(parts, p);
        }
    }
    out
}

/// The source with comments, string and char literals blanked (newlines kept for line numbers).
fn strip(src: &str) -> String {
    let b: Vec<char> = src.chars().collect();
    let mut out = String::with_capacity(src.len());
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        let next = b.get(i + 1).copied();
        if c == '/' && next == Some('/') {
            while i < b.len() && b[i] != '\n' {
                i += 1;
            }
        } else if c == '/' && next == Some('*') {
            let mut depth = 0;
            while i < b.len() {
                if b[i] == '/' && b.get(i + 1) == Some(&'*') {
                    depth += 1;
                    i += 2;
                } else if b[i] == '*' && b.get(i + 1) == Some(&'/') {
                    depth -= 1;
                    i += 2;
                    if depth == 0 {
                        break;
                    }
                } else {
                    if b[i] == '\n' {
                        out.push('\n');
                    }
                    i += 1;
                }
            }
        } else if c == 'r' && (next == Some('"') || next == Some('#')) && !prev_is_ident(&b, i) {
            // raw string r"…" or r#"…"#
            let mut j = i + 1;
            let mut hashes = 0;
            while b.get(j) == Some(&'#') {
                hashes += 1;
                j += 1;
            }
            if b.get(j) != Some(&'"') {
                out.push(c);
                i += 1;
                continue;
            }
            j += 1;
            'raw: while j < b.len() {
                if b[j] == '"' && (0..hashes).all(|k| b.get(j + 1 + k) == Some(&'#')) {
                    j += 1 + hashes;
                    break 'raw;
                }
                if b[j] == '\n' {
                    out.push('\n');
                }
                j += 1;
            }
            out.push_str("\"\"");
            i = j;
        } else if c == '"' {
            i += 1;
            while i < b.len() && b[i] != '"' {
                if b[i] == '\\' {
                    i += 1;
                }
                if b.get(i) == Some(&'\n') {
                    out.push('\n');
                }
                i += 1;
            }
            out.push_str("\"\"");
            i += 1;
        } else if c == '\'' && !prev_is_ident(&b, i) {
            // a char literal ('a', '\n', '\u{..}') or a lifetime ('a): skip a literal only
            let close = if next == Some('\\') {
                (i + 2..b.len().min(i + 12)).find(|&k| b[k] == '\'')
            } else if b.get(i + 2) == Some(&'\'') {
                Some(i + 2)
            } else {
                None
            };
            match close {
                Some(k) => {
                    out.push_str("' '");
                    i = k + 1;
                }
                None => {
                    out.push(c);
                    i += 1;
                }
            }
        } else {
            out.push(c);
            i += 1;
        }
    }
    out
}

fn prev_is_ident(b: &[char], i: usize) -> bool {
    i > 0 && (b[i - 1].is_alphanumeric() || b[i - 1] == '_')
}

fn is_ident(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// Expands a `use` tree (`a::{b, c::{d, e as f}}`, `a::*`) into its paths.
fn expand(tree: &str) -> Vec<Vec<String>> {
    // drop renames (`x as y`) first, then all whitespace
    let words: Vec<&str> = tree.split_whitespace().collect();
    let mut kept: Vec<&str> = Vec::new();
    let mut k = 0;
    while k < words.len() {
        if words[k] == "as" {
            // the new name may carry the `,` or `}` that follows it
            let tail = words.get(k + 1).map_or("", |w| w.trim_start_matches(|c: char| is_ident(c)));
            kept.push(tail);
            k += 2;
        } else {
            kept.push(words[k]);
            k += 1;
        }
    }
    let tree: String = kept.concat();
    fn go(prefix: &[String], t: &str, out: &mut Vec<Vec<String>>) {
        if t.is_empty() {
            return;
        }
        if let Some(open) = t.find('{') {
            let head = &t[..open];
            let mut p: Vec<String> = prefix.to_vec();
            p.extend(head.split("::").filter(|s| !s.is_empty()).map(str::to_string));
            let inner = &t[open + 1..t.rfind('}').unwrap_or(t.len())];
            let mut depth = 0;
            let mut start = 0;
            for (k, ch) in inner.char_indices() {
                match ch {
                    '{' => depth += 1,
                    '}' => depth -= 1,
                    ',' if depth == 0 => {
                        go(&p, &inner[start..k], out);
                        start = k + 1;
                    }
                    _ => {}
                }
            }
            go(&p, &inner[start..], out);
            if inner.trim().is_empty() {
                out.push(p);
            }
        } else {
            let mut p: Vec<String> = prefix.to_vec();
            p.extend(t.split("::").filter(|s| !s.is_empty() && *s != "*").map(str::to_string));
            // `self` inside braces names the prefix itself
            if p.last().is_some_and(|s| s == "self") {
                p.pop();
            }
            out.push(p);
        }
    }
    let mut out = Vec::new();
    go(&[], &tree, &mut out);
    out
}

/// Resolves a written path (`crate::a::b::Item`, `super::x`, `self::y`, or in a `use`, a child
/// module's name) from module `here` to the longest module path it reaches.
fn resolve(
    here: &ModPath,
    path: &[String],
    mods: &BTreeMap<ModPath, PathBuf>,
    in_use: bool,
) -> Option<ModPath> {
    let mut base: ModPath;
    let mut rest = path;
    match path.first().map(String::as_str) {
        Some("crate") => {
            base = Vec::new();
            rest = &path[1..];
        }
        Some("self") => {
            base = here.clone();
            rest = &path[1..];
        }
        Some("super") => {
            base = here.clone();
            while rest.first().is_some_and(|s| s == "super") {
                base.pop()?;
                rest = &rest[1..];
            }
        }
        Some(first) if in_use => {
            let mut child = here.clone();
            child.push(first.to_string());
            if !mods.contains_key(&child) {
                return None; // an external crate or a name in scope
            }
            base = here.clone();
        }
        _ => return None,
    }
    for seg in rest {
        let mut next = base.clone();
        next.push(seg.clone());
        if mods.contains_key(&next) {
            base = next;
        } else {
            break;
        }
    }
    Some(base)
}

/// The imports of one file of module `here`, inline `mod x { … }` blocks taken into account.
fn imports(here: &ModPath, text: &str, file: &Path, mods: &BTreeMap<ModPath, PathBuf>) -> Vec<Edge> {
    let src = strip(text);
    let chars: Vec<char> = src.chars().collect();
    let mut edges = Vec::new();
    let mut line = 1;
    let mut depth = 0usize;
    // (brace depth at which an inline module's block closes, its name)
    let mut inline: Vec<(usize, String)> = Vec::new();
    let mut pending_mod: Option<String> = None;
    let mut i = 0;
    let current = |inline: &Vec<(usize, String)>| {
        let mut m = here.clone();
        m.extend(inline.iter().map(|(_, n)| n.clone()));
        m
    };
    while i < chars.len() {
        let c = chars[i];
        if c == '\n' {
            line += 1;
            i += 1;
            continue;
        }
        if c == '{' {
            depth += 1;
            if let Some(name) = pending_mod.take() {
                inline.push((depth, name));
            }
            i += 1;
            continue;
        }
        if c == '}' {
            if inline.last().is_some_and(|(d, _)| *d == depth) {
                inline.pop();
            }
            depth = depth.saturating_sub(1);
            i += 1;
            continue;
        }
        if c == ';' {
            pending_mod = None;
        }
        if !is_ident(c) || prev_is_ident(&chars, i) {
            i += 1;
            continue;
        }
        let start = i;
        while i < chars.len() && is_ident(chars[i]) {
            i += 1;
        }
        let word: String = chars[start..i].iter().collect();
        if word == "mod" {
            let mut j = i;
            while j < chars.len() && chars[j].is_whitespace() {
                j += 1;
            }
            let s = j;
            while j < chars.len() && is_ident(chars[j]) {
                j += 1;
            }
            pending_mod = Some(chars[s..j].iter().collect());
            i = j;
            continue;
        }
        let module = current(&inline);
        if word == "use" {
            let end = (i..chars.len()).find(|&k| chars[k] == ';').unwrap_or(chars.len());
            let tree: String = chars[i..end].iter().collect();
            for p in expand(&tree) {
                if let Some(to) = resolve(&module, &p, mods, true) {
                    edges.push(Edge { from: module.clone(), to, file: file.to_path_buf(), line });
                }
            }
            line += tree.matches('\n').count();
            i = end;
            continue;
        }
        if matches!(word.as_str(), "crate" | "super" | "self") && chars.get(i) == Some(&':') {
            // a path in code: crate::a::b::f(…)
            let mut j = i;
            let mut segs = vec![word.clone()];
            while chars.get(j) == Some(&':') && chars.get(j + 1) == Some(&':') {
                j += 2;
                let s = j;
                while j < chars.len() && is_ident(chars[j]) {
                    j += 1;
                }
                if s == j {
                    break;
                }
                segs.push(chars[s..j].iter().collect());
            }
            if let Some(to) = resolve(&module, &segs, mods, false) {
                edges.push(Edge { from: module.clone(), to, file: file.to_path_buf(), line });
            }
            i = j;
        }
    }
    edges
}

/// Cycles among sibling modules, each as the list of imports that form it.
fn cycles(src: &Path) -> Vec<Vec<Edge>> {
    let mods = modules(src);
    // sibling graph: (parent, child name) -> set of child names, with one example edge each
    let mut graph: BTreeMap<ModPath, BTreeMap<String, BTreeMap<String, Edge>>> = BTreeMap::new();
    for (m, file) in &mods {
        let text = std::fs::read_to_string(file).unwrap();
        for e in imports(m, &text, file, &mods) {
            let common = e.from.iter().zip(&e.to).take_while(|(a, b)| a == b).count();
            if common == e.from.len() || common == e.to.len() {
                continue; // a module and its own ancestor or descendant
            }
            let parent: ModPath = e.from[..common].to_vec();
            let (a, b) = (e.from[common].clone(), e.to[common].clone());
            graph.entry(parent).or_default().entry(a).or_default().entry(b).or_insert(e);
        }
    }
    let mut found = Vec::new();
    for nodes in graph.values() {
        for scc in strongly_connected(nodes) {
            if scc.len() < 2 {
                continue;
            }
            let mut cycle = Vec::new();
            for a in &scc {
                for (b, e) in &nodes[a] {
                    if scc.contains(b) {
                        cycle.push(e.clone());
                    }
                }
            }
            found.push(cycle);
        }
    }
    found
}

/// Tarjan's strongly connected components of a small graph.
fn strongly_connected<V>(g: &BTreeMap<String, BTreeMap<String, V>>) -> Vec<BTreeSet<String>> {
    struct State<'a, V> {
        g: &'a BTreeMap<String, BTreeMap<String, V>>,
        index: BTreeMap<String, usize>,
        low: BTreeMap<String, usize>,
        stack: Vec<String>,
        on: BTreeSet<String>,
        out: Vec<BTreeSet<String>>,
    }
    fn visit<V>(s: &mut State<V>, v: &str) {
        let n = s.index.len();
        s.index.insert(v.into(), n);
        s.low.insert(v.into(), n);
        s.stack.push(v.into());
        s.on.insert(v.into());
        let nexts: Vec<String> = s.g.get(v).map(|m| m.keys().cloned().collect()).unwrap_or_default();
        for w in nexts {
            if !s.index.contains_key(&w) {
                visit(s, &w);
                let lw = s.low[&w];
                let lv = s.low.get_mut(v).unwrap();
                *lv = (*lv).min(lw);
            } else if s.on.contains(&w) {
                let iw = s.index[&w];
                let lv = s.low.get_mut(v).unwrap();
                *lv = (*lv).min(iw);
            }
        }
        if s.low[v] == s.index[v] {
            let mut comp = BTreeSet::new();
            while let Some(w) = s.stack.pop() {
                s.on.remove(&w);
                let done = w == v;
                comp.insert(w);
                if done {
                    break;
                }
            }
            s.out.push(comp);
        }
    }
    let mut s = State {
        g,
        index: BTreeMap::new(),
        low: BTreeMap::new(),
        stack: Vec::new(),
        on: BTreeSet::new(),
        out: Vec::new(),
    };
    for v in g.keys() {
        if !s.index.contains_key(v) {
            visit(&mut s, v);
        }
    }
    s.out
}

fn show(cycle: &[Edge]) -> String {
    cycle
        .iter()
        .map(|e| format!("  {} -> {}  ({}:{})", e.from.join("::"), e.to.join("::"), e.file.display(), e.line))
        .collect::<Vec<_>>()
        .join("\n")
}

fn crate_sources() -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut out = vec![root.join("src")];
    let mut crates: Vec<PathBuf> =
        std::fs::read_dir(root.join("crates")).unwrap().flatten().map(|e| e.path().join("src")).collect();
    crates.sort();
    out.extend(crates.into_iter().filter(|p| p.is_dir()));
    out
}

#[test]
fn no_module_imports_from_a_module_that_imports_it_back() {
    let mut report = String::new();
    for src in crate_sources() {
        for c in cycles(&src) {
            report.push_str(&format!("cycle in {}:\n{}\n", src.display(), show(&c)));
        }
    }
    assert!(report.is_empty(), "import cycles between modules:\n{report}");
}

/// The checker itself finds a cycle it is shown, through `use` trees, `super::` and code paths,
/// and does not count a module using its own parent or child.
#[test]
fn the_checker_finds_a_planted_cycle() {
    let dir = std::env::temp_dir().join(format!("tancheck-cycles-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(dir.join("walk")).unwrap();
    let write = |p: &str, s: &str| std::fs::write(dir.join(p), s).unwrap();
    write("lib.rs", "mod walk;\nmod locate;\nmod shape;\npub use walk::Walk;\n");
    write("walk.rs", "mod step;\nuse step::Step;\n// use crate::locate; (a comment)\npub struct Walk;\n");
    write(
        "walk/step.rs",
        "use super::Walk;\nuse crate::{shape::{self, Form}, locate::find as f};\npub struct Step;\n",
    );
    write("locate.rs", "pub fn find() { let _ = \"crate::walk::x\"; }\n");
    write("shape.rs", "pub struct Form;\n#[cfg(test)]\nmod tests {\n    use super::Form;\n}\n");
    assert!(cycles(&dir).is_empty(), "{:?}", cycles(&dir));

    // locate → walk (in code, not a use) closes walk → locate.
    write("locate.rs", "pub fn find() { let _ = crate::walk::step::Step; }\n");
    let c = cycles(&dir);
    assert_eq!(c.len(), 1, "{c:?}");
    let text = show(&c[0]);
    assert!(text.contains("walk::step -> locate") && text.contains("locate -> walk::step"), "{text}");

    // Siblings inside a folder: step ↔ other through super::.
    write("locate.rs", "pub fn find() {}\n");
    write("walk.rs", "mod step;\nmod other;\npub struct Walk;\n");
    write("walk/other.rs", "use super::step::Step;\n");
    write("walk/step.rs", "pub struct Step;\nfn f() { let _ = super::other::g; }\n");
    let c = cycles(&dir);
    assert_eq!(c.len(), 1, "{c:?}");
    let _ = std::fs::remove_dir_all(&dir);
}
