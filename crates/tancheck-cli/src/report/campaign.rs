//! The report of a campaign (`tancheck campaign`, one shard of it, or `tancheck merge` of its
//! shards): one result per item (a routine's check or probe suite with a property set and a
//! path, or the replay of its regression cases), in the order a serial run gives, and the
//! campaign's identity so partial reports of different campaigns are never merged. The data
//! types, their JSON document and the lines every view shares; the terminal's view is in
//! `terminal::campaign`, the HTML page and the JUnit XML in `campaign_pages`.

use serde::{Deserialize, Serialize};

/// The document's `format` and `version` (the same envelope as every other report).
pub const FORMAT: &str = "tancheck-report";
pub const VERSION: u32 = 1;
/// The `kind` of a whole campaign's report, and of one shard's partial report.
pub const KIND: &str = "campaign";
pub const PARTIAL_KIND: &str = "campaign-part";

/// Which campaign a report belongs to.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct CampaignIdentity {
    /// The campaign's `name` (or its folder's name for a folder of manifests).
    pub name: String,
    /// SHA-256 over the campaign file and every manifest, suite and path file it uses, and
    /// the item keys: two reports with the same digest are of the same campaign.
    pub digest: String,
    /// Items of the whole campaign (every shard's together).
    pub items: usize,
}

/// One shard of a campaign: shard `index` (0-based) of `count`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct ShardInfo {
    pub index: usize,
    pub count: usize,
}

/// What `tancheck merge` put together.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct MergeInfo {
    pub shards: usize,
    /// Shards no partial report was given for (0-based); empty when complete.
    pub missing: Vec<usize>,
}

/// The worst error of one scheme along an item's path.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SchemeWorst {
    pub scheme: String,
    /// NaN or infinite for a routine that returned values that are not finite numbers: written
    /// as null (JSON has no NaN), read back as NaN (an `--isolate` worker's report and the
    /// shards `merge` reads could not be read; a user-style sweep).
    #[serde(deserialize_with = "nan_from_null")]
    pub worst: f64,
}

/// A number, or null for one that was not finite.
fn nan_from_null<'de, D: serde::Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
    Ok(Option::<f64>::deserialize(d)?.unwrap_or(f64::NAN))
}

/// The result of one item.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ItemResult {
    /// Place in the serial run (0-based); reports list items in this order.
    pub position: usize,
    /// The canonical key of the item (manifest, property set, path, task).
    pub key: String,
    /// FNV-1a 64 of the key, 16 hex digits: decides the item's shard.
    pub hash: String,
    /// The manifest, relative to the campaign's folder: the routine the item belongs to.
    pub routine: String,
    /// The routine's symbol or model.
    pub name: String,
    /// The property set's name (`manifest` for the manifest's own).
    pub properties: String,
    /// The path's label (`manifest` for the manifest's own).
    pub path: String,
    /// `cases`, `check` or `probe <suite>`.
    pub task: String,
    /// pass, fail, fault, twin, error or skipped.
    pub outcome: String,
    pub finding: String,
    /// The item's own exit code (0 pass, 1 finding, 2 bad input, 3 fault, 4 twin).
    pub exit_code: i32,
    /// What the campaign file expects (`pass`, `fail`, ...), when it says.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub expected: Option<String>,
    /// The finding the campaign file expects, when it says.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub expected_finding: Option<String>,
    /// Whether the outcome is the one expected (a pass when nothing is said).
    pub as_expected: bool,
    /// The exit code the item adds to the campaign: 0 when as expected.
    pub code: i32,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub first_failing_increment: Option<usize>,
    pub increments: usize,
    pub failed: usize,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub worst: Vec<SchemeWorst>,
    /// Why it was skipped, what went wrong, or a fault's message.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub message: Option<String>,
}

/// The items of one routine, summed up.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct RoutineSummary {
    /// The manifest, relative to the campaign's folder.
    pub routine: String,
    pub name: String,
    pub items: usize,
    /// Items whose outcome is not the one expected.
    pub not_as_expected: usize,
    /// The worst of its items' codes.
    pub code: i32,
}

/// A campaign's report: the whole campaign, one shard, or a merge of shards.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CampaignReport {
    pub tool: String,
    pub campaign: CampaignIdentity,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shard: Option<ShardInfo>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub merged: Option<MergeInfo>,
    pub items: Vec<ItemResult>,
    /// Per routine (in the order of the items): its items summed up.
    #[serde(default)]
    pub routines: Vec<RoutineSummary>,
    /// Builds, skipped languages, workers: what the user should know.
    pub notes: Vec<String>,
    pub exit_code: i32,
    pub cautions: Vec<String>,
}

/// How bad an exit code is, for "the worst item decides": a fault (3, 70), bad input (2), a
/// tangent finding (1), a broken twin (4), a pass (0).
pub fn severity(code: i32) -> u8 {
    match code {
        0 => 0,
        4 => 1,
        1 => 2,
        3 | 70 => 4,
        _ => 3,
    }
}

/// The worst of `codes` (0 for none).
pub fn worst_code(codes: impl IntoIterator<Item = i32>) -> i32 {
    codes.into_iter().fold(0, |w, c| if severity(c) > severity(w) { c } else { w })
}

impl CampaignReport {
    /// The exit code of the items (the worst decides), recomputed.
    pub fn items_code(&self) -> i32 {
        worst_code(self.items.iter().map(|i| i.code))
    }

    /// Fill `routines` from the items, and `exit_code` with the worst item's code unless
    /// `forced` (merge: 2 for missing shards).
    pub fn summarize(&mut self, forced: Option<i32>) {
        let routines: Vec<RoutineSummary> = self
            .routines()
            .into_iter()
            .map(|(routine, items)| RoutineSummary {
                routine: routine.to_string(),
                name: items[0].name.clone(),
                items: items.len(),
                not_as_expected: items.iter().filter(|i| !i.as_expected).count(),
                code: worst_code(items.iter().map(|i| i.code)),
            })
            .collect();
        self.routines = routines;
        self.exit_code = forced.unwrap_or_else(|| self.items_code());
    }

    /// The routines in order of first appearance, each with its items.
    pub fn routines(&self) -> Vec<(&str, Vec<&ItemResult>)> {
        let mut groups: Vec<(&str, Vec<&ItemResult>)> = Vec::new();
        for it in &self.items {
            match groups.iter_mut().find(|g| g.0 == it.routine) {
                Some(g) => g.1.push(it),
                None => groups.push((&it.routine, vec![it])),
            }
        }
        groups
    }

    /// The JSON document.
    pub fn to_json(&self) -> String {
        #[derive(Serialize)]
        struct Envelope<'a> {
            format: &'a str,
            version: u32,
            kind: &'a str,
            #[serde(flatten)]
            body: &'a CampaignReport,
        }
        let kind = if self.shard.is_some() { PARTIAL_KIND } else { KIND };
        let env = Envelope { format: FORMAT, version: VERSION, kind, body: self };
        let mut s = serde_json::to_string_pretty(&env).expect("a campaign report serializes");
        s.push('\n');
        s
    }

    /// Read a document written by [`CampaignReport::to_json`]; the error says what is wrong.
    pub fn from_json(text: &str) -> Result<CampaignReport, String> {
        let v: serde_json::Value = serde_json::from_str(text).map_err(|e| e.to_string())?;
        let field = |k: &str| v.get(k).and_then(|x| x.as_str()).unwrap_or("");
        if field("format") != FORMAT {
            return Err(format!("not a tancheck report (format `{}`)", field("format")));
        }
        if v.get("version").and_then(|x| x.as_u64()) != Some(u64::from(VERSION)) {
            return Err(format!("report version {:?}; this tancheck reads {VERSION}", v.get("version")));
        }
        if field("kind") != KIND && field("kind") != PARTIAL_KIND {
            return Err(format!("a `{}` report, not a campaign's", field("kind")));
        }
        let mut v = v;
        if let Some(o) = v.as_object_mut() {
            for k in ["format", "version", "kind"] {
                o.remove(k);
            }
        }
        serde_json::from_value(v).map_err(|e| e.to_string())
    }
}

/// One line for an item: what ran and how it came out.
pub fn item_line(it: &ItemResult) -> String {
    let mut what = it.task.clone();
    if it.properties != "manifest" {
        what.push_str(&format!(", properties {}", it.properties));
    }
    if it.path != "manifest" {
        what.push_str(&format!(", path {}", it.path));
    }
    let mut s = format!("{:<7} {:<44} {}", it.outcome.to_uppercase(), what, it.finding);
    if let Some(k) = it.first_failing_increment {
        s.push_str(&format!(" (first at increment {k})"));
    }
    if let Some(e) = &it.expected {
        let exp = match &it.expected_finding {
            Some(f) => format!("{e} {f}"),
            None => e.clone(),
        };
        s.push_str(&format!(
            "; expected {exp}: {}",
            if it.as_expected { "as expected" } else { "NOT AS EXPECTED" }
        ));
    } else if !it.as_expected && it.outcome != "not-run" {
        // Nothing said is a pass expected (the page said so; the terminal did not).
        s.push_str("; expected pass: NOT AS EXPECTED");
    }
    if let Some(m) = &it.message {
        s.push_str(&format!("\n          {m}"));
    }
    s
}

/// The headline: name, items, shard or merge.
pub fn headline(r: &CampaignReport) -> String {
    let mut s = format!(
        "campaign {}: {} of {} items, {} routines (digest {})",
        r.campaign.name,
        r.items.len(),
        r.campaign.items,
        r.routines().len(),
        &r.campaign.digest[..r.campaign.digest.len().min(12)]
    );
    if let Some(sh) = r.shard {
        s.push_str(&format!(", shard {} of {} (0-based)", sh.index, sh.count));
    }
    if let Some(m) = &r.merged {
        s.push_str(&format!(", merged from {} shards", m.shards - m.missing.len()));
        if !m.missing.is_empty() {
            s.push_str(&format!(", MISSING shards {}", list(&m.missing)));
        }
    }
    s
}

/// `0, 2, 3`.
pub fn list(v: &[usize]) -> String {
    v.iter().map(usize::to_string).collect::<Vec<_>>().join(", ")
}

/// The closing line: counts and the exit code.
pub fn verdict_line(r: &CampaignReport) -> String {
    let bad = r.items.iter().filter(|i| !i.as_expected).count();
    let skipped = r.items.iter().filter(|i| i.outcome == "skipped").count();
    let not_run = r.items.iter().filter(|i| i.outcome == "not-run").count();
    format!(
        "overall: {} as expected, {bad} not{}{}: exit {}",
        r.items.len() - bad,
        if skipped > 0 { format!(", {skipped} skipped") } else { String::new() },
        if not_run > 0 { format!(" ({not_run} of them not run: stopped)") } else { String::new() },
        r.exit_code
    )
}

#[cfg(test)]
mod tests {
    use super::SchemeWorst;

    // A worst error that is not finite goes out as null and comes back as NaN (it could not be
    // read back: a campaign item with a routine returning NaN broke `--isolate` and `merge`).
    #[test]
    fn a_worst_error_that_is_not_finite_reads_back() {
        let w = SchemeWorst { scheme: "central".into(), worst: f64::NAN };
        let text = serde_json::to_string(&w).unwrap();
        assert!(text.contains("null"), "{text}");
        let back: SchemeWorst = serde_json::from_str(&text).unwrap();
        assert!(back.worst.is_nan());
        let finite: SchemeWorst = serde_json::from_str(r#"{"scheme":"central","worst":1.5e-3}"#).unwrap();
        assert_eq!(finite.worst, 1.5e-3);
    }
}
