//! A report written to something that is not a plain file stays where it was asked to go: a
//! named pipe (as `/dev/null` or a terminal, a file a rename would replace by a plain file)
//! gets the report written into it and stays a pipe, and a symbolic link stays a link, the
//! report going to the file it names. A run that ends on bad input (exit 2) loses nothing: the
//! earlier report is put back, a report file that names an input or another report's file is
//! refused before anything is written.

use std::io::Read;
use std::path::Path;
use std::process::Command;

use tancheck_testkit::libs::scratch;

const MANIFEST: &str = r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#;

fn check(dir: &Path, args: &[&str]) -> std::process::Output {
    let m = dir.join("m.json");
    std::fs::write(&m, MANIFEST).unwrap();
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(&m)
        .args(["--path", "tension-shear:4e-3:10:10", "-q"])
        .args(args)
        .output()
        .unwrap()
}

#[test]
fn a_named_pipe_gets_the_report_and_stays_a_pipe() {
    use std::os::unix::fs::FileTypeExt;
    let d = scratch("fifo");
    let fifo = d.join("report.fifo");
    let made = Command::new("mkfifo").arg(&fifo).status().expect("mkfifo (coreutils)");
    assert!(made.success());
    // The reading end opened first, without waiting for a writer, so that the program's open
    // for writing does not wait either; the report (a few KiB) fits the pipe's buffer and is
    // read once the program has ended. A program that replaced the pipe leaves it empty.
    use std::os::unix::fs::OpenOptionsExt;
    let mut read_end = std::fs::OpenOptions::new().read(true).custom_flags(O_NONBLOCK).open(&fifo).unwrap();
    let o = check(&d, &["--json", fifo.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", String::from_utf8_lossy(&o.stderr));
    let mut bytes = Vec::new();
    let _ = read_end.read_to_end(&mut bytes);
    let text = String::from_utf8(bytes).unwrap();
    let v: serde_json::Value = serde_json::from_str(&text).unwrap_or_else(|e| panic!("{e}: {text}"));
    assert_eq!(v["verdict"], "pass", "{text}");
    let kind = std::fs::symlink_metadata(&fifo).unwrap().file_type();
    assert!(kind.is_fifo(), "the pipe was replaced: {kind:?}");
    let left: Vec<_> = std::fs::read_dir(&d).unwrap().map(|e| e.unwrap().file_name()).collect();
    assert_eq!(left.len(), 2, "temporary files left: {left:?}");
}

#[test]
fn a_symbolic_link_stays_a_link_and_its_file_gets_the_report() {
    let d = scratch("link");
    let real = d.join("real.json");
    std::fs::write(&real, "old").unwrap();
    let link = d.join("link.json");
    std::os::unix::fs::symlink(&real, &link).unwrap();
    for opt in ["--json", "--junit", "--html"] {
        let o = check(&d, &[opt, link.to_str().unwrap()]);
        assert_eq!(o.status.code(), Some(0), "{opt}: {}", String::from_utf8_lossy(&o.stderr));
        assert!(
            std::fs::symlink_metadata(&link).unwrap().file_type().is_symlink(),
            "{opt}: the link was replaced"
        );
        let text = std::fs::read_to_string(&real).unwrap();
        assert!(text.len() > 100 && text != "old", "{opt}: {text}");
    }
    // A link to a file that does not exist yet (a relative one, through a second link) is
    // written through too: it used to be replaced by a plain file.
    std::fs::create_dir_all(d.join("kept")).unwrap();
    let first = d.join("dangling.json");
    std::os::unix::fs::symlink("second.json", &first).unwrap();
    std::os::unix::fs::symlink("kept/new.json", d.join("second.json")).unwrap();
    for opt in ["--json", "--junit", "--html"] {
        let _ = std::fs::remove_file(d.join("kept/new.json"));
        let o = check(&d, &[opt, first.to_str().unwrap()]);
        assert_eq!(o.status.code(), Some(0), "{opt}: {}", String::from_utf8_lossy(&o.stderr));
        for l in [&first, &d.join("second.json")] {
            assert!(
                std::fs::symlink_metadata(l).unwrap().file_type().is_symlink(),
                "{opt}: {l:?} was replaced"
            );
        }
        let text = std::fs::read_to_string(d.join("kept/new.json")).unwrap();
        assert!(text.len() > 100, "{opt}: {text}");
    }
}

#[test]
fn bad_input_keeps_the_earlier_report() {
    let d = scratch("keep");
    let json = d.join("r.json");
    let o = check(&d, &["--json", json.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", String::from_utf8_lossy(&o.stderr));
    let earlier = std::fs::read(&json).unwrap();
    // The manifest is read after the report's marker is written: the marker goes again.
    let bad = d.join("bad.json");
    std::fs::write(&bad, "{ \"routine\": { \"model\": \"j2\", \"colour\": 1 } }").unwrap();
    for (manifest, extra) in [(&bad, &[][..]), (&d.join("m.json"), &["--scheme", "sideways"][..])] {
        let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
            .arg("check")
            .arg(manifest)
            .args(["--json", json.to_str().unwrap()])
            .args(extra)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(2), "{}", String::from_utf8_lossy(&o.stderr));
        assert!(std::fs::read(&json).unwrap() == earlier, "{extra:?}: the earlier report was not put back");
    }
    // Without an earlier report, no marker is left claiming a run that is still going.
    let fresh = d.join("fresh.json");
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("check")
        .arg(&bad)
        .args(["--json", fresh.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(!fresh.exists(), "a marker was left behind");
}

#[test]
fn a_report_may_not_overwrite_an_input_or_another_report() {
    let d = scratch("inputs");
    let m = d.join("m.json");
    std::fs::write(&m, MANIFEST).unwrap();
    let run = |args: &[&str]| Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    let ms = m.to_str().unwrap();
    for opt in ["--json", "--html", "--junit"] {
        let o = run(&["check", ms, opt, ms]);
        assert_eq!(o.status.code(), Some(2), "{opt}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains("an input of this run"), "{opt}: {err}");
        assert_eq!(std::fs::read_to_string(&m).unwrap(), MANIFEST, "{opt}: the manifest was overwritten");
    }
    // A probe suite is an input too; and two reports in one file.
    let suite = d.join("s.json");
    std::fs::write(&suite, r#"{ "probes": [ { "probe": "symmetry" } ] }"#).unwrap();
    let o = run(&["probe", ms, "--suite", suite.to_str().unwrap(), "--json", suite.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(std::fs::read_to_string(&suite).unwrap().contains("symmetry"));
    let same = d.join("same.out");
    let o = run(&["check", ms, "--json", same.to_str().unwrap(), "--html", same.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("name the same file"));
    assert!(!same.exists());
    // A name of one of this process's descriptors: refused (its standard output is `-`); a
    // rename onto it would replace the name itself (as root, the system's /dev/stdout link).
    for name in ["/dev/stdout", "/dev/fd/1", "/proc/self/fd/2"] {
        let o = run(&["check", ms, "--json", name]);
        assert_eq!(o.status.code(), Some(2), "{name}");
        assert!(String::from_utf8_lossy(&o.stderr).contains("write `-` for standard output"), "{name}");
    }
    assert!(std::fs::symlink_metadata("/dev/stdout").is_ok_and(|m| m.file_type().is_symlink()));
}

/// O_NONBLOCK on Linux (asm-generic/fcntl.h): open a pipe's reading end without waiting.
const O_NONBLOCK: i32 = 0o4000;

/// The routine's library, the case files a `--cases` check replays and everything a campaign
/// reads or builds are inputs too: a report named after one of them is refused before anything
/// is written (a check's `--json` replaced the manifest's library with its marker, a `--cases`
/// check's `--html` replaced a case before it was read, a campaign's `--json` replaced the
/// library it builds and whose stamp then said up to date; a user-style sweep). A folder
/// campaign reads its manifests, not a report an earlier run left in the folder.
#[test]
fn libraries_cases_and_campaign_files_are_inputs_too() {
    let d = scratch("inputs-more");
    let run = |args: &[&str]| Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    const KEEP: &str = "not to be overwritten";
    // A manifest naming a library (refused before the library is loaded: it need not be one).
    let lib = d.join("libroutine.so");
    std::fs::write(&lib, KEEP).unwrap();
    let m = d.join("lib.json");
    std::fs::write(
        &m,
        r#"{ "routine": { "library": "libroutine.so", "symbol": "r", "kind": "solid-3d", "states": 0, "properties": [1] } }"#,
    )
    .unwrap();
    for cmd in ["check", "probe", "bisect", "explore"] {
        let o = run(&[cmd, m.to_str().unwrap(), "--json", lib.to_str().unwrap()]);
        assert_eq!(o.status.code(), Some(2), "{cmd}: {}", String::from_utf8_lossy(&o.stderr));
        assert!(String::from_utf8_lossy(&o.stderr).contains("an input of this run"), "{cmd}");
        assert_eq!(std::fs::read_to_string(&lib).unwrap(), KEEP, "{cmd}");
    }
    // A case file of the folder `--cases` replays.
    let mj = d.join("m.json");
    std::fs::write(&mj, MANIFEST).unwrap();
    let cases = d.join("tancheck-cases").join("m");
    std::fs::create_dir_all(&cases).unwrap();
    let case = cases.join("a-case.json");
    std::fs::write(&case, KEEP).unwrap();
    let o = run(&["check", mj.to_str().unwrap(), "--cases", "--html", case.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", String::from_utf8_lossy(&o.stderr));
    assert_eq!(std::fs::read_to_string(&case).unwrap(), KEEP);
    // A campaign's manifests, sources and the library it is to build (not built yet).
    std::fs::create_dir_all(d.join("build")).unwrap();
    std::fs::write(d.join("q.c"), "/* a source */\n").unwrap();
    // A header beside the source and the build's stamp are inputs too (a report over a header
    // beside the sources replaced it; a user-style sweep).
    std::fs::write(d.join("notes.h"), KEEP).unwrap();
    std::fs::write(d.join("build").join("libq.so.sources-sha256"), KEEP).unwrap();
    let c = d.join("c.json");
    std::fs::write(
        &c,
        r#"{ "format": "tancheck-campaign", "version": 1, "name": "c",
  "libraries": [ { "output": "build/libq.so", "sources": ["q.c"] } ],
  "routines": [ { "manifest": "m.json" } ] }"#,
    )
    .unwrap();
    for (opt, target) in [
        ("--json", "build/libq.so"),
        ("--html", "q.c"),
        ("--junit", "m.json"),
        ("--json", "notes.h"),
        ("--html", "build/libq.so.sources-sha256"),
    ] {
        let t = d.join(target);
        let before = std::fs::read(&t).ok();
        let o = run(&["campaign", c.to_str().unwrap(), opt, t.to_str().unwrap(), "-q"]);
        assert_eq!(o.status.code(), Some(2), "{opt} {target}: {}", String::from_utf8_lossy(&o.stderr));
        assert!(String::from_utf8_lossy(&o.stderr).contains("an input of this run"), "{opt} {target}");
        assert_eq!(std::fs::read(&t).ok(), before, "{opt} {target}");
    }
    // A folder campaign twice, its report in the folder: the second run reads manifests only.
    let f = d.join("folder");
    std::fs::create_dir_all(&f).unwrap();
    std::fs::write(f.join("m.json"), MANIFEST).unwrap();
    for k in 0..2 {
        let o = run(&[
            "campaign",
            f.to_str().unwrap(),
            "--json",
            f.join("zz-report.json").to_str().unwrap(),
            "-q",
        ]);
        assert_eq!(o.status.code(), Some(0), "run {k}: {}", String::from_utf8_lossy(&o.stderr));
    }
}

/// A report into a folder that does not exist is bad input that says so, for `--json` as for
/// `--html` and `--junit` (it read "replacing the report … at the start of the run: No such
/// file or directory"; a user-style sweep).
#[test]
fn a_report_into_a_missing_folder_names_the_folder() {
    let d = scratch("missing-folder");
    for opt in ["--json", "--html", "--junit"] {
        let target = d.join("nowhere").join("r.out");
        let o = check(&d, &[opt, target.to_str().unwrap()]);
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{opt}: {err}");
        assert!(err.contains(&format!("{opt} ")) && err.contains("nowhere does not exist"), "{opt}: {err}");
    }
}
