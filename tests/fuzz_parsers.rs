//! Hostile input never panics the parsers of manifests, probe suites and case files: the
//! stored corpus (fuzz/corpus/<parser>/) is replayed on every test run, and
//! `fuzz_parsers_for_a_while` (ignored by default; TANCHECK_FUZZ_SECONDS per parser, default
//! 60) mutates the corpus and feeds the parsers, saving any input that panics into the corpus.
//!
//! Run it for ten minutes a parser with
//! `TANCHECK_FUZZ_SECONDS=600 cargo test --release --test fuzz_parsers -- --ignored --nocapture`
//! (`TANCHECK_FUZZ_ONLY=manifest|suite|case` for one parser).

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};

type Parser = fn(&str) -> bool;

fn parse_manifest(s: &str) -> bool {
    tancheck::cli::manifest::Manifest::parse(s, Path::new("fuzz.json")).is_ok()
}

fn parse_suite(s: &str) -> bool {
    tancheck::cli::suite::Suite::parse(s, Path::new("fuzz.json")).is_ok()
}

fn parse_case(s: &str) -> bool {
    tancheck::core::case::Case::parse(s).is_ok()
}

fn parsers() -> Vec<(&'static str, Parser)> {
    vec![
        ("manifest", parse_manifest as Parser),
        ("suite", parse_suite as Parser),
        ("case", parse_case as Parser),
    ]
}

fn corpus_dir(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz/corpus").join(name)
}

fn corpus(name: &str) -> Vec<(PathBuf, String)> {
    let mut v: Vec<_> = std::fs::read_dir(corpus_dir(name))
        .unwrap_or_else(|e| panic!("the corpus of {name} is missing: {e}"))
        .map(|e| e.unwrap().path())
        .filter(|p| p.is_file())
        .map(|p| {
            let t = String::from_utf8_lossy(&std::fs::read(&p).unwrap()).into_owned();
            (p, t)
        })
        .collect();
    v.sort();
    v
}

#[test]
fn the_stored_corpus_never_panics_a_parser() {
    for (name, parse) in parsers() {
        let files = corpus(name);
        assert!(!files.is_empty(), "{name}: empty corpus");
        let mut accepted = 0;
        for (p, text) in &files {
            let r = catch_unwind(AssertUnwindSafe(|| parse(text)));
            assert!(r.is_ok(), "{name}: {} panics the parser", p.display());
            accepted += r.unwrap() as usize;
        }
        // The seeds themselves are valid: the mutations start from real inputs.
        assert!(accepted > 0, "{name}: no corpus file parses");
    }
}

const TOKENS: [&str; 24] = [
    "{",
    "}",
    "[",
    "]",
    ",",
    ":",
    "\"",
    "null",
    "true",
    "1e308",
    "-1e308",
    "1e-320",
    "-0",
    "0",
    "18446744073709551616",
    "4294967296",
    "\"solid-3d\"",
    "\"cohesive-2d\"",
    "\"shape\"",
    "\"increments\"",
    "\"hold_stress\"",
    "\"probe\"",
    "\"\\u0000\"",
    "NaN",
];

fn mutate(rng: &mut StdRng, seed: &str) -> String {
    let mut b: Vec<u8> = seed.as_bytes().to_vec();
    for _ in 0..rng.gen_range(1..6) {
        if b.is_empty() {
            b.extend_from_slice(b"{}");
        }
        let i = rng.gen_range(0..b.len());
        match rng.gen_range(0..6) {
            0 => b[i] = rng.gen(),
            1 => {
                let t = TOKENS[rng.gen_range(0..TOKENS.len())];
                b.splice(i..i, t.bytes());
            }
            2 => {
                let j = (i + rng.gen_range(1..32)).min(b.len());
                b.drain(i..j);
            }
            3 => {
                let j = (i + rng.gen_range(1..64)).min(b.len());
                let span: Vec<u8> = b[i..j].to_vec();
                b.splice(i..i, span);
            }
            4 => {
                // Replace a number by an extreme one.
                if b[i].is_ascii_digit() {
                    let t = TOKENS[rng.gen_range(9..15)];
                    b.splice(i..i + 1, t.bytes());
                }
            }
            _ => b.truncate(i),
        }
    }
    String::from_utf8_lossy(&b).into_owned()
}

#[test]
#[ignore = "a long fuzzing run; see the module doc for how to run it"]
fn fuzz_parsers_for_a_while() {
    let seconds: f64 =
        std::env::var("TANCHECK_FUZZ_SECONDS").ok().and_then(|s| s.parse().ok()).unwrap_or(60.0);
    // TANCHECK_FUZZ_ONLY=case (say) fuzzes one parser.
    let only = std::env::var("TANCHECK_FUZZ_ONLY").ok();
    std::panic::set_hook(Box::new(|_| {}));
    for (name, parse) in parsers().into_iter().filter(|(n, _)| only.as_deref().is_none_or(|o| o == *n)) {
        let seeds = corpus(name);
        let mut rng = StdRng::seed_from_u64(0x7a11 ^ name.len() as u64);
        let t0 = Instant::now();
        let (mut runs, mut ok) = (0u64, 0u64);
        while t0.elapsed() < Duration::from_secs_f64(seconds) {
            let k = rng.gen_range(0..seeds.len());
            let input = mutate(&mut rng, &seeds[k].1);
            match catch_unwind(AssertUnwindSafe(|| parse(&input))) {
                Ok(accepted) => ok += accepted as u64,
                Err(_) => {
                    let p = corpus_dir(name).join(format!("panic-{runs}.json"));
                    std::fs::write(&p, &input).unwrap();
                    let _ = std::panic::take_hook();
                    panic!("{name}: this input panics the parser; saved as {}", p.display());
                }
            }
            runs += 1;
        }
        println!("{name}: {runs} mutated inputs in {seconds} s, {ok} accepted, no panic");
    }
    let _ = std::panic::take_hook();
}

/// The exit code of the `tancheck` binary, or a panic naming the signal that killed it.
fn cli_code(args: &[&std::ffi::OsStr], what: &Path) -> i32 {
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .args(args)
        .stdin(std::process::Stdio::null())
        .output()
        .unwrap();
    let text = format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
    let Some(code) = o.status.code() else {
        use std::os::unix::process::ExitStatusExt;
        panic!("{}: tancheck died of signal {:?}\n{text}", what.display(), o.status.signal());
    };
    assert_ne!(code, 101, "{}: tancheck panicked\n{text}", what.display());
    assert!([0, 1, 2, 3].contains(&code), "{}: exit {code}\n{text}", what.display());
    if code == 2 {
        // Bad input: the message names the file.
        let name = what.file_name().unwrap().to_string_lossy();
        assert!(text.contains(name.as_ref()), "{}: the error does not name the file\n{text}", what.display());
    }
    code
}

/// Every input of the corpus, malformed ones included, through the command line: no panic
/// (exit 101), no death by a signal, and every rejection names the file.
#[test]
fn the_command_line_survives_every_corpus_input() {
    use std::ffi::OsStr;
    let os = |s: &'static str| OsStr::new(s);
    let mut rejected = 0;
    for (p, _) in corpus("manifest") {
        let args = [
            os("check"),
            p.as_os_str(),
            os("-q"),
            os("--call-timeout"),
            os("20"),
            os("--suite-timeout"),
            os("300"),
        ];
        rejected += usize::from(cli_code(&args, &p) == 2);
    }
    let model = std::env::temp_dir().join(format!("tancheck-fuzz-cli-{}.json", std::process::id()));
    std::fs::write(
        &model,
        r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
    )
    .unwrap();
    for (p, _) in corpus("suite") {
        let args = [os("probe"), model.as_os_str(), os("--suite"), p.as_os_str()];
        rejected += usize::from(cli_code(&args, &p) == 2);
    }
    for (p, _) in corpus("case") {
        let args = [os("replay"), p.as_os_str()];
        rejected += usize::from(cli_code(&args, &p) == 2);
    }
    let _ = std::fs::remove_file(&model);
    // The malformed files are there and were rejected.
    assert!(rejected >= 30, "only {rejected} corpus inputs were rejected");
}
