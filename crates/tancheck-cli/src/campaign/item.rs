//! Run one item of a campaign in this process: the routine's regression cases, its check (a
//! point, block or finite-strain routine) or one probe suite, with the item's property set and
//! path, and sum the outcome up as an [`ItemResult`].

use std::path::Path as FsPath;

use anyhow::{anyhow, bail, Context, Result};
use tancheck_core::report::Keep;
use tancheck_core::Verdict;

use super::build::Built;
use super::file::{normalize, Campaign, Family, Item, Task};
use crate::report::campaign::{ItemResult, SchemeWorst};
use crate::session::default_path;

/// What an item found before expectations are applied.
struct Found {
    outcome: &'static str,
    finding: String,
    exit_code: i32,
    first: Option<usize>,
    increments: usize,
    failed: usize,
    worst: Vec<SchemeWorst>,
    message: Option<String>,
}

fn outcome_of(v: Verdict) -> &'static str {
    match v {
        Verdict::Pass => "pass",
        Verdict::TangentFailure => "fail",
        Verdict::RoutineFault => "fault",
        Verdict::TwinNotSafe => "twin",
    }
}

/// The library a manifest names, replaced by where the campaign built it.
fn built_library(declared: Option<&FsPath>, libs: &[Built]) -> Option<Built> {
    let d = declared?;
    libs.iter().find(|b| b.declared == normalize(d)).cloned()
}

/// The result of `item` (never an error: a routine that cannot be loaded is an item with
/// outcome `error` and exit code 2).
pub fn run(c: &Campaign, item: &Item, libs: &[Built]) -> ItemResult {
    let r = &c.routines[item.routine];
    let built = built_library(r.library.as_deref(), libs);
    let found = match built.as_ref().and_then(|b| b.skipped.clone()) {
        Some(why) => Ok(Found {
            outcome: "skipped",
            finding: "none".into(),
            exit_code: 0,
            first: None,
            increments: 0,
            failed: 0,
            worst: Vec::new(),
            message: Some(why),
        }),
        None => match built.as_ref().and_then(|b| b.failed.clone()) {
            Some(words) => Err(anyhow!("its library did not build: {words}")),
            None => run_found(c, item, built.as_ref().map(|b| b.actual.as_path())),
        },
    };
    let found = found.unwrap_or_else(|e| Found {
        outcome: "error",
        finding: "bad-input".into(),
        exit_code: crate::exit::BAD_INPUT,
        first: None,
        increments: 0,
        failed: 0,
        worst: Vec::new(),
        message: Some(format!("{e:#}")),
    });
    finish(c, item, found)
}

/// The outcome of an item a stop signal kept from running.
pub const NOT_RUN: &str = "not-run";

/// The name of a stop signal.
pub fn signal_name(sig: i32) -> String {
    match sig {
        1 => "SIGHUP".into(),
        2 => "SIGINT".into(),
        15 => "SIGTERM".into(),
        _ => format!("signal {sig}"),
    }
}

/// The result of an item not run: the campaign was stopped by `signal` before it began (or,
/// under --isolate, while its worker ran). Not as expected, its code the signal's (128 + it).
pub fn not_run_result(c: &Campaign, item: &Item, signal: i32) -> ItemResult {
    finish(
        c,
        item,
        Found {
            outcome: NOT_RUN,
            finding: "none".into(),
            exit_code: 128 + signal,
            first: None,
            increments: 0,
            failed: 0,
            worst: Vec::new(),
            message: Some(format!(
                "not run: the campaign was stopped by {} before this item finished",
                signal_name(signal)
            )),
        },
    )
}

/// The result of an item whose worker died or hung.
pub fn fault_result(c: &Campaign, item: &Item, message: String) -> ItemResult {
    fault_at(c, item, message, None)
}

/// [`fault_result`] at the increment of the call that was running, when known (a worker's
/// last words name it).
pub fn fault_at(c: &Campaign, item: &Item, message: String, increment: Option<usize>) -> ItemResult {
    finish(
        c,
        item,
        Found {
            outcome: "fault",
            finding: "routine-fault".into(),
            exit_code: crate::exit::ROUTINE_FAULT,
            first: increment,
            increments: 0,
            failed: 0,
            worst: Vec::new(),
            message: Some(message),
        },
    )
}

/// Apply the campaign's expectation: an item as expected adds exit code 0.
fn finish(c: &Campaign, item: &Item, f: Found) -> ItemResult {
    let r = &c.routines[item.routine];
    // Expectations are about the routine's checks and probes; its cases must pass, unless the
    // routine is expected to fail or fault (a known-flawed routine kept as a regression
    // suite): then its cases still failing is what is expected too.
    let (expected, expected_finding) = match item.task {
        Task::Cases(_) => match r.entry.expect.as_deref() {
            Some(x @ ("fail" | "fault")) => (Some(x.to_string()), None),
            _ => (None, None),
        },
        _ => (r.entry.expect.clone(), r.entry.expect_finding.clone()),
    };
    let require_fortran = std::env::var("TANCHECK_REQUIRE_FORTRAN").is_ok_and(|v| v == "1");
    let (as_expected, code) = if f.outcome == "skipped" {
        if require_fortran {
            (false, crate::exit::BAD_INPUT)
        } else {
            (true, 0)
        }
    } else {
        let want = expected.as_deref().unwrap_or("pass");
        // A probe item's finding lists its failed probes, comma-separated: the expected one
        // among them is as expected (`zero-increment` beside `refinement,newton` read "not as
        // expected"; a user-style sweep).
        let finding_ok = expected_finding
            .as_deref()
            .is_none_or(|x| x == f.finding || f.finding.split(',').any(|p| p == x));
        if want == f.outcome && finding_ok {
            (true, 0)
        } else if f.exit_code != 0 {
            (false, f.exit_code)
        } else {
            // Expected a finding that did not come: the check no longer sees the flaw.
            (false, crate::exit::TANGENT_FAILURE)
        }
    };
    let mut message = f.message;
    if f.outcome == "skipped" && require_fortran {
        message = message.map(|m| format!("{m}; TANCHECK_REQUIRE_FORTRAN=1 makes this a failure"));
    }
    ItemResult {
        position: item.position,
        key: item.key.clone(),
        hash: format!("{:016x}", item.hash),
        routine: r.label.clone(),
        name: r.name.clone(),
        properties: item.properties.as_ref().map_or("manifest".into(), |p| p.name.clone()),
        path: item.path.as_ref().map_or("manifest".into(), |p| p.0.clone()),
        task: item.task_label(),
        outcome: f.outcome.into(),
        finding: f.finding,
        exit_code: f.exit_code,
        expected,
        expected_finding,
        as_expected,
        code,
        first_failing_increment: f.first,
        increments: f.increments,
        failed: f.failed,
        worst: f.worst,
        message,
    }
}

fn run_found(c: &Campaign, item: &Item, library: Option<&FsPath>) -> Result<Found> {
    let r = &c.routines[item.routine];
    let file = r.manifest.display().to_string();
    let dir = r.manifest.parent().unwrap_or(FsPath::new(".")).to_path_buf();
    if r.family == Family::Finite {
        return finite(&r.manifest, library, item.properties.as_ref().map(|p| p.values.clone()));
    }
    let (mut m, _) = crate::manifest::Manifest::load(&r.manifest)?;
    if let Some(l) = library {
        m.routine.library = Some(l.to_path_buf());
    }
    if let Some(p) = &item.properties {
        m.routine.properties = p.values.clone();
    }
    m.check.jobs = 1;
    let path = match &item.path {
        Some((_, spec)) => crate::manifest::path_arg(spec)?,
        None => {
            let default = if crate::block_session::is_block(&m) {
                crate::block_session::default_block_path(m.routine.kind)
            } else {
                default_path(m.routine.kind)
            };
            m.path_or(default).map_err(|e| anyhow!("{file}: {e}"))?
        }
    };
    match &item.task {
        Task::Cases(folder) => {
            let mine = crate::case_store::case_routine_of(&m, &dir)
                .with_context(|| format!("loading the routine of {file}"))?;
            let res = crate::cmd_replay::run_case_folder_of(folder, Some(&mine));
            let n = res.passed.len() + res.failed.len();
            let code = res.exit_code();
            Ok(Found {
                outcome: match code {
                    0 => "pass",
                    1 => "fail",
                    _ => "fault",
                },
                finding: if res.failed.is_empty() { "none".into() } else { "case-still-fails".into() },
                exit_code: code,
                first: None,
                increments: n,
                failed: res.failed.len(),
                worst: Vec::new(),
                message: (!res.failed.is_empty()).then(|| {
                    let names: Vec<String> = res
                        .failed
                        .iter()
                        .map(|f| f.file.file_name().unwrap_or_default().to_string_lossy().into_owned())
                        .collect();
                    format!("{} of {n} cases still fail: {}", res.failed.len(), names.join(", "))
                }),
            })
        }
        Task::Check if r.family == Family::Block => {
            let rep = crate::block_session::run_block_manifest(&m, &dir, &path)
                .with_context(|| format!("checking the routine of {file}"))?;
            let code = rep.exit_code();
            Ok(Found {
                outcome: match code {
                    0 => "pass",
                    1 => "fail",
                    _ => "fault",
                },
                finding: rep.finding().into(),
                exit_code: code,
                first: rep.findings.iter().find_map(|f| f.increment),
                increments: rep.increments.len(),
                failed: rep.findings.len(),
                worst: Vec::new(),
                message: rep.findings.first().map(|f| f.what.clone()),
            })
        }
        Task::Check => {
            let rep = crate::session::run_manifest_with(&m, &dir, &path, Keep::Failures, false)
                .with_context(|| format!("checking the routine of {file}"))?;
            let first = rep.records.iter().find(|x| !x.pass).map(|x| x.index as usize);
            let failed = rep.records.iter().filter(|x| !x.pass).count();
            Ok(Found {
                outcome: outcome_of(rep.verdict),
                finding: rep.finding(),
                exit_code: rep.exit_code(),
                first,
                increments: rep.increment_count(),
                failed,
                worst: rep
                    .summary
                    .iter()
                    .map(|s| SchemeWorst {
                        scheme: s.scheme.name().into(),
                        worst: s.worst_norm_error.max(s.worst_entry_error),
                    })
                    .collect(),
                // A fault's message, else a conventions warning: a declared order or shear
                // measure the elastic response contradicts reached no campaign report (a
                // user-style sweep's library checked with its shear declared wrongly passed
                // every item without a word).
                message: rep
                    .first_fault()
                    .map(|f| f.message.clone())
                    .or_else(|| rep.notes.iter().find(|n| n.starts_with("conventions warning")).cloned()),
            })
        }
        Task::Probe(suite_file, _) => {
            let suite = crate::suite::Suite::load(suite_file).map_err(|e| anyhow!("{e}"))?;
            // The item's path when it has one, else the manifest's, else the suite's.
            let path = match (&item.path, &m.path) {
                (Some(_), _) | (None, Some(_)) => path,
                (None, None) => suite.path().map_err(anyhow::Error::msg)?,
            };
            // Checked when the campaign was read; a path that changed since is bad input.
            suite.check_at(&path).map_err(|e| anyhow!("{}: {e}", suite_file.display()))?;
            let rep =
                crate::session::run_probe_suite(&m, &dir, &file, &suite, &path, Some(suite_file), false)?;
            let failed: Vec<_> =
                rep.results.iter().filter(|p| p.status == tancheck_core::probe::ProbeStatus::Fail).collect();
            Ok(Found {
                outcome: if rep.pass { "pass" } else { "fail" },
                finding: if failed.is_empty() {
                    "none".into()
                } else {
                    failed.iter().map(|p| p.probe.as_str()).collect::<Vec<_>>().join(",")
                },
                exit_code: rep.exit_code,
                first: failed.iter().find_map(|p| p.increment),
                increments: rep.results.len(),
                failed: failed.len(),
                worst: Vec::new(),
                message: failed.first().map(|p| p.summary.clone()),
            })
        }
    }
}

/// A finite-strain manifest's check, with the campaign's library and property set.
fn finite(manifest: &FsPath, library: Option<&FsPath>, properties: Option<Vec<f64>>) -> Result<Found> {
    let file = manifest.display().to_string();
    let (mut m, d, dir) = crate::finite_load::FiniteManifest::load(manifest)?;
    if let Some(l) = library {
        m.routine.library = Some(l.to_path_buf());
    }
    if let Some(p) = properties {
        m.routine.properties = p;
    }
    let mut r = crate::finite_load::open(&m, &d, &dir, &file)?;
    let path = m.path.build().map_err(|e| anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    if state0.len() != r.info().nstate {
        bail!("{file}: start.state has {} entries; the routine needs {}", state0.len(), r.info().nstate);
    }
    crate::survive::checking(true);
    let rep = tancheck_core::finite::check::run(r.as_mut(), &m.routine.properties, &state0, &path, m.check);
    crate::survive::checking(false);
    let failed: Vec<usize> = rep.increments.iter().filter(|i| !i.passed).map(|i| i.increment).collect();
    Ok(Found {
        outcome: outcome_of(rep.verdict),
        finding: match rep.verdict {
            Verdict::Pass => "none".into(),
            Verdict::RoutineFault => "routine-fault".into(),
            _ => rep.finding.clone().unwrap_or_else(|| "unexplained".into()),
        },
        exit_code: rep.verdict.exit_code(),
        first: failed.first().copied(),
        increments: rep.increments.len(),
        failed: failed.len(),
        worst: Vec::new(),
        message: rep.fault.clone(),
    })
}
