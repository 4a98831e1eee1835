/*
 * bimodulus.c -- elasticity with a different 11 stiffness in tension and in compression: the
 * correct routine "bimodulus", which has a kink, and "bimodulus-average", flawed at the kink.
 *
 *   c_bimodulus          the tangent of the branch; at eps11 = 0 exactly, the tension side
 *   c_bimodulus_average  at eps11 = 0 exactly, the mean of the two sides' tangents (a
 *                        derivative from neither side); the branch's tangent elsewhere
 *   c_bimodulus_mean_branch  the same tangent, and at eps11 = 0 exactly a stress term
 *                        (E_c - E_t)/2 eps11, zero there, so the twin's derivative is the mean
 *                        as well (a sign function that is 0 at 0 would do the same): the complex
 *                        step agrees with the flawed tangent, the central difference too
 *
 * Layout: properties [E_t, E_c, nu], no state (entries passed are carried through). Total form,
 * stress0 is not read; eps = strain + dstrain at the end of the increment.
 *   ncomp 1 (11): sigma = E_t eps if eps >= 0, E_c eps if eps < 0.
 *   ncomp 6 (11, 22, 33, 23, 13, 12, engineering shear):
 *     sigma = C_t eps + (E_c - E_t) min(eps11, 0) e11,
 *     C_t the isotropic matrix of E_t and nu (lambda + 2 mu, lambda, mu). The compression matrix
 *     differs from C_t only in its 11-11 entry, so sigma is continuous at eps11 = 0; in uniaxial
 *     stress the 11 modulus is E_t in tension and E_c in compression.
 * Stored energy W = 1/2 sigma . eps (dissipated 0), reported with TC_PROVIDES_ENERGY.
 * Branch 0 tension (eps11 >= 0), 1 compression.
 *
 * Build: cc -I fortran-shim/include -c bimodulus.c               exports c_bimodulus, ...
 *        cc -I fortran-shim/include -DTC_COMPLEX -c bimodulus.c  exports c_bimodulus_cx, ...
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

enum { BM_E_T, BM_E_C, BM_NU, BM_NPROP };

static void bm_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    const char *parts[2] = {"bimodulus: ", text};
    int k = 0;
    for (int p = 0; p < 2; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

static void bm_update(int average_at_kink, const tc_call *call, const tc_real *properties,
                      const tc_real *strain, const tc_real *dstrain, const tc_real *state0,
                      tc_real *stress, tc_real *state, tc_real *tangent,
                      tc_real *dstress_dtemp, tc_energy *energy, tc_report *report)
{
    const int n = call->ncomp;
    if (n != 6 && n != 1) {
        bm_fail(report, "ncomp must be 6 or 1");
        return;
    }
    if (call->nproperties < BM_NPROP) {
        bm_fail(report, "needs 3 properties [E_t, E_c, nu]");
        return;
    }
    const tc_real e_t = properties[BM_E_T];
    const tc_real e_c = properties[BM_E_C];
    const tc_real nu = properties[BM_NU];
    if (!(tc_re(e_t) > 0.0)) {
        bm_fail(report, "E_t (properties[0]) must be positive");
        return;
    }
    if (!(tc_re(e_c) > 0.0)) {
        bm_fail(report, "E_c (properties[1]) must be positive");
        return;
    }
    if (!(tc_re(nu) > -1.0 && tc_re(nu) < 0.5)) {
        bm_fail(report, "nu (properties[2]) must lie in (-1, 0.5)");
        return;
    }
    for (int k = 0; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    /* Tension matrix C_t, column-major (Hughes 2000, The Finite Element Method, ch. 2). */
    tc_real eps[6];
    for (int i = 0; i < n; ++i) {
        eps[i] = strain[i] + dstrain[i];
    }
    for (int k = 0; k < n * n; ++k) {
        tangent[k] = 0.0;
    }
    if (n == 1) {
        tangent[0] = e_t;
    } else {
        const tc_real mu = e_t / (2.0 * (1.0 + nu));
        const tc_real lambda = e_t * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
        for (int i = 0; i < 3; ++i) {
            for (int j = 0; j < 3; ++j) {
                tangent[i + j * 6] = lambda;
            }
            tangent[i + i * 6] = lambda + 2.0 * mu;
        }
        for (int i = 3; i < 6; ++i) {
            tangent[i + i * 6] = mu;
        }
    }

    const tc_real jump = e_c - e_t;
    const double e11 = tc_re(eps[0]);
    const int compression = e11 < 0.0;
    tc_real stored = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = 0.0;
        for (int j = 0; j < n; ++j) {
            s += tangent[i + j * n] * eps[j];
        }
        if (i == 0 && compression) {
            s += jump * eps[0];
        } else if (i == 0 && average_at_kink == 2 && e11 == 0.0) {
            /* Zero at the point; in the twin its derivative adds half the jump. */
            s += 0.5 * jump * eps[0];
        }
        stress[i] = s;
        stored += s * eps[i];
    }
    if (compression) {
        tangent[0] += jump;
    } else if (average_at_kink && e11 == 0.0) {
        tangent[0] += 0.5 * jump;
    }
    for (int i = 0; i < n; ++i) {
        dstress_dtemp[i] = 0.0;
    }
    energy->stored = 0.5 * stored;
    energy->dissipated = 0.0;
    report->provides = TC_PROVIDES_ENERGY;
    report->branch = compression;
    report->status = TC_STATUS_OK;
}

TC_ROUTINE(c_bimodulus)
{
    (void)temperature;
    (void)stress0;
    bm_update(0, call, properties, strain, dstrain, state0, stress, state, tangent, dstress_dtemp,
              energy, report);
}

TC_ROUTINE(c_bimodulus_average)
{
    (void)temperature;
    (void)stress0;
    bm_update(1, call, properties, strain, dstrain, state0, stress, state, tangent, dstress_dtemp,
              energy, report);
}

TC_ROUTINE(c_bimodulus_mean_branch)
{
    (void)temperature;
    (void)stress0;
    bm_update(2, call, properties, strain, dstrain, state0, stress, state, tangent, dstress_dtemp,
              energy, report);
}
