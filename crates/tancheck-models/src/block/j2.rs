//! J2 plasticity with linear kinematic hardening as a block routine: the point update of
//! [`crate::J2`] (radial return, Simo & Taylor 1985) for every point, with the specific
//! energies of an explicit solver. Properties and state as the point model's (DEVELOPERS.md:
//! `[E, ν, σy0, H_iso, Q, b, H_kin]`, state `[εp, α, β]`); internal energy by the trapezoid
//! rule, dissipation σy0 Δα / ρ (the dissipation of associative J2 flow); never deleted.
//!
//! The flawed variants ([`BlockFlaw`]) of the selftest zoo keep everything else.

use tancheck_core::block::{block_status, BlockInfo, BlockInput, BlockModel, BlockOutput};
use tancheck_core::routine::status;
use tancheck_core::{CallInput, CallOutput, Fault, Model, Outcome, PointKind, Scalar};

use super::{elastic_response, trapezoid_work};
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
}

/// The J2 block model.
#[derive(Clone, Debug)]
pub struct J2Block {
    point: J2,
    info: BlockInfo,
    flaw: BlockFlaw,
}

impl J2Block {
    pub const NAME: &'static str = "j2-block";
    pub const NEIGHBOUR_NAME: &'static str = "j2-block-neighbour-state";
    pub const OLD_STRESS_ENERGY_NAME: &'static str = "j2-block-old-stress-energy";
    pub const DISSIPATION_SIGN_NAME: &'static str = "j2-block-dissipation-sign";

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
            _ => return None,
        };
        Some(J2Block::with_flaw(kind, flaw))
    }
}

fn fail_point<S>(output: &mut BlockOutput<'_, S>, p: usize, message: &str) {
    output.outcome.status = block_status::FAILED;
    output.outcome.point = p as i32;
    output.outcome.set_message(message);
}

impl BlockModel for J2Block {
    fn info(&self) -> &BlockInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &BlockInput<'_, S>,
        output: &mut BlockOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (n, ns) = (self.info.ncomp, self.info.nstate);
        let np = input.npoints();
        let props = input.properties;
        let mut tangent = [S::zero(); 36];
        let mut dsdt = [S::zero(); 6];
        let mut energy = [S::zero(); 2];
        for p in 0..np {
            let c = p * n..(p + 1) * n;
            let s = p * ns..(p + 1) * ns;
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
                continue;
            }
            let from = if self.flaw == BlockFlaw::NeighbourState && p + 1 < np { p + 1 } else { p };
            let state0 = &input.state_start[from * ns..(from + 1) * ns];
            let t = input.conditions[p];
            let mut outcome = Outcome::default();
            let point_in = CallInput {
                props,
                strain: &input.strain[c.clone()],
                dstrain: &input.strain_increment[c.clone()],
                temp: [S::cst(t.temperature), S::cst(t.temperature_increment)],
                stress0: &input.stress_start[c.clone()],
                state0,
                time: [input.time, input.time_increment],
                increment: input.increment,
                want_tangent: false,
            };
            let mut point_out = CallOutput {
                stress: &mut output.stress[c.clone()],
                state: &mut output.state[s.clone()],
                tangent: &mut tangent[..n * n],
                dstress_dtemp: &mut dsdt[..n],
                energy: &mut energy,
                outcome: &mut outcome,
            };
            self.point.evaluate(&point_in, &mut point_out)?;
            if outcome.status != status::OK {
                fail_point(output, p, "j2-block: the point update failed");
                return Ok(());
            }
            let rho = t.density;
            let old = input.energy_start[p];
            let work = match self.flaw {
                BlockFlaw::OldStressEnergy => {
                    let mut w = S::zero();
                    for i in c.clone() {
                        w += input.stress_start[i] * input.strain_increment[i];
                    }
                    w / rho
                }
                _ => trapezoid_work(
                    &input.stress_start[c.clone()],
                    &output.stress[c.clone()],
                    &input.strain_increment[c],
                    rho,
                ),
            };
            // Dissipation σy0 Δα / ρ (α is state entry n).
            let dalpha = output.state[p * ns + n] - input.state_start[p * ns + n];
            let mut dissipation = props[2] * dalpha / rho;
            if self.flaw == BlockFlaw::DissipationSign {
                dissipation = -dissipation;
            }
            output.energy[p].internal = old.internal + work;
            output.energy[p].dissipated = old.dissipated + dissipation;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tancheck_core::block::{BlockModelRoutine, BlockSettings, Conditions};
    use tancheck_core::path::{Path, Shape};

    /// The worked J2 case of REFERENCES.md (E 200 GPa, ν 0.3, σy 250 MPa, K' 1000, H' 500 MPa).
    const PROPS: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

    fn settings() -> BlockSettings {
        BlockSettings {
            conditions: Conditions {
                temperature: 293.0,
                temperature_increment: 0.0,
                density: 7.85e-9,
                characteristic_length: 2.0,
            },
            state0: vec![0.0; 13],
            ..BlockSettings::default()
        }
    }

    fn check(flaw: BlockFlaw) -> tancheck_core::block::BlockReport {
        let mut r = BlockModelRoutine(J2Block::with_flaw(PointKind::Solid3d, flaw).unwrap());
        let path = Path::ramp(Shape::TensionShear, 6e-3, 6, 3);
        tancheck_core::block::run(&mut r, &PROPS, &path, &settings()).unwrap()
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
        ] {
            let r = check(flaw);
            assert!(r.has(finding), "{flaw:?}: {:#?}", r.findings);
        }
    }
}
