//! The JSON Schema of every report file, generated from the Rust types of the reports
//! (schemars), so it cannot drift from what the reporters write. The shipped copy is
//! `schema/report.schema.json`; `cargo test --test report_schema` fails when it is stale
//! (`TANCHECK_BLESS=1` rewrites it) and validates real reports against it.

use schemars::JsonSchema;
use tancheck_core::probe::SuiteReport;
use tancheck_core::Report;

use super::model::{BisectOutcome, CaseFolderResult, DemoReport, ReplayReport, SelftestReport};

/// The shipped schema file, relative to the repository root.
pub const SCHEMA_FILE: &str = "schema/report.schema.json";

/// The `format` field's one value.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
enum Format {
    #[serde(rename = "tancheck-report")]
    TancheckReport,
}

/// The body of a report file, by its `kind`.
#[derive(JsonSchema)]
#[serde(tag = "kind", rename_all = "kebab-case")]
#[allow(dead_code, clippy::large_enum_variant)] // only its schema is used, never a value
enum Body {
    Check(Report),
    ProbeSuite(SuiteReport),
    Bisect(BisectOutcome),
    Replay(ReplayReport),
    Cases(CaseFolderResult),
    Selftest(SelftestReport),
    FiniteCheck(tancheck_core::finite::check::FiniteReport),
    FiniteProbes(tancheck_core::finite::probe::FiniteProbeReport),
    Explore(tancheck_core::explore::ExploreReport),
    Block(super::block::BlockDocument),
    Demo(DemoReport),
}

/// A tancheck report file.
#[derive(JsonSchema)]
#[schemars(
    title = "tancheck report",
    description = "A JSON report written by tancheck (check, probe, bisect, replay, cases, selftest, explore, block, finite-check, finite-probes, demo) or by its C API."
)]
#[allow(dead_code)] // only its schema is used
struct ReportFile {
    /// Always "tancheck-report".
    format: Format,
    /// The version of the report's shape (see tancheck_core::report::document::VERSION).
    #[schemars(range(min = 1))]
    version: u32,
    #[serde(flatten)]
    body: Body,
}

/// The schema as pretty JSON text with a final newline (the shipped file's content).
pub fn schema_text() -> String {
    let schema = schemars::schema_for!(ReportFile);
    let mut s = serde_json::to_string_pretty(&schema).expect("a schema prints");
    s.push('\n');
    s
}
