//! Shared by the tests of the C API: where the built library is, compiling and running the
//! test programs.
#![allow(dead_code)] // each test binary uses part of this

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

pub fn shim() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fortran-shim")
}

pub use tancheck_testkit::libs::scratch;

/// The folder with `libtancheck_capi.a` and `libtancheck_capi.so`. Cargo builds them with
/// the rlib (the crate's crate-type list) whenever it builds this crate's tests, into
/// `target/<profile>/deps`, where the test executable lives too. (`cargo build` also copies
/// them to `target/<profile>`, where a copy can be older: deps comes first.)
pub fn library_dir() -> PathBuf {
    let exe = std::env::current_exe().expect("the test knows its executable");
    let deps = exe.parent().expect("the executable is in a folder").to_path_buf();
    let candidates = [Some(deps.clone()), deps.parent().map(Path::to_path_buf)];
    for dir in candidates.into_iter().flatten() {
        if dir.join("libtancheck_capi.a").is_file() && dir.join("libtancheck_capi.so").is_file() {
            return dir;
        }
    }
    panic!(
        "libtancheck_capi.a and .so are neither in {} nor in its parent; cargo builds them with the \
         crate's rlib (crate-type cdylib, staticlib, rlib), so the crate type list may have changed",
        deps.display()
    );
}

/// What a Rust static library needs from the system on Linux (`cargo rustc -p tancheck-capi
/// --crate-type staticlib -- --print native-static-libs`).
pub const NATIVE_STATIC_LIBS: [&str; 7] = ["-lm", "-ldl", "-lgcc_s", "-lutil", "-lrt", "-lpthread", "-lc"];

fn compiler(var: &str, default: &str) -> (String, Vec<String>) {
    let v = std::env::var(var).ok().filter(|v| !v.trim().is_empty()).unwrap_or_else(|| default.into());
    let mut words = v.split_whitespace().map(str::to_string);
    (words.next().unwrap(), words.collect())
}

/// Run a compiler command; a failure shows the command and what it printed.
pub fn compile(var: &str, default: &str, args: &[&str], dir: &Path) {
    let (program, pre) = compiler(var, default);
    let out = Command::new(&program)
        .args(&pre)
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap_or_else(|e| panic!("cannot run {program}: {e}"));
    assert!(
        out.status.success(),
        "$ {program} {} {}\n{}{}",
        pre.join(" "),
        args.join(" "),
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    let warnings = String::from_utf8_lossy(&out.stderr);
    assert!(warnings.trim().is_empty(), "$ {program} {}\nprinted:\n{warnings}", args.join(" "));
}

pub fn path_str(p: &Path) -> &str {
    p.to_str().expect("test paths are UTF-8")
}

/// Run a program; its output as text, with its exit code.
pub fn run(program: &Path) -> (Output, String, String) {
    let out =
        Command::new(program).output().unwrap_or_else(|e| panic!("cannot run {}: {e}", program.display()));
    let stdout = String::from_utf8_lossy(&out.stdout).into_owned();
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    (out, stdout, stderr)
}
