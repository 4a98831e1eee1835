/*
 * misbehave_ctor.c -- a library whose constructor calls exit(0) while it is being loaded,
 * for testing that tancheck reports it (an exit during the load is a fault, never a pass).
 * The routine itself, ctor_elastic, is linear isotropic elasticity (properties [E, nu]) and
 * is never reached.
 *
 * Build: tancheck build misbehave_ctor.c -o libctor.so
 */

#include <stdlib.h>

#include "tancheck_routine.h"

#ifndef TC_COMPLEX
__attribute__((constructor)) static void misbehave_ctor_exit(void)
{
    exit(0);
}
#endif

TC_ROUTINE(ctor_elastic)
{
    (void)props;
    (void)strain;
    (void)dstrain;
    (void)temp;
    (void)stress0;
    (void)state0;
    (void)stress;
    (void)state;
    (void)dstress_dtemp;
    (void)energy;
    const int n = call->ncomp;
    for (int k = 0; k < n * n; ++k) {
        tangent[k] = 0.0;
    }
    report->status = TC_STATUS_FAILED; /* never called: the constructor ends the process */
}
