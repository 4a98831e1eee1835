//! A check stopped by SIGINT says so on standard error also when that is a log, not a
//! terminal (it said nothing there; a user-style sweep), without the terminal's line-clearing
//! codes, and dies of the signal (130 to a shell), its JSON report the "incomplete" marker.

use std::process::{Command, Stdio};

use tancheck_testkit::libs::scratch;

#[test]
fn a_check_stopped_by_sigint_says_so_in_a_log() {
    let d = scratch("stop-signal");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        r#"{ "routine": { "model": "j2", "kind": "solid-3d", "properties": [200000, 0.3, 250, 1000, 0, 0, 500] } }"#,
    )
    .unwrap();
    let json = d.join("r.json");
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_tancheck"));
    cmd.arg("check")
        .arg(&m)
        .args(["--path", "tension-shear:4e-3:400000:400000", "--jobs", "1", "--json"])
        .arg(&json)
        .stdout(Stdio::null())
        .stderr(Stdio::piped());
    // SIGINT's default disposition in the child (see tests/survive.rs: a background test run
    // inherits it ignored).
    // SAFETY: between fork and exec only async-signal-safe calls (signal) are made.
    unsafe {
        use std::os::unix::process::CommandExt;
        cmd.pre_exec(|| {
            libc::signal(libc::SIGINT, libc::SIG_DFL);
            Ok(())
        });
    }
    let child = cmd.spawn().unwrap();
    // Until the run has replaced the report by its marker: the check has begun.
    let t0 = std::time::Instant::now();
    while !json.exists() && t0.elapsed().as_secs() < 60 {
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    std::thread::sleep(std::time::Duration::from_millis(300));
    assert!(Command::new("kill").args(["-INT", &child.id().to_string()]).status().unwrap().success());
    let o = child.wait_with_output().unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    // It dies of the signal, as a shell sees it: 128 + 2.
    use std::os::unix::process::ExitStatusExt;
    assert_eq!(o.status.signal(), Some(2), "{err}");
    assert!(err.contains("tancheck: stopped by signal 2 before the check finished"), "{err}");
    assert!(!err.contains('\u{1b}'), "terminal codes in a log: {err:?}");
    let v: serde_json::Value = serde_json::from_slice(&std::fs::read(&json).unwrap()).unwrap();
    assert_eq!(v["verdict"], "incomplete", "{v}");
}
