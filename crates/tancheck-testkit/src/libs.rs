//! The bundled routines (fortran-shim/examples), compiled with their complex-step twins once
//! per test binary: every test of a binary that asks for the same library gets the same file.
//! Also the scratch folders and command output that tests of the tancheck binary share.
//!
//! A build that fails panics with the compiler's words. A test that needs gfortran or a C
//! compiler is marked with the cfgs of the build scripts (`tancheck_no_fortran`, ...), so it
//! never reaches a build that cannot work.

use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::process::Output;
use std::sync::{Arc, Mutex, OnceLock};

use tancheck_abi::{build_library, BuildOptions, Library, LibraryRoutine};
use tancheck_core::Routine;

/// The repository's root folder.
pub fn repo_root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

/// `fortran-shim/examples`: the example routines in C (`c/`) and Fortran (`fortran/`).
pub fn examples_dir() -> PathBuf {
    repo_root().join("fortran-shim/examples")
}

/// A fresh folder for this test process: `target/<profile>/tmp/<binary>-<pid>-<name>`, emptied
/// first. It sits in cargo's target folder (`cargo clean` removes it), and each call first
/// removes the folders of this binary left by processes that have ended, so nothing piles up
/// run after run (an install prefix alone is over 100 MB). The process id stays in the name:
/// a test that runs itself again in a child process must not empty its parent's folder.
pub fn scratch(name: &str) -> PathBuf {
    let exe = std::env::current_exe().expect("a test knows its executable");
    let binary = exe.file_stem().map_or_else(|| "test".into(), |s| s.to_string_lossy().into_owned());
    // target/<profile>/deps/<binary> → target/<profile>/tmp
    let base = exe.parent().and_then(Path::parent).map_or_else(std::env::temp_dir, |p| p.join("tmp"));
    remove_ended(&base, &binary);
    let d = base.join(format!("{binary}-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap_or_else(|e| panic!("creating {}: {e}", d.display()));
    d
}

/// Remove `<binary>-<pid>-*` folders under `base` whose process no longer runs.
fn remove_ended(base: &Path, binary: &str) {
    let Ok(entries) = std::fs::read_dir(base) else { return };
    let prefix = format!("{binary}-");
    for e in entries.flatten() {
        let name = e.file_name().to_string_lossy().into_owned();
        let Some(pid) = name.strip_prefix(&prefix).and_then(|rest| rest.split('-').next()) else { continue };
        let Ok(pid) = pid.parse::<u32>() else { continue };
        if pid != std::process::id() && !Path::new(&format!("/proc/{pid}")).exists() {
            let _ = std::fs::remove_dir_all(e.path());
        }
    }
}

type Cell = Arc<OnceLock<&'static Path>>;
/// Library name → its sources and its build.
type Built = Mutex<HashMap<String, (Vec<String>, Cell)>>;

/// The library `lib<name>.so` built from `sources` (paths relative to the repository root),
/// twins included; built on the first request of this process and shared after. Asking for
/// the same name with other sources panics.
pub fn build_once(name: &str, sources: &[&str]) -> &'static Path {
    static BUILT: OnceLock<Built> = OnceLock::new();
    let wanted: Vec<String> = sources.iter().map(|s| s.to_string()).collect();
    let cell = {
        let mut built = BUILT.get_or_init(Mutex::default).lock().unwrap_or_else(|e| e.into_inner());
        let (had, cell) = built.entry(name.to_string()).or_insert_with(|| (wanted.clone(), Cell::default()));
        assert_eq!(*had, wanted, "library {name} asked for with other sources");
        cell.clone()
    };
    // Built outside the lock: libraries of other names build meanwhile; the same name waits.
    cell.get_or_init(|| {
        let out = scratch(&format!("lib-{name}")).join(format!("lib{name}.so"));
        let root = repo_root();
        build_library(&BuildOptions::new(sources.iter().map(|s| root.join(s)), &out))
            .unwrap_or_else(|e| panic!("building {name}: {e}"));
        Box::leak(out.into_boxed_path())
    })
}

/// [`build_once`] with sources relative to `fortran-shim/examples` (`"c/j2.c"`).
pub fn build_examples(name: &str, sources: &[&str]) -> &'static Path {
    let full: Vec<String> = sources.iter().map(|s| format!("fortran-shim/examples/{s}")).collect();
    let refs: Vec<&str> = full.iter().map(String::as_str).collect();
    build_once(name, &refs)
}

/// A Rust routine and the compiled routine `symbol` of the library at `lib` opened with the
/// Rust routine's sizes and conventions, for tests that call both with the same inputs. The
/// compiled routine must have its complex twin.
pub fn beside_compiled<R: Routine>(rust: R, lib: &Path, symbol: &str) -> (R, LibraryRoutine) {
    let lib = Library::open(lib).unwrap_or_else(|e| panic!("{}: {e}", lib.display()));
    let compiled = lib.routine(symbol, rust.info().clone()).unwrap_or_else(|e| panic!("{symbol}: {e}"));
    assert!(compiled.has_twin(), "{symbol} has its complex twin");
    (rust, compiled)
}

/// Standard output then standard error of a finished command, as text.
pub fn output_text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

/// Writes `dir/m.json`, the manifest of the solid-3d routine `symbol` of the library `lib`
/// with `states` state variables and the properties `props` (a JSON array), followed by
/// `rest`: more top-level fields, each after a comma (e.g. `, "guards": "full"`), or nothing.
pub fn solid_manifest(
    dir: &Path,
    lib: &Path,
    symbol: &str,
    states: usize,
    props: &str,
    rest: &str,
) -> PathBuf {
    let m = dir.join("m.json");
    let text = format!(
        r#"{{ "routine": {{ "library": "{}", "symbol": "{symbol}", "kind": "solid-3d", "states": {states}, "properties": {props} }}{rest} }}"#,
        lib.display()
    );
    std::fs::write(&m, text).unwrap_or_else(|e| panic!("writing {}: {e}", m.display()));
    m
}

/// Processes whose environment says they are `--isolate` workers of `parent`
/// (`TANCHECK_WORKER_PARENT`), read from /proc.
pub fn workers_of(parent: u32) -> Vec<u32> {
    let want = format!("TANCHECK_WORKER_PARENT={parent}");
    std::fs::read_dir("/proc")
        .unwrap()
        .filter_map(|e| e.ok()?.file_name().to_str()?.parse::<u32>().ok())
        .filter(|pid| {
            std::fs::read(format!("/proc/{pid}/environ"))
                .map(|env| env.split(|&b| b == 0).any(|v| v == want.as_bytes()))
                .unwrap_or(false)
        })
        .collect()
}
