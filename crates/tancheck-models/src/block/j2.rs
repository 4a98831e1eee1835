//! J2 plasticity with linear kinematic hardening as a block routine: the point update of
//! [`crate::J2`] (radial return, Simo & Taylor 1985) for every point, with the specific
//! energies of an explicit solver. Properties and state as the point model's (DEVELOPERS.md:
//! `[E, ν, σy0, H_iso, Q, b, H_kin]`, state `[εp, α, β]`); internal energy by the trapezoid
//! rule, dissipation σy0 Δα / ρ (the dissipation of associative J2 flow); never deleted.
//!
//! The flawed variants ([`BlockFlaw`]) of the selftest zoo keep everything else.

use tancheck_core::block::BlockInfo;
use tancheck_core::routine::status;
use tancheck_core::{Fault, Model, PointKind, Scalar};

use super::{elastic_response, fail_point, point_update, trapezoid_work, At, PointBlock};
use crate::{ModelError, J2};

/// Deliberate mistakes of the zoo's block rows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BlockFlaw {
    None,
    /// Point p starts from the state of point p + 1 (the last point from its own).
    NeighbourState,
    /// Internal energy from the old stress only: σ_start·Δε/ρ.
    OldStressEnergy,
    /// Dissipation added with the wrong sign.
    DissipationSign,
    /// The back stress from the total plastic strain instead of its increment:
    /// β = β_n + ⅔H_kin εp_{n+1} (a total-for-increment slip); the error grows with the number
    /// of increments, so halving them does not converge (`refinement-order`).
    TotalBackStress,
    /// The plastic corrector added instead of subtracted: σ = 2σ_trial − σ_return, stiffer
    /// than elastic while yielding (`stiffer-than-elastic`, the stable time increment
    /// collapses).
    CorrectorSign,
    /// The plastic corrector applied twice: σ = 2σ_return − σ_trial, a negative stiffness
    /// while yielding in a model that declares no softening (`negative-stiffness`).
    DoubleCorrection,
    /// Not a flaw: the internal energy by the midpoint rule, σ(Δε/2)·Δε/ρ with the stress of
    /// the point update over half the increment from the same start (checked with the
    /// midpoint rule; the trapezoid-rule rows are caught by it and the other way round).
    Midpoint,
}

/// The J2 block model.
pub type J2Block = PointBlock<J2, BlockFlaw>;

impl J2Block {
    pub const NAME: &'static str = "j2-block";
    pub const NEIGHBOUR_NAME: &'static str = "j2-block-neighbour-state";
    pub const OLD_STRESS_ENERGY_NAME: &'static str = "j2-block-old-stress-energy";
    pub const DISSIPATION_SIGN_NAME: &'static str = "j2-block-dissipation-sign";
    pub const TOTAL_BACK_STRESS_NAME: &'static str = "j2-block-total-back-stress";
    pub const CORRECTOR_SIGN_NAME: &'static str = "j2-block-corrector-sign";
    pub const DOUBLE_CORRECTION_NAME: &'static str = "j2-block-double-correction";
    pub const MIDPOINT_NAME: &'static str = "j2-block-midpoint";

    pub fn new(kind: PointKind) -> Result<J2Block, ModelError> {
        J2Block::with_flaw(kind, BlockFlaw::None)
    }

    pub fn with_flaw(kind: PointKind, flaw: BlockFlaw) -> Result<J2Block, ModelError> {
        let point = J2::new(kind)?;
        let i = point.info();
        let name = match flaw {
            BlockFlaw::None => J2Block::NAME,
            BlockFlaw::NeighbourState => J2Block::NEIGHBOUR_NAME,
            BlockFlaw::OldStressEnergy => J2Block::OLD_STRESS_ENERGY_NAME,
            BlockFlaw::DissipationSign => J2Block::DISSIPATION_SIGN_NAME,
            BlockFlaw::TotalBackStress => J2Block::TOTAL_BACK_STRESS_NAME,
            BlockFlaw::CorrectorSign => J2Block::CORRECTOR_SIGN_NAME,
            BlockFlaw::DoubleCorrection => J2Block::DOUBLE_CORRECTION_NAME,
            BlockFlaw::Midpoint => J2Block::MIDPOINT_NAME,
        };
        let info = BlockInfo {
            name: name.into(),
            ncomp: i.convention.ncomp(),
            nstate: i.nstate,
            nproperties: i.nprop,
        };
        Ok(J2Block { point, info, flaw })
    }

    /// The block model called `name`, or `None`.
    pub fn by_name(name: &str, kind: PointKind) -> Option<Result<J2Block, ModelError>> {
        let flaw = match name {
            J2Block::NAME => BlockFlaw::None,
            J2Block::NEIGHBOUR_NAME => BlockFlaw::NeighbourState,
            J2Block::OLD_STRESS_ENERGY_NAME => BlockFlaw::OldStressEnergy,
            J2Block::DISSIPATION_SIGN_NAME => BlockFlaw::DissipationSign,
            J2Block::TOTAL_BACK_STRESS_NAME => BlockFlaw::TotalBackStress,
            J2Block::CORRECTOR_SIGN_NAME => BlockFlaw::CorrectorSign,
            J2Block::DOUBLE_CORRECTION_NAME => BlockFlaw::DoubleCorrection,
            J2Block::MIDPOINT_NAME => BlockFlaw::Midpoint,
            _ => return None,
        };
        Some(J2Block::with_flaw(kind, flaw))
    }
}

block_model!(J2Block);

impl J2Block {
    /// One point of a call (see `block_model!` in the block module).
    fn point<S: Scalar>(&self, at: At<'_, '_, '_, S>) -> Result<bool, Fault> {
        let At { input, output, p, c, s } = at;
        let (n, ns) = (self.info.ncomp, self.info.nstate);
        let np = input.npoints();
        let props = input.properties;
        output.deleted[p] = 0;
        if input.elastic_response {
            elastic_response(
                props[0],
                props[1],
                &input.stress_start[c.clone()],
                &input.strain_increment[c.clone()],
                &mut output.stress[c],
            );
            output.state[s.clone()].copy_from_slice(&input.state_start[s]);
            output.energy[p] = input.energy_start[p];
            return Ok(true);
        }
        let from = if self.flaw == BlockFlaw::NeighbourState && p + 1 < np { p + 1 } else { p };
        let state0 = &input.state_start[from * ns..(from + 1) * ns];
        let t = input.conditions[p];
        let de = &input.strain_increment[c.clone()];
        let outcome = point_update(
            &self.point,
            props,
            input,
            p,
            de,
            input.time_increment,
            state0,
            &mut output.stress[c.clone()],
            &mut output.state[s.clone()],
        )?;
        if outcome.status != status::OK {
            fail_point(output, p, "j2-block: the point update failed");
            return Ok(false);
        }
        let s0 = &input.stress_start[c.clone()];
        match self.flaw {
            BlockFlaw::TotalBackStress => {
                // β_n + ⅔H_kin εp_{n+1} = the return's β + ⅔H_kin εp_n.
                for i in 0..n {
                    let eps_p_n = input.state_start[p * ns + i];
                    output.state[p * ns + n + 1 + i] += props[6] * (2.0 / 3.0) * eps_p_n;
                }
            }
            BlockFlaw::CorrectorSign | BlockFlaw::DoubleCorrection => {
                let mut trial = [S::zero(); 6];
                elastic_response(props[0], props[1], s0, de, &mut trial[..n]);
                for (x, t) in output.stress[c.clone()].iter_mut().zip(trial) {
                    *x = if self.flaw == BlockFlaw::CorrectorSign { t * 2.0 - *x } else { *x * 2.0 - t };
                }
            }
            _ => {}
        }
        let rho = t.density;
        let old = input.energy_start[p];
        let work = match self.flaw {
            BlockFlaw::OldStressEnergy => {
                let mut w = S::zero();
                for i in 0..n {
                    w += s0[i] * de[i];
                }
                w / rho
            }
            BlockFlaw::Midpoint => {
                // The point update over half the increment from the same start.
                let mut half_de = [S::zero(); 6];
                for (h, &d) in half_de.iter_mut().zip(de) {
                    *h = d * 0.5;
                }
                let mut half = [S::zero(); 6];
                let mut half_state = [S::zero(); 13];
                point_update(
                    &self.point,
                    props,
                    input,
                    p,
                    &half_de[..n],
                    0.5 * input.time_increment,
                    &input.state_start[s.clone()],
                    &mut half[..n],
                    &mut half_state[..ns],
                )?;
                let mut w = S::zero();
                for i in 0..n {
                    w += half[i] * de[i];
                }
                w / rho
            }
            _ => trapezoid_work(s0, &output.stress[c.clone()], de, rho),
        };
        // Dissipation σy0 Δα / ρ (α is state entry n).
        let dalpha = output.state[p * ns + n] - input.state_start[p * ns + n];
        let mut dissipation = props[2] * dalpha / rho;
        if self.flaw == BlockFlaw::DissipationSign {
            dissipation = -dissipation;
        }
        output.energy[p].internal = old.internal + work;
        output.energy[p].dissipated = old.dissipated + dissipation;
        Ok(true)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::block::worked::{j2_path, j2_settings, J2_PROPS};
    use tancheck_core::block::{BlockModelRoutine, EnergyRule};

    fn check_with(flaw: BlockFlaw, rule: EnergyRule) -> tancheck_core::block::BlockReport {
        let mut r = BlockModelRoutine(J2Block::with_flaw(PointKind::Solid3d, flaw).unwrap());
        tancheck_core::block::run(&mut r, &J2_PROPS, &j2_path(), &j2_settings(rule)).unwrap()
    }

    fn check(flaw: BlockFlaw) -> tancheck_core::block::BlockReport {
        check_with(flaw, EnergyRule::Trapezoid)
    }

    #[test]
    fn the_correct_block_passes_and_its_wave_speed_is_the_elastic_one() {
        let r = check(BlockFlaw::None);
        assert!(r.passed(), "{:#?}", r.findings);
        // c_d = sqrt((λ + 2μ)/ρ): λ + 2μ = E(1−ν)/((1+ν)(1−2ν)) = 269230.77 MPa for E 200 GPa,
        // ν 0.3 (REFERENCES.md, explicit dynamics: Belytschko, Liu & Moran 2000, from memory).
        let m = 200_000.0 * 0.7 / (1.3 * 0.4);
        assert!(
            (r.elastic.dilatational_modulus / m - 1.0).abs() < 1e-9,
            "{}",
            r.elastic.dilatational_modulus
        );
        let c = (m / 7.85e-9_f64).sqrt();
        assert!((r.elastic.wave_speed / c - 1.0).abs() < 1e-9);
        assert!((r.elastic.stable_time_increment - 2.0 / c).abs() < 1e-12 * 2.0 / c);
        // After yield the effective modulus falls below the elastic one.
        let last = r.increments.iter().map(|i| i.effective_modulus).fold(f64::INFINITY, f64::min);
        assert!(last < m * 0.99, "{last}");
    }

    #[test]
    fn each_flaw_is_caught_with_its_finding() {
        for (flaw, finding) in [
            (BlockFlaw::NeighbourState, "point-dependence"),
            (BlockFlaw::OldStressEnergy, "energy-work-mismatch"),
            (BlockFlaw::DissipationSign, "dissipation-decreases"),
            (BlockFlaw::TotalBackStress, "refinement-order"),
            (BlockFlaw::CorrectorSign, "stiffer-than-elastic"),
            (BlockFlaw::DoubleCorrection, "negative-stiffness"),
        ] {
            let r = check(flaw);
            assert_eq!(r.finding(), finding, "{flaw:?}: {:#?}", r.findings);
        }
    }

    #[test]
    fn each_energy_rule_passes_its_own_routine_and_catches_the_other() {
        // σ(Δε/2)·Δε and ½(σ_n + σ_{n+1})·Δε differ by O(Δε³) per increment where the
        // stress-strain curve bends (the midpoint and trapezoid rules' errors have opposite
        // signs, e.g. Süli & Mayers 2003, ch. 7; from memory): at yield they differ by far more
        // than the check's tolerance.
        assert!(check_with(BlockFlaw::Midpoint, EnergyRule::Midpoint).passed());
        assert!(check_with(BlockFlaw::None, EnergyRule::Trapezoid).passed());
        for (flaw, rule) in [
            (BlockFlaw::None, EnergyRule::Midpoint),
            (BlockFlaw::Midpoint, EnergyRule::Trapezoid),
            (BlockFlaw::OldStressEnergy, EnergyRule::Midpoint),
        ] {
            let r = check_with(flaw, rule);
            assert_eq!(r.finding(), "energy-work-mismatch", "{flaw:?} by {rule:?}: {:#?}", r.findings);
        }
    }
}
