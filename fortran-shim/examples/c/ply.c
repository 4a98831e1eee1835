/*
 * ply.c -- composite ply damage at a point, the reference routine "ply" in C (the Rust model
 * crates/tancheck-models/src/ply.rs; layouts in DEVELOPERS.md, "Reference models"), and its
 * flawed variants for the selftest zoo.
 *
 * ncomp 6 (solid-3d: 11, 22, 33, 23, 13, 12) or 3 (plane stress: 11, 22, 12; material axis 3
 * must be global 3), engineering shear, total form (stress0 is not read).
 *   properties (26) [E1, E2, E3, nu12, nu13, nu23, G12, G13, G23, a1x, a1y, a1z, a2x, a2y, a2z,
 *                    Xt, Xc, Yt, Yc, SL, G_ft, G_fc, G_mt, G_mc, L, eta]
 *   state (8)       [r_ft, r_fc, r_mt, r_mc, d_ft, d_fc, d_mt, d_mc]
 * Effective stress s = C e in the material frame (plane stress: reduced stiffness); Hashin
 * (1980) indices per mode with S_T = Yc/2; damage per mode d = rf (r - 1) / (r (rf - 1)),
 * rf = 2 G C_kk / (X^2 L) (linear softening over the characteristic length, crack band;
 * rf <= 1 fails naming the largest admissible L); viscous d_v = (eta d_v,n + dt d)/(eta + dt);
 * stress (1 - D) s with D = d_f on 11, d_m on 22 and 33, 1 - prod(1 - d_I) on the shears;
 * consistent tangent (1 - D_i) C_ij - s_i dD_i/ds . C, the growth term times dt/(eta + dt).
 * Branches 0 undamaged, 1 growth, 2 damaged without growth, 3 a mode fully damaged.
 *
 * Build: cc -I fortran-shim/include -c ply.c               exports c_ply and c_ply_* (flawed)
 *        cc -I fortran-shim/include -DTC_COMPLEX -c ply.c  exports the twins (suffix _cx)
 */
#include <math.h>
#include <stdio.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"
#include "isotropic_elastic.h"
#include "material_axes.h"

enum { PL_XT = 15, PL_G = 20, PL_L = 24, PL_ETA = 25, PL_NPROP = 26, PL_NSTATE = 8 };
enum { PL_FT, PL_FC, PL_MT, PL_MC };
enum { FLAW_NONE, FLAW_SECANT, FLAW_NO_COUPLING, FLAW_VISCOUS_NO_FACTOR, FLAW_LENGTH_DROPPED,
       FLAW_HEALING };

static const char *const pl_mode_names[4] = {"fibre tension", "fibre compression",
                                             "matrix tension", "matrix compression"};

static void pl_fail(tc_report *report, const char *text) { ex_fail(report, "ply", text); }

/* Orthonormal axes (columns of r) by Gram-Schmidt, as the orthotropic routine. */
static int pl_axes(const tc_real *properties, tc_real r[3][3], tc_report *report)
{
    if (ma_axes(properties + 9, properties + 12, 1e-16, r) != 0) {
        pl_fail(report, "material axes a1 (properties[9..12]) and a2 (properties[12..15]) must be nonzero, not parallel");
        return 0;
    }
    return 1;
}

/* Material stiffness (3D, or the reduced plane-stress one in slots 0, 1, 5). */
static int pl_stiffness(const tc_real *p, int plane_stress, tc_real c[6][6], tc_report *report)
{
    const char *bad = "E1..E3, G12..G23 must be positive and the compliance positive definite (properties[0..9])";
    const int moduli[6] = {0, 1, 2, 6, 7, 8};
    for (int k = 0; k < 6; ++k) {
        const double x = tc_re(p[moduli[k]]);
        if (!(x > 0.0 && isfinite(x))) {
            pl_fail(report, bad);
            return 0;
        }
    }
    for (int a = 0; a < 6; ++a) {
        for (int b = 0; b < 6; ++b) {
            c[a][b] = 0.0;
        }
    }
    const tc_real s11 = 1.0 / p[0], s22 = 1.0 / p[1], s33 = 1.0 / p[2];
    const tc_real s12 = -p[3] / p[0], s13 = -p[4] / p[0], s23 = -p[5] / p[1];
    const tc_real c11 = s22 * s33 - s23 * s23, c12 = s13 * s23 - s12 * s33;
    const tc_real c13 = s12 * s23 - s13 * s22, c22 = s11 * s33 - s13 * s13;
    const tc_real c23 = s12 * s13 - s11 * s23, c33 = s11 * s22 - s12 * s12;
    const tc_real det = s11 * c11 + s12 * c12 + s13 * c13;
    if (!(tc_re(c33) > 0.0 && tc_re(det) > 0.0) || !isfinite(tc_re(det))) {
        pl_fail(report, bad);
        return 0;
    }
    if (!plane_stress) {
        c[0][0] = c11 / det;
        c[1][1] = c22 / det;
        c[2][2] = c33 / det;
        c[0][1] = c[1][0] = c12 / det;
        c[0][2] = c[2][0] = c13 / det;
        c[1][2] = c[2][1] = c23 / det;
        c[3][3] = p[8];
        c[4][4] = p[7];
        c[5][5] = p[6];
        return 1;
    }
    const tc_real nu21 = p[3] * p[1] / p[0];
    const tc_real den = 1.0 - p[3] * nu21;
    if (!(tc_re(den) > 0.0)) {
        pl_fail(report, "1 - nu12 nu21 must be positive (properties[0], properties[1], properties[3])");
        return 0;
    }
    c[0][0] = p[0] / den;
    c[1][1] = p[1] / den;
    c[0][1] = c[1][0] = p[3] * p[1] / den;
    c[5][5] = p[6];
    return 1;
}

/* Hashin index of mode m and its gradient (zero when the mode is inactive). */
static tc_real pl_hashin(int m, const tc_real s[6], const tc_real *x, tc_real g[6])
{
    const tc_real xt = x[0], xc = x[1], yt = x[2], yc = x[3], sl = x[4];
    const tc_real st = 0.5 * yc;
    for (int a = 0; a < 6; ++a) {
        g[a] = 0.0;
    }
    const tc_real shear_l = (s[5] * s[5] + s[4] * s[4]) / (sl * sl);
    const int tens11 = tc_re(s[0]) >= 0.0;
    const int tens22 = tc_re(s[1] + s[2]) >= 0.0;
    if (m == PL_FT && tens11) {
        g[0] = 2.0 * s[0] / (xt * xt);
        g[5] = 2.0 * s[5] / (sl * sl);
        g[4] = 2.0 * s[4] / (sl * sl);
        return (s[0] / xt) * (s[0] / xt) + shear_l;
    }
    if (m == PL_FC && !tens11) {
        g[0] = 2.0 * s[0] / (xc * xc);
        return (s[0] / xc) * (s[0] / xc);
    }
    if ((m == PL_MT && tens22) || (m == PL_MC && !tens22)) {
        const tc_real y = m == PL_MT ? yt : yc;
        const tc_real p = s[1] + s[2];
        const tc_real st2 = st * st;
        g[1] = 2.0 * p / (y * y) - s[2] / st2;
        g[2] = 2.0 * p / (y * y) - s[1] / st2;
        g[3] = 2.0 * s[3] / st2;
        g[5] = 2.0 * s[5] / (sl * sl);
        g[4] = 2.0 * s[4] / (sl * sl);
        return (p / y) * (p / y) + (s[3] * s[3] - s[1] * s[2]) / st2 + shear_l;
    }
    return 0.0;
}

static void pl_update(int flaw, const tc_call *call, const tc_real *p, const tc_real *strain,
                      const tc_real *dstrain, const tc_real *state0, tc_real *stress,
                      tc_real *state, tc_real *tangent, tc_real *dstress_dtemp, tc_energy *energy,
                      tc_report *report)
{
    static const int slots6[6] = {0, 1, 2, 3, 4, 5};
    static const int slots3[3] = {0, 1, 5};
    const int n = call->ncomp;
    if (n != 6 && n != 3) {
        pl_fail(report, "ncomp must be 6 (solid-3d) or 3 (plane stress)");
        return;
    }
    if (call->nproperties < PL_NPROP || call->nstate < PL_NSTATE) {
        pl_fail(report, "needs 26 properties and 8 state variables (DEVELOPERS.md)");
        return;
    }
    const int plane_stress = n == 3;
    const int *slots = plane_stress ? slots3 : slots6;
    tc_real c[6][6], r[3][3];
    if (!pl_stiffness(p, plane_stress, c, report) || !pl_axes(p, r, report)) {
        return;
    }
    if (plane_stress && (fabs(tc_re(r[2][0])) > 1e-12 || fabs(tc_re(r[2][1])) > 1e-12)) {
        pl_fail(report, "in plane stress the material axes must lie in the 1-2 plane (a1z = a2z = 0)");
        return;
    }
    for (int k = PL_XT; k < PL_ETA; ++k) {
        const double v = tc_re(p[k]);
        if (!(v > 0.0 && isfinite(v))) {
            pl_fail(report, "strengths, fracture energies and L (properties[15..25]) must be positive");
            return;
        }
    }
    const tc_real eta = p[PL_ETA];
    if (!(tc_re(eta) >= 0.0 && isfinite(tc_re(eta)))) {
        pl_fail(report, "the viscosity eta (properties[25]) must be zero or positive");
        return;
    }
    const double dt = call->dtime;
    const int viscous = tc_re(eta) > 0.0;
    if (viscous && !(dt >= 0.0 && isfinite(dt))) {
        pl_fail(report, "viscous damage needs a time increment >= 0");
        return;
    }

    /* Strain rotation T (e_m = T e, sigma = T^T sigma_m) from the Mandel rotation Q. */
    tc_real q[6][6], t[6][6];
    ma_rotation(r, q);
    for (int a = 0; a < 6; ++a) {
        for (int b = 0; b < 6; ++b) {
            /* u = 1/w: T_ab = Q_ba u_b / u_a = Q_ba w_a / w_b. */
            t[a][b] = q[b][a] * (ma_weight(a) / ma_weight(b));
        }
    }
    tc_real eg[6] = {0, 0, 0, 0, 0, 0}, em[6], st[6];
    for (int i = 0; i < n; ++i) {
        eg[slots[i]] = strain[i] + dstrain[i];
    }
    for (int a = 0; a < 6; ++a) {
        em[a] = 0.0;
        for (int b = 0; b < 6; ++b) {
            em[a] += t[a][b] * eg[b];
        }
    }
    for (int a = 0; a < 6; ++a) {
        st[a] = 0.0;
        for (int b = 0; b < 6; ++b) {
            st[a] += c[a][b] * em[b];
        }
    }

    tc_real d[4], dd[4][6];
    int growing = 0, failed = 0;
    const tc_real v = viscous ? dt / (eta + dt) : 1.0;
    const tc_real v_tangent = flaw == FLAW_VISCOUS_NO_FACTOR ? 1.0 : v;
    const tc_real *x = p + PL_XT;
    /* Snap-back: every mode needs rf > 1; among the modes that snap back name the one with
     * the smallest admissible length (for the correct routine the smallest of all). */
    tc_real rfs[4];
    int worst = -1;
    double worst_l = 0.0;
    for (int m = 0; m < 4; ++m) {
        const tc_real xm = x[m];
        const tc_real ckk = m < 2 ? c[0][0] : c[1][1];
        const tc_real g_c = p[PL_G + m];
        const tc_real len = flaw == FLAW_LENGTH_DROPPED ? 1.0 : p[PL_L];
        rfs[m] = 2.0 * g_c * ckk / (xm * xm * len);
        const double lmax = 2.0 * tc_re(g_c) * tc_re(ckk) / (tc_re(xm) * tc_re(xm));
        if (tc_re(rfs[m]) <= 1.0 && (worst < 0 || lmax < worst_l)) {
            worst = m;
            worst_l = lmax;
        }
    }
    if (worst >= 0) {
        char text[TC_MESSAGE_LEN];
        snprintf(text, sizeof text, "L snaps back in %s; largest admissible L = %.6e",
                 pl_mode_names[worst], worst_l);
        pl_fail(report, text);
        return;
    }
    for (int m = 0; m < 4; ++m) {
        const tc_real rf = rfs[m];
        tc_real grad[6];
        const tc_real f = pl_hashin(m, st, x, grad);
        const tc_real r_trial = tc_re(f) <= 0.0 ? tc_cst(0.0) : tc_sqrt(f);
        const tc_real r_old = state0[m];
        const tc_real r_hist = flaw == FLAW_HEALING ? tc_cst(1.0) : tc_max(r_old, tc_cst(1.0));
        const int loading = tc_re(r_trial) > tc_re(r_hist);
        const tc_real r_new = loading ? r_trial : r_hist;
        tc_real d_inv = 0.0, dd_dr = 0.0;
        if (tc_re(r_new) <= 1.0) {
            d_inv = 0.0;
        } else if (tc_re(r_new) >= tc_re(rf)) {
            d_inv = 1.0;
        } else {
            const tc_real k = rf / (rf - 1.0);
            d_inv = k * (r_new - 1.0) / r_new;
            dd_dr = k / (r_new * r_new);
        }
        state[m] = flaw == FLAW_HEALING ? r_trial : tc_max(r_old, r_trial);
        const tc_real d_old = state0[4 + m];
        const tc_real d_new = viscous ? (eta * d_old + dt * d_inv) / (eta + dt) : d_inv;
        const int kept = flaw != FLAW_HEALING && tc_re(d_old) >= tc_re(d_new);
        d[m] = kept ? d_old : d_new;
        state[4 + m] = d[m];
        for (int a = 0; a < 6; ++a) {
            dd[m][a] = 0.0;
        }
        if (loading && !kept && tc_re(dd_dr) > 0.0) {
            growing = 1;
            const tc_real k = v_tangent * dd_dr / (2.0 * r_new);
            for (int a = 0; a < 6; ++a) {
                dd[m][a] = k * grad[a];
            }
        }
        if (tc_re(d[m]) >= 1.0) {
            failed = 1;
        }
    }
    for (int k = PL_NSTATE; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    const int fibre = tc_re(st[0]) >= 0.0 ? PL_FT : PL_FC;
    const int matrix = tc_re(st[1] + st[2]) >= 0.0 ? PL_MT : PL_MC;
    tc_real keep = 1.0;
    for (int m = 0; m < 4; ++m) {
        keep *= 1.0 - d[m];
    }
    const tc_real d_s = 1.0 - keep;
    tc_real dds[6] = {0, 0, 0, 0, 0, 0};
    if (flaw != FLAW_NO_COUPLING) {
        for (int m = 0; m < 4; ++m) {
            tc_real others = 1.0;
            for (int o = 0; o < 4; ++o) {
                if (o != m) {
                    others *= 1.0 - d[o];
                }
            }
            for (int a = 0; a < 6; ++a) {
                dds[a] += others * dd[m][a];
            }
        }
    }
    const tc_real dcomp[6] = {d[fibre], d[matrix], d[matrix], d_s, d_s, d_s};
    tc_real sm[6], km[6][6];
    for (int i = 0; i < 6; ++i) {
        sm[i] = (1.0 - dcomp[i]) * st[i];
        const tc_real *grad_d = i == 0 ? dd[fibre] : (i < 3 ? dd[matrix] : dds);
        for (int j = 0; j < 6; ++j) {
            tc_real k = (1.0 - dcomp[i]) * c[i][j];
            if (flaw != FLAW_SECANT) {
                tc_real gc = 0.0;
                for (int o = 0; o < 6; ++o) {
                    gc += grad_d[o] * c[o][j];
                }
                k -= st[i] * gc;
            }
            km[i][j] = k;
        }
    }
    tc_real kt[6][6];
    ma_product(km, t, 0, kt);
    for (int i = 0; i < n; ++i) {
        const int si = slots[i];
        tc_real s = 0.0;
        for (int a = 0; a < 6; ++a) {
            s += t[a][si] * sm[a];
        }
        stress[i] = s;
        for (int j = 0; j < n; ++j) {
            tc_real k = 0.0;
            for (int a = 0; a < 6; ++a) {
                k += t[a][si] * kt[a][slots[j]];
            }
            tangent[i + j * n] = k;
        }
        dstress_dtemp[i] = 0.0;
    }
    energy->stored = 0.0;
    energy->dissipated = 0.0;
    int damaged = 0;
    for (int m = 0; m < 4; ++m) {
        damaged = damaged || tc_re(d[m]) > 0.0;
    }
    report->provides = 0;
    report->branch = growing ? 1 : (failed ? 3 : (damaged ? 2 : 0));
    report->status = TC_STATUS_OK;
}

#define PL_ENTRY(name, flaw)                                                                 \
    TC_ROUTINE(name)                                                                         \
    {                                                                                        \
        (void)temperature;                                                                          \
        (void)stress0;                                                                       \
        pl_update(flaw, call, properties, strain, dstrain, state0, stress, state, tangent,       \
                  dstress_dtemp, energy, report);                                            \
    }

PL_ENTRY(c_ply, FLAW_NONE)
PL_ENTRY(c_ply_secant, FLAW_SECANT)
PL_ENTRY(c_ply_no_coupling, FLAW_NO_COUPLING)
PL_ENTRY(c_ply_viscous_no_factor, FLAW_VISCOUS_NO_FACTOR)
PL_ENTRY(c_ply_length_dropped, FLAW_LENGTH_DROPPED)
PL_ENTRY(c_ply_healing, FLAW_HEALING)
