//! The machine-readable report: the report model as JSON.

use std::io::{self, Write};

use super::Reporter;
use tancheck_core::Report;

/// Pretty-printed JSON of the whole report model.
pub struct Json;

impl Reporter for Json {
    fn write(&mut self, report: &Report, out: &mut dyn Write) -> io::Result<()> {
        serde_json::to_writer_pretty(&mut *out, report).map_err(io::Error::other)?;
        writeln!(out)
    }
}
