//! The bundled campaign as a real Slurm job array: four tasks (scripts/slurm/campaign.sbatch,
//! submitted with `sbatch --wait`), then the merge as a dependent job (merge.sbatch,
//! `--dependency=afterany:`); the merged items (findings, verdicts, worst errors bit for bit,
//! order) equal the same campaign run in one process. Needs a running Slurm whose nodes see
//! this folder (scripts/slurm/local-cluster.sh starts a one-node one on this machine; CI does,
//! and sets TANCHECK_REQUIRE_SLURM=1 so that a missing Slurm fails this test).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use serde_json::Value;
use tancheck_testkit::libs::scratch;

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn repo(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

fn read(p: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display())))
        .unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

#[test]
#[cfg_attr(tancheck_no_slurm, ignore = "needs a running Slurm (sbatch, sinfo)")]
fn the_bundled_campaign_as_a_slurm_job_array_merges_to_the_one_process_run() {
    let d = scratch("array");
    let tancheck = env!("CARGO_BIN_EXE_tancheck");
    let campaign = repo("campaigns/bundled/campaign.json");
    let build = Path::new(env!("CARGO_TARGET_TMPDIR")).join("campaign-build");
    // In one process first (this also builds the libraries the tasks then find up to date).
    let serial = d.join("serial.json");
    let o = Command::new(tancheck)
        .arg("campaign")
        .arg(&campaign)
        .arg("--build-dir")
        .arg(&build)
        .args(["-q", "--json"])
        .arg(&serial)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));

    let out = d.join("out");
    let o = Command::new("timeout")
        .args(["900", "sbatch", "--wait", "--parsable", "--array=0-3"])
        .arg(repo("scripts/slurm/campaign.sbatch"))
        .arg(&campaign)
        .arg(&out)
        .arg("--build-dir")
        .arg(&build)
        .current_dir(&d)
        .env("TANCHECK", tancheck)
        .output()
        .expect("sbatch runs");
    assert_eq!(o.status.code(), Some(0), "sbatch --wait of the array: {}", text(&o));
    let job = String::from_utf8_lossy(&o.stdout).trim().split(';').next().unwrap_or_default().to_string();
    assert!(job.chars().all(|c| c.is_ascii_digit()) && !job.is_empty(), "job id `{job}`: {}", text(&o));
    for k in 0..4 {
        let p = read(&out.join(format!("part-{k}.json")));
        assert_eq!(p["shard"]["index"], k);
        assert_eq!(p["shard"]["count"], 4);
    }
    let o = Command::new("timeout")
        .args(["300", "sbatch", "--wait", &format!("--dependency=afterany:{job}")])
        .arg(repo("scripts/slurm/merge.sbatch"))
        .arg(&out)
        .current_dir(&d)
        .env("TANCHECK", tancheck)
        .output()
        .expect("sbatch runs");
    assert_eq!(o.status.code(), Some(0), "sbatch --wait of the merge: {}", text(&o));
    let merged = read(&out.join("campaign.json"));
    let serial = read(&serial);
    assert_eq!(merged["merged"]["missing"], serde_json::json!([]));
    assert_eq!(merged["campaign"], serial["campaign"]);
    assert_eq!(merged["items"], serial["items"], "the job array's merged items against one process");
    assert_eq!(merged["routines"], serial["routines"]);
    assert!(out.join("campaign.xml").is_file() && out.join("campaign.html").is_file());
}
