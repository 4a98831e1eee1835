//! The energy of a deleted point: its stress is the declared residual (zero here), so the work
//! done on it is nothing and its internal energy must stay as it was. The energy checks skipped
//! deleted points, and a routine that went on adding internal energy to a deleted point passed
//! (a user-style sweep). A linear elastic point (Hooke's law, E and ν) deleted once ε11 passes
//! a limit, correct and with that flaw.

use tancheck::core::block::{
    run, BlockInfo, BlockInput, BlockModel, BlockModelRoutine, BlockOutput, BlockSettings, Conditions,
};
use tancheck::core::path::{Path, Shape};
use tancheck::core::{Fault, Scalar};

/// Invented: E, ν, the deletion strain.
const PROPS: [f64; 3] = [70_000.0, 0.3, 2e-3];

#[derive(Clone)]
struct Brittle {
    info: BlockInfo,
    /// Adds 1e6 per unit mass of internal energy at every call after deletion.
    heats_when_deleted: bool,
}

impl BlockModel for Brittle {
    fn info(&self) -> &BlockInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &BlockInput<'_, S>,
        out: &mut BlockOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (e, nu, limit) = (input.properties[0], input.properties[1], input.properties[2].re());
        let (mu, lambda) = (e / ((nu + 1.0) * 2.0), e * nu / ((nu + 1.0) * (-(nu * 2.0) + 1.0)));
        for p in 0..input.npoints() {
            let c = p * 6..(p + 1) * 6;
            let de = &input.strain_increment[c.clone()];
            let was = input.state_start[p].re() != 0.0;
            let eps11 = input.strain[c.start] + de[0];
            let gone = !input.elastic_response && (was || eps11.re() > limit);
            out.deleted[p] = i32::from(gone);
            out.state[p] = S::cst(if gone { 1.0 } else { 0.0 });
            let mut w = S::cst(0.0);
            let tr = de[0] + de[1] + de[2];
            for (i, &d) in de.iter().enumerate() {
                let s = if gone {
                    S::cst(0.0)
                } else {
                    let ds = if i < 3 { tr * lambda + d * mu * 2.0 } else { d * mu };
                    input.stress_start[c.start + i] + ds
                };
                out.stress[c.start + i] = s;
                w += (input.stress_start[c.start + i] + s) * d * 0.5;
            }
            if input.elastic_response {
                out.energy[p] = input.energy_start[p];
                continue;
            }
            let rho = input.conditions[p].density;
            let extra = if gone && was && self.heats_when_deleted { 1e6 } else { 0.0 };
            out.energy[p].internal = input.energy_start[p].internal + w / rho + extra;
            // What the point held when it was deleted is dissipated (it fractured).
            out.energy[p].dissipated = if gone && !was {
                input.energy_start[p].internal + w / rho
            } else {
                input.energy_start[p].dissipated
            };
        }
        Ok(())
    }
}

fn findings(heats_when_deleted: bool) -> Vec<(String, Option<usize>, String)> {
    let mut r = BlockModelRoutine(Brittle {
        info: BlockInfo { name: "brittle".into(), ncomp: 6, nstate: 1, nproperties: 3 },
        heats_when_deleted,
    });
    let s = BlockSettings {
        conditions: Conditions {
            temperature: 293.0,
            temperature_increment: 0.0,
            density: 2.7e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0],
        softening: true,
        damage: vec![0],
        ..BlockSettings::default()
    };
    // Uniaxial strain to 4e-3 in 8 increments: deleted in increment 5 (ε11 = 2.5e-3).
    let path = Path::ramp(Shape::UniaxialStrain, 4e-3, 8, 0);
    let report = run(&mut r, &PROPS, &path, &s).unwrap();
    assert!(report.increments.iter().any(|i| i.deleted), "the point is deleted");
    report.findings.iter().map(|f| (f.finding.to_string(), f.increment, f.what.clone())).collect()
}

#[test]
fn a_deleted_point_keeps_its_internal_energy() {
    let f = findings(false);
    assert!(f.is_empty(), "{f:#?}");
    let f = findings(true);
    let m = f.iter().find(|x| x.0 == "energy-work-mismatch").unwrap_or_else(|| panic!("{f:#?}"));
    // The first increment after the one that deleted it.
    assert_eq!(m.1, Some(6), "{f:#?}");
    assert!(m.2.contains("the stress does no work here"), "{}", m.2);
}
