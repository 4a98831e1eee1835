//! `tancheck selftest` has the Johnson–Cook point rows (selftest/jc.rs) in every language
//! available: the correct routine passes along a fast path, and the routine whose tangent
//! leaves out the rate term fails with `term-scaled` (the plastic correction with the wrong
//! factor).

use std::process::Command;

#[test]
fn selftest_has_the_johnson_cook_rows_right() {
    // The JUnit file and the HTML page of the same run (the JUnit file's validity:
    // tests/junit_report.rs).
    let junit = std::env::temp_dir().join(format!("tancheck-selftest-{}.xml", std::process::id()));
    let html = junit.with_extension("html");
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("selftest")
        .arg("--junit")
        .arg(&junit)
        .arg("--html")
        .arg(&html)
        .output()
        .unwrap();
    let t = format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
    assert_eq!(o.status.code(), Some(0), "{t}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    let _ = std::fs::remove_file(&junit);
    assert!(xml.contains(r#"<testcase name="johnson-cook-no-rate-term" classname="selftest.C"/>"#), "{xml}");
    assert!(!xml.contains("<failure"), "every row right: {xml}");
    let page = std::fs::read_to_string(&html).unwrap();
    let _ = std::fs::remove_file(&html);
    assert!(page.contains("<code>johnson-cook-no-rate-term</code>") && page.contains("rows right (exit 0)"));
    // Without gfortran (cfg set by the build script) the selftest skips its Fortran rows.
    let languages: &[&str] =
        if !cfg!(tancheck_no_fortran) { &["Rust", "C", "Fortran"] } else { &["Rust", "C"] };
    for lang in languages {
        let row = |variant: &str, verdict: &str, found: &str| {
            t.lines().any(|l| {
                let w: Vec<&str> = l.split_whitespace().collect();
                w.len() == 7
                    && w[0] == variant
                    && w[1] == *lang
                    && w[3] == verdict
                    && w[4] == found
                    && w[6] == "yes"
            })
        };
        assert!(row("johnson-cook", "PASS", "none"), "{lang}: {t}");
        assert!(row("johnson-cook-no-rate-term", "FAIL", "term-scaled"), "{lang}: {t}");
    }
}

/// The Johnson–Cook manifest of the README, as written there (fast increments, heated start).
fn readme_manifest() -> String {
    let readme = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).unwrap();
    let i = readme.find("\"model\": \"johnson-cook\"").expect("the README has the Johnson–Cook manifest");
    let a = readme[..i].rfind("```json").unwrap() + "```json".len();
    let b = a + readme[a..].find("```").unwrap();
    readme[a..b].to_string()
}

// `tancheck check` on the README's manifest: johnson-cook passes (exit 0); the same manifest
// with johnson-cook-no-rate-term fails (exit 1) and names term-scaled.
#[test]
fn the_readme_manifest_checks_the_built_in_model() {
    let dir = std::env::temp_dir().join(format!("tancheck-jc-manifest-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let good = dir.join("jc.json");
    let bad = dir.join("jc-no-rate-term.json");
    let m = readme_manifest();
    std::fs::write(&good, &m).unwrap();
    std::fs::write(&bad, m.replace("\"johnson-cook\"", "\"johnson-cook-no-rate-term\"")).unwrap();
    let run = |p: &std::path::Path| {
        let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).arg("check").arg(p).output().unwrap();
        (o.status.code(), String::from_utf8_lossy(&o.stdout).into_owned())
    };
    let (code, t) = run(&good);
    assert_eq!(code, Some(0), "{t}");
    let (code, t) = run(&bad);
    assert_eq!(code, Some(1), "{t}");
    assert!(t.contains("-> term-scaled"), "{t}");
    let _ = std::fs::remove_dir_all(&dir);
}
