//! Thermo-elasticity with temperature-dependent modulus, Poisson's ratio and thermal strain,
//! total form at the temperature of the end of the increment.
//!
//! Temperatures are in °C; 20 °C is the reference temperature of every law below (zero
//! thermal strain, ν = ν0, E = E20).
//!
//! Properties `[E20, ν0, ν1, modulus_law, expansion_law, α, (T_1, k_1, T_2, k_2, …)]`:
//!
//! | index | name            | meaning |
//! |-------|-----------------|---------|
//! | 0     | `E20`           | Young's modulus at 20 °C (> 0) |
//! | 1     | `nu0`           | Poisson's ratio at 20 °C |
//! | 2     | `nu1`           | its slope (1/°C): ν(T) = ν0 + ν1 (T − 20), must stay in (−1, 0.5) |
//! | 3     | `modulus_law`   | E(T) = E20 k(T) with k: 0 = none (k = 1); 1 = EN 1993-1-2 Table 3.1, carbon steel k_E,θ; 2 = the table in props[6..] |
//! | 4     | `expansion_law` | ε_th(T): 0 = α (T − 20); 1 = EN 1993-1-2 §3.4.1.1, carbon steel |
//! | 5     | `alpha`         | expansion coefficient of law 0 (1/°C; read but unused by law 1) |
//! | 6..   | `T_i, k_i`      | modulus law 2 only: m ≥ 2 points (T strictly increasing, k ≥ 0), nprop = 6 + 2m |
//!
//! Law codes are exact small integers held as reals. No state.
//!
//! The update: T = `temp[0] + temp[1]` (the end of the increment), ε = strain + dstrain,
//! σ = C(T) (ε − ε_th(T) 1), where 1 has ones on the normal components (11, 22, 33; 11, 22
//! for plane stress; 11 for uniaxial) and C(T) is the isotropic matrix of E(T), ν(T) for the
//! kind of point (the same matrices as the `elastic` model: 3D, the 11-22-33-12 block for
//! plane strain and axisymmetric, the reduced plane-stress matrix, E for uniaxial stress).
//! `stress0` is not read. Outputs: tangent C(T);
//! ∂σ/∂ΔT = C'(T) (ε − ε_th) − C(T) 1 ε_th'(T) (`provides` DSTRESS_DTEMP); stored energy
//! ½ σ·(ε − ε_th 1), dissipated 0 (`provides` ENERGY). Branch 0.
//!
//! Piecewise laws and their kinks: a table is interpolated linearly between its points and
//! extended by its end values (k_E = 1 below 20 °C and 0 above 1200 °C for Table 3.1). The
//! EN 1993-1-2 elongation uses the first range below 750 °C, the constant 1.1e-2 on
//! [750, 860) and the third range from 860 °C up; outside 20..1200 °C the adjacent range's
//! formula continues. At a table point or range boundary the law is evaluated on the segment
//! to its right, so the returned ∂σ/∂T there is the right-hand derivative (the one a positive
//! temperature increment sees), and every segment test is on the real part of T.
//!
//! [`ThermoFlaw::DtempSign`] keeps everything but returns −∂σ/∂ΔT: a routine flawed on
//! purpose (`thermo-dtemp-sign`).

use tancheck_core::routine::provides;
use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{between, fail, point_model, positive, props_or_fail, succeed};
use crate::elastic::Elastic;
use crate::ModelError;

/// Reference temperature of every law (°C).
pub const REFERENCE_TEMPERATURE: f64 = 20.0;

/// EN 1993-1-2:2005 Table 3.1, carbon steel: reduction factor k_E,θ of the modulus
/// (slope of the linear elastic range) at temperature θ (°C), as (θ, k_E,θ).
pub const EN1993_KE_TABLE: [(f64, f64); 13] = [
    (20.0, 1.0),
    (100.0, 1.0),
    (200.0, 0.9),
    (300.0, 0.8),
    (400.0, 0.7),
    (500.0, 0.6),
    (600.0, 0.31),
    (700.0, 0.13),
    (800.0, 0.09),
    (900.0, 0.0675),
    (1000.0, 0.045),
    (1100.0, 0.0225),
    (1200.0, 0.0),
];

/// Boundaries of the ranges of the EN 1993-1-2 §3.4.1.1 elongation (°C).
pub const EN1993_ELONGATION_BREAKS: [f64; 2] = [750.0, 860.0];

/// Which flaw, if any, the thermo model carries.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum ThermoFlaw {
    /// The correct routine.
    #[default]
    None,
    /// ∂σ/∂ΔT is returned with the wrong sign. Expected finding: the tangent passes
    /// everywhere; ∂σ/∂T fails wherever it is not zero, with a relative error of exactly 2.
    DtempSign,
    /// ∂σ/∂ΔT without its thermal-expansion term −C:1 ε_th′ (the stiffness term kept).
    /// Expected finding: `dtemp-partial`.
    PartialDtemp,
    /// The tangent C(T) at the temperature of the start of the increment, where the stress
    /// uses the end one. Expected finding: `start-temperature` wherever the temperature changes
    /// (and E or ν with it); passes at a constant temperature.
    StartTemperature,
}

/// Linear thermo-elasticity with temperature-dependent E, ν and thermal strain.
#[derive(Clone, Debug)]
pub struct Thermo {
    info: RoutineInfo,
    flaw: ThermoFlaw,
}

impl Thermo {
    /// Name of the correct model.
    pub const NAME: &'static str = "thermo";
    /// Name of the model whose ∂σ/∂T has the wrong sign.
    pub const DTEMP_SIGN_NAME: &'static str = "thermo-dtemp-sign";
    /// Name of the model whose ∂σ/∂T misses its thermal-expansion term.
    pub const PARTIAL_DTEMP_NAME: &'static str = "thermo-partial-dtemp";
    /// Name of the model whose tangent is taken at the start temperature.
    pub const START_TEMPERATURE_NAME: &'static str = "thermo-start-temperature";
    /// Meaning of the fixed properties, in order (a user table follows them).
    pub const PROP_NAMES: [&'static str; 6] = ["E20", "nu0", "nu1", "modulus_law", "expansion_law", "alpha"];
    /// Properties before the user table.
    pub const FIXED_PROPS: usize = 6;
    /// Kinds of point the model supports: those of linear elasticity.
    pub const KINDS: [PointKind; 5] = Elastic::KINDS;

    /// The correct model, six properties (no user table).
    pub fn new(kind: PointKind) -> Result<Thermo, ModelError> {
        Thermo::with_flaw(kind, ThermoFlaw::None)
    }

    /// The model returning −∂σ/∂ΔT (named `thermo-dtemp-sign`).
    pub fn dtemp_sign(kind: PointKind) -> Result<Thermo, ModelError> {
        Thermo::with_flaw(kind, ThermoFlaw::DtempSign)
    }

    /// The model with the chosen flaw, six properties, default order, engineering shear.
    pub fn with_flaw(kind: PointKind, flaw: ThermoFlaw) -> Result<Thermo, ModelError> {
        let name = match flaw {
            ThermoFlaw::None => Self::NAME,
            ThermoFlaw::DtempSign => Self::DTEMP_SIGN_NAME,
            ThermoFlaw::PartialDtemp => Self::PARTIAL_DTEMP_NAME,
            ThermoFlaw::StartTemperature => Self::START_TEMPERATURE_NAME,
        };
        if !Self::KINDS.contains(&kind) {
            return Err(ModelError::UnsupportedKind {
                model: name,
                kind,
                supported: "solid-3d, plane-strain, axisymmetric, plane-stress, uniaxial",
            });
        }
        Ok(Thermo {
            info: RoutineInfo {
                name: name.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: 0,
                nprop: Self::FIXED_PROPS,
            },
            flaw,
        })
    }

    /// The same model taking a user modulus table of `points` (T, k) pairs after the fixed
    /// properties: nprop = 6 + 2·points.
    pub fn with_table_points(mut self, points: usize) -> Thermo {
        self.info.nprop = Self::FIXED_PROPS + 2 * points;
        self
    }

    /// The flaw this model carries.
    pub fn flaw(&self) -> ThermoFlaw {
        self.flaw
    }
}

/// Piecewise-linear interpolation of `n ≥ 1` points (strictly increasing abscissae) at `t`,
/// extended by the end values: (value, slope), the slope taken on the segment to the right of
/// `t` (right-hand derivative at a point). Segments are chosen on the real part of `t`.
#[inline]
fn interpolate<S: Scalar>(t: S, n: usize, point: impl Fn(usize) -> (S, S)) -> (S, S) {
    let x = t.re();
    let (t_first, k_first) = point(0);
    if x < t_first.re() {
        return (k_first, S::zero());
    }
    let (mut ta, mut ka) = (t_first, k_first);
    for i in 1..n {
        let (tb, kb) = point(i);
        if x < tb.re() {
            let slope = (kb - ka) / (tb - ta);
            return (ka + slope * (t - ta), slope);
        }
        (ta, ka) = (tb, kb);
    }
    (ka, S::zero())
}

/// EN 1993-1-2 Table 3.1 reduction factor k_E,θ at `t` (°C), linear between rows and held at
/// the end values outside 20..1200 °C: (k_E, dk_E/dT), the slope on the right-hand segment.
pub fn en1993_modulus_factor<S: Scalar>(t: S) -> (S, S) {
    interpolate(t, EN1993_KE_TABLE.len(), |i| {
        let (a, b) = EN1993_KE_TABLE[i];
        (S::cst(a), S::cst(b))
    })
}

/// EN 1993-1-2 §3.4.1.1 thermal elongation Δl/l of carbon steel at `t` (°C):
/// 1.2e-5 θ + 0.4e-8 θ² − 2.416e-4 below 750 °C, 1.1e-2 on [750, 860), 2e-5 θ − 6.2e-3 from
/// 860 °C; (Δl/l, its derivative), ranges chosen on the real part.
pub fn en1993_thermal_elongation<S: Scalar>(t: S) -> (S, S) {
    let x = t.re();
    if x < EN1993_ELONGATION_BREAKS[0] {
        (t * 1.2e-5 + t * t * 0.4e-8 - 2.416e-4, t * 0.8e-8 + 1.2e-5)
    } else if x < EN1993_ELONGATION_BREAKS[1] {
        (S::cst(1.1e-2), S::zero())
    } else {
        (t * 2e-5 - 6.2e-3, S::cst(2e-5))
    }
}

/// The laws of one call, read and checked.
struct Laws<'p, S> {
    e20: S,
    nu0: S,
    nu1: S,
    modulus: u8,
    expansion: u8,
    alpha: S,
    table: &'p [S],
}

/// A law code held as a real: exactly one of 0, 1, …, `max`.
fn law_code(x: f64, max: u8) -> Option<u8> {
    (0..=max).find(|&c| x == f64::from(c))
}

fn read_laws<S: Scalar>(p: &[S]) -> Result<Laws<'_, S>, &'static str> {
    let (e20, nu0, nu1, alpha) = (p[0], p[1], p[2], p[5]);
    if !positive(e20.re()) {
        return Err("thermo: E20 (properties[0]) must be positive");
    }
    if !(nu0.re().is_finite() && nu1.re().is_finite()) {
        return Err("thermo: nu0, nu1 (properties[1], properties[2]) must be finite");
    }
    let Some(modulus) = law_code(p[3].re(), 2) else {
        return Err("thermo: modulus_law (properties[3]) must be 0, 1 or 2");
    };
    let Some(expansion) = law_code(p[4].re(), 1) else {
        return Err("thermo: expansion_law (properties[4]) must be 0 or 1");
    };
    if !alpha.re().is_finite() {
        return Err("thermo: alpha (properties[5]) must be finite");
    }
    let table = &p[Thermo::FIXED_PROPS..];
    if modulus == 2 {
        if table.len() < 4 || table.len() % 2 != 0 {
            return Err("thermo: modulus_law 2 needs at least 2 (T, k) points after properties[5]");
        }
        for i in 0..table.len() / 2 {
            let (t, k) = (table[2 * i].re(), table[2 * i + 1].re());
            if !(t.is_finite() && k >= 0.0 && k.is_finite()) {
                return Err("thermo: table points need finite T and finite k >= 0");
            }
            // (both temperatures are finite here)
            if i > 0 && t <= table[2 * i - 2].re() {
                return Err("thermo: table temperatures must increase strictly");
            }
        }
    }
    Ok(Laws { e20, nu0, nu1, modulus, expansion, alpha, table })
}

impl<S: Scalar> Laws<'_, S> {
    /// E(T) and dE/dT.
    fn modulus(&self, t: S) -> (S, S) {
        let (k, dk) = match self.modulus {
            0 => (S::one(), S::zero()),
            1 => en1993_modulus_factor(t),
            _ => interpolate(t, self.table.len() / 2, |i| (self.table[2 * i], self.table[2 * i + 1])),
        };
        (self.e20 * k, self.e20 * dk)
    }

    /// ν(T) and dν/dT.
    fn poisson(&self, t: S) -> (S, S) {
        (self.nu0 + self.nu1 * (t - REFERENCE_TEMPERATURE), self.nu1)
    }

    /// ε_th(T) and dε_th/dT.
    fn thermal_strain(&self, t: S) -> (S, S) {
        match self.expansion {
            0 => (self.alpha * (t - REFERENCE_TEMPERATURE), self.alpha),
            _ => en1993_thermal_elongation(t),
        }
    }
}

/// The elastic matrix per unit modulus, Ĉ(ν) = C/E, and dĈ/dν, in the routine order of
/// `kind` (the leading n×n block).
fn unit_matrix<S: Scalar>(kind: PointKind, nu: S) -> ([[S; 6]; 6], [[S; 6]; 6]) {
    let mut c = [[S::zero(); 6]; 6];
    let mut dc = [[S::zero(); 6]; 6];
    let one_p = nu + 1.0;
    // μ̂ = 1/(2(1+ν)), dμ̂/dν = −1/(2(1+ν)²).
    let mu = S::one() / (one_p * 2.0);
    let dmu = -S::one() / (one_p * one_p * 2.0);
    match kind {
        PointKind::Solid3d | PointKind::PlaneStrain | PointKind::Axisymmetric => {
            // λ̂ = ν/((1+ν)(1−2ν)), dλ̂/dν = (1 + 2ν²)/((1+ν)²(1−2ν)²).
            let one_m2 = S::one() - nu * 2.0;
            let lambda = nu / (one_p * one_m2);
            let dlambda = (nu * nu * 2.0 + 1.0) / (one_p * one_p * one_m2 * one_m2);
            for i in 0..3 {
                for j in 0..3 {
                    c[i][j] = lambda;
                    dc[i][j] = dlambda;
                }
                c[i][i] = lambda + mu * 2.0;
                dc[i][i] = dlambda + dmu * 2.0;
            }
            for i in 3..kind.ncomp() {
                c[i][i] = mu;
                dc[i][i] = dmu;
            }
        }
        PointKind::PlaneStress => {
            // ĉ = 1/(1−ν²): [[ĉ, ĉν, 0], [ĉν, ĉ, 0], [0, 0, μ̂]];
            // dĉ/dν = 2ν/(1−ν²)², d(ĉν)/dν = (1+ν²)/(1−ν²)².
            let q = S::one() - nu * nu;
            let f = S::one() / q;
            let df = nu * 2.0 / (q * q);
            let dfnu = (nu * nu + 1.0) / (q * q);
            c[0][0] = f;
            c[1][1] = f;
            c[0][1] = f * nu;
            c[1][0] = f * nu;
            c[2][2] = mu;
            dc[0][0] = df;
            dc[1][1] = df;
            dc[0][1] = dfnu;
            dc[1][0] = dfnu;
            dc[2][2] = dmu;
        }
        PointKind::Uniaxial => c[0][0] = S::one(),
        // `with_flaw` admits only the kinds above.
        PointKind::Cohesive3d | PointKind::Cohesive2d => unreachable!("thermo: solid kinds only"),
    }
    (c, dc)
}

/// Number of normal components that carry the thermal strain: 3, or 2 for plane stress, or 1
/// for uniaxial stress.
fn normal_components(kind: PointKind) -> usize {
    match kind {
        PointKind::PlaneStress => 2,
        PointKind::Uniaxial => 1,
        _ => 3,
    }
}

point_model!(Thermo, ENERGY | DSTRESS_DTEMP);

impl Thermo {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let Some(laws) = props_or_fail(output, read_laws(input.props)) else {
            return;
        };
        let kind = self.info.convention.kind();
        let n = kind.ncomp();
        let t = input.temp[0] + input.temp[1];
        if !t.re().is_finite() {
            fail(output, "thermo: temperature must be finite");
            return;
        }
        let (e, de) = laws.modulus(t);
        let (nu, dnu) = laws.poisson(t);
        if !between(nu.re(), -1.0, 0.5) {
            fail(output, "thermo: nu(T) = nu0 + nu1 (T - 20) must lie in (-1, 0.5)");
            return;
        }
        let (eps_th, deps_th) = laws.thermal_strain(t);
        let (c, dc) = unit_matrix(kind, nu);
        let nn = normal_components(kind);

        // Elastic strain ε − ε_th 1 (engineering shear, routine order).
        let mut eps_e = [S::zero(); 6];
        for (i, x) in eps_e.iter_mut().enumerate().take(n) {
            *x = input.strain[i] + input.dstrain[i];
            if i < nn {
                *x -= eps_th;
            }
        }
        // σ = E Ĉ ε_e; ∂σ/∂T = (E' Ĉ + E Ĉ' ν') ε_e − E Ĉ 1 ε_th'.
        let (sign, expansion) = match self.flaw {
            ThermoFlaw::None | ThermoFlaw::StartTemperature => (1.0, 1.0),
            ThermoFlaw::DtempSign => (-1.0, 1.0),
            ThermoFlaw::PartialDtemp => (1.0, 0.0),
        };
        let mut stored = S::zero();
        for i in 0..n {
            let (mut s, mut ds_mech, mut c_one) = (S::zero(), S::zero(), S::zero());
            for j in 0..n {
                s += c[i][j] * eps_e[j];
                ds_mech += (c[i][j] * de + dc[i][j] * (e * dnu)) * eps_e[j];
                if j < nn {
                    c_one += c[i][j];
                }
            }
            let s = s * e;
            output.stress[i] = s;
            output.dstress_dtemp[i] = (ds_mech - c_one * e * deps_th * expansion) * sign;
            stored += s * eps_e[i];
            for (j, cij) in c[i].iter().enumerate().take(n) {
                output.tangent[i + j * n] = *cij * e;
            }
        }
        if self.flaw == ThermoFlaw::StartTemperature {
            // C at the start temperature (a temperature the update already accepted at the end
            // of the increment before).
            let t0 = input.temp[0];
            let (e0, _) = laws.modulus(t0);
            let (nu0, _) = laws.poisson(t0);
            let (c0, _) = unit_matrix(kind, nu0);
            for (i, row) in c0.iter().enumerate().take(n) {
                for (j, cij) in row.iter().enumerate().take(n) {
                    output.tangent[i + j * n] = *cij * e0;
                }
            }
        }
        output.energy[0] = stored * 0.5;
        output.energy[1] = S::zero();
        succeed(output, 0, provides::DSTRESS_DTEMP | provides::ENERGY);
    }
}
