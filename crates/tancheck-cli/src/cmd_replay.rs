//! `tancheck replay CASE`: rerun the call saved in a case file with exactly its inputs, show
//! that the outputs are the saved ones bit for bit, print the stress, the tangent and the
//! numbers of the check, and the command that reruns it under a debugger. Also the
//! regression runner over a folder of cases ([`run_case_folder`]). Opening the routine and
//! writing case files live in case_store.rs, shared with `tancheck bisect`.

use std::path::{Path as FsPath, PathBuf};

use anyhow::Result;
use clap::Args;

use tancheck_abi::Library;
use tancheck_core::case::{self, Case, CaseError, CaseRoutine, Numbers, ParsedCase, ProbeCheck};
use tancheck_core::{Caller, Routine, RoutineInfo};
use tancheck_models::zoo::zoo_model;

use crate::exit;
use crate::report::Reporter;

#[derive(Args, Debug)]
pub struct ReplayArgs {
    /// The case file (JSON) written by `tancheck bisect`.
    pub case: PathBuf,
    /// Write what the replay found as JSON to FILE (`-` for standard output, replacing the
    /// readable output).
    #[arg(long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    /// Do not walk the case's path to see that it still leads to the saved call.
    #[arg(long)]
    pub no_walk: bool,
    #[command(flatten)]
    pub output: crate::session::OutputArgs,
}

use crate::case_store::{sha256_file, Opened};

/// A case file that cannot be used, as `file:line:column: why`.
fn broken(file: &FsPath, e: &CaseError) -> String {
    format!("{}:{}:{}: {}", file.display(), e.line.max(1), e.column.max(1), e.problem)
}

/// Line of the first `"key"` in `text` (1 when absent), for warnings about a field.
fn line_of(text: &str, key: &str) -> usize {
    text.find(&format!("\"{key}\"")).map_or(1, |p| text[..p].matches('\n').count() + 1)
}

/// The routine a case names, opened; warnings (a changed library) are added to `warnings`.
fn open_for_case(
    file: &FsPath,
    text: &str,
    r: &CaseRoutine,
    warnings: &mut Vec<String>,
) -> Result<Opened, String> {
    let info = r.info().map_err(|m| format!("{}:{}: {m}", file.display(), line_of(text, "order")))?;
    let at = |key: &str, m: String| format!("{}:{}: {m}", file.display(), line_of(text, key));
    if let Some(name) = &r.model {
        let model = zoo_model(name, r.kind).map_err(|e| at("model", e.to_string()))?;
        let mi = model.info();
        if (mi.nstate, mi.nprop) != (r.nstate, r.nprop) || mi.convention != info.convention {
            return Err(at(
                "model",
                format!(
                    "the model `{name}` now has {} state variables and {} properties; the case was written for {} and {}",
                    mi.nstate, mi.nprop, r.nstate, r.nprop
                ),
            ));
        }
        return Ok(Opened::Model(Box::new(model)));
    }
    let lib = r.library.as_deref().expect("parsed: library with symbol");
    let lib = PathBuf::from(lib);
    let folder = file.parent().unwrap_or(FsPath::new("."));
    let mut lib_path = if lib.is_relative() { folder.join(&lib) } else { lib };
    if let (false, Some(abs)) = (lib_path.exists(), &r.library_absolute) {
        if FsPath::new(abs).exists() {
            warnings.push(at(
                "library",
                format!(
                    "the library is not at {} (relative to the case); using {abs}, where it was when the case was \
                     written",
                    lib_path.display()
                ),
            ));
            lib_path = PathBuf::from(abs);
        }
    }
    match (&r.library_sha256, sha256_file(&lib_path)) {
        (_, Err(e)) => return Err(at("library", format!("cannot read the library {}: {e}", lib_path.display()))),
        (Some(then), Ok(now)) if *then != now => warnings.push(at(
            "library_sha256",
            format!(
                "the library {} changed since the case was written (SHA-256 {} then, {} now): the call may not \
                 reproduce",
                lib_path.display(),
                &then[..then.len().min(12)],
                &now[..12]
            ),
        )),
        _ => {}
    }
    let library = Library::open(&lib_path).map_err(|e| at("library", e.to_string()))?;
    let symbol = r.symbol.as_deref().expect("parsed: symbol with library");
    let mut routine = library
        .routine(symbol, RoutineInfo { name: r.name.clone(), ..info })
        .map_err(|e| at("symbol", e.to_string()))?;
    if r.fp_traps {
        routine.set_fp_traps(true).map_err(|e| at("fp_traps", e.to_string()))?;
    }
    if r.complex_twin && !routine.has_twin() {
        warnings.push(at(
            "complex_twin",
            "the case was written with a complex-step twin; the library has none now".into(),
        ));
    }
    Ok(Opened::Library(Box::new(routine)))
}

pub use crate::report::model::{CaseFolderResult, CaseRun, ReplayReport};

/// A case read and opened, or why it cannot be run.
struct Prepared {
    parsed: ParsedCase,
    routine: Opened,
    warnings: Vec<String>,
}

fn prepare(file: &FsPath) -> Result<Prepared, String> {
    let text = std::fs::read_to_string(file)
        .map_err(|e| format!("{}:1:1: cannot read the case: {e}", file.display()))?;
    let parsed = Case::parse(&text).map_err(|e| broken(file, &e))?;
    let mut warnings: Vec<String> =
        parsed.warnings.iter().map(|w| format!("{}: {w}", file.display())).collect();
    let routine = open_for_case(file, &text, &parsed.case.routine, &mut warnings)?;
    Ok(Prepared { parsed, routine, warnings })
}

/// The debugger command for a case, as words (`gdb`, its options, then `--args`, this
/// program, `replay`, the case): with a routine's symbol, a breakpoint on it that waits for
/// the library to load.
fn debugger_words(file: &FsPath, symbol: Option<&str>) -> Vec<String> {
    let exe = std::env::current_exe().map(|p| p.display().to_string()).unwrap_or_else(|_| "tancheck".into());
    let file = std::path::absolute(file).unwrap_or_else(|_| file.to_path_buf());
    let mut w = vec!["gdb".to_string()];
    if let Some(s) = symbol {
        for x in ["set breakpoint pending on".to_string(), format!("break {s}"), "run".to_string()] {
            w.push("-ex".into());
            w.push(x);
        }
    }
    w.extend(["--args".to_string(), exe, "replay".to_string(), file.display().to_string()]);
    w
}

/// The words as one shell command line (words with spaces in single quotes).
fn shell_line(words: &[String]) -> String {
    words
        .iter()
        .map(
            |w| {
                if w.contains([' ', '\'', '"']) {
                    format!("'{}'", w.replace('\'', "'\\''"))
                } else {
                    w.clone()
                }
            },
        )
        .collect::<Vec<_>>()
        .join(" ")
}

fn replay_prepared(file: &FsPath, mut p: Prepared, walk: bool) -> Result<ReplayReport, String> {
    let case = &p.parsed.case;
    let symbol = case.routine.symbol.clone();
    let routine_name = match (&case.routine.model, &case.routine.library) {
        (Some(m), _) => format!("{m} (built-in model)"),
        (_, Some(l)) => format!("{} in {l}", symbol.as_deref().unwrap_or("?")),
        _ => case.routine.name.clone(),
    };
    let o = &case.origin;
    let origin = format!(
        "increment {} of {} on the path \"{}\", branch {}{}",
        o.increment,
        o.of,
        o.path,
        o.branch,
        o.shrunk_from.map_or(String::new(), |n| {
            format!(" (shrunk from {n} increment{})", if n == 1 { "" } else { "s" })
        })
    );
    let recorded_finding = case.probe.finding.clone();
    let inputs = case.call.clone();
    let routine = p.routine.routine();
    let mut caller = Caller::new(routine);
    let r = case::replay(&mut caller, &p.parsed, walk).map_err(|m| format!("{}: {m}", file.display()))?;
    // A kink at the call: said beside the central difference's entries there, which are the
    // mean of the two sides (replay listed them as differences with no word of it, where the
    // check had cleared that column; a user-style sweep).
    let kink = r.check.as_ref().and_then(|c| c.diagnosis.as_ref()).and_then(|d| d.kink.as_ref()).and_then(|k| {
        let conv = &p.routine.routine().info().convention;
        let cols: Vec<&str> = k
            .columns
            .iter()
            .enumerate()
            .filter(|(_, c)| c.detected)
            .map(|(j, _)| conv.order().get(j).map_or("?", |c| c.label()))
            .collect();
        (k.detected && !cols.is_empty()).then(|| {
            format!(
                "a kink at this call in column{} {}: the one-sided derivatives differ there, and the central \
                 difference gives their mean, not a derivative; the closer look compares the returned columns with \
                 each side ({})",
                if cols.len() == 1 { "" } else { "s" },
                cols.join(", "),
                k.sides
            )
        })
    });
    let (pass, finding, checks) = match &r.check {
        Some(c) => {
            (c.passed() && r.fault.is_none() && !c.faulted(), c.finding().to_string(), ProbeCheck::list(c))
        }
        None => (false, "routine-fault".to_string(), Vec::new()),
    };
    // A fault of a perturbed call (a difference scheme's) is the routine's fault as the base
    // call's is: the check that wrote the case said so (it read FAIL, exit 1, with the fault
    // printed and the complex step agreeing; a user-style sweep).
    let faulted = r.fault.is_some() || r.check.as_ref().is_some_and(|c| c.faulted());
    let exit_code = if faulted {
        exit::ROUTINE_FAULT
    } else if pass {
        exit::PASS
    } else {
        exit::TANGENT_FAILURE
    };
    Ok(ReplayReport {
        case: file.display().to_string(),
        routine: routine_name,
        origin,
        warnings: p.warnings,
        inputs,
        identical: r.identical(),
        differences: r.differences.clone(),
        fault: r.fault.clone(),
        status: r.outputs.status,
        branch: r.outputs.branch,
        stress: Numbers::of(&r.outputs.stress),
        state: Numbers::of(&r.outputs.state),
        tangent: Numbers::of(&r.outputs.tangent),
        checks,
        pass,
        finding,
        recorded_finding,
        path_leads_here: r.path_leads_here.map(|x| match x {
            Ok(()) => "yes".to_string(),
            Err(m) => m.to_string(),
        }),
        kink,
        debugger: shell_line(&debugger_words(file, symbol.as_deref())),
        debugger_args: debugger_words(file, symbol.as_deref()),
        exit_code,
    })
}

/// Replay one case file. `Err` is a case that cannot be run (`file:line:column: why`).
pub fn replay_file(file: &FsPath, walk: bool) -> Result<ReplayReport, String> {
    let p = prepare(file)?;
    replay_prepared(file, p, walk)
}

/// `tancheck replay`.
pub fn run(a: &ReplayArgs) -> Result<i32> {
    crate::report::files::distinct(&[("--json", a.json.as_deref())], &[a.case.as_path()])?;
    crate::survive::begin_report(a.json.as_deref(), &a.case.display().to_string())?;
    crate::survive::start_watchdog(crate::survive::DEFAULT_CALL_TIMEOUT, None);
    if let Some(text) =
        std::fs::read_to_string(&a.case).ok().filter(|t| crate::finite_case::is_finite_case(t))
    {
        return crate::finite_case::replay(&a.case, a.json.as_deref(), &a.output, &text);
    }
    crate::survive::checking(true);
    let replayed = replay_file(&a.case, !a.no_walk);
    crate::survive::checking(false);
    let report = match replayed {
        Ok(r) => r,
        Err(m) => {
            // Every error names the case file.
            let file = a.case.display().to_string();
            if m.contains(&file) {
                crate::say!("tancheck: {m}");
            } else {
                crate::say!("tancheck: {file}: {m}");
            }
            return Ok(exit::BAD_INPUT);
        }
    };
    let mut reporters = crate::session::reporters(&a.output, a.json.as_deref());
    reporters.replay(&report)?;
    reporters.finish()?;
    Ok(report.exit_code)
}

/// Run every `*.json` case in `dir` (sorted by name), before the paths of a check. Nothing
/// here fails the run: an unreadable folder or a broken file is a warning in `broken`.
pub fn run_case_folder(dir: &FsPath) -> CaseFolderResult {
    run_case_folder_of(dir, None)
}

/// [`run_case_folder`], running only the cases of `routine` when given (the others are
/// listed in `other_routines`, not run): a case belongs to a routine when both name the same
/// built-in model, or the same symbol in the same library file.
pub fn run_case_folder_of(dir: &FsPath, routine: Option<&CaseRoutine>) -> CaseFolderResult {
    let mut result = CaseFolderResult { folder: dir.to_path_buf(), ..CaseFolderResult::default() };
    let entries = match std::fs::read_dir(dir) {
        Ok(e) => e,
        Err(e) => {
            result.broken.push(format!("{}: cannot read the case folder: {e}", dir.display()));
            return result;
        }
    };
    let mut files: Vec<PathBuf> = entries
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "json") && p.is_file())
        .collect();
    files.sort();
    for file in files {
        if let Some(mine) = routine {
            if let Some(theirs) = routine_of_case(&file) {
                if !same_routine(mine, &theirs, &file) {
                    result.other_routines.push(file);
                    continue;
                }
            }
        }
        match prepare(&file).and_then(|p| replay_prepared(&file, p, true)) {
            Err(m) => result.broken.push(m),
            Ok(mut report) => {
                result.warnings.append(&mut report.warnings.clone());
                report.warnings.clear();
                if let Some(p) = report.path_leads_here.as_ref().filter(|p| *p != "yes") {
                    result.warnings.push(format!("{}: {p}", file.display()));
                }
                let run = CaseRun { file, report };
                if run.report.pass {
                    result.passed.push(run);
                } else {
                    result.failed.push(run);
                }
            }
        }
    }
    result
}

/// The routine part of a case file, when it parses (a broken file is run, and reported).
fn routine_of_case(file: &FsPath) -> Option<CaseRoutine> {
    let text = std::fs::read_to_string(file).ok()?;
    Case::parse(&text).ok().map(|p| p.case.routine)
}

/// Whether the case routine `theirs` (of the case `file`) is the routine `mine` (from a
/// manifest, library path absolute): the same model, or the same symbol in the same library.
fn same_routine(mine: &CaseRoutine, theirs: &CaseRoutine, file: &FsPath) -> bool {
    if mine.model.is_some() || theirs.model.is_some() {
        return mine.model == theirs.model;
    }
    if mine.symbol != theirs.symbol {
        return false;
    }
    let canonical = |p: &FsPath| std::fs::canonicalize(p).ok();
    let mine_lib = mine.library.as_deref().map(FsPath::new).and_then(canonical);
    let folder = file.parent().unwrap_or(FsPath::new("."));
    let theirs_lib = theirs
        .library
        .as_deref()
        .map(|l| folder.join(l))
        .and_then(|p| canonical(&p))
        .or_else(|| theirs.library_absolute.as_deref().map(FsPath::new).and_then(canonical));
    match (mine_lib, theirs_lib) {
        (Some(a), Some(b)) => a == b,
        // A library that cannot be found: same file name, same routine.
        _ => {
            let name = |l: Option<&str>| l.and_then(|l| FsPath::new(l).file_name().map(|f| f.to_owned()));
            name(mine.library.as_deref()) == name(theirs.library.as_deref())
        }
    }
}

/// What a folder of cases gave, as the check's report keeps it ([`tancheck_core::report::CaseTally`]).
pub fn tally_of(r: &CaseFolderResult) -> tancheck_core::report::CaseTally {
    let name = |p: &std::path::Path| p.display().to_string();
    tancheck_core::report::CaseTally {
        folder: name(&r.folder),
        passed: r.passed.iter().map(|c| name(&c.file)).collect(),
        failed: r
            .failed
            .iter()
            .map(|c| tancheck_core::report::FailedCase {
                file: name(&c.file),
                finding: c.report.finding.clone(),
                exit_code: c.report.exit_code,
            })
            .collect(),
        broken: r.broken.clone(),
    }
}
