//! The elastic response of a block routine whose stiffness changes with the strain: a pressure
//! polynomial in the compression μ = −tr ε (p = K1 μ + K2 μ² for μ > 0, the form of a
//! polynomial equation of state, e.g. Meyers, Dynamic Behavior of Materials, 1994, ch. 5, from
//! memory) with a linear deviator 2G dev ε. Its stiffness at a zero increment is the linear
//! one (bulk K1, shear G), which the first call returns. Checked against the stiffness of a
//! small increment from the start, a thousandth of the first increment: on a coarse path that
//! increment already moves the bulk modulus by 2 K2 μ, beyond the tolerance, and a correct
//! routine failed as `elastic-response-mismatch` on three or ten steps and passed on a hundred
//! (a user-style sweep). The stiffness is now taken toward a zero increment where it changes
//! with the increment's size; a first call that returns the bulk modulus alone (no shear)
//! still fails on every path.

use tancheck::core::block::{
    run, BlockInfo, BlockInput, BlockModel, BlockModelRoutine, BlockOutput, BlockSettings, Conditions,
};
use tancheck::core::path::{Path, Shape};
use tancheck::core::{Fault, Scalar};

/// Invented moduli of the order of an aluminium (MPa): K1, K2, G.
const PROPS: [f64; 3] = [70_000.0, 140_000.0, 26_000.0];

#[derive(Clone)]
struct Polynomial {
    info: BlockInfo,
    /// The first call without its shear part (the bulk sound speed's moduli).
    bulk_only: bool,
}

impl Polynomial {
    fn new(bulk_only: bool) -> Polynomial {
        Polynomial {
            info: BlockInfo { name: "polynomial".into(), ncomp: 6, nstate: 1, nproperties: 3 },
            bulk_only,
        }
    }
}

impl BlockModel for Polynomial {
    fn info(&self) -> &BlockInfo {
        &self.info
    }

    fn evaluate<S: Scalar>(
        &self,
        input: &BlockInput<'_, S>,
        out: &mut BlockOutput<'_, S>,
    ) -> Result<(), Fault> {
        let (k1, k2, g) = (input.properties[0], input.properties[1], input.properties[2]);
        for p in 0..input.npoints() {
            let c = p * 6..(p + 1) * 6;
            out.deleted[p] = 0;
            out.state[p] = input.state_start[p];
            let de = &input.strain_increment[c.clone()];
            if input.elastic_response {
                let tr = de[0] + de[1] + de[2];
                for (i, &d) in de.iter().enumerate() {
                    let dev = if self.bulk_only {
                        S::cst(0.0)
                    } else if i < 3 {
                        (d - tr / 3.0) * g * 2.0
                    } else {
                        d * g
                    };
                    let vol = if i < 3 { tr * k1 } else { S::cst(0.0) };
                    out.stress[c.start + i] = input.stress_start[c.start + i] + vol + dev;
                }
                out.energy[p] = input.energy_start[p];
                continue;
            }
            let e: Vec<S> = (0..6).map(|i| input.strain[c.start + i] + de[i]).collect();
            let tr = e[0] + e[1] + e[2];
            let mu = -tr;
            let mut pressure = mu * k1;
            if mu.re() > 0.0 {
                pressure += mu * mu * k2;
            }
            let mut w = S::cst(0.0);
            for i in 0..6 {
                let s = if i < 3 { -pressure + (e[i] - tr / 3.0) * g * 2.0 } else { e[i] * g };
                out.stress[c.start + i] = s;
                w += (input.stress_start[c.start + i] + s) * de[i] * 0.5;
            }
            out.state[p] = mu;
            let rho = input.conditions[p].density;
            out.energy[p].internal = input.energy_start[p].internal + w / rho;
            out.energy[p].dissipated = input.energy_start[p].dissipated;
        }
        Ok(())
    }
}

fn settings() -> BlockSettings {
    BlockSettings {
        conditions: Conditions {
            temperature: 293.0,
            temperature_increment: 0.0,
            density: 2.7e-9,
            characteristic_length: 2.0,
        },
        state0: vec![0.0],
        // It stiffens under compression, as it should: declared, so that the walk's effective
        // stiffness above the first call's is a note, not a finding.
        stiffening: true,
        ..BlockSettings::default()
    }
}

fn findings(bulk_only: bool, steps: usize) -> Vec<(String, String)> {
    // Back in as many increments as out: the trapezoidal work of the routine's internal energy
    // then returns exactly what it took (back in fewer, coarser increments it returns more
    // than it took on this stiffening curve, and the stored energy reads negative, as it is).
    let mut path = Path::ramp(Shape::Hydrostatic, -0.05, steps, steps);
    for inc in &mut path.increments {
        inc.dtime = 1e-6;
    }
    let mut r = BlockModelRoutine(Polynomial::new(bulk_only));
    let report = run(&mut r, &PROPS, &path, &settings()).unwrap();
    report.findings.iter().map(|f| (f.finding.to_string(), f.what.clone())).collect()
}

#[test]
fn a_stiffness_that_changes_with_the_strain_is_taken_toward_a_zero_increment() {
    // Hydrostatic to ε = −0.05 per component: μ = 0.15 at the peak; a thousandth of the first
    // of three increments is μ = 5e-5, where the bulk modulus is K1 + 2 K2 μ, 2e-4 above K1.
    for steps in [3, 10, 100] {
        let f = findings(false, steps);
        assert!(f.is_empty(), "correct, {steps} steps: {f:#?}");
    }
    for steps in [3, 10, 100] {
        let f = findings(true, steps);
        let m = f.iter().find(|(n, _)| n == "elastic-response-mismatch");
        let (_, what) = m.unwrap_or_else(|| panic!("bulk only, {steps} steps: {f:#?}"));
        // The dilatational modulus of the first call is K1 alone (no 4G/3).
        assert!(what.contains("dilatational modulus 7.000000e4"), "{what}");
    }
}
