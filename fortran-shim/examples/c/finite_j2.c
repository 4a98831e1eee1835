/*
 * finite_j2.c -- finite-strain J2 plasticity with the multiplicative split, logarithmic
 * elastic strain and exponential-map return (tancheck_finite.h), the reference model
 * "j2-log" in C (crates/tancheck-models/src/finite/j2_log.rs; Simo 1992, CMAME 99:61-112;
 * Eterovic & Bathe 1990, IJNME 30:1099-1114; from memory).
 *
 * Update: b_n = exp(2 ee_n), f = F1 F0^-1, btr = f b_n f^T, etr = 1/2 ln btr; Kirchhoff
 * stress tau = K tr(ee) I + 2G dev(ee); radial return in ee with linear isotropic hardening
 * (sy = sy0 + H alpha). ln, exp and the square roots are eigen-free (Denman-Beavers square
 * roots, inverse scaling and squaring, scaling and squaring), so the _cx twin carries exact
 * derivative parts even when principal stretches coincide.
 *
 * Tangent: the Jaumann tangent of tau is cJ = D : M, D = K 1(x)1 + 2G theta Idev
 * - 2G theta_bar n(x)n the consistent small-strain tangent, M the derivative of 1/2 ln btr
 * along d btr = d btr + btr d (in the eigenbasis of btr, M_ab = (la + lb)/2 (ln la - ln lb)
 * / (la - lb), 1 when equal; Jacobi eigenvectors). Other measures from cJ: the response to
 * dF = l F is dtau = cJ : sym l + w tau - tau w (w = skew l); truesdell subtracts
 * d tau + tau d, sigma- divides by J, ds-de and dp-df pull back. tau-green-naghdi is not
 * implemented here (status failed).
 *
 * Properties [E, nu, sy0, H]; state [ee (6: 11 22 33 23 13 12), alpha], zero at the
 * reference configuration. Energy: stored K/2 tr(ee)^2 + G dev ee : dev ee + H alpha^2/2,
 * dissipated sy0 alpha.
 *
 * Symbols: c_j2log; c_j2log_material_as_spatial (returns dS/dE where a spatial measure is
 * declared); c_j2log_geometric_missing (dP/dF without the initial-stress term dF S, i.e.
 * delta_ik S_JL); each with its twin _cx (-DTC_COMPLEX).
 */

#include "tancheck_cstep.h"
#include "tancheck_finite.h"
#include "finite_tensor.h"

typedef tc_real jl_m3[3][3];
typedef double jl_d3[3][3];

static const int JL_I[6] = {0, 1, 2, 1, 0, 0};
static const int JL_J[6] = {0, 1, 2, 2, 2, 1};

static void jl_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    int k = 0;
    for (; text[k] != '\0' && k < TC_MESSAGE_LEN - 1; ++k) report->message[k] = text[k];
    report->message[k] = '\0';
}

static void jl_copy(const jl_m3 a, jl_m3 b)
{
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) b[i][j] = a[i][j];
}

/* Frobenius norm of the real part of a - s I. */
static double jl_dist(const jl_m3 a, double s)
{
    double n = 0.0;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            double x = tc_re(a[i][j]) - (i == j ? s : 0.0);
            n += x * x;
        }
    return sqrt(n);
}

/* Square root of an SPD tensor: Denman-Beavers; stops on real parts, then two more
 * iterations so that the derivative parts converge too. */
static void jl_sqrt(const jl_m3 a, jl_m3 y)
{
    jl_m3 z = {{1.0, 0.0, 0.0}, {0.0, 1.0, 0.0}, {0.0, 0.0, 1.0}}, yi, zi;
    int extra = 0;
    jl_copy(a, y);
    for (int it = 0; it < 100 && extra <= 2; ++it) {
        double change = 0.0, size = 0.0;
        ft_inverse(y, yi);
        ft_inverse(z, zi);
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 3; ++j) {
                tc_real yn = 0.5 * (y[i][j] + zi[i][j]);
                z[i][j] = 0.5 * (z[i][j] + yi[i][j]);
                change = fmax(change, fabs(tc_re(yn) - tc_re(y[i][j])));
                size = fmax(size, fabs(tc_re(yn)));
                y[i][j] = yn;
            }
        if (change <= 1e-15 * size) ++extra;
    }
}

/* ln of an SPD tensor: square roots until |Y - I| <= 0.1, 2 artanh((Y - I)(Y + I)^-1) by
 * eight terms of its series, times 2^k. */
static void jl_log(const jl_m3 a, jl_m3 out)
{
    jl_m3 y, t, p, m, z, z2, term;
    int k = 0;
    jl_copy(a, y);
    while (k < 60 && jl_dist(y, 1.0) > 0.1) {
        jl_sqrt(y, t);
        jl_copy(t, y);
        ++k;
    }
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            m[i][j] = y[i][j] - (i == j ? 1.0 : 0.0);
            p[i][j] = y[i][j] + (i == j ? 1.0 : 0.0);
        }
    ft_inverse(p, t);
    ft_mul(m, t, z);
    ft_mul(z, z, z2);
    jl_copy(z, term);
    jl_copy(z, out);
    for (int n = 1; n < 8; ++n) {
        ft_mul(term, z2, t);
        jl_copy(t, term);
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 3; ++j) out[i][j] += term[i][j] / (2.0 * n + 1.0);
    }
    double scale = 2.0 * ldexp(1.0, k);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) out[i][j] *= scale;
}

/* exp of a symmetric tensor: scaled by 2^-s to norm <= 1/4, Taylor to degree 16, squared. */
static void jl_exp(const jl_m3 a, jl_m3 out)
{
    jl_m3 x, term, t;
    int s = 0;
    double n = jl_dist(a, 0.0);
    while (s < 60 && n / ldexp(1.0, s) > 0.25) ++s;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            x[i][j] = a[i][j] / ldexp(1.0, s);
            term[i][j] = i == j ? 1.0 : 0.0;
            out[i][j] = term[i][j];
        }
    for (int m = 1; m <= 16; ++m) {
        ft_mul(term, x, t);
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 3; ++j) {
                term[i][j] = t[i][j] / (double)m;
                out[i][j] += term[i][j];
            }
    }
    for (int r = 0; r < s; ++r) {
        ft_mul(out, out, t);
        jl_copy(t, out);
    }
}

/* Eigenvalues and eigenvectors (columns of q) of a real symmetric tensor, cyclic Jacobi. */
static void jl_eigen(const jl_d3 a, double lam[3], jl_d3 q)
{
    static const int P[3] = {0, 0, 1}, R[3] = {1, 2, 2};
    jl_d3 m;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            m[i][j] = a[i][j];
            q[i][j] = i == j ? 1.0 : 0.0;
        }
    for (int sweep = 0; sweep < 60; ++sweep) {
        double off = fabs(m[0][1]) + fabs(m[0][2]) + fabs(m[1][2]);
        double size = fabs(m[0][0]) + fabs(m[1][1]) + fabs(m[2][2]);
        if (off <= 1e-300 || off <= 1e-18 * size) break;
        for (int k = 0; k < 3; ++k) {
            int p = P[k], r = R[k];
            if (m[p][r] == 0.0) continue;
            double theta = (m[r][r] - m[p][p]) / (2.0 * m[p][r]);
            double t = theta == 0.0 ? 1.0 : copysign(1.0, theta) / (fabs(theta) + sqrt(theta * theta + 1.0));
            double c = 1.0 / sqrt(t * t + 1.0), s = t * c;
            for (int i = 0; i < 3; ++i) {
                double a1 = m[i][p], a2 = m[i][r];
                m[i][p] = c * a1 - s * a2;
                m[i][r] = s * a1 + c * a2;
            }
            for (int i = 0; i < 3; ++i) {
                double a1 = m[p][i], a2 = m[r][i];
                m[p][i] = c * a1 - s * a2;
                m[r][i] = s * a1 + c * a2;
            }
            for (int i = 0; i < 3; ++i) {
                double a1 = q[i][p], a2 = q[i][r];
                q[i][p] = c * a1 - s * a2;
                q[i][r] = s * a1 + c * a2;
            }
        }
    }
    for (int i = 0; i < 3; ++i) lam[i] = m[i][i];
}

/* (la + lb)/2 (ln la - ln lb)/(la - lb), 1 when equal. */
static double jl_divided(double la, double lb)
{
    double u = (la - lb) / lb;
    double g = u == 0.0 ? 1.0 : log1p(u) / u;
    return 0.5 * (la + lb) * g / lb;
}

enum jl_flaw { JL_NONE, JL_MATERIAL_AS_SPATIAL, JL_GEOMETRIC_MISSING };

/* What the tangent needs, in real numbers. */
typedef struct jl_return {
    double k, g, theta, theta_bar, lam[3];
    jl_d3 q, n, tau, f, fi;
    jl_d3 rot, u; /* F = R U, for the Green-Naghdi measure */
} jl_return;

/* The rotation R of F = R U by Newton's iteration R <- (R + R^-T)/2, and U = R^T F. */
static void jl_polar(jl_return *r)
{
    jl_d3 x;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) r->rot[i][j] = r->f[i][j];
    for (int it = 0; it < 100; ++it) {
        double d = r->rot[0][0] * (r->rot[1][1] * r->rot[2][2] - r->rot[1][2] * r->rot[2][1]) -
                   r->rot[0][1] * (r->rot[1][0] * r->rot[2][2] - r->rot[1][2] * r->rot[2][0]) +
                   r->rot[0][2] * (r->rot[1][0] * r->rot[2][1] - r->rot[1][1] * r->rot[2][0]);
        double change = 0.0;
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 3; ++j) {
                /* (R^-T)_ij = cofactor_ij / det */
                int i1 = (i + 1) % 3, i2 = (i + 2) % 3, j1 = (j + 1) % 3, j2 = (j + 2) % 3;
                double cof = r->rot[i1][j1] * r->rot[i2][j2] - r->rot[i1][j2] * r->rot[i2][j1];
                x[i][j] = 0.5 * (r->rot[i][j] + cof / d);
                change = fmax(change, fabs(x[i][j] - r->rot[i][j]));
            }
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 3; ++j) r->rot[i][j] = x[i][j];
        if (change <= 1e-15) break;
    }
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            r->u[i][j] = 0.0;
            for (int k = 0; k < 3; ++k) r->u[i][j] += r->rot[k][i] * r->f[k][j];
        }
}

/* Omega = dR R^T for dF = d F: W = R^T dR has the axial vector w = (tr U I - U)^-1 axial(G - G^T),
 * G = R^T dF (from W U + U W = G - G^T); Omega = R W R^T. */
static void jl_polar_spin(const jl_return *r, const jl_d3 d, jl_d3 om)
{
    jl_d3 gm = {{0}}, k, ki, w, x;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j)
            for (int a = 0; a < 3; ++a)
                for (int b = 0; b < 3; ++b) gm[i][j] += r->rot[a][i] * d[a][b] * r->f[b][j];
    double rhs[3] = {gm[2][1] - gm[1][2], gm[0][2] - gm[2][0], gm[1][0] - gm[0][1]};
    double tr = r->u[0][0] + r->u[1][1] + r->u[2][2];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) k[i][j] = (i == j ? tr : 0.0) - r->u[i][j];
    double det = k[0][0] * (k[1][1] * k[2][2] - k[1][2] * k[2][1]) - k[0][1] * (k[1][0] * k[2][2] - k[1][2] * k[2][0]) +
                 k[0][2] * (k[1][0] * k[2][1] - k[1][1] * k[2][0]);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            int i1 = (j + 1) % 3, i2 = (j + 2) % 3, j1 = (i + 1) % 3, j2 = (i + 2) % 3;
            ki[i][j] = (k[i1][j1] * k[i2][j2] - k[i1][j2] * k[i2][j1]) / det; /* adjugate / det */
        }
    double v[3];
    for (int i = 0; i < 3; ++i) v[i] = ki[i][0] * rhs[0] + ki[i][1] * rhs[1] + ki[i][2] * rhs[2];
    w[0][0] = w[1][1] = w[2][2] = 0.0;
    w[2][1] = v[0];
    w[1][2] = -v[0];
    w[0][2] = v[1];
    w[2][0] = -v[1];
    w[1][0] = v[2];
    w[0][1] = -v[2];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            x[i][j] = 0.0;
            for (int a = 0; a < 3; ++a) x[i][j] += r->rot[i][a] * w[a][j];
        }
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            om[i][j] = 0.0;
            for (int a = 0; a < 3; ++a) om[i][j] += x[i][a] * r->rot[j][a];
        }
}

/* dtau for dF = l F: cJ : sym l + w tau - tau w. */
static void jl_response(const jl_return *r, const jl_d3 l, jl_d3 dtau)
{
    jl_d3 dt, e;
    for (int a = 0; a < 3; ++a)
        for (int b = 0; b < 3; ++b) {
            double s = 0.0;
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) s += r->q[i][a] * 0.5 * (l[i][j] + l[j][i]) * r->q[j][b];
            dt[a][b] = s * jl_divided(r->lam[a], r->lam[b]);
        }
    double tr = 0.0, nn = 0.0;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            double s = 0.0;
            for (int a = 0; a < 3; ++a)
                for (int b = 0; b < 3; ++b) s += r->q[i][a] * dt[a][b] * r->q[j][b];
            e[i][j] = s;
        }
    for (int i = 0; i < 3; ++i) tr += e[i][i];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) nn += r->n[i][j] * e[i][j];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            double dev = e[i][j] - (i == j ? tr / 3.0 : 0.0);
            double v = 2.0 * r->g * r->theta * dev - 2.0 * r->g * r->theta_bar * r->n[i][j] * nn + (i == j ? r->k * tr : 0.0);
            for (int k = 0; k < 3; ++k) {
                double w_ik = 0.5 * (l[i][k] - l[k][i]), w_kj = 0.5 * (l[k][j] - l[j][k]);
                v += w_ik * r->tau[k][j] - r->tau[i][k] * w_kj;
            }
            dtau[i][j] = v;
        }
}

/* The tangent in the declared measure, column-major. */
static void jl_tangent(const jl_return *r, int measure, enum jl_flaw flaw, tc_real *tangent)
{
    double jac = r->f[0][0] * (r->f[1][1] * r->f[2][2] - r->f[1][2] * r->f[2][1]) -
                 r->f[0][1] * (r->f[1][0] * r->f[2][2] - r->f[1][2] * r->f[2][0]) +
                 r->f[0][2] * (r->f[1][0] * r->f[2][1] - r->f[1][1] * r->f[2][0]);
    int ncol = measure == TC_TANGENT_DP_DF ? 9 : 6;
    for (int c = 0; c < ncol; ++c) {
        jl_d3 d = {{0}}, l = {{0}}, dtau, out;
        if (measure == TC_TANGENT_DP_DF) {
            d[c % 3][c / 3] = 1.0; /* dF = e_k (x) e_l, l = dF F^-1 */
        } else {
            int k = JL_I[c], m = JL_J[c];
            d[k][m] = k == m ? 1.0 : 0.5;
            d[m][k] = d[k][m];
        }
        if (measure == TC_TANGENT_DP_DF || measure == TC_TANGENT_DS_DE) {
            jl_d3 df = {{0}}; /* dp-df: dF = d; ds-de: dF = F^-T d, so that dE = d */
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) {
                    if (measure == TC_TANGENT_DP_DF)
                        df[i][j] = d[i][j];
                    else
                        for (int k = 0; k < 3; ++k) df[i][j] += r->fi[k][i] * d[k][j];
                }
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j)
                    for (int k = 0; k < 3; ++k) l[i][j] += df[i][k] * r->fi[k][j];
            jl_response(r, l, dtau);
            /* P = tau F^-T: dP = dtau F^-T - tau F^-T dF^T F^-T; S = F^-1 tau F^-T:
             * dS = F^-1 (dtau - l tau - tau l^T) F^-T */
            jl_d3 x;
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) {
                    double v = dtau[i][j];
                    for (int k = 0; k < 3; ++k) {
                        if (measure == TC_TANGENT_DP_DF && flaw == JL_GEOMETRIC_MISSING)
                            v -= r->tau[i][k] * l[j][k] + l[i][k] * r->tau[k][j]; /* drops dF S */
                        else if (measure == TC_TANGENT_DP_DF)
                            v -= r->tau[i][k] * l[j][k];
                        else
                            v -= l[i][k] * r->tau[k][j] + r->tau[i][k] * l[j][k];
                    }
                    x[i][j] = v;
                }
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) {
                    double v = 0.0;
                    for (int b = 0; b < 3; ++b) {
                        if (measure == TC_TANGENT_DP_DF)
                            v += x[i][b] * r->fi[j][b];
                        else
                            for (int a = 0; a < 3; ++a) v += r->fi[i][a] * x[a][b] * r->fi[j][b];
                    }
                    out[i][j] = v;
                }
        } else {
            jl_d3 om = {{0}};
            jl_response(r, d, dtau);
            if (measure == TC_TANGENT_TAU_GREEN_NAGHDI) jl_polar_spin(r, d, om);
            for (int i = 0; i < 3; ++i)
                for (int j = 0; j < 3; ++j) {
                    double v = dtau[i][j];
                    for (int k = 0; k < 3; ++k) v -= om[i][k] * r->tau[k][j] - r->tau[i][k] * om[k][j];
                    if (measure == TC_TANGENT_TAU_TRUESDELL || measure == TC_TANGENT_SIGMA_TRUESDELL)
                        for (int k = 0; k < 3; ++k) v -= d[i][k] * r->tau[k][j] + r->tau[i][k] * d[k][j];
                    if (measure == TC_TANGENT_SIGMA_JAUMANN || measure == TC_TANGENT_SIGMA_TRUESDELL) v /= jac;
                    out[i][j] = v;
                }
        }
        if (ncol == 9)
            for (int i = 0; i < 9; ++i) tangent[i + 9 * c] = out[i % 3][i / 3];
        else
            for (int i = 0; i < 6; ++i) tangent[i + 6 * c] = out[JL_I[i]][JL_J[i]];
    }
}

static void jl_point(const tc_finite_call *call, const tc_real *properties, const tc_real *f0,
                     const tc_real *f1, const tc_real *state0, tc_real *stress, tc_real *state,
                     tc_real *tangent, tc_energy *energy, tc_report *report, enum jl_flaw flaw)
{
    const int measure = call->tangent_measure;
    if (call->nproperties < 4 || call->nstate < 7) {
        jl_fail(report, "j2-log: needs 4 properties (E, nu, sy0, H) and 7 state variables");
        return;
    }
    if (measure < 0 || measure > TC_TANGENT_DS_DE) {
        jl_fail(report, "j2-log: this tangent measure is not implemented in C");
        return;
    }
    tc_real e = properties[0], nu = properties[1], sy0 = properties[2], h = properties[3];
    tc_real k = e / (3.0 * (1.0 - 2.0 * nu)), g = e / (2.0 * (1.0 + nu));
    jl_m3 fa, fb, fr, ee2, bn, t, btr, etr, dev, tau;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            fa[i][j] = f0[i + 3 * j];
            fb[i][j] = f1[i + 3 * j];
        }
    tc_real jac = ft_det(fb);
    if (tc_re(jac) <= 0.0 || tc_re(ft_det(fa)) <= 0.0) {
        jl_fail(report, "j2-log: det F <= 0");
        return;
    }
    for (int s = 0; s < 6; ++s) {
        ee2[JL_I[s]][JL_J[s]] = 2.0 * state0[s];
        ee2[JL_J[s]][JL_I[s]] = 2.0 * state0[s];
    }
    tc_real alpha_n = state0[6];
    ft_inverse(fa, t);
    ft_mul(fb, t, fr);
    jl_exp(ee2, bn);
    ft_mul(fr, bn, t);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) btr[i][j] = t[i][0] * fr[j][0] + t[i][1] * fr[j][1] + t[i][2] * fr[j][2];
    jl_log(btr, etr);
    tc_real tr = 0.0, dd = 0.0;
    for (int i = 0; i < 3; ++i) tr += 0.5 * etr[i][i];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            dev[i][j] = 0.5 * etr[i][j] - (i == j ? tr / 3.0 : 0.0);
            dd += dev[i][j] * dev[i][j];
        }
    tc_real qtr = 2.0 * g * tc_sqrt(1.5 * dd);
    tc_real ftr = qtr - (sy0 + h * alpha_n);
    tc_real factor = 1.0, dalpha = 0.0;
    int plastic = tc_re(ftr) > 1e-12 * fabs(tc_re(sy0));
    if (plastic) {
        dalpha = ftr / (3.0 * g + h);
        factor = 1.0 - 3.0 * g * dalpha / qtr;
    }
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) tau[i][j] = 2.0 * g * factor * dev[i][j] + (i == j ? k * tr : 0.0);
    int cauchy = call->stress_measure == TC_STRESS_CAUCHY;
    for (int s = 0; s < 6; ++s) {
        tc_real ts = tau[JL_I[s]][JL_J[s]];
        stress[s] = cauchy ? ts / jac : ts;
        state[s] = factor * dev[JL_I[s]][JL_J[s]] + (s < 3 ? tr / 3.0 : 0.0);
    }
    tc_real alpha = alpha_n + dalpha;
    state[6] = alpha;
    for (int s = 7; s < call->nstate; ++s) state[s] = state0[s];
    energy->stored = 0.5 * k * tr * tr + g * dd * factor * factor + 0.5 * h * alpha * alpha;
    energy->dissipated = sy0 * alpha;
    report->branch = plastic;
    report->provides = TC_PROVIDES_ENERGY;
    if (!(call->flags & TC_WANT_TANGENT)) return;

    jl_return r;
    jl_d3 bre;
    double gr = tc_re(g);
    r.k = tc_re(k);
    r.g = gr;
    r.theta = 1.0;
    r.theta_bar = 0.0;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) {
            bre[i][j] = tc_re(btr[i][j]);
            r.tau[i][j] = tc_re(tau[i][j]);
            r.f[i][j] = tc_re(fb[i][j]);
            r.n[i][j] = plastic ? tc_re(dev[i][j]) / sqrt(tc_re(dd)) : 0.0;
        }
    ft_inverse(fb, t);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) r.fi[i][j] = tc_re(t[i][j]);
    if (plastic) {
        r.theta = 1.0 - 3.0 * gr * tc_re(dalpha) / tc_re(qtr);
        r.theta_bar = 3.0 * gr / (3.0 * gr + tc_re(h)) - (1.0 - r.theta);
    }
    jl_eigen(bre, r.lam, r.q);
    jl_polar(&r);
    int spatial = measure != TC_TANGENT_DP_DF && measure != TC_TANGENT_DS_DE;
    jl_tangent(&r, flaw == JL_MATERIAL_AS_SPATIAL && spatial ? TC_TANGENT_DS_DE : measure, flaw, tangent);
}

#define JL_ROUTINE(name, flaw)                                                                  \
    TC_FINITE_ROUTINE(name)                                                                     \
    {                                                                                           \
        (void)rotation;                                                                         \
        (void)temperature;                                                                      \
        (void)stress0;                                                                          \
        jl_point(call, properties, f0, f1, state0, stress, state, tangent, energy, report, flaw); \
    }

JL_ROUTINE(c_j2log, JL_NONE)
JL_ROUTINE(c_j2log_material_as_spatial, JL_MATERIAL_AS_SPATIAL)
JL_ROUTINE(c_j2log_geometric_missing, JL_GEOMETRIC_MISSING)
