//! A shared library of material routines, and one routine in it as a [`Routine`](tancheck_core::Routine).
//!
//! [`Library::open`] checks the file (exists, is a shared library for this machine) before
//! handing it to the system loader, so that a wrong file gets a message that says what it is.
//! [`Library::routine`] finds a symbol and, by the `_cx` suffix, its complex-step twin. A
//! missing symbol lists the closest exported names and explains compilers' name decoration.

use std::ffi::CString;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use tancheck_core::RoutineInfo;

use crate::error::LoadError;
use crate::signal_guard::{self as guard, ComplexFn, RealFn, TWIN_SUFFIX};

mod file_kind;
mod finite;
mod routine;
mod symbols;

use file_kind::inspect;
pub use finite::{FiniteLibraryRoutine, TcFiniteCall, FINITE_ABI_VERSION};
pub use routine::LibraryRoutine;
use symbols::exported_functions;
pub(crate) use symbols::{closest, decoration_hint};

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

    /// The library at `path` loaded anew, as a second instance beside any loaded before:
    /// its own static and SAVE variables (and what its constructors set up) start as they do
    /// on a first load, whatever calls were made to an instance loaded earlier. The loader
    /// keeps one instance per file, so this loads a copy of the file held in memory (a
    /// `memfd`, never written to disk, kept open while the process lives so that a crash
    /// report can still read its debug information). Its constructors run again; the
    /// libraries it depends on are the ones the first instance loaded (matched by name), with
    /// their own statics as the first instance left them; and code that looks for files
    /// beside the library finds none (the copy has no folder). The returned library reports
    /// `path`. Linux only; elsewhere, and when the copy cannot be made or loaded,
    /// [`LoadError::NoNewInstance`] says why.
    pub fn open_fresh(path: impl AsRef<Path>) -> Result<Library, LoadError> {
        let given = path.as_ref();
        let no = |why: String| LoadError::NoNewInstance { path: given.to_path_buf(), why };
        let data = std::fs::read(given)
            .map_err(|source| LoadError::Unreadable { path: given.to_path_buf(), source })?;
        let copy = memory_copy(&data).map_err(|e| no(format!("no copy in memory: {e}")))?;
        let original = std::path::absolute(given).unwrap_or_else(|_| given.to_path_buf());
        crate::locate::note_copy(copy.clone(), original.clone());
        let mut lib = Library::open(&copy).map_err(|e| match e {
            LoadError::Open { reason, .. } => no(reason),
            other => no(other.to_string()),
        })?;
        lib.path = original;
        Ok(lib)
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

    pub(crate) fn lookup<T: Copy>(&self, name: &str) -> Option<T> {
        let c = CString::new(name).ok()?;
        // SAFETY: T is one of the routine function-pointer types; the caller uses the pointer
        // only with the routine ABI's signature, as the symbol's name promises.
        unsafe { self.inner.get::<T>(c.as_bytes_with_nul()).ok().map(|s| *s) }
    }

    pub(crate) fn missing_symbol(&self, symbol: &str) -> LoadError {
        let exports = self.exported_functions().unwrap_or_default();
        let near = closest(symbol, &exports, 5);
        let hint = decoration_hint(symbol, &exports);
        LoadError::SymbolMissing { library: self.path.clone(), symbol: symbol.into(), near, hint }
    }
}

/// ncomp, nstate and nprop as the ABI's 32-bit fields; `ncomp * ncomp` must fit too.
pub(super) fn call_sizes(info: &RoutineInfo) -> Result<(i32, i32, i32), LoadError> {
    let size = |what: &'static str, value: usize| -> Result<i32, LoadError> {
        i32::try_from(value).map_err(|_| LoadError::SizeTooLarge {
            routine: info.name.clone(),
            what,
            value,
            max: i32::MAX,
        })
    };
    let ncomp = info.convention.ncomp();
    let sizes = (size("ncomp", ncomp)?, size("nstate", info.nstate)?, size("nproperties", info.nprop)?);
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

/// `data` in an anonymous file in memory, by the name the loader can open it by
/// (`/proc/self/fd/N`). The file stays open for the rest of the process.
#[cfg(target_os = "linux")]
fn memory_copy(data: &[u8]) -> std::io::Result<PathBuf> {
    use std::io::Write;
    use std::os::fd::FromRawFd;
    let name = c"tancheck-new-instance";
    // SAFETY: a valid NUL-terminated name and flags; the result is checked.
    let fd = unsafe { libc::memfd_create(name.as_ptr(), libc::MFD_CLOEXEC) };
    if fd < 0 {
        return Err(std::io::Error::last_os_error());
    }
    // SAFETY: `fd` was just created and is owned by nothing else.
    let mut file = unsafe { std::fs::File::from_raw_fd(fd) };
    file.write_all(data)?;
    let at = PathBuf::from(format!("/proc/self/fd/{fd}"));
    // Kept open: the loaded instance is known by this name (see `Library::open_fresh`).
    std::mem::forget(file);
    Ok(at)
}

#[cfg(not(target_os = "linux"))]
fn memory_copy(_data: &[u8]) -> std::io::Result<PathBuf> {
    Err(std::io::Error::new(std::io::ErrorKind::Unsupported, "a new instance of a library needs Linux"))
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
    } else if reason.contains("File name too long") {
        // Not a missing dependency: the path itself is past the system's limit.
        format!(
            ". The library's path is {} bytes long, more than the system takes (4096 on Linux, a \
             name within it 255): move the library, or a folder on its way, to a shorter path.",
            path.as_os_str().len()
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

#[cfg(test)]
mod tests {
    use super::file_kind::unknown_file_kind;
    use super::symbols::edit_distance;
    use super::*;

    // A path past the system's limit is said so, not taken for a missing dependency (the
    // loader's words hold "cannot open shared object file" for both; found by a user-style
    // sweep with a library 4,400 bytes deep).
    #[test]
    fn a_path_too_long_is_not_a_missing_dependency() {
        let long = PathBuf::from(format!("/tmp/{}/libx.so", "d/".repeat(2300)));
        let e = open_error(&long, "libx.so: cannot open shared object file: File name too long");
        let LoadError::Open { hint, .. } = e else { panic!("{e:?}") };
        assert!(hint.contains("shorter path") && !hint.contains("ldd"), "{hint}");
        let e =
            open_error(&long, "libgfortran.so.5: cannot open shared object file: No such file or directory");
        let LoadError::Open { hint, .. } = e else { panic!("{e:?}") };
        assert!(hint.contains("ldd"), "{hint}");
    }

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
