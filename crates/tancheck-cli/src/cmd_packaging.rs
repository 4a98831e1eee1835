//! Files for packagers, generated from the command line's own definitions: shell completions
//! (`tancheck completions SHELL`) and the man pages (`tancheck man [--dir DIR]`). Both
//! commands are hidden from the help; README.md ("Install") shows them.

use std::io::Write;
use std::path::PathBuf;

use anyhow::{Context, Result};
use clap::{Args, ValueEnum};

use crate::exit;

/// A shell clap_complete writes completions for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Shell {
    Bash,
    Zsh,
    Fish,
    Elvish,
    Powershell,
}

#[derive(Args, Debug)]
pub struct CompletionsArgs {
    /// The shell: bash, zsh, fish, elvish or powershell.
    pub shell: Shell,
}

#[derive(Args, Debug)]
pub struct ManArgs {
    /// Write `tancheck.1` and one page per command (`tancheck-check.1`, ...) into DIR
    /// instead of printing `tancheck.1` to standard output.
    #[arg(long, value_name = "DIR")]
    pub dir: Option<PathBuf>,
}

/// Print the completion script for a shell to standard output.
pub fn completions(a: &CompletionsArgs, mut cmd: clap::Command) -> Result<i32> {
    use clap_complete::shells;
    let mut out = crate::survive::stdout();
    let name = "tancheck";
    match a.shell {
        Shell::Bash => clap_complete::generate(shells::Bash, &mut cmd, name, &mut out),
        Shell::Zsh => clap_complete::generate(shells::Zsh, &mut cmd, name, &mut out),
        Shell::Fish => clap_complete::generate(shells::Fish, &mut cmd, name, &mut out),
        Shell::Elvish => clap_complete::generate(shells::Elvish, &mut cmd, name, &mut out),
        Shell::Powershell => clap_complete::generate(shells::PowerShell, &mut cmd, name, &mut out),
    }
    out.flush()?;
    Ok(exit::PASS)
}

/// The man page of the whole program (to standard output), or every page into a folder.
pub fn man(a: &ManArgs, cmd: clap::Command) -> Result<i32> {
    match &a.dir {
        None => {
            let mut buf = Vec::new();
            clap_mangen::Man::new(cmd).render(&mut buf)?;
            let mut out = crate::survive::stdout();
            out.write_all(&buf)?;
            out.flush()?;
        }
        Some(dir) => {
            std::fs::create_dir_all(dir).with_context(|| format!("creating {}", dir.display()))?;
            clap_mangen::generate_to(cmd, dir)
                .with_context(|| format!("writing man pages into {}", dir.display()))?;
            writeln!(crate::survive::stdout(), "man pages written to {}", dir.display())?;
        }
    }
    Ok(exit::PASS)
}
