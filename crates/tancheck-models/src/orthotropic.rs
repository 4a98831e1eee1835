//! Linear orthotropic elasticity with material axes given as properties, incremental form
//! σ = σ₀ + C Δε.
//!
//! Properties `[E1, E2, E3, ν12, ν13, ν23, G12, G13, G23, a1x, a1y, a1z, a2x, a2y, a2z]`:
//! the engineering constants in the material frame, then the directions of material axes 1
//! and 2 in the global frame. The axes are made orthonormal by Gram–Schmidt
//! (e₁ = a₁/‖a₁‖, e₂ = the part of a₂ normal to e₁, normalised) and e₃ = e₁ × e₂. ν_ij is the
//! contraction in direction j under a uniaxial stress in direction i (ν_ij/E_i = ν_ji/E_j).
//! No state. Kinds: solid-3d (11, 22, 33, 23, 13, 12), and plane strain / axisymmetric
//! (11, 22, 33, 12: the matching rows and columns of the 3D stiffness). Engineering shear.
//!
//! The compliance in the material frame, Voigt order 11, 22, 33, 23, 13, 12 with engineering
//! shear (Jones, Mechanics of Composite Materials, 2nd ed. 1999, ch. 2; from memory):
//!
//! ```text
//! S = [  1/E1   −ν12/E1  −ν13/E1     0       0       0
//!      −ν12/E1    1/E2   −ν23/E2     0       0       0
//!      −ν13/E1  −ν23/E2    1/E3      0       0       0
//!         0        0        0      1/G23     0       0
//!         0        0        0        0     1/G13     0
//!         0        0        0        0       0     1/G12 ]
//! ```
//!
//! The material stiffness S⁻¹ is turned into the global frame as a fourth-order tensor,
//! C_ijkl = R_ia R_jb R_kc R_ld C'_abcd with R = [e₁ e₂ e₃] (the axes as columns), done in
//! Mandel form where the rotation is an orthogonal 6×6 matrix. The stored energy ½ σ·(ε + Δε)
//! is reported (dissipated 0), as for `elastic`; branch 0.

use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{linear_elastic_end, point_model, positive, props_or_fail};
use crate::tensor::{SLOTS_4, SLOTS_6};
use crate::ModelError;

/// Tensor indices (i, j) of the canonical slots 11, 22, 33, 23, 13, 12.
const PAIRS: [(usize, usize); 6] = [(0, 0), (1, 1), (2, 2), (1, 2), (0, 2), (0, 1)];

/// Smallest admitted ‖a₂ − (a₂·e₁)e₁‖/‖a₂‖: below it the two axes count as parallel.
pub const PARALLEL_TOLERANCE: f64 = 1e-8;

/// Linear orthotropic elasticity with material axes among the properties.
#[derive(Clone, Debug)]
pub struct Orthotropic {
    info: RoutineInfo,
    slots: &'static [usize],
}

impl Orthotropic {
    /// The model's name in reports and on the command line.
    pub const NAME: &'static str = "orthotropic";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 15] = [
        "E1", "E2", "E3", "nu12", "nu13", "nu23", "G12", "G13", "G23", "a1x", "a1y", "a1z", "a2x", "a2y",
        "a2z",
    ];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 3] = [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric];

    /// The model for one kind of point, in the default order with engineering shear.
    pub fn new(kind: PointKind) -> Result<Orthotropic, ModelError> {
        let slots: &'static [usize] = match kind {
            PointKind::Solid3d => &SLOTS_6,
            PointKind::PlaneStrain | PointKind::Axisymmetric => &SLOTS_4,
            _ => {
                return Err(ModelError::UnsupportedKind {
                    model: Self::NAME,
                    kind,
                    supported: "solid-3d, plane-strain, axisymmetric",
                })
            }
        };
        Ok(Orthotropic {
            info: RoutineInfo {
                name: Self::NAME.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: 0,
                nprop: Self::PROP_NAMES.len(),
            },
            slots,
        })
    }
}

/// The orthonormal material axes from the properties' a₁ and a₂ by Gram–Schmidt, as the
/// columns of R: `r[i][a]` is the global component i of material axis a (e₃ = e₁ × e₂).
pub fn material_axes<S: Scalar>(props: &[S]) -> Result<[[S; 3]; 3], &'static str> {
    let a1 = [props[9], props[10], props[11]];
    let a2 = [props[12], props[13], props[14]];
    let dot = |x: &[S; 3], y: &[S; 3]| x[0] * y[0] + x[1] * y[1] + x[2] * y[2];
    let finite = a1.iter().chain(&a2).all(|x| x.re().is_finite());
    let n1 = dot(&a1, &a1);
    if !finite || !positive(n1.re()) {
        return Err("orthotropic: axis 1 (properties[9..12]) must be a finite nonzero vector");
    }
    let l1 = n1.sqrt();
    let e1 = [a1[0] / l1, a1[1] / l1, a1[2] / l1];
    let p = dot(&a2, &e1);
    let b = [a2[0] - p * e1[0], a2[1] - p * e1[1], a2[2] - p * e1[2]];
    let nb = dot(&b, &b);
    let n2 = dot(&a2, &a2).re();
    if !positive(nb.re()) || nb.re() <= PARALLEL_TOLERANCE * PARALLEL_TOLERANCE * n2 {
        return Err("orthotropic: axis 2 (properties[12..15]) must be nonzero and not parallel to axis 1");
    }
    let lb = nb.sqrt();
    let e2 = [b[0] / lb, b[1] / lb, b[2] / lb];
    let e3 = [e1[1] * e2[2] - e1[2] * e2[1], e1[2] * e2[0] - e1[0] * e2[2], e1[0] * e2[1] - e1[1] * e2[0]];
    let mut r = [[S::zero(); 3]; 3];
    for i in 0..3 {
        r[i] = [e1[i], e2[i], e3[i]];
    }
    Ok(r)
}

/// The stiffness in the material frame, canonical Voigt order with engineering-shear
/// columns: the inverse of the compliance of the module docs. The message names what is
/// wrong with the constants.
pub fn material_stiffness<S: Scalar>(props: &[S]) -> Result<[[S; 6]; 6], &'static str> {
    let (e1, e2, e3) = (props[0], props[1], props[2]);
    let (nu12, nu13, nu23) = (props[3], props[4], props[5]);
    let (g12, g13, g23) = (props[6], props[7], props[8]);
    if ![e1, e2, e3, g12, g13, g23].iter().all(|x| positive(x.re()) && x.re().is_finite()) {
        return Err(
            "orthotropic: E1, E2, E3, G12, G13, G23 (properties[0..3], properties[6..9]) must be positive",
        );
    }
    if ![nu12, nu13, nu23].iter().all(|x| x.re().is_finite()) {
        return Err("orthotropic: nu12, nu13, nu23 (properties[3..6]) must be finite");
    }
    // Normal block of the compliance (symmetric: ν_ij/E_i = ν_ji/E_j).
    let s11 = S::one() / e1;
    let s22 = S::one() / e2;
    let s33 = S::one() / e3;
    let s12 = -nu12 / e1;
    let s13 = -nu13 / e1;
    let s23 = -nu23 / e2;
    // Cofactors; the block is positive definite when its leading minors are (Sylvester).
    let c11 = s22 * s33 - s23 * s23;
    let c12 = s13 * s23 - s12 * s33;
    let c13 = s12 * s23 - s13 * s22;
    let c22 = s11 * s33 - s13 * s13;
    let c23 = s12 * s13 - s11 * s23;
    let c33 = s11 * s22 - s12 * s12;
    let det = s11 * c11 + s12 * c12 + s13 * c13;
    if !(positive(c33.re()) && positive(det.re())) {
        return Err("orthotropic: the compliance is not positive definite (check the Poisson ratios \
                    against the moduli)");
    }
    let mut c = [[S::zero(); 6]; 6];
    c[0][0] = c11 / det;
    c[1][1] = c22 / det;
    c[2][2] = c33 / det;
    c[0][1] = c12 / det;
    c[1][0] = c12 / det;
    c[0][2] = c13 / det;
    c[2][0] = c13 / det;
    c[1][2] = c23 / det;
    c[2][1] = c23 / det;
    c[3][3] = g23;
    c[4][4] = g13;
    c[5][5] = g12;
    Ok(c)
}

/// Mandel weight of a canonical slot: 1 for a normal component, √2 for a shear one.
#[inline]
fn weight(slot: usize) -> f64 {
    if slot < 3 {
        1.0
    } else {
        std::f64::consts::SQRT_2
    }
}

/// The 6×6 Mandel form of the rotation σ ↦ R σ Rᵀ of symmetric tensors: with I = (i, j) and
/// K = (k, l), Q_IK = (w_I/w_K)(R_ik R_jl + [k ≠ l] R_il R_jk). Q is orthogonal.
pub(crate) fn mandel_rotation<S: Scalar>(r: &[[S; 3]; 3]) -> [[S; 6]; 6] {
    let mut q = [[S::zero(); 6]; 6];
    for (big_i, &(i, j)) in PAIRS.iter().enumerate() {
        for (big_k, &(k, l)) in PAIRS.iter().enumerate() {
            let mut v = r[i][k] * r[j][l];
            if k != l {
                v += r[i][l] * r[j][k];
            }
            q[big_i][big_k] = v * (weight(big_i) / weight(big_k));
        }
    }
    q
}

/// The global stiffness in canonical Voigt order with engineering-shear columns (σ = C γ):
/// the material stiffness turned by the material axes of the properties.
pub fn global_stiffness<S: Scalar>(props: &[S]) -> Result<[[S; 6]; 6], &'static str> {
    let c_mat = material_stiffness(props)?;
    let r = material_axes(props)?;
    let q = mandel_rotation(&r);
    // Mandel form of the material stiffness: C^M_IJ = w_I C_IJ w_J.
    let mut cm = [[S::zero(); 6]; 6];
    for a in 0..6 {
        for b in 0..6 {
            cm[a][b] = c_mat[a][b] * (weight(a) * weight(b));
        }
    }
    // Q C^M Qᵀ, then back to Voigt with engineering shear.
    let mut qc = [[S::zero(); 6]; 6];
    for a in 0..6 {
        for b in 0..6 {
            let mut s = S::zero();
            for k in 0..6 {
                s += q[a][k] * cm[k][b];
            }
            qc[a][b] = s;
        }
    }
    let mut c = [[S::zero(); 6]; 6];
    for a in 0..6 {
        for b in 0..6 {
            let mut s = S::zero();
            for k in 0..6 {
                s += qc[a][k] * q[b][k];
            }
            c[a][b] = s / (weight(a) * weight(b));
        }
    }
    Ok(c)
}

point_model!(Orthotropic, ENERGY);

impl Orthotropic {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let Some(c) = props_or_fail(output, global_stiffness(input.props)) else {
            return;
        };
        linear_elastic_end(&c, self.slots, input, output);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Q is orthogonal for a rotation (Mandel form preserves the Frobenius norm); checked for
    // a rotation about a skew axis built from two arbitrary vectors.
    #[test]
    fn mandel_rotation_is_orthogonal() {
        let mut props = [0.0; 15];
        props[9..15].copy_from_slice(&[0.3, -1.2, 0.7, 2.0, 0.1, -0.4]);
        let r = material_axes(&props).unwrap();
        let q = mandel_rotation(&r);
        for a in 0..6 {
            for b in 0..6 {
                let s: f64 = (0..6).map(|k| q[a][k] * q[b][k]).sum();
                let want = if a == b { 1.0 } else { 0.0 };
                assert!((s - want).abs() < 1e-14, "QQᵀ[{a}][{b}] = {s}");
            }
        }
    }
}
