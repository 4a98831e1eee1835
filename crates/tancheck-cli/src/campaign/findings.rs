//! The findings a campaign file may expect (`routines[].expect_finding`): every finding a
//! point, block or finite-strain check gives, and the names of the probes (a probe item's
//! finding), with the nearest one for a misspelt word.

/// `Ok` for a finding some check or probe can give; else the nearest known finding, if any:
/// written with underscores, or one or two letters off (an expectation that can never hold
/// ran the whole campaign and read "not as expected"; a user-style sweep).
pub(super) fn finding_check(f: &str) -> Result<(), Option<&'static str>> {
    // Findings of every family: a point check's (its causes and these), a block check's, a
    // finite-strain check's, and a probe item's (a probe's name).
    const OTHERS: [&str; 11] = [
        "none",
        "routine-fault",
        "non-finite-output",
        "non-finite-derivative",
        "unsettled-update",
        "twin-not-complex-step-safe",
        "kink-neither-side",
        "dtemp",
        "dtemp-partial",
        "unexplained",
        "undiagnosed",
    ];
    const BLOCK: [&str; 21] = [
        "counterpart-mismatch",
        "counterpart-sizes",
        "counterpart-tangent",
        "damage-decreases",
        "deleted-point-not-finite",
        "deleted-point-revived",
        "deleted-point-stress",
        "dissipation-decreases",
        "elastic-response-mismatch",
        "elastic-response-updates",
        "energy-work-mismatch",
        "history-dependence",
        "negative-stiffness",
        "non-finite-stiffness",
        "point-dependence",
        "rate-law",
        "refinement-order",
        "stiffer-than-elastic",
        "stored-energy-negative",
        "zero-rate-not-finite",
        "twin-not-complex-step-safe",
    ];
    const FINITE: [&str; 11] = [
        "material-as-spatial",
        "spatial-as-material",
        "other-rate",
        "rate-terms-scaled",
        "shear-factor",
        "transposed",
        "row-major",
        "geometric-terms-missing",
        "missing-over-j",
        "extra-over-j",
        "stress-measure",
    ];
    let probes: Vec<&'static str> = tancheck_core::probe::registry().iter().map(|p| p.name()).collect();
    let known = || {
        tancheck_core::diagnose::Cause::BY_SPECIFICITY
            .iter()
            .map(|c| c.name())
            .chain(OTHERS.iter().copied())
            .chain(BLOCK.iter().copied())
            .chain(FINITE.iter().copied())
            .chain(probes.iter().copied())
    };
    if known().any(|k| k == f) {
        return Ok(());
    }
    let hyphens = f.replace('_', "-").to_lowercase();
    Err(known().find(|&k| k == hyphens || distance(k, f) <= 2))
}

/// Levenshtein distance of two short words.
fn distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut prev = row[0];
        row[0] = i + 1;
        for (j, &cb) in b.iter().enumerate() {
            let here = row[j + 1];
            row[j + 1] = (prev + usize::from(ca != cb)).min(row[j] + 1).min(row[j + 1] + 1);
            prev = here;
        }
    }
    row[b.len()]
}
