//! Finite-strain routines with a known verdict: correct ones in every measure, and one
//! flawed variant per cause of the finite-strain diagnosis (`tancheck_core::finite::causes`).
//! C and Fortran versions of the neo-Hookean rows live under `fortran-shim/examples/`.

use tancheck_core::finite::path::Superposed;
use tancheck_core::finite::{FinitePathSpec, StressMeasure, TangentMeasure};

use super::{HypoJaumann, NeoHookean, NhFlaw};

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
}

/// Properties of every row: E, ν (invented for the zoo).
pub const ZOO_PROPERTIES: [f64; 2] = [1000.0, 0.3];

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
            name: "hypo-jaumann",
            model: FiniteZooModel::Hypo(HypoJaumann::new()),
            expected: None,
        },
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
