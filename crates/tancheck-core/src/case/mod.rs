//! Case files: the exact inputs of one routine call whose tangent failed a check, its outputs,
//! and the numbers of the check, so that the call can be rerun (under a debugger, after a fix)
//! and kept as a regression test.
//!
//! A case is JSON. Every floating-point array is a [`Numbers`]: readable decimals (`values`)
//! next to the IEEE-754 bit patterns (`bits`, 16 hex digits each), which are what a replay
//! uses, so the call is made with exactly the saved inputs whatever a JSON parser does with
//! the last digit of a decimal. A hand-written case may leave `bits` out; then the decimals
//! are used.
//!
//! Fields, in order: `about` (what the file is, and that it should be committed), `format`
//! ([`FORMAT`]), `tool` (name and version that wrote it), `routine` ([`CaseRoutine`]: a
//! built-in model's name, or a library's path and SHA-256 and the symbol; kind, component
//! order, shear measure, sizes), `call` ([`CaseCall`]: increment number, properties, strain,
//! strain increment, start stress and state, temperature and time with their increments),
//! `outputs` ([`CaseOutputs`]: status, branch, stress, state, tangent as returned),
//! `probe` ([`CaseProbe`]: the settings of the check, each scheme's numbers, the best
//! numerical tangent, the verdict and finding), `origin` ([`CaseOrigin`]: where on which path
//! the call was met, and the fraction of the increment where the error changes class), and
//! optionally `path` ([`CasePath`]: a start state and increments that lead to the call).
//!
//! Nothing here reads or writes files: the front end does, and computes the library hash.

mod codec;
mod format;
mod replay;

pub use crate::call_check::FAULT_FINDING;
pub use format::*;
pub use replay::{driver_for, replay, Replay};

/// Pretty JSON with every array of plain values on one line (how case files are written).
pub fn compact_json(pretty: &str) -> String {
    codec::compact_arrays(pretty)
}

#[cfg(test)]
mod tests {
    use super::codec::compact_arrays;
    use super::*;
    use crate::bisect::testing::{Bar, PROPS};
    use crate::bisect::{self, BisectSettings};
    use crate::call_check as judge;
    use crate::driver::PointState;
    use crate::path::{Path, PathIncrement};
    use crate::routine::Caller;
    use crate::routine::Model;
    use crate::settings::Settings;

    #[test]
    fn numbers_keep_every_bit() {
        let v = [0.1 + 0.2, 1e-310, -0.0, f64::MAX, f64::MIN_POSITIVE, 1.0 / 3.0, f64::NAN, f64::INFINITY];
        let n = Numbers::of(&v);
        let text = serde_json::to_string(&n).unwrap();
        let back: Numbers = serde_json::from_str(&text).unwrap();
        let mut w = Vec::new();
        let d = back.decode("x", &mut w).unwrap();
        assert!(w.is_empty(), "{w:?}");
        for (a, b) in v.iter().zip(&d) {
            assert_eq!(a.to_bits(), b.to_bits());
        }
        // NaN and infinity have no decimal; their bits carry them.
        assert!(text.contains("null,null"), "{text}");
    }

    #[test]
    fn decimals_alone_and_decimals_that_disagree() {
        let n: Numbers = serde_json::from_str(r#"{ "values": [1.5, -2e-3] }"#).unwrap();
        let mut w = Vec::new();
        assert_eq!(n.decode("a", &mut w).unwrap(), vec![1.5, -2e-3]);
        let n: Numbers =
            serde_json::from_str(r#"{ "values": [1.5], "bits": ["3ff0000000000000"] }"#).unwrap();
        assert_eq!(n.decode("a", &mut w).unwrap(), vec![1.0]);
        assert!(w[0].contains("a[0]") && w[0].contains("the bits are used"), "{w:?}");
        let n: Numbers = serde_json::from_str(r#"{ "values": [1.5], "bits": ["3ff00000"] }"#).unwrap();
        assert!(n.decode("a", &mut w).unwrap_err().to_string().contains("16 hex digits"));
        let n: Numbers =
            serde_json::from_str(r#"{ "values": [1.5, 2], "bits": ["3ff0000000000000"] }"#).unwrap();
        assert!(n.decode("a", &mut w).unwrap_err().to_string().contains("2 values and 1 bit"));
    }

    #[test]
    fn compacting_keeps_the_json_value() {
        let v = serde_json::json!({
            "a": [1, 2.5, null], "b": {"c": [[1, 2], [3]], "d": "x, [y]\n\"z\"", "e": []},
            "f": ["∂σ/∂ε", "q"]
        });
        let pretty = serde_json::to_string_pretty(&v).unwrap();
        let compact = compact_arrays(&pretty);
        assert!(compact.lines().count() < pretty.lines().count());
        assert!(compact.contains("[1, 2.5, null]"), "{compact}");
        assert_eq!(serde_json::from_str::<serde_json::Value>(&compact).unwrap(), v);
    }

    /// A case of the flawed bar's first failing call (increment 3 of increments of 5e-4).
    fn bar_case() -> (Case, crate::bisect::Located) {
        let mut bar = Bar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = Path {
            name: "bar".into(),
            increments: vec![PathIncrement::strain([5e-4, 0.0, 0.0, 0.0, 0.0, 0.0]); 5],
        };
        let settings = Settings::default();
        let start = PointState::zero(&info, 20.0);
        let report = crate::check::run(&mut caller, &PROPS, start.clone(), &path, &settings).unwrap();
        let l = bisect::locate(
            &mut caller,
            &PROPS,
            start.clone(),
            &path,
            &report,
            &settings,
            &BisectSettings::default(),
        )
        .unwrap()
        .unwrap();
        let (mut d, previous) =
            bisect::driver_at(&mut caller, &PROPS, start.clone(), &path, 3, &settings).unwrap();
        let check = judge::check_call(&mut d, &mut caller, &settings, previous.as_deref()).unwrap();
        assert!(!check.passed());
        let origin = CaseOrigin {
            manifest: None,
            path: path.name.clone(),
            increment: 3,
            of: 5,
            branch: l.branch.clone(),
            crossing: CaseOrigin::crossing_of(&l.inside),
            shrunk_from: None,
        };
        let prefix = Path { name: "bar".into(), increments: path.increments[..3].to_vec() };
        let mut r = CaseRoutine::from_info(&info, true);
        r.model = Some("bar".into());
        let case =
            Case::capture(r, &d, Ok(&check), previous.as_deref(), &settings, origin, Some((&start, &prefix)));
        (case, l)
    }

    #[test]
    fn a_case_replays_bit_for_bit_with_the_same_numbers() {
        let (case, l) = bar_case();
        let text = case.to_json();
        let parsed = Case::parse(&text).unwrap();
        assert!(parsed.warnings.is_empty(), "{:?}", parsed.warnings);
        // Every bit pattern survives the file. (The decimals need not: serde_json's default
        // parser reads the stress 252.38095238095238 written here back one unit in the last
        // place off, which is why the bits are kept.)
        fn all_bits(v: &serde_json::Value, out: &mut Vec<String>) {
            match v {
                serde_json::Value::Object(m) => {
                    for (k, x) in m {
                        if k == "bits" {
                            out.push(x.to_string());
                        } else {
                            all_bits(x, out);
                        }
                    }
                }
                serde_json::Value::Array(a) => a.iter().for_each(|x| all_bits(x, out)),
                _ => {}
            }
        }
        let (mut a, mut b) = (Vec::new(), Vec::new());
        all_bits(&serde_json::to_value(&case).unwrap(), &mut a);
        all_bits(&serde_json::to_value(&parsed.case).unwrap(), &mut b);
        assert!(a.len() > 10);
        assert_eq!(a, b);
        assert_eq!(parsed.outputs.stress[0].to_bits(), 0x406f8c30c30c30c3);
        assert_eq!(parsed.call.increment, 3);
        assert_eq!(parsed.call.start.strain, vec![1e-3]);
        assert_eq!(parsed.call.start.temp, 20.0);
        assert_eq!(parsed.outputs.branch, 1);
        assert_eq!(l.call.dstrain, parsed.call.dstrain);
        let crossing = case.origin.crossing.as_ref().unwrap();
        assert!(crossing.below <= 0.5 && 0.5 <= crossing.above);
        let mut bar = Bar::new(true);
        let mut caller = Caller::new(&mut bar);
        let r = replay(&mut caller, &parsed, true).unwrap();
        assert!(r.identical(), "{:?}", r.differences);
        assert_eq!(r.outputs.stress[0].to_bits(), parsed.outputs.stress[0].to_bits());
        assert_eq!(r.outputs.tangent[0], PROPS[0]);
        assert_eq!(r.path_leads_here, Some(Ok(())));
        let c = r.check.unwrap();
        assert!(!c.passed());
        assert_eq!(ProbeCheck::list(&c), case.probe.checks);
        assert_eq!(c.finding(), case.probe.finding);
        // The consistent bar gives other outputs for the same inputs, and passes.
        let mut good = Bar::new(false);
        let mut caller = Caller::new(&mut good);
        let r = replay(&mut caller, &parsed, false).unwrap();
        assert!(!r.identical());
        assert!(r.differences.iter().any(|d| d.starts_with("tangent[0]")), "{:?}", r.differences);
        assert!(r.check.unwrap().passed());
        assert_eq!(r.path_leads_here, None);
    }

    // A damaged bar given its undamaged modulus: where damage starts (no damage before) that
    // modulus is the elastic tangent of the increment's start and is named so; past it, as the
    // stiffness of the path's start. A case of such an increment replays with the same finding
    // when it carries its path (the trial's start), and without the trial when it does not.
    #[test]
    fn the_initial_stiffness_is_named_in_the_check_and_in_the_replay_of_its_case() {
        use crate::bisect::testing::{DamageBar, DAMAGE_PROPS};
        let mut bar = DamageBar::new(true);
        let info = bar.0.info().clone();
        let mut caller = Caller::new(&mut bar);
        let path = Path {
            name: "damage".into(),
            increments: vec![PathIncrement::strain([5e-4, 0.0, 0.0, 0.0, 0.0, 0.0]); 5],
        };
        let settings = Settings::default();
        let start = PointState::zero(&info, 20.0);
        let report = crate::check::run(&mut caller, &DAMAGE_PROPS, start.clone(), &path, &settings).unwrap();
        let findings: Vec<&str> = report
            .increments
            .iter()
            .map(|i| i.diagnosis.as_ref().map_or("passed", |d| d.finding.as_str()))
            .collect();
        assert_eq!(
            findings,
            ["passed", "elastic-tangent", "initial-stiffness", "initial-stiffness", "initial-stiffness"]
        );
        let (mut d, previous) =
            bisect::driver_at(&mut caller, &DAMAGE_PROPS, start.clone(), &path, 4, &settings).unwrap();
        let check = judge::check_call(&mut d, &mut caller, &settings, previous.as_deref()).unwrap();
        assert_eq!(check.finding(), "initial-stiffness");
        let origin = CaseOrigin {
            manifest: None,
            path: path.name.clone(),
            increment: 4,
            of: 5,
            branch: "#1".into(),
            crossing: None,
            shrunk_from: None,
        };
        let prefix = Path { name: "damage".into(), increments: path.increments[..4].to_vec() };
        let mut r = CaseRoutine::from_info(&info, true);
        r.model = Some(info.name.clone());
        let mut case =
            Case::capture(r, &d, Ok(&check), previous.as_deref(), &settings, origin, Some((&start, &prefix)));
        assert_eq!(case.probe.finding, "initial-stiffness");
        let parsed = Case::parse(&case.to_json()).unwrap();
        let replayed = replay(&mut caller, &parsed, true).unwrap();
        assert_eq!(replayed.path_leads_here, Some(Ok(())));
        assert_eq!(replayed.check.unwrap().finding(), "initial-stiffness");
        case.path = None;
        let parsed = Case::parse(&case.to_json()).unwrap();
        let replayed = replay(&mut caller, &parsed, false).unwrap();
        assert_ne!(replayed.check.unwrap().finding(), "initial-stiffness");
    }

    #[test]
    fn a_path_that_does_not_lead_to_the_call_is_named() {
        let (mut case, _) = bar_case();
        let p = case.path.as_mut().unwrap();
        p.increments.remove(0);
        let parsed = Case::parse(&case.to_json()).unwrap();
        let mut bar = Bar::new(true);
        let mut caller = Caller::new(&mut bar);
        let r = replay(&mut caller, &parsed, true).unwrap();
        let e = r.path_leads_here.unwrap().unwrap_err().to_string();
        assert!(e.contains("strain") && e.contains("increment number"), "{e}");
    }

    #[test]
    fn broken_cases_name_line_and_column() {
        let (case, _) = bar_case();
        let text = case.to_json();
        let e = Case::parse(&text[..text.len() / 2]).unwrap_err();
        assert!(e.line > 1 && matches!(&e.problem, CaseProblem::Syntax(m) if m.contains("EOF")), "{e}");
        let bad = text.replacen("\"increment\": 3", "\"incremnt\": 3", 1);
        let e = Case::parse(&bad).unwrap_err();
        assert!(e.problem.to_string().contains("incremnt"), "{e}");
        // Values and bits that do not pair up are reported at the line of the bits; a wrong
        // length at the field's line.
        let strain_line = text.lines().position(|l| l.contains("\"strain\"")).unwrap() + 1;
        let bad = text.replacen("\"values\": [0.001]", "\"values\": [0.001, 0.0]", 1);
        let e = Case::parse(&bad).unwrap_err();
        assert_eq!(e.line, strain_line + 2, "{e}");
        assert!(matches!(e.problem, CaseProblem::Core(_)), "{e}");
        assert!(e.problem.to_string().contains("call.strain has 2 values and 1 bit patterns"), "{e}");
        let bad = text.replacen("\"values\": [0.001]", "\"values\": [0.001, 0.0]", 1).replacen(
            "\"bits\": [\"3f50624dd2f1a9fc\"]",
            "\"bits\": [\"3f50624dd2f1a9fc\", \"0000000000000000\"]",
            1,
        );
        let e = Case::parse(&bad).unwrap_err();
        assert_eq!(e.line, strain_line, "{e}");
        assert!(matches!(e.problem, CaseProblem::Length { got: 2, want: 1, .. }), "{e}");
        assert!(e.problem.to_string().contains("call.strain has 2 entries; the routine needs 1"), "{e}");
        let bad = text.replacen("\"format\": 1", "\"format\": 7", 1);
        let e = Case::parse(&bad).unwrap_err();
        assert_eq!(e.line, 3, "{e}");
        assert!(e.to_string().starts_with("3:"), "{e}");
        assert_eq!(e.problem, CaseProblem::Format { found: 7 });
    }
}
