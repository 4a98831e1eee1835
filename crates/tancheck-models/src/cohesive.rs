//! Bilinear mixed-mode cohesive law with irreversible damage and a contact penalty
//! (Camanho & Dávila 2002, NASA/TM-2002-211737; Camanho, Dávila & de Moura 2003, J. Compos.
//! Mater. 37(16):1415–1438; propagation by Benzeggagh & Kenane 1996, Compos. Sci. Technol.
//! 56:439–449).
//!
//! Kinds: cohesive-3d (opening δ₃, slip δ₁, slip δ₂ — the components n, s1, s2) and
//! cohesive-2d (opening, slip). Strain = separation, stress = traction, in total form:
//! δ = strain + dstrain; `stress0` is not read.
//!
//! Properties `[K, N, S, G_Ic, G_IIc, η]`: penalty stiffness K (traction per separation, the
//! same for every mode), normal strength N, shear strength S, mode I and mode II toughness,
//! B-K exponent η (≥ 1, so that G_c is continuously differentiable in the mode mixity).
//! State `[d, G_d]`: damage d ∈ [0, 1] and the energy dissipated so far per unit area.
//!
//! With ⟨δ₃⟩ = max(δ₃, 0), δ_sh² = Σ δ_s², λ = √(⟨δ₃⟩² + δ_sh²) and the shear fraction
//! B = δ_sh²/λ² = β²/(1 + β²) (β = δ_sh/δ₃; B = 1 when δ₃ ≤ 0, pure shear):
//! - onset δ₀ₘ = δ₀₃ δ₀ₛ √[(1 + β²)/(δ₀ₛ² + β² δ₀₃²)] = δ₀₃ δ₀ₛ / √((1 − B) δ₀ₛ² + B δ₀₃²),
//!   δ₀₃ = N/K, δ₀ₛ = S/K (quadratic nominal-stress criterion);
//! - toughness G_c = G_Ic + (G_IIc − G_Ic) B^η (B-K), final δ_fm = 2 G_c/(K δ₀ₘ);
//! - trial damage d̂ = δ_fm (λ − δ₀ₘ)/(λ (δ_fm − δ₀ₘ)), 0 for λ ≤ δ₀ₘ, 1 for λ ≥ δ_fm.
//!
//! The damage grows when d̂ > d_n (real parts): d = d̂ (branch 1), or d = 1 when λ ≥ δ_fm
//! (branch 4); otherwise d = d_n. Tractions t_s = (1 − d) K δ_s and t₃ = (1 − d) K δ₃ for
//! δ₃ ≥ 0, t₃ = K δ₃ for δ₃ < 0 (contact penalty: a closed interface carries compression
//! undamaged, and a negative opening adds no damage). The opening counts as open at δ₃ = 0,
//! so the derivative returned there is the right-hand one.
//!
//! Tangent: the diagonal (1 − d) K (K in the normal entry when closed); in damage growth
//! (branch 1) minus K δ̃ᵢ ∂d/∂δⱼ with δ̃ = (⟨δ₃⟩, δ_s), where ∂d/∂δⱼ includes the dependence of
//! δ₀ₘ and δ_fm on the mixity B. That term makes the tangent unsymmetric in mixed mode
//! (⟨δ₃⟩ > 0 and δ_sh > 0); it is symmetric in a pure mode and on every other branch.
//!
//! The history variable is d itself, not the largest λ reached: with mixity-dependent δ₀ₘ and
//! δ_fm the same λ means different damage at different B, and d = max(d_n, d̂) never
//! decreases. In branch 1 the traction is evaluated as T n̂ with n̂ = δ̃/λ and
//! T = (1 − d) K λ = K δ₀ₘ (δ_fm − λ)/(δ_fm − δ₀ₘ), and λ as a norm scaled by its largest
//! component: the same values, but the softening slope −K δ₀ₘ/(δ_fm − δ₀ₘ), small against K,
//! is not computed as the difference of (1 − d) K and K λ ∂d/∂λ, and a pure mode has an exact
//! direction — so the tangent and the derivative parts of dual and complex calls keep their
//! digits when δ_fm/δ₀ₘ is large.
//!
//! Branches: 0 undamaged and open (d = 0, no growth); 1 damage growth; 2 unloading or
//! reloading with damage (0 < d < 1, open, secant (1 − d) K); 3 closed (δ₃ < 0, no growth,
//! d < 1); 4 fully failed (d = 1, from before or reached in this increment).
//!
//! Energy (`provides` ENERGY): stored ½ t·δ (= ½ (1 − d) K λ² + ½ K ⟨−δ₃⟩²); dissipated G_d.
//! An increment of growth adds G_c (λ(d) − λ(d_n))/(δ_fm − δ₀ₘ), with
//! λ(d) = δ_fm δ₀ₘ/(δ_fm − d (δ_fm − δ₀ₘ)) the separation at which damage d is reached at
//! the mixity of the end of the increment: ∫ ½ K λ² dd along the damage surface, exact on
//! proportional paths, and G_c in total for a complete failure. `dstress_dtemp` is zero.
//!
//! Flawed variants ([`CohesiveFlaw`]) keep the update and change only the tangent.

use tancheck_core::routine::provides;
use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{fail, point_model, positive, props_or_fail, succeed};
use crate::ModelError;

/// Branch ids the cohesive model reports.
pub mod branch {
    /// Undamaged and open: d = 0, no growth.
    pub const ELASTIC: i32 = 0;
    /// Damage growth.
    pub const GROWTH: i32 = 1;
    /// Unloading or reloading with damage, 0 < d < 1, open.
    pub const UNLOADING: i32 = 2;
    /// Closed (negative opening), no growth, d < 1.
    pub const CLOSED: i32 = 3;
    /// Fully failed, d = 1.
    pub const FAILED: i32 = 4;
}

/// Which flaw, if any, the cohesive model carries. Each keeps the stress update.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum CohesiveFlaw {
    /// The correct routine.
    #[default]
    None,
    /// The secant (1 − d) K (K normal when closed) during damage growth instead of the
    /// tangent. Expected finding: fails in branch 1, in every mode; passes elsewhere.
    Secant,
    /// The damage-growth term −K δ̃ᵢ ∂d/∂δⱼ kept on the diagonal only. Expected finding:
    /// fails in branch 1 when two or more separation components are nonzero (mixed mode, or
    /// two slips); passes in a pure mode and on every other branch.
    NoCoupling,
    /// The transpose of the tangent. Expected finding: fails in branch 1 in mixed mode
    /// (opening > 0 and slip ≠ 0), where the tangent is unsymmetric; passes everywhere else.
    Transposed,
    /// The symmetric part ½(C + Cᵀ) of the tangent. Expected finding: fails in branch 1 in
    /// mixed mode, where the tangent is unsymmetric; passes everywhere else.
    Symmetrized,
    /// The undamaged stiffness K on the diagonal on every branch. Expected finding: fails
    /// wherever the point is damaged (growth, unloading, failure, and the slip of a closed
    /// damaged point); passes while it is undamaged.
    Undamaged,
}

/// The bilinear mixed-mode cohesive law.
#[derive(Clone, Debug)]
pub struct Cohesive {
    info: RoutineInfo,
    flaw: CohesiveFlaw,
}

impl Cohesive {
    /// Name of the correct model.
    pub const NAME: &'static str = "cohesive";
    /// Name of the model with the secant in damage growth.
    pub const SECANT_NAME: &'static str = "cohesive-secant";
    /// Name of the model without the off-diagonal damage-growth terms.
    pub const NO_COUPLING_NAME: &'static str = "cohesive-no-coupling";
    /// Name of the model returning the transposed tangent.
    pub const TRANSPOSED_NAME: &'static str = "cohesive-transposed";
    /// Name of the model returning the symmetric part of its tangent.
    pub const SYMMETRIZED_NAME: &'static str = "cohesive-symmetrized";
    /// Name of the model returning the undamaged stiffness.
    pub const UNDAMAGED_NAME: &'static str = "cohesive-undamaged";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 6] = ["K", "N", "S", "G_Ic", "G_IIc", "eta"];
    /// Meaning of each state variable, in order.
    pub const STATE_NAMES: [&'static str; 2] = ["damage", "dissipated"];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 2] = [PointKind::Cohesive3d, PointKind::Cohesive2d];

    /// The correct model.
    pub fn new(kind: PointKind) -> Result<Cohesive, ModelError> {
        Cohesive::with_flaw(kind, CohesiveFlaw::None)
    }

    /// The model with the chosen flaw, in the default order (n, s1[, s2]).
    pub fn with_flaw(kind: PointKind, flaw: CohesiveFlaw) -> Result<Cohesive, ModelError> {
        let name = Self::name_of(flaw);
        if !Self::KINDS.contains(&kind) {
            return Err(ModelError::UnsupportedKind {
                model: name,
                kind,
                supported: "cohesive-3d, cohesive-2d",
            });
        }
        Ok(Cohesive {
            info: RoutineInfo {
                name: name.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: 2,
                nprop: 6,
            },
            flaw,
        })
    }

    /// The model's name for a flaw.
    pub fn name_of(flaw: CohesiveFlaw) -> &'static str {
        match flaw {
            CohesiveFlaw::None => Self::NAME,
            CohesiveFlaw::Secant => Self::SECANT_NAME,
            CohesiveFlaw::NoCoupling => Self::NO_COUPLING_NAME,
            CohesiveFlaw::Transposed => Self::TRANSPOSED_NAME,
            CohesiveFlaw::Symmetrized => Self::SYMMETRIZED_NAME,
            CohesiveFlaw::Undamaged => Self::UNDAMAGED_NAME,
        }
    }

    /// The flaw this model carries.
    pub fn flaw(&self) -> CohesiveFlaw {
        self.flaw
    }
}

/// Mixed-mode onset and final separations and the toughness at one mode mixity.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ModeMix<S> {
    /// δ₀ₘ, the equivalent separation at damage onset.
    pub onset: S,
    /// δ_fm, the equivalent separation at complete failure.
    pub final_separation: S,
    /// G_c by the B-K criterion.
    pub toughness: S,
}

/// The mixed-mode law and its derivatives in the shear fraction B.
struct Mix<S> {
    d0: S,
    df: S,
    gc: S,
    dd0: S,
    ddf: S,
}

/// Material constants of one call.
struct Props<S> {
    k: S,
    n: S,
    s: S,
    g1: S,
    g2: S,
    eta: S,
}

fn read_props<S: Scalar>(p: &[S]) -> Result<Props<S>, &'static str> {
    let props = Props { k: p[0], n: p[1], s: p[2], g1: p[3], g2: p[4], eta: p[5] };
    if !positive(props.k.re()) {
        return Err("cohesive: K (properties[0]) must be positive");
    }
    if !(positive(props.n.re()) && positive(props.s.re())) {
        return Err("cohesive: strengths N, S (properties[1], properties[2]) must be positive");
    }
    if !(positive(props.g1.re()) && positive(props.g2.re())) {
        return Err("cohesive: G_Ic, G_IIc (properties[3], properties[4]) must be positive");
    }
    if !(props.eta.re() >= 1.0 && props.eta.re().is_finite()) {
        return Err("cohesive: eta (properties[5]) must be finite and >= 1");
    }
    Ok(props)
}

/// δ₀ₘ, δ_fm, G_c and their derivatives in B (Camanho & Dávila 2002; B-K 1996).
fn mix<S: Scalar>(p: &Props<S>, b: S) -> Mix<S> {
    let d03 = p.n / p.k;
    let d0s = p.s / p.k;
    // h = (1 − B) δ₀ₛ² + B δ₀₃², δ₀ₘ = δ₀₃ δ₀ₛ h^(−1/2), dδ₀ₘ/dB = −½ δ₀ₘ h'/h.
    let h = (S::one() - b) * d0s * d0s + b * d03 * d03;
    let dh = d03 * d03 - d0s * d0s;
    let d0 = d03 * d0s / h.sqrt();
    let dd0 = -d0 * dh / (h * 2.0);
    // B^η = exp(η ln B) and η B^(η−1); at B = 0 both vanish for η > 1 (η B^0 = 1 for η = 1).
    let (pw, dpw) = if b.re() > 0.0 {
        let pw = (p.eta * b.ln()).exp();
        (pw, p.eta * pw / b)
    } else if p.eta.re() == 1.0 {
        (S::zero(), S::one())
    } else {
        (S::zero(), S::zero())
    };
    let gc = p.g1 + (p.g2 - p.g1) * pw;
    let dgc = (p.g2 - p.g1) * dpw;
    let df = gc * 2.0 / (p.k * d0);
    let ddf = df * (dgc / gc - dd0 / d0);
    Mix { d0, df, gc, dd0, ddf }
}

/// δ₀ₘ, δ_fm and G_c for properties `[K, N, S, G_Ic, G_IIc, η]` at the shear fraction
/// B = δ_sh²/λ² = β²/(1 + β²) (0 pure opening, 1 pure shear). The properties are not checked.
pub fn mode_mix<S: Scalar>(props: &[S; 6], shear_fraction: S) -> ModeMix<S> {
    let p = Props { k: props[0], n: props[1], s: props[2], g1: props[3], g2: props[4], eta: props[5] };
    let m = mix(&p, shear_fraction);
    ModeMix { onset: m.d0, final_separation: m.df, toughness: m.gc }
}

/// λ = ‖δ̃‖ scaled by its largest component m (by real part): m √(Σ (δ̃ᵢ/m)²). Exact, with
/// exact derivative parts, when one component alone is nonzero (a pure mode), where the
/// softening slope is small against K and any rounding of λ's derivative would show.
fn equivalent_separation<S: Scalar>(eff: &[S]) -> S {
    let mut big = S::zero();
    for x in eff {
        if x.abs().re() > big.re() {
            big = x.abs();
        }
    }
    if big.re() <= 0.0 {
        return S::zero();
    }
    let mut q = S::zero();
    for x in eff {
        let r = *x / big;
        q += r * r;
    }
    big * q.sqrt()
}

point_model!(Cohesive, ENERGY);

impl Cohesive {
    /// One call, its array sizes checked (see [`point_model`]).
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let Some(p) = props_or_fail(output, read_props(input.props)) else {
            return;
        };
        let (d_old, dissipated_old) = (input.state0[0], input.state0[1]);
        if !(d_old.re() >= 0.0 && d_old.re() <= 1.0) {
            fail(output, "cohesive: damage state0[0] must lie in [0, 1]");
            return;
        }
        if !dissipated_old.re().is_finite() {
            fail(output, "cohesive: dissipated energy state0[1] must be finite");
            return;
        }
        let n = self.info.convention.ncomp();
        let mut sep = [S::zero(); 3];
        for (i, x) in sep.iter_mut().enumerate().take(n) {
            *x = input.strain[i] + input.dstrain[i];
        }
        let open = sep[0].re() >= 0.0;
        let dnp = if open { sep[0] } else { S::zero() };
        let mut sh2 = S::zero();
        for x in &sep[1..n] {
            sh2 += *x * *x;
        }
        let lam2 = dnp * dnp + sh2;
        let eff = [dnp, sep[1], sep[2]];
        let lam = equivalent_separation(&eff[..n]);
        let b = if lam2.re() > 0.0 { sh2 / lam2 } else { S::zero() };
        let m = mix(&p, b);
        let span = m.df - m.d0;
        if !positive(span.re()) {
            fail(output, "cohesive: final separation not beyond onset; needs 2 G_c K > strength^2");
            return;
        }

        // Trial damage and the branch.
        let beyond = lam.re() >= m.df.re();
        let d_trial = if lam.re() <= m.d0.re() {
            S::zero()
        } else if beyond {
            S::one()
        } else {
            m.df * (lam - m.d0) / (lam * span)
        };
        let grows = d_trial.re() > d_old.re();
        let (d, branch_id) = if grows {
            (d_trial, if beyond { branch::FAILED } else { branch::GROWTH })
        } else {
            let id = if d_old.re() >= 1.0 {
                branch::FAILED
            } else if !open {
                branch::CLOSED
            } else if d_old.re() <= 0.0 {
                branch::ELASTIC
            } else {
                branch::UNLOADING
            };
            (d_old, id)
        };

        // Dissipation of this increment: G_c (λ(d) − λ(d_n))/(δ_fm − δ₀ₘ).
        let mut dissipated = dissipated_old;
        if grows {
            let lam_new = if beyond { m.df } else { lam };
            let lam_old = m.df * m.d0 / (m.df - d_old * span);
            dissipated += m.gc * (lam_new - lam_old) / span;
        }

        // Tractions and tangent. Off damage growth: t = (1 − d) K δ̃ (+ K δ₃ when closed),
        // tangent diagonal.
        let k = p.k;
        let mut tangent = [[S::zero(); 3]; 3];
        let mut stored = S::zero();
        if branch_id != branch::GROWTH {
            let kd = (S::one() - d) * k;
            for i in 0..n {
                let ki = if i == 0 && !open { k } else { kd };
                let t = ki * sep[i];
                output.stress[i] = t;
                stored += t * sep[i];
                tangent[i][i] = ki;
            }
        } else {
            // Damage growth, written as magnitude times direction: t = T n̂ on the effective
            // separation δ̃ = (⟨δ₃⟩, δ_s), n̂ = δ̃/λ, with the softening magnitude
            // T = (1 − d) K λ = K δ₀ₘ (δ_fm − λ)/(δ_fm − δ₀ₘ); a closed opening adds K δ₃.
            // This form keeps the softening slope ∂T/∂λ = −K δ₀ₘ/(δ_fm − δ₀ₘ) free of the
            // cancellation of (1 − d) K against K δ ∂d/∂δ.
            let mag = k * m.d0 * (m.df - lam) / span;
            let mut nh = [S::zero(); 3];
            for i in 0..n {
                nh[i] = eff[i] / lam;
                let t = if i == 0 && !open { k * sep[0] } else { mag * nh[i] };
                output.stress[i] = t;
                stored += t * sep[i];
            }
            // ∂t_i/∂δ_j = (T/λ)(P_ij − n̂_i n̂_j) + T_λ n̂_i n̂_j + T_B n̂_i ∂B/∂δ_j, P = ∂δ̃/∂δ,
            // T/λ = (1 − d) K, T_λ = −K δ₀ₘ/(δ_fm − δ₀ₘ), ∂B/∂δ_j = 2 n̂_j ([j is a slip] − B)/λ,
            // T_B = K [δ₀ₘ' (δ_fm − λ) + δ₀ₘ δ_fm' − δ₀ₘ (δ_fm − λ)(δ_fm' − δ₀ₘ')/(δ_fm − δ₀ₘ)]
            //       / (δ_fm − δ₀ₘ).
            let secant = mag / lam;
            let t_lam = -k * m.d0 / span;
            let t_b = k
                * (m.dd0 * (m.df - lam) + m.d0 * m.ddf - m.d0 * (m.df - lam) * (m.ddf - m.dd0) / span)
                / span;
            for j in 0..n {
                let slip = if j == 0 { S::zero() } else { S::one() };
                let db = nh[j] * (slip - b) * 2.0 / lam;
                for i in 0..n {
                    let p_ij = if i == j && (i > 0 || open) { 1.0 } else { 0.0 };
                    tangent[i][j] =
                        secant * (S::cst(p_ij) - nh[i] * nh[j]) + t_lam * nh[i] * nh[j] + t_b * nh[i] * db;
                }
            }
            if !open {
                tangent[0][0] = k;
            }
            match self.flaw {
                CohesiveFlaw::None
                | CohesiveFlaw::Transposed
                | CohesiveFlaw::Symmetrized
                | CohesiveFlaw::Undamaged => {}
                CohesiveFlaw::Secant => {
                    for (i, row) in tangent.iter_mut().enumerate().take(n) {
                        *row = [S::zero(); 3];
                        row[i] = if i == 0 && !open { k } else { (S::one() - d) * k };
                    }
                }
                CohesiveFlaw::NoCoupling => {
                    for (i, row) in tangent.iter_mut().enumerate().take(n) {
                        for (j, x) in row.iter_mut().enumerate() {
                            if i != j {
                                *x = S::zero();
                            }
                        }
                    }
                }
            }
        }
        if self.flaw == CohesiveFlaw::Undamaged {
            for (i, row) in tangent.iter_mut().enumerate() {
                *row = [S::zero(); 3];
                row[i] = k;
            }
        }
        let transposed = self.flaw == CohesiveFlaw::Transposed;
        for (j, column) in output.tangent.chunks_exact_mut(n).enumerate() {
            for (i, x) in column.iter_mut().enumerate() {
                *x = if transposed {
                    tangent[j][i]
                } else if self.flaw == CohesiveFlaw::Symmetrized {
                    (tangent[i][j] + tangent[j][i]) * 0.5
                } else {
                    tangent[i][j]
                };
            }
        }

        output.state[0] = d;
        output.state[1] = dissipated;
        output.dstress_dtemp.fill(S::zero());
        output.energy[0] = stored * 0.5;
        output.energy[1] = dissipated;
        succeed(output, branch_id, provides::ENERGY);
    }
}
