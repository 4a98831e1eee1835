//! A bar's tangent off by a factor: the reading of the factor as a modulus of a fuller stress
//! state. For isotropic Hooke's law (any text on elasticity, e.g. Timoshenko & Goodier, from
//! memory): the 3D entry C11 = λ + 2μ = E(1 − ν)/((1 + ν)(1 − 2ν)) and the plane-stress entry
//! E/(1 − ν²); at ν = 0.3 the first is E × 1.346154 (0.7/0.52), the second E × 1.098901.

use super::*;

const E: f64 = 70_000.0;

fn bar() -> Convention {
    Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering)
}

fn scale_detail(h: &[Hypothesis]) -> &str {
    &h.iter().find(|h| h.cause == Cause::UniformScale).expect("a factor is fitted").detail
}

#[test]
fn a_bar_returning_the_3d_modulus_reads_the_poisson_ratio_of_it() {
    let conv = bar();
    let nu = 0.3;
    let c11 = E * (1.0 - nu) / ((1.0 + nu) * (1.0 - 2.0 * nu));
    let z = [0.0];
    let (r, n) = ([c11], [E]);
    let mut e = ev(&conv, &r, &n, &z);
    e.state_changed = false;
    let h = rank(&e);
    let d = scale_detail(&h);
    assert!(d.contains("1.3462e0") && d.contains("λ + 2μ") && d.contains("ν = 0.300"), "{d}");
    // 1.346 is no plane-stress modulus for any ν below ½ (it would need ν = 0.507).
    assert!(!d.contains("plane-stress"), "{d}");
    let ps = [E / (1.0 - nu * nu)];
    let h = rank(&ev_elastic(&conv, &ps, &n, &z));
    let d = scale_detail(&h);
    assert!(d.contains("plane-stress modulus E/(1 − ν²) gives it at ν = 0.300"), "{d}");
}

fn ev_elastic<'a>(conv: &'a Convention, r: &'a [f64], n: &'a [f64], z: &'a [f64]) -> Evidence<'a> {
    Evidence { state_changed: false, ..ev(conv, r, n, z) }
}

#[test]
fn a_plastic_bar_whose_elastic_stiffness_is_right_gets_no_modulus_reading() {
    // The elastic modulus returned in a plastic increment (tangent E H/(E + H) wanted): a
    // factor above 1 that no elastic stiffness carries.
    let conv = bar();
    let h_mod = 10_000.0;
    let z = [0.0];
    let (r, n) = ([E], [E * h_mod / (E + h_mod)]);
    let (er, en) = ([E], [E]);
    let mut e = ev(&conv, &r, &n, &z);
    e.elastic_returned = Some(&er);
    e.elastic = Some(&en);
    let h = rank(&e);
    assert!(!scale_detail(&h).contains("for a bar"), "{}", scale_detail(&h));
    // The same factor on the elastic step too (an uncondensed modulus throughout) is read.
    let c11 = E * 0.7 / 0.52;
    let (r2, n2, er2) = ([c11], [E], [c11]);
    let mut e = ev(&conv, &r2, &n2, &z);
    e.elastic_returned = Some(&er2);
    e.elastic = Some(&en);
    let h = rank(&e);
    assert!(scale_detail(&h).contains("ν = 0.300"), "{}", scale_detail(&h));
    // A 3D point's factor is not read as a bar's.
    let conv3 = Convention::new(PointKind::Solid3d, ShearMeasure::Engineering);
    let good = j2_like();
    let scaled: Vec<f64> = good.iter().map(|x| 1.346 * x).collect();
    let z6 = [0.0; 6];
    let h = rank(&ev_elastic(&conv3, &scaled, &good, &z6));
    assert!(!scale_detail(&h).contains("for a bar"), "{}", scale_detail(&h));
}
