/*
 * finite_hypo.c -- hypoelastic isotropic elasticity with the Jaumann rate of Kirchhoff
 * stress (tancheck_finite.h), the reference model "hypo-jaumann" in C
 * (crates/tancheck-models/src/finite/hypo.rs), and its flaw that never rotates the start
 * stress.
 *
 * Update of Hughes & Winget (1980), IJNME 15:1862-1867 (from memory): G = (F1 - F0) Fh^-1,
 * Fh = (F0 + F1)/2, de = sym G, dw = skew G; the rotation increment Q of the Jaumann frame
 * (the call's `rotation`, frame TC_FRAME_JAUMANN); tau1 = Q tau0 Q^T + C : de. Tangent
 * (tau-jaumann): the exact derivative along dF1 = D F1, D symmetric:
 * dG = (I - G/2) D F1 Fh^-1, dQ = (I - dw/2)^-1 (skew dG / 2) (Q + I),
 * dtau = dQ tau0 Q^T + Q tau0 dQ^T + C : sym dG. Properties [E, nu]; Kirchhoff stress; no state.
 *
 * Symbols: c_hypo, c_hypo_no_rotation (tau1 = tau0 + C : de, with its own exact tangent),
 * each with its twin _cx.
 */

#include "tancheck_cstep.h"
#include "tancheck_finite.h"
#include "finite_tensor.h"

typedef tc_real hy_m3[3][3];

static const int HY_I[6] = {0, 1, 2, 1, 0, 0};
static const int HY_J[6] = {0, 1, 2, 2, 2, 1};

/* C : sym(a) for isotropic elasticity, added to out. */
static void hy_elastic_add(tc_real lambda, tc_real mu, const hy_m3 a, hy_m3 out)
{
    tc_real tr = a[0][0] + a[1][1] + a[2][2];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) out[i][j] += mu * (a[i][j] + a[j][i]) + (i == j ? lambda * tr : 0.0);
}

static void hy_point(const tc_finite_call *call, const tc_real *properties, const tc_real *f0v,
                     const tc_real *f1v, const tc_real *rotation, const tc_real *stress0, tc_real *stress,
                     tc_real *tangent, tc_report *report, int rotate)
{
    if (call->tangent_measure != TC_TANGENT_TAU_JAUMANN || call->stress_measure != TC_STRESS_KIRCHHOFF) {
        report->status = TC_STATUS_FAILED;
        const char *t = "hypo-jaumann: Kirchhoff stress and the tau-jaumann tangent only";
        int k = 0;
        for (; t[k] != '\0' && k < TC_MESSAGE_LEN - 1; ++k) report->message[k] = t[k];
        report->message[k] = '\0';
        return;
    }
    tc_real e = properties[0], nu = properties[1];
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    tc_real mu = e / (2.0 * (1.0 + nu));
    hy_m3 f0, f1, fh, fhi, g, q, tau0, t1, tmp, m, nmat, a, ai, qp;
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            f0[i][j] = f0v[i + 3 * j];
            f1[i][j] = f1v[i + 3 * j];
            fh[i][j] = 0.5 * (f0v[i + 3 * j] + f1v[i + 3 * j]);
            q[i][j] = rotate ? rotation[i + 3 * j] : (i == j ? 1.0 : 0.0);
        }
    }
    for (int s = 0; s < 6; ++s) {
        tau0[HY_I[s]][HY_J[s]] = stress0[s];
        tau0[HY_J[s]][HY_I[s]] = stress0[s];
    }
    ft_inverse(fh, fhi);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) tmp[i][j] = f1[i][j] - f0[i][j];
    ft_mul(tmp, fhi, g);
    /* tau1 = Q tau0 Q^T + C : sym G */
    ft_mul(q, tau0, tmp);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) t1[i][j] = tmp[i][0] * q[j][0] + tmp[i][1] * q[j][1] + tmp[i][2] * q[j][2];
    hy_elastic_add(lambda, mu, g, t1); /* C : sym G = lambda tr(G) I + mu (G + G^T) */
    for (int s = 0; s < 6; ++s) stress[s] = t1[HY_I[s]][HY_J[s]];
    /* tangent */
    ft_mul(f1, fhi, m);
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            nmat[i][j] = (i == j ? 1.0 : 0.0) - 0.5 * g[i][j];
            a[i][j] = (i == j ? 1.0 : 0.0) - 0.25 * (g[i][j] - g[j][i]);
            qp[i][j] = q[i][j] + (i == j ? 1.0 : 0.0);
        }
    }
    ft_inverse(a, ai);
    for (int c = 0; c < 6; ++c) {
        hy_m3 d = {{0}}, dg, dtau = {{0}}, sk, dq, x;
        int k = HY_I[c], l = HY_J[c];
        d[k][l] = k == l ? 1.0 : 0.5;
        d[l][k] = d[k][l];
        ft_mul(nmat, d, tmp);
        ft_mul(tmp, m, dg);
        hy_elastic_add(lambda, mu, dg, dtau);
        if (rotate) {
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) sk[i][j] = 0.25 * (dg[i][j] - dg[j][i]);
            ft_mul(ai, sk, tmp);
            ft_mul(tmp, qp, dq);
            ft_mul(dq, tau0, tmp);
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) x[i][j] = tmp[i][0] * q[j][0] + tmp[i][1] * q[j][1] + tmp[i][2] * q[j][2];
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) dtau[i][j] += x[i][j] + x[j][i];
        }
        for (int r = 0; r < 6; ++r) tangent[r + 6 * c] = dtau[HY_I[r]][HY_J[r]];
    }
    report->branch = 0;
}

#define HY_ROUTINE(name, rotate)                                                                \
    TC_FINITE_ROUTINE(name)                                                                     \
    {                                                                                           \
        (void)temperature;                                                                      \
        (void)energy;                                                                           \
        for (int k = 0; k < call->nstate; ++k) state[k] = state0[k];                            \
        hy_point(call, properties, f0, f1, rotation, stress0, stress, tangent, report, rotate); \
    }

HY_ROUTINE(c_hypo, 1)
HY_ROUTINE(c_hypo_no_rotation, 0)
