//! One call of a model does not allocate (DEVELOPERS.md: the hot path), in any scalar type
//! and on either branch. A counting allocator counts the allocations of the test's own thread.

use num_complex::Complex64;
use num_dual::Dual64;
use tancheck_core::{Model, PointKind, Scalar};
use tancheck_testkit::call::{model_allocations, Call};

use crate::{AnyModel, NAMES};

tancheck_testkit::counting_allocator!();

/// Allocations made by ten evaluations of `m` from a zero start (buffers made beforehand),
/// and the branch reached.
fn count<S: Scalar>(m: &AnyModel, props: &[f64], dstrain: &[f64]) -> (usize, i32) {
    let info = m.info();
    let c = Call::new(props, info.convention.ncomp(), info.nstate).dstrain(dstrain).temp(0.0, 0.0);
    let (made, outcome) = model_allocations::<S, _>(m, &c, 10);
    assert_eq!(outcome.status, 0, "{}", outcome.message_text());
    (made, outcome.branch)
}

#[test]
fn no_call_allocates() {
    // A bad property takes the failure path, which must not allocate either.
    let j2_props = [200_000.0, 0.3, 250.0, 1000.0, 50.0, 20.0, 500.0];
    for name in NAMES {
        for kind in [PointKind::Solid3d, PointKind::PlaneStrain] {
            let m = AnyModel::new(name, kind).unwrap();
            let n = kind.ncomp();
            let props: &[f64] = if name == "elastic" { &j2_props[..2] } else { &j2_props };
            for size in [1e-4, 3e-3] {
                let mut de = vec![0.0; n];
                de[0] = size;
                de[n - 1] = size;
                let want_branch = if name == "elastic" || size < 1e-3 { 0 } else { 1 };
                assert_eq!(count::<f64>(&m, props, &de), (0, want_branch), "{name} {kind} f64");
                assert_eq!(count::<Dual64>(&m, props, &de), (0, want_branch), "{name} {kind} dual");
                assert_eq!(count::<Complex64>(&m, props, &de), (0, want_branch), "{name} {kind} complex");
            }
        }
    }
}
