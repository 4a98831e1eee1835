//! Why a library or a routine in it could not be loaded, and why a build failed.
//!
//! Every message says what is wrong and what to do about it.

use std::path::PathBuf;

/// A library or a routine in it that cannot be loaded.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum LoadError {
    /// The path names no file.
    #[error(
        "no file `{}` (the path as it was looked for: a manifest's relative paths start from its \
         own folder): check the path, or build the library first with `tancheck build SOURCE... -o {}`",
        path.display(),
        path.display()
    )]
    NotFound { path: PathBuf },

    /// The file exists but cannot be read.
    #[error("cannot read `{}`: {source}; check that the file is readable by this user", path.display())]
    Unreadable {
        path: PathBuf,
        #[source]
        source: std::io::Error,
    },

    /// The file is not a shared library (text, a static archive, an object file...).
    #[error("`{}` is not a shared library: it is {what}. {hint}", path.display())]
    NotALibrary { path: PathBuf, what: String, hint: String },

    /// A shared library, but for another kind of machine.
    #[error(
        "`{}` is a library for {found}, but this tancheck runs on {expected} and can only load \
         libraries for {expected}. {hint}",
        path.display()
    )]
    WrongArchitecture { path: PathBuf, found: String, expected: String, hint: String },

    /// The system loader refused the library.
    #[error("cannot load `{}`: {reason}{hint}", path.display())]
    Open { path: PathBuf, reason: String, hint: String },

    /// A second instance of a library that loaded once cannot be made (see
    /// `Library::open_fresh`).
    #[error("cannot load a new instance of `{}` from a copy in memory: {why}", path.display())]
    NoNewInstance { path: PathBuf, why: String },

    /// The symbol name cannot be a C symbol.
    #[error(
        "`{symbol}` cannot be a symbol name: {why}; give the routine's name exactly as the \
         library exports it"
    )]
    BadSymbolName { symbol: String, why: &'static str },

    /// The library does not export the routine.
    #[error("{}", missing_symbol_message(library, symbol, near, hint))]
    SymbolMissing { library: PathBuf, symbol: String, near: Vec<String>, hint: String },

    /// A size in the routine's description does not fit the ABI's 32-bit fields.
    #[error(
        "routine `{routine}` declares {what} = {value}, more than the routine ABI can pass \
         (at most {max}); check the manifest"
    )]
    SizeTooLarge { routine: String, what: &'static str, value: usize, max: i32 },

    /// The crash guard could not install its signal handlers.
    #[error(
        "cannot install the crash guard's signal handlers: {source}; tancheck needs them to \
         survive a crashing routine. Another library that blocks sigaction is the usual cause"
    )]
    Guard {
        #[source]
        source: std::io::Error,
    },
}

fn missing_symbol_message(library: &std::path::Path, symbol: &str, near: &[String], hint: &str) -> String {
    let mut m = format!("`{}` exports no symbol `{symbol}`.", library.display());
    if near.is_empty() {
        m.push_str(" It exports no functions at all: was it built from the right sources?");
    } else {
        m.push_str(" Closest exported symbols: ");
        let list: Vec<String> = near.iter().map(|n| format!("`{n}`")).collect();
        m.push_str(&list.join(", "));
        m.push('.');
    }
    if !hint.is_empty() {
        m.push(' ');
        m.push_str(hint);
    }
    m.push_str(
        "\nCompilers decorate names: gfortran appends an underscore to an external procedure \
         without bind(C) (`name_`), names a module procedure `__<module>_MOD_<name>`, and \
         exports exactly the given name for bind(C, name=\"...\"); C++ mangles every name not \
         declared extern \"C\". Give the symbol as the library exports it, or export the \
         routine under a plain name with bind(C, name=\"...\") or extern \"C\".",
    );
    m.push_str(&format!(
        " (The complex-step twin is looked up as `{symbol}{}`.)",
        crate::signal_guard::TWIN_SUFFIX
    ));
    m
}

/// A setting of the routine's guards, given by name, that does not exist.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SettingError {
    #[error("unknown guard level `{0}`; expected off, light or full")]
    UnknownGuardLevel(String),
}

/// Floating-point traps cannot be switched on.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum TrapError {
    #[error(
        "this machine ({arch}) cannot trap floating-point exceptions, so a division by zero or \
         an invalid operation cannot stop the routine; check without traps (the results will \
         show inf or NaN instead), or run the check on an x86-64 machine to find the line"
    )]
    Unavailable { arch: &'static str },
}

/// A build of routine sources into a shared library that failed.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum BuildError {
    #[error(
        "nothing to build: give at least one source file (C: .c; Fortran: .f, .f90, .F90, \
         .f95, .f03, .f08)"
    )]
    NoSources,

    #[error("no source file `{}`: check the path", path.display())]
    SourceNotFound { path: PathBuf },

    #[error(
        "`{}`: tancheck cannot tell which compiler this is for; C sources end in .c, Fortran \
         sources in .f, .f90, .F90, .f95, .f03 or .f08",
        path.display()
    )]
    UnknownSource { path: PathBuf },

    #[error("{var} is set but names no program; unset it to use `{default}`, or name a compiler")]
    EmptyCompilerVar { var: &'static str, default: &'static str },

    #[error(
        "cannot run the {language} compiler `{program}`: {reason}. Set {var} to the {language} \
         compiler to use (for example {var}={example}){install}"
    )]
    CompilerMissing {
        language: &'static str,
        program: String,
        var: &'static str,
        example: &'static str,
        reason: String,
        install: &'static str,
    },

    #[error(
        "{stage} failed ({}). The command was:\n  {command}\n{output}{hint}",
        exit_text(*code)
    )]
    CompilerFailed {
        /// "compiling `x.f90`", "linking `libx.so`"...
        stage: String,
        command: String,
        /// The exit code, or `None` when a signal ended the compiler.
        code: Option<i32>,
        /// The compiler's stderr (and stdout, when it wrote any).
        output: String,
        hint: String,
        /// Every command run until then, the failing one last.
        log: Box<crate::build_log::BuildLog>,
    },

    #[error("cannot {action} `{}`: {source}", path.display())]
    Io {
        action: &'static str,
        path: PathBuf,
        #[source]
        source: std::io::Error,
    },
}

fn exit_text(code: Option<i32>) -> String {
    match code {
        Some(c) => format!("exit status {c}"),
        None => "killed by a signal".to_string(),
    }
}
