//! `tancheck selftest` has the Johnson–Cook point rows (selftest/jc.rs) in every language
//! available: the correct routine passes along a fast path, and the routine whose tangent
//! leaves out the rate term fails with `term-scaled` (the plastic correction with the wrong
//! factor).

use std::process::Command;

#[test]
fn selftest_has_the_johnson_cook_rows_right() {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).arg("selftest").output().unwrap();
    let t = format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
    assert_eq!(o.status.code(), Some(0), "{t}");
    let languages: &[&str] = if tancheck::abi::fortran_for_test("selftest_has_the_johnson_cook_rows_right") {
        &["Rust", "C", "Fortran"]
    } else {
        &["Rust", "C"]
    };
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
