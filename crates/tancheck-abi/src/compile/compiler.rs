//! The C and Fortran compilers: found from `$CC` and `$FC`, run with their output kept in the
//! build log, and asked whether they exist at all.

use std::process::Command;

use super::language::Language;
use crate::build_log::{BuildCommand, BuildLog};
use crate::error::BuildError;

/// A compiler: program plus leading arguments from the environment.
#[derive(Clone, Debug)]
pub(super) struct Compiler {
    pub(super) program: String,
    pub(super) pre: Vec<String>,
    language: &'static str,
    var: &'static str,
    example: &'static str,
    install: &'static str,
}

pub(super) const FORTRAN_INSTALL: &str = ", or install gfortran with the system package manager (for \
                               example `apt-get install gfortran`, `dnf install gcc-gfortran` \
                               or `brew install gcc`)";
pub(super) const C_INSTALL: &str = ", or install a C compiler with the system package manager (for \
                         example `apt-get install gcc`)";

impl Compiler {
    pub(super) fn from_env(language: Language) -> Result<Compiler, BuildError> {
        let (var, default, name, example, install) = match language {
            Language::C => ("CC", "cc", "C", "/usr/bin/gcc", C_INSTALL),
            Language::Fortran => ("FC", "gfortran", "Fortran", "/usr/bin/gfortran-12", FORTRAN_INSTALL),
        };
        let (program, pre) = match std::env::var_os(var) {
            None => (default.to_string(), Vec::new()),
            Some(v) => {
                let v = v.to_string_lossy().into_owned();
                let mut words = v.split_whitespace().map(str::to_string);
                match words.next() {
                    Some(p) => (p, words.collect()),
                    None => return Err(BuildError::EmptyCompilerVar { var, default }),
                }
            }
        };
        Ok(Compiler { program, pre, language: name, var, example, install })
    }

    /// Run the compiler; a program that cannot be started is a [`BuildError::CompilerMissing`].
    pub(super) fn run(
        &self,
        stage: String,
        args: Vec<String>,
        log: &mut BuildLog,
        hint: impl Fn(&str) -> String,
    ) -> Result<(), BuildError> {
        let mut all = self.pre.clone();
        all.extend(args);
        let out =
            Command::new(&self.program).args(&all).output().map_err(|e| BuildError::CompilerMissing {
                language: self.language,
                program: self.program.clone(),
                var: self.var,
                example: self.example,
                reason: if e.kind() == std::io::ErrorKind::NotFound {
                    "no such program on PATH".to_string()
                } else {
                    e.to_string()
                },
                install: self.install,
            })?;
        let step = BuildCommand {
            stage,
            program: self.program.clone(),
            args: all,
            stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
            success: out.status.success(),
        };
        log.commands.push(step.clone());
        if out.status.success() {
            return Ok(());
        }
        let mut output = step.stderr.clone();
        if !step.stdout.trim().is_empty() {
            output.push_str(&step.stdout);
        }
        if !output.ends_with('\n') {
            output.push('\n');
        }
        let h = hint(&output);
        Err(BuildError::CompilerFailed {
            stage: step.stage.clone(),
            command: step.command_line(),
            code: out.status.code(),
            output,
            hint: h,
            log: Box::new(log.clone()),
        })
    }
}

/// Whether a Fortran compiler (`$FC`, default `gfortran`) can be run.
pub fn fortran_available() -> bool {
    compiler_runs(Language::Fortran)
}

/// For tests that need Fortran: `true` when a Fortran compiler runs; otherwise a panic that
/// names the test and says how to mark it. Such a test carries
/// `#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]` (the cfg comes from the build
/// script of the test's package and is never set under `TANCHECK_REQUIRE_FORTRAN=1`, as CI
/// sets), so without a compiler the test summary counts it as ignored instead of passing it
/// unrun; this call is the loud failure when a test runs without one all the same.
pub fn fortran_for_test(test: &str) -> bool {
    if fortran_available() {
        return true;
    }
    panic!(
        "{test}: no Fortran compiler (set FC, or install gfortran with the system package manager); \
         a test that needs one is marked #[cfg_attr(tancheck_no_fortran, ignore = \"needs gfortran\")]"
    );
}

/// Whether a C compiler (`$CC`, default `cc`) can be run.
pub fn c_available() -> bool {
    compiler_runs(Language::C)
}

pub(super) fn compiler_runs(language: Language) -> bool {
    let Ok(c) = Compiler::from_env(language) else { return false };
    Command::new(&c.program)
        .args(&c.pre)
        .arg("--version")
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}
