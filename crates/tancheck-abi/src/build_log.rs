//! What a build ran and what the compilers printed: the log a build returns and a failed
//! build's error carries (data only, so compile.rs and error.rs both depend on it).

use std::fmt;
use std::path::PathBuf;

/// One command run during a build, with what it printed.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct BuildCommand {
    /// What the command does: "compiling `x.c`", "linking `libx.so`".
    pub stage: String,
    pub program: String,
    pub args: Vec<String>,
    pub stdout: String,
    pub stderr: String,
    pub success: bool,
}

impl BuildCommand {
    /// The command as one line a shell would accept.
    pub fn command_line(&self) -> String {
        std::iter::once(&self.program).chain(&self.args).map(|a| shell_quote(a)).collect::<Vec<_>>().join(" ")
    }
}

/// Every command a build ran, in order.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct BuildLog {
    /// The library written (on success).
    pub output: PathBuf,
    /// Where the intermediate files went (removed afterwards unless it was given).
    pub build_dir: PathBuf,
    pub commands: Vec<BuildCommand>,
}

impl BuildLog {
    /// What the compilers printed in commands that succeeded (warnings, notes), by stage:
    /// `(stage, text)`, in the order the commands ran.
    pub fn warnings(&self) -> Vec<(&str, String)> {
        self.commands
            .iter()
            .filter(|c| c.success)
            .filter_map(|c| {
                let mut t = String::new();
                for text in [&c.stderr, &c.stdout] {
                    if !text.trim().is_empty() {
                        t.push_str(text.trim_end());
                        t.push('\n');
                    }
                }
                (!t.is_empty()).then_some((c.stage.as_str(), t))
            })
            .collect()
    }
}

impl fmt::Display for BuildLog {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for s in &self.commands {
            writeln!(f, "$ {}", s.command_line())?;
            for text in [&s.stdout, &s.stderr] {
                if !text.trim().is_empty() {
                    writeln!(f, "{}", text.trim_end())?;
                }
            }
        }
        Ok(())
    }
}

fn shell_quote(a: &str) -> String {
    let plain = !a.is_empty() && a.chars().all(|c| c.is_ascii_alphanumeric() || "-_=./,:+@%".contains(c));
    if plain {
        a.to_string()
    } else {
        format!("'{}'", a.replace('\'', r"'\''"))
    }
}
