//! Finite-strain routines with a known verdict: correct ones in every measure, and one
//! flawed variant per cause of the finite-strain diagnosis (`tancheck_core::finite::causes`).
//! C and Fortran versions of the neo-Hookean rows live under `fortran-shim/examples/`.

use tancheck_core::finite::path::Superposed;
use tancheck_core::finite::{
    FiniteModelRoutine, FinitePathSpec, FiniteRoutine, StressMeasure, TangentMeasure,
};

use super::{HypoJaumann, J2Log, NeoHookean, NhFlaw};

/// One row of the finite-strain zoo.
#[derive(Clone, Debug)]
pub struct FiniteZooEntry {
    pub name: &'static str,
    pub model: FiniteZooModel,
    /// The finding a check must reach; `None`: it must pass.
    pub expected: Option<&'static str>,
}

/// The model of a row.
#[derive(Clone, Debug)]
pub enum FiniteZooModel {
    NeoHookean(NeoHookean),
    Hypo(HypoJaumann),
    J2(J2Log),
}

impl FiniteZooModel {
    /// The row's routine (with its complex-step twin).
    pub fn routine(self) -> Box<dyn FiniteRoutine> {
        match self {
            FiniteZooModel::NeoHookean(m) => Box::new(FiniteModelRoutine(m)),
            FiniteZooModel::Hypo(m) => Box::new(FiniteModelRoutine(m)),
            FiniteZooModel::J2(m) => Box::new(FiniteModelRoutine(m)),
        }
    }

    /// The row's properties: [`ZOO_PROPERTIES`], or [`J2_PROPERTIES`] for the J2 rows (the
    /// hypoelastic J2 one included).
    pub fn properties(&self) -> &'static [f64] {
        match self {
            FiniteZooModel::J2(_) => &J2_PROPERTIES,
            FiniteZooModel::Hypo(h) if h.is_plastic() => &J2_PROPERTIES,
            _ => &ZOO_PROPERTIES,
        }
    }

    /// The state at the start of the path: zeros (the reference configuration).
    pub fn start_state(&self) -> Vec<f64> {
        match self {
            FiniteZooModel::J2(_) => vec![0.0; J2Log::NSTATE],
            FiniteZooModel::Hypo(h) if h.is_plastic() => vec![0.0],
            _ => Vec::new(),
        }
    }
}

/// Properties of the elastic rows: E, ν (invented for the zoo).
pub const ZOO_PROPERTIES: [f64; 2] = [1000.0, 0.3];

/// Properties of the J2 rows: E, ν, σy0, H (invented for the zoo; yield in the first
/// increment of the zoo path).
pub const J2_PROPERTIES: [f64; 4] = [1000.0, 0.3, 5.0, 20.0];

/// The path of every row: biaxial stretch (J ≠ 1) with a rigid rotation superposed, so
/// that every measure differs from every other.
pub fn zoo_path() -> FinitePathSpec {
    FinitePathSpec::Biaxial {
        stretch: [1.4, 0.85],
        increments: 3,
        rotation: Some(Superposed { axis: [1.0, 1.0, 1.0], angle: 0.6 }),
    }
}

/// The rows.
pub fn finite_zoo() -> Vec<FiniteZooEntry> {
    use StressMeasure::{Cauchy, Kirchhoff};
    use TangentMeasure::*;
    let nh = |name, s, t, flaw, expected| FiniteZooEntry {
        name,
        model: FiniteZooModel::NeoHookean(NeoHookean::flawed(s, t, flaw)),
        expected,
    };
    vec![
        nh("nh-tau-jaumann", Kirchhoff, TauJaumann, NhFlaw::None, None),
        nh("nh-sigma-jaumann", Cauchy, SigmaJaumann, NhFlaw::None, None),
        nh("nh-tau-truesdell", Kirchhoff, TauTruesdell, NhFlaw::None, None),
        nh("nh-sigma-truesdell", Cauchy, SigmaTruesdell, NhFlaw::None, None),
        nh("nh-green-naghdi", Kirchhoff, TauGreenNaghdi, NhFlaw::None, None),
        nh("nh-dp-df", Cauchy, DpDf, NhFlaw::None, None),
        nh("nh-ds-de", Kirchhoff, DsDe, NhFlaw::None, None),
        FiniteZooEntry {
            name: "j2-log-sigma-jaumann",
            model: FiniteZooModel::J2(J2Log::new(Cauchy, SigmaJaumann)),
            expected: None,
        },
        FiniteZooEntry {
            name: "j2-log-dp-df",
            model: FiniteZooModel::J2(J2Log::new(Kirchhoff, DpDf)),
            expected: None,
        },
        FiniteZooEntry {
            name: "hypo-jaumann",
            model: FiniteZooModel::Hypo(HypoJaumann::new()),
            expected: None,
        },
        FiniteZooEntry { name: "hypo-j2", model: FiniteZooModel::Hypo(HypoJaumann::j2()), expected: None },
        nh(
            "nh-material-as-spatial",
            Kirchhoff,
            TauJaumann,
            NhFlaw::MaterialAsSpatial,
            Some("material-as-spatial"),
        ),
        nh(
            "nh-spatial-as-material",
            Kirchhoff,
            DsDe,
            NhFlaw::OtherRate(TauTruesdell),
            Some("spatial-as-material"),
        ),
        nh(
            "nh-truesdell-for-jaumann",
            Cauchy,
            SigmaJaumann,
            NhFlaw::OtherRate(SigmaTruesdell),
            Some("other-rate"),
        ),
        nh(
            "nh-jaumann-for-green-naghdi",
            Kirchhoff,
            TauGreenNaghdi,
            NhFlaw::OtherRate(TauJaumann),
            Some("other-rate"),
        ),
        nh(
            "nh-geometric-missing",
            Kirchhoff,
            DpDf,
            NhFlaw::GeometricMissing,
            Some("geometric-terms-missing"),
        ),
        nh("nh-missing-over-j", Cauchy, SigmaJaumann, NhFlaw::MissingOverJ, Some("missing-over-j")),
        nh("nh-extra-over-j", Kirchhoff, TauJaumann, NhFlaw::ExtraOverJ, Some("extra-over-j")),
        nh(
            "nh-cauchy-for-kirchhoff",
            Kirchhoff,
            TauJaumann,
            NhFlaw::CauchyForKirchhoff,
            Some("stress-measure"),
        ),
        nh(
            "nh-kirchhoff-for-cauchy",
            Cauchy,
            SigmaJaumann,
            NhFlaw::KirchhoffForCauchy,
            Some("stress-measure"),
        ),
    ]
}
