//! What the benchmarks share: the example C routines compiled into one library (with their
//! complex-step twins), manifests naming them as a user would, and the cyclic tension–shear
//! path into the plastic range.
#![allow(dead_code)] // each benchmark uses a part

use std::cell::RefCell;
use std::ffi::{c_char, c_int, CString};
use std::path::{Path as FsPath, PathBuf};
use std::rc::Rc;

use tancheck::cli::load::{load, start_state, Loaded};
use tancheck::cli::manifest::Manifest;
use tancheck::core::path::{Path, PathIncrement, Shape};
use tancheck::core::{Convention, PointState, Settings};

/// The J2 properties of the benchmarks [E, ν, σy0, H_iso, Q, b, H_kin] (MPa): steel-like
/// numbers chosen for the benchmark, not test data. Without linear isotropic hardening the
/// yield surface stops growing once the Voce term saturates, so every cycle yields again.
pub const J2_PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 0.0, 150.0, 12.0, 2500.0];
/// Elastic properties [E, ν].
pub const ELASTIC_PROPS: [f64; 2] = [210000.0, 0.3];

/// A routine of the example library, with what its manifest needs.
#[derive(Clone, Copy, Debug)]
pub struct Example {
    pub label: &'static str,
    pub symbol: &'static str,
    pub states: usize,
    pub props: &'static [f64],
}

pub const J2: Example = Example { label: "j2", symbol: "c_j2", states: 13, props: &J2_PROPS };
pub const ELASTIC: Example =
    Example { label: "elastic", symbol: "c_elastic", states: 0, props: &ELASTIC_PROPS };

/// Where the benchmarks keep what they build and write: `<target>/bench-inputs`.
pub fn work_dir() -> PathBuf {
    let target = std::env::var_os("CARGO_TARGET_DIR")
        .map(PathBuf::from)
        .unwrap_or_else(|| FsPath::new(env!("CARGO_MANIFEST_DIR")).join("target"));
    let d = target.join("bench-inputs");
    std::fs::create_dir_all(&d).expect("creating the benchmark folder");
    d
}

fn repo(rel: &str) -> PathBuf {
    FsPath::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

/// The example J2 and elastic C routines, optimised as `tancheck build` makes them, with
/// their twins, in one library.
pub fn routine_library(dir: &FsPath) -> PathBuf {
    let out = dir.join("libexamples.so");
    let sources = [repo("fortran-shim/examples/c/j2.c"), repo("fortran-shim/examples/c/elastic.c")];
    tancheck::abi::build_library(&tancheck::abi::BuildOptions::new(sources, &out))
        .unwrap_or_else(|e| panic!("building the example routines: {e}"));
    out
}

/// A manifest of `ex` in `lib` with the given guard level, written to `dir` (so that the same
/// check can be run with the `tancheck` binary) and parsed.
pub fn manifest(dir: &FsPath, lib: &FsPath, ex: Example, guards: &str) -> (Manifest, PathBuf) {
    let text = format!(
        r#"{{ "routine": {{ "library": "{}", "symbol": "{}", "kind": "solid-3d", "states": {}, "properties": {:?} }},
  "guards": "{guards}" }}
"#,
        lib.display(),
        ex.symbol,
        ex.states,
        ex.props
    );
    let file = dir.join(format!("{}-{guards}.json", ex.label));
    std::fs::write(&file, &text).expect("writing a manifest");
    (Manifest::parse(&text, &file).expect("a valid manifest"), file)
}

/// The routine a manifest names, loaded as `tancheck check` loads it, with its start state.
pub fn loaded(m: &Manifest, dir: &FsPath) -> (Loaded, PointState) {
    let mut l = load(m, dir).expect("loading the routine");
    let start = start_state(m, l.routine().info()).expect("the start state");
    (l, start)
}

/// Strain step of the cyclic path (leading component ε11).
pub const CYCLE_STEP: f64 = 2e-4;
/// Amplitude of the cyclic path (ε11); yield in uniaxial strain is near 1.2e-3.
pub const CYCLE_AMPLITUDE: f64 = 4e-3;

/// `n` increments along the tension–shear direction (every column of a 3D tangent is
/// exercised), cycling 0 → +amplitude → −amplitude → … in equal steps.
pub fn cyclic_path(n: usize) -> Path {
    let d = Shape::TensionShear.direction();
    let per_leg = (CYCLE_AMPLITUDE / CYCLE_STEP).round() as usize; // 20 steps from 0 to the peak
    let mut increments = Vec::with_capacity(n);
    let mut k = 0;
    while increments.len() < n {
        // First leg 0 → +A, then alternating legs of 2A between the peaks.
        let (sign, steps) = if k == 0 {
            (1.0, per_leg)
        } else if k % 2 == 1 {
            (-1.0, 2 * per_leg)
        } else {
            (1.0, 2 * per_leg)
        };
        for _ in 0..steps {
            if increments.len() == n {
                break;
            }
            increments.push(PathIncrement::strain(d.map(|x| x * sign * CYCLE_STEP)));
        }
        k += 1;
    }
    Path {
        name: format!(
            "cyclic tension-shear, ±{CYCLE_AMPLITUDE:e} in steps of {CYCLE_STEP:e}, {n} increments"
        ),
        increments,
    }
}

/// `path` as a path file (the JSON of a manifest's `path`), for `tancheck check --path FILE`.
pub fn write_path_file(path: &Path, file: &FsPath) {
    let value = serde_json::json!({ "name": path.name, "increments": path.increments });
    std::fs::write(file, serde_json::to_vec(&value).unwrap()).expect("writing the path file");
}

#[repr(C)]
#[derive(Debug, Default)]
pub struct LoopResult {
    pub real_calls: i64,
    pub complex_calls: i64,
    pub worst_central: f64,
    pub worst_complex: f64,
    pub failed_increment: c_int,
}

pub type LoopFn = unsafe extern "C" fn(
    library: *const c_char,
    symbol: *const c_char,
    twin_symbol: *const c_char,
    ncomp: c_int,
    nstate: c_int,
    nprop: c_int,
    props: *const f64,
    temp: f64,
    nincr: c_int,
    dstrain: *const f64,
    dtime: f64,
    rel_central: f64,
    rel_complex: f64,
    step_floor: f64,
    entry_floor: f64,
    out: *mut LoopResult,
) -> c_int;

/// The hand-written loop's entry point (its library stays loaded for the whole benchmark),
/// with the inputs of one routine's walk.
pub struct CLoop {
    pub run: LoopFn,
    pub library: CString,
    pub symbol: CString,
    pub twin: CString,
    pub ncomp: usize,
    pub nstate: usize,
    pub props: Vec<f64>,
    pub temp: f64,
    /// The path's strain increments in the routine's order and shear measure, row by row.
    pub dstrain: Vec<f64>,
    pub rel_central: f64,
    pub rel_complex: f64,
    pub step_floor: f64,
    pub entry_floor: f64,
}

impl CLoop {
    /// The loop over `path` (canonical components, turned into the routine's own order and
    /// shear measure as tancheck's driver does) for `ex` in `library`, at the steps and entry
    /// floor of `settings`.
    pub fn new(
        run: LoopFn,
        library: &FsPath,
        ex: Example,
        conv: &Convention,
        temp: f64,
        path: &Path,
        settings: &Settings,
    ) -> CLoop {
        let n = conv.ncomp();
        let mut dstrain = vec![0.0; n * path.increments.len()];
        for (inc, row) in path.increments.iter().zip(dstrain.chunks_mut(n)) {
            conv.strain_from_canonical(&inc.dstrain, row);
        }
        CLoop {
            run,
            library: CString::new(library.to_str().expect("a UTF-8 path")).unwrap(),
            symbol: CString::new(ex.symbol).unwrap(),
            twin: CString::new(format!("{}{}", ex.symbol, tancheck::abi::TWIN_SUFFIX)).unwrap(),
            ncomp: n,
            nstate: ex.states,
            props: ex.props.to_vec(),
            temp,
            dstrain,
            rel_central: settings.central.rel_step,
            rel_complex: settings.complex_step.rel_step,
            step_floor: settings.step_floor,
            entry_floor: settings.entry_floor,
        }
    }

    pub fn walk(&self) -> LoopResult {
        let mut out = LoopResult::default();
        let nincr = self.dstrain.len() / self.ncomp;
        // SAFETY: the arguments match loop_check_run's prototype; the arrays outlive the call
        // and have the lengths the counts say.
        let rc = unsafe {
            (self.run)(
                self.library.as_ptr(),
                self.symbol.as_ptr(),
                self.twin.as_ptr(),
                self.ncomp as c_int,
                self.nstate as c_int,
                self.props.len() as c_int,
                self.props.as_ptr(),
                self.temp,
                nincr as c_int,
                self.dstrain.as_ptr(),
                1.0,
                self.rel_central,
                self.rel_complex,
                self.step_floor,
                self.entry_floor,
                &mut out,
            )
        };
        assert_eq!(rc, 0, "the C loop could not load {:?}", self.library);
        out
    }
}

/// Compile benches/c/loop_check.c into a library and load it.
pub fn loop_library(dir: &std::path::Path) -> (libloading::Library, LoopFn) {
    let src = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("benches/c/loop_check.c");
    let out = dir.join("libloop_check.so");
    let mut opts = tancheck::abi::BuildOptions::new([src], &out);
    opts.twin = false;
    tancheck::abi::build_library(&opts).unwrap_or_else(|e| panic!("building the C loop: {e}"));
    // SAFETY: our own library, which runs no initialisers.
    let lib = unsafe { libloading::Library::new(&out) }.expect("loading the C loop");
    // SAFETY: the symbol has the LoopFn prototype (benches/c/loop_check.c).
    let run = *unsafe { lib.get::<LoopFn>(b"loop_check_run\0") }.expect("the symbol loop_check_run");
    (lib, run)
}

/// Per-iteration times of one benchmark, as its `iter_custom` measured them (warm-up included).
pub type Times = Rc<RefCell<Vec<f64>>>;

/// The fastest and the median of `t`, in seconds; NaN when it has none (a benchmark left out
/// by a name filter on the command line).
pub fn stats(t: &Times) -> (f64, f64) {
    let mut v = t.borrow().clone();
    if v.is_empty() {
        return (f64::NAN, f64::NAN);
    }
    v.sort_by(f64::total_cmp);
    (v[0], v[v.len() / 2])
}

/// CPU time of the calling thread so far, in seconds: unlike the wall clock, it does not grow
/// while other work on a shared machine holds the core.
pub fn thread_cpu() -> f64 {
    let mut t = libc::timespec { tv_sec: 0, tv_nsec: 0 };
    // SAFETY: a valid clock id and a pointer to a timespec we own.
    unsafe { libc::clock_gettime(libc::CLOCK_THREAD_CPUTIME_ID, &mut t) };
    t.tv_sec as f64 + t.tv_nsec as f64 * 1e-9
}

/// CPU time (user + system) of the finished child processes so far, in seconds.
pub fn children_cpu() -> f64 {
    // SAFETY: a zeroed rusage is a valid value; getrusage fills it.
    let mut r: libc::rusage = unsafe { std::mem::zeroed() };
    // SAFETY: RUSAGE_CHILDREN with a pointer to an rusage we own.
    unsafe { libc::getrusage(libc::RUSAGE_CHILDREN, &mut r) };
    let tv = |t: libc::timeval| t.tv_sec as f64 + t.tv_usec as f64 * 1e-6;
    tv(r.ru_utime) + tv(r.ru_stime)
}
