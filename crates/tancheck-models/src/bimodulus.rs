//! Bimodulus elasticity: a different normal stiffness of the 11 component in tension and in
//! compression. A correct routine with a kink, and a flawed twin that returns a blend of the
//! two sides at the kink.
//!
//! Properties `[E_t, E_c, ν]`, no state. Total form (`stress0` is not read), with
//! ε = strain + dstrain at the end of the increment:
//!
//! - uniaxial (11): σ = E_t ε when ε ≥ 0, σ = E_c ε when ε < 0;
//! - solid-3d (11, 22, 33, 23, 13, 12, engineering shear): σ = C_t ε + (E_c − E_t) min(ε11, 0) e₁₁,
//!   with C_t the isotropic matrix of E_t and ν. The compression stiffness is
//!   C_c = C_t + (E_c − E_t) e₁₁⊗e₁₁, which differs from C_t only in its 11–11 entry; scaling
//!   the whole isotropic matrix by E_c/E_t instead would make σ jump at ε11 = 0 whenever the
//!   other strains are not zero. In uniaxial stress (σ22 = σ33 = 0) the 11 modulus is E_t in
//!   tension and E_t + (E_c − E_t) = E_c in compression: the rank-one change adds its full
//!   size to the uniaxial modulus 1/(C⁻¹)₁₁ = E_t.
//!
//! The stress is continuous and piecewise linear, with a kink at ε11 = 0. It derives from the
//! stored energy W = ½ ε·C_t ε + ½ (E_c − E_t) min(ε11, 0)², which is reported
//! (W = ½ σ·ε, dissipated 0). C_c is positive definite when E_c > 0:
//! det C_c = det C_t (1 + (E_c − E_t)/E_t).
//!
//! Branch 0 is tension (ε11 ≥ 0, the tension side also at ε11 = 0 exactly), branch 1
//! compression. The tangent [`Bimodulus::new`] returns is that of the branch: at ε11 = 0 the
//! derivative from the tension side. [`Bimodulus::average`] (`bimodulus-average`) returns
//! C_t + ½ (E_c − E_t) e₁₁⊗e₁₁ at ε11 = 0 exactly, a tangent neither one-sided derivative
//! has, and the correct one elsewhere.

use tancheck_core::routine::provides;
use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{between, fail, point_model, positive, succeed};
use crate::tensor::{isotropic_matrix, lame, write_tangent, SLOTS_6};
use crate::ModelError;

/// Elasticity with a tension and a compression modulus of the 11 component.
#[derive(Clone, Debug)]
pub struct Bimodulus {
    info: RoutineInfo,
    average_at_kink: bool,
}

impl Bimodulus {
    /// Name of the correct model.
    pub const NAME: &'static str = "bimodulus";
    /// Name of the model flawed at the kink.
    pub const AVERAGE_NAME: &'static str = "bimodulus-average";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 3] = ["E_t", "E_c", "nu"];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 2] = [PointKind::Solid3d, PointKind::Uniaxial];

    /// The correct model: at ε11 = 0 the tangent of the tension side.
    pub fn new(kind: PointKind) -> Result<Bimodulus, ModelError> {
        Bimodulus::build(kind, false)
    }

    /// The flawed model `bimodulus-average`: at ε11 = 0 exactly, the mean of the two sides'
    /// tangents.
    pub fn average(kind: PointKind) -> Result<Bimodulus, ModelError> {
        Bimodulus::build(kind, true)
    }

    fn build(kind: PointKind, average_at_kink: bool) -> Result<Bimodulus, ModelError> {
        let name = if average_at_kink { Self::AVERAGE_NAME } else { Self::NAME };
        if !Self::KINDS.contains(&kind) {
            return Err(ModelError::UnsupportedKind { model: name, kind, supported: "solid-3d, uniaxial" });
        }
        Ok(Bimodulus {
            info: RoutineInfo {
                name: name.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: 0,
                nprop: 3,
            },
            average_at_kink,
        })
    }

    /// Whether this is the flawed `bimodulus-average`.
    pub fn averages_at_kink(&self) -> bool {
        self.average_at_kink
    }
}

point_model!(Bimodulus, ENERGY);

impl Bimodulus {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let (e_t, e_c, nu) = (input.props[0], input.props[1], input.props[2]);
        if !positive(e_t.re()) {
            fail(output, "bimodulus: E_t (properties[0]) must be positive");
            return;
        }
        if !positive(e_c.re()) {
            fail(output, "bimodulus: E_c (properties[1]) must be positive");
            return;
        }
        if !between(nu.re(), -1.0, 0.5) {
            fail(output, "bimodulus: nu (properties[2]) must lie in (-1, 0.5)");
            return;
        }
        let n = self.info.convention.ncomp();
        let mut eps = [S::zero(); 6];
        for (e, (a, d)) in eps.iter_mut().zip(input.strain.iter().zip(input.dstrain)) {
            *e = *a + *d;
        }
        // The tension matrix C_t in routine order (the 6-component order is canonical).
        let mut c = [[S::zero(); 6]; 6];
        if n == 1 {
            c[0][0] = e_t;
        } else {
            let (lambda, mu) = lame(e_t, nu);
            c = isotropic_matrix(lambda, mu);
        }
        let jump = e_c - e_t;
        let e11 = eps[0].re();
        let compression = e11 < 0.0;
        let mut stored = S::zero();
        for (i, row) in c.iter().take(n).enumerate() {
            let mut s = S::zero();
            for (cij, ej) in row.iter().zip(&eps[..n]) {
                s += *cij * *ej;
            }
            if i == 0 && compression {
                s += jump * eps[0];
            }
            output.stress[i] = s;
            stored += s * eps[i];
        }
        // The matrix is in routine order: the identity slot map picks its n×n block.
        write_tangent(&c, &SLOTS_6[..n], output.tangent);
        if compression {
            output.tangent[0] += jump;
        } else if self.average_at_kink && e11 == 0.0 {
            output.tangent[0] += jump * 0.5;
        }
        output.dstress_dtemp.fill(S::zero());
        output.energy[0] = stored * 0.5;
        output.energy[1] = S::zero();
        succeed(output, i32::from(compression), provides::ENERGY);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testing::{run, Point};
    use tancheck_core::routine::status;

    // Uniaxial: σ = E_t ε in tension, E_c ε in compression (the model's definition, a
    // bimodulus Hooke's law); the stored energy ½ E ε² of the side (linear elasticity).
    #[test]
    fn uniaxial_follows_the_side_of_the_strain() {
        let m = Bimodulus::new(PointKind::Uniaxial).unwrap();
        let props = [200_000.0, 50_000.0, 0.3];
        for (eps, e, branch) in [(1e-3, 200_000.0, 0), (-1e-3, 50_000.0, 1), (0.0, 200_000.0, 0)] {
            let out = run(&m, &Point::new(&props, 1, 0).strain(&[eps / 2.0]).dstrain(&[eps / 2.0])).unwrap();
            assert_eq!(out.outcome.branch, branch);
            assert!((out.stress[0] - e * eps).abs() <= 1e-12);
            assert_eq!(out.tangent, vec![e]);
            assert!((out.energy[0] - 0.5 * e * eps * eps).abs() <= 1e-15);
        }
        let avg = Bimodulus::average(PointKind::Uniaxial).unwrap();
        let out = run(&avg, &Point::new(&props, 1, 0)).unwrap();
        assert_eq!(out.tangent, vec![125_000.0]);
        let out = run(&avg, &Point::new(&props, 1, 0).dstrain(&[-1e-9])).unwrap();
        assert_eq!(out.tangent, vec![50_000.0]);
    }

    #[test]
    fn bad_properties_and_kinds_are_refused() {
        let m = Bimodulus::new(PointKind::Solid3d).unwrap();
        for (props, needle) in [([1.0, 0.0, 0.3], "E_c"), ([0.0, 1.0, 0.3], "E_t"), ([1.0, 1.0, 0.5], "nu")] {
            let out = run(&m, &Point::new(&props, 6, 0)).unwrap();
            assert_eq!(out.outcome.status, status::FAILED);
            assert!(out.outcome.message_text().contains(needle), "{}", out.outcome.message_text());
        }
        assert!(Bimodulus::new(PointKind::PlaneStress).is_err());
        assert!(Bimodulus::average(PointKind::Cohesive2d).is_err());
    }
}
