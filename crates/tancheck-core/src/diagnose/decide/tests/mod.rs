//! The decision as a table: one row per situation of the verdict, with the numbers that
//! trigger it and, where there is one, the published source of the value.

use super::*;

mod kink_columns;
mod temp_nearby;
mod twin_dtemp;
mod twin_tangent;
use crate::diagnose::causes::Cause;
use crate::diagnose::kink::KinkColumn;
use crate::diagnose::study::{analyse, ladder, StudyPoint};
use crate::diagnose::temp_kink::TempKink;
use crate::schemes::Scheme;

/// A study of `scheme` whose error at relative step h is `f(h)`.
fn study(scheme: Scheme, tol: f64, f: impl Fn(f64) -> f64) -> StepStudy {
    let pts = ladder().into_iter().map(|h| StudyPoint { rel_step: h, step: h, error: f(h) }).collect();
    analyse(scheme, pts, tol)
}

/// Central and forward studies of a consistent tangent: truncation c·hᵖ plus rounding ε/h
/// (Nocedal & Wright 2006, §8.1).
fn consistent() -> Vec<StepStudy> {
    vec![
        study(Scheme::Central, 1e-6, |h| 0.3 * h * h + 1e-16 / h),
        study(Scheme::Forward, 1e-4, |h| 0.3 * h + 1e-16 / h),
    ]
}

/// Studies of a tangent off by `e` (a plateau).
fn plateau(e: f64) -> Vec<StepStudy> {
    vec![
        study(Scheme::Central, 1e-6, |h| e + 0.3 * h * h + 1e-16 / h),
        study(Scheme::Forward, 1e-4, |h| e + 0.3 * h + 1e-16 / h),
    ]
}

fn column(matches: Side, detected: bool, fe: f64, be: f64) -> KinkColumn {
    KinkColumn {
        gaps: vec![0.26; 3],
        detected,
        forward_error: fe,
        backward_error: be,
        matches,
        on_a_side: matches != Side::Neither,
        jump: false,
        steady: None,
    }
}

/// A kink with per-column sides (6 columns 11 22 33 23 13 12).
fn kink(cols: Vec<KinkColumn>, whole: Side) -> Kink {
    let labels = ["11", "22", "33", "23", "13", "12"];
    let sides = cols
        .iter()
        .zip(labels)
        .map(|(c, l)| format!("{l} {}", c.matches.word()))
        .collect::<Vec<_>>()
        .join(", ");
    Kink {
        gaps: vec![0.259; 3],
        detected: true,
        forward_error: 1.79,
        backward_error: 0.545,
        returned_matches: whole,
        columns: cols,
        sides,
        nearby: false,
        close: false,
        forward: vec![],
        backward: vec![],
        corner: None,
    }
}

fn base() -> Observed {
    Observed { failed_tol: 1e-6, ..Observed::default() }
}

/// A check at the tight tolerance 1e-10 where the complex step erred by `complex` and the twin
/// was examined: the situation of every twin row.
fn with_twin(studies: Vec<StepStudy>, complex: f64, twin: TwinEvidence) -> Observed {
    Observed { studies, complex: Some((complex, 1e-10)), twin: Some(twin), failed_tol: 1e-10, ..base() }
}

fn hyp(cause: Cause, explains: bool) -> Hypothesis {
    Hypothesis { cause, detail: String::new(), error_left: if explains { 1e-12 } else { 0.3 }, explains }
}

struct Row {
    what: &'static str,
    observed: Observed,
    pass: bool,
    finding: &'static str,
    twin_unsafe: bool,
    needs_causes: bool,
}

fn rows() -> Vec<Row> {
    // J2 ending exactly on the yield surface: uniaxial strain ε11 = σy/2μ = 0.001625 for
    // E = 200 GPa, ν = 0.3, σy = 250 MPa (Simo & Hughes 1998, Box 3.2; the numbers are those of
    // the worked case in REFERENCES.md). The forward and backward derivatives differ by 26 %
    // (measured); the 11 column of the returned elastic tangent is the backward one, 22 and 33
    // the forward ones; the complex step agrees to 2e-16; a central difference straddles.
    let on_yield_cols = || {
        vec![
            column(Side::Backward, true, 0.5, 1e-9),
            column(Side::Forward, true, 1e-9, 0.3),
            column(Side::Forward, true, 1e-9, 0.3),
            column(Side::Both, false, 1e-9, 1e-9),
            column(Side::Both, false, 1e-9, 1e-9),
            column(Side::Both, false, 1e-9, 1e-9),
        ]
    };
    let mut rows = vec![
        Row {
            what: "J2 on the yield surface, complex step exact (2.2e-16), central straddles (0.235)",
            observed: Observed {
                kink: Some(kink(on_yield_cols(), Side::Neither)),
                studies: plateau(0.235),
                complex: Some((2.2e-16, 1e-10)),
                twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: None }),
                ..base()
            },
            pass: true,
            finding: "none",
            twin_unsafe: false,
            needs_causes: false,
        },
        Row {
            what: "J2 on the yield surface without a twin: each column matches one of its own sides",
            observed: Observed {
                kink: Some(kink(on_yield_cols(), Side::Backward)),
                studies: plateau(0.235),
                ..base()
            },
            pass: true,
            finding: "none",
            twin_unsafe: false,
            needs_causes: false,
        },
    ];
    // The straddle case of REFERENCES.md (derived): a central difference with h = 1e-2 across
    // the yield kink of the worked J2 case is off by 9.9 %. A tangent equal to it matches
    // neither side in its 11 column: the negative control.
    let mut straddle = on_yield_cols();
    straddle[0] = column(Side::Neither, true, 0.099, 0.099);
    rows.push(Row {
        what:
            "a tangent off by 9.9 % (the straddling central difference) at a kink, complex step disagreeing",
        observed: Observed {
            kink: Some(kink(straddle.clone(), Side::Neither)),
            studies: plateau(0.099),
            complex: Some((0.099, 1e-10)),
            ..base()
        },
        pass: false,
        finding: "kink-neither-side",
        twin_unsafe: false,
        needs_causes: false,
    });
    rows.push(Row {
        what: "the same without a twin",
        observed: Observed { kink: Some(kink(straddle, Side::Neither)), studies: plateau(0.099), ..base() },
        pass: false,
        finding: "kink-neither-side",
        twin_unsafe: false,
        needs_causes: false,
    });
    // A bimodulus law σ = Et ε (ε ≥ 0), Ec ε (ε < 0), Et = 1000, Ec = 3000, at ε = 0 exactly,
    // returning the mean 2000 (a sign function that is 0 at 0): the central difference
    // straddles and gives the mean too, and the twin, on that sign's branch at the point,
    // agrees exactly, so every check passed (call_check sends it here). Errors of the column
    // against the sides: |2000 − 1000|/1000 = 1 forward, |2000 − 3000|/3000 = 1/3 backward.
    // The mean is no side's derivative (found by a user-style sweep).
    let mut mean = on_yield_cols();
    mean[0] = column(Side::Neither, true, 1.0, 1.0 / 3.0);
    rows.push(Row {
        what: "the mean of the two sides at a kink, the complex step agreeing, every check passed",
        observed: Observed {
            kink: Some(kink(mean.clone(), Side::Neither)),
            // The central difference straddles and gives the mean to rounding; the one-sided
            // ones give a side each, |1000 − 2000|/1000 = 1 from the returned column.
            studies: vec![
                study(Scheme::Central, 1e-6, |h| 1e-16 / h),
                study(Scheme::Forward, 1e-4, |h| 1.0 + 1e-16 / h),
            ],
            complex: Some((1e-16, 1e-10)),
            twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: None }),
            failed_tol: f64::INFINITY,
            tangent_checks_pass: true,
            ..base()
        },
        pass: false,
        finding: "kink-neither-side",
        twin_unsafe: false,
        needs_causes: false,
    });
    // The same column between the sides, but the "kink" is noise: an inner solve stopped at
    // 1e-9 of the stress, whose one-sided gaps grow a hundredfold over the probe's two decades.
    // The complex step is exact there (the noise is real): it stands (found by a review).
    let mut noisy = mean.clone();
    noisy[0].gaps = vec![1e-3, 1e-2, 1e-1];
    rows.push(Row {
        what: "noise taken for a kink, the returned column between the noisy sides, complex step exact",
        observed: Observed {
            kink: Some(kink(noisy, Side::Neither)),
            studies: plateau(1e-4),
            complex: Some((0.0, 1e-10)),
            twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: None }),
            ..base()
        },
        pass: true,
        finding: "none",
        twin_unsafe: false,
        needs_causes: false,
    });
    // 1D plasticity (E = 1000, Et = 47.62) unloaded by 4e-8 of the strain from the yield
    // surface: elastic at the point, the returned tangent still plastic (off by 95 %). The
    // forward study mixes the sides less as h grows: error 8e-5 at the largest step, growing
    // as the step shrinks; the central study sits at the mean of the sides; Richardson at a
    // moderate step straddles the boundary. The complex step (1000) is right: the tangent,
    // not the twin, is wrong (found by a user-style sweep).
    rows.push(Row {
        what: "a wrong tangent just inside the elastic range, forward error growing as the step shrinks",
        observed: Observed {
            studies: vec![
                study(Scheme::Central, 1e-6, |_| 0.48),
                study(Scheme::Forward, 1e-4, |h| (8e-5 * 1e-2 / h).min(0.95)),
            ],
            complex: Some((0.952, 1e-10)),
            twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: Some(0.5) }),
            failed_tol: 1e-6,
            ..base()
        },
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: true,
    });
    // Every difference quotient NaN (a routine computing its stress from a tangent it was not
    // asked for, pre-filled with a signalling NaN): no derivative to compare with, and no
    // cause of a wrong tangent to try.
    rows.push(Row {
        what: "every step's difference quotient not finite",
        observed: Observed {
            studies: vec![
                study(Scheme::Central, 1e-6, |_| f64::NAN),
                study(Scheme::Forward, 1e-4, |_| f64::NAN),
            ],
            complex: Some((f64::INFINITY, 1e-10)),
            ..base()
        },
        pass: false,
        finding: NON_FINITE_FINDING,
        twin_unsafe: false,
        needs_causes: false,
    });
    // A broken twin (a conjugating dot product: the imaginary part of the norm lost): the
    // complex derivative is off by 0.3 while central differences converge with order 2 to
    // the returned tangent and Richardson agrees with it (Martins et al. 2003, §3–4).
    rows.push(Row {
        what: "broken twin: real schemes converge with their order, complex step off by 0.3",
        observed: with_twin(
            consistent(),
            0.3,
            TwinEvidence { real_part_gap: 1e-17, derivative_gap: Some(0.3) },
        ),
        pass: true,
        finding: TWIN_FINDING,
        twin_unsafe: true,
        needs_causes: false,
    });
    rows.push(Row {
        what: "twin whose real part differs (1e-3 of the stress scale), real schemes converge",
        observed: with_twin(consistent(), 0.3, TwinEvidence { real_part_gap: 1e-3, derivative_gap: None }),
        pass: true,
        finding: TWIN_FINDING,
        twin_unsafe: true,
        needs_causes: false,
    });
    // A twin that computes another stress and a tangent that is wrong as well (plateau at
    // 1e-3): the tangent differs, judged without the twin, and the causes are tried against
    // a real reference (`trust_twin` false, checked below).
    rows.push(Row {
        what: "twin real part off and the tangent wrong too",
        observed: with_twin(
            plateau(1e-3),
            0.3,
            TwinEvidence { real_part_gap: 1e-3, derivative_gap: Some(0.3) },
        ),
        pass: false,
        finding: "unexplained",
        twin_unsafe: true,
        needs_causes: true,
    });
    // A tangent off by 1e-7: central differences cannot see it (their tolerance is 1e-6) but
    // the twin agrees with Richardson to 1e-12: the tangent, not the twin, is wrong.
    rows.push(Row {
        what: "tangent off by 1e-7, twin agreeing with Richardson (1e-12)",
        observed: with_twin(
            vec![study(Scheme::Central, 1e-6, |h| 1e-7 + 0.3 * h * h + 1e-16 / h)],
            1e-7,
            TwinEvidence { real_part_gap: 0.0, derivative_gap: Some(1e-12) },
        ),
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: true,
    });
    // A tangent off by about 1e-5 just past a boundary where a squared bracket <x - t>² starts
    // (its second derivative jumps): the complex step alone is exact and differs from the
    // returned tangent by 1.16e-5; the central study levels off at that size; the forward
    // study stays flat at 1.15e-5, inside its own loose tolerance (1e-4), so it "converges";
    // Richardson at a moderate step straddles the boundary (gap 1e-3). The forward scheme is
    // no closer to the returned tangent than the complex step: the tangent, not the twin, is
    // wrong (found by a user-style sweep; the numbers are that routine's).
    rows.push(Row {
        what: "tangent off by 1e-5 next to a boundary, forward flat within its own tolerance",
        observed: Observed {
            studies: vec![
                study(Scheme::Central, 1e-6, |h| 1.16e-5 + 1e-16 / h),
                study(Scheme::Forward, 1e-4, |_| 1.15e-5),
            ],
            complex: Some((1.16e-5, 1e-10)),
            twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: Some(1e-3) }),
            failed_tol: 1e-6,
            ..base()
        },
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: true,
    });
    // A yield surface 1e-9 from the point (J2 case above, ε11 = 0.001625 + 1e-9): the
    // one-sided derivatives differ by 0.41 at the largest probe step and agree to 2.6e-9 at
    // the smallest, where each column matches them to 4e-8 (measured).
    let mut near = kink(vec![column(Side::Both, false, 1.1e-9, 1.5e-9); 6], Side::Forward);
    near.detected = false;
    near.nearby = true;
    near.gaps = vec![0.24, 0.08, 5e-8];
    rows.push(Row {
        what: "a yield surface 1e-9 away, central straddling it, no twin",
        observed: Observed { kink: Some(near.clone()), studies: plateau(1.0), ..base() },
        pass: true,
        finding: "none",
        twin_unsafe: false,
        needs_causes: false,
    });
    let mut near_wrong = near;
    near_wrong.columns[0] = column(Side::Neither, false, 0.05, 0.05);
    rows.push(Row {
        what: "the same with a column 5 % off",
        observed: Observed { kink: Some(near_wrong), studies: plateau(1.0), ..base() },
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: true,
    });
    rows.push(Row {
        what: "truncation of the default step: central converges with order 2 to 1e-11, no twin",
        observed: Observed { studies: consistent(), ..base() },
        pass: true,
        finding: "none",
        twin_unsafe: false,
        needs_causes: false,
    });
    rows.push(Row {
        what: "a dip under the tolerance without order is not truncation",
        observed: Observed {
            studies: vec![study(Scheme::Central, 1e-6, |h| {
                if (h - 1e-7).abs() < 1e-12 {
                    5e-7
                } else {
                    3e-3 * (1.0 + 0.5 * (1e3 * h).sin())
                }
            })],
            ..base()
        },
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: true,
    });
    rows.push(Row {
        what: "a plateau at 1e-3 with the causes tried: the first explaining cause names it",
        observed: Observed {
            studies: plateau(1e-3),
            causes: Some(vec![hyp(Cause::SingleEntry, true), hyp(Cause::TermScaled, true)]),
            ..base()
        },
        pass: false,
        finding: "single-entry",
        twin_unsafe: false,
        needs_causes: false,
    });
    rows.push(Row {
        what: "a plateau no cause explains",
        observed: Observed {
            studies: plateau(1e-3),
            causes: Some(vec![hyp(Cause::RankTwo, false)]),
            ..base()
        },
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: false,
    });
    rows.push(Row {
        what: "complex step exact away from a kink",
        observed: Observed { studies: plateau(1e-3), complex: Some((1e-15, 1e-10)), ..base() },
        pass: true,
        finding: "none",
        twin_unsafe: false,
        needs_causes: false,
    });
    rows.push(Row {
        what: "∂σ/∂T wrong with the tangent right",
        observed: Observed {
            tangent_checks_pass: true,
            dtemp_failed: true,
            dtemp_causes: vec![hyp(Cause::UniformScale, true)],
            failed_tol: f64::INFINITY,
            ..base()
        },
        pass: false,
        finding: "dtemp",
        twin_unsafe: false,
        needs_causes: false,
    });
    rows.push(Row {
        what: "∂σ/∂T missing its term along the stress",
        observed: Observed {
            tangent_checks_pass: true,
            dtemp_failed: true,
            dtemp_causes: vec![hyp(Cause::PartialDtemp, true)],
            failed_tol: f64::INFINITY,
            ..base()
        },
        pass: false,
        finding: "dtemp-partial",
        twin_unsafe: false,
        needs_causes: false,
    });
    // Johnson–Cook (Johnson & Cook 1983 flow stress, thermal softening) at a zero increment
    // from a point on the yield surface, 400 K: heating flows plastically, cooling stays
    // elastic. The routine returns the elastic side's ∂σ/∂T (zero); the one-sided derivatives
    // differ by 100 % at every probe step (measured, tests/dtemp_kink.rs); the central ∂σ/∂T
    // reads half the plastic side.
    let t_kink = |fe: f64, be: f64, matches: Side| TempKink {
        gaps: vec![1.0; 3],
        detected: true,
        nearby: false,
        forward_error: fe,
        backward_error: be,
        matches,
        on_a_side: matches != Side::Neither,
        forward: vec![],
        backward: vec![],
    };
    let dtemp_at = |k: TempKink, complex: Option<(f64, f64)>, causes: Vec<Hypothesis>| Observed {
        tangent_checks_pass: true,
        dtemp_failed: true,
        dtemp_kink: Some(k),
        dtemp_complex: complex,
        dtemp_causes: causes,
        failed_tol: f64::INFINITY,
        ..base()
    };
    for (what, k, complex, pass, finding) in [
        (
            "∂σ/∂T at a kink in T, complex step exact",
            t_kink(1.0, 0.0, Side::Backward),
            Some((0.0, 1e-10)),
            true,
            "none",
        ),
        (
            "∂σ/∂T at a kink in T, no twin, the backward side",
            t_kink(1.0, 0.0, Side::Backward),
            None,
            true,
            "none",
        ),
        // E(T) with a slope that changes at a temperature the point sits on: the returned
        // ∂σ/∂T is the mean of the sides' slopes (−0.0102 for −0.0100 and −0.0104), and so is
        // the twin's, on a ramp that is 0 at the point: the complex step's agreement does not
        // stand for the mean (found by a user-style sweep). Errors against the sides: 0.0002 /
        // 0.0100 and 0.0002 / 0.0104.
        (
            "∂σ/∂T the mean of the sides at a kink in T, complex step agreeing",
            t_kink(0.02, 0.0192, Side::Neither),
            Some((0.0, 1e-10)),
            false,
            "dtemp",
        ),
        (
            "∂σ/∂T at a kink in T equal to neither side (the straddled half), complex step off",
            t_kink(0.5, 1.0, Side::Neither),
            Some((1.0, 1e-10)),
            false,
            "dtemp",
        ),
        (
            "∂σ/∂T near a kink in T, equal to the one-sided derivatives below it",
            TempKink {
                detected: false,
                nearby: true,
                gaps: vec![0.3, 1e-3, 1e-8],
                ..t_kink(2e-8, 2e-8, Side::Both)
            },
            None,
            true,
            "none",
        ),
        (
            "∂σ/∂T near a kink in T, off the one-sided derivatives below it",
            TempKink {
                detected: false,
                nearby: true,
                gaps: vec![0.3, 1e-3, 1e-8],
                ..t_kink(0.2, 0.2, Side::Neither)
            },
            None,
            false,
            "dtemp",
        ),
        (
            "∂σ/∂T with the wrong sign away from a kink, complex step off",
            TempKink { detected: false, gaps: vec![1e-9; 3], ..t_kink(2.0, 2.0, Side::Neither) },
            Some((2.0, 1e-10)),
            false,
            "dtemp",
        ),
    ] {
        rows.push(Row {
            what,
            observed: dtemp_at(k, complex, vec![hyp(Cause::UniformScale, true)]),
            pass,
            finding,
            twin_unsafe: false,
            needs_causes: false,
        });
    }
    rows.extend(twin_dtemp::rows());
    rows.extend(twin_tangent::rows());
    rows.extend(kink_columns::rows());
    rows
}

#[test]
fn the_decision_table() {
    let mut wrong = Vec::new();
    for r in rows() {
        let d = decide(&r.observed);
        if d.pass != r.pass
            || d.finding != r.finding
            || d.twin_unsafe != r.twin_unsafe
            || d.needs_causes != r.needs_causes
        {
            wrong.push(format!(
                "{}: got pass {} finding {} twin {} needs causes {} ({})",
                r.what, d.pass, d.finding, d.twin_unsafe, d.needs_causes, d.reason
            ));
        }
    }
    assert!(wrong.is_empty(), "{}", wrong.join("\n"));
}

#[test]
fn a_broken_twin_never_says_the_tangent_differs_and_names_the_culprits() {
    let r = rows().into_iter().find(|r| r.what.starts_with("broken twin")).unwrap();
    let d = decide(&r.observed);
    assert!(!d.reason.contains("differs from"), "{}", d.reason);
    assert!(d.reason.contains("dot_product") && d.reason.contains("sqrt"), "{}", d.reason);
    assert!(!d.trust_twin);
    let r = rows().into_iter().find(|r| r.what.starts_with("broken twin and a wrong tangent")).unwrap();
    let d = decide(&r.observed);
    assert!(!d.trust_twin, "the causes of a wrong tangent are judged against a real reference");
    assert!(
        d.reason.contains("levels off at 4.00e-1")
            && d.reason.contains("settle")
            && d.reason.contains("not complex-step safe"),
        "both the wrong tangent and the twin are said: {}",
        d.reason
    );
    let r = rows().into_iter().find(|r| r.what.starts_with("twin real part off and")).unwrap();
    let d = decide(&r.observed);
    assert!(!d.trust_twin && d.reason.contains("real part differs"), "{}", d.reason);
}
