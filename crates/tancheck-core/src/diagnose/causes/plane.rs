//! The trial of a plane-stress tangent left uncondensed: the in-plane block of the 3D tangent
//! returned where the derivative of a plane-stress update (σ33 held at zero) is that block
//! less the condensation term C_a3 C_3b / C_33.
//!
//! The term is one outer product whose vectors point the same way (the 3D tangent's 33 column
//! and row; symmetric for an associative law) and whose factor 1/C_33 is positive: the returned
//! tangent is stiffer along one direction. A positive rank-one excess alone also fits a plastic
//! correction scaled down, so the trial asks the elastic stiffness as well: the routine's
//! tangent along an elastic step from the start state must carry the same kind of excess over
//! that step's derivative (in an elastic increment both are the increment's own). A routine
//! that condenses its elastic stiffness and scales a plastic term has none there.

use super::kind::{Cause, Evidence, Found};
use crate::convention::PointKind;

/// A discrepancy that is one positive term: its size relative to the derivative's norm and
/// the error left without it (relative), or `None` when it is not one such term.
#[derive(Clone, Copy)]
struct PositiveTerm {
    size: f64,
    rest: f64,
}

/// `returned − derivative` in Mandel form as one positive rank-one term: the singular vectors
/// of its largest singular value within 60° of each other (cosine above ½; the 33 column and
/// the 33 row of a non-associative 3D tangent differ, but not by that much), the remaining
/// singular values the error left.
fn positive_term(ev: &Evidence<'_>, returned: &[f64], derivative: &[f64]) -> Option<PositiveTerm> {
    let n = ev.conv.ncomp();
    let (mut d, mut m) = (returned.to_vec(), derivative.to_vec());
    ev.conv.tangent_to_mandel(&mut d);
    ev.conv.tangent_to_mandel(&mut m);
    for (x, y) in d.iter_mut().zip(&m) {
        *x -= y;
    }
    if d.iter().chain(&m).any(|x| !x.is_finite()) {
        return None;
    }
    let svd = nalgebra::DMatrix::from_column_slice(n, n, &d).svd(true, true);
    let k = (0..n).max_by(|&a, &b| svd.singular_values[a].total_cmp(&svd.singular_values[b]))?;
    let s0 = svd.singular_values[k];
    // Why 1e-300: only a guard against dividing by the zero norm of an all-zero matrix.
    let norm = m.iter().map(|x| x * x).sum::<f64>().sqrt().max(1e-300);
    let rest = (0..n).filter(|&i| i != k).map(|i| svd.singular_values[i].powi(2)).sum::<f64>().sqrt() / norm;
    let (u, vt) = (svd.u.as_ref()?, svd.v_t.as_ref()?);
    let cosine = u.column(k).dot(&vt.row(k).transpose());
    (s0 > 0.0 && cosine > 0.5).then_some(PositiveTerm { size: s0 / norm, rest })
}

/// The plane-stress tangent returned without its condensation (see the module's words).
pub(super) fn try_uncondensed(ev: &Evidence<'_>, found: &mut Found) {
    if ev.conv.kind() != PointKind::PlaneStress {
        return;
    }
    let Some(here) = positive_term(ev, ev.returned, ev.numerical) else { return };
    // The elastic stiffness carries an excess of its own, more than the check's resolution
    // (10 × tol) and one term to the level at which this one is judged: the increment's own
    // when it is elastic, else the elastic step's.
    let elastic = if ev.state_changed {
        match (ev.elastic_returned, ev.elastic) {
            (Some(r), Some(e)) => positive_term(ev, r, e),
            _ => None,
        }
    } else {
        Some(here)
    };
    let Some(el) = elastic else { return };
    if el.size <= 10.0 * ev.tol || el.rest > found.explain_level.max(1e-3 * el.size) {
        return;
    }
    found.push(
        Cause::Uncondensed,
        format!(
            "the in-plane block of a 3D tangent, not condensed for plane stress: the term C_a3 C_3b / C_33 \
             that holding σ33 at zero takes off is missing (one positive term, size {:.2e} of the norm; \
             the elastic stiffness returned carries one too, {:.2e})",
            here.size, el.size
        ),
        here.rest,
    );
}
