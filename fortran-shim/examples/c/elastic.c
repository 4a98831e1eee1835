/*
 * elastic.c -- linear isotropic elasticity, the reference routine "elastic" in C.
 *
 * Layout (DEVELOPERS.md, "Reference models"): properties [E, nu], no state. Components in the
 * default order with engineering shear strain:
 *   ncomp 6: 11, 22, 33, 23, 13, 12 (3D)
 *   ncomp 4: 11, 22, 33, 12 (plane strain / axisymmetric)
 *   ncomp 3: 11, 22, 12 (plane stress)
 *   ncomp 1: 11 (uniaxial stress, sigma = E eps)
 * Incremental form sigma = sigma0 + C dstrain. Energy: stored = 1/2 sigma . (strain + dstrain),
 * the work-conjugate dot product with engineering shear; dissipated = 0. Branch 0.
 *
 * State entries, if the caller passes any, are carried through unchanged.
 *
 * Build: cc -I fortran-shim/include -c elastic.c            exports c_elastic
 *        cc -I fortran-shim/include -DTC_COMPLEX -c elastic.c  exports c_elastic_cx
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

static void elastic_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    /* "<model>: <text>" into the report's message, cut to fit and NUL-terminated. */
    const char *parts[2] = {"elastic: ", text};
    int k = 0;
    for (int p = 0; p < 2; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/*
 * Elastic stiffness in Voigt form, column-major c[i + j*n], engineering shear columns.
 * Lame constants lambda = E nu / ((1 + nu)(1 - 2 nu)), mu = E / (2 (1 + nu)); plane stress
 * reduces to E / (1 - nu^2) [[1, nu, 0], [nu, 1, 0], [0, 0, (1 - nu)/2]]
 * (Hughes 2000, The Finite Element Method, ch. 2; chapter from memory).
 */
static void elastic_stiffness(int n, tc_real e, tc_real nu, tc_real *c)
{
    for (int k = 0; k < n * n; ++k) {
        c[k] = 0.0;
    }
    if (n == 1) {
        c[0] = e;
        return;
    }
    if (n == 3) {
        tc_real f = e / (1.0 - nu * nu);
        c[0 + 0 * 3] = f;
        c[1 + 1 * 3] = f;
        c[0 + 1 * 3] = f * nu;
        c[1 + 0 * 3] = f * nu;
        c[2 + 2 * 3] = f * (1.0 - nu) / 2.0;
        return;
    }
    /* n == 6 or n == 4: three normal components first, then the shear ones. */
    tc_real mu = e / (2.0 * (1.0 + nu));
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            c[i + j * n] = lambda;
        }
        c[i + i * n] = lambda + 2.0 * mu;
    }
    for (int i = 3; i < n; ++i) {
        c[i + i * n] = mu;
    }
}

TC_ROUTINE(c_elastic)
{
    (void)temperature;
    (void)dstress_dtemp;

    const int n = call->ncomp;
    if (n != 6 && n != 4 && n != 3 && n != 1) {
        elastic_fail(report, "ncomp must be 6, 4, 3 or 1");
        return;
    }
    if (call->nproperties < 2) {
        elastic_fail(report, "needs 2 properties [E, nu]");
        return;
    }

    /* The caller's tangent buffer holds the stiffness; it is written in full here and then
     * only read. */
    elastic_stiffness(n, properties[0], properties[1], tangent);

    tc_real stored = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) {
            s += tangent[i + j * n] * dstrain[j];
        }
        stress[i] = s;
        stored += s * (strain[i] + dstrain[i]);
    }
    for (int k = 0; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    energy->stored = 0.5 * stored;
    energy->dissipated = 0.0;
    report->provides = TC_PROVIDES_ENERGY;
    report->branch = 0;
    report->status = TC_STATUS_OK;
}
