//! Every Rust file says what it is for and stays short enough to read: its first line is a
//! comment (`//!`; `//` for a piece `include!`d by build scripts) of a few words, and it has
//! at most `MAX_LINES` lines (a longer one becomes a folder module; DEVELOPERS.md).
//!
//! Run it alone with `cargo test --test module_layout`.

use std::path::{Path, PathBuf};

/// Lines a source file may have (DEVELOPERS.md: "files under about 600 lines").
const MAX_LINES: usize = 600;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Every `.rs` file under the folders that hold the project's Rust code.
fn rust_files() -> Vec<PathBuf> {
    let r = root();
    let mut dirs = vec![r.join("src"), r.join("tests"), r.join("benches")];
    for c in std::fs::read_dir(r.join("crates")).unwrap().flatten() {
        dirs.push(c.path());
    }
    let mut out = Vec::new();
    while let Some(d) = dirs.pop() {
        let Ok(entries) = std::fs::read_dir(&d) else { continue };
        for e in entries.flatten() {
            let p = e.path();
            if p.is_dir() {
                if p.file_name().is_some_and(|n| n != "target") {
                    dirs.push(p);
                }
            } else if p.extension().is_some_and(|x| x == "rs") {
                out.push(p);
            }
        }
    }
    out.sort();
    out
}

/// Why a file's opening does not say what it is for, if it does not: its first comment
/// paragraph (the comment lines before the first blank line or code) needs a few words.
fn opening_problem(text: &str) -> Option<String> {
    let mut lines = text.lines().map(str::trim).skip_while(|l| l.is_empty()).peekable();
    let Some(&first) = lines.peek() else {
        return Some("the file is empty".into());
    };
    let comment = |l: &str| l.strip_prefix("//!").or_else(|| l.strip_prefix("//")).map(str::to_string);
    if comment(first).is_none() {
        return Some(format!("it starts with code (`{first}`), not with a comment saying what it is for"));
    }
    let paragraph: Vec<String> = lines.map_while(comment).take_while(|w| !w.trim().is_empty()).collect();
    if paragraph.join(" ").split_whitespace().count() < 4 {
        return Some(format!("its first comment (`{first}`) is too short to say what the file is for"));
    }
    None
}

#[test]
fn every_file_opens_with_what_it_is_for() {
    let files = rust_files();
    assert!(files.len() > 100, "found only {} Rust files", files.len());
    let bad: Vec<String> = files
        .iter()
        .filter_map(|p| {
            let text = std::fs::read_to_string(p).unwrap();
            opening_problem(&text).map(|why| format!("{}: {why}", rel(p)))
        })
        .collect();
    assert!(bad.is_empty(), "files that do not say what they are for:\n{}", bad.join("\n"));
}

#[test]
fn no_file_is_longer_than_the_limit() {
    let mut long = Vec::new();
    for p in rust_files() {
        let name = rel(&p);
        let n = std::fs::read_to_string(&p).unwrap().lines().count();
        if n > MAX_LINES {
            long.push(format!("{name}: {n} lines (split it into a folder module)"));
        }
    }
    assert!(long.is_empty(), "files over {MAX_LINES} lines:\n{}", long.join("\n"));
}

// The check can fail: code first, a bare comment, and an empty file are refused.
#[test]
fn the_opening_check_refuses_files_that_do_not_say_what_they_are_for() {
    assert!(opening_problem("fn main() {}\n").is_some());
    assert!(opening_problem("//! Tests.\nfn f() {}\n").is_some());
    assert!(opening_problem("//! The probe.\n//!\n//! More after a blank line.\n").is_some());
    assert_eq!(
        opening_problem("//! Fourth-order central difference:\n//! (f(x + h) − f(x − h)) / 2h.\n"),
        None
    );
    assert!(opening_problem("\n\n").is_some());
    assert_eq!(opening_problem("\n//! The walk along a path, one increment at a time.\n"), None);
}

fn rel(p: &Path) -> String {
    p.strip_prefix(root()).unwrap_or(p).to_string_lossy().into_owned()
}
