//! The zoo's registry builds every entry for its kinds, and no zoo call allocates.

use super::*;

// ---------------------------------------------------------------------------------------------
// Registry and the hot path

#[test]
fn every_zoo_entry_builds_for_its_kinds() {
    for e in zoo() {
        for &kind in e.kinds {
            let r = zoo_model(e.name, kind).unwrap_or_else(|err| panic!("{}: {err}", e.name));
            assert_eq!(r.0.info().convention.ncomp(), kind.ncomp());
            assert!(!r.0.prop_names().is_empty());
        }
    }
}

/// Allocations made by ten calls of `m` in scalar type S (buffers made beforehand).
fn allocations_of<S: Scalar>(m: &ZooModel, props: &[f64], dstrain: &[f64]) -> usize {
    let info = m.info();
    let c = Call::new(props, info.convention.ncomp(), info.nstate).dstrain(dstrain).temp(0.0, 0.0);
    let (made, outcome) = model_allocations::<S, _>(m, &c, 10);
    assert_eq!(outcome.status, 0);
    made
}

// DEVELOPERS.md: one routine call is the hot path and does not allocate, on either branch,
// in f64 and in dual numbers.
#[test]
fn zoo_calls_do_not_allocate() {
    // The thermo and cohesive rows have their own no-allocation tests (tests/thermo.rs,
    // tests/cohesive.rs), with properties of their own.
    for e in zoo().into_iter().filter(|e| !e.name.starts_with("thermo") && !e.name.starts_with("cohesive")) {
        for &kind in e.kinds {
            let r = zoo_model(e.name, kind).unwrap();
            let n = kind.ncomp();
            let props: Vec<f64> = match r.0.prop_names().len() {
                7 => WORKED.to_vec(),
                3 => vec![200_000.0, 80_000.0, 0.3],
                _ => vec![200_000.0, 0.3],
            };
            for size in [1e-4, 3e-3, -3e-3] {
                let de: Vec<f64> = (0..n).map(|i| if i == 0 { size } else { 0.0 }).collect();
                assert_eq!(allocations_of::<f64>(&r.0, &props, &de), 0, "{} {kind}", e.name);
                assert_eq!(allocations_of::<Dual64>(&r.0, &props, &de), 0, "{} {kind}", e.name);
            }
        }
    }
}
