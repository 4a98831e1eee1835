//! Decision-table rows of a kink in some columns beside a tangent wrong in others.

use super::*;

pub(super) fn rows() -> Vec<Row> {
    // A kink in the 11 column only, which the returned column matches (forward), and a 12
    // column that matches neither side where the two sides agree (no kink there; a secant
    // cohesive tangent at zero opening): the tangent is wrong in the 12 column, and the
    // causes are tried (against the sides, column by column). It read `kink-neither-side`
    // with no cause tried (a user-style sweep).
    let mut wrong_elsewhere = vec![column(Side::Both, false, 1e-9, 1e-9); 6];
    wrong_elsewhere[0] = column(Side::Forward, true, 1e-9, 0.5);
    wrong_elsewhere[5] = column(Side::Neither, false, 7.25, 7.25);
    // The same with kinked columns that match neither side too (a secant damage tangent
    // under pure shear: a principal strain at zero kinks columns 11, 22, 33; the secant is
    // wrong in 11 and 22 as in 12): the column without a kink still says the tangent is wrong,
    // and the causes are tried. It read `kink-neither-side` with no cause (a user-style sweep).
    let mut wrong_beside = vec![column(Side::Both, false, 1e-9, 1e-9); 6];
    wrong_beside[0] = column(Side::Neither, true, 0.4, 0.6);
    wrong_beside[1] = column(Side::Neither, true, 0.4, 0.6);
    wrong_beside[2] = column(Side::Forward, true, 1e-9, 0.5);
    wrong_beside[5] = column(Side::Neither, false, 0.8, 0.8);
    // Both: the tangent off by the column's error everywhere the studies look, the causes tried.
    let row = |what, cols, error| Row {
        what,
        observed: Observed {
            kink: Some(kink(cols, Side::Neither)),
            studies: plateau(error),
            complex: Some((error, 1e-10)),
            twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: None }),
            ..base()
        },
        pass: false,
        finding: "unexplained",
        twin_unsafe: false,
        needs_causes: true,
    };
    let mut rows = vec![
        row("kinked columns matching neither side beside a wrong column without a kink", wrong_beside, 0.8),
        row("a kink in one column, the tangent wrong in another without a kink", wrong_elsewhere, 7.25),
    ];
    rows.extend(double_kink_rows());
    rows.extend(corner_rows());
    rows.extend(close_rows());
    rows
}

/// A plastic bar (E = 1000, σy = 1, H = 50) unloaded by 1e-10 after a strain of 2.5e-3, without
/// a twin (tests/kink_verdicts.rs; numbers measured there): the forward quotients cross the
/// boundary 4e-8 of the scale away (gaps 18.4, 10.7, 1.33 at the probe's steps), the backward
/// ones are 1000 at every step, the returned 1000 equals them. It passes; a returned plastic
/// 47.6 (matching neither side) and a backward side that is not steady fail.
fn close_rows() -> Vec<Row> {
    let observed = |matches: Side, steady: Option<Side>| {
        let mut c = column(matches, false, 1.33, 7e-10);
        c.gaps = vec![18.4, 10.7, 1.33];
        c.steady = steady;
        let mut k = kink(vec![c], matches);
        (k.detected, k.close, k.gaps) = (false, true, vec![18.4, 10.7, 1.33]);
        Observed { kink: Some(k), studies: plateau(0.898), ..base() }
    };
    let row = |what, observed, pass, finding| Row {
        what,
        observed,
        pass,
        finding,
        twin_unsafe: false,
        needs_causes: !pass,
    };
    vec![
        row(
            "a boundary closer than the probe's steps, the returned column the steady side's",
            observed(Side::Backward, Some(Side::Backward)),
            true,
            "none",
        ),
        row(
            "the same, the returned column on neither side",
            observed(Side::Neither, Some(Side::Backward)),
            false,
            "unexplained",
        ),
        row("the same, neither side steady", observed(Side::Backward, None), false, "unexplained"),
    ]
}

/// The apex of an interface with two faces (tests/corner_region.rs, numbers measured there):
/// the opening column loads forward at the apex, the slip column's sides leave it along one
/// face or the other and match neither the apex's tangent (errors 0.45 and 0.45 against the
/// sides). The corner search found the apex branch along 0.67·n − 0.74·s1, its central tangent
/// within 2.1e-6. With it the increment passes; the same columns without it fail, and so do
/// they where the twin, on the routine's own branch at the point, disagrees.
fn corner_rows() -> Vec<Row> {
    let cols = vec![column(Side::Forward, true, 1e-9, 0.9), column(Side::Neither, true, 0.45, 0.45)];
    let observed = |corner: Option<crate::diagnose::kink::Corner>| {
        let mut k = kink(cols.clone(), Side::Neither);
        k.corner = corner;
        Observed { kink: Some(k), studies: plateau(0.45), ..base() }
    };
    let found = crate::diagnose::kink::Corner {
        direction: vec![0.67, -0.74],
        along: "0.67·n − 0.74·s1".into(),
        error: 2.1e-6,
        tried: 41,
        confirmed: 1,
    };
    vec![
        Row {
            what: "an apex: a column on neither side, the returned tangent a branch's found along another direction",
            observed: observed(Some(found.clone())),
            pass: true,
            finding: "none",
            twin_unsafe: false,
            needs_causes: false,
        },
        Row {
            what: "a branch's derivative found along another direction, but the complex step disagreeing",
            observed: Observed {
                complex: Some((0.3, 1e-10)),
                twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: None }),
                ..observed(Some(found.clone()))
            },
            pass: false,
            finding: "kink-neither-side",
            twin_unsafe: false,
            needs_causes: false,
        },
        Row {
            what: "the same columns where no branch's derivative was found",
            observed: observed(None),
            pass: false,
            finding: "kink-neither-side",
            twin_unsafe: false,
            needs_causes: false,
        },
    ]
}

/// Two branch boundaries closer together than the kink probe's smallest step (6e-11 of strain
/// at a scale of 6e-4): a damage law with a tension split in plane strain, ε33 = 0 a principal
/// strain (the returned 33 column its forward side) and the trace 4e-11 below zero. The probe's
/// forward steps in 11, 22 and 33 cross the trace's boundary too: 11 and 22 read backward, 33
/// neither. The numbers are those the sweep measured: central plateau 0.77, forward converging
/// to 6.1e-8 at a relative step 1e-8 (below the second boundary), complex step 1.6e-15.
fn double_kink_rows() -> Vec<Row> {
    let mut cols = vec![column(Side::Backward, true, 0.66, 1e-9); 4];
    cols[2] = column(Side::Neither, true, 0.66, 0.94);
    cols[3] = column(Side::Both, false, 1e-9, 1e-9);
    let forward_converges = || study(Scheme::Forward, 1e-4, |h| (6.1e-8 * h / 1e-8).max(6.1e-8 * 1e-8 / h));
    let observed = |forward: StepStudy, complex: f64| Observed {
        kink: Some(kink(cols.clone(), Side::Neither)),
        studies: vec![study(Scheme::Central, 1e-6, |_| 0.77), forward],
        complex: Some((complex, 1e-10)),
        twin: Some(TwinEvidence { real_part_gap: 0.0, derivative_gap: None }),
        ..base()
    };
    let row = |what, observed, pass, finding| Row {
        what,
        observed,
        pass,
        finding,
        twin_unsafe: false,
        needs_causes: false,
    };
    vec![
        row(
            "a second boundary within the probe's step, forward converging, complex step exact",
            observed(forward_converges(), 1.6e-15),
            true,
            "none",
        ),
        // The same columns, but no one-sided difference converges to the returned tangent
        // (it levels off at half the gap, as the mean of two sides does): it stands.
        row(
            "a column on neither side, every difference levelling off, complex step exact",
            observed(study(Scheme::Forward, 1e-4, |h| 0.4 + 1e-16 / h), 1.6e-15),
            false,
            "kink-neither-side",
        ),
        // A forward difference converging is not enough where the complex step disagrees.
        row(
            "a second boundary within the probe's step, forward converging, complex step off",
            observed(forward_converges(), 0.3),
            false,
            "kink-neither-side",
        ),
    ]
}
