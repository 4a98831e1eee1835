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
#include "j2_return_map.h"

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

/* |xi| as j2_norm makes it, or broken on purpose for the two twin flaws. */
static tc_real zj_norm(zj_flaw flaw, int n, const tc_real *xi)
{
    if (flaw != ZJ_TWIN_CONJUGATE && flaw != ZJ_TWIN_REAL_SQRT) {
        return j2_norm(n, xi);
    }
    tc_real norm2 = 0.0;
    for (int i = 0; i < n; ++i) {
        norm2 += (i < 3 ? 1.0 : 2.0) * xi[i] * (flaw == ZJ_TWIN_CONJUGATE ? ZJ_CONJ(xi[i]) : xi[i]);
    }
    return flaw == ZJ_TWIN_REAL_SQRT ? ZJ_REAL_ONLY_SQRT(norm2) : tc_sqrt(norm2);
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
        j2_fail_as(report, name, needs_3d ? "ncomp must be 6" : "ncomp must be 6 or 4");
        return;
    }
    if (call->nproperties < J2_NPROP) {
        j2_fail_as(report, name, "needs 7 properties [E, nu, sy0, H_iso, Q, b, H_kin]");
        return;
    }
    if (call->nstate < nstate) {
        j2_fail_as(report, name,
                   flaw == ZJ_STALE      ? "needs 2*ncomp+3 state variables [eps_p, alpha, beta, 1-theta, theta_bar]"
                   : flaw == ZJ_REVERSAL ? "needs 3*ncomp+1 state variables [eps_p, alpha, beta, n_last]"
                                         : "needs 2*ncomp+1 state variables [eps_p, alpha, beta]");
        return;
    }

    const double sqrt23 = sqrt(2.0 / 3.0);
    const tc_real h_kin = properties[J2_H_KIN];
    tc_real mu, kappa;
    j2_elastic_moduli(properties, &mu, &kappa);
    const tc_real *eps_p_n = state0;
    const tc_real alpha_n = state0[n];
    const tc_real *beta_n = state0 + n + 1;

    /* Trial state and trial yield function (j2_return_map.h). */
    tc_real sigma_tr[6];
    tc_real xi[6];
    j2_trial(n, mu, kappa, strain, dstrain, eps_p_n, beta_n, sigma_tr, xi);
    const tc_real norm = zj_norm(flaw, n, xi);
    const tc_real f_trial = norm - sqrt23 * j2_yield(properties, alpha_n);

    tc_real n_dir[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
    tc_real theta = 1.0;
    tc_real theta_bar = 0.0;
    int plastic = 0;

    for (int k = nstate; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    if (tc_re(f_trial) <= 0.0 || tc_re(norm) <= 0.0) {
        j2_elastic_step(n, nj2, sigma_tr, state0, stress, state, report);
    } else {
        /* The radial return of j2.c; the flaw "no kinematic" drops H_kin from theta_bar. */
        tc_real dgamma;
        const int converged = j2_newton(properties, norm, mu, h_kin, alpha_n, &dgamma);
        const tc_real alpha_new = alpha_n + sqrt23 * dgamma;
        j2_radial_update(n, mu, h_kin, norm, dgamma, sigma_tr, xi, state0, n_dir, stress, state);
        const tc_real k_slope = j2_yield_slope(properties, alpha_new);
        j2_moduli(1, mu, flaw == ZJ_NO_KINEMATIC ? k_slope : k_slope + h_kin, dgamma, norm, &theta, &theta_bar);
        report->branch = 1;
        plastic = 1;
        if (!converged) {
            j2_fail_as(report, name, "return map did not converge in 50 Newton iterations");
        }
    }

    j2_matrix(n, kappa, mu, theta, theta_bar, n_dir, tangent);

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
            j2_matrix(n, kappa, mu, tc_cst(1.0), tc_cst(0.0), zero, tangent);
        }
        break;
    case ZJ_STALE: {
        /* The moduli of the previous increment with the start state's flow direction. */
        tc_real sigma_n[6];
        tc_real xi_n[6];
        tc_real n_start[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
        j2_trial(n, mu, kappa, strain, 0, eps_p_n, beta_n, sigma_n, xi_n);
        const tc_real norm_n = j2_norm(n, xi_n);
        if (tc_re(norm_n) > 0.0) {
            for (int i = 0; i < n; ++i) {
                n_start[i] = xi_n[i] / norm_n;
            }
        }
        j2_matrix(n, kappa, mu, 1.0 - state0[nj2], state0[nj2 + 1], n_start, tangent);
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
                j2_matrix(n, kappa, mu, theta, -theta_bar, n_dir, tangent);
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
            j2_matrix(n, kappa, mu, theta, -theta_bar, n_dir, tangent);
        }
        break;
    case ZJ_TERM_MISSING:
        if (plastic) {
            j2_matrix(n, kappa, mu, theta, tc_cst(0.0), n_dir, tangent);
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
        break; /* in the norm of zj_norm */
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
