//! Composite ply damage at a point: orthotropic elasticity, Hashin (1980) initiation in four
//! modes, linear softening per mode regularised by a characteristic length (crack band),
//! irreversible damage, optional viscous regularisation — with the consistent tangent in
//! every branch.
//!
//! Properties (26), DEVELOPERS.md "Reference models" repeats them:
//! `[E1, E2, E3, ν12, ν13, ν23, G12, G13, G23, a1x, a1y, a1z, a2x, a2y, a2z,`
//! ` Xt, Xc, Yt, Yc, SL, G_ft, G_fc, G_mt, G_mc, L, η]`: the constants and material axes of
//! [`Orthotropic`](crate::Orthotropic) (same meaning, same Gram–Schmidt), the strengths
//! (fibre tension/compression, transverse tension/compression, in-plane shear; all > 0), the
//! fracture energies per mode (energy per unit area), the characteristic length L of the
//! element the point stands for (the caller's element size: it reaches the routine as a
//! property), and the viscosity η (a time; 0 = rate independent).
//!
//! State (8): `[r_ft, r_fc, r_mt, r_mc, d_ft, d_fc, d_mt, d_mc]`: the largest failure measure
//! r = √F reached per mode (0 at the start; damage grows only above 1), and the damage per
//! mode the stress uses (the viscous damage when η > 0, else the damage of r; never below
//! the damage of the start, d = max(d_n, d(r)) — a state written elsewhere may hold more).
//!
//! Kinds: solid-3d (11, 22, 33, 23, 13, 12) and plane-stress (11, 22, 12; material axis 3
//! must be the global 3 axis: a1z = a2z = 0). Engineering shear, total form
//! (ε = strain + dstrain; `stress0` is not read).
//!
//! The update, in the material frame (ε_m = T ε, σ = Tᵀ σ_m with T the strain rotation of
//! the axes; tangent Tᵀ K_m T):
//! - effective stress σ̃ = C ε_m, C the material stiffness (plane stress: the reduced
//!   stiffness Q11 = E1/(1−ν12ν21), Q22 = E2/(1−ν12ν21), Q12 = ν12 Q22, Q66 = G12);
//! - Hashin (1980), J. Appl. Mech. 47:329–334, three-dimensional form (from memory), with the
//!   transverse shear strength S_T = Yc/2 (common practice, S_T is rarely measured; with it
//!   the matrix compression criterion loses its linear term and every index is a quadratic
//!   form of σ̃, so r = √F grows in proportion to a proportional load):
//!   fibre tension (σ̃11 ≥ 0) F = (σ̃11/Xt)² + (τ̃12² + τ̃13²)/SL²;
//!   fibre compression (σ̃11 < 0) F = (σ̃11/Xc)²;
//!   matrix tension (σ̃22 + σ̃33 ≥ 0) F = ((σ̃22 + σ̃33)/Yt)² + (τ̃23² − σ̃22 σ̃33)/S_T² + (τ̃12² + τ̃13²)/SL²;
//!   matrix compression (σ̃22 + σ̃33 < 0): the same with Yc for Yt. An inactive mode has F = 0.
//! - damage of mode I from its history r_I = max(r_I,n, √F_I) (grows only while r > 1):
//!   linear softening in the equivalent displacement δ = L r ε₀ (ε₀ = X/C_kk, k = 1 for the
//!   fibre modes, 2 for the matrix modes), failing at δ_f = 2 G_I/X:
//!   d = r_f (r − 1)/(r (r_f − 1)) for 1 < r < r_f, 1 beyond, with r_f = 2 G_I C_kk/(X² L).
//!   On a path of uniaxial material strain in the mode's direction the stress falls linearly
//!   from X to 0 and the energy dissipated per unit volume is G_I/L (Bažant & Oh 1983, crack
//!   band). r_f ≤ 1 would snap back: the call fails naming the largest admissible length
//!   L_max = 2 G_I C_kk/X² (REFERENCES.md, "Crack band", derived).
//! - viscous regularisation (η > 0, Duvaut–Lions type, backward Euler):
//!   d_v = (η d_v,n + Δt d)/(η + Δt); the tangent carries the factor Δt/(η + Δt).
//! - stress σ_m = (1 − D) σ̃ per component: D = d_ft or d_fc on 11 (by the sign of σ̃11),
//!   d_mt or d_mc on 22 and 33 (by the sign of σ̃22 + σ̃33), and on the three shears
//!   D_s = 1 − (1 − d_ft)(1 − d_fc)(1 − d_mt)(1 − d_mc): the shear couples every mode.
//!
//! Tangent: K_m,ij = (1 − D_i) C_ij − σ̃_i Σ_k ∂D_i/∂σ̃_k C_kj, where ∂d_I/∂σ̃ =
//! v d'(r) ∂F/∂σ̃ / (2r) while mode I grows (v = Δt/(η + Δt), 1 without viscosity) and 0
//! otherwise. It is unsymmetric in damage growth and may lose positive definiteness there.
//!
//! Branches: 0 undamaged; 1 damage growth in some mode; 2 damaged, no growth (unloading,
//! reloading, or viscous relaxation towards a fixed damage); 3 some mode fully damaged and no
//! growth. No energy is reported; `dstress_dtemp` is zero.
//!
//! Flawed variants ([`PlyFlaw`]) for the selftest zoo.

use std::fmt::Write as _;

use tancheck_core::routine::MESSAGE_LEN;
use tancheck_core::{CallInput, CallOutput, Convention, PointKind, RoutineInfo, Scalar, ShearMeasure};

use crate::call::{fail, point_model, positive, props_or_fail, succeed};
use crate::orthotropic::{mandel_rotation, material_axes, material_stiffness};
use crate::tensor::SLOTS_6;
use crate::ModelError;

/// Canonical slots of the plane-stress order (11, 22, 12).
const SLOTS_PS: [usize; 3] = [0, 1, 5];

/// Branch ids the ply model reports.
pub mod branch {
    /// No damage in any mode.
    pub const ELASTIC: i32 = 0;
    /// Damage grows in at least one mode.
    pub const GROWTH: i32 = 1;
    /// Damaged, no growth: unloading, reloading below the largest load, viscous relaxation.
    pub const DAMAGED: i32 = 2;
    /// A mode fully damaged, no growth.
    pub const FAILED: i32 = 3;
}

/// Index of each mode in the state and in the strength/energy properties.
pub mod mode {
    pub const FT: usize = 0;
    pub const FC: usize = 1;
    pub const MT: usize = 2;
    pub const MC: usize = 3;
    /// Short names, in order.
    pub const NAMES: [&str; 4] =
        ["fibre tension", "fibre compression", "matrix tension", "matrix compression"];
}

/// Which flaw, if any, the ply model carries.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum PlyFlaw {
    /// The correct routine.
    #[default]
    None,
    /// The secant (1 − D) C during damage growth. Finding: the tangent fails in branch 1.
    Secant,
    /// The growth of the shear damage D_s (which couples the four modes) left out of the
    /// tangent. Finding: the tangent fails in branch 1 when an in-plane or transverse shear
    /// stress is present.
    NoCoupling,
    /// The viscous tangent without the factor Δt/(η + Δt). Finding: the tangent fails in
    /// branch 1 when η > 0.
    ViscousNoFactor,
    /// The length left out of r_f (as if L = 1): the update and tangent agree, but the
    /// dissipated energy per unit volume no longer scales as 1/L. Finding: regularisation.
    LengthDropped,
    /// Damage computed from the current failure measure, not the largest reached: the damage
    /// heals on unloading. The tangent is consistent with that update. Finding:
    /// irreversibility.
    Healing,
}

/// The ply damage model.
#[derive(Clone, Debug)]
pub struct Ply {
    info: RoutineInfo,
    flaw: PlyFlaw,
    plane_stress: bool,
}

impl Ply {
    pub const NAME: &'static str = "ply";
    pub const SECANT_NAME: &'static str = "ply-secant";
    pub const NO_COUPLING_NAME: &'static str = "ply-no-coupling";
    pub const VISCOUS_NO_FACTOR_NAME: &'static str = "ply-viscous-no-factor";
    pub const LENGTH_DROPPED_NAME: &'static str = "ply-length-dropped";
    pub const HEALING_NAME: &'static str = "ply-healing";
    /// Meaning of each property, in order.
    pub const PROP_NAMES: [&'static str; 26] = [
        "E1", "E2", "E3", "nu12", "nu13", "nu23", "G12", "G13", "G23", "a1x", "a1y", "a1z", "a2x", "a2y",
        "a2z", "Xt", "Xc", "Yt", "Yc", "SL", "G_ft", "G_fc", "G_mt", "G_mc", "L", "eta",
    ];
    /// Meaning of each state variable, in order.
    pub const STATE_NAMES: [&'static str; 8] =
        ["r_ft", "r_fc", "r_mt", "r_mc", "d_ft", "d_fc", "d_mt", "d_mc"];
    /// Kinds of point the model supports.
    pub const KINDS: [PointKind; 2] = [PointKind::Solid3d, PointKind::PlaneStress];

    /// The correct model.
    pub fn new(kind: PointKind) -> Result<Ply, ModelError> {
        Ply::with_flaw(kind, PlyFlaw::None)
    }

    /// The model's name for a flaw.
    pub fn name_of(flaw: PlyFlaw) -> &'static str {
        match flaw {
            PlyFlaw::None => Self::NAME,
            PlyFlaw::Secant => Self::SECANT_NAME,
            PlyFlaw::NoCoupling => Self::NO_COUPLING_NAME,
            PlyFlaw::ViscousNoFactor => Self::VISCOUS_NO_FACTOR_NAME,
            PlyFlaw::LengthDropped => Self::LENGTH_DROPPED_NAME,
            PlyFlaw::Healing => Self::HEALING_NAME,
        }
    }

    /// The model with the chosen flaw, in the default order with engineering shear.
    pub fn with_flaw(kind: PointKind, flaw: PlyFlaw) -> Result<Ply, ModelError> {
        let name = Self::name_of(flaw);
        if !Self::KINDS.contains(&kind) {
            return Err(ModelError::UnsupportedKind {
                model: name,
                kind,
                supported: "solid-3d, plane-stress",
            });
        }
        Ok(Ply {
            info: RoutineInfo {
                name: name.to_string(),
                convention: Convention::new(kind, ShearMeasure::Engineering),
                nstate: Self::STATE_NAMES.len(),
                nprop: Self::PROP_NAMES.len(),
            },
            flaw,
            plane_stress: kind == PointKind::PlaneStress,
        })
    }

    /// The flaw this model carries.
    pub fn flaw(&self) -> PlyFlaw {
        self.flaw
    }
}

/// The material stiffness the effective stress uses: the 3D one, or the reduced plane-stress
/// one in slots 11, 22, 12 (zeros elsewhere).
fn stiffness<S: Scalar>(props: &[S], plane_stress: bool) -> Result<[[S; 6]; 6], &'static str> {
    let c3 = material_stiffness(props).map_err(|_| {
        "ply: E1..E3, G12..G23 must be positive and the compliance positive definite (properties[0..9])"
    })?;
    if !plane_stress {
        return Ok(c3);
    }
    let (e1, e2, nu12, g12) = (props[0], props[1], props[3], props[6]);
    let nu21 = nu12 * e2 / e1;
    let den = S::one() - nu12 * nu21;
    if !positive(den.re()) {
        return Err("ply: 1 - nu12 nu21 must be positive (properties[0], properties[1], properties[3])");
    }
    let mut c = [[S::zero(); 6]; 6];
    c[0][0] = e1 / den;
    c[1][1] = e2 / den;
    c[0][1] = nu12 * e2 / den;
    c[1][0] = c[0][1];
    c[5][5] = g12;
    Ok(c)
}

/// Weight u of a slot between a Mandel strain and an engineering one: ε^M = u γ.
#[inline]
fn strain_weight(slot: usize) -> f64 {
    if slot < 3 {
        1.0
    } else {
        std::f64::consts::FRAC_1_SQRT_2
    }
}

/// The engineering-strain rotation into the material frame: ε_m = T ε, σ = Tᵀ σ_m.
fn strain_rotation<S: Scalar>(r: &[[S; 3]; 3]) -> [[S; 6]; 6] {
    let q = mandel_rotation(r);
    let mut t = [[S::zero(); 6]; 6];
    for a in 0..6 {
        for b in 0..6 {
            t[a][b] = q[b][a] * (strain_weight(b) / strain_weight(a));
        }
    }
    t
}

/// A message in a fixed buffer (no allocation on the hot path).
struct Buf {
    bytes: [u8; MESSAGE_LEN],
    len: usize,
}

impl std::fmt::Write for Buf {
    fn write_str(&mut self, s: &str) -> std::fmt::Result {
        for &b in s.as_bytes() {
            if self.len + 1 < MESSAGE_LEN {
                self.bytes[self.len] = b;
                self.len += 1;
            }
        }
        Ok(())
    }
}

/// Per-mode data of one call.
struct ModeData<S> {
    /// Damage the stress uses.
    d: [S; 4],
    /// ∂d/∂σ̃ while the mode grows (zero otherwise).
    dd: [[S; 6]; 4],
}

/// The Hashin index F of a mode and its gradient ∂F/∂σ̃ (zero for an inactive mode).
fn hashin<S: Scalar>(m: usize, s: &[S; 6], x: &[S; 5]) -> (S, [S; 6]) {
    let (xt, xc, yt, yc, sl) = (x[0], x[1], x[2], x[3], x[4]);
    let st = yc * 0.5;
    let mut g = [S::zero(); 6];
    let zero = S::zero();
    let shear_l = (s[5] * s[5] + s[4] * s[4]) / (sl * sl);
    let tens11 = s[0].re() >= 0.0;
    let tens22 = (s[1] + s[2]).re() >= 0.0;
    match m {
        mode::FT if tens11 => {
            g[0] = s[0] * 2.0 / (xt * xt);
            g[5] = s[5] * 2.0 / (sl * sl);
            g[4] = s[4] * 2.0 / (sl * sl);
            ((s[0] / xt) * (s[0] / xt) + shear_l, g)
        }
        mode::FC if !tens11 => {
            g[0] = s[0] * 2.0 / (xc * xc);
            ((s[0] / xc) * (s[0] / xc), g)
        }
        mode::MT | mode::MC if (m == mode::MT) == tens22 => {
            let y = if m == mode::MT { yt } else { yc };
            let p = s[1] + s[2];
            let st2 = st * st;
            g[1] = p * 2.0 / (y * y) - s[2] / st2;
            g[2] = p * 2.0 / (y * y) - s[1] / st2;
            g[3] = s[3] * 2.0 / st2;
            g[5] = s[5] * 2.0 / (sl * sl);
            g[4] = s[4] * 2.0 / (sl * sl);
            ((p / y) * (p / y) + (s[3] * s[3] - s[1] * s[2]) / st2 + shear_l, g)
        }
        _ => (zero, g),
    }
}

point_model!(Ply,);

impl Ply {
    /// One call, its array sizes checked (see [`point_model`]).
    // Index loops over the 4 modes and 6 components read as the formulas do.
    #[allow(clippy::needless_range_loop)]
    fn update<S: Scalar>(&self, input: &CallInput<'_, S>, output: &mut CallOutput<'_, S>) {
        let p = input.props;
        let slots: &[usize] = if self.plane_stress { &SLOTS_PS } else { &SLOTS_6 };
        let Some(c) = props_or_fail(output, stiffness(p, self.plane_stress)) else {
            return;
        };
        let r = match material_axes(p) {
            Ok(r) => r,
            Err(_) => {
                fail(output, "ply: material axes a1 (properties[9..12]) and a2 (properties[12..15]) must be nonzero, not parallel");
                return;
            }
        };
        if self.plane_stress && (r[2][0].re().abs() > 1e-12 || r[2][1].re().abs() > 1e-12) {
            fail(output, "ply: in plane stress the material axes must lie in the 1-2 plane (a1z = a2z = 0)");
            return;
        }
        let x = [p[15], p[16], p[17], p[18], p[19]];
        let g_c = [p[20], p[21], p[22], p[23]];
        let (len, eta) = (p[24], p[25]);
        if !x.iter().chain(&g_c).chain([&len]).all(|v| positive(v.re()) && v.re().is_finite()) {
            fail(output, "ply: strengths, fracture energies and L (properties[15..25]) must be positive");
            return;
        }
        if !(eta.re() >= 0.0 && eta.re().is_finite()) {
            fail(output, "ply: the viscosity eta (properties[25]) must be zero or positive");
            return;
        }
        let dt = input.time[1];
        let viscous = eta.re() > 0.0;
        if viscous && !(dt >= 0.0 && dt.is_finite()) {
            fail(output, "ply: viscous damage needs a time increment >= 0");
            return;
        }

        // Strains in the material frame and the effective stress.
        let t = strain_rotation(&r);
        let mut eg = [S::zero(); 6];
        for (i, &s) in slots.iter().enumerate() {
            eg[s] = input.strain[i] + input.dstrain[i];
        }
        let mut em = [S::zero(); 6];
        for a in 0..6 {
            for b in 0..6 {
                em[a] += t[a][b] * eg[b];
            }
        }
        let mut st = [S::zero(); 6];
        for a in 0..6 {
            for b in 0..6 {
                st[a] += c[a][b] * em[b];
            }
        }

        // Damage per mode.
        let mut md = ModeData { d: [S::zero(); 4], dd: [[S::zero(); 6]; 4] };
        let mut growing = false;
        let mut failed = false;
        let v = if viscous { S::cst(dt) / (eta + dt) } else { S::one() };
        let v_tangent = if self.flaw == PlyFlaw::ViscousNoFactor { S::one() } else { v };
        // Snap-back: every mode needs r_f > 1; among the modes that snap back the message
        // names the one with the smallest admissible length (for the correct model the
        // smallest of all modes), and that length.
        let len_used = if self.flaw == PlyFlaw::LengthDropped { S::one() } else { len };
        let strength_stiffness = |m: usize| match m {
            mode::FT => (x[0], c[0][0]),
            mode::FC => (x[1], c[0][0]),
            mode::MT => (x[2], c[1][1]),
            _ => (x[3], c[1][1]),
        };
        let mut rfs = [S::zero(); 4];
        let mut worst: Option<(usize, f64)> = None;
        for (m, rf) in rfs.iter_mut().enumerate() {
            let (xm, ckk) = strength_stiffness(m);
            *rf = g_c[m] * ckk * 2.0 / (xm * xm * len_used);
            let lmax = g_c[m].re() * ckk.re() * 2.0 / (xm.re() * xm.re());
            if rf.re() <= 1.0 && worst.is_none_or(|(_, l)| lmax < l) {
                worst = Some((m, lmax));
            }
        }
        if let Some((m, lmax)) = worst {
            let mut buf = Buf { bytes: [0; MESSAGE_LEN], len: 0 };
            let _ =
                write!(buf, "ply: L snaps back in {}; largest admissible L = {:.6e}", mode::NAMES[m], lmax);
            fail(output, std::str::from_utf8(&buf.bytes[..buf.len]).unwrap_or("ply: L too large"));
            return;
        }
        for m in 0..4 {
            let rf = rfs[m];
            let (f, grad) = hashin(m, &st, &x);
            let r_trial = f.sqrt_or_zero();
            let r_old = input.state0[m];
            let r_hist = if self.flaw == PlyFlaw::Healing { S::one() } else { r_old.max(S::one()) };
            let loading = r_trial.re() > r_hist.re();
            let r_new = if loading { r_trial } else { r_hist };
            let (d_inv, dd_dr) = if r_new.re() <= 1.0 {
                (S::zero(), S::zero())
            } else if r_new.re() >= rf.re() {
                (S::one(), S::zero())
            } else {
                let k = rf / (rf - 1.0);
                (k * (r_new - 1.0) / r_new, k / (r_new * r_new))
            };
            output.state[m] = if self.flaw == PlyFlaw::Healing { r_trial } else { r_old.max(r_trial) };
            let d_old = input.state0[4 + m];
            let d_new = if viscous { (eta * d_old + d_inv * dt) / (eta + dt) } else { d_inv };
            // Never below the damage of the start (a state written elsewhere may hold more).
            let kept = self.flaw != PlyFlaw::Healing && d_old.re() >= d_new.re();
            let d = if kept { d_old } else { d_new };
            output.state[4 + m] = d;
            md.d[m] = d;
            if loading && !kept && dd_dr.re() > 0.0 {
                growing = true;
                let k = v_tangent * dd_dr / (r_new * 2.0);
                for a in 0..6 {
                    md.dd[m][a] = k * grad[a];
                }
            }
            if d.re() >= 1.0 {
                failed = true;
            }
        }

        // Component damage and its gradient with respect to σ̃.
        let fibre = if st[0].re() >= 0.0 { mode::FT } else { mode::FC };
        let matrix = if (st[1] + st[2]).re() >= 0.0 { mode::MT } else { mode::MC };
        let mut keep = S::one();
        for m in 0..4 {
            keep *= S::one() - md.d[m];
        }
        let d_s = S::one() - keep;
        let mut dds = [S::zero(); 6];
        if self.flaw != PlyFlaw::NoCoupling {
            for m in 0..4 {
                let mut others = S::one();
                for n in 0..4 {
                    if n != m {
                        others *= S::one() - md.d[n];
                    }
                }
                for a in 0..6 {
                    dds[a] += others * md.dd[m][a];
                }
            }
        }
        let dcomp = [md.d[fibre], md.d[matrix], md.d[matrix], d_s, d_s, d_s];
        let secant = self.flaw == PlyFlaw::Secant;
        let mut sm = [S::zero(); 6];
        let mut km = [[S::zero(); 6]; 6];
        for i in 0..6 {
            sm[i] = (S::one() - dcomp[i]) * st[i];
            let grad_d: &[S; 6] = match i {
                0 => &md.dd[fibre],
                1 | 2 => &md.dd[matrix],
                _ => &dds,
            };
            for j in 0..6 {
                let mut k = (S::one() - dcomp[i]) * c[i][j];
                if !secant {
                    let mut gc = S::zero();
                    for q in 0..6 {
                        gc += grad_d[q] * c[q][j];
                    }
                    k -= st[i] * gc;
                }
                km[i][j] = k;
            }
        }

        // Back to the global frame: σ = Tᵀ σ_m, K = Tᵀ K_m T.
        let mut kt = [[S::zero(); 6]; 6];
        for a in 0..6 {
            for b in 0..6 {
                let mut s = S::zero();
                for q in 0..6 {
                    s += km[a][q] * t[q][b];
                }
                kt[a][b] = s;
            }
        }
        let n = slots.len();
        for (i, &si) in slots.iter().enumerate() {
            let mut s = S::zero();
            for a in 0..6 {
                s += t[a][si] * sm[a];
            }
            output.stress[i] = s;
            for (j, &sj) in slots.iter().enumerate() {
                let mut k = S::zero();
                for a in 0..6 {
                    k += t[a][si] * kt[a][sj];
                }
                output.tangent[i + j * n] = k;
            }
        }
        output.dstress_dtemp.fill(S::zero());
        output.energy[0] = S::zero();
        output.energy[1] = S::zero();
        let damaged = md.d.iter().any(|d| d.re() > 0.0);
        let b = if growing {
            branch::GROWTH
        } else if failed {
            branch::FAILED
        } else if damaged {
            branch::DAMAGED
        } else {
            branch::ELASTIC
        };
        succeed(output, b, 0);
    }
}
