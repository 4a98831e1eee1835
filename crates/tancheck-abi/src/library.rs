//! A shared library of material routines, and one routine in it as a [`Routine`].
//!
//! [`Library::open`] checks the file (exists, is a shared library for this machine) before
//! handing it to the system loader, so that a wrong file gets a message that says what it is.
//! [`Library::routine`] finds a symbol and, by the `_cx` suffix, its complex-step twin. A
//! missing symbol lists the closest exported names and explains compilers' name decoration.

use std::ffi::CString;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use num_complex::Complex64;
use object::{Object, ObjectSymbol};
use tancheck_core::routine::status_fault;
use tancheck_core::{CallInput, CallOutput, ComplexRoutine, Fault, Outcome, Routine, RoutineInfo};

use crate::error::{LoadError, TrapError};
use crate::memory_guards::{Findings, GuardBuffers, GuardFinding, GuardLevel};
use crate::signal_guard::{
    self as guard, ComplexFn, GuardArgs, RealFn, TcCall, ABI_VERSION, TWIN_SUFFIX, WANT_TANGENT,
};

/// A loaded shared library.
#[derive(Clone)]
pub struct Library {
    path: PathBuf,
    inner: Arc<libloading::Library>,
}

impl std::fmt::Debug for Library {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Library").field("path", &self.path).finish()
    }
}

impl Library {
    /// Load the shared library at `path` (resolving all its references now, so that a missing
    /// dependency is reported here and not in the middle of a check).
    ///
    /// Loading runs the library's initialisers: open only libraries you trust.
    pub fn open(path: impl AsRef<Path>) -> Result<Library, LoadError> {
        let given = path.as_ref();
        let meta = match std::fs::metadata(given) {
            Ok(m) => m,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                return Err(LoadError::NotFound { path: given.to_path_buf() })
            }
            Err(source) => return Err(LoadError::Unreadable { path: given.to_path_buf(), source }),
        };
        if meta.is_dir() {
            return Err(LoadError::NotALibrary {
                path: given.to_path_buf(),
                what: "a directory".into(),
                hint: "Name the library file inside it (for example `build/libmodel.so`).".into(),
            });
        }
        let data = std::fs::read(given)
            .map_err(|source| LoadError::Unreadable { path: given.to_path_buf(), source })?;
        inspect(given, &data)?;
        drop(data);

        // A name without a slash would make the loader search the system paths instead.
        let path = std::path::absolute(given).unwrap_or_else(|_| given.to_path_buf());
        // Constructors run now: an exit() in one is reported as happening during the load.
        guard::prepare().map_err(|source| LoadError::Guard { source })?;
        crate::watch::loading(true);
        let opened = open_now(&path);
        crate::watch::loading(false);
        let lib = opened.map_err(|e| {
            // The loader's own words are in the source; the top level only says "dlopen failed".
            let reason = match std::error::Error::source(&e) {
                Some(s) => s.to_string(),
                None => e.to_string(),
            };
            open_error(given, &reason)
        })?;
        let inner = Arc::new(lib);
        // Never unloaded while the process lives: a thread the routine started (an OpenMP
        // pool, a helper) may still run its code after the check, and the report is written
        // after the routine is dropped. The loader is told so too (RTLD_NODELETE).
        std::mem::forget(Arc::clone(&inner));
        Ok(Library { path, inner })
    }

    /// The library's path (absolute).
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Whether the library exports `symbol`.
    pub fn has_symbol(&self, symbol: &str) -> bool {
        self.lookup::<RealFn>(symbol).is_some()
    }

    /// The names of the functions the library exports, read from its dynamic symbol table.
    pub fn exported_functions(&self) -> Result<Vec<String>, LoadError> {
        let data = std::fs::read(&self.path)
            .map_err(|source| LoadError::Unreadable { path: self.path.clone(), source })?;
        Ok(exported_functions(&data))
    }

    /// The routine exported as `symbol`, with its complex-step twin `symbol_cx` when the
    /// library exports one.
    ///
    /// The sizes in `info` (ncomp from its convention, nstate, nprop) are the lengths every
    /// call must pass; they are checked here once.
    pub fn routine(&self, symbol: &str, info: RoutineInfo) -> Result<LibraryRoutine, LoadError> {
        if symbol.is_empty() {
            return Err(LoadError::BadSymbolName { symbol: symbol.into(), why: "it is empty" });
        }
        if symbol.contains('\0') {
            return Err(LoadError::BadSymbolName { symbol: symbol.into(), why: "it contains a NUL byte" });
        }
        let call_sizes = call_sizes(&info)?;
        let real = self.lookup::<RealFn>(symbol).ok_or_else(|| self.missing_symbol(symbol))?;
        let twin = self.lookup::<ComplexFn>(&format!("{symbol}{TWIN_SUFFIX}"));
        let label = format!("{}:{symbol}", self.path.display());
        LibraryRoutine::assemble(info, call_sizes, symbol, real, twin, label, Some(self.clone()))
    }

    fn lookup<T: Copy>(&self, name: &str) -> Option<T> {
        let c = CString::new(name).ok()?;
        // SAFETY: T is one of the routine function-pointer types; the caller uses the pointer
        // only with the routine ABI's signature, as the symbol's name promises.
        unsafe { self.inner.get::<T>(c.as_bytes_with_nul()).ok().map(|s| *s) }
    }

    fn missing_symbol(&self, symbol: &str) -> LoadError {
        let exports = self.exported_functions().unwrap_or_default();
        let near = closest(symbol, &exports, 5);
        let hint = decoration_hint(symbol, &exports);
        LoadError::SymbolMissing { library: self.path.clone(), symbol: symbol.into(), near, hint }
    }
}

/// ncomp, nstate and nprop as the ABI's 32-bit fields; `ncomp * ncomp` must fit too.
fn call_sizes(info: &RoutineInfo) -> Result<(i32, i32, i32), LoadError> {
    let size = |what: &'static str, value: usize| -> Result<i32, LoadError> {
        i32::try_from(value).map_err(|_| LoadError::SizeTooLarge {
            routine: info.name.clone(),
            what,
            value,
            max: i32::MAX,
        })
    };
    let ncomp = info.convention.ncomp();
    let sizes = (size("ncomp", ncomp)?, size("nstate", info.nstate)?, size("nprop", info.nprop)?);
    size("ncomp * ncomp", ncomp * ncomp)?;
    Ok(sizes)
}

#[cfg(unix)]
fn open_now(path: &Path) -> Result<libloading::Library, libloading::Error> {
    use libloading::os::unix::{Library as UnixLibrary, RTLD_LOCAL, RTLD_NOW};
    // RTLD_NODELETE: the library stays mapped even after its last handle is closed.
    #[cfg(any(target_os = "linux", target_os = "android"))]
    const RTLD_NODELETE: i32 = 0x1000;
    #[cfg(target_vendor = "apple")]
    const RTLD_NODELETE: i32 = 0x80;
    #[cfg(not(any(target_os = "linux", target_os = "android", target_vendor = "apple")))]
    const RTLD_NODELETE: i32 = 0;
    // SAFETY: loading runs the library's initialisers; documented on `Library::open`.
    unsafe { UnixLibrary::open(Some(path), RTLD_NOW | RTLD_LOCAL | RTLD_NODELETE) }.map(Into::into)
}

#[cfg(not(unix))]
fn open_now(path: &Path) -> Result<libloading::Library, libloading::Error> {
    // SAFETY: as above.
    unsafe { libloading::Library::new(path) }
}

fn open_error(path: &Path, reason: &str) -> LoadError {
    let hint = if let Some(idx) = reason.find("undefined symbol: ") {
        let sym = reason[idx + "undefined symbol: ".len()..].split([' ', ',', ')']).next().unwrap_or("");
        let fortran = if sym.starts_with("_gfortran") {
            " It belongs to the Fortran run-time library: link with gfortran (or add -lgfortran)."
        } else if sym.ends_with('_') {
            " A trailing underscore is how gfortran names an external procedure: the library \
             calls a Fortran procedure that was not compiled into it."
        } else {
            ""
        };
        format!(
            ". The library uses `{sym}`, which neither it nor anything it links provides: add \
             the source or library that defines it when building (`tancheck build` links the \
             Fortran and math run-times itself).{fortran}"
        )
    } else if reason.contains("cannot open shared object file") {
        // The file itself exists (checked before): what is missing is a dependency.
        ". A library it depends on cannot be found: `ldd` on the file lists what is missing; \
         install it (for gfortran-built code the Fortran run-time comes with the compiler's \
         runtime package) or add its folder to LD_LIBRARY_PATH."
            .into()
    } else {
        ". Check that the file is a complete shared library built for this system (for \
         example with `tancheck build`)."
            .into()
    };
    LoadError::Open { path: path.to_path_buf(), reason: reason.to_string(), hint }
}

/// The architecture this process runs on, as `object` names it.
fn host_architecture() -> Option<object::Architecture> {
    use object::Architecture as A;
    Some(match std::env::consts::ARCH {
        "x86_64" if cfg!(target_pointer_width = "32") => A::X86_64_X32,
        "x86_64" => A::X86_64,
        "x86" => A::I386,
        "aarch64" => A::Aarch64,
        "arm" => A::Arm,
        "riscv64" => A::Riscv64,
        "riscv32" => A::Riscv32,
        "powerpc64" => A::PowerPc64,
        "powerpc" => A::PowerPc,
        "s390x" => A::S390x,
        "loongarch64" => A::LoongArch64,
        "mips64" => A::Mips64,
        "mips" => A::Mips,
        "sparc64" => A::Sparc64,
        _ => return None,
    })
}

fn architecture_name(a: object::Architecture) -> String {
    use object::Architecture as A;
    match a {
        A::X86_64 => "x86-64 (64-bit Intel/AMD)".into(),
        A::X86_64_X32 => "x86-64 with 32-bit pointers (x32)".into(),
        A::I386 => "32-bit x86 (i386)".into(),
        A::Aarch64 => "64-bit ARM (aarch64)".into(),
        A::Arm => "32-bit ARM".into(),
        A::Riscv64 => "64-bit RISC-V".into(),
        A::Riscv32 => "32-bit RISC-V".into(),
        A::PowerPc64 => "64-bit POWER".into(),
        A::PowerPc => "32-bit PowerPC".into(),
        A::S390x => "IBM Z (s390x)".into(),
        A::LoongArch64 => "64-bit LoongArch".into(),
        A::Mips64 => "64-bit MIPS".into(),
        A::Mips => "32-bit MIPS".into(),
        other => format!("{other:?}"),
    }
}

fn host_format() -> object::BinaryFormat {
    if cfg!(target_vendor = "apple") {
        object::BinaryFormat::MachO
    } else if cfg!(windows) {
        object::BinaryFormat::Pe
    } else {
        object::BinaryFormat::Elf
    }
}

fn format_name(f: object::BinaryFormat) -> &'static str {
    match f {
        object::BinaryFormat::Elf => "ELF (Linux and most Unix systems)",
        object::BinaryFormat::MachO => "Mach-O (macOS)",
        object::BinaryFormat::Pe => "PE (Windows)",
        object::BinaryFormat::Coff => "COFF (Windows object files)",
        object::BinaryFormat::Wasm => "WebAssembly",
        object::BinaryFormat::Xcoff => "XCOFF (AIX)",
        _ => "an object format",
    }
}

const BUILD_HINT: &str =
    "Build a shared library from the routine's sources with `tancheck build SOURCE... -o LIB` \
                          (or compile with -shared -fPIC yourself).";

/// Check that `data` is a shared library for this machine.
fn inspect(path: &Path, data: &[u8]) -> Result<(), LoadError> {
    let not_lib = |what: String, hint: &str| LoadError::NotALibrary {
        path: path.to_path_buf(),
        what,
        hint: hint.to_string(),
    };
    let kind = match object::FileKind::parse(data) {
        Ok(k) => k,
        Err(_) => return Err(not_lib(unknown_file_kind(data), BUILD_HINT)),
    };
    if kind == object::FileKind::Archive {
        return Err(not_lib(
            "a static archive (.a), which only a linker can use".into(),
            "Link it into a shared library (for example `cc -shared -o libmodel.so \
             -Wl,--whole-archive libmodel.a -Wl,--no-whole-archive`), or build from the sources \
             with `tancheck build`.",
        ));
    }
    let file = match object::File::parse(data) {
        Ok(f) => f,
        Err(e) => return Err(not_lib(format!("a damaged or truncated object file ({e})"), BUILD_HINT)),
    };
    let expected_format = host_format();
    if file.format() != expected_format {
        return Err(LoadError::WrongArchitecture {
            path: path.to_path_buf(),
            found: format!(
                "{} in {} format",
                architecture_name(file.architecture()),
                format_name(file.format())
            ),
            expected: format!("{} format", format_name(expected_format)),
            hint: format!("Rebuild it on this system. {BUILD_HINT}"),
        });
    }
    if let Some(host) = host_architecture() {
        let arch = file.architecture();
        let endian_ok = file.is_little_endian() == cfg!(target_endian = "little");
        if arch != host || !endian_ok {
            let mut found = architecture_name(arch);
            if !endian_ok {
                found.push_str(if file.is_little_endian() { ", little-endian" } else { ", big-endian" });
            }
            let hint = if arch == object::Architecture::I386 && host == object::Architecture::X86_64 {
                "A 32-bit library cannot be loaded into a 64-bit process: rebuild it without -m32."
                    .to_string()
            } else {
                format!("Rebuild it on (or cross-compile it for) this machine. {BUILD_HINT}")
            };
            return Err(LoadError::WrongArchitecture {
                path: path.to_path_buf(),
                found,
                expected: architecture_name(host),
                hint,
            });
        }
    }
    match file.kind() {
        object::ObjectKind::Dynamic => Ok(()),
        object::ObjectKind::Relocatable => Err(not_lib(
            "an object file (.o), the input of a linker".into(),
            "Link it into a shared library (`cc -shared -o libmodel.so model.o`; it must have \
             been compiled with -fPIC), or build from the sources with `tancheck build`.",
        )),
        object::ObjectKind::Executable => {
            Err(not_lib("an executable program, which cannot be loaded as a library".into(), BUILD_HINT))
        }
        object::ObjectKind::Core => Err(not_lib("a core dump".into(), BUILD_HINT)),
        _ => Err(not_lib("an object file of unknown kind".into(), BUILD_HINT)),
    }
}

fn unknown_file_kind(data: &[u8]) -> String {
    if data.is_empty() {
        return "an empty file".into();
    }
    let head = &data[..data.len().min(512)];
    let texty = head
        .iter()
        .all(|&b| b == b'\n' || b == b'\r' || b == b'\t' || (0x20..0x7f).contains(&b) || b >= 0x80);
    if texty {
        let text = String::from_utf8_lossy(head);
        if text.starts_with("#!") {
            "a script".into()
        } else if text.contains("GNU ld script")
            || text.trim_start().starts_with("INPUT(")
            || text.contains("GROUP (")
        {
            "a linker script (a text file that points the linker at other libraries)".into()
        } else if head.starts_with(b"\x7fELF") {
            "a truncated ELF file".into()
        } else {
            "a text file".into()
        }
    } else {
        "a file in a format that is not a shared library".into()
    }
}

/// Function names the library exports, without the linker's own.
fn exported_functions(data: &[u8]) -> Vec<String> {
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
fn edit_distance(a: &str, b: &str) -> usize {
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

/// One routine of a loaded library (or given by its function pointers), callable as a
/// [`Routine`] through the guarded trampoline and the memory guards of [`crate::guards`].
///
/// It keeps the library loaded as long as it lives. Every call, real or complex, goes through
/// the same path: the lengths are checked, the memory guards (at the routine's
/// [`GuardLevel`], [`GuardLevel::Light`] unless set otherwise) copy the arrays into the
/// guarded block made with the routine, and the trampoline makes the call. What the guards
/// find is collected in [`LibraryRoutine::findings`].
pub struct LibraryRoutine {
    info: RoutineInfo,
    symbol: String,
    ncomp: usize,
    nstate: usize,
    nprop: usize,
    /// ncomp, nstate, nprop as the ABI's 32-bit fields.
    call_sizes: (i32, i32, i32),
    real: RealFn,
    twin: Option<ComplexFn>,
    fp_traps: bool,
    label: CString,
    library: Option<Library>,
    guard_level: GuardLevel,
    /// The next real call runs at [`GuardLevel::Full`] (see `guard_next_call_fully`).
    full_next: bool,
    real_guards: GuardBuffers<f64>,
    complex_guards: Option<GuardBuffers<Complex64>>,
    findings: Findings,
}

impl std::fmt::Debug for LibraryRoutine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("LibraryRoutine")
            .field("library", &self.library.as_ref().map(|l| &l.path))
            .field("symbol", &self.symbol)
            .field("twin", &self.twin.is_some())
            .field("fp_traps", &self.fp_traps)
            .field("guard_level", &self.guard_level)
            .finish()
    }
}

impl LibraryRoutine {
    /// A routine given by its entry points instead of a library's symbols: a routine linked
    /// into this process (the C API's way in). `info.name` names it in reports and in the
    /// guard's message when the routine calls exit().
    ///
    /// # Safety
    /// `real` must have the routine ABI's real signature and `twin`, when given, the complex
    /// one (`tc_real` = `double _Complex`); both must stay callable while the routine lives.
    pub unsafe fn from_fn_pointers(
        info: RoutineInfo,
        real: RealFn,
        twin: Option<ComplexFn>,
    ) -> Result<LibraryRoutine, LoadError> {
        let call_sizes = call_sizes(&info)?;
        let name = info.name.replace('\0', " ");
        LibraryRoutine::assemble(info, call_sizes, &name, real, twin, name.clone(), None)
    }

    fn assemble(
        info: RoutineInfo,
        call_sizes: (i32, i32, i32),
        symbol: &str,
        real: RealFn,
        twin: Option<ComplexFn>,
        label: String,
        library: Option<Library>,
    ) -> Result<LibraryRoutine, LoadError> {
        guard::prepare().map_err(|source| LoadError::Guard { source })?;
        let label = CString::new(label.replace('\0', " ")).expect("NUL bytes were replaced");
        let (ncomp, nstate, nprop) = (info.convention.ncomp(), info.nstate, info.nprop);
        Ok(LibraryRoutine {
            ncomp,
            nstate,
            nprop,
            call_sizes,
            info,
            symbol: symbol.to_string(),
            real,
            twin,
            fp_traps: false,
            label,
            library,
            guard_level: GuardLevel::default(),
            full_next: false,
            real_guards: GuardBuffers::new(ncomp, nstate, nprop),
            complex_guards: twin.map(|_| GuardBuffers::new(ncomp, nstate, nprop)),
            findings: Findings::default(),
        })
    }

    /// The symbol this routine was loaded from (for one made from function pointers: its name).
    pub fn symbol(&self) -> &str {
        &self.symbol
    }

    /// The library it lives in; `None` for a routine made from function pointers.
    pub fn library(&self) -> Option<&Library> {
        self.library.as_ref()
    }

    /// Whether the library exports the complex-step twin `symbol_cx`.
    pub fn has_twin(&self) -> bool {
        self.twin.is_some()
    }

    /// Whether calls run with floating-point traps.
    pub fn fp_traps(&self) -> bool {
        self.fp_traps
    }

    /// Run the following calls with traps for invalid operation, division by zero and
    /// overflow, so that the first such operation stops the call with a SIGFPE
    /// ([`Fault::Crashed`]) instead of leaving inf or NaN in the results.
    ///
    /// With guards on, the outputs arrive filled with a signalling NaN: a routine that does
    /// arithmetic on an output before writing it (`stress[i] += ...`) then traps too.
    pub fn set_fp_traps(&mut self, on: bool) -> Result<(), TrapError> {
        if on && !guard::fp_traps_available() {
            return Err(TrapError::Unavailable { arch: std::env::consts::ARCH });
        }
        self.fp_traps = on;
        Ok(())
    }

    /// How much the memory guards check in every call.
    pub fn guard_level(&self) -> GuardLevel {
        self.guard_level
    }

    /// Set the guard level for the following calls. [`GuardLevel::Full`] makes every call
    /// twice; the extra calls are counted in [`LibraryRoutine::guard_calls`].
    pub fn set_guard_level(&mut self, level: GuardLevel) {
        self.guard_level = level;
    }

    /// What the guards found so far: one entry per kind and array, with the first call that
    /// showed it and how many calls did.
    pub fn findings(&self) -> &[GuardFinding] {
        self.findings.list()
    }

    /// The findings so far, leaving none.
    pub fn take_findings(&mut self) -> Vec<GuardFinding> {
        self.findings.take()
    }

    /// Calls the guards made besides the caller's (reruns of [`GuardLevel::Full`]).
    pub fn guard_calls(&self) -> u64 {
        self.findings.extra_calls
    }

    fn tc_call<S>(&self, input: &CallInput<'_, S>) -> TcCall {
        TcCall {
            abi_version: ABI_VERSION,
            ncomp: self.call_sizes.0,
            nstate: self.call_sizes.1,
            nprop: self.call_sizes.2,
            increment: input.increment,
            flags: if input.want_tangent { WANT_TANGENT } else { 0 },
            time: input.time[0],
            dtime: input.time[1],
        }
    }

    /// The lengths every call passes must be the ones announced in `tc_call`: the routine
    /// trusts them. A few integer comparisons, checked in release builds too, because a
    /// wrong length here would let the routine write past a buffer.
    fn check_lengths<S>(&self, input: &CallInput<'_, S>, output: &CallOutput<'_, S>) {
        let (n, ns, np) = (self.ncomp, self.nstate, self.nprop);
        assert!(
            input.props.len() == np
                && input.strain.len() == n
                && input.dstrain.len() == n
                && input.stress0.len() == n
                && input.state0.len() == ns
                && output.stress.len() == n
                && output.state.len() == ns
                && output.tangent.len() == n * n
                && output.dstress_dtemp.len() == n,
            "call to `{}` with arrays of the wrong length (expected ncomp = {n}, nstate = {ns}, nprop = {np})",
            self.info.name
        );
    }

    fn args<S>(
        &self,
        call: &TcCall,
        temp: &[S; 2],
        input: &CallInput<'_, S>,
        output: &mut CallOutput<'_, S>,
    ) -> GuardArgs {
        GuardArgs {
            call,
            props: input.props.as_ptr().cast(),
            strain: input.strain.as_ptr().cast(),
            dstrain: input.dstrain.as_ptr().cast(),
            temp: temp.as_ptr().cast(),
            stress0: input.stress0.as_ptr().cast(),
            state0: input.state0.as_ptr().cast(),
            stress: output.stress.as_mut_ptr().cast(),
            state: output.state.as_mut_ptr().cast(),
            tangent: output.tangent.as_mut_ptr().cast(),
            dstress_dtemp: output.dstress_dtemp.as_mut_ptr().cast(),
            energy: output.energy.as_mut_ptr().cast(),
            report: std::ptr::from_mut::<Outcome>(output.outcome),
            label: self.label.as_ptr(),
            fp_traps: i32::from(self.fp_traps),
            reserved: 0,
        }
    }
}

/// The ABI promises these fields before every call, whoever the caller is.
fn reset_outcome(o: &mut Outcome) {
    o.status = tancheck_core::routine::status::OK;
    o.branch = -1;
    o.provides = 0;
    o.reserved = 0;
}

impl LibraryRoutine {
    /// A guard finding first seen in the call that just returned ends that call with
    /// [`Fault::Misbehaved`], so the report keeps the call's inputs. (Allocates only then.)
    fn new_finding(&self, known: usize) -> Result<(), Fault> {
        match self.findings.list().get(known) {
            None => Ok(()),
            Some(f) => Err(Fault::Misbehaved { what: f.to_string() }),
        }
    }
}

impl Routine for LibraryRoutine {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }

    fn call(&mut self, input: &CallInput<'_, f64>, output: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.check_lengths(input, output);
        reset_outcome(output.outcome);
        let call = self.tc_call(input);
        let real = self.real;
        let known = self.findings.list().len();
        let level = if std::mem::take(&mut self.full_next) { GuardLevel::Full } else { self.guard_level };
        if level == GuardLevel::Off {
            let temp = input.temp;
            let args = self.args(&call, &temp, input, output);
            // SAFETY: `real` has the ABI's real signature (looked up by name, or promised by
            // the caller of `from_fn_pointers`); every array has the length announced in
            // `call` (check_lengths), and `call`, `temp` outlive the call.
            unsafe { guard::call_real(real, &args) }.map_err(guard::Crash::into_fault)?;
        } else {
            self.real_guards
                .call(
                    level,
                    &call,
                    self.label.as_ptr(),
                    self.fp_traps,
                    false,
                    input,
                    output,
                    &mut self.findings,
                    // SAFETY: as above; the guarded block holds every array at the announced
                    // length, each followed by its zone.
                    |args| unsafe { guard::call_real(real, args) },
                )
                .map_err(guard::Crash::into_fault)?;
        }
        self.new_finding(known)?;
        status_fault(output.outcome)
    }

    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        if self.twin.is_some() {
            Some(self)
        } else {
            None
        }
    }

    /// With the guards on (light or full), the next real call runs at the full level; with
    /// them off, nothing changes.
    fn guard_next_call_fully(&mut self) -> bool {
        self.full_next = self.guard_level != GuardLevel::Off;
        self.full_next
    }
}

impl ComplexRoutine for LibraryRoutine {
    fn call_complex(
        &mut self,
        input: &CallInput<'_, Complex64>,
        output: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        let Some(twin) = self.twin else {
            return Err(Fault::Unsupported(format!(
                "the library exports no complex-step twin `{}{TWIN_SUFFIX}`; rebuild it with \
                 `tancheck build` (without --no-twin)",
                self.symbol
            )));
        };
        self.check_lengths(input, output);
        reset_outcome(output.outcome);
        let call = self.tc_call(input);
        let known = self.findings.list().len();
        match (self.guard_level, self.complex_guards.as_mut()) {
            (GuardLevel::Light | GuardLevel::Full, Some(guards)) => {
                guards
                    .call(
                        self.guard_level,
                        &call,
                        self.label.as_ptr(),
                        self.fp_traps,
                        true,
                        input,
                        output,
                        &mut self.findings,
                        // SAFETY: as in `call`, with the twin's complex signature; Complex64 is
                        // repr(C) and laid out as C's double _Complex.
                        |args| unsafe { guard::call_complex(twin, args) },
                    )
                    .map_err(guard::Crash::into_fault)?;
            }
            _ => {
                let temp = input.temp;
                let args = self.args(&call, &temp, input, output);
                // SAFETY: as in `call`, with the twin's complex signature; Complex64 is
                // repr(C) and laid out as C's double _Complex.
                unsafe { guard::call_complex(twin, &args) }.map_err(guard::Crash::into_fault)?;
            }
        }
        self.new_finding(known)?;
        status_fault(output.outcome)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(v: &[&str]) -> Vec<String> {
        v.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn edit_distance_is_levenshtein() {
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("abc", "abc"), 0);
        assert_eq!(edit_distance("flaw", "lawn"), 2);
    }

    #[test]
    fn closest_ranks_by_distance_ignoring_case() {
        let exports =
            names(&["zzz", "Elastic", "j2_model", "elastik_cx", "__mats_MOD_elastic", "Elastic_cx"]);
        let near = closest("elastic", &exports, 3);
        assert_eq!(near[0], "Elastic");
        assert!(near.contains(&"__mats_MOD_elastic".to_string()), "{near:?}");
        assert!(!near.contains(&"Elastic_cx".to_string()), "{near:?}");
        assert!(near.contains(&"elastik_cx".to_string()), "a twin without its base stays: {near:?}");
        assert_eq!(closest("elastic_cx", &exports, 1), vec!["Elastic_cx".to_string()]);
        assert_eq!(closest("x", &exports, 10).len(), 5);
    }

    #[test]
    fn hints_recognise_decorations() {
        let ex = names(&["mymodel_", "other"]);
        assert!(decoration_hint("mymodel", &ex).contains("gfortran"), "{}", decoration_hint("mymodel", &ex));
        let ex = names(&["__materials_MOD_mymodel"]);
        let h = decoration_hint("mymodel", &ex);
        assert!(h.contains("module `materials`"), "{h}");
        let ex = names(&["_Z7mymodelPKdPd"]);
        assert!(decoration_hint("mymodel", &ex).contains("extern \"C\""));
        let ex = names(&["mymodel"]);
        assert!(decoration_hint("mymodel_", &ex).contains("without the trailing underscore"));
        assert_eq!(decoration_hint("mymodel", &names(&["unrelated"])), "");
    }

    #[test]
    fn text_is_recognised_as_text() {
        assert_eq!(unknown_file_kind(b"hello\nworld\n"), "a text file");
        assert_eq!(unknown_file_kind(b""), "an empty file");
        assert!(unknown_file_kind(b"/* GNU ld script */ GROUP ( libc.so.6 )").contains("linker script"));
    }
}
