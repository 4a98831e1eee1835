//! `tancheck bisect` and `tancheck replay` for finite-strain routines: bisect checks the path,
//! locates the first failing increment and the fraction of it where the verdict changes
//! (`tancheck_core::finite::locate`), and writes that increment's call as a finite-strain case
//! file; replay makes a case's call again and judges it as the check did
//! (`tancheck_core::finite::case`). The path is not shrunk (a path in F has no such shrinker
//! yet): the case holds the call itself, with its start state.

use std::path::{Path as FsPath, PathBuf};

use anyhow::{Context, Result};

use tancheck_core::finite::case::{replay as replay_call, FiniteCase, FiniteCaseMeasures, FiniteCaseRoutine};
use tancheck_core::finite::check::run_checked;
use tancheck_core::finite::locate::{locate, FractionFound};
use tancheck_core::finite::FiniteRoutine;
use tancheck_core::Verdict;

use crate::case_store::{sha256_file, CaseRunArgs};
use crate::exit;
use crate::finite_load::{open, FiniteManifest};
use crate::manifest::Guards;
use crate::report::Reporter;
use crate::session::OutputArgs;

pub use crate::report::model::{FiniteBisectOutcome, FiniteReplayReport};

/// The measures and routine of a manifest, as a case names them.
fn case_routine(m: &FiniteManifest, dir: &FsPath, r: &dyn FiniteRoutine) -> Result<FiniteCaseRoutine> {
    let (library, sha) = match &m.routine.library {
        Some(l) => {
            let p = if l.is_relative() { dir.join(l) } else { l.clone() };
            let p = std::path::absolute(&p).unwrap_or(p);
            let sha = sha256_file(&p).with_context(|| format!("reading {} to hash it", p.display()))?;
            (Some(p.display().to_string()), Some(sha))
        }
        None => (None, None),
    };
    Ok(FiniteCaseRoutine {
        name: r.info().name.clone(),
        model: m.routine.model.clone(),
        library_absolute: library.clone(),
        library,
        library_sha256: sha,
        symbol: m.routine.symbol.clone(),
        nstate: r.info().nstate,
        complex_twin: r.has_complex(),
        guards: Some(
            match m.guards {
                Guards::Off => "off",
                Guards::Light => "light",
                Guards::Full => "full",
            }
            .to_string(),
        ),
        fp_traps: m.fp_traps,
    })
}

/// `tancheck bisect` on a finite-strain manifest.
///
/// `manifest`: the manifest; `strain_path`: whether `--path` was given (refused);
/// `fraction_tol`: `--fraction-tol`.
pub fn bisect(manifest: &FsPath, strain_path: bool, fraction_tol: f64, run: &CaseRunArgs) -> Result<i32> {
    let file = manifest.display().to_string();
    if strain_path {
        anyhow::bail!(
            "{file}: --path takes a strain path; a finite-strain manifest gives its path in F itself"
        );
    }
    for (given, name) in [(run.output.html.is_some(), "--html"), (run.output.junit.is_some(), "--junit")] {
        if given {
            anyhow::bail!("{file}: {name} is not written for a finite-strain bisect; use --json FILE");
        }
    }
    crate::survive::begin_report(run.json.as_deref(), &file)?;
    crate::survive::start_watchdog(crate::survive::DEFAULT_CALL_TIMEOUT, None);
    let (mut m, d, dir) = FiniteManifest::load(manifest)?;
    m.fp_traps |= run.fp_traps;
    let mut r = open(&m, &d, &dir, &file)?;
    crate::survive::set_routine(run.json.as_deref(), &r.info().name.clone());
    let path = m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
    let state0 = if m.start.state.is_empty() { vec![0.0; r.info().nstate] } else { m.start.state.clone() };
    crate::survive::checking(true);
    let (report, checked) = run_checked(r.as_mut(), &m.routine.properties, &state0, &path, m.check);
    let located =
        locate(r.as_mut(), &m.routine.properties, &state0, &checked, &report, m.check, fraction_tol);
    crate::survive::checking(false);
    let mut warnings = Vec::new();
    let mut case_file = None;
    if let Some(l) = &located {
        let measures = FiniteCaseMeasures {
            stress: d.stress.name().into(),
            tangent: d.tangent.name().into(),
            frame: d.frame.name().into(),
        };
        let mut routine = case_routine(&m, &dir, r.as_ref())?;
        let case_dir = run.case_dir_of(manifest, &dir);
        if let Some(lib) = routine.library.clone() {
            routine.library =
                Some(crate::case_store::relative_to(FsPath::new(&lib), &case_dir).display().to_string());
        }
        let of = checked.gradients.len() - 1;
        let case = FiniteCase::capture(measures, routine, l, m.check, Some(file.clone()), of);
        match write(&case_dir, &case) {
            Ok(f) => case_file = Some(f.display().to_string()),
            Err(e) => warnings.push(format!("{e:#}")),
        }
        if let FractionFound::Unknown { why } = &l.fraction {
            warnings.push(format!("increment {}: {why}", l.increment));
        }
    } else if report.verdict == Verdict::TangentFailure {
        warnings.push(
            "the failing increment could not be reached again (a base call on the way faulted): no case was written"
                .into(),
        );
    }
    let outcome = FiniteBisectOutcome {
        routine: report.routine.clone(),
        verdict: report.verdict,
        finding: report.finding.clone(),
        increment: located.as_ref().map(|l| l.increment),
        judged: located.as_ref().map(|l| l.judged.increment.clone()),
        fraction: located.as_ref().map(|l| l.fraction.clone()),
        case: case_file,
        warnings,
        exit_code: report.exit_code,
        cautions: report.cautions.clone(),
        check: report,
    };
    let mut out = crate::session::reporters(&run.output, run.json.as_deref());
    out.finite_bisect(&outcome)?;
    out.finish()?;
    Ok(outcome.exit_code)
}

/// Write `case` into `dir` under a name made of the routine, the increment and a hash of the
/// inputs (the same call gives the same file).
fn write(dir: &FsPath, case: &FiniteCase) -> Result<PathBuf> {
    std::fs::create_dir_all(dir).with_context(|| format!("creating the case folder {}", dir.display()))?;
    let name = crate::case_store::file_stem_of(&case.routine.name);
    let key = serde_json::to_string(&case.call).expect("a call serialises");
    let hash = crate::case_store::sha256_text(&key);
    let file = dir.join(format!("{}-finite-inc{}-{}.json", name, case.call.increment, &hash[..12]));
    crate::report::write_atomic(&file, case.to_json().as_bytes())
        .with_context(|| format!("writing the case {}", file.display()))?;
    Ok(file)
}

/// Whether `text` is a finite-strain case (a `finite` section and a `call`).
pub fn is_finite_case(text: &str) -> bool {
    match serde_json::from_str::<serde_json::Value>(text) {
        Ok(v) => v.get("finite").is_some() && v.get("call").is_some(),
        // Not valid JSON (a case cut short): a point case has no `finite` key, so a file with
        // one is read as a finite-strain case, whose parser names where the JSON breaks (it
        // read "unknown field `finite`" from the point case's parser; a user-style sweep).
        Err(_) => crate::finite_load::has_key(text, "finite"),
    }
}

/// The routine a case names, opened as its manifest would open it.
fn open_case(
    file: &FsPath,
    case: &FiniteCase,
    properties: &[f64],
    warnings: &mut Vec<String>,
) -> Result<Box<dyn FiniteRoutine>, String> {
    let at = |m: String| format!("{}: {m}", file.display());
    let r = &case.routine;
    let folder = file.parent().unwrap_or(FsPath::new("."));
    let mut library = None;
    if let Some(lib) = &r.library {
        let lib = PathBuf::from(lib);
        let mut p = if lib.is_relative() { folder.join(&lib) } else { lib };
        if let (false, Some(abs)) = (p.exists(), &r.library_absolute) {
            if FsPath::new(abs).exists() {
                warnings.push(at(format!(
                    "the library is not at {} (relative to the case); using {abs}, where it was when the case was \
                     written",
                    p.display()
                )));
                p = PathBuf::from(abs);
            }
        }
        match (&r.library_sha256, sha256_file(&p)) {
            (_, Err(e)) => return Err(at(format!("cannot read the library {}: {e}", p.display()))),
            (Some(then), Ok(now)) if *then != now => warnings.push(at(format!(
                "the library {} changed since the case was written (SHA-256 {} then, {} now): the call may not \
                 reproduce",
                p.display(),
                &then[..then.len().min(12)],
                &now[..12]
            ))),
            _ => {}
        }
        library = Some(std::path::absolute(&p).unwrap_or(p));
    }
    // The case's routine as a manifest: the same loader opens it.
    let guards = match r.guards.as_deref() {
        Some("off") => Guards::Off,
        Some("full") => Guards::Full,
        _ => Guards::Light,
    };
    let manifest = serde_json::json!({
        "finite": { "stress": case.finite.stress, "tangent": case.finite.tangent, "frame": case.finite.frame },
        "routine": {
            "library": library, "symbol": r.symbol, "model": r.model,
            "states": r.nstate, "properties": properties,
        },
    });
    let mut m: FiniteManifest =
        serde_json::from_value(manifest).map_err(|e| at(format!("the case's routine or measures: {e}")))?;
    m.guards = guards;
    m.fp_traps = r.fp_traps;
    let d = m.declared_measures().map_err(at)?;
    let name = file.display().to_string();
    let routine = open(&m, &d, folder, &name).map_err(|e| format!("{e:#}"))?;
    if r.complex_twin && !routine.has_complex() {
        warnings.push(at("the case was written with a complex-step twin; the routine has none now".into()));
    }
    Ok(routine)
}

/// Replay a finite-strain case; `Err` is a case that cannot be run (naming the file).
pub fn replay_file(file: &FsPath, text: &str) -> Result<FiniteReplayReport, String> {
    let case = FiniteCase::parse(text).map_err(|(l, c, m)| format!("{}:{l}:{c}: {m}", file.display()))?;
    let mut warnings = Vec::new();
    let call = case.decode(&mut warnings).map_err(|m| format!("{}: {m}", file.display()))?;
    let warnings_of_numbers: Vec<String> =
        warnings.drain(..).map(|w| format!("{}: {w}", file.display())).collect();
    warnings.extend(warnings_of_numbers);
    let mut r = open_case(file, &case, &call.start.properties, &mut warnings)?;
    if r.info().nproperties != call.start.properties.len() || r.info().nstate != call.start.state0.len() {
        return Err(format!("{}: the routine's sizes differ from the case's", file.display()));
    }
    crate::survive::set_routine(None, &r.info().name.clone());
    let replayed = replay_call(r.as_mut(), &case, &call);
    let routine = match (&case.routine.model, &case.routine.library) {
        (Some(m), _) => format!("{m} (built-in model)"),
        (_, Some(l)) => format!("{} in {l}", case.routine.symbol.as_deref().unwrap_or("?")),
        _ => case.routine.name.clone(),
    };
    let o = &case.origin;
    let origin = format!(
        "increment {} of {}{}; {}",
        o.increment,
        o.of,
        o.manifest.as_ref().map_or(String::new(), |m| format!(" of {m}")),
        o.fraction.words()
    );
    let exe = std::env::current_exe().map(|p| p.display().to_string()).unwrap_or_else(|_| "tancheck".into());
    let abs = std::path::absolute(file).unwrap_or_else(|_| file.to_path_buf());
    let debugger = match &case.routine.symbol {
        Some(s) => format!(
            "gdb -ex 'set breakpoint pending on' -ex 'break {s}' -ex run --args {exe} replay {}",
            abs.display()
        ),
        None => format!("gdb --args {exe} replay {}", abs.display()),
    };
    let recorded_finding = case.check.verdict.cause.as_ref().map(|c| c.name.clone());
    let (judged, differences, fault, stress) = match replayed {
        Ok(rp) => (Some(rp.judged.increment), rp.differs, None, rp.judged.base.stress.to_vec()),
        Err(m) => (None, Vec::new(), Some(m), Vec::new()),
    };
    let pass = fault.is_none() && judged.as_ref().is_some_and(|j| j.passed);
    let exit_code = if fault.is_some() {
        exit::ROUTINE_FAULT
    } else if pass {
        exit::PASS
    } else {
        exit::TANGENT_FAILURE
    };
    Ok(FiniteReplayReport {
        case: file.display().to_string(),
        routine,
        origin,
        warnings,
        call: case.call.clone(),
        identical: fault.is_none() && differences.is_empty(),
        differences,
        fault,
        judged,
        stress,
        pass,
        recorded_finding,
        debugger,
        exit_code,
    })
}

/// `tancheck replay` of a finite-strain case (`text` is the file's content).
pub fn replay(case: &FsPath, json: Option<&FsPath>, output: &OutputArgs, text: &str) -> Result<i32> {
    crate::survive::checking(true);
    let replayed = replay_file(case, text);
    crate::survive::checking(false);
    let report = match replayed {
        Ok(r) => r,
        Err(m) => {
            crate::say!("tancheck: {m}");
            return Ok(exit::BAD_INPUT);
        }
    };
    let mut out = crate::session::reporters(output, json);
    out.finite_replay(&report)?;
    out.finish()?;
    Ok(report.exit_code)
}
