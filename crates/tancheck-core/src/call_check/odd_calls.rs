//! Perturbed calls that went wrong without the routine being at fault for the check: a
//! complex-step twin refusing a call the real routine computes (the twin is not complex-step
//! safe), and a real scheme's quotient that is not a finite number where the base call's stress
//! is (the routine returns NaN or ∞ next to an input it computes).

use super::Measured;
use crate::routine::Fault;
use crate::schemes::Scheme;
use crate::Convention;

/// The reason of a complex-step comparison the twin's refusal set aside (the diagnosis says
/// which call, and why).
pub const TWIN_REFUSED: &str = "twin refused a call";

/// A status the complex-step twin returned for a call whose real part the routine computes
/// (the base call, at the same real inputs, returned none): the twin takes another branch or
/// test than the real routine there (an unguarded power of zero whose derivative part is NaN
/// spread into the real part; a complex comparison), so it is not complex-step safe, and the
/// routine is not at fault (it was, exit 3; a user-style sweep of a Johnson–Cook routine).
/// In words, or `None` for another fault or scheme.
pub(super) fn twin_refusal(scheme: Scheme, f: &Fault, what: &str) -> Option<String> {
    match (scheme, f) {
        (Scheme::ComplexStep, Fault::Status { .. }) => Some(format!(
            "the complex-step twin refused a call (perturbation {what}) whose real inputs the routine \
             computes ({f}): the twin takes another branch there than the real routine, and is not \
             complex-step safe (a power or square root of zero whose derivative part is NaN, a test on \
             a complex value?)"
        )),
        _ => None,
    }
}

/// Where a real scheme's difference quotient at its default step is not a finite number (a
/// perturbed call returned a stress that is not), in words; `None` where every one is.
pub(super) fn non_finite_quotient(measured: &[Measured], n: usize, conv: &Convention) -> Option<String> {
    measured.iter().filter(|m| m.scheme != Scheme::ComplexStep && m.outcome.is_none()).find_map(|m| {
        let column = |j: usize| m.tangent[j * n..(j + 1) * n].iter().any(|x| !x.is_finite());
        let what = match (0..n).find(|&j| column(j)) {
            Some(j) => format!("column {}", conv.order()[j].label()),
            None => match &m.dtemp {
                Some(Ok(col)) if col[..n].iter().any(|x| !x.is_finite()) => "∂σ/∂T".into(),
                _ => return None,
            },
        };
        Some(format!(
            "the {} difference's {what} at its default step {:.2e} is not a finite number: a perturbed \
             call returned a stress that is not (the base call's is)",
            m.scheme.name(),
            m.h
        ))
    })
}
