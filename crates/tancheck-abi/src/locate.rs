//! Where in a loaded library an instruction is: the library file and offset, the nearest
//! exported symbol, and — when the library has debug information — the function, source
//! file and line (read with the `addr2line` crate).
//!
//! The guard's signal handler only stores the interrupted instruction's address; this runs
//! after the guarded call has returned, on the failure path (it allocates and reads files).

use std::ffi::CStr;
use std::fmt;
use std::path::PathBuf;

/// A code address, resolved.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct CodeLocation {
    /// The absolute address in this process.
    pub address: u64,
    /// The shared object holding it, when the dynamic loader knows one.
    pub object: Option<PathBuf>,
    /// `address` relative to the object's load address.
    pub offset: Option<u64>,
    /// The nearest exported symbol at or before the address.
    pub symbol: Option<String>,
    /// From the debug information: the innermost function (after inlining)...
    pub function: Option<String>,
    /// ...and its source file and line.
    pub file: Option<String>,
    pub line: Option<u32>,
}

impl CodeLocation {
    /// Whether the debug information named a file and line.
    pub fn has_line(&self) -> bool {
        self.file.is_some() && self.line.is_some()
    }
}

impl fmt::Display for CodeLocation {
    /// "in `f` at src/x.c:12 (libx.so+0x1139)"; without debug information
    /// "in `f` (libx.so+0x1139; no debug information for file and line: build with -g)".
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.function.as_ref().or(self.symbol.as_ref()) {
            Some(name) => write!(f, "in `{name}`")?,
            None => write!(f, "in unknown code")?,
        }
        if let (Some(file), Some(line)) = (&self.file, self.line) {
            write!(f, " at {file}:{line}")?;
        }
        let place = match (&self.object, self.offset) {
            (Some(o), Some(off)) => {
                let name = o.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
                format!("{name}+{off:#x}")
            }
            _ => format!("{:#x}", self.address),
        };
        if self.has_line() || self.object.is_none() {
            write!(f, " ({place})")
        } else if self.object.as_deref().is_some_and(is_system_library) {
            write!(f, " ({place}, a system library)")
        } else {
            write!(
                f,
                " ({place}; no debug information for file and line: rebuild with `tancheck build --debug` or -g)"
            )
        }
    }
}

/// Libraries loaded anew from a copy in memory: (the name the loader knows the copy by, the
/// file it was copied from).
static COPIES: std::sync::Mutex<Vec<(PathBuf, PathBuf)>> = std::sync::Mutex::new(Vec::new());

/// The file a library the loader knows as `loaded` was copied from, when it is a copy in
/// memory made by `Library::open_fresh` (a crash report names the library, not the copy).
fn copied_from(loaded: &std::path::Path) -> Option<PathBuf> {
    let copies = COPIES.lock().unwrap_or_else(std::sync::PoisonError::into_inner);
    copies.iter().find(|(c, _)| c == loaded).map(|(_, o)| o.clone())
}

/// Remember that the loader knows the library copied from `original` as `loaded`.
pub(crate) fn note_copy(loaded: PathBuf, original: PathBuf) {
    COPIES.lock().unwrap_or_else(std::sync::PoisonError::into_inner).push((loaded, original));
}

/// The shared object (or program) holding `address`, as the dynamic loader names it.
pub fn object_of(address: u64) -> Option<PathBuf> {
    if address == 0 {
        return None;
    }
    // SAFETY: as in `locate`.
    let mut info: libc::Dl_info = unsafe { std::mem::zeroed() };
    if unsafe { libc::dladdr(address as usize as *const libc::c_void, &mut info) } == 0
        || info.dli_fname.is_null()
    {
        return None;
    }
    // SAFETY: a NUL-terminated string owned by the loader.
    let name = unsafe { CStr::from_ptr(info.dli_fname) }.to_string_lossy().into_owned();
    (!name.is_empty()).then(|| PathBuf::from(name))
}

/// A library of the system or of a compiler's run time, not the routine's: the C and math
/// libraries, the loader, the Fortran, quad-precision, GCC and C++ run times, by file name.
pub fn is_system_library(object: &std::path::Path) -> bool {
    const NAMES: [&str; 9] = [
        "libm.so",
        "libc.so",
        "libmvec.so",
        "ld-linux",
        "libgfortran.so",
        "libquadmath.so",
        "libgcc_s.so",
        "libstdc++.so",
        "libpthread.so",
    ];
    let name = object.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    NAMES.iter().any(|n| name.starts_with(n))
}

/// Resolve a code address of this process. `None` for address 0.
pub fn locate(address: u64) -> Option<CodeLocation> {
    if address == 0 {
        return None;
    }
    let mut loc = CodeLocation {
        address,
        object: None,
        offset: None,
        symbol: None,
        function: None,
        file: None,
        line: None,
    };
    // SAFETY: dladdr only reads the loader's tables; `info` is a valid out-pointer and the
    // strings it returns live as long as the object stays loaded (we copy them at once).
    let mut info: libc::Dl_info = unsafe { std::mem::zeroed() };
    let found = unsafe { libc::dladdr(address as usize as *const libc::c_void, &mut info) } != 0;
    if !found {
        return Some(loc);
    }
    if !info.dli_fname.is_null() {
        // SAFETY: a NUL-terminated string owned by the loader (see above).
        let name = unsafe { CStr::from_ptr(info.dli_fname) }.to_string_lossy().into_owned();
        if !name.is_empty() {
            loc.object = Some(PathBuf::from(name));
        }
    }
    if !info.dli_sname.is_null() {
        // SAFETY: as above.
        loc.symbol = Some(unsafe { CStr::from_ptr(info.dli_sname) }.to_string_lossy().into_owned());
    }
    let base = info.dli_fbase as usize as u64;
    loc.offset = address.checked_sub(base);
    if let (Some(object), Some(offset)) = (loc.object.clone(), loc.offset) {
        // A shared object's addresses in the file start at its load address; the main
        // program of a non-position-independent build is loaded where its file says.
        let probe = if is_fixed_position(&object) { address } else { offset };
        debug_info(&object, probe, &mut loc);
    }
    // A library loaded anew from a copy in memory is named by the file it was copied from
    // (its debug information was read from the copy, the very bytes that ran).
    if let Some(original) = loc.object.as_deref().and_then(copied_from) {
        loc.object = Some(original);
    }
    Some(loc)
}

fn is_fixed_position(object: &std::path::Path) -> bool {
    use object::read::Object;
    let Ok(data) = std::fs::read(object) else { return false };
    object::File::parse(&*data).is_ok_and(|f| f.kind() == object::ObjectKind::Executable)
}

fn debug_info(object: &std::path::Path, probe: u64, loc: &mut CodeLocation) {
    let Ok(loader) = addr2line::Loader::new(object) else { return };
    if let Ok(mut frames) = loader.find_frames(probe) {
        // The first frame is the innermost (an inlined function when there is one).
        while let Ok(Some(frame)) = frames.next() {
            if loc.function.is_none() {
                if let Some(f) = frame.function.as_ref().and_then(|f| f.raw_name().ok()) {
                    loc.function = Some(f.into_owned());
                }
            }
            if loc.file.is_none() {
                if let Some(l) = &frame.location {
                    loc.file = l.file.map(str::to_string);
                    loc.line = l.line;
                }
            }
            if loc.function.is_some() && loc.file.is_some() {
                break;
            }
        }
    }
    if loc.file.is_none() {
        if let Ok(Some(l)) = loader.find_location(probe) {
            loc.file = l.file.map(str::to_string);
            loc.line = l.line;
        }
    }
    if loc.function.is_none() {
        loc.function = loader.find_symbol(probe).map(str::to_string);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[inline(never)]
    fn here() -> u64 {
        here as fn() -> u64 as usize as u64
    }

    #[test]
    fn an_address_in_this_test_binary_names_its_function_and_file() {
        let loc = locate(here() + 1).expect("a nonzero address");
        assert!(loc.object.is_some(), "{loc:?}");
        // Test binaries are built with debug information by default.
        let f = loc.function.clone().unwrap_or_default();
        assert!(f.contains("here"), "{loc:?}");
        assert!(loc.file.as_deref().is_some_and(|f| f.ends_with("locate.rs")), "{loc:?}");
        assert!(loc.to_string().contains("locate.rs:"), "{loc}");
    }

    #[test]
    fn address_zero_is_nowhere() {
        assert_eq!(locate(0), None);
    }
}
