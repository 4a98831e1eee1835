//! Path files given with `--path`: what a malformed one is told (exit 2, naming the file).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-path-files-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn manifest(dir: &Path, name: &str, body: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, body).unwrap();
    p
}

/// A path file that is a list of increments, not an object, says what to write (its error
/// named a string where an object was found), and an empty one says it is empty (it was
/// placed at "1:0"); both exit 2 naming the file (a user-style sweep).
#[test]
fn a_path_file_that_is_a_list_or_empty_says_what_to_write() {
    let d = scratch("pathlist");
    let m = manifest(
        &d,
        "m.json",
        r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
    );
    let list = manifest(&d, "list.json", r#"[ {"dstrain": [1e-3, 0, 0, 0, 0, 0]} ]"#);
    let empty = manifest(&d, "empty.json", " \n");
    for (file, words) in [(&list, "is a JSON object, not a list"), (&empty, "the file is empty")] {
        let o = bin().arg("check").arg(&m).arg("--path").arg(file).output().unwrap();
        let t = text(&o);
        assert_eq!(o.status.code(), Some(2), "{t}");
        assert!(t.contains(&file.display().to_string()) && t.contains(words), "{t}");
    }
}
