//! How the terminal report looks: colour (`--color auto|always|never`, `NO_COLOR`, a
//! terminal or not) and progress on standard error for long work, hidden when standard error
//! is not a terminal.

use std::io::Write;

use anstyle::{AnsiColor, Style};

/// `--color`.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, clap::ValueEnum)]
pub enum ColorWhen {
    /// Colour when standard output is a terminal and neither NO_COLOR nor CLICOLOR=0 is set.
    #[default]
    Auto,
    Always,
    Never,
}

impl ColorWhen {
    /// Whether to colour a stream: `is_terminal` says whether it is one.
    pub fn resolve(self, is_terminal: bool) -> bool {
        match self {
            ColorWhen::Always => true,
            ColorWhen::Never => false,
            ColorWhen::Auto => {
                if anstyle_query::no_color() {
                    false
                } else if anstyle_query::clicolor_force() {
                    true
                } else {
                    is_terminal
                        && anstyle_query::clicolor().unwrap_or(true)
                        && anstyle_query::term_supports_color()
                }
            }
        }
    }
}

/// A writer for the readable report that keeps escape codes only when colour is on
/// (anstream strips them otherwise, whatever wrote them).
pub fn stream<'a>(out: impl Write + 'a, color: bool) -> Box<dyn Write + 'a> {
    if color {
        Box::new(out)
    } else {
        Box::new(Strip { inner: out, state: anstream::adapter::StripBytes::new() })
    }
}

/// Any writer, with escape codes taken out (anstream's stripping state machine).
struct Strip<W> {
    inner: W,
    state: anstream::adapter::StripBytes,
}

impl<W: Write> Write for Strip<W> {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        for part in self.state.strip_next(buf) {
            self.inner.write_all(part)?;
        }
        Ok(buf.len())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        self.inner.flush()
    }
}

/// The styles of the readable report.
#[derive(Clone, Copy, Debug)]
pub struct Palette {
    pub on: bool,
}

impl Palette {
    fn paint(self, style: Style, text: &str) -> String {
        if self.on {
            format!("{style}{text}{style:#}")
        } else {
            text.to_string()
        }
    }
    pub fn pass(self, text: &str) -> String {
        self.paint(AnsiColor::Green.on_default(), text)
    }
    pub fn fail(self, text: &str) -> String {
        self.paint(AnsiColor::Red.on_default().bold(), text)
    }
    pub fn warn(self, text: &str) -> String {
        self.paint(AnsiColor::Yellow.on_default(), text)
    }
    pub fn head(self, text: &str) -> String {
        self.paint(Style::new().bold(), text)
    }
    pub fn dim(self, text: &str) -> String {
        self.paint(Style::new().dimmed(), text)
    }
    /// A verdict word in its colour.
    pub fn verdict(self, word: &str) -> String {
        match word {
            "PASS" => self.pass(word),
            "TWIN" => self.warn(word),
            _ => self.fail(word),
        }
    }
}

/// Progress of long work on standard error: a bar with a count, or a spinner; drawn only
/// when standard error is a terminal and the run is not quiet.
pub struct Progress(indicatif::ProgressBar);

impl Progress {
    /// A bar over `len` steps; `len` 0 makes a spinner.
    pub fn new(len: u64, what: &str, show: bool) -> Progress {
        use std::io::IsTerminal;
        if !show || !std::io::stderr().is_terminal() {
            return Progress(indicatif::ProgressBar::hidden());
        }
        let bar = if len == 0 {
            let b = indicatif::ProgressBar::new_spinner();
            b.enable_steady_tick(std::time::Duration::from_millis(120));
            b
        } else {
            let b = indicatif::ProgressBar::new(len);
            if let Ok(s) = indicatif::ProgressStyle::with_template("{msg} [{bar:30}] {pos}/{len} {elapsed}") {
                b.set_style(s.progress_chars("=> "));
            }
            b
        };
        bar.set_draw_target(indicatif::ProgressDrawTarget::stderr());
        bar.set_message(what.to_string());
        Progress(bar)
    }

    pub fn set(&self, pos: u64) {
        self.0.set_position(pos);
    }

    pub fn inc(&self) {
        self.0.inc(1);
    }

    pub fn message(&self, what: &str) {
        self.0.set_message(what.to_string());
    }
}

impl Drop for Progress {
    fn drop(&mut self) {
        self.0.finish_and_clear();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn never_and_always_do_not_look_at_the_environment() {
        assert!(!ColorWhen::Never.resolve(true));
        assert!(ColorWhen::Always.resolve(false));
        // Not a terminal: no colour under auto, whatever the terminal type.
        if !anstyle_query::clicolor_force() {
            assert!(!ColorWhen::Auto.resolve(false));
        }
    }

    #[test]
    fn a_stream_without_colour_strips_escape_codes() {
        let mut buf = Vec::new();
        {
            let mut s = stream(&mut buf, false);
            write!(s, "{}", Palette { on: true }.fail("FAIL")).unwrap();
        }
        assert_eq!(buf, b"FAIL");
    }
}
