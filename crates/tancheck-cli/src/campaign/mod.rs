//! `tancheck campaign FILE|DIR`: check a library of routines. The campaign file (or a folder of
//! manifests) lists routines with property sets, paths and probe suites ([`file`]); the
//! libraries it names are built once ([`build`]); the items run one by one, on several
//! threads or in worker processes ([`run`], each item by [`item`]), the regression cases
//! first; `--shard K/N` (or a Slurm job array's variables) runs the items whose hash falls in
//! shard K and writes a partial report that `tancheck merge` puts together.

pub mod build;
pub mod file;
mod findings;
pub mod item;
pub mod run;
mod stamp;

use std::path::PathBuf;

use anyhow::{bail, Context, Result};
use clap::Args;

use crate::report::campaign::{CampaignIdentity, CampaignReport, ShardInfo};
use crate::report::Reporter;
use file::Campaign;

#[derive(Args, Debug)]
#[command(after_help = "Exit codes: the worst item decides (a fault 3, bad input 2, a tangent \
finding 1, a broken twin 4, else 0); an item whose outcome is the one the campaign file expects \
counts as 0. A bad campaign file (or a manifest, suite or path it names) is exit 2 before anything runs.")]
pub struct CampaignArgs {
    /// The campaign file (JSON, format tancheck-campaign), or a folder whose *.json files are
    /// each a manifest.
    pub campaign: PathBuf,
    /// Items run at the same time (default: one per core).
    #[arg(short, long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=1024))]
    pub jobs: Option<u16>,
    /// Run each item in its own worker process (the tancheck program again), so a routine
    /// that crashes or ends its process cannot take the other items down.
    #[arg(long)]
    pub isolate: bool,
    /// Run shard K of N (0-based, K < N): the items whose key hash modulo N is K; the JSON
    /// report is then a partial one for `tancheck merge`. Without it, a Slurm job array's
    /// SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_COUNT and SLURM_ARRAY_TASK_MIN are used when set.
    #[arg(long, value_name = "K/N")]
    pub shard: Option<String>,
    /// Build the campaign's libraries in this folder instead of where the campaign file puts them.
    #[arg(long, value_name = "DIR")]
    pub build_dir: Option<PathBuf>,
    /// Time limit of one item in a worker (--isolate), in seconds.
    #[arg(long, value_name = "SECONDS", default_value_t = 600.0, value_parser = crate::survive::parse_seconds)]
    pub item_timeout: f64,
    /// Time limit of one routine call, in seconds, on whichever thread it runs: in one process
    /// a call that does not return ends the campaign (a thread cannot be stopped); with
    /// --isolate it ends that item's worker, the item is a fault naming the call, and the
    /// other items run (--item-timeout limits each worker's item as a whole).
    #[arg(long, value_name = "SECONDS", default_value_t = crate::survive::DEFAULT_CALL_TIMEOUT, value_parser = crate::survive::parse_seconds)]
    pub call_timeout: f64,
    /// Write the JSON report to FILE (`-` for standard output).
    #[arg(long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    /// Run the item at this position only (what a worker of --isolate does).
    #[arg(long, value_name = "POSITION", hide = true)]
    pub item: Option<usize>,
    #[command(flatten)]
    pub output: crate::session::OutputArgs,
}

/// `K/N` with K < N, N ≥ 1.
pub fn parse_shard(s: &str) -> Result<ShardInfo> {
    let (k, n) = s.split_once('/').with_context(|| format!("--shard takes K/N (e.g. 0/4); got `{s}`"))?;
    let index: usize =
        k.trim().parse().with_context(|| format!("--shard {s}: `{k}` is not a whole number"))?;
    let count: usize =
        n.trim().parse().with_context(|| format!("--shard {s}: `{n}` is not a whole number"))?;
    if count == 0 || index >= count {
        bail!("--shard {s}: K must be 0 to N-1 and N at least 1 (shards are counted from 0)");
    }
    Ok(ShardInfo { index, count })
}

/// The shard of a Slurm job array task, when the variables are set: K is the task's id less
/// the array's first id (SLURM_ARRAY_TASK_MIN, 0 when unset), N the task count. An array
/// with a step (`--array=0-7:2`) gives ids beyond N and is refused.
pub fn slurm_shard() -> Result<Option<ShardInfo>> {
    let var = |k: &str| std::env::var(k).ok().filter(|v| !v.trim().is_empty());
    let (Some(id), Some(count)) = (var("SLURM_ARRAY_TASK_ID"), var("SLURM_ARRAY_TASK_COUNT")) else {
        return Ok(None);
    };
    let num = |name: &str, v: &str| -> Result<usize> {
        v.trim().parse().with_context(|| format!("{name}=`{v}` is not a whole number"))
    };
    let id = num("SLURM_ARRAY_TASK_ID", &id)?;
    let count = num("SLURM_ARRAY_TASK_COUNT", &count)?;
    let min = match var("SLURM_ARRAY_TASK_MIN") {
        Some(m) => num("SLURM_ARRAY_TASK_MIN", &m)?,
        None => 0,
    };
    if count == 0 {
        bail!("SLURM_ARRAY_TASK_COUNT=0: a job array has at least one task");
    }
    if id < min || id - min >= count {
        bail!(
            "SLURM_ARRAY_TASK_ID={id} with SLURM_ARRAY_TASK_MIN={min} and SLURM_ARRAY_TASK_COUNT={count}: \
             not one of the shards 0 to {}; give the job array contiguous ids (--array=0-{})",
            count.saturating_sub(1),
            count.saturating_sub(1)
        );
    }
    Ok(Some(ShardInfo { index: id - min, count }))
}

/// Run the command; returns the exit code.
pub fn run(a: &CampaignArgs) -> Result<i32> {
    a.output.prepare()?;
    if let Some(p) = a.json.as_deref().filter(|p| p.as_os_str() != "-") {
        crate::report::files::check_output(Some(p), "--json")?;
    }
    // Everything the campaign names is read and checked before anything is written; no report
    // may be written over any of it.
    let c = Campaign::load(&a.campaign)?;
    let inputs = c.inputs(a.build_dir.as_deref());
    let inputs: Vec<&std::path::Path> = inputs.iter().map(|p| p.as_path()).collect();
    a.output.guard_named(a.json.as_deref(), &inputs, &format!("campaign {}", c.name))?;
    let shard = match &a.shard {
        Some(s) => Some(parse_shard(s)?),
        None if a.item.is_none() => slurm_shard()?,
        None => None,
    };
    if let Some(pos) = a.item {
        if pos >= c.items.len() {
            bail!("--item {pos}: the campaign has {} items", c.items.len());
        }
        // A worker of --isolate dies with its parent (a killed campaign left its worker
        // running a routine that hangs; a user-style sweep), as a check's worker does.
        let parent = std::env::var(crate::isolate::PARENT_ENV).ok().and_then(|p| p.parse::<u32>().ok());
        if let Some(parent) = parent {
            if !tancheck_abi::watch::follow_parent(parent) {
                bail!("the parent process {parent} of this worker is gone");
            }
        }
    }
    if let Some(p) = a.json.as_deref().filter(|p| p.as_os_str() != "-") {
        // A report of an earlier run is replaced at once: never yesterday's verdict.
        let mut marker = serde_json::json!({
            "format": crate::report::campaign::FORMAT,
            "version": crate::report::campaign::VERSION,
            "kind": if shard.is_some() { crate::report::campaign::PARTIAL_KIND } else { crate::report::campaign::KIND },
            "verdict": "incomplete",
        });
        if let Some(s) = shard {
            marker["shard"] = serde_json::json!({"index": s.index, "count": s.count});
        }
        // Kept for a run that ends on bad input after this (a library's build folder that cannot
        // be made, a stamp that cannot be written): the earlier report is put back (it was left
        // as this marker; a user-style sweep). A library that does not compile no longer ends
        // the run: its items are bad input.
        let marker = format!("{marker}\n");
        crate::survive::replace_with_marker(p, marker.into_bytes())
            .with_context(|| format!("writing the JSON report to {}", p.display()))?;
    }
    if !a.isolate {
        // A routine that ends the process (or a crash beyond the guard) ends the campaign in
        // this process: its last words replace the marker with a report naming the fault, the
        // routine and its call (the items before it are lost; --isolate keeps them). In a
        // worker of --isolate (`--item`, `--json -`) they go to its output, where the parent
        // reads what stopped it.
        crate::survive::set_routine(a.json.as_deref(), &format!("campaign {}", c.name));
    }
    let mut notes = Vec::new();
    let libs = build::build_all(&c, a.build_dir.as_deref(), !a.output.quiet && a.item.is_none(), &mut notes)?;
    if !a.isolate && a.item.is_none() {
        // In one process a call that does not return ends the campaign (a thread cannot be
        // stopped); the message says what keeps the other items.
        crate::survive::set_timeout_hint(
            "--call-timeout sets the limit; in one process it ends the campaign: `campaign --isolate` \
             checks each item in a process of its own and goes on past it",
        );
    }
    crate::survive::start_watchdog(a.call_timeout, None);
    let items: Vec<&file::Item> = c
        .items
        .iter()
        .filter(|it| a.item.is_none_or(|p| p == it.position))
        .filter(|it| shard.is_none_or(|s| (it.hash % s.count as u64) as usize == s.index))
        .collect();
    let jobs = a
        .jobs
        .map(usize::from)
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get));
    let isolate = if a.isolate && a.item.is_none() {
        let program = std::env::current_exe().context("finding the tancheck program for the workers")?;
        // The workers time each call as this process would (they had the default limit,
        // whatever --call-timeout said, and the item limit stopped them without a word).
        let mut args: Vec<std::ffi::OsString> = vec![
            "campaign".into(),
            a.campaign.clone().into(),
            "--call-timeout".into(),
            a.call_timeout.to_string().into(),
        ];
        if let Some(d) = &a.build_dir {
            args.push("--build-dir".into());
            args.push(d.clone().into());
        }
        Some((program, args))
    } else {
        None
    };
    let runner = run::Runner { campaign: &c, libs: &libs, jobs, isolate, item_timeout: a.item_timeout };
    // A stop signal (Ctrl-C, SIGTERM, SIGHUP) lets the items in progress finish and starts no
    // new one; the reports then hold the items checked so far (a stopped campaign kept nothing
    // of them). A second signal ends the process at once. A worker of --isolate dies of it.
    let top = a.item.is_none();
    if top {
        tancheck_abi::watch::defer_stop(true);
    }
    let results = runner.run(&items);
    let stop = if top { tancheck_abi::watch::stop_signal() } else { 0 };
    if stop != 0 {
        let not_run = results.iter().filter(|r| r.outcome == item::NOT_RUN).count();
        notes.push(format!(
            "stopped by {}: {} of {} items checked, {not_run} not run (run the campaign again to check them)",
            item::signal_name(stop),
            results.len() - not_run,
            results.len()
        ));
    }
    if let Some(s) = shard {
        notes.push(format!(
            "shard {} of {} (0-based): {} of {} items",
            s.index,
            s.count,
            results.len(),
            c.items.len()
        ));
    }
    let mut report = CampaignReport {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        campaign: CampaignIdentity { name: c.name.clone(), digest: c.digest.clone(), items: c.items.len() },
        shard,
        merged: None,
        items: results,
        routines: Vec::new(),
        notes,
        exit_code: 0,
        cautions: tancheck_core::report::CAUTIONS.iter().map(|s| s.to_string()).collect(),
    };
    report.summarize((stop != 0).then_some(128 + stop));
    let mut reporters = crate::session::reporters(&a.output, a.json.as_deref());
    reporters.campaign(&report)?;
    reporters.finish()?;
    Ok(report.exit_code)
}
