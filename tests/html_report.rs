//! The HTML report: self-contained, well-formed, with its plots, and rendered by a real
//! browser (headless chromium) without errors. The screenshots are kept as test artefacts in
//! `target/tmp/html-report/` (`CARGO_TARGET_TMPDIR`); with `TANCHECK_UPDATE_PICTURE=1` the
//! check page's screenshot also replaces the README's picture, `docs/html-report.png`.

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::time::{Duration, Instant};

use quick_xml::events::Event;
use quick_xml::Reader;

/// The failing routine of the demo: J2 returning the continuum tangent (the built-in Rust
/// model of the same flaw as the C and Fortran examples), with the demo's properties.
const FAILING: &str = r#"{ "routine": { "model": "j2-continuum", "kind": "solid-3d",
  "properties": [210000, 0.3, 355, 1200, 150, 12, 2500] } }"#;

fn out_dir() -> PathBuf {
    let d = Path::new(env!("CARGO_TARGET_TMPDIR")).join("html-report");
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

/// Run `tancheck ARGS` and expect `code`.
fn tancheck(args: &[&std::ffi::OsStr], code: i32) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    assert_eq!(o.status.code(), Some(code), "{}", text(&o));
}

/// The check, probe and bisect pages of the failing routine, written once per test binary.
fn pages() -> &'static (PathBuf, PathBuf, PathBuf) {
    static P: std::sync::OnceLock<(PathBuf, PathBuf, PathBuf)> = std::sync::OnceLock::new();
    P.get_or_init(|| {
        let d = out_dir();
        let m = d.join("j2-continuum.json");
        std::fs::write(&m, FAILING).unwrap();
        let (check, probe, bisect) = (d.join("check.html"), d.join("probe.html"), d.join("bisect.html"));
        let json = d.join("check.json");
        let junit = d.join("check.xml");
        tancheck(
            &[
                "check".as_ref(),
                m.as_os_str(),
                "--html".as_ref(),
                check.as_os_str(),
                "--junit".as_ref(),
                junit.as_os_str(),
                "--json".as_ref(),
                json.as_os_str(),
                "-q".as_ref(),
            ],
            1,
        );
        assert!(json.is_file() && junit.is_file(), "all three reports are written");
        tancheck(&["probe".as_ref(), m.as_os_str(), "--html".as_ref(), probe.as_os_str(), "-q".as_ref()], 1);
        let cases = d.join("cases");
        tancheck(
            &[
                "bisect".as_ref(),
                m.as_os_str(),
                "--html".as_ref(),
                bisect.as_os_str(),
                "--case-dir".as_ref(),
                cases.as_os_str(),
                "--max-shrink-iterations".as_ref(),
                "20".as_ref(),
            ],
            1,
        );
        (check, probe, bisect)
    })
}

/// The `<svg>` elements of a page, as written.
fn svgs(html: &str) -> Vec<&str> {
    let mut out = Vec::new();
    let mut rest = html;
    while let Some(a) = rest.find("<svg") {
        let b = rest[a..].find("</svg>").expect("every svg is closed") + a + "</svg>".len();
        out.push(&rest[a..b]);
        rest = &rest[b..];
    }
    out
}

/// The title of an `<svg>` element; panics when the element is not well-formed XML.
fn svg_title(svg: &str) -> String {
    let mut reader = Reader::from_str(svg);
    reader.config_mut().check_end_names = true;
    let (mut title, mut in_title, mut depth) = (String::new(), false, 0i32);
    loop {
        match reader.read_event().unwrap_or_else(|e| panic!("an svg that is not well-formed XML: {e}")) {
            Event::Start(e) => {
                depth += 1;
                in_title = e.name().as_ref() == b"title";
            }
            Event::End(_) => {
                depth -= 1;
                in_title = false;
            }
            Event::Text(t) if in_title => title.push_str(&t.decode().unwrap()),
            Event::GeneralRef(r) if in_title => title.push_str(&format!("&{};", String::from_utf8_lossy(&r))),
            Event::Eof => break,
            _ => {}
        }
    }
    assert_eq!(depth, 0, "unbalanced svg");
    title
}

/// What a self-contained page must be: no script, nothing loaded from elsewhere, the
/// cautions, and these plots (by the start of their titles), each a well-formed svg.
fn assert_page(html: &str, plots: &[&str]) {
    assert!(html.starts_with("<!DOCTYPE html>"), "{}", &html[..80.min(html.len())]);
    assert!(!html.contains("<script"), "no script");
    for external in ["src=", "href=\"http", "url(", "@import", "<link"] {
        assert!(!html.contains(external), "nothing loaded from elsewhere: found `{external}`");
    }
    assert!(html.contains("does not validate the material model against test data"), "the first caution");
    assert!(html.contains("licensed engineering judgement"), "the second caution");
    let titles: Vec<String> = svgs(html).into_iter().map(svg_title).collect();
    for want in plots {
        assert!(titles.iter().any(|t| t.starts_with(want)), "no plot `{want}` among {titles:?}");
    }
}

#[test]
fn the_check_page_holds_the_summary_and_every_plot() {
    let html = std::fs::read_to_string(&pages().0).unwrap();
    assert_page(
        &html,
        &[
            "error of the returned tangent along the path, per scheme",
            "stress against strain along the path",
            "step-size study of increment 4",
            "entry errors of increment 4 against",
        ],
    );
    for words in
        ["continuum-tangent", "Branches and coverage", "#1 (state changed)", "routine calls", "complex-step"]
    {
        assert!(html.contains(words), "`{words}` in the page");
    }
}

#[test]
fn the_probe_page_plots_newton_stability_and_energy() {
    let html = std::fs::read_to_string(&pages().1).unwrap();
    assert_page(
        &html,
        &[
            "Newton residual history",
            "minimum acoustic-tensor determinant along the path",
            "energy balance along the path",
        ],
    );
    // The Newton legend carries each increment's observed order (about 1 for this tangent).
    assert!(html.contains("(order 1.0"), "observed orders in the Newton plot");
    // The verdict says the exit code, as the check page does (it did not; a user-style sweep).
    assert!(html.contains("probes failed, exit code 1"), "the probe page's exit code");
}

#[test]
fn the_bisect_page_shows_where_the_class_changes() {
    let html = std::fs::read_to_string(&pages().2).unwrap();
    assert_page(
        &html,
        &["error inside increment 4 by fraction of the increment", "error of the returned tangent"],
    );
    assert!(html.contains("The error takes its class at fraction"), "the crossing in words");
}

/// Run the browser with a time limit; returns its output. The output goes through files (a
/// DOM of half a megabyte would fill a pipe that nobody reads while we wait).
fn browser(args: &[String], name: &str) -> Output {
    let exe =
        std::env::var("TANCHECK_CHROMIUM").ok().filter(|s| !s.trim().is_empty()).unwrap_or("chromium".into());
    let d = out_dir();
    let (out_file, err_file) = (d.join(format!("{name}.stdout")), d.join(format!("{name}.stderr")));
    let mut words = exe.split_whitespace();
    let mut child = Command::new(words.next().unwrap())
        .args(words)
        .args(args)
        .stdin(Stdio::null())
        .stdout(std::fs::File::create(&out_file).unwrap())
        .stderr(std::fs::File::create(&err_file).unwrap())
        .spawn()
        .unwrap_or_else(|e| panic!("{exe} does not start ({e}); install Debian's chromium"));
    let deadline = Instant::now() + Duration::from_secs(180);
    let status = loop {
        if let Some(s) = child.try_wait().unwrap() {
            break s;
        }
        if Instant::now() > deadline {
            let _ = child.kill();
            let _ = child.wait();
            panic!("{exe} did not finish in 180 s");
        }
        std::thread::sleep(Duration::from_millis(100));
    };
    Output { status, stdout: std::fs::read(&out_file).unwrap(), stderr: std::fs::read(&err_file).unwrap() }
}

fn headless(profile: &Path) -> Vec<String> {
    vec![
        "--headless".into(),
        "--no-sandbox".into(),
        "--disable-gpu".into(),
        "--no-first-run".into(),
        "--hide-scrollbars".into(),
        "--enable-logging=stderr".into(),
        "--v=0".into(),
        format!("--user-data-dir={}", profile.display()),
    ]
}

/// Render a page: its DOM as the browser built it must hold the plots (svg elements with
/// their titles), the browser's log must show no page error (console messages, failed loads,
/// parse errors), and the screenshot is kept.
fn render(page: &Path, plots: &[&str], shot: &Path, height: u32) {
    let name = shot.file_stem().unwrap().to_string_lossy().into_owned();
    let url = format!("file://{}", page.display());
    let profile = out_dir().join(format!("profile-{}", std::process::id()));
    let mut args = headless(&profile);
    args.push("--dump-dom".into());
    args.push(url.clone());
    let o = browser(&args, &format!("{name}-dom"));
    assert!(o.status.success(), "chromium --dump-dom failed: {}", text(&o));
    let dom = String::from_utf8_lossy(&o.stdout).into_owned();
    let log = String::from_utf8_lossy(&o.stderr).into_owned();
    assert!(dom.contains("<main>"), "the page was built: {}", &dom[..dom.len().min(400)]);
    let svg_count = dom.matches("<svg").count();
    assert!(svg_count >= plots.len(), "{svg_count} svg elements in the DOM");
    for want in plots {
        assert!(dom.contains(&format!("<title>{want}")), "the DOM has no svg titled `{want}`");
    }
    assert!(!dom.contains("parsererror"), "a parse error in the DOM");
    for line in log.lines() {
        let l = line.to_ascii_lowercase();
        let page_error = line.contains("CONSOLE")
            || l.contains("net::err")
            || l.contains("failed to load")
            || l.contains("uncaught")
            || (l.contains(&page.display().to_string().to_ascii_lowercase()) && l.contains("error"));
        assert!(!page_error, "the browser reported a page error: {line}");
    }
    let _ = std::fs::remove_file(shot);
    let mut args = headless(&profile);
    args.push(format!("--window-size=1000,{height}"));
    args.push(format!("--screenshot={}", shot.display()));
    args.push(url);
    let o = browser(&args, &format!("{name}-screenshot"));
    assert!(o.status.success(), "chromium --screenshot failed: {}", text(&o));
    let png = std::fs::read(shot).unwrap_or_else(|e| panic!("no screenshot {}: {e}", shot.display()));
    assert!(png.starts_with(b"\x89PNG\r\n\x1a\n"), "a PNG");
    // A blank page compresses to a few kilobytes; text and plots do not.
    assert!(png.len() > 40_000, "the screenshot looks empty ({} bytes)", png.len());
    let _ = std::fs::remove_dir_all(&profile);
}

#[test]
#[cfg_attr(tancheck_no_chromium, ignore = "needs chromium")]
fn the_pages_render_in_headless_chromium() {
    let (check, probe, bisect) = pages();
    let d = out_dir();
    let shot = d.join("check.png");
    render(
        check,
        &[
            "error of the returned tangent along the path",
            "stress against strain",
            "step-size study",
            "entry errors",
        ],
        &shot,
        1420,
    );
    render(
        probe,
        &["Newton residual history", "minimum acoustic-tensor determinant"],
        &d.join("probe.png"),
        2400,
    );
    render(bisect, &["error inside increment"], &d.join("bisect.png"), 1600);
    if std::env::var("TANCHECK_UPDATE_PICTURE").is_ok_and(|v| v == "1") {
        let docs = Path::new(env!("CARGO_MANIFEST_DIR")).join("docs");
        std::fs::create_dir_all(&docs).unwrap();
        std::fs::copy(&shot, docs.join("html-report.png")).unwrap();
    }
}

#[test]
fn an_output_folder_that_does_not_exist_is_bad_input_before_the_run() {
    let d = out_dir();
    let m = d.join("folder-check.json");
    std::fs::write(&m, FAILING).unwrap();
    for (cmd, opt) in [("check", "--html"), ("check", "--junit"), ("probe", "--html"), ("bisect", "--html")] {
        let missing = d.join("no-such-folder").join("r.out");
        let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
            .arg(cmd)
            .arg(&m)
            .arg(opt)
            .arg(&missing)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(2), "{cmd} {opt}: {}", text(&o));
        let t = text(&o);
        assert!(t.contains(&format!("{opt} {}", missing.display())) && t.contains("does not exist"), "{t}");
        assert!(!t.contains("verdict"), "the routine did not run: {t}");
    }
}

// A probe in which the routine faulted reads FAULT on the page, as the verdict and the JUnit
// report say (its row and heading showed a red FAIL beside a verdict of FAULT; a user-style
// sweep).
#[test]
fn a_probe_that_met_a_fault_reads_fault_on_the_page() {
    let d = out_dir().join("probe-fault");
    std::fs::create_dir_all(&d).unwrap();
    let lib = d.join("libmisbehave.so");
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples/c/misbehave.c");
    tancheck::abi::build_library(&tancheck::abi::BuildOptions::new([src], &lib)).unwrap();
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "library": "{}", "symbol": "bad_null_deref", "kind": "solid-3d", "states": 0, "properties": [210000, 0.3] }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.001, "steps": 4 }} }}"#,
            lib.display()
        ),
    )
    .unwrap();
    let page = d.join("probe.html");
    tancheck(&["probe".as_ref(), m.as_os_str(), "--html".as_ref(), page.as_os_str(), "-q".as_ref()], 3);
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(html.contains(r#"<span class="badge fault">FAULT</span>"#), "{html}");
    assert!(!html.contains(r#"<span class="badge fail">FAIL</span>"#), "{html}");
}
