//! The `column` code of every derivative scheme (crates/tancheck-core/src/schemes, the code
//! the checker runs, through the driver and the counting caller) on the J2 model, against
//! the exact derivative of the same update by forward dual numbers (num-dual, an independent
//! library).
//!
//! The point is a plastic increment from a hardened, shifted start state (radial return,
//! Simo & Hughes 1998, Box 3.2), far from the yield kink, so the update is smooth there and
//! each scheme shows its own error: truncation of order p in the step h (forward and backward
//! p = 1, central p = 2, five-point central and Richardson p = 4: Taylor expansion, e.g.
//! Burden & Faires, "Numerical Analysis", ch. 4; from memory) plus rounding of about ε/h, and
//! for the complex step O(h²) truncation with no subtractive cancellation, so it reaches
//! machine precision at tiny steps (Squire & Trapp 1998; Martins, Sturdza & Alonso 2003).
//!
//! Two checks per scheme: at the default relative step of the check (Settings::default), the
//! column agrees with num-dual within a tolerance set by that error model (stated per scheme
//! below); and, for the finite differences, the error falls with h at the scheme's order: the
//! ratio e(h)/e(h/4) lies within a factor of two of 4^p (common practice for an observed
//! order).

use tancheck_core::{
    Caller, Direction, Driver, Model, ModelRoutine, PointKind, PointState, Scheme, Settings,
};
use tancheck_models::J2;
use tancheck_testkit::call::{dual_tangent, Call};

/// E, ν, σy0, H_iso, Q, b, H_kin: the Voce set of the examples (demo values, MPa).
const PROPS: [f64; 7] = [210_000.0, 0.29, 300.0, 800.0, 180.0, 25.0, 1500.0];

/// A plastic increment (tension with shear) from a start state reached by an earlier plastic
/// increment; returns the model, the driver set up for it, and the call for num-dual.
fn plastic_point() -> (ModelRoutine<J2>, Call) {
    let j2 = J2::new(PointKind::Solid3d).unwrap();
    let first = [2.5e-3, -1.0e-3, -0.8e-3, 0.4e-3, 0.0, 1.2e-3];
    let c0 = Call::new(&PROPS, 6, 13).dstrain(&first);
    let mut r = ModelRoutine(j2.clone());
    let o = tancheck_testkit::call::call(&mut r, &c0);
    assert_eq!(o.outcome.branch, 1, "the first increment is plastic");
    let second = [1.5e-3, -0.5e-3, -0.6e-3, 0.3e-3, -0.2e-3, 0.9e-3];
    let c = Call::new(&PROPS, 6, 13).strain(&first).stress0(&o.stress).state0(&o.state).dstrain(&second);
    (ModelRoutine(j2), c)
}

/// The numerical tangent by `scheme` at absolute step `h`, column by column, through the
/// scheme's `column` (and the driver's perturbed and complex calls).
fn scheme_tangent(r: &mut ModelRoutine<J2>, c: &Call, scheme: Scheme, h: f64) -> Vec<f64> {
    let info = r.0.info().clone();
    let start = PointState {
        strain: c.strain.clone(),
        stress: c.stress0.clone(),
        state: c.state0.clone(),
        ..PointState::zero(&info, c.temp[0])
    };
    let mut driver = Driver::new(&info, &c.props, start).unwrap();
    driver.set_increment(&c.dstrain, c.temp[1], c.time[1]);
    let mut caller = Caller::new(r);
    driver.base_call(&mut caller).unwrap();
    assert_eq!(driver.base.outcome.branch, 1, "the increment is plastic");
    let n = c.strain.len();
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        scheme.column(&mut driver, &mut caller, Direction::Strain(j), h, &mut t[j * n..(j + 1) * n]).unwrap();
    }
    t
}

/// ‖a − b‖_F / ‖b‖_F.
fn rel(a: &[f64], b: &[f64]) -> f64 {
    tancheck_testkit::call::rel(a, b)
}

/// The strain scale the check multiplies its relative steps by (largest |ε + Δε| or |Δε|).
fn scale(c: &Call) -> f64 {
    c.strain.iter().zip(&c.dstrain).map(|(e, d)| (e + d).abs().max(d.abs())).fold(0.0, f64::max)
}

#[test]
fn every_scheme_column_agrees_with_num_dual_within_its_error_order() {
    let (mut r, c) = plastic_point();
    let (exact, branches) = dual_tangent(&r.0, &c);
    assert!(branches.iter().all(|&b| b == 1));
    let settings = Settings::default();
    let s = scale(&c);
    // Tolerances from the error model at the default steps (relative to the tangent's
    // norm, with margin 10–100 above the estimate):
    //  forward/backward: h ~ 1.5e-8·s, truncation h|σ''|/2 plus rounding 2ε|σ|/h, both near
    //    √ε ≈ 1e-8 relative → 1e-5;
    //  central: h = 6e-6·s, truncation h²|σ'''|/6 ≈ 4e-11, rounding ε/h ≈ 1e-11 → 1e-7;
    //  central4, Richardson: h = 1e-3·s, truncation O(h⁴) ≈ 1e-12, rounding ≈ 1e-13 → 1e-8;
    //  complex step: h = 1e-20·s, no cancellation: machine precision (Martins et al. 2003)
    //    → 1e-12.
    for (scheme, tol) in [
        (Scheme::Forward, 1e-5),
        (Scheme::Backward, 1e-5),
        (Scheme::Central, 1e-7),
        (Scheme::Central4, 1e-8),
        (Scheme::Richardson, 1e-8),
        (Scheme::ComplexStep, 1e-12),
    ] {
        let h = settings.scheme(scheme).rel_step * s;
        let got = scheme_tangent(&mut r, &c, scheme, h);
        let e = rel(&got, &exact);
        assert!(e <= tol, "{scheme} at h = {h:e}: error {e:e} above {tol:e}");
    }
}

#[test]
fn every_difference_column_converges_at_its_order() {
    let (mut r, c) = plastic_point();
    let (exact, _) = dual_tangent(&r.0, &c);
    let s = scale(&c);
    // Steps where truncation dominates rounding by far for each order (relative to s).
    for (scheme, h) in [
        (Scheme::Forward, 1e-3),
        (Scheme::Backward, 1e-3),
        (Scheme::Central, 1e-2),
        (Scheme::Central4, 8e-2),
        (Scheme::Richardson, 8e-2),
    ] {
        let coarse = rel(&scheme_tangent(&mut r, &c, scheme, h * s), &exact);
        let fine = rel(&scheme_tangent(&mut r, &c, scheme, h * s / 4.0), &exact);
        let ratio = coarse / fine;
        let want = 4f64.powf(scheme.order());
        assert!(
            ratio > want / 2.0 && ratio < want * 2.0,
            "{scheme}: e(h) = {coarse:e}, e(h/4) = {fine:e}, ratio {ratio:.2}, order {} wants {want}",
            scheme.order()
        );
    }
    // The complex step has no cancellation: a step 1e10 times smaller changes nothing
    // beyond rounding (Martins, Sturdza & Alonso 2003).
    let a = scheme_tangent(&mut r, &c, Scheme::ComplexStep, 1e-10 * s);
    let b = scheme_tangent(&mut r, &c, Scheme::ComplexStep, 1e-20 * s);
    assert!(
        rel(&a, &exact) <= 1e-12 && rel(&b, &exact) <= 1e-12,
        "{:e} {:e}",
        rel(&a, &exact),
        rel(&b, &exact)
    );
}
