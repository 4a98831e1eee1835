//! The JSON report file: every report kind under one envelope that names the format and its
//! version, written straight to a writer (nothing is built in memory first). The command line
//! and the C API both write through here, so the same run gives the same JSON.

use std::io::{self, Write};

use serde::Serialize;

/// The format name at the top of every JSON report.
pub const FORMAT: &str = "tancheck-report";

/// The version of the JSON report's shape. Raised when a field changes meaning or goes away;
/// new fields may appear without a new version.
pub const VERSION: u32 = 1;

/// The report kinds, as the `kind` field of the envelope names them.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    Check,
    ProbeSuite,
    Bisect,
    Replay,
    Cases,
    Selftest,
    /// A finite-strain check (a manifest with a `finite` section).
    FiniteCheck,
    /// The finite-strain probes.
    FiniteProbes,
    /// Bisect of a finite-strain check.
    FiniteBisect,
    /// The replay of a finite-strain case.
    FiniteReplay,
    Explore,
    /// The checks of a block routine (explicit dynamics).
    Block,
    Demo,
}

impl Kind {
    pub fn name(self) -> &'static str {
        match self {
            Kind::Check => "check",
            Kind::ProbeSuite => "probe-suite",
            Kind::Bisect => "bisect",
            Kind::Replay => "replay",
            Kind::Cases => "cases",
            Kind::Selftest => "selftest",
            Kind::FiniteCheck => "finite-check",
            Kind::FiniteProbes => "finite-probes",
            Kind::FiniteBisect => "finite-bisect",
            Kind::FiniteReplay => "finite-replay",
            Kind::Explore => "explore",
            Kind::Block => "block",
            Kind::Demo => "demo",
        }
    }
}

#[derive(Serialize)]
struct Envelope<'a, T: Serialize> {
    format: &'static str,
    version: u32,
    kind: &'static str,
    #[serde(flatten)]
    body: &'a T,
}

/// Write `body` as a report file of `kind`: `{"format": "tancheck-report", "version": 1,
/// "kind": ..., <the fields of body>}`, pretty-printed, with a final newline.
pub fn write<T: Serialize>(out: &mut dyn Write, kind: Kind, body: &T) -> io::Result<()> {
    let mut w = io::BufWriter::with_capacity(64 * 1024, out);
    let env = Envelope { format: FORMAT, version: VERSION, kind: kind.name(), body };
    serde_json::to_writer_pretty(&mut w, &env).map_err(io::Error::other)?;
    writeln!(w)?;
    w.flush()
}

/// [`write`] into a string (for the C API, which hands the text to its caller).
pub fn to_string<T: Serialize>(kind: Kind, body: &T) -> String {
    let mut buf = Vec::new();
    write(&mut buf, kind, body).expect("writing to memory does not fail");
    String::from_utf8(buf).expect("serde_json writes UTF-8")
}

/// A check report as written: the report and its one-word finding ([`super::Report::finding`]:
/// what CI tells failures apart by, e.g. `dtemp-partial` for a failure in ∂σ/∂T alone).
#[derive(Serialize)]
pub struct CheckDocument<'r> {
    #[serde(flatten)]
    report: &'r super::Report,
    finding: String,
    /// The exit code `tancheck check` ends with for this report (its verdict's).
    exit_code: i32,
}

impl<'r> CheckDocument<'r> {
    pub fn of(report: &'r super::Report) -> CheckDocument<'r> {
        CheckDocument { report, finding: report.finding(), exit_code: report.exit_code() }
    }
}
