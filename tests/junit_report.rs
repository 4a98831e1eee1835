//! The JUnit XML of `check`, `probe` and `selftest` is valid against the JUnit schema CI
//! dashboards read.
//!
//! Validated structurally, not with an XSD file: no XSD is shipped (none could be fetched
//! here under a licence we may copy), so the rules below are our own list of what the
//! schema requires, read from the JUnit schema of the Jenkins xunit plugin (junit-10.xsd,
//! https://github.com/jenkinsci/xunit-plugin/blob/master/src/main/resources/org/jenkinsci/plugins/xunit/types/model/xsd/junit-10.xsd),
//! the one Jenkins validates against; GitLab and other dashboards read the same elements:
//!
//! - a well-formed XML document whose root element is `testsuites`;
//! - elements, the attributes each may carry (`*` required) and the children each may hold:
//!   - `testsuites`: name, time, tests, failures, errors; children `testsuite`;
//!   - `testsuite`: name*, tests*, failures*, errors*, skipped, time, timestamp, hostname, id,
//!     package, group, file, log, url; children `testsuite`, `properties`, `testcase`,
//!     `system-out`, `system-err`;
//!   - `properties`: no attributes; children `property`;
//!   - `property`: name*, value*; no children;
//!   - `testcase`: name*, classname, time, group; children `skipped`, `error`, `failure`,
//!     `system-out`, `system-err` (and the rerun and flaky elements, which we never write);
//!   - `failure`, `error`, `skipped`: type, message; text only;
//!   - `system-out`, `system-err`: text only;
//! - `time` values are decimal numbers (digits, optional fraction);
//! - and, beyond the schema (dashboards show them): the counts `tests`, `failures`, `errors`
//!   and `skipped` are whole numbers and equal the test cases of their suite.

use std::collections::BTreeMap;
use std::path::PathBuf;
use std::process::Command;

use quick_xml::events::Event;
use quick_xml::Reader;

/// One element of the parsed document.
#[derive(Debug, Default)]
struct Node {
    name: String,
    attrs: BTreeMap<String, String>,
    children: Vec<Node>,
    text: String,
}

fn node_of(e: &quick_xml::events::BytesStart<'_>, xml: &str) -> Node {
    let mut n = Node { name: String::from_utf8(e.name().as_ref().to_vec()).unwrap(), ..Default::default() };
    for a in e.attributes() {
        let a = a.unwrap_or_else(|err| panic!("bad attribute: {err}\n{xml}"));
        let key = String::from_utf8(a.key.as_ref().to_vec()).unwrap();
        let value = a.normalized_value(quick_xml::XmlVersion::Explicit1_0).unwrap().into_owned();
        assert!(n.attrs.insert(key.clone(), value).is_none(), "attribute {key} twice");
    }
    n
}

/// Parse a well-formed document (end names checked) into its root element.
fn parse(xml: &str) -> Node {
    let mut reader = Reader::from_str(xml);
    reader.config_mut().check_end_names = true;
    let mut stack: Vec<Node> = vec![Node { name: "#document".into(), ..Default::default() }];
    loop {
        match reader.read_event().unwrap_or_else(|e| panic!("not well-formed XML: {e}\n{xml}")) {
            Event::Start(e) => stack.push(node_of(&e, xml)),
            Event::Empty(e) => {
                let n = node_of(&e, xml);
                stack.last_mut().unwrap().children.push(n);
            }
            Event::End(_) => {
                let n = stack.pop().unwrap();
                stack.last_mut().expect("an end tag without its start").children.push(n);
            }
            Event::Text(t) => {
                let s = t.decode().unwrap().into_owned();
                stack.last_mut().unwrap().text.push_str(&s);
            }
            Event::GeneralRef(_) | Event::CData(_) => stack.last_mut().unwrap().text.push('&'),
            Event::Eof => break,
            _ => {}
        }
    }
    assert_eq!(stack.len(), 1, "unclosed elements");
    let mut doc = stack.pop().unwrap();
    let elements: Vec<_> = doc.children.drain(..).collect();
    assert_eq!(elements.len(), 1, "one root element");
    elements.into_iter().next().unwrap()
}

/// Names of attributes or elements.
type Names = &'static [&'static str];

/// (attributes allowed, of which required, children allowed, text allowed) per element.
fn rules(name: &str) -> Option<(Names, Names, Names, bool)> {
    Some(match name {
        "testsuites" => (&["name", "time", "tests", "failures", "errors"], &[], &["testsuite"], false),
        "testsuite" => (
            &[
                "name",
                "tests",
                "failures",
                "errors",
                "skipped",
                "time",
                "timestamp",
                "hostname",
                "id",
                "package",
                "group",
                "file",
                "log",
                "url",
            ],
            &["name", "tests", "failures", "errors"],
            &["testsuite", "properties", "testcase", "system-out", "system-err"],
            false,
        ),
        "properties" => (&[], &[], &["property"], false),
        "property" => (&["name", "value"], &["name", "value"], &[], false),
        "testcase" => (
            &["name", "classname", "time", "group"],
            &["name"],
            &["skipped", "error", "failure", "system-out", "system-err"],
            false,
        ),
        "failure" | "error" | "skipped" => (&["type", "message"], &[], &[], true),
        "system-out" | "system-err" => (&[], &[], &[], true),
        _ => return None,
    })
}

fn is_time(s: &str) -> bool {
    let (a, b) = s.split_once('.').unwrap_or((s, ""));
    !s.is_empty() && a.chars().all(|c| c.is_ascii_digit()) && b.chars().all(|c| c.is_ascii_digit())
}

fn count(n: &Node, attr: &str) -> usize {
    let v = n.attrs.get(attr).unwrap_or_else(|| panic!("{} without {attr}", n.name));
    v.parse().unwrap_or_else(|_| panic!("{}: {attr}=\"{v}\" is not a whole number", n.name))
}

fn validate(n: &Node) {
    let (attrs, required, children, text) =
        rules(&n.name).unwrap_or_else(|| panic!("element <{}> is not in the schema", n.name));
    for a in n.attrs.keys() {
        assert!(attrs.contains(&a.as_str()), "<{}> may not carry {a}", n.name);
    }
    for r in required {
        assert!(n.attrs.contains_key(*r), "<{}> needs {r}", n.name);
    }
    if let Some(t) = n.attrs.get("time") {
        assert!(is_time(t), "<{}> time=\"{t}\"", n.name);
    }
    for c in &n.children {
        assert!(children.contains(&c.name.as_str()), "<{}> may not hold <{}>", n.name, c.name);
        validate(c);
    }
    assert!(text || n.text.trim().is_empty(), "<{}> holds text {:?}", n.name, n.text);
    if n.name == "testsuite" {
        let cases: Vec<&Node> = n.children.iter().filter(|c| c.name == "testcase").collect();
        let with = |what: &str| cases.iter().filter(|c| c.children.iter().any(|x| x.name == what)).count();
        assert_eq!(count(n, "tests"), cases.len(), "tests of {:?}", n.attrs);
        assert_eq!(count(n, "failures"), with("failure"), "failures of {:?}", n.attrs);
        assert_eq!(count(n, "errors"), with("error"), "errors of {:?}", n.attrs);
        if n.attrs.contains_key("skipped") {
            assert_eq!(count(n, "skipped"), with("skipped"), "skipped of {:?}", n.attrs);
        }
    }
}

/// Validate a JUnit document; returns its root.
fn valid(xml: &str) -> Node {
    let root = parse(xml);
    assert_eq!(root.name, "testsuites", "the root element");
    validate(&root);
    root
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-junit-test-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn cases(root: &Node) -> Vec<&Node> {
    root.children.iter().flat_map(|s| s.children.iter().filter(|c| c.name == "testcase")).collect()
}

fn failure_message(case: &Node) -> Option<&str> {
    case.children
        .iter()
        .find(|c| c.name == "failure")
        .and_then(|f| f.attrs.get("message"))
        .map(|s| s.as_str())
}

const J2_PROPS: &str = "[210000, 0.3, 355, 1200, 150, 12, 2500]";

#[test]
fn check_junit_is_valid_and_names_the_finding() {
    let d = scratch("check");
    for (model, code, finding) in [("j2-continuum", 1, Some("continuum-tangent")), ("j2", 0, None)] {
        let m = d.join(format!("{model}.json"));
        std::fs::write(
            &m,
            format!(
                r#"{{ "routine": {{ "model": "{model}", "kind": "solid-3d", "properties": {J2_PROPS} }} }}"#
            ),
        )
        .unwrap();
        let xml_path = d.join(format!("{model}.xml"));
        let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
            .arg("check")
            .arg(&m)
            .arg("--junit")
            .arg(&xml_path)
            .arg("-q")
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(code), "{}", String::from_utf8_lossy(&o.stderr));
        let xml = std::fs::read_to_string(&xml_path).unwrap();
        let root = valid(&xml);
        let cs = cases(&root);
        // A case per scheme (the defaults: central and complex-step) and the verdict.
        let names: Vec<&str> = cs.iter().map(|c| c.attrs["name"].as_str()).collect();
        assert_eq!(names, ["tangent against central", "tangent against complex-step", "verdict"], "{xml}");
        // The suite carries the cautions every report carries (JUnit had none; a user-style
        // sweep), as properties.
        let suite = &root.children[0];
        let cautions: Vec<&str> = suite
            .children
            .iter()
            .filter(|c| c.name == "properties")
            .flat_map(|p| p.children.iter())
            .filter(|p| p.attrs.get("name").is_some_and(|n| n == "caution"))
            .map(|p| p.attrs["value"].as_str())
            .collect();
        assert_eq!(cautions, tancheck::core::report::CAUTIONS, "{xml}");
        for c in &cs {
            assert_eq!(c.attrs["classname"], model);
            match finding {
                Some(f) => {
                    let msg = failure_message(c).unwrap_or_else(|| panic!("no failure in {xml}"));
                    assert!(msg.starts_with(&format!("finding {f}")), "{msg}");
                }
                None => assert!(failure_message(c).is_none(), "{xml}"),
            }
        }
    }
}

#[test]
fn probe_junit_has_a_case_per_probe() {
    let d = scratch("probe");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            r#"{{ "routine": {{ "model": "j2-continuum", "kind": "solid-3d", "properties": {J2_PROPS} }} }}"#
        ),
    )
    .unwrap();
    let xml_path = d.join("p.xml");
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck"))
        .arg("probe")
        .arg(&m)
        .arg("--junit")
        .arg(&xml_path)
        .arg("-q")
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", String::from_utf8_lossy(&o.stderr));
    let xml = std::fs::read_to_string(&xml_path).unwrap();
    let root = valid(&xml);
    let cs = cases(&root);
    let newton = cs.iter().find(|c| c.attrs["name"] == "newton").expect("a newton case");
    assert!(failure_message(newton).is_some_and(|m| m.contains("order")), "{xml}");
    // Every failure's message starts with its finding: the probe's name, or the tangent
    // probe's own cause (it started "probe tangent: ..."; a user-style sweep).
    assert!(failure_message(newton).is_some_and(|m| m.starts_with("finding newton: ")), "{xml}");
    let tangent = cs.iter().find(|c| c.attrs["name"] == "tangent").expect("a tangent case");
    assert!(
        failure_message(tangent).is_some_and(|m| m.starts_with("finding continuum-tangent: probe tangent: ")),
        "{xml}"
    );
    // A probe's finding is a failure typed by its probe (a routine fault would be an error).
    let failure = newton.children.iter().find(|c| c.name == "failure").unwrap();
    assert_eq!(failure.attrs["type"], "newton-finding", "{xml}");
    let symmetry = cs.iter().find(|c| c.attrs["name"] == "symmetry").expect("a symmetry case");
    assert!(failure_message(symmetry).is_none(), "{xml}");
}

#[test]
fn selftest_junit_is_valid_and_names_expected_and_found() {
    use tancheck::cli::report::junit::selftest_junit;
    use tancheck::cli::report::model::SelftestRow;
    use tancheck::core::Verdict;
    let row = |group: &str, variant: &str, expected: &str, found: &str, verdict, right| SelftestRow {
        language: group.into(),
        variant: variant.into(),
        expected: expected.into(),
        verdict,
        found: found.into(),
        first_increment: (found != "none").then_some(3),
        right,
    };
    let rows = [
        row("Rust", "j2", "none", "none", Verdict::Pass, true),
        row("Rust", "j2-continuum", "continuum-tangent", "continuum-tangent", Verdict::TangentFailure, true),
        row("C", "j2-shear-factor", "shear-factor", "uniform-scale <&>", Verdict::TangentFailure, false),
    ];
    let xml = selftest_junit(&rows).unwrap();
    let root = valid(&xml);
    assert_eq!(root.children.len(), 2, "a suite per language: {xml}");
    let cs = cases(&root);
    assert_eq!(cs.len(), 3);
    let msg = failure_message(cs[2]).expect("the wrong row fails");
    assert_eq!(
        msg,
        "expected finding shear-factor, found uniform-scale <&> (verdict FAIL, first failing increment 3)"
    );
}

#[test]
fn the_validator_rejects_what_the_schema_rejects() {
    // The checks above can fail: each of these breaks one rule of the list.
    let bad = [
        r#"<testsuite name="a" tests="0" failures="0" errors="0"/>"#,
        r#"<testsuites skipped="0"/>"#,
        r#"<testsuites><testsuite tests="0" failures="0" errors="0"/></testsuites>"#,
        r#"<testsuites><testsuite name="a" tests="1" failures="0" errors="0"><testcase name="x"><properties/></testcase></testsuite></testsuites>"#,
        r#"<testsuites><testsuite name="a" tests="2" failures="0" errors="0"><testcase name="x"/></testsuite></testsuites>"#,
        r#"<testsuites><testsuite name="a" tests="1" failures="0" errors="0" time="1,5s"><testcase name="x"/></testsuite></testsuites>"#,
        r#"<testsuites><testsuite name="a" tests="1" failures="0" errors="0"><testcase name="x"></testsuite></testsuites>"#,
    ];
    for xml in bad {
        let r = std::panic::catch_unwind(|| valid(xml));
        assert!(r.is_err(), "accepted: {xml}");
    }
    valid(
        r#"<testsuites><testsuite name="a" tests="1" failures="1" errors="0" time="0.5"><testcase name="x"><failure message="m">text</failure></testcase></testsuite></testsuites>"#,
    );
}
