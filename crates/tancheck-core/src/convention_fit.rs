//! Reading a numerical elastic tangent under every hypothesis of component order and shear
//! measure (the pure part of the conventions probe, crate::probe::conventions, whose first
//! comment says how): a tangent in, a finding out. The check uses it on the first elastic
//! increment at no extra cost, so it sits below both.

use crate::convention::{canonical_slot, Component, Convention, PointKind, ShearMeasure};

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
                "behaves as {}; it is declared as {} ({evidence})",
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
pub(crate) fn readings(declared: &[Component]) -> Vec<Vec<Component>> {
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
        // The order named is the declared one where that fits: an isotropic response cannot
        // tell the order among the normal or among the shear components (a user fixing the
        // order the warning named kept a wrong one; a user-style sweep).
        let evidence = format!(
            "isotropic in that reading, residual {:.1e}; as declared {:.1e}; an isotropic response tells the \
             shear measure and which components are normal and which shear, not the order among them",
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
