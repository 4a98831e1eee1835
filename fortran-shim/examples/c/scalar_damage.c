/* scalar_damage.c -- scalar isotropic damage, energy-norm equivalent strain, exponential softening,
 * damage only grows, secant unloading.  Written for a user-style sweep of the probes.
 *   properties: 0 E, 1 nu, 2 k0 (strain threshold), 3 ks (softening strain scale)
 *   states:     0 kappa (largest equivalent strain reached), 1 damage d
 *   eps_eq = sqrt(eps . C eps / E),  d(k) = 1 - (k0/k) exp(-(k - k0)/ks) for k > k0
 *   sigma = (1 - d) C eps
 * FLAW: 0 correct, 1 secant while damage grows, 2 damage term with wrong sign,
 *       3 damage term left out of strain column 22 */
#include "tancheck_routine.h"
#include "tancheck_cstep.h"
#ifndef FLAW
#define FLAW 0
#endif

TC_ROUTINE(sweep_dmg)
{
    int n = call->ncomp, i, j;
    if (n != 6 || call->nstate < 2 || call->nproperties < 4) {
        report->status = TC_STATUS_FAILED;
        return;
    }
    tc_real E = properties[0], nu = properties[1], k0 = properties[2], ks = properties[3];
    tc_real lam = E * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    tc_real mu = E / (2.0 * (1.0 + nu));
    tc_real C[36], eps[6], ce[6];
    for (i = 0; i < 36; i++) C[i] = 0.0;
    for (i = 0; i < 3; i++) {
        for (j = 0; j < 3; j++) C[i + 6 * j] = lam;
        C[i + 6 * i] = lam + 2.0 * mu;
    }
    for (i = 3; i < 6; i++) C[i + 6 * i] = mu;
    for (i = 0; i < 6; i++) eps[i] = strain[i] + dstrain[i];
    tc_real w = 0.0;
    for (i = 0; i < 6; i++) {
        ce[i] = 0.0;
        for (j = 0; j < 6; j++) ce[i] += C[i + 6 * j] * eps[j];
        w += eps[i] * ce[i];
    }
    tc_real eq = tc_sqrt(w / E);
    tc_real kn = tc_re(state0[0]) > tc_re(k0) ? state0[0] : k0;
    tc_real dn = state0[1];
    int grows = tc_re(eq) > tc_re(kn);
    tc_real k = grows ? eq : kn;
    tc_real d = tc_re(k) > tc_re(k0) ? 1.0 - (k0 / k) * tc_exp(-(k - k0) / ks) : tc_cst(0.0);
    if (!grows) d = dn; /* keep exactly the stored damage when it does not grow */
    tc_real dd = grows ? (1.0 - d) * (1.0 / k + 1.0 / ks) : tc_cst(0.0);

    for (i = 0; i < 6; i++) stress[i] = (1.0 - d) * ce[i];
    state[0] = k;
    state[1] = d;
    for (i = 2; i < call->nstate; i++) state[i] = state0[i];
    for (j = 0; j < 6; j++)
        for (i = 0; i < 6; i++) {
            tc_real t = (1.0 - d) * C[i + 6 * j];
            tc_real g = dd * ce[i] * ce[j] / (E * eq);
#if FLAW == 1
            g = 0.0;
#elif FLAW == 2
            g = -g;
#elif FLAW == 3
            if (j == 1) g = 0.0;
#endif
            if (grows) t -= g;
            tangent[i + 6 * j] = t;
        }
    report->branch = grows ? 1 : 0;
}
