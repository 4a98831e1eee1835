//! Shell completions and man pages, generated from the command line's definitions.

use std::process::Command;

fn tancheck(args: &[&str]) -> (Option<i32>, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    (
        o.status.code(),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

#[test]
fn completions_know_every_command_and_option() {
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let (c, out, err) = tancheck(&["completions", shell]);
        assert_eq!(c, Some(0), "{shell}: {err}");
        for word in ["check", "bisect", "replay", "fp-traps", "cflags", "fflags"] {
            assert!(out.contains(word), "{shell} completions lack `{word}`");
        }
    }
    let (c, _, err) = tancheck(&["completions", "tcsh"]);
    assert_eq!(c, Some(2), "{err}");
    assert!(err.contains("tcsh"), "{err}");
    // Hidden from the help: they are for packagers.
    let (_, help, _) = tancheck(&["--help"]);
    assert!(!help.contains("completions") && !help.contains("  man "), "{help}");
}

#[test]
fn the_man_page_is_roff_with_every_command() {
    let (c, out, err) = tancheck(&["man"]);
    assert_eq!(c, Some(0), "{err}");
    assert!(out.contains(".TH tancheck 1"), "{out}");
    for cmd in ["check", "probe", "bisect", "replay", "build", "selftest"] {
        assert!(out.contains(cmd), "the page lacks `{cmd}`");
    }
    let dir = std::env::temp_dir().join(format!("tancheck-man-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    let (c, _, err) = tancheck(&["man", "--dir", dir.to_str().unwrap()]);
    assert_eq!(c, Some(0), "{err}");
    let build = std::fs::read_to_string(dir.join("tancheck-build.1")).unwrap();
    assert!(build.contains("cflags") && build.contains("CC"), "{build}");
    assert!(dir.join("tancheck-check.1").is_file());
    assert!(!dir.join("tancheck-man.1").exists() && !dir.join("tancheck-completions.1").exists());
    std::fs::remove_dir_all(&dir).unwrap();
}
