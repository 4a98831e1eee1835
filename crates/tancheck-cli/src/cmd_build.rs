//! `tancheck build`: compile C and Fortran sources into a shared library of routines, with
//! their complex-step twins, showing what the compilers say.

use std::io::Write;
use std::path::PathBuf;

use anyhow::Result;
use clap::Args;

use crate::exit;

#[derive(Args, Debug)]
#[command(after_help = "Compilers: CC (default cc) for C, FC (default gfortran) for Fortran; each may \
hold a program and leading arguments (CC=\"ccache gcc\"). The Fortran compiler links when there is \
Fortran. Warnings the compilers print are shown on standard error; a compiler error fails the build \
with the compiler's own words (exit 2).")]
pub struct BuildArgs {
    /// C (.c) and Fortran (.f, .f90, .F90, ...) sources.
    #[arg(required = true)]
    pub sources: Vec<PathBuf>,
    /// The shared library to write.
    #[arg(short, long, value_name = "LIB")]
    pub output: PathBuf,
    /// Debug build: debug information (a crash then names its file and line), no
    /// optimisation, bounds and overflow checks, signaling-NaN Fortran reals; and the library
    /// is marked so that `check`, `probe` and `bisect` run it with floating-point traps on.
    #[arg(long)]
    pub debug: bool,
    /// Do not build the complex-step twin.
    #[arg(long)]
    pub no_twin: bool,
    /// Extra flags for every C compilation, split at white space, after tancheck's own
    /// (e.g. --cflags "-Wall -Wextra -march=x86-64-v2"). Repeatable.
    #[arg(long, value_name = "FLAGS", allow_hyphen_values = true)]
    pub cflags: Vec<String>,
    /// Extra flags for every Fortran compilation (tancheck's modules too), split at white
    /// space (e.g. --fflags "-Wall -fimplicit-none"). Repeatable.
    #[arg(long, value_name = "FLAGS", allow_hyphen_values = true)]
    pub fflags: Vec<String>,
    /// Extra flags for the link (e.g. --ldflags "-L/opt/lib -lmine"). Repeatable.
    #[arg(long, value_name = "FLAGS", allow_hyphen_values = true)]
    pub ldflags: Vec<String>,
    /// Print every compiler command.
    #[arg(short, long)]
    pub verbose: bool,
    /// Print only the line that names the library built (and the compiler's words on
    /// standard error).
    #[arg(short, long, conflicts_with = "verbose")]
    pub quiet: bool,
}

fn split(flags: &[String]) -> Vec<String> {
    flags.iter().flat_map(|f| f.split_whitespace().map(str::to_string)).collect()
}

pub fn run(a: BuildArgs) -> Result<i32> {
    let opts = tancheck_abi::compile::BuildOptions {
        sources: a.sources,
        output: a.output,
        debug: a.debug,
        twin: !a.no_twin,
        cflags: split(&a.cflags),
        fflags: split(&a.fflags),
        ldflags: split(&a.ldflags),
        ..Default::default()
    };
    let log = tancheck_abi::compile::build_library(&opts)?;
    // tancheck's own standard output (descriptor 1 belongs to the routines: see `survive`).
    let mut out = crate::survive::stdout();
    if a.verbose {
        for c in &log.commands {
            writeln!(out, "{}", c.command_line())?;
        }
    }
    let warnings = log.warnings();
    let mut shown: Vec<&str> = Vec::new();
    for (stage, text) in &warnings {
        if shown.contains(&text.as_str()) {
            // The twin's compilation usually repeats the real one's warnings word for word.
            crate::say!("tancheck: the compiler said the same, {stage}");
        } else {
            crate::say!("tancheck: the compiler said, {stage}:\n{}", text.trim_end());
            shown.push(text);
        }
    }
    writeln!(
        out,
        "built {}{}{}",
        opts.output.display(),
        if opts.twin { " (with complex-step twins, suffix _cx)" } else { "" },
        match warnings.len() {
            0 => String::new(),
            n => format!(
                "; {n} compiler command{} printed warnings (on standard error)",
                if n == 1 { "" } else { "s" }
            ),
        }
    )?;
    if opts.debug && !a.quiet {
        writeln!(
            out,
            "debug build: `tancheck check` runs this library with floating-point traps on \
             (invalid, division by zero, overflow), so the first NaN or infinity is a reported crash \
             with its place"
        )?;
    }
    Ok(exit::PASS)
}
