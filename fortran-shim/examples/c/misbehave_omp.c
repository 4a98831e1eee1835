/*
 * misbehave_omp.c -- a correct routine (linear isotropic elasticity, properties [E, nu],
 * 6 components, engineering shear, sigma = sigma0 + C dstrain) whose stress update is an
 * OpenMP parallel loop: the OpenMP run-time keeps its worker threads alive after the call,
 * parked in its own code. The check must pass, and tancheck must not crash when it ends.
 *
 * Build (the test does this): cc -fopenmp -fPIC -I fortran-shim/include -c misbehave_omp.c,
 * the same with -DTC_COMPLEX for the twin, then cc -shared -fopenmp both objects.
 */

#include "tancheck_routine.h"

TC_ROUTINE(omp_elastic)
{
    (void)strain;
    (void)temperature;
    (void)dstress_dtemp;
    (void)energy;
    const int n = call->ncomp;
    if (n != 6 || call->nproperties < 2) {
        report->status = TC_STATUS_FAILED;
        return;
    }
    /* Lame constants (textbook relations of isotropic elasticity). */
    tc_real e = properties[0], nu = properties[1];
    tc_real mu = e / (2.0 * (1.0 + nu));
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    int i;
#pragma omp parallel for schedule(static)
    for (i = 0; i < 36; ++i) {
        int r = i % 6, c = i / 6;
        tc_real v = 0.0;
        if (r < 3 && c < 3) {
            v = lambda + (r == c ? 2.0 * mu : 0.0);
        } else if (r == c) {
            v = mu;
        }
        tangent[i] = v;
    }
#pragma omp parallel for schedule(static)
    for (i = 0; i < 6; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < 6; ++j) {
            s += tangent[i + 6 * j] * dstrain[j];
        }
        stress[i] = s;
    }
    for (int k = 0; k < call->nstate; ++k) {
        state[k] = state0[k];
    }
    report->branch = 0;
    report->status = TC_STATUS_OK;
}
