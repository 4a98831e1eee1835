//! The conventions probe: does the routine behave in the component order and shear measure
//! the manifest declares?
//!
//! A wrong declaration does not show in the tangent check: the returned tangent is still the
//! derivative of the stress update, whatever the slots mean. It shows in the physics of the
//! elastic response. The probe takes the numerical elastic tangent at the start (complex step
//! when there is a twin, else central differences, around a zero increment) and reads it under
//! every hypothesis: every order of the kind's components, with either shear measure. Under the
//! right one,
//!
//! - an isotropic law has the isotropic form in Mandel notation: the normal block has equal
//!   diagonal entries `a` and equal off-diagonal entries `b`, the normal/shear blocks vanish,
//!   and the shear block is diagonal with `a − b` = 2μ (Voigt with engineering shear:
//!   C44 = (C11 − C12)/2; Nye 1957, Physical Properties of Crystals, ch. VIII; from memory);
//! - an anisotropic law with a stored energy has a symmetric Mandel tangent (major symmetry);
//!   a wrong shear measure multiplies its normal/shear coupling by 2 on one side and ½ on the
//!   other. With engineering shear every choice of shear slots keeps a symmetric tangent
//!   symmetric, so symmetry tells the shear measure, never the order.
//!
//! What the evidence cannot tell, the probe says instead of guessing:
//!
//! - any order of the normal components among themselves, and of the shear components among
//!   themselves, gives the same isotropic response (the isotropic form is invariant under
//!   them): those orders make no difference to an isotropic law and are not named;
//! - an anisotropic response tells the shear measure (and which slots are shear) only through
//!   its normal/shear coupling: with material axes along the global ones there is none, and
//!   the result is "inconclusive";
//! - cohesive and uniaxial points have no elastic relation between their components: not
//!   applicable.
//!
//! [`analyse`] is the pure part (a tangent in, a finding out); `check` uses it on the first
//! elastic increment's numerical tangent, at no extra cost, and warns only when the evidence
//! is conclusive and differs from the declaration.

use super::{Probe, ProbeEnv, ProbeResult, ProbeStatus};
use crate::convention::{canonical_slot, Component, Convention, PointKind, ShearMeasure};
use crate::driver::{Direction, Driver};
use crate::routine::Caller;
use crate::schemes::Scheme;

pub struct Conventions;

/// Default tolerance of the isotropy and symmetry residuals (relative Frobenius norms): well
/// above what central differences reach on a smooth elastic response (about 1e-9), well below
/// any anisotropy a routine is meant to have (common practice).
pub const DEFAULT_TOL: f64 = 1e-6;

/// How the elastic response fits a hypothesis.
#[derive(Clone, Debug, PartialEq)]
pub struct Hypothesis {
    pub order: Vec<Component>,
    pub shear: ShearMeasure,
    /// Relative residual of the isotropic fit.
    pub isotropy: f64,
    /// Relative asymmetry of the Mandel tangent.
    pub asymmetry: f64,
}

impl Hypothesis {
    /// "order 11 22 33 12 13 23 with tensor shear".
    pub fn describe(&self) -> String {
        describe(&self.order, self.shear)
    }
}

fn describe(order: &[Component], shear: ShearMeasure) -> String {
    let labels: Vec<_> = order.iter().map(|c| c.label()).collect();
    let s = match shear {
        ShearMeasure::Engineering => "engineering",
        ShearMeasure::Tensor => "tensor",
    };
    format!("order {} with {s} shear", labels.join(" "))
}

/// What the elastic response says about the declared conventions.
#[derive(Clone, Debug, PartialEq)]
pub enum Finding {
    /// The response fits the declaration (and no other reading fits it better).
    AsDeclared { evidence: String },
    /// The response fits another reading, and not the declared one.
    Other { behaves: Hypothesis, declared: Hypothesis, evidence: String },
    /// The response does not tell.
    Inconclusive { why: String },
    /// The kind has no elastic relation between its components to test.
    NotApplicable { why: String },
}

impl Finding {
    /// One sentence for a report.
    pub fn sentence(&self) -> String {
        match self {
            Finding::AsDeclared { evidence } => format!("behaves as declared ({evidence})"),
            Finding::Other { behaves, declared, evidence } => format!(
                "behaves as {}; the manifest declares {} ({evidence})",
                behaves.describe(),
                declared.describe()
            ),
            Finding::Inconclusive { why } => format!("inconclusive: {why}"),
            Finding::NotApplicable { why } => format!("not applicable: {why}"),
        }
    }

    /// Whether the evidence shows a declaration that does not match.
    pub fn mismatch(&self) -> bool {
        matches!(self, Finding::Other { .. })
    }
}

/// A routine tangent (column-major, routine order) read under `conv` as a canonical 6×6
/// Mandel matrix (row-major; rows and columns the kind lacks are zero).
pub fn canonical_mandel(conv: &Convention, tangent: &[f64]) -> [[f64; 6]; 6] {
    let n = conv.ncomp();
    let mut m = tangent.to_vec();
    conv.tangent_to_mandel(&mut m);
    let mut out = [[0.0; 6]; 6];
    for (p, cp) in conv.order().iter().enumerate() {
        for (q, cq) in conv.order().iter().enumerate() {
            out[canonical_slot(*cp)][canonical_slot(*cq)] = m[p + q * n];
        }
    }
    out
}

/// Relative residual of the best isotropic fit of a canonical Mandel matrix over the `present`
/// slots: M ≈ a·A + b·B with A the normal and shear diagonal, B the normal off-diagonal minus
/// the shear diagonal (the shear diagonal is a − b). 0 for an exactly isotropic matrix.
pub fn isotropy_residual(m: &[[f64; 6]; 6], present: &[usize]) -> f64 {
    let basis = |i: usize, j: usize| -> (f64, f64) {
        let (ni, nj) = (i < 3, j < 3);
        match (ni, nj) {
            (true, true) if i == j => (1.0, 0.0),
            (true, true) => (0.0, 1.0),
            (false, false) if i == j => (1.0, -1.0),
            _ => (0.0, 0.0),
        }
    };
    // Normal equations of the two-parameter least-squares fit.
    let (mut aa, mut ab, mut bb, mut ma, mut mb, mut mm) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    for &i in present {
        for &j in present {
            let (a, b) = basis(i, j);
            let v = m[i][j];
            aa += a * a;
            ab += a * b;
            bb += b * b;
            ma += v * a;
            mb += v * b;
            mm += v * v;
        }
    }
    if mm == 0.0 {
        return 0.0;
    }
    let det = aa * bb - ab * ab;
    let (ca, cb) = if det.abs() > 1e-300 {
        ((ma * bb - mb * ab) / det, (aa * mb - ab * ma) / det)
    } else {
        (ma / aa.max(1e-300), 0.0)
    };
    let mut r = 0.0;
    for &i in present {
        for &j in present {
            let (a, b) = basis(i, j);
            let d = m[i][j] - ca * a - cb * b;
            r += d * d;
        }
    }
    (r / mm).sqrt()
}

/// Relative asymmetry ‖M − Mᵀ‖ / ‖M‖ of a canonical Mandel matrix.
pub fn asymmetry(m: &[[f64; 6]; 6]) -> f64 {
    let (mut d, mut n) = (0.0, 0.0);
    for (i, row) in m.iter().enumerate() {
        for (j, &v) in row.iter().enumerate() {
            d += (v - m[j][i]).powi(2);
            n += v * v;
        }
    }
    if n == 0.0 {
        0.0
    } else {
        (0.5 * d / n).sqrt()
    }
}

/// The readings worth testing: every choice of which slots hold the shear components, each
/// with the order closest to the declared one (a declared component stays where its slot
/// keeps its type; the others fill the remaining slots of their type in declared order).
/// Orders that differ only among the normal or among the shear components give the same
/// isotropy and symmetry residuals, so they need no reading of their own.
fn readings(declared: &[Component]) -> Vec<Vec<Component>> {
    let n = declared.len();
    let nshear = declared.iter().filter(|c| c.is_shear()).count();
    let mut out = Vec::new();
    for mask in 0u32..(1 << n) {
        if mask.count_ones() as usize != nshear {
            continue;
        }
        let shear_slot = |i: usize| mask >> i & 1 == 1;
        let mut order: Vec<Option<Component>> =
            (0..n).map(|i| (declared[i].is_shear() == shear_slot(i)).then_some(declared[i])).collect();
        let mut spare =
            declared.iter().enumerate().filter(|(i, c)| c.is_shear() != shear_slot(*i)).map(|(_, c)| *c);
        let spare: Vec<Component> = spare.by_ref().collect();
        for c in spare {
            let slot =
                (0..n).find(|&i| order[i].is_none() && shear_slot(i) == c.is_shear()).expect("counts match");
            order[slot] = Some(c);
        }
        out.push(order.into_iter().map(|c| c.expect("every slot filled")).collect());
    }
    out
}

/// How a tangent fits one reading.
fn fit(kind: PointKind, order: &[Component], shear: ShearMeasure, tangent: &[f64]) -> Hypothesis {
    let conv = Convention::with_order(kind, order, shear).expect("a permutation of the kind's components");
    let m = canonical_mandel(&conv, tangent);
    let present: Vec<usize> = kind.default_components().iter().map(|c| canonical_slot(*c)).collect();
    Hypothesis {
        order: order.to_vec(),
        shear,
        isotropy: isotropy_residual(&m, &present),
        asymmetry: asymmetry(&m),
    }
}

/// Slots in which two orders differ; a different shear measure counts as one more.
fn distance(a: &Hypothesis, b: &Hypothesis) -> usize {
    a.order.iter().zip(&b.order).filter(|(x, y)| x != y).count() + usize::from(a.shear != b.shear)
}

/// What the elastic tangent `tangent` (column-major, routine order; a numerical one is best, a
/// returned one may carry the very flaw under test) says about the declared `conv`. `tol`
/// bounds the isotropy and symmetry residuals of a fitting reading.
pub fn analyse(conv: &Convention, tangent: &[f64], tol: f64) -> Finding {
    let kind = conv.kind();
    if kind.is_cohesive() {
        return Finding::NotApplicable {
            why: "a cohesive law has no elastic relation between its opening and slip stiffnesses".into(),
        };
    }
    if kind == PointKind::Uniaxial {
        return Finding::NotApplicable { why: "a uniaxial point has one component".into() };
    }
    if tangent.iter().any(|x| !x.is_finite()) || tangent.iter().all(|&x| x == 0.0) {
        return Finding::Inconclusive { why: "the elastic tangent is zero or not finite".into() };
    }
    let declared = fit(kind, conv.order(), conv.shear(), tangent);
    let mut all = Vec::new();
    for order in readings(conv.order()) {
        for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
            all.push(fit(kind, &order, shear, tangent));
        }
    }
    // The reading closest to the declared one among those that fit by `key`.
    let closest = |key: fn(&Hypothesis) -> f64| -> Option<Hypothesis> {
        all.iter().filter(|h| key(h) <= tol).min_by_key(|h| distance(h, &declared)).cloned()
    };
    let best_iso = all.iter().map(|h| h.isotropy).fold(f64::INFINITY, f64::min);
    if best_iso <= tol {
        if declared.isotropy <= tol {
            return Finding::AsDeclared {
                evidence: format!(
                    "isotropic elastic response, residual {:.1e}; the order among the normal and among the \
                     shear components makes no difference to it",
                    declared.isotropy
                ),
            };
        }
        let behaves = closest(|h| h.isotropy).expect("one reading fits");
        let evidence = format!(
            "isotropic in that reading, residual {:.1e}; as declared {:.1e}",
            behaves.isotropy, declared.isotropy
        );
        return Finding::Other { behaves, declared, evidence };
    }
    // Anisotropic: major symmetry is the only evidence. With engineering shear every choice of
    // shear slots keeps a symmetric tangent symmetric, so symmetry tells the shear measure
    // (through the normal/shear coupling), not the order.
    let symmetric: Vec<&Hypothesis> = all.iter().filter(|h| h.asymmetry <= tol).collect();
    let aniso = format!("the elastic response is anisotropic (isotropy residual {best_iso:.1e})");
    let unknown_order = "the order of the components cannot be told from it";
    let Some(first) = symmetric.first() else {
        return Finding::Inconclusive { why: format!("{aniso} and unsymmetric in every reading") };
    };
    if symmetric.iter().any(|h| h.shear != first.shear) {
        return Finding::Inconclusive {
            why: format!(
                "{aniso} and symmetric with either shear measure: its coupling between normal and shear \
                 components is too weak to tell the shear measure, and {unknown_order}"
            ),
        };
    }
    let measure = |m: ShearMeasure| match m {
        ShearMeasure::Engineering => "engineering",
        ShearMeasure::Tensor => "tensor",
    };
    if declared.asymmetry <= tol {
        return Finding::AsDeclared {
            evidence: format!(
                "{aniso}, symmetric only with {} shear, as declared ({:.1e}); {unknown_order}",
                measure(declared.shear),
                declared.asymmetry
            ),
        };
    }
    let behaves = (*symmetric.iter().min_by_key(|h| distance(h, &declared)).expect("one fits")).clone();
    let evidence = format!(
        "{aniso}, symmetric only with {} shear ({:.1e}), not as declared ({:.1e}){}",
        measure(behaves.shear),
        behaves.asymmetry,
        declared.asymmetry,
        if symmetric.len() > 1 { format!("; {unknown_order}") } else { String::new() }
    );
    Finding::Other { behaves, declared, evidence }
}

/// The numerical elastic tangent at the start: around a zero increment, by the complex step
/// when the routine has a twin, else by central differences.
pub fn elastic_tangent(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
) -> Result<(Vec<f64>, Scheme), crate::routine::Fault> {
    let info = caller.info().clone();
    let n = info.convention.ncomp();
    let mut d =
        Driver::new(&info, env.props, env.start.clone()).map_err(crate::routine::Fault::Unsupported)?;
    d.set_increment(&vec![0.0; n], 0.0, 1.0);
    d.base_call(caller)?;
    let scheme = if caller.has_complex() { Scheme::ComplexStep } else { Scheme::Central };
    let h = env.settings.scheme(scheme).rel_step * d.strain_scale(env.settings.step_floor);
    let mut t = vec![0.0; n * n];
    for j in 0..n {
        scheme.column(&mut d, caller, Direction::Strain(j), h, &mut t[j * n..(j + 1) * n])?;
    }
    Ok((t, scheme))
}

impl Probe for Conventions {
    fn name(&self) -> &'static str {
        "conventions"
    }
    fn needs(&self) -> &'static str {
        "the stress update around a zero increment from the start (an elastic response there)"
    }
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, String> {
        let tol = env.spec.tol.unwrap_or(DEFAULT_TOL);
        let conv = caller.info().convention.clone();
        let (t, scheme) = match elastic_tangent(caller, env) {
            Ok(x) => x,
            Err(f) => return Ok(super::faulted("conventions", 1, &f)),
        };
        let finding = analyse(&conv, &t, tol);
        let status = match finding {
            Finding::Other { .. } => ProbeStatus::Fail,
            Finding::AsDeclared { .. } => ProbeStatus::Pass,
            Finding::Inconclusive { .. } | Finding::NotApplicable { .. } => ProbeStatus::Skipped,
        };
        let mut r = ProbeResult::new("conventions", status, finding.sentence());
        r.tol = Some(tol);
        r.details.push(format!(
            "the elastic tangent at the start ({}, around a zero increment) read under every order of the \
             components with either shear measure",
            scheme.name()
        ));
        Ok(r)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Isotropic stiffness in a convention's Voigt form (column-major): Mandel 3κ P_vol +
    /// 2μ P_dev, turned into the routine's form by the convention.
    fn isotropic(conv: &Convention, lambda: f64, mu: f64) -> Vec<f64> {
        let n = conv.ncomp();
        let mut t = vec![0.0; n * n];
        for (i, ci) in conv.order().iter().enumerate() {
            for (j, cj) in conv.order().iter().enumerate() {
                t[i + j * n] = match (ci.is_shear(), cj.is_shear()) {
                    (false, false) => lambda + if i == j { 2.0 * mu } else { 0.0 },
                    (true, true) if i == j => 2.0 * mu,
                    _ => 0.0,
                };
            }
        }
        conv.tangent_from_mandel(&mut t);
        t
    }

    fn conv(labels: &[&str], shear: ShearMeasure) -> Convention {
        let kind = if labels.len() == 6 { PointKind::Solid3d } else { PointKind::PlaneStrain };
        Convention::from_labels(kind, labels, shear).unwrap()
    }

    const DEFAULT: [&str; 6] = ["11", "22", "33", "23", "13", "12"];

    // λ, μ of steel, E = 200 GPa, ν = 0.3: λ = Eν/((1+ν)(1−2ν)), μ = E/(2(1+ν)).
    const LAMBDA: f64 = 115384.61538461539;
    const MU: f64 = 76923.07692307692;

    #[test]
    fn an_isotropic_response_behaves_as_declared() {
        for shear in [ShearMeasure::Engineering, ShearMeasure::Tensor] {
            let c = conv(&DEFAULT, shear);
            let f = analyse(&c, &isotropic(&c, LAMBDA, MU), DEFAULT_TOL);
            assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        }
    }

    #[test]
    fn a_wrong_shear_measure_is_named() {
        // The routine uses tensor shear; the manifest declares engineering.
        let actual = conv(&DEFAULT, ShearMeasure::Tensor);
        let declared = conv(&DEFAULT, ShearMeasure::Engineering);
        let f = analyse(&declared, &isotropic(&actual, LAMBDA, MU), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.shear, ShearMeasure::Tensor);
        assert_eq!(behaves.order, declared.order(), "the closest order: the declared one");
        assert!(f.sentence().contains("with tensor shear; the manifest declares"), "{}", f.sentence());
    }

    #[test]
    fn a_normal_and_shear_slot_swapped_is_named() {
        // Plane strain in 11 22 12 33 declared as the default 11 22 33 12.
        let actual = conv(&["11", "22", "12", "33"], ShearMeasure::Engineering);
        let declared = conv(&["11", "22", "33", "12"], ShearMeasure::Engineering);
        let f = analyse(&declared, &isotropic(&actual, LAMBDA, MU), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.order, actual.order());
        assert_eq!(behaves.shear, ShearMeasure::Engineering);
        assert!(
            f.sentence().starts_with("behaves as order 11 22 12 33 with engineering shear"),
            "{}",
            f.sentence()
        );
    }

    #[test]
    fn shear_orders_among_themselves_make_no_difference_to_an_isotropic_response() {
        let actual = conv(&["11", "22", "33", "12", "13", "23"], ShearMeasure::Engineering);
        let declared = conv(&DEFAULT, ShearMeasure::Engineering);
        let f = analyse(&declared, &isotropic(&actual, LAMBDA, MU), DEFAULT_TOL);
        assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        assert!(f.sentence().contains("makes no difference"), "{}", f.sentence());
    }

    /// An orthotropic-like stiffness with normal/shear coupling: an isotropic one plus a
    /// symmetric positive coupling between 11 and 12 (Mandel), as a rotated orthotropic
    /// material has.
    fn coupled(conv: &Convention) -> Vec<f64> {
        let n = conv.ncomp();
        let mut t = isotropic(conv, LAMBDA, MU);
        conv.tangent_to_mandel(&mut t);
        let (p, q) = (conv.position(Component::C11).unwrap(), conv.position(Component::C12).unwrap());
        t[p + q * n] += 0.2 * MU;
        t[q + p * n] += 0.2 * MU;
        t[p + p * n] += 0.5 * MU;
        conv.tangent_from_mandel(&mut t);
        t
    }

    #[test]
    fn an_anisotropic_response_tells_the_shear_measure_only_through_its_coupling() {
        let actual = conv(&DEFAULT, ShearMeasure::Tensor);
        let declared = conv(&DEFAULT, ShearMeasure::Engineering);
        let f = analyse(&declared, &coupled(&actual), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.shear, ShearMeasure::Tensor);
        let f = analyse(&actual, &coupled(&actual), DEFAULT_TOL);
        assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        // Engineering shear, declared so: symmetric in every choice of shear slots, so the
        // measure is confirmed and the order is said to be unknown.
        let f = analyse(&declared, &coupled(&declared), DEFAULT_TOL);
        assert!(matches!(f, Finding::AsDeclared { .. }), "{f:?}");
        assert!(f.sentence().contains("cannot be told"), "{}", f.sentence());
        // Engineering shear declared as tensor: named.
        let f = analyse(&actual, &coupled(&declared), DEFAULT_TOL);
        let Finding::Other { behaves, .. } = &f else { panic!("{f:?}") };
        assert_eq!(behaves.shear, ShearMeasure::Engineering);

        // Without coupling (axes along the global ones) it cannot tell.
        let mut t = isotropic(&actual, LAMBDA, MU);
        t[0] *= 1.5;
        let f = analyse(&declared, &t, DEFAULT_TOL);
        assert!(matches!(f, Finding::Inconclusive { .. }), "{f:?}");
    }

    #[test]
    fn cohesive_and_uniaxial_points_are_not_applicable() {
        let c = Convention::new(PointKind::Cohesive3d, ShearMeasure::Engineering);
        assert!(matches!(
            analyse(&c, &[1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0], 1e-6),
            Finding::NotApplicable { .. }
        ));
        let c = Convention::new(PointKind::Uniaxial, ShearMeasure::Engineering);
        assert!(matches!(analyse(&c, &[1.0], 1e-6), Finding::NotApplicable { .. }));
    }

    #[test]
    fn one_reading_per_choice_of_shear_slots() {
        let r = readings(PointKind::Solid3d.default_components());
        assert_eq!(r.len(), 20, "6 choose 3");
        assert_eq!(r.iter().filter(|o| o.as_slice() == PointKind::Solid3d.default_components()).count(), 1);
        assert_eq!(readings(PointKind::PlaneStrain.default_components()).len(), 4);
        let swapped = readings(&[Component::C11, Component::C22, Component::C33, Component::C12]);
        assert!(swapped.contains(&vec![Component::C11, Component::C22, Component::C12, Component::C33]));
    }
}
