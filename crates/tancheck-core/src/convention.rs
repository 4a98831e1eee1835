//! Kinds of material point, component order, shear measure, and Mandel form.
//!
//! A routine works in its own order and shear measure. tancheck compares in Mandel form,
//! where a symmetric tensor's shear components carry a factor √2 (stress and tensor strain
//! alike), so that the Euclidean norm of a Mandel vector is the tensor's Frobenius norm and
//! the Frobenius norm of a Mandel tangent does not depend on the order or the shear measure.

use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// The kind of material point: which components a routine receives.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum PointKind {
    /// Three-dimensional solid: 11, 22, 33, 23, 13, 12.
    #[serde(rename = "solid-3d")]
    Solid3d,
    /// Plane strain: 11, 22, 33, 12 with ε33 held at zero by the driver.
    PlaneStrain,
    /// Axisymmetric: 11 (radial), 22 (axial), 33 (hoop), 12.
    Axisymmetric,
    /// Plane stress: 11, 22, 12 (σ33 = 0 is the routine's business).
    PlaneStress,
    /// Uniaxial: 11.
    Uniaxial,
    /// Cohesive interface in 3D: opening, first slip, second slip.
    #[serde(rename = "cohesive-3d")]
    Cohesive3d,
    /// Cohesive interface in 2D: opening, slip.
    #[serde(rename = "cohesive-2d")]
    Cohesive2d,
}

impl PointKind {
    pub const ALL: [PointKind; 7] = [
        PointKind::Solid3d,
        PointKind::PlaneStrain,
        PointKind::Axisymmetric,
        PointKind::PlaneStress,
        PointKind::Uniaxial,
        PointKind::Cohesive3d,
        PointKind::Cohesive2d,
    ];

    /// Components this kind carries, in the default order.
    pub fn default_components(self) -> &'static [Component] {
        use Component::*;
        match self {
            PointKind::Solid3d => &[C11, C22, C33, C23, C13, C12],
            PointKind::PlaneStrain | PointKind::Axisymmetric => &[C11, C22, C33, C12],
            PointKind::PlaneStress => &[C11, C22, C12],
            PointKind::Uniaxial => &[C11],
            PointKind::Cohesive3d => &[Opening, Slip1, Slip2],
            PointKind::Cohesive2d => &[Opening, Slip1],
        }
    }

    pub fn ncomp(self) -> usize {
        self.default_components().len()
    }

    /// The canonical slots (11 22 33 23 13 12 as 0..6) a path drives at a point of this
    /// kind: its components' slots, but for a plane-strain point not 33, whose strain stays 0
    /// by its kind (σ33 is the reaction to it; a plane-strain point on a hydrostatic path was
    /// driven in ε33, which no plane-strain solver does; a user-style sweep). The check still
    /// perturbs ε33 for the tangent's column 33.
    pub fn path_slots(self) -> &'static [usize] {
        match self {
            PointKind::Solid3d => &[0, 1, 2, 3, 4, 5],
            PointKind::PlaneStrain => &[0, 1, 5],
            PointKind::Axisymmetric => &[0, 1, 2, 5],
            PointKind::PlaneStress => &[0, 1, 5],
            PointKind::Uniaxial => &[0],
            PointKind::Cohesive3d => &[0, 1, 2],
            PointKind::Cohesive2d => &[0, 1],
        }
    }

    pub fn is_cohesive(self) -> bool {
        matches!(self, PointKind::Cohesive3d | PointKind::Cohesive2d)
    }

    /// The name with its article: "a plane-strain", "an axisymmetric" (messages read "a
    /// axisymmetric point"; a user-style sweep).
    pub fn with_article(self) -> String {
        let name = self.name();
        format!("{} {name}", if name.starts_with(['a', 'e', 'i', 'o']) { "an" } else { "a" })
    }

    pub fn name(self) -> &'static str {
        match self {
            PointKind::Solid3d => "solid-3d",
            PointKind::PlaneStrain => "plane-strain",
            PointKind::Axisymmetric => "axisymmetric",
            PointKind::PlaneStress => "plane-stress",
            PointKind::Uniaxial => "uniaxial",
            PointKind::Cohesive3d => "cohesive-3d",
            PointKind::Cohesive2d => "cohesive-2d",
        }
    }
}

impl fmt::Display for PointKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for PointKind {
    type Err = ConventionError;
    fn from_str(s: &str) -> Result<Self, ConventionError> {
        PointKind::ALL.into_iter().find(|k| k.name() == s).ok_or_else(|| {
            let names: Vec<_> = PointKind::ALL.iter().map(|k| k.name()).collect();
            ConventionError::UnknownKind { given: s.into(), known: names.join(", ") }
        })
    }
}

/// One stress/strain component (or cohesive traction/separation component).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Component {
    C11,
    C22,
    C33,
    C23,
    C13,
    C12,
    /// Cohesive opening (normal separation).
    Opening,
    /// Cohesive first slip.
    Slip1,
    /// Cohesive second slip.
    Slip2,
}

impl Component {
    /// A shear component of a symmetric tensor (Mandel factor √2).
    pub fn is_shear(self) -> bool {
        matches!(self, Component::C23 | Component::C13 | Component::C12)
    }

    pub fn label(self) -> &'static str {
        match self {
            Component::C11 => "11",
            Component::C22 => "22",
            Component::C33 => "33",
            Component::C23 => "23",
            Component::C13 => "13",
            Component::C12 => "12",
            Component::Opening => "n",
            Component::Slip1 => "s1",
            Component::Slip2 => "s2",
        }
    }

    /// Tensor indices (0-based) of a solid component.
    pub fn indices(self) -> Option<(usize, usize)> {
        match self {
            Component::C11 => Some((0, 0)),
            Component::C22 => Some((1, 1)),
            Component::C33 => Some((2, 2)),
            Component::C23 => Some((1, 2)),
            Component::C13 => Some((0, 2)),
            Component::C12 => Some((0, 1)),
            _ => None,
        }
    }

    pub fn from_label(s: &str) -> Option<Component> {
        let s = s.trim();
        let all = [
            Component::C11,
            Component::C22,
            Component::C33,
            Component::C23,
            Component::C13,
            Component::C12,
            Component::Opening,
            Component::Slip1,
            Component::Slip2,
        ];
        // 32 is 23, 31 is 13, 21 is 12 for a symmetric tensor.
        let s = match s {
            "32" => "23",
            "31" => "13",
            "21" => "12",
            other => other,
        };
        all.into_iter().find(|c| c.label() == s)
    }
}

impl fmt::Display for Component {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.label())
    }
}

/// How a routine measures shear strain.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, Default, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum ShearMeasure {
    /// γ = 2ε (the usual choice in finite-element codes).
    #[default]
    Engineering,
    /// ε, the tensor component.
    Tensor,
}

/// The conventions of one routine: kind, component order, shear measure.
#[derive(Clone, Debug, PartialEq)]
pub struct Convention {
    kind: PointKind,
    order: Vec<Component>,
    shear: ShearMeasure,
    /// Mandel factor for each component of a stress-like vector, in routine order.
    stress_factor: Vec<f64>,
    /// Mandel factor for each component of a strain-like vector, in routine order.
    strain_factor: Vec<f64>,
    /// f_σ(i) / f_ε(j) at i + j n: the factor of each tangent entry into Mandel form, worked
    /// out once (a comparison converts two tangents every increment).
    tangent_factor: Vec<f64>,
}

/// A convention that cannot be built.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ConventionError {
    #[error("component order for {kind} has {got} entries; {} point has {want}: {expected}", .kind.with_article())]
    WrongCount { kind: PointKind, got: usize, want: usize, expected: String },
    #[error("component `{label}` is not part of {} point (its components are {expected})", .kind.with_article())]
    Foreign { kind: PointKind, label: String, expected: String },
    #[error("component `{label}` appears twice in the order")]
    Repeated { label: String },
    #[error("unknown kind of point `{given}`; expected one of {known}")]
    UnknownKind { given: String, known: String },
    #[error("unknown component `{label}`; use 11, 22, 33, 23, 13, 12 (solids) or n, s1, s2 (cohesive)")]
    Unknown { label: String },
}

impl Convention {
    /// The default order of `kind` with the given shear measure.
    pub fn new(kind: PointKind, shear: ShearMeasure) -> Convention {
        Convention::with_order(kind, kind.default_components(), shear).expect("the default order is valid")
    }

    /// A permutation of the kind's components.
    pub fn with_order(
        kind: PointKind,
        order: &[Component],
        shear: ShearMeasure,
    ) -> Result<Convention, ConventionError> {
        let want = kind.default_components();
        let expected = || want.iter().map(|c| c.label()).collect::<Vec<_>>().join(", ");
        if order.len() != want.len() {
            return Err(ConventionError::WrongCount {
                kind,
                got: order.len(),
                want: want.len(),
                expected: expected(),
            });
        }
        for (i, c) in order.iter().enumerate() {
            if !want.contains(c) {
                return Err(ConventionError::Foreign { kind, label: c.label().into(), expected: expected() });
            }
            if order[..i].contains(c) {
                return Err(ConventionError::Repeated { label: c.label().into() });
            }
        }
        let s2 = std::f64::consts::SQRT_2;
        let stress_factor = order.iter().map(|c| if c.is_shear() { s2 } else { 1.0 }).collect();
        let strain_factor = order
            .iter()
            .map(|c| match (c.is_shear(), shear) {
                (false, _) => 1.0,
                (true, ShearMeasure::Tensor) => s2,
                (true, ShearMeasure::Engineering) => 1.0 / s2,
            })
            .collect();
        let (stress_factor, strain_factor): (Vec<f64>, Vec<f64>) = (stress_factor, strain_factor);
        let n = order.len();
        let mut tangent_factor = vec![0.0; n * n];
        for j in 0..n {
            for i in 0..n {
                tangent_factor[i + j * n] = stress_factor[i] / strain_factor[j];
            }
        }
        Ok(Convention { kind, order: order.to_vec(), shear, stress_factor, strain_factor, tangent_factor })
    }

    /// Parse an order given as labels, e.g. `["11","22","33","12","13","23"]`.
    pub fn from_labels(
        kind: PointKind,
        labels: &[&str],
        shear: ShearMeasure,
    ) -> Result<Convention, ConventionError> {
        let mut order = Vec::with_capacity(labels.len());
        for l in labels {
            order.push(
                Component::from_label(l)
                    .ok_or_else(|| ConventionError::Unknown { label: (*l).to_string() })?,
            );
        }
        Convention::with_order(kind, &order, shear)
    }

    pub fn kind(&self) -> PointKind {
        self.kind
    }
    pub fn order(&self) -> &[Component] {
        &self.order
    }
    pub fn shear(&self) -> ShearMeasure {
        self.shear
    }
    pub fn ncomp(&self) -> usize {
        self.order.len()
    }

    /// Position of a component in the routine's order.
    pub fn position(&self, c: Component) -> Option<usize> {
        self.order.iter().position(|&o| o == c)
    }

    /// Mandel factor of component `i` (routine order) of a stress-like vector.
    pub fn stress_factor(&self, i: usize) -> f64 {
        self.stress_factor[i]
    }

    /// Mandel factor of component `i` (routine order) of a strain-like vector.
    pub fn strain_factor(&self, i: usize) -> f64 {
        self.strain_factor[i]
    }

    /// Routine-order strain vector → Mandel (still in routine order).
    pub fn strain_to_mandel(&self, v: &[f64], out: &mut [f64]) {
        for i in 0..v.len() {
            out[i] = v[i] * self.strain_factor[i];
        }
    }

    /// Mandel (routine order) → routine-order strain vector.
    pub fn strain_from_mandel(&self, m: &[f64], out: &mut [f64]) {
        for i in 0..m.len() {
            out[i] = m[i] / self.strain_factor[i];
        }
    }

    /// Routine-order stress vector → Mandel (routine order).
    pub fn stress_to_mandel(&self, v: &[f64], out: &mut [f64]) {
        for i in 0..v.len() {
            out[i] = v[i] * self.stress_factor[i];
        }
    }

    /// Mandel (routine order) → routine-order stress vector.
    pub fn stress_from_mandel(&self, m: &[f64], out: &mut [f64]) {
        for i in 0..m.len() {
            out[i] = m[i] / self.stress_factor[i];
        }
    }

    /// A column-major routine tangent (∂σᵢ/∂Δεⱼ) → Mandel form, in place:
    /// C_M(i,j) = f_σ(i) C(i,j) / f_ε(j).
    pub fn tangent_to_mandel(&self, t: &mut [f64]) {
        let nn = self.ncomp() * self.ncomp();
        for (x, f) in t[..nn].iter_mut().zip(&self.tangent_factor[..nn]) {
            *x *= f;
        }
    }

    /// [`Convention::tangent_to_mandel`] of `t` into `out` (both n × n).
    pub fn tangent_to_mandel_into(&self, t: &[f64], out: &mut [f64]) {
        let nn = self.ncomp() * self.ncomp();
        for ((o, x), f) in out[..nn].iter_mut().zip(&t[..nn]).zip(&self.tangent_factor[..nn]) {
            *o = x * f;
        }
    }

    /// Mandel tangent (column-major, routine order) → the routine's form, in place.
    pub fn tangent_from_mandel(&self, t: &mut [f64]) {
        let n = self.ncomp();
        for j in 0..n {
            for i in 0..n {
                t[i + j * n] *= self.strain_factor[j] / self.stress_factor[i];
            }
        }
    }

    /// A tensor strain given by its canonical components (11, 22, 33, 23, 13, 12 tensor
    /// values; or n, s1, s2 for cohesive points) → the routine's vector. Components the
    /// kind lacks are dropped, and a plane-strain point's ε33 is 0 whatever the slot holds
    /// (its kind holds it there: [`PointKind::path_slots`]).
    pub fn strain_from_canonical(&self, canon: &[f64; 6], out: &mut [f64]) {
        let fixed33 = self.kind == PointKind::PlaneStrain;
        for (i, c) in self.order.iter().enumerate() {
            let v = if fixed33 && *c == Component::C33 { 0.0 } else { canon[canonical_slot(*c)] };
            out[i] = match (c.is_shear(), self.shear) {
                (true, ShearMeasure::Engineering) => 2.0 * v,
                _ => v,
            };
        }
    }

    /// The routine's strain vector → canonical tensor components (missing ones are zero).
    pub fn strain_to_canonical(&self, v: &[f64], out: &mut [f64; 6]) {
        *out = [0.0; 6];
        for (i, c) in self.order.iter().enumerate() {
            out[canonical_slot(*c)] = match (c.is_shear(), self.shear) {
                (true, ShearMeasure::Engineering) => 0.5 * v[i],
                _ => v[i],
            };
        }
    }

    /// The routine's stress vector → canonical components (missing ones are zero).
    pub fn stress_to_canonical(&self, v: &[f64], out: &mut [f64; 6]) {
        *out = [0.0; 6];
        for (i, c) in self.order.iter().enumerate() {
            out[canonical_slot(*c)] = v[i];
        }
    }

    /// Canonical stress components → the routine's order.
    pub fn stress_from_canonical(&self, canon: &[f64; 6], out: &mut [f64]) {
        for (i, c) in self.order.iter().enumerate() {
            out[i] = canon[canonical_slot(*c)];
        }
    }

    /// Label of the tangent entry (i, j): "σ11/ε23" style, in ASCII: "11/23".
    pub fn entry_label(&self, i: usize, j: usize) -> String {
        format!("{}/{}", self.order[i].label(), self.order[j].label())
    }
}

/// Slot of a component in the canonical 6-vector (11, 22, 33, 23, 13, 12; cohesive n, s1, s2
/// use slots 0, 1, 2).
pub fn canonical_slot(c: Component) -> usize {
    match c {
        Component::C11 | Component::Opening => 0,
        Component::C22 | Component::Slip1 => 1,
        Component::C33 | Component::Slip2 => 2,
        Component::C23 => 3,
        Component::C13 => 4,
        Component::C12 => 5,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    // "an axisymmetric point", "a plane-strain point" (a message read "a axisymmetric point").
    #[test]
    fn kinds_take_their_article() {
        let e = ConventionError::Foreign {
            kind: PointKind::Axisymmetric,
            label: "23".into(),
            expected: "11, 22, 33, 12".into(),
        };
        assert!(e.to_string().contains("not part of an axisymmetric point"), "{e}");
        assert_eq!(PointKind::PlaneStrain.with_article(), "a plane-strain");
        assert_eq!(PointKind::Uniaxial.with_article(), "a uniaxial");
    }

    fn arb_solid_convention() -> impl Strategy<Value = Convention> {
        (
            Just(PointKind::Solid3d),
            any::<bool>(),
            Just(()).prop_perturb(|_, mut rng| {
                let mut o = PointKind::Solid3d.default_components().to_vec();
                for i in (1..o.len()).rev() {
                    let j = (rng.next_u32() as usize) % (i + 1);
                    o.swap(i, j);
                }
                o
            }),
        )
            .prop_map(|(k, eng, order)| {
                let shear = if eng { ShearMeasure::Engineering } else { ShearMeasure::Tensor };
                Convention::with_order(k, &order, shear).unwrap()
            })
    }

    fn fro(v: &[f64]) -> f64 {
        v.iter().map(|x| x * x).sum::<f64>().sqrt()
    }

    proptest! {
        #[test]
        fn strain_round_trips(conv in arb_solid_convention(), e in prop::array::uniform6(-1e-2..1e-2f64)) {
            let mut v = vec![0.0; 6];
            conv.strain_from_canonical(&e, &mut v);
            let mut back = [0.0; 6];
            conv.strain_to_canonical(&v, &mut back);
            for k in 0..6 { prop_assert!((back[k] - e[k]).abs() <= 1e-18); }
            let mut m = vec![0.0; 6];
            conv.strain_to_mandel(&v, &mut m);
            let mut v2 = vec![0.0; 6];
            conv.strain_from_mandel(&m, &mut v2);
            for k in 0..6 { prop_assert!((v2[k] - v[k]).abs() <= 1e-15 * v[k].abs().max(1e-300)); }
        }

        // The Mandel norm equals the tensor's Frobenius norm whatever the order and shear
        // measure: ‖ε‖² = Σᵢⱼ εᵢⱼ² (definition of the Frobenius norm of a symmetric tensor).
        #[test]
        fn mandel_norm_is_invariant(conv in arb_solid_convention(), e in prop::array::uniform6(-1.0..1.0f64)) {
            let tensor_norm = (e[0]*e[0] + e[1]*e[1] + e[2]*e[2]
                + 2.0*(e[3]*e[3] + e[4]*e[4] + e[5]*e[5])).sqrt();
            let mut v = vec![0.0; 6];
            conv.strain_from_canonical(&e, &mut v);
            let mut m = vec![0.0; 6];
            conv.strain_to_mandel(&v, &mut m);
            prop_assert!((fro(&m) - tensor_norm).abs() <= 1e-14 * tensor_norm.max(1e-300));
            let mut s = vec![0.0; 6];
            conv.stress_from_canonical(&e, &mut s);
            conv.stress_to_mandel(&s.clone(), &mut m);
            prop_assert!((fro(&m) - tensor_norm).abs() <= 1e-14 * tensor_norm.max(1e-300));
        }

        // A linear map written in two conventions has the same Mandel-Frobenius norm, and
        // the Mandel form round-trips.
        #[test]
        fn tangent_norm_is_invariant(a in arb_solid_convention(), b in arb_solid_convention(),
                                     entries in prop::collection::vec(-1.0..1.0f64, 36)) {
            // Build the map in convention a from canonical Mandel entries.
            let base = Convention::new(PointKind::Solid3d, ShearMeasure::Tensor);
            let to_conv = |conv: &Convention| {
                let mut t = vec![0.0; 36];
                for (j, cj) in conv.order().iter().enumerate() {
                    for (i, ci) in conv.order().iter().enumerate() {
                        let bi = base.position(*ci).unwrap();
                        let bj = base.position(*cj).unwrap();
                        t[i + 6 * j] = entries[bi + 6 * bj];
                    }
                }
                conv.tangent_from_mandel(&mut t);
                t
            };
            let mut ta = to_conv(&a);
            let mut tb = to_conv(&b);
            let orig_a = ta.clone();
            a.tangent_to_mandel(&mut ta);
            b.tangent_to_mandel(&mut tb);
            prop_assert!((fro(&ta) - fro(&tb)).abs() <= 1e-13 * fro(&entries));
            prop_assert!((fro(&ta) - fro(&entries)).abs() <= 1e-13 * fro(&entries));
            a.tangent_from_mandel(&mut ta);
            for k in 0..36 { prop_assert!((ta[k] - orig_a[k]).abs() <= 1e-13 * orig_a[k].abs().max(1e-12)); }
        }
    }

    #[test]
    fn kind_names_are_the_same_in_files_and_on_the_command_line() {
        for k in PointKind::ALL {
            let json = serde_json::to_string(&k).unwrap();
            assert_eq!(json, format!("\"{}\"", k.name()));
            assert_eq!(k.name().parse::<PointKind>().unwrap(), k);
        }
    }

    #[test]
    fn bad_orders_are_explained() {
        let e = Convention::from_labels(PointKind::PlaneStress, &["11", "22"], ShearMeasure::Engineering)
            .unwrap_err();
        assert!(e.to_string().contains("has 2 entries"), "{e}");
        let e =
            Convention::from_labels(PointKind::PlaneStress, &["11", "22", "23"], ShearMeasure::Engineering)
                .unwrap_err();
        assert!(e.to_string().contains("not part of a plane-stress"), "{e}");
        let e = Convention::from_labels(
            PointKind::Solid3d,
            &["11", "11", "33", "23", "13", "12"],
            ShearMeasure::Engineering,
        )
        .unwrap_err();
        assert!(e.to_string().contains("twice"), "{e}");
        assert_eq!(PointKind::ALL.iter().map(|k| k.ncomp()).collect::<Vec<_>>(), vec![6, 4, 4, 3, 1, 3, 2]);
    }
}
