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
    Check(CheckFile),
    ProbeSuite(SuiteReport),
    Bisect(BisectOutcome),
    Replay(ReplayReport),
    Cases(CaseFolderResult),
    Selftest(SelftestReport),
    FiniteCheck(tancheck_core::finite::check::FiniteReport),
    FiniteProbes(tancheck_core::finite::probe::FiniteProbeReport),
    FiniteBisect(crate::report::model::FiniteBisectOutcome),
    FiniteReplay(crate::report::model::FiniteReplayReport),
    Explore(ExploreFile),
    Block(super::block::BlockDocument),
    Demo(DemoReport),
    LastWords(LastWords),
    IsolatedFault(IsolatedFault),
    Incomplete(Incomplete),
}

/// The report a process writes as it ends during a check it cannot finish (the routine
/// crashed outside what the guards can survive, hung past `--call-timeout`, or ended the
/// process): written from fixed buffers by the guarded shim (`fortran-shim/src/guard.c`),
/// after the head the command line gives it (`survive::head`).
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct LastWords {
    tool: String,
    /// The routine, as `library:symbol` (or what the command line knew of it).
    routine: String,
    cautions: Vec<String>,
    /// Always "routine-fault".
    verdict: String,
    /// Always true.
    last_words: bool,
    fault: LastWordsFault,
}

/// A check report: the report and its one-word finding.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct CheckFile {
    #[serde(flatten)]
    report: Report,
    /// What the check found, in one word: `none` (passed), `routine-fault`,
    /// `twin-not-complex-step-safe`, the finding the most failing increments name first (a
    /// cause such as `elastic-tangent`, or `dtemp`, `dtemp-partial` for ∂σ/∂T alone), or
    /// `unexplained`. Absent from reports written before it was added.
    finding: Option<String>,
    /// The exit code `tancheck check` ended with (the verdict's: 0, 1, 3 or 4). Absent from
    /// reports written before it was added.
    exit_code: Option<i32>,
}

/// An explore report: the report and the exit code.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct ExploreFile {
    #[serde(flatten)]
    report: tancheck_core::explore::ExploreReport,
    /// The exit code `tancheck explore` ended with (the verdict's). Absent from reports
    /// written before it was added.
    exit_code: Option<i32>,
}

/// What ended the process, and the call that was running.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct LastWordsFault {
    message: String,
    /// In words: during a routine call, while the library was being loaded, ...
    when: String,
    exit_status: i32,
    /// The signal, when one ended the process.
    signal: Option<i32>,
    /// The increment of the running call, when there was one.
    increment: Option<i64>,
    /// Routine calls begun so far.
    calls: u64,
    /// The routine of the running call (`library:symbol`; in a campaign, the item's routine),
    /// or the command's routine when no call was running.
    #[serde(default)]
    routine: Option<String>,
    /// The inputs of the running call (point or finite-strain arguments), when there was one.
    call: Option<serde_json::Map<String, serde_json::Value>>,
}

/// The report the parent of `--isolate` writes when its worker did not finish.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct IsolatedFault {
    tool: String,
    /// The routine's name (`library:symbol`), null when the worker had not loaded it.
    routine: Option<String>,
    /// Always "routine-fault".
    verdict: String,
    /// Always true.
    isolated: bool,
    fault: IsolatedFaultDetail,
    cautions: Vec<String>,
}

/// What the parent saw of the worker's end, and the last call it was told of.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct IsolatedFaultDetail {
    message: String,
    increment: Option<i64>,
    /// The inputs of the call that was running (a point or a finite-strain call), when known.
    call: Option<crate::worker_env::RunningCall>,
}

/// The marker a run writes in place of an earlier report as it starts: still running, or
/// ended from outside; not a result.
#[derive(JsonSchema)]
#[allow(dead_code)] // only its schema is used
struct Incomplete {
    tool: String,
    routine: String,
    /// Always "incomplete".
    verdict: String,
    message: String,
    cautions: Vec<String>,
}

/// A tancheck report file.
#[derive(JsonSchema)]
#[schemars(
    title = "tancheck report",
    description = "A JSON report written by tancheck (check, probe, bisect, replay, cases, selftest, explore, block, finite-check, finite-probes, finite-bisect, finite-replay, demo; last-words, isolated-fault and incomplete for a run that did not finish) or by its C API."
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
    let mut v = serde_json::to_value(&schema).expect("a schema is JSON");
    non_finite_as_null(&mut v);
    if let Some(root) = v.as_object_mut() {
        let d = root.get("description").and_then(|d| d.as_str()).unwrap_or_default().to_string();
        root.insert("description".into(), format!("{d}\n\n{NON_FINITE}").trim().to_string().into());
    }
    let mut s = serde_json::to_string_pretty(&v).expect("a schema prints");
    s.push('\n');
    s
}

/// How the reports write a number that is not finite.
const NON_FINITE: &str = "A floating-point number that is not finite (NaN, or infinite: an error \
     measured against a derivative that is not a number, a stress the routine returned as NaN) is \
     written as null, so every such field also takes null.";

/// Every floating-point field (`format` double) also takes null: the reports write a value
/// that is not finite as null (serde_json), and a failing check has such values.
fn non_finite_as_null(v: &mut serde_json::Value) {
    match v {
        serde_json::Value::Object(o) => {
            if o.get("format").and_then(|f| f.as_str()) == Some("double") {
                match o.get_mut("type") {
                    Some(t @ serde_json::Value::String(_)) if t == "number" => {
                        *t = serde_json::json!(["number", "null"]);
                    }
                    Some(serde_json::Value::Array(a)) if !a.iter().any(|x| x == "null") => {
                        a.push("null".into());
                    }
                    _ => {}
                }
            }
            for x in o.values_mut() {
                non_finite_as_null(x);
            }
        }
        serde_json::Value::Array(a) => a.iter_mut().for_each(non_finite_as_null),
        _ => {}
    }
}
