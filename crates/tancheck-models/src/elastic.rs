//! Linear isotropic elasticity, incremental form σ = σ₀ + C Δε.
//!
//! Properties `[E, ν]`, no state. Kinds and components (default order, engineering shear):
//! solid-3d (11, 22, 33, 23, 13, 12), plane strain and axisymmetric (11, 22, 33, 12), plane
//! stress (11, 22, 12, with C = E/(1−ν²) [[1, ν, 0], [ν, 1, 0], [0, 0, (1−ν)/2]]) and
//! uniaxial (σ = E ε). The stored energy ½ σ·(ε + Δε) is reported (dissipated 0); branch 0.

use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{between, fail, linear_elastic_end, point_model, positive};
use crate::tensor::{isotropic_matrix, lame, SLOTS_4, SLOTS_6};
use crate::ModelError;

/// Linear isotropic elasticity for any solid kind of point.
#[derive(Clone, Debug)]
pub struct Elastic {
    info: RoutineInfo,
    /// `elastic-uncondensed`: a plane-stress tangent left uncondensed (the stress is right).
    uncondensed: bool,
}

impl Elastic {
    /// The model's name in reports and on the command line.
    pub const NAME: &'static str = "elastic";
    /// The zoo's flawed plane-stress variant: the stress of plane stress, the tangent the
    /// in-plane block of the 3D stiffness (λ + 2μ, λ, μ), not condensed for σ33 = 0.
    pub const UNCONDENSED_NAME: &'static str = "elastic-uncondensed";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 2] = ["E", "nu"];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 5] = [
        PointKind::Solid3d,
        PointKind::PlaneStrain,
        PointKind::Axisymmetric,
        PointKind::PlaneStress,
        PointKind::Uniaxial,
    ];

    /// The model for one kind of point, in the default order with engineering shear.
    pub fn new(kind: PointKind) -> Result<Elastic, ModelError> {
        if !Self::KINDS.contains(&kind) {
            return Err(ModelError::UnsupportedKind {
                model: Self::NAME,
                kind,
                supported: "solid-3d, plane-strain, axisymmetric, plane-stress, uniaxial",
            });
        }
        Ok(Elastic {
            info: RoutineInfo {
                name: Self::NAME.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: 0,
                nprop: 2,
            },
            uncondensed: false,
        })
    }

    /// [`Elastic::UNCONDENSED_NAME`]: plane stress only.
    pub fn uncondensed(kind: PointKind) -> Result<Elastic, ModelError> {
        if kind != PointKind::PlaneStress {
            return Err(ModelError::UnsupportedKind {
                model: Self::UNCONDENSED_NAME,
                kind,
                supported: "plane-stress",
            });
        }
        let mut m = Elastic::new(kind)?;
        m.info.name = Self::UNCONDENSED_NAME.to_string();
        m.uncondensed = true;
        Ok(m)
    }

    /// The elastic matrix in the routine's order (the leading n×n block of the result).
    fn matrix<S: Scalar>(&self, e: S, nu: S) -> [[S; 6]; 6] {
        let mut m = [[S::zero(); 6]; 6];
        match self.info.convention.kind() {
            PointKind::Solid3d | PointKind::PlaneStrain | PointKind::Axisymmetric => {
                let (lambda, mu) = lame(e, nu);
                let full = isotropic_matrix(lambda, mu);
                let slots: &[usize] = if self.info.convention.ncomp() == 6 { &SLOTS_6 } else { &SLOTS_4 };
                for (i, &si) in slots.iter().enumerate() {
                    for (j, &sj) in slots.iter().enumerate() {
                        m[i][j] = full[si][sj];
                    }
                }
            }
            PointKind::PlaneStress => {
                let c = e / (S::one() - nu * nu);
                m[0][0] = c;
                m[0][1] = c * nu;
                m[1][0] = c * nu;
                m[1][1] = c;
                m[2][2] = c * (S::one() - nu) * 0.5;
            }
            PointKind::Uniaxial => m[0][0] = e,
            // `new` admits only the kinds above.
            PointKind::Cohesive3d | PointKind::Cohesive2d => unreachable!("elastic: solid kinds only"),
        }
        m
    }
}

point_model!(Elastic, ENERGY);

impl Elastic {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let (e, nu) = (input.props[0], input.props[1]);
        if !positive(e.re()) {
            fail(output, "elastic: E (properties[0]) must be positive");
            return;
        }
        if !between(nu.re(), -1.0, 0.5) {
            fail(output, "elastic: nu (properties[1]) must lie in (-1, 0.5)");
            return;
        }
        let n = self.info.convention.ncomp();
        let m = self.matrix(e, nu);
        // The matrix is already in routine order: the identity slot map picks its n×n block.
        linear_elastic_end(&m, &SLOTS_6[..n], input, output);
        if self.uncondensed {
            // Rows and columns 11, 22, 12 of the 3D stiffness (engineering shear), as a
            // plane-stress routine that forgets the condensation returns them.
            let (lambda, mu) = lame(e, nu);
            let t = &mut *output.tangent;
            t.fill(S::zero());
            for (i, j) in [(0, 0), (1, 1)] {
                t[i + 3 * j] = lambda + mu * 2.0;
            }
            t[1] = lambda;
            t[3] = lambda;
            t[8] = mu;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testing::{run, Point};
    use tancheck_core::routine::{provides, status};
    use tancheck_core::Fault;

    const E: f64 = 200_000.0;
    const NU: f64 = 0.3;

    // Uniaxial stress σ in an isotropic solid has strains ε11 = σ/E, ε22 = ε33 = −νσ/E
    // (Hooke's law, standard isotropic elasticity), and a shear γ12 gives σ12 = G γ12 with
    // G = E/(2(1+ν)) (REFERENCES.md "Relations").
    #[test]
    fn solid_kinds_reproduce_hookes_law() {
        let sigma = 120.0;
        let g = E / (2.0 * (1.0 + NU));
        for kind in [PointKind::Solid3d, PointKind::PlaneStrain, PointKind::Axisymmetric] {
            let m = Elastic::new(kind).unwrap();
            let n = kind.ncomp();
            let mut de = vec![0.0; n];
            de[0] = sigma / E;
            de[1] = -NU * sigma / E;
            de[2] = -NU * sigma / E;
            de[n - 1] = 1e-3; // γ12 is the last component in both orders
            let out = run(&m, &Point::new(&[E, NU], n, 0).dstrain(&de)).unwrap();
            let mut want = vec![0.0; n];
            want[0] = sigma;
            want[n - 1] = g * 1e-3;
            for (i, (s, w)) in out.stress.iter().zip(&want).enumerate() {
                assert!((s - w).abs() < 1e-10, "{kind} σ[{i}] = {s}");
            }
            assert_eq!(out.outcome.branch, 0);
            assert!(out.outcome.provides(provides::ENERGY));
        }
    }

    // Plane stress: the same uniaxial-stress strains (ε11 = σ/E, ε22 = −νσ/E) give
    // σ11 = σ, σ22 = 0, and σ12 = G γ12 (standard plane-stress Hooke's law).
    #[test]
    fn plane_stress_and_uniaxial_reproduce_hookes_law() {
        let sigma = 80.0;
        let g = E / (2.0 * (1.0 + NU));
        let m = Elastic::new(PointKind::PlaneStress).unwrap();
        let de = [sigma / E, -NU * sigma / E, 2e-3];
        let out = run(&m, &Point::new(&[E, NU], 3, 0).dstrain(&de)).unwrap();
        assert!((out.stress[0] - sigma).abs() < 1e-10);
        assert!(out.stress[1].abs() < 1e-10);
        assert!((out.stress[2] - g * 2e-3).abs() < 1e-10);

        let m = Elastic::new(PointKind::Uniaxial).unwrap();
        let out = run(&m, &Point::new(&[E, NU], 1, 0).strain(&[1e-3]).dstrain(&[5e-4]).stress0(&[E * 1e-3]))
            .unwrap();
        assert!((out.stress[0] - E * 1.5e-3).abs() < 1e-10);
        assert_eq!(out.tangent, vec![E]);
        // Stored energy ½ E ε² at ε = 1.5e-3 (linear elasticity).
        assert!((out.energy[0] - 0.5 * E * 1.5e-3 * 1.5e-3).abs() < 1e-12);
        assert_eq!(out.energy[1], 0.0);
    }

    // The stored energy of a pure shear γ: ½ G γ² (linear elasticity, engineering shear
    // makes σ·ε the work-conjugate product).
    #[test]
    fn stored_energy_counts_shear_once() {
        let g = E / (2.0 * (1.0 + NU));
        let m = Elastic::new(PointKind::Solid3d).unwrap();
        let de = [0.0, 0.0, 0.0, 0.0, 0.0, 2e-3];
        let out = run(&m, &Point::new(&[E, NU], 6, 0).dstrain(&de)).unwrap();
        assert!((out.energy[0] - 0.5 * g * 4e-6).abs() < 1e-12);
    }

    #[test]
    fn bad_properties_fail_with_a_message() {
        let m = Elastic::new(PointKind::Solid3d).unwrap();
        for (props, needle) in [([-1.0, 0.3], "E (properties[0])"), ([E, 0.5], "nu"), ([E, f64::NAN], "nu")] {
            let out = run(&m, &Point::new(&props, 6, 0)).unwrap();
            assert_eq!(out.outcome.status, status::FAILED);
            assert!(out.outcome.message_text().contains(needle), "{}", out.outcome.message_text());
            assert!(out.stress.iter().all(|x| x.is_nan()));
        }
        assert!(Elastic::new(PointKind::Cohesive3d).is_err());
        assert!(matches!(
            run(&m, &Point::new(&[E, NU], 4, 0)),
            Err(Fault::Unsupported(msg)) if msg.contains("`strain` has 4 entries")
        ));
    }
}
