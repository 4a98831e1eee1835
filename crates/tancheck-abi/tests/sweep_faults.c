/*
 * sweep_faults.c -- routines whose perturbed calls (those that do not ask for the tangent)
 * fail, crash or misbehave in the middle of a scheme's columns, for tests/sweep.rs: the calls
 * made in one guarded entry must end as the same calls made one by one.
 *
 * Each is linear isotropic elasticity (properties [E, nu], two state variables, ncomp 6,
 * engineering shear, stress = stress0 + C dstrain, state = state0 + [1, |dstrain|_1]) with its
 * tangent at every call. From increment 2 on, in the calls without the tangent only:
 *
 *   sweep_status    returns TC_STATUS_FAILED when dstrain[3] < 0 (real part), and in the twin
 *                   when dstrain[4] has an imaginary part
 *   sweep_smaller   returns TC_STATUS_SMALLER_INCREMENT with a fraction and a message when
 *                   dstrain[1] < 0
 *   sweep_crash     writes through a null pointer when dstrain[2] > 0, and in the twin when
 *                   dstrain[5] has an imaginary part
 *   sweep_reads     adds stress[0] and state[1] to themselves before writing them (reads
 *                   outputs it has not written: they must arrive as NaN)
 *   sweep_scratch   clears its increment after its update (a read-only input used as work
 *                   space), and leaves its report's message set
 *   sweep_hole      leaves state[1] as it arrived (unwritten)
 *   sweep_writes_input writes strain[2] (and stress0[1], unchanged) when dstrain[4] > 0
 *   sweep_last      returns TC_STATUS_FAILED in the last call of each sweep (dstrain[5] < 0,
 *                   or an imaginary part on dstrain[5])
 *   sweep_writes_call adds 1e-3 (dtime + dT) to stress[0], and halves call->dtime and raises
 *                   temperature->increment in place (read-only inputs used as work space)
 *   sweep_fpe       divides by zero when dstrain[2] > 0 (or dstrain[5] has an imaginary part):
 *                   a SIGFPE with floating-point traps on, an infinite stress without
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

static void sweep_elastic(const tc_call *call, const tc_real *properties, const tc_real *dstrain,
                          const tc_real *stress0, const tc_real *state0, tc_real *stress,
                          tc_real *state, tc_real *tangent)
{
    const int n = call->ncomp;
    const tc_real e = properties[0], nu = properties[1];
    const tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    const tc_real mu = e / (2.0 * (1.0 + nu));
    for (int k = 0; k < n * n; ++k) {
        tangent[k] = 0.0;
    }
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            tangent[i + j * n] = lambda + (i == j ? 2.0 * mu : 0.0);
        }
        tangent[(i + 3) + (i + 3) * n] = mu;
    }
    tc_real size = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) {
            s += tangent[i + j * n] * dstrain[j];
        }
        stress[i] = s;
        size += tc_re(dstrain[i]) < 0.0 ? -dstrain[i] : dstrain[i];
    }
    state[0] = state0[0] + 1.0;
    state[1] = state0[1] + size;
}

/* Whether this call is a perturbed one of increment 2 or later. */
#define SWEEP_PERTURBED (!(call->flags & TC_WANT_TANGENT) && call->increment >= 2)

#define SWEEP_ELASTIC                                                                          \
    (void)strain;                                                                              \
    (void)temperature;                                                                         \
    (void)dstress_dtemp;                                                                       \
    (void)energy;                                                                              \
    sweep_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent);          \
    report->branch = 0

static void sweep_message(tc_report *report, const char *text)
{
    int k = 0;
    for (; text[k] != '\0' && k < TC_MESSAGE_LEN - 1; ++k) {
        report->message[k] = text[k];
    }
    report->message[k] = '\0';
}

TC_ROUTINE(sweep_status)
{
    SWEEP_ELASTIC;
    if (SWEEP_PERTURBED && (tc_re(dstrain[3]) < 0.0 || tc_im(dstrain[4]) != 0.0)) {
        report->status = TC_STATUS_FAILED;
        sweep_message(report, "sweep_status: a planted failure");
    }
}

TC_ROUTINE(sweep_smaller)
{
    SWEEP_ELASTIC;
    if (SWEEP_PERTURBED && tc_re(dstrain[1]) < 0.0) {
        report->status = TC_STATUS_SMALLER_INCREMENT;
        report->largest_fraction = 0.25;
        sweep_message(report, "sweep_smaller: a quarter of this, please");
    }
}

TC_ROUTINE(sweep_crash)
{
    SWEEP_ELASTIC;
    if (SWEEP_PERTURBED && (tc_re(dstrain[2]) > 0.0 || tc_im(dstrain[5]) != 0.0)) {
        volatile tc_real *volatile nowhere = 0;
        *nowhere = stress[0];
    }
}

TC_ROUTINE(sweep_reads)
{
    tc_real before0 = stress[0], before1 = state[1];
    SWEEP_ELASTIC;
    if (SWEEP_PERTURBED) {
        stress[0] = stress[0] + 0.0 * before0;
        state[1] = state[1] + 0.0 * before1;
    }
}

TC_ROUTINE(sweep_scratch)
{
    SWEEP_ELASTIC;
    if (call->increment >= 2) {
        for (int i = 0; i < call->ncomp; ++i) {
            ((tc_real *)dstrain)[i] = 0.0;
        }
        sweep_message(report, "sweep_scratch: the increment was used as work space");
    }
}

TC_ROUTINE(sweep_hole)
{
    tc_real keep = state[1];
    SWEEP_ELASTIC;
    if (SWEEP_PERTURBED) {
        state[1] = keep; /* left as it arrived: unwritten */
    }
}

TC_ROUTINE(sweep_writes_input)
{
    SWEEP_ELASTIC;
    if (SWEEP_PERTURBED && tc_re(dstrain[4]) > 0.0) {
        ((tc_real *)stress0)[1] = stress0[1]; /* writes a read-only input (the same value) */
        ((tc_real *)strain)[2] = 1.0;         /* and another, with a new one */
    }
}

TC_ROUTINE(sweep_last)
{
    SWEEP_ELASTIC;
    /* The last call of each sweep: central's -h on column 5, the twin's column 5. */
    if (SWEEP_PERTURBED && (tc_re(dstrain[5]) < 0.0 || tc_im(dstrain[5]) != 0.0)) {
        report->status = TC_STATUS_FAILED;
        sweep_message(report, "sweep_last: the last call fails");
    }
}

TC_ROUTINE(sweep_writes_call)
{
    SWEEP_ELASTIC;
    /* The stress carries the time increment, and the perturbed calls halve it (and the
     * temperature increment) in place, as a routine using them as work space would. */
    stress[0] = stress[0] + 1e-3 * call->dtime + 1e-3 * temperature->increment;
    if (SWEEP_PERTURBED) {
        ((tc_call *)call)->dtime = 0.5 * call->dtime;
        ((tc_temperature *)temperature)->increment = temperature->increment + 1.0;
    }
}

TC_ROUTINE(sweep_fpe)
{
    SWEEP_ELASTIC;
    /* A division by zero in the calls of column 2 (+h), and of the twin's column 5. */
    if (SWEEP_PERTURBED && (tc_re(dstrain[2]) > 0.0 || tc_im(dstrain[5]) != 0.0)) {
        volatile double e = tc_re(properties[0]);
        double zero = e - e;
        stress[0] = stress[0] + e / zero;
    }
}
