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
    vec![
        row("kinked columns matching neither side beside a wrong column without a kink", wrong_beside, 0.8),
        row("a kink in one column, the tangent wrong in another without a kink", wrong_elsewhere, 7.25),
    ]
}
