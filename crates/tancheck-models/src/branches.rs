//! The branch vocabulary of the built-in models: the ids each model reports in
//! `tc_report.branch` and what they mean, so that `tancheck explore` can say which branches
//! no path reached. The ids are those the models' documentation gives (DEVELOPERS.md,
//! "Reference models").

use crate::{cohesive, ply};

const J2: &[(i32, &str)] = &[(0, "elastic"), (1, "plastic")];
const ELASTIC: &[(i32, &str)] = &[(0, "elastic")];
const BIMODULUS: &[(i32, &str)] = &[(0, "tension"), (1, "compression")];
const COHESIVE: &[(i32, &str)] = &[
    (cohesive::branch::ELASTIC, "undamaged"),
    (cohesive::branch::GROWTH, "damage growth"),
    (cohesive::branch::UNLOADING, "unloading or reloading with damage"),
    (cohesive::branch::CLOSED, "closed"),
    (cohesive::branch::FAILED, "failed"),
];
const PLY: &[(i32, &str)] = &[
    (ply::branch::ELASTIC, "undamaged"),
    (ply::branch::GROWTH, "damage growth"),
    (ply::branch::DAMAGED, "damaged, no growth"),
    (ply::branch::FAILED, "a mode fully damaged"),
];

/// The branches the built-in model `name` (a zoo row or a reference model) reports, or None
/// for a name this table does not know.
pub fn branch_vocabulary(name: &str) -> Option<&'static [(i32, &'static str)]> {
    let v = if name.starts_with("j2") || name.starts_with("twin-") || name.starts_with("johnson-cook") {
        J2
    } else if name.starts_with("cohesive") {
        COHESIVE
    } else if name.starts_with("ply") {
        PLY
    } else if name.starts_with("bimodulus") {
        BIMODULUS
    } else if name.starts_with("elastic") || name.starts_with("thermo") || name.starts_with("orthotropic") {
        ELASTIC
    } else {
        return None;
    };
    Some(v)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_zoo_row_has_a_vocabulary() {
        for e in crate::zoo::zoo() {
            assert!(branch_vocabulary(e.name).is_some(), "{}", e.name);
        }
        assert_eq!(branch_vocabulary("j2-reversal"), Some(J2));
        assert_eq!(branch_vocabulary("nope"), None);
    }
}
