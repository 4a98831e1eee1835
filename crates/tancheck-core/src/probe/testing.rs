//! Test support shared by the probes' unit tests: isotropic elasticity written in any
//! convention, the stiffness the conventions and stability probes read.

use crate::convention::{Convention, ShearMeasure};

/// Isotropic elasticity in a convention's order and shear measure, column-major:
/// C = λ 1⊗1 + 2μ I_sym (the shear diagonal is μ with engineering shear, 2μ with tensor shear).
pub(crate) fn isotropic(conv: &Convention, lambda: f64, mu: f64) -> Vec<f64> {
    let n = conv.ncomp();
    let mut t = vec![0.0; n * n];
    for (i, ci) in conv.order().iter().enumerate() {
        for (j, cj) in conv.order().iter().enumerate() {
            t[i + j * n] = match (ci.is_shear(), cj.is_shear()) {
                (false, false) => lambda + if i == j { 2.0 * mu } else { 0.0 },
                (true, true) if i == j => match conv.shear() {
                    ShearMeasure::Engineering => mu,
                    ShearMeasure::Tensor => 2.0 * mu,
                },
                _ => 0.0,
            };
        }
    }
    t
}
