/*
 * misbehave_ctor.c -- a library whose constructor calls exit(0) while it is being loaded,
 * for testing that tancheck reports it (an exit during the load is a fault, never a pass).
 * With MISBEHAVE_CTOR=sleep in the environment the constructor sleeps for an hour instead
 * (a load that hangs).
 * The routine itself, ctor_elastic, is linear isotropic elasticity (properties [E, nu]) and
 * is never reached.
 *
 * Build: tancheck build misbehave_ctor.c -o libctor.so
 */

#define _POSIX_C_SOURCE 200809L
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "tancheck_routine.h"

#ifndef TC_COMPLEX
__attribute__((constructor)) static void misbehave_ctor_exit(void)
{
    const char *how = getenv("MISBEHAVE_CTOR");
    if (how != NULL && strcmp(how, "sleep") == 0) {
        struct timespec hour = {3600, 0};
        while (nanosleep(&hour, &hour) != 0) {
        }
    }
    exit(0);
}
#endif

TC_ROUTINE(ctor_elastic)
{
    (void)properties;
    (void)strain;
    (void)dstrain;
    (void)temperature;
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
