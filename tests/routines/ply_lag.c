/* A plane-stress ply with damage, written for the tests (a user-style sweep found the newton
   probe failing its exact tangent): fibre tension/compression and matrix modes, strain-based
   linear softening, optional viscous lag. Components 11 22 12 (engineering shear). Made-up
   numbers in the tests that use it; not a validated ply model.
   properties: E1 E2 nu12 G12 e0ft euft e0fc eufc e0m eum a_shear eta
   state: r_ft r_fc r_m dv_ft dv_fc dv_m */
#include "tancheck_routine.h"
#include "tancheck_cstep.h"

static void soft(tc_real r, tc_real e0, tc_real eu, tc_real *d, tc_real *dd)
{
    *d = tc_cst(0.0); *dd = tc_cst(0.0);
    if (tc_re(r) > tc_re(e0)) {
        *d = eu * (r - e0) / (r * (eu - e0));
        *dd = eu * e0 / (r * r * (eu - e0));
        if (tc_re(*d) >= 1.0) { *d = tc_cst(1.0); *dd = tc_cst(0.0); }
    }
}

static void lamina(int v, const tc_call *call, const tc_real *p, const tc_real *strain,
                   const tc_real *dstrain, const tc_real *s0, tc_real *stress, tc_real *state,
                   tc_real *tangent, tc_report *report)
{
    tc_real E1 = p[0], E2 = p[1], nu12 = p[2], G12 = p[3];
    tc_real e0[3] = {p[4], p[6], p[8]}, eu[3] = {p[5], p[7], p[9]};
    tc_real as = p[10], eta = p[11];
    tc_real e[3];
    for (int i = 0; i < 3; ++i) e[i] = strain[i] + dstrain[i];
    /* equivalent strains and their gradients */
    tc_real eq[3], g[3][3];
    for (int k = 0; k < 3; ++k) for (int j = 0; j < 3; ++j) g[k][j] = tc_cst(0.0);
    int ften = tc_re(e[0]) >= 0.0;
    eq[0] = ften ? e[0] : tc_cst(0.0); if (ften) g[0][0] = tc_cst(1.0);
    eq[1] = ften ? tc_cst(0.0) : -e[0]; if (!ften) g[1][0] = tc_cst(-1.0);
    tc_real e22p = tc_re(e[1]) > 0.0 ? e[1] : tc_cst(0.0);
    eq[2] = tc_sqrt(e22p * e22p + as * as * e[2] * e[2]);
    if (tc_re(eq[2]) > 0.0) { g[2][1] = e22p / eq[2]; g[2][2] = as * as * e[2] / eq[2]; }
    tc_real dv[3], ddv[3];
    tc_real fac = tc_cst(1.0);
    double dt = call->dtime;
    if (tc_re(eta) > 0.0) fac = dt / (eta + dt);
    int grow_any = 0;
    for (int k = 0; k < 3; ++k) {
        tc_real r = s0[k];
        int grow = tc_re(eq[k]) > tc_re(r);
        if (grow) r = eq[k];
        tc_real d, dd;
        soft(r, e0[k], eu[k], &d, &dd);
        if (!grow) dd = tc_cst(0.0);
        if (tc_re(dd) != 0.0) grow_any = 1;
        /* viscous lag: dv = dv0 + fac (d - dv0) */
        tc_real dv0 = s0[3 + k];
        dv[k] = dv0 + fac * (d - dv0);
        if (tc_re(dv[k]) < tc_re(dv0)) dv[k] = dv0;
        ddv[k] = (v == 3) ? dd : fac * dd; /* variant 3: viscous factor left out */
        state[k] = r;
        state[3 + k] = dv[k];
    }
    report->branch = grow_any ? 1 : 0;
    tc_real df = ften ? dv[0] : dv[1];
    tc_real ddf[3];
    for (int j = 0; j < 3; ++j) ddf[j] = (ften ? ddv[0] * g[0][j] : ddv[1] * g[1][j]);
    tc_real ddm[3];
    for (int j = 0; j < 3; ++j) ddm[j] = ddv[2] * g[2][j];
    tc_real a = 1.0 - df, b = 1.0 - dv[2];
    tc_real nu21 = nu12 * E2 / E1, c = nu12 * nu21;
    tc_real De = 1.0 - a * b * c;
    tc_real Q[3][3] = {{a * E1 / De, a * b * nu21 * E1 / De, 0}, {a * b * nu21 * E1 / De, b * E2 / De, 0}, {0, 0, a * b * G12}};
    for (int i = 0; i < 3; ++i) {
        stress[i] = tc_cst(0.0);
        for (int j = 0; j < 3; ++j) stress[i] += Q[i][j] * e[j];
    }
    if (!(call->flags & TC_WANT_TANGENT)) return;
    tc_real D2 = De * De;
    tc_real Qa[3][3] = {{E1 / De + a * E1 * b * c / D2, b * nu21 * E1 / De + a * b * nu21 * E1 * b * c / D2, 0},
                        {0, b * E2 * b * c / D2, 0},
                        {0, 0, b * G12}};
    Qa[1][0] = Qa[0][1];
    tc_real Qb[3][3] = {{a * E1 * a * c / D2, a * nu21 * E1 / De + a * b * nu21 * E1 * a * c / D2, 0},
                        {0, E2 / De + b * E2 * a * c / D2, 0},
                        {0, 0, a * G12}};
    Qb[1][0] = Qb[0][1];
    if (v == 4) { Qa[2][2] = tc_cst(0.0); Qb[2][2] = tc_cst(0.0); } /* shear-damage term left out */
    tc_real qa[3], qb[3];
    for (int i = 0; i < 3; ++i) {
        qa[i] = tc_cst(0.0); qb[i] = tc_cst(0.0);
        for (int j = 0; j < 3; ++j) { qa[i] += Qa[i][j] * e[j]; qb[i] += Qb[i][j] * e[j]; }
    }
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            tc_real t = Q[i][j];
            if (v != 1) {
                t -= qa[i] * ddf[j];               /* da/de = -ddf */
                if (v != 2) t -= qb[i] * ddm[j];   /* variant 2: matrix damage term left out */
            }
            tangent[i + 3 * j] = t;
        }
}
#define LAM(name, v)                                                                         \
    TC_ROUTINE(name)                                                                         \
    {                                                                                        \
        (void)temperature; (void)stress0; (void)dstress_dtemp; (void)energy;                 \
        lamina(v, call, properties, strain, dstrain, state0, stress, state, tangent, report); \
    }
LAM(lag_ply, 0)
LAM(lag_ply_secant, 1)
LAM(lag_ply_no_matrix_term, 2)
LAM(lag_ply_no_viscous_factor, 3)
LAM(lag_ply_no_shear_term, 4)
