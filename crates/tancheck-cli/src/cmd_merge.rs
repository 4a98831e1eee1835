//! `tancheck merge PARTIALS...`: put the partial reports of a campaign's shards together into
//! one report, its items in the order a serial run gives, through the same reporters (JSON,
//! JUnit, HTML, terminal). Reports of different campaigns (another digest, name, item count
//! or shard count) are refused; missing shards are named and make the exit code 2.

use std::path::PathBuf;

use anyhow::{bail, Context, Result};
use clap::Args;

use crate::report::campaign::{list, CampaignReport, MergeInfo};
use crate::report::Reporter;

#[derive(Args, Debug)]
pub struct MergeArgs {
    /// The partial reports (JSON) written by `tancheck campaign --shard K/N --json FILE`.
    #[arg(required = true)]
    pub partials: Vec<PathBuf>,
    /// Write the merged JSON report to FILE (`-` for standard output).
    #[arg(short = 'o', long, value_name = "FILE")]
    pub json: Option<PathBuf>,
    #[command(flatten)]
    pub output: crate::session::OutputArgs,
}

/// Merge `parts` (each with the file it came from). Errors name the file.
pub fn merge(parts: Vec<(PathBuf, CampaignReport)>) -> Result<CampaignReport> {
    let Some((first_file, first)) = parts.first() else {
        bail!("no finished partial report given: every shard is missing")
    };
    let Some(first_shard) = first.shard else {
        bail!("{}: not a partial report (written without --shard)", first_file.display());
    };
    let count = first_shard.count;
    let mut seen: Vec<Option<&PathBuf>> = vec![None; count];
    let mut items = Vec::new();
    let mut notes: Vec<String> = Vec::new();
    for (file, p) in &parts {
        let Some(sh) = p.shard else {
            bail!("{}: not a partial report (written without --shard)", file.display())
        };
        if p.campaign != first.campaign || sh.count != count {
            bail!(
                "{}: another campaign than {} ({} digest {}, {} shards, against {} digest {}, {} shards): refusing to merge",
                file.display(),
                first_file.display(),
                p.campaign.name,
                &p.campaign.digest[..p.campaign.digest.len().min(12)],
                sh.count,
                first.campaign.name,
                &first.campaign.digest[..first.campaign.digest.len().min(12)],
                count
            );
        }
        if let Some(other) = seen[sh.index] {
            bail!("{}: shard {} was already given by {}", file.display(), sh.index, other.display());
        }
        seen[sh.index] = Some(file);
        items.extend(p.items.iter().cloned());
        for n in &p.notes {
            // Each shard says which it was; the merged report says which it holds.
            if !n.starts_with("shard ") && !notes.contains(n) {
                notes.push(n.clone());
            }
        }
    }
    items.sort_by_key(|i| i.position);
    if let Some(w) = items.windows(2).find(|w| w[0].position == w[1].position) {
        bail!("two partial reports hold item {} ({}): refusing to merge", w[0].position, w[0].key);
    }
    let missing: Vec<usize> = (0..count).filter(|k| seen[*k].is_none()).collect();
    if missing.is_empty() && items.len() != first.campaign.items {
        bail!(
            "every shard is here but they hold {} items, the campaign has {}: refusing to merge",
            items.len(),
            first.campaign.items
        );
    }
    let mut r = CampaignReport {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        campaign: first.campaign.clone(),
        shard: None,
        merged: Some(MergeInfo { shards: count, missing: missing.clone() }),
        items,
        routines: Vec::new(),
        notes,
        exit_code: 0,
        cautions: first.cautions.clone(),
    };
    r.summarize((!missing.is_empty()).then_some(crate::exit::BAD_INPUT));
    if !missing.is_empty() {
        r.notes.push(format!(
            "missing shards {} of {count} (0-based): their items are not in this report",
            list(&missing)
        ));
    }
    Ok(r)
}

/// The fault of a shard's last words (the report a process writes as a routine ends it),
/// when `text` is one.
fn last_words(text: &str) -> Option<String> {
    let v = serde_json::from_str::<serde_json::Value>(text).ok()?;
    (v["kind"] == "last-words").then(|| {
        let f = &v["fault"];
        format!(
            "{}, {}",
            f["message"].as_str().unwrap_or("a fault"),
            f["when"].as_str().unwrap_or("during a call")
        )
    })
}

/// Whether `text` is the "incomplete" marker of a run that did not finish.
fn is_incomplete(text: &str) -> bool {
    serde_json::from_str::<serde_json::Value>(text).is_ok_and(|v| v["verdict"] == "incomplete")
}

pub fn run(a: &MergeArgs) -> Result<i32> {
    a.output.prepare()?;
    let inputs: Vec<&std::path::Path> = a.partials.iter().map(|p| p.as_path()).collect();
    a.output.guard(a.json.as_deref(), &inputs)?;
    let mut parts = Vec::new();
    for f in &a.partials {
        let text = std::fs::read_to_string(f).with_context(|| format!("{}: cannot read", f.display()))?;
        if is_incomplete(&text) {
            // The marker a shard leaves until it finishes: that shard is missing.
            crate::say!("tancheck: merge: {}: incomplete (its shard did not finish): left out", f.display());
            continue;
        }
        if let Some(why) = last_words(&text) {
            // A shard whose process a routine ended: its last words replaced the marker.
            crate::say!(
                "tancheck: merge: {}: its shard ended before it finished ({why}): left out",
                f.display()
            );
            continue;
        }
        let r = CampaignReport::from_json(&text).map_err(|e| anyhow::anyhow!("{}: {e}", f.display()))?;
        parts.push((f.clone(), r));
    }
    let r = merge(parts)?;
    let mut reporters = crate::session::reporters(&a.output, a.json.as_deref());
    reporters.campaign(&r)?;
    reporters.finish()?;
    if let Some(m) = r.merged.as_ref().filter(|m| !m.missing.is_empty()) {
        crate::say!(
            "tancheck: merge: missing shards {} of {} (0-based): no finished partial report was given for them",
            list(&m.missing),
            m.shards
        );
    }
    Ok(r.exit_code)
}
