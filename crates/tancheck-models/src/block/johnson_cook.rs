//! Johnson–Cook plasticity with damage and element deletion as a block routine.
//!
//! Every point is updated by the point model [`crate::JohnsonCook`] (J2 radial return with the
//! flow stress of Johnson & Cook 1983: rate and thermal softening, adiabatic heating with a
//! Taylor–Quinney factor, and the damage-initiation indicator D of Johnson & Cook 1985). The
//! block adds what explicit solvers do after initiation:
//!
//! - **Progressive damage over the characteristic length** (crack band, Bažant & Oh 1983; from
//!   memory): once D ≥ 1 the equivalent plastic displacement ū = L Δε̄p accumulates, and the
//!   damage grows linearly to ū_f = 2 G_f / σ_y0, σ_y0 the equivalent stress when D reached 1:
//!   d = min(ū / ū_f, 1) (the energy dissipated per area by the softening is G_f). The stress is
//!   (1 − d) σ̃, σ̃ the undamaged stress of the point model.
//! - **Deletion**: when d ≥ d_max the point is deleted: d = 1, zero stress from then on, the
//!   deleted flag set; a deleted point stays deleted.
//! - **Elastic moduli at the point's temperature**: E(T) = E (1 − k_E T*) with the homologous
//!   temperature T* of the point's conditions (clipped to [0, 1)), k_E ≥ 0 a property (0: E
//!   constant). The elastic response of the first call uses E(T) too.
//!
//! Properties (21): the 18 of the point model, then `[k_E, G_f, d_max]`. State (ncomp + 7): the
//! point model's `[εp (ncomp), ε̄p, D, ΔT_heat]`, then `[d, σ_y0, ū, deleted]`. Energies per
//! unit mass: internal by the trapezoid rule, stored ½ σ·(ε − εp)/ρ (zero once deleted),
//! dissipated = internal − stored.
//!
//! The flawed variants of the zoo ([`JcBlockFlaw`]) keep everything else.

use tancheck_core::block::{BlockInfo, BlockInput, BlockOutput};
use tancheck_core::routine::status;
use tancheck_core::{Fault, Model, PointKind, Scalar};

use super::{elastic_response, fail_point, point_update, trapezoid_work, At, PointBlock};
use crate::{JohnsonCook, ModelError};

/// Properties of the point model.
const NPOINT: usize = 18;
/// Properties of the block model.
pub const NPROPERTIES: usize = NPOINT + 3;

/// Deliberate mistakes of the zoo's Johnson–Cook block rows.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum JcBlockFlaw {
    None,
    /// A deleted point comes back when the strain increment compresses it (d reset to 0).
    Revived,
    /// The rate factor 1 + C ln ε̇* from the total strain rate of the increment, folded into A
    /// and B without the floor at the reference rate: ln 0 at a zero rate.
    UnguardedRate,
    /// The elastic response (the wave speed) from E at the room temperature, not E(T).
    WrongTemperature,
    /// A deleted point freezes its last stress (the start stress of the increment that
    /// deleted it) instead of dropping to zero (`deleted-point-stress`).
    DeletedStress,
    /// The thermal factor 1 − T*ᵐ without the clip at T* = 0, on the stress of a yielding
    /// point: below the room temperature T*ᵐ of a negative T* is not a number in real
    /// arithmetic (`non-finite-stiffness` at the first plastic increment).
    UnclippedTemperature,
}

/// The Johnson–Cook block model.
pub type JcBlock = PointBlock<JohnsonCook, JcBlockFlaw>;

impl JcBlock {
    pub const NAME: &'static str = "johnson-cook-block";
    pub const REVIVED_NAME: &'static str = "johnson-cook-block-revived";
    pub const UNGUARDED_RATE_NAME: &'static str = "johnson-cook-block-unguarded-rate";
    pub const WRONG_TEMPERATURE_NAME: &'static str = "johnson-cook-block-wrong-temperature";
    pub const DELETED_STRESS_NAME: &'static str = "johnson-cook-block-deleted-stress";
    pub const UNCLIPPED_TEMPERATURE_NAME: &'static str = "johnson-cook-block-unclipped-temperature";

    pub fn with_flaw(kind: PointKind, flaw: JcBlockFlaw) -> Result<JcBlock, ModelError> {
        let point = JohnsonCook::new(kind)?;
        let ncomp = point.info().convention.ncomp();
        let name = match flaw {
            JcBlockFlaw::None => JcBlock::NAME,
            JcBlockFlaw::Revived => JcBlock::REVIVED_NAME,
            JcBlockFlaw::UnguardedRate => JcBlock::UNGUARDED_RATE_NAME,
            JcBlockFlaw::WrongTemperature => JcBlock::WRONG_TEMPERATURE_NAME,
            JcBlockFlaw::DeletedStress => JcBlock::DELETED_STRESS_NAME,
            JcBlockFlaw::UnclippedTemperature => JcBlock::UNCLIPPED_TEMPERATURE_NAME,
        };
        let info = BlockInfo { name: name.into(), ncomp, nstate: ncomp + 7, nproperties: NPROPERTIES };
        Ok(JcBlock { point, info, flaw })
    }

    pub fn by_name(name: &str, kind: PointKind) -> Option<Result<JcBlock, ModelError>> {
        let flaw = match name {
            JcBlock::NAME => JcBlockFlaw::None,
            JcBlock::REVIVED_NAME => JcBlockFlaw::Revived,
            JcBlock::UNGUARDED_RATE_NAME => JcBlockFlaw::UnguardedRate,
            JcBlock::WRONG_TEMPERATURE_NAME => JcBlockFlaw::WrongTemperature,
            JcBlock::DELETED_STRESS_NAME => JcBlockFlaw::DeletedStress,
            JcBlock::UNCLIPPED_TEMPERATURE_NAME => JcBlockFlaw::UnclippedTemperature,
            _ => return None,
        };
        Some(JcBlock::with_flaw(kind, flaw))
    }
}

/// E(T) = E (1 − k_E T*), T* clipped to [0, 1).
fn modulus<S: Scalar>(p: &[S], temperature: f64) -> S {
    let ts = ((temperature - p[7].re()) / (p[8].re() - p[7].re())).clamp(0.0, 1.0 - 1e-12);
    p[0] * (S::one() - p[NPOINT] * ts)
}

/// Von Mises equivalent stress (engineering-order vector: shear entries are tensor shear
/// stresses).
fn equivalent<S: Scalar>(s: &[S]) -> S {
    let (a, b, c) = (s[0], s[1], s[2]);
    let mut q = ((a - b) * (a - b) + (b - c) * (b - c) + (c - a) * (c - a)) * 0.5;
    for &t in &s[3..] {
        q += t * t * 3.0;
    }
    if q.re() > 0.0 {
        q.sqrt()
    } else {
        S::zero()
    }
}

block_model!(JcBlock, check_properties);

impl JcBlock {
    /// The block's own properties are in range; otherwise the call fails at point 0.
    fn check_properties<S: Scalar>(
        &self,
        input: &BlockInput<'_, S>,
        output: &mut BlockOutput<'_, S>,
    ) -> bool {
        let props = input.properties;
        let (k_e, g_f, d_max) = (props[NPOINT], props[NPOINT + 1], props[NPOINT + 2]);
        if !(k_e.re() >= 0.0 && g_f.re() > 0.0 && d_max.re() > 0.0 && d_max.re() <= 1.0) {
            fail_point(output, 0, "johnson-cook-block: needs k_E >= 0, G_f > 0, 0 < d_max <= 1");
            return false;
        }
        true
    }

    /// One point of a call (see `block_model!` in the block module).
    fn point<S: Scalar>(&self, at: At<'_, '_, '_, S>) -> Result<bool, Fault> {
        let At { input, output, p, c, s } = at;
        let (n, ns) = (self.info.ncomp, self.info.nstate);
        let props = input.properties;
        let (g_f, d_max) = (props[NPOINT + 1], props[NPOINT + 2]);
        let mut point_props = [S::zero(); NPOINT];
        // Point-model state entries, then the block's.
        let (i_ebar, i_heat) = (n, n + 2);
        let (i_d, i_sy0, i_u, i_del) = (n + 3, n + 4, n + 5, n + 6);
        let t = input.conditions[p];
        let temperature = t.temperature + t.temperature_increment;
        let e_t = modulus(props, temperature);
        let old = &input.state_start[s.clone()];
        let de = &input.strain_increment[c.clone()];
        if input.elastic_response {
            let e_el = if self.flaw == JcBlockFlaw::WrongTemperature {
                props[0]
            } else {
                modulus(props, t.temperature)
            };
            elastic_response(e_el, props[1], &input.stress_start[c.clone()], de, &mut output.stress[c]);
            output.state[s.clone()].copy_from_slice(old);
            output.energy[p] = input.energy_start[p];
            output.deleted[p] = 0;
            return Ok(true);
        }
        let mut was_deleted = old[i_del].re() >= 0.5;
        let mut revived = [S::zero(); 13];
        let old = if was_deleted && self.flaw == JcBlockFlaw::Revived && (de[0] + de[1] + de[2]).re() < 0.0 {
            // The flaw: compression "closes the crack", clears the damage and brings the
            // point back.
            was_deleted = false;
            revived[..ns].copy_from_slice(old);
            for k in [n + 1, i_d, i_sy0, i_u, i_del] {
                revived[k] = S::zero();
            }
            &revived[..ns]
        } else {
            old
        };
        if was_deleted {
            if self.flaw == JcBlockFlaw::DeletedStress {
                output.stress[c.clone()].copy_from_slice(&input.stress_start[c]);
            } else {
                output.stress[c].fill(S::zero());
            }
            output.state[s.clone()].copy_from_slice(old);
            output.energy[p] = input.energy_start[p];
            output.deleted[p] = 1;
            return Ok(true);
        }
        point_props.copy_from_slice(&props[..NPOINT]);
        point_props[0] = e_t;
        if self.flaw == JcBlockFlaw::UnguardedRate {
            // ε̇* of the total equivalent strain of the increment, unguarded.
            let rate = equivalent_strain(de) / (point_props[9] * input.time_increment);
            let factor = S::one() + point_props[5] * rate.ln();
            point_props[2] *= factor;
            point_props[3] *= factor;
            point_props[5] = S::zero();
        }
        let outcome = point_update(
            &self.point,
            &point_props,
            input,
            p,
            de,
            input.time_increment,
            &old[..n + 3],
            &mut output.stress[c.clone()],
            &mut output.state[p * ns..p * ns + n + 3],
        )?;
        if outcome.status != status::OK {
            let text = outcome.message_text();
            fail_point(
                output,
                p,
                if text.is_empty() { "johnson-cook-block: the point update failed" } else { &text },
            );
            return Ok(false);
        }
        // Progressive damage after initiation (D ≥ 1).
        let mut d = old[i_d];
        let mut sy0 = old[i_sy0];
        let mut u = old[i_u];
        let mut deleted = false;
        let new = &output.state[s.clone()];
        if new[n + 1].re() >= 1.0 {
            if sy0.re() <= 0.0 {
                sy0 = equivalent(&output.stress[c.clone()]);
            }
            u += (new[i_ebar] - old[i_ebar]) * t.characteristic_length;
            let u_f = g_f * 2.0 / sy0;
            d = (u / u_f).min(S::one());
            if d.re() >= d_max.re() {
                d = S::one();
                deleted = true;
            }
        }
        let _ = i_heat;
        let keep = S::one() - d;
        for x in &mut output.stress[c.clone()] {
            *x *= keep;
        }
        if self.flaw == JcBlockFlaw::UnclippedTemperature && yielded(&output.state[s.clone()], old, i_ebar) {
            // 1 − T*ᵐ at a T* below zero on the stress of a yielding point (the point model
            // clips T* at zero; above zero its own factor applies).
            let ts = (t.temperature - props[7].re()) / (props[8].re() - props[7].re());
            if ts < 0.0 {
                let factor = S::cst(1.0 - ts.powf(props[6].re()));
                for x in &mut output.stress[c.clone()] {
                    *x *= factor;
                }
            }
        }
        if deleted && self.flaw == JcBlockFlaw::DeletedStress {
            output.stress[c.clone()].copy_from_slice(&input.stress_start[c.clone()]);
        }
        let st = &mut output.state[s.clone()];
        st[i_d] = d;
        st[i_sy0] = sy0;
        st[i_u] = u;
        st[i_del] = if deleted { S::one() } else { S::zero() };
        output.deleted[p] = i32::from(deleted);
        // Energies per unit mass.
        let rho = t.density;
        let work = trapezoid_work(&input.stress_start[c.clone()], &output.stress[c.clone()], de, rho);
        let internal = input.energy_start[p].internal + work;
        let mut stored = S::zero();
        if !deleted {
            for (i, &d) in de.iter().enumerate() {
                let elastic = input.strain[p * n + i] + d - output.state[p * ns + i];
                stored += output.stress[p * n + i] * elastic * 0.5;
            }
        }
        output.energy[p].internal = internal;
        output.energy[p].dissipated = internal - stored / rho;
        Ok(true)
    }
}

/// Whether the point yielded in this call (its equivalent plastic strain grew).
fn yielded<S: Scalar>(new: &[S], old: &[S], i_ebar: usize) -> bool {
    new[i_ebar].re() > old[i_ebar].re()
}

/// Equivalent strain √(2/3 e:e) of an increment (engineering shear halved), for the flawed
/// rate of [`JcBlockFlaw::UnguardedRate`].
fn equivalent_strain<S: Scalar>(de: &[S]) -> S {
    let m = (de[0] + de[1] + de[2]) / 3.0;
    let mut q = S::zero();
    for (i, &x) in de.iter().enumerate() {
        q += if i < 3 { (x - m) * (x - m) } else { x * x * 0.5 };
    }
    (q * (2.0 / 3.0)).sqrt()
}
