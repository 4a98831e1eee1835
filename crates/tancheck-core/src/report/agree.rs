//! One explanation along the path. The causes of a failing increment are ranked on that
//! increment's evidence alone; where several explain it, the first may differ from one
//! increment to the next although one flaw is behind them all (a continuum tangent named at
//! every increment but those that only heat, where the tangent at the start temperature
//! explains as well; a continuum tangent behind a bulk modulus at a hydrostatic state of a
//! porous plasticity routine). Such an increment names first the cause the most other
//! failing increments name first, where that cause explains it as well (leaving an error of
//! the same order), and says so.

use super::IncrementResult;
use crate::diagnose::{Cause, Hypothesis};

/// A cause explains an increment as well as its best one when the error it leaves is at most
/// this many times the best one's, or below [`AS_WELL_FLOOR`]: named along the path, it must
/// not stand in for a cause that explains the increment exactly (a continuum tangent leaving
/// 1.1e-7 named over a start temperature leaving 2e-16; a continuum tangent leaving 2.2e-3 over
/// one column leaving 0, found by user-style sweeps). Why 100 and 1e-8: two corrections of one
/// flaw measured against the same reference leave errors within a decade or two of each other
/// (the reference's own noise), and 1e-8 is below any tolerance a scheme is judged by.
const AS_WELL: f64 = 100.0;
const AS_WELL_FLOOR: f64 = 1e-8;

/// Whether `h` explains its increment as well as the best of `all`.
fn as_well(h: &Hypothesis, all: &[Hypothesis]) -> bool {
    let best = all.iter().filter(|x| x.explains).map(|x| x.error_left).fold(f64::INFINITY, f64::min);
    h.explains && h.error_left <= (AS_WELL * best).max(AS_WELL_FLOOR)
}

/// Put first, at each failing increment it explains, the cause the path agrees on: the one
/// that explains the most failing increments (at least two; ties to the one named first at
/// more, then to the more specific), a cause that names what the routine returned or which
/// modulus is off before one that only describes the discrepancy's shape (a single entry, a
/// row, a column, a term of the derivative). Those that fit nearly any discrepancy never lead
/// (`rank-one-term`, `rank-two`, and `uniform-scale`, which is every wrong tangent of a
/// one-component point): counted, they would outnumber every specific cause. On a point of one
/// component (`ncomp` 1) the shape causes say nothing either (every wrong tangent is a single
/// entry, a scaled term), as the increment's own ranking has it: they do not lead there (the
/// path named `term-scaled` where each increment, and bisect and replay of it, named
/// `uniform-scale`; a user-style sweep).
pub fn agree_on_causes(increments: &mut [IncrementResult], ncomp: usize) {
    agree_on_tangent_causes(increments, ncomp);
    agree_on_dtemp_causes(increments);
}

/// The finding of an increment whose ∂σ/∂T failed with its tangent right, by its first cause
/// (as `decide` names it).
fn dtemp_finding(c: Cause) -> &'static str {
    match c {
        Cause::PartialDtemp => "dtemp-partial",
        Cause::StartTemperature => "start-temperature",
        _ => "dtemp",
    }
}

/// [`agree_on_causes`] for the causes of a wrong ∂σ/∂T (the tangent right): a missing term of
/// ∂σ/∂T named at every increment but one back at zero strain, whose hydrostatic stress lets a
/// factor on the whole ∂σ/∂T explain it as well and named it `dtemp` (a user-style sweep). A
/// factor on the whole (`uniform-scale`) fits any ∂σ/∂T at such a point: it does not lead.
fn agree_on_dtemp_causes(increments: &mut [IncrementResult]) {
    let is_dtemp = |d: &crate::diagnose::Diagnosis| {
        d.causes.is_empty()
            && !d.dtemp_causes.is_empty()
            && matches!(d.finding.as_str(), "dtemp-partial" | "start-temperature" | "dtemp")
    };
    let mut counts: Vec<(Cause, usize)> = Vec::new();
    for inc in increments.iter().filter(|i| !i.passed()) {
        let Some(d) = inc.diagnosis.as_ref().filter(|d| is_dtemp(d)) else { continue };
        let mut seen: Vec<Cause> = Vec::new();
        for h in d.dtemp_causes.iter().filter(|h| as_well(h, &d.dtemp_causes)) {
            if h.cause == Cause::UniformScale || seen.contains(&h.cause) {
                continue;
            }
            seen.push(h.cause);
            match counts.iter_mut().find(|(c, _)| *c == h.cause) {
                Some((_, e)) => *e += 1,
                None => counts.push((h.cause, 1)),
            }
        }
    }
    counts.retain(|&(_, e)| e >= 2);
    counts.sort_by_key(|c| std::cmp::Reverse(c.1));
    let Some(&(lead, explained)) = counts.first() else { return };
    for inc in increments.iter_mut() {
        if inc.passed() {
            continue;
        }
        let Some(d) = inc.diagnosis.as_mut().filter(|d| is_dtemp(d)) else { continue };
        if d.finding == dtemp_finding(lead) {
            continue;
        }
        let Some(at) = d.dtemp_causes.iter().position(|h| h.cause == lead && as_well(h, &d.dtemp_causes))
        else {
            continue;
        };
        let own = d.finding.clone();
        let h = d.dtemp_causes.remove(at);
        d.dtemp_causes.insert(0, h);
        d.finding = dtemp_finding(lead).into();
        d.reason = format!(
            "{}; {} is named first as the cause the path agrees on (it explains {explained} failing increments): it \
             explains this one too, where {own} was ranked first on this increment alone",
            d.reason,
            dtemp_finding(lead),
        );
    }
}

/// [`agree_on_causes`] for the causes of a wrong tangent.
fn agree_on_tangent_causes(increments: &mut [IncrementResult], ncomp: usize) {
    let cause_of = |finding: &str| Cause::BY_SPECIFICITY.iter().copied().find(|c| c.name() == finding);
    let rank = |c: Cause| Cause::BY_SPECIFICITY.iter().position(|&x| x == c).unwrap_or(usize::MAX);
    // Per cause: the failing increments it explains, and those that name it first.
    let mut counts: Vec<(Cause, usize, usize)> = Vec::new();
    for inc in increments.iter().filter(|i| !i.passed()) {
        let Some(d) = inc.diagnosis.as_ref() else { continue };
        let Some(first) = cause_of(&d.finding) else { continue };
        let mut seen: Vec<Cause> = Vec::new();
        for h in d.causes.iter().filter(|h| as_well(h, &d.causes)) {
            if seen.contains(&h.cause) {
                continue;
            }
            seen.push(h.cause);
            let named = usize::from(first == h.cause);
            match counts.iter_mut().find(|(c, _, _)| *c == h.cause) {
                Some((_, e, n)) => {
                    *e += 1;
                    *n += named;
                }
                None => counts.push((h.cause, 1, named)),
            }
        }
    }
    let shape = |c: Cause| {
        matches!(
            c,
            Cause::SingleEntry
                | Cause::OneColumn
                | Cause::OneRow
                | Cause::CouplingMissing
                | Cause::TermMissing
                | Cause::TermSign
                | Cause::TermScaled
        )
    };
    counts.retain(|(c, e, _)| {
        *e >= 2
            && !matches!(c, Cause::RankOneTerm | Cause::RankTwo | Cause::UniformScale)
            && !(ncomp == 1 && shape(*c))
    });
    counts.sort_by(|a, b| {
        shape(a.0).cmp(&shape(b.0)).then(b.1.cmp(&a.1)).then(b.2.cmp(&a.2)).then(rank(a.0).cmp(&rank(b.0)))
    });
    let Some(&(lead, explained, _)) = counts.first() else { return };
    for inc in increments.iter_mut() {
        if inc.passed() {
            continue;
        }
        let Some(d) = inc.diagnosis.as_mut() else { continue };
        let Some(own) = cause_of(&d.finding).filter(|c| *c != lead) else { continue };
        let Some(at) = d.causes.iter().position(|h| h.cause == lead && as_well(h, &d.causes)) else {
            continue;
        };
        let h = d.causes.remove(at);
        d.causes.insert(0, h);
        d.finding = lead.name().into();
        d.reason = format!(
            "{}; {} is named first as the cause the path agrees on (it explains {explained} failing increments): it \
             explains this one too, where {} was ranked first on this increment alone",
            d.reason,
            lead.name(),
            own.name()
        );
    }
}
