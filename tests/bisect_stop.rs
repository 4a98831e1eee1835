//! `tancheck bisect` stopped by a signal while it shrinks the failing path.

use std::process::Command;

use serde_json::Value;
use tancheck_testkit::libs::{output_text as text, scratch};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

// A stop signal (Ctrl-C) while the failing path is shrunk: the bisection keeps what it found
// (the located case, the path shrunk so far, the reports) and exits with 128 + the signal; it
// died of the signal and kept nothing (a user-style sweep). A slow bar (2 ms a call) whose
// tangent is 10 % stiff once ε passes 1e-3: every candidate of the shrink takes a while.
#[test]
fn a_stop_signal_during_the_shrink_keeps_what_was_found() {
    let d = scratch("bisect-stopped");
    std::fs::write(
        d.join("slow.c"),
        r#"#include <time.h>
#include "tancheck_cstep.h"
#include "tancheck_routine.h"

TC_ROUTINE(c_slow_stiff_bar)
{
    (void)call; (void)temperature; (void)stress0; (void)state0; (void)state; (void)energy;
    struct timespec pause = {0, 2000000};
    nanosleep(&pause, NULL);
    const tc_real eps = strain[0] + dstrain[0];
    stress[0] = properties[0] * eps;
    tangent[0] = tc_re(eps) > 1e-3 ? 1.1 * properties[0] : properties[0];
    dstress_dtemp[0] = 0.0;
    report->status = TC_STATUS_OK;
    report->branch = 0;
}
"#,
    )
    .unwrap();
    let lib = d.join("libslow.so");
    let o = bin().arg("build").arg(d.join("slow.c")).arg("-o").arg(&lib).arg("-q").output().unwrap();
    assert!(o.status.success(), "{}", text(&o));
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "c_slow_stiff_bar", "kind": "uniaxial", "states": 0, "properties": [1000] }},
  "path": {{ "increments": [ {} ] }} }}"#,
            lib.display(),
            vec![r#"{"dstrain": [1e-4, 0, 0, 0, 0, 0]}"#; 24].join(", ")
        ),
    )
    .unwrap();
    let json = d.join("bisect.json");
    let cases = d.join("cases");
    let mut cmd = bin();
    cmd.arg("bisect")
        .arg(&m)
        .args(["--max-shrink-seconds", "300", "-q", "--json"])
        .arg(&json)
        .arg("--case-dir")
        .arg(&cases)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped());
    // SIGINT's default disposition for the child (see tests/explore.rs).
    // SAFETY: between fork and exec only async-signal-safe calls (signal) are made.
    unsafe {
        use std::os::unix::process::CommandExt;
        cmd.pre_exec(|| {
            libc::signal(libc::SIGINT, libc::SIG_DFL);
            Ok(())
        });
    }
    let child = cmd.spawn().unwrap();
    // The located case is written before the shrink begins; the shrink then checks candidates
    // for seconds (about 40 of them, a tenth of a second each).
    let t0 = std::time::Instant::now();
    while std::fs::read_dir(&cases).map(|r| r.count()).unwrap_or(0) == 0 {
        assert!(t0.elapsed().as_secs() < 120, "no case written within 120 s");
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    std::thread::sleep(std::time::Duration::from_millis(300));
    let sent = Command::new("kill").args(["-INT", &child.id().to_string()]).status().unwrap();
    assert!(sent.success());
    let o = child.wait_with_output().unwrap();
    assert_eq!(o.status.code(), Some(130), "{}", text(&o));
    assert!(text(&o).contains("stopped by SIGINT"), "{}", text(&o));
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert!(v["located"].is_object(), "{v:#}");
    assert_eq!(v["shrunk"]["stop"], serde_json::json!({ "stop": "signal", "signal": 2 }), "{v:#}");
    assert!(v["shrunk"]["stopped"].as_str().unwrap().starts_with("stopped by SIGINT"), "{v:#}");
    let written = std::fs::read_dir(&cases).map(|r| r.count()).unwrap_or(0);
    assert!(written >= 1, "no case written: {v:#}");
}
