//! The discrepancy at smaller increments, for the continuum-tangent trial: fractions of the
//! increment, or of its part past the point where it enters its branch when it crosses into
//! it (the entry found by bisection).

use super::causes::Refinement;
use super::{BestTangent, Context, REFINE};
use crate::compare::compare;
use crate::convention::Convention;
use crate::driver::Driver;
use crate::routine::{Caller, Fault};

/// The refined increments of the driver's increment, measured with `best` against the
/// returned tangent of each; the driver's increment is set back (and called again) after.
pub(super) fn strain_refinement(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    conv: &Convention,
    ctx: &Context<'_>,
    ef: f64,
    best: &BestTangent<'_>,
) -> Result<Refinement, Fault> {
    let n = conv.ncomp();
    let in_branch = |driver: &mut Driver, caller: &mut Caller<'_>, f: f64| -> Result<bool, Fault> {
        driver.rescale(f);
        driver.base_call(caller)?;
        let changed = driver.base.state.iter().zip(&driver.start().state).any(|(a, b)| a != b);
        Ok(driver.base.outcome.branch == ctx.reported_branch && changed == ctx.state_changed)
    };
    // Looked for also when the smallest fraction is in the branch: an increment entering it
    // at 0.017 of its length had refined increments of 1/8 to 1/32 straddling the entry, whose
    // discrepancy falls with the part past it, not with the fraction, and a continuum tangent
    // read `secant` or `unexplained` (a user-style sweep). Below ENTRY_SEEN of the smallest
    // fraction the entry changes the fractions' ratios by less than that share.
    let smallest = REFINE[REFINE.len() - 1];
    let crosses = match in_branch(driver, caller, smallest) {
        Ok(true) => matches!(in_branch(driver, caller, smallest * ENTRY_SEEN), Ok(false)),
        Ok(false) => true,
        Err(_) => false,
    };
    let past = if crosses { branch_entry(driver, caller, &in_branch).unwrap_or(0.0) } else { 0.0 };
    let mut errors = Vec::new();
    let mut same_branch = true;
    let mut num_s = vec![0.0; n * n];
    for s in REFINE {
        match in_branch(driver, caller, past + (1.0 - past) * s) {
            Ok(b) => same_branch &= b,
            Err(_) => {
                same_branch = false;
                break;
            }
        }
        let ret = driver.base.tangent.clone();
        if best(driver, caller, &mut num_s).is_err() {
            same_branch = false;
            break;
        }
        errors.push(compare(conv, &ret, &num_s, 1.0, ef, 0).error());
    }
    driver.rescale(1.0);
    driver.base_call(caller)?;
    Ok(Refinement { fractions: REFINE[..errors.len()].to_vec(), errors, same_branch, past })
}

/// Where an increment that crosses into its branch enters it: the smallest fraction of it
/// found in the branch (bisection to 1e-9 of the increment, 30 base calls), when its start
/// is outside and the whole increment inside. `None` when the fractions do not show one
/// crossing (or a call faulted).
fn branch_entry(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    in_branch: &dyn Fn(&mut Driver, &mut Caller<'_>, f64) -> Result<bool, Fault>,
) -> Option<f64> {
    let (mut lo, mut hi) = (0.0, 1.0);
    if !in_branch(driver, caller, hi).ok()? {
        return None;
    }
    for _ in 0..30 {
        let mid = 0.5 * (lo + hi);
        if in_branch(driver, caller, mid).ok()? {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    // Why 0.9999: past that the part left is too small for three fractions of it to measure
    // (a continuum tangent's error falls with the plastic part: at 1e-4 of the increment and
    // its fractions it is still far above the difference schemes' noise; an increment entering
    // plasticity at 0.9987 of its length read `unexplained` with a bound of 0.99, its refined
    // increments all elastic; a user-style sweep).
    (hi < 0.9999).then_some(hi)
}

/// The share of the smallest refinement fraction below which an increment's entry into its
/// branch is not looked for: an entry at c of the increment changes the ratio of the
/// discrepancies at two fractions s₁, s₂ (which fall with s − c) by about c/s, 1.6 % here,
/// far inside the 25 % the linear decay allows.
const ENTRY_SEEN: f64 = 1.0 / 64.0;
