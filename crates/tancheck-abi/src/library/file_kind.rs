//! What a file is before the system loader sees it: this machine's architecture and binary
//! format against the file's, and a plain name for files that are not shared libraries.

use std::path::Path;

use object::Object;

use crate::error::LoadError;

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
pub(super) fn inspect(path: &Path, data: &[u8]) -> Result<(), LoadError> {
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

pub(super) fn unknown_file_kind(data: &[u8]) -> String {
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
