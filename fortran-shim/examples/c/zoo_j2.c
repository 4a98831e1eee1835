/*
 * zoo_j2.c -- J2 routines with a deliberately wrong tangent, for `tancheck selftest`.
 *
 * Every routine here has the stress update of the reference "j2" (j2.c; Simo & Taylor 1985,
 * CMAME 48; Simo & Hughes 1998, Computational Inelasticity, Box 3.2) and returns a tangent
 * spoiled in one documented way. The Rust models of the same names (tancheck-models, zoo)
 * give the same results.
 *
 *   c_j2_shear_factor           shear columns of the consistent tangent halved (written as if
 *                               for tensor shear strain)
 *   c_j2_shear_permuted         tangent rows and columns in shear order 12, 13, 23 while stress
 *                               and strain use 23, 13, 12 (ncomp 6 only)
 *   c_j2_elastic_first_plastic  elastic tangent in a plastic increment from alpha_n = 0
 *   c_j2_stale                  the consistent tangent of the previous increment, from two
 *                               extra state entries (see below)
 *   c_j2_no_kinematic           H_kin left out of theta_bar (the update keeps it)
 *   c_j2_unit_factor            consistent tangent times 1000
 *   c_j2_one_column             13 column of the tangent taken from the elastic tangent
 *                               (ncomp 6 only)
 *   c_j2_reversal               plastic correction with the wrong sign (+2 mu theta_bar n(x)n),
 *                               only in a plastic increment that reverses the previous flow
 *                               (ncomp extra state entries, see below)
 *   c_j2_single_entry           entry 33/22 of the consistent tangent times 1 + 1e-4
 *   c_j2_plastic_sign           plastic correction with the wrong sign in every plastic increment
 *   c_j2_rank_two               after yield, + c (n(x)1 + 1(x)n), c = 0.05 mu (rank two)
 *   c_j2_term_missing           after yield, the plastic correction 2 mu theta_bar n(x)n left
 *                               out (theta kept)
 *   c_twin_real_sqrt            tangent and real update correct; the complex twin takes the norm
 *                               of xi_tr with a real-only square root, sqrt(creal(x)): NOT
 *                               complex-step safe, on purpose
 *   c_twin_conjugate            the same with the norm as sum x*conj(x): NOT complex-step safe,
 *                               on purpose
 *
 * Layout (DEVELOPERS.md, "Reference models", j2): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
 * (11, 22, 33, 12), engineering shear strain; properties [E, nu, sigma_y0, H_iso, Q, b, H_kin];
 * state [eps_p (ncomp), alpha, beta (ncomp)], 2 ncomp + 1 entries; entries past these are
 * carried through unchanged. c_j2_stale uses two more, 2 ncomp + 3 in all:
 *   state[2n+1] = 1 - theta, state[2n+2] = theta_bar of the consistent tangent at the end of the
 *   increment (0, 0 when it is elastic). It returns
 *     C = kappa 1(x)1 + 2 mu theta_s (I - 1/3 1(x)1) - 2 mu theta_bar_s n_s(x)n_s
 *   with theta_s, theta_bar_s read from state0 and n_s the direction of the start state's
 *   relative stress xi_n = dev C:(strain - eps_p_n) - beta_n (0 when xi_n = 0). After a plastic
 *   increment xi_n is parallel to that increment's flow direction, so this is the consistent
 *   tangent the previous increment returned; a zero start gives the elastic tangent.
 * c_j2_reversal uses ncomp more, 3 ncomp + 1 in all: state[2n+1 .. 3n] = n_last, the flow
 *   direction of the latest plastic increment (tensor components: a shear entry is n_ij; zero
 *   before any plastic flow). A plastic increment stores its n there, an elastic one carries
 *   n_last. When the increment is plastic and n : n_last < 0 (shear entries counted twice) it
 *   returns kappa 1(x)1 + 2 mu theta (I - 1/3 1(x)1) + 2 mu theta_bar n(x)n.
 * Branch 0 elastic, 1 plastic. Energies from the end state (j2_energy.h).
 *
 * Complex-step safety (Martins, Sturdza & Alonso 2003): branch tests on real parts only, norms
 * as sqrt(sum x_i^2) without conjugation, one Newton iteration after convergence.
 *
 * Build: cc -I fortran-shim/include -c zoo_j2.c               exports c_j2_shear_factor, ...
 *        cc -I fortran-shim/include -DTC_COMPLEX -c zoo_j2.c  exports c_j2_shear_factor_cx, ...
 */
#include <math.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

#include "j2_energy.h"

enum { ZJ_E, ZJ_NU, ZJ_SIGMA_Y0, ZJ_H_ISO, ZJ_Q, ZJ_B, ZJ_H_KIN, ZJ_NPROP };

#define ZJ_MAX_ITER 50
#define ZJ_STEP_TOL 1e-14
#define ZJ_UNIT_FACTOR 1000.0

typedef enum {
    ZJ_SHEAR_FACTOR,
    ZJ_SHEAR_PERMUTED,
    ZJ_ELASTIC_FIRST_PLASTIC,
    ZJ_STALE,
    ZJ_NO_KINEMATIC,
    ZJ_UNIT_FACTOR_FLAW,
    ZJ_ONE_COLUMN,
    ZJ_REVERSAL,
    ZJ_SINGLE_ENTRY,
    ZJ_PLASTIC_SIGN,
    ZJ_RANK_TWO,
    ZJ_TERM_MISSING,
    ZJ_TWIN_REAL_SQRT,
    ZJ_TWIN_CONJUGATE
} zj_flaw;

#define ZJ_SINGLE_ENTRY_FACTOR (1.0 + 1e-4)
#define ZJ_RANK_TWO_FACTOR 0.05

/* The broken twins, on purpose: what not to write in a complex-step twin. */
#ifdef TC_COMPLEX
#define ZJ_CONJ(x) conj(x)
#define ZJ_REAL_ONLY_SQRT(x) tc_cst(sqrt(creal(x)))
#else
#define ZJ_CONJ(x) (x)
#define ZJ_REAL_ONLY_SQRT(x) sqrt(x)
#endif

/* K(alpha) = sigma_y0 + H_iso alpha + Q (1 - exp(-b alpha)). */
static tc_real zj_yield(const tc_real *properties, tc_real alpha)
{
    return properties[ZJ_SIGMA_Y0] + properties[ZJ_H_ISO] * alpha +
           properties[ZJ_Q] * (1.0 - tc_exp(-properties[ZJ_B] * alpha));
}

/* K'(alpha) = H_iso + Q b exp(-b alpha). */
static tc_real zj_yield_slope(const tc_real *properties, tc_real alpha)
{
    return properties[ZJ_H_ISO] + properties[ZJ_Q] * properties[ZJ_B] * tc_exp(-properties[ZJ_B] * alpha);
}

static void zj_fail(tc_report *report, const char *name, const char *text)
{
    report->status = TC_STATUS_FAILED;
    const char *parts[3] = {name, ": ", text};
    int k = 0;
    for (int p = 0; p < 3; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/*
 * Relative stress xi = dev(sigma) - beta of the elastic strain eps - eps_p (dstrain added when
 * given), with sigma = kappa tr(eps_e) 1 + 2 mu dev(eps_e); also sigma itself. Returns |xi|.
 * Each shear component stands for two equal tensor components in the norm.
 */
static tc_real zj_relative_stress(zj_flaw flaw, int n, tc_real mu, tc_real kappa,
                                  const tc_real *strain, const tc_real *dstrain,
                                  const tc_real *eps_p, const tc_real *beta, tc_real *sigma,
                                  tc_real *xi)
{
    tc_real eps_e[6];
    for (int i = 0; i < n; ++i) {
        eps_e[i] = strain[i] - eps_p[i];
        if (dstrain != 0) {
            eps_e[i] = strain[i] + dstrain[i] - eps_p[i];
        }
        if (i >= 3) {
            eps_e[i] = 0.5 * eps_e[i];
        }
    }
    const tc_real trace = eps_e[0] + eps_e[1] + eps_e[2];
    tc_real norm2 = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = i < 3 ? 2.0 * mu * (eps_e[i] - trace / 3.0) : 2.0 * mu * eps_e[i];
        sigma[i] = i < 3 ? kappa * trace + s : s;
        xi[i] = s - beta[i];
        norm2 += (i < 3 ? 1.0 : 2.0) * xi[i] * (flaw == ZJ_TWIN_CONJUGATE ? ZJ_CONJ(xi[i]) : xi[i]);
    }
    return flaw == ZJ_TWIN_REAL_SQRT ? ZJ_REAL_ONLY_SQRT(norm2) : tc_sqrt(norm2);
}

/* C = kappa 1(x)1 + 2 mu theta (I - 1/3 1(x)1) - 2 mu theta_bar n(x)n in Voigt form with
 * engineering-shear columns (Simo & Hughes 1998, Box 3.2): a shear column holds C_ijkl,
 * I_klkl = 1/2 for k != l. Column-major. */
static void zj_matrix(int n, tc_real kappa, tc_real mu, tc_real theta, tc_real theta_bar,
                      const tc_real *n_dir, tc_real *tangent)
{
    for (int j = 0; j < n; ++j) {
        for (int i = 0; i < n; ++i) {
            tc_real c = 0.0;
            if (i < 3 && j < 3) {
                c = kappa + 2.0 * mu * theta * ((i == j ? 1.0 : 0.0) - 1.0 / 3.0);
            } else if (i == j) {
                c = mu * theta;
            }
            tangent[i + j * n] = c - 2.0 * mu * theta_bar * n_dir[i] * n_dir[j];
        }
    }
}

static void zj_update(const char *name, zj_flaw flaw, const tc_call *call, const tc_real *properties,
                      const tc_real *strain, const tc_real *dstrain, const tc_real *state0,
                      tc_real *stress, tc_real *state, tc_real *tangent, tc_report *report)
{
    const int n = call->ncomp;
    const int needs_3d = flaw == ZJ_SHEAR_PERMUTED || flaw == ZJ_ONE_COLUMN;
    const int nj2 = 2 * n + 1;
    const int nstate = flaw == ZJ_STALE ? nj2 + 2 : flaw == ZJ_REVERSAL ? nj2 + n : nj2;
    if (needs_3d ? n != 6 : (n != 6 && n != 4)) {
        zj_fail(report, name, needs_3d ? "ncomp must be 6" : "ncomp must be 6 or 4");
        return;
    }
    if (call->nproperties < ZJ_NPROP) {
        zj_fail(report, name, "needs 7 properties [E, nu, sy0, H_iso, Q, b, H_kin]");
        return;
    }
    if (call->nstate < nstate) {
        zj_fail(report, name,
                flaw == ZJ_STALE      ? "needs 2*ncomp+3 state variables [eps_p, alpha, beta, 1-theta, theta_bar]"
                : flaw == ZJ_REVERSAL ? "needs 3*ncomp+1 state variables [eps_p, alpha, beta, n_last]"
                                      : "needs 2*ncomp+1 state variables [eps_p, alpha, beta]");
        return;
    }

    const double sqrt23 = sqrt(2.0 / 3.0);
    const tc_real e = properties[ZJ_E];
    const tc_real nu = properties[ZJ_NU];
    const tc_real h_kin = properties[ZJ_H_KIN];
    const tc_real mu = e / (2.0 * (1.0 + nu));
    const tc_real kappa = e / (3.0 * (1.0 - 2.0 * nu));
    const tc_real *eps_p_n = state0;
    const tc_real alpha_n = state0[n];
    const tc_real *beta_n = state0 + n + 1;

    /* Trial state (Simo & Hughes 1998, Box 3.2). */
    tc_real sigma_tr[6];
    tc_real xi[6];
    const tc_real norm = zj_relative_stress(flaw, n, mu, kappa, strain, dstrain, eps_p_n, beta_n, sigma_tr, xi);
    const tc_real f_trial = norm - sqrt23 * zj_yield(properties, alpha_n);

    tc_real n_dir[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
    tc_real theta = 1.0;
    tc_real theta_bar = 0.0;
    int plastic = 0;

    for (int k = nstate; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    if (tc_re(f_trial) <= 0.0 || tc_re(norm) <= 0.0) {
        for (int i = 0; i < n; ++i) {
            stress[i] = sigma_tr[i];
        }
        for (int k = 0; k < nj2; ++k) {
            state[k] = state0[k];
        }
        report->branch = 0;
    } else {
        /* Return map: Newton on
         *   g(dg) = |xi_tr| - (2 mu + 2/3 H_kin) dg - sqrt(2/3) K(alpha_n + sqrt(2/3) dg) = 0
         * from dg = 0; after the step that meets the tolerance, one more step. */
        const tc_real c_lin = 2.0 * mu + (2.0 / 3.0) * h_kin;
        tc_real dgamma = 0.0;
        int iter = 0;
        int converged = 0;
        for (;;) {
            const tc_real alpha = alpha_n + sqrt23 * dgamma;
            const tc_real g = norm - c_lin * dgamma - sqrt23 * zj_yield(properties, alpha);
            const tc_real g_slope = -c_lin - (2.0 / 3.0) * zj_yield_slope(properties, alpha);
            const tc_real step = -g / g_slope;
            dgamma += step;
            ++iter;
            if (converged) {
                break;
            }
            if (fabs(tc_re(step)) <= ZJ_STEP_TOL * tc_re(norm) / (2.0 * tc_re(mu))) {
                converged = 1;
            } else if (iter >= ZJ_MAX_ITER) {
                break;
            }
        }

        const tc_real alpha_new = alpha_n + sqrt23 * dgamma;
        for (int i = 0; i < n; ++i) {
            n_dir[i] = xi[i] / norm;
            stress[i] = sigma_tr[i] - 2.0 * mu * dgamma * n_dir[i];
            state[i] = eps_p_n[i] + (i < 3 ? 1.0 : 2.0) * dgamma * n_dir[i];
            state[n + 1 + i] = beta_n[i] + (2.0 / 3.0) * h_kin * dgamma * n_dir[i];
        }
        state[n] = alpha_new;

        /* Consistent moduli (Simo & Taylor 1985; Simo & Hughes 1998, Box 3.2):
         *   theta = 1 - 2 mu dg / |xi_tr|,
         *   theta_bar = 1 / (1 + (K' + H_kin) / (3 mu)) - (1 - theta);
         * the flaw "no kinematic" drops H_kin from theta_bar. */
        const tc_real k_slope = zj_yield_slope(properties, alpha_new);
        const tc_real h_tangent = flaw == ZJ_NO_KINEMATIC ? k_slope : k_slope + h_kin;
        theta = 1.0 - 2.0 * mu * dgamma / norm;
        theta_bar = 1.0 / (1.0 + h_tangent / (3.0 * mu)) - (1.0 - theta);
        report->branch = 1;
        plastic = 1;
        if (!converged) {
            zj_fail(report, name, "return map did not converge in 50 Newton iterations");
        }
    }

    zj_matrix(n, kappa, mu, theta, theta_bar, n_dir, tangent);

    switch (flaw) {
    case ZJ_SHEAR_FACTOR:
        for (int j = 3; j < n; ++j) {
            for (int i = 0; i < n; ++i) {
                tangent[i + j * n] = 0.5 * tangent[i + j * n];
            }
        }
        break;
    case ZJ_SHEAR_PERMUTED: {
        /* Entry (i, j) holds C of the components p(i), p(j): 23 and 12 swapped. */
        static const int perm[6] = {0, 1, 2, 5, 4, 3};
        tc_real c[36];
        for (int k = 0; k < 36; ++k) {
            c[k] = tangent[k];
        }
        for (int j = 0; j < 6; ++j) {
            for (int i = 0; i < 6; ++i) {
                tangent[i + 6 * j] = c[perm[i] + 6 * perm[j]];
            }
        }
        break;
    }
    case ZJ_ELASTIC_FIRST_PLASTIC:
        if (plastic && tc_re(alpha_n) == 0.0) {
            const tc_real zero[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
            zj_matrix(n, kappa, mu, tc_cst(1.0), tc_cst(0.0), zero, tangent);
        }
        break;
    case ZJ_STALE: {
        /* The moduli of the previous increment with the start state's flow direction. */
        tc_real sigma_n[6];
        tc_real xi_n[6];
        tc_real n_start[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
        const tc_real norm_n = zj_relative_stress(flaw, n, mu, kappa, strain, 0, eps_p_n, beta_n, sigma_n, xi_n);
        if (tc_re(norm_n) > 0.0) {
            for (int i = 0; i < n; ++i) {
                n_start[i] = xi_n[i] / norm_n;
            }
        }
        zj_matrix(n, kappa, mu, 1.0 - state0[nj2], state0[nj2 + 1], n_start, tangent);
        state[nj2] = plastic ? 1.0 - theta : tc_cst(0.0);
        state[nj2 + 1] = plastic ? theta_bar : tc_cst(0.0);
        break;
    }
    case ZJ_NO_KINEMATIC:
        break; /* already in theta_bar */
    case ZJ_UNIT_FACTOR_FLAW:
        for (int k = 0; k < n * n; ++k) {
            tangent[k] = ZJ_UNIT_FACTOR * tangent[k];
        }
        break;
    case ZJ_ONE_COLUMN:
        if (plastic) {
            for (int i = 0; i < 6; ++i) {
                tangent[i + 6 * 4] = i == 4 ? mu : tc_cst(0.0);
            }
        }
        break;
    case ZJ_REVERSAL:
        if (plastic) {
            tc_real dot = 0.0;
            for (int i = 0; i < n; ++i) {
                dot += (i < 3 ? 1.0 : 2.0) * n_dir[i] * state0[nj2 + i];
            }
            if (tc_re(dot) < 0.0) {
                zj_matrix(n, kappa, mu, theta, -theta_bar, n_dir, tangent);
            }
            for (int i = 0; i < n; ++i) {
                state[nj2 + i] = n_dir[i];
            }
        } else {
            for (int i = 0; i < n; ++i) {
                state[nj2 + i] = state0[nj2 + i];
            }
        }
        break;
    case ZJ_SINGLE_ENTRY:
        tangent[2 + 1 * n] = ZJ_SINGLE_ENTRY_FACTOR * tangent[2 + 1 * n];
        break;
    case ZJ_PLASTIC_SIGN:
        if (plastic) {
            zj_matrix(n, kappa, mu, theta, -theta_bar, n_dir, tangent);
        }
        break;
    case ZJ_TERM_MISSING:
        if (plastic) {
            zj_matrix(n, kappa, mu, theta, tc_cst(0.0), n_dir, tangent);
        }
        break;
    case ZJ_RANK_TWO:
        if (plastic) {
            const tc_real c = ZJ_RANK_TWO_FACTOR * mu;
            for (int j = 0; j < n; ++j) {
                for (int i = 0; i < n; ++i) {
                    const double one_i = i < 3 ? 1.0 : 0.0;
                    const double one_j = j < 3 ? 1.0 : 0.0;
                    tangent[i + j * n] += c * (n_dir[i] * one_j + one_i * n_dir[j]);
                }
            }
        }
        break;
    case ZJ_TWIN_REAL_SQRT:
    case ZJ_TWIN_CONJUGATE:
        break; /* in the norm of zj_relative_stress */
    }
    if (report->status != TC_STATUS_FAILED) {
        report->status = TC_STATUS_OK;
    }
}

/* One exported routine per flaw; none reads temp or stress0 or writes dstress_dtemp. */
#define ZJ_ROUTINE(symbol, label, flaw)                                                        \
    TC_ROUTINE(symbol)                                                                         \
    {                                                                                          \
        (void)temperature;                                                                            \
        (void)stress0;                                                                         \
        (void)dstress_dtemp;                                                                   \
        zj_update(label, flaw, call, properties, strain, dstrain, state0, stress, state, tangent,   \
                  report);                                                                     \
        j2_energy(call, properties, strain, dstrain, stress, state, energy, report);                \
    }

ZJ_ROUTINE(c_j2_shear_factor, "j2-shear-factor", ZJ_SHEAR_FACTOR)
ZJ_ROUTINE(c_j2_shear_permuted, "j2-shear-permuted", ZJ_SHEAR_PERMUTED)
ZJ_ROUTINE(c_j2_elastic_first_plastic, "j2-elastic-first-plastic", ZJ_ELASTIC_FIRST_PLASTIC)
ZJ_ROUTINE(c_j2_stale, "j2-stale", ZJ_STALE)
ZJ_ROUTINE(c_j2_no_kinematic, "j2-no-kinematic", ZJ_NO_KINEMATIC)
ZJ_ROUTINE(c_j2_unit_factor, "j2-unit-factor", ZJ_UNIT_FACTOR_FLAW)
ZJ_ROUTINE(c_j2_one_column, "j2-one-column", ZJ_ONE_COLUMN)
ZJ_ROUTINE(c_j2_reversal, "j2-reversal", ZJ_REVERSAL)
ZJ_ROUTINE(c_j2_single_entry, "j2-single-entry", ZJ_SINGLE_ENTRY)
ZJ_ROUTINE(c_j2_plastic_sign, "j2-plastic-sign", ZJ_PLASTIC_SIGN)
ZJ_ROUTINE(c_j2_rank_two, "j2-rank-two", ZJ_RANK_TWO)
ZJ_ROUTINE(c_twin_real_sqrt, "twin-real-sqrt", ZJ_TWIN_REAL_SQRT)
ZJ_ROUTINE(c_twin_conjugate, "twin-conjugate", ZJ_TWIN_CONJUGATE)
ZJ_ROUTINE(c_j2_term_missing, "j2-term-missing", ZJ_TERM_MISSING)
