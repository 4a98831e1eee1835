/*
 * misbehave.c -- routines that misbehave on purpose, for testing the guarded trampoline.
 *
 * Each routine is linear isotropic elasticity (properties [E, nu], no state, ncomp 6, 4, 3
 * or 1, engineering shear, sigma = sigma0 + C dstrain) in increment 1, so its normal path
 * gives real, checkable values. From increment 2 on it misbehaves:
 *
 *   bad_null_deref      writes through a null pointer             -> SIGSEGV at address 0
 *   bad_divide_by_zero  stress[0] = (a computed value) / (a computed zero):
 *                       with floating-point traps on -> SIGFPE (division by zero);
 *                       without traps -> stress[0] is infinite and the call returns normally
 *   bad_log_of_negative stress[0] += log(-E) through tc_log, the logarithm of a negative
 *                       number inside the math library: with floating-point traps on
 *                       -> SIGFPE (invalid) in libm, called from this routine
 *   bad_abort           calls abort()                              -> SIGABRT
 *   bad_exit            calls exit(0), as a Fortran STOP does      -> the process ends
 *   bad_deep_recursion  recurses without end, 4 KiB a frame        -> SIGSEGV, stack overflow
 *   bad_infinite_loop   never returns                               -> only a time limit helps
 *   bad_sleep           sleeps for an hour                          -> only a time limit helps
 *   bad_heap_corruption damages the size field of a block it then frees: the C library
 *                       finds the heap corrupted and aborts          -> SIGABRT, heap in doubt
 *   bad_thread_exit     a thread it starts calls exit(0) while the call waits for it
 *                                                                    -> the process ends
 *   bad_late_exit       a thread it starts calls exit(0) 1 ms after the call returned
 *                                                                    -> the process ends later
 *
 * and these are correct (the elastic update at every increment) but unusual:
 *
 *   bad_helper_thread   leaves a thread running the library's code after every call
 *   bad_printf          prints to standard output in every call (C printf)
 *
 * and these misbehave quietly, for the memory guards to find (crates/tancheck-abi/src/guards.rs):
 *
 *   bad_state_overrun   writes state[nstate], one past the end     -> "wrote past the end of state"
 *   bad_props_overread  adds properties[nproperties] to stress[0]              -> "reads beyond its N properties"
 *   bad_tangent_hole    leaves tangent[1] unwritten                 -> "left tangent[1] unwritten"
 *   bad_writes_strain   writes strain[0] (casting const away)       -> "wrote to its read-only input"
 *   bad_scratch_increment clears dstrain after its update, as a routine using its increment
 *                       as work space does (casting const away)      -> "wrote to its read-only
 *                       input dstrain"; with the guards off its own calls never see it, and
 *                       its (correct) tangent passes
 *   bad_unasked_tangent forms its tangent only when asked for it, but computes the stress
 *                       from the tangent array in every call (reads an output it did not
 *                       write)                                       -> stress not finite
 *   bad_hidden_state    adds a count of its own calls to stress[0]  -> "different results for two
 *                                                                      identical calls"
 *   bad_perturbed_overrun writes state[nstate] only in calls that do not ask for the tangent
 *                       (the perturbed ones)                         -> "wrote past the end of
 *                       state" on the schemes' calls, the base calls clean
 *   bad_perturbed_crash dereferences NULL only in calls that do not ask for the tangent
 *                       (the perturbed ones)                         -> a crash in the schemes'
 *                       calls, the base calls clean
 *
 * and these misbehave in every call of one branch, or of a zero increment, so that a default
 * check (full guards on the first call of each new branch, one zero increment) finds them:
 *
 *   bad_branch_overread reports branch 0 while the end strain 11 is at most 5e-4, branch 1
 *                       beyond, where it adds properties[nproperties] to stress[0]
 *                                                                  -> "reads beyond its N properties"
 *   bad_unguarded_norm  adds 0 * (dstrain / |dstrain|)[0] to stress[0]: a direction normalised
 *                       without a guard, NaN for a zero increment    -> "stress[0] = NaN"
 *
 * Build: cc -I fortran-shim/include -c misbehave.c               (bad_*)
 *        cc -I fortran-shim/include -DTC_COMPLEX -c misbehave.c  (bad_*_cx)
 */

#define _POSIX_C_SOURCE 200809L
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"
#include "isotropic_elastic.h"

/* The isotropic elastic stiffness of isotropic_elastic.h, column-major c[i + j*n]. Returns 0
 * for an ncomp it does not know. */
static int misbehave_stiffness(int n, tc_real e, tc_real nu, tc_real *c)
{
    if (n != 6 && n != 4 && n != 3 && n != 1) {
        return 0;
    }
    ex_isotropic_stiffness(n, e, nu, c);
    return 1;
}

static void misbehave_message(tc_report *report, const char *text)
{
    int k = 0;
    for (const char *c = text; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
        report->message[k++] = *c;
    }
    report->message[k] = '\0';
}

/* stress = stress0 + tangent dstrain, and the state carried over unchanged. */
static void misbehave_update(const tc_call *call, const tc_real *tangent, const tc_real *dstrain,
                             const tc_real *stress0, const tc_real *state0, tc_real *stress,
                             tc_real *state)
{
    const int n = call->ncomp;
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) {
            s += tangent[i + j * n] * dstrain[j];
        }
        stress[i] = s;
    }
    for (int k = 0; k < call->nstate; ++k) {
        state[k] = state0[k];
    }
}

/* The well-behaved part shared by all routines. Returns 0 when it reported a failure. */
static int misbehave_elastic(const tc_call *call, const tc_real *properties, const tc_real *dstrain,
                             const tc_real *stress0, const tc_real *state0, tc_real *stress,
                             tc_real *state, tc_real *tangent, tc_report *report)
{
    const int n = call->ncomp;
    if (call->nproperties < 2) {
        report->status = TC_STATUS_FAILED;
        misbehave_message(report, "misbehave: needs 2 properties [E, nu]");
        return 0;
    }
    if (!misbehave_stiffness(n, properties[0], properties[1], tangent)) {
        report->status = TC_STATUS_FAILED;
        misbehave_message(report, "misbehave: ncomp must be 6, 4, 3 or 1");
        return 0;
    }
    misbehave_update(call, tangent, dstrain, stress0, state0, stress, state);
    report->branch = 0;
    report->status = TC_STATUS_OK;
    return 1;
}

#define MISBEHAVE_UNUSED                                                                      \
    (void)strain;                                                                            \
    (void)temperature;                                                                              \
    (void)dstress_dtemp;                                                                     \
    (void)energy

/* The elastic part, then `misbehaving` only from increment 2 on. */
#define MISBEHAVE_FROM_INCREMENT_2                                                            \
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,      \
                           report) ||                                                         \
        call->increment < 2)                                                                  \
    return

TC_ROUTINE(bad_null_deref)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        /* Both volatile: the pointer's value is unknown to the compiler, and the store to
         * it cannot be dropped as dead. */
        volatile tc_real *volatile nowhere = NULL;
        *nowhere = stress[0];
    }
}

TC_ROUTINE(bad_divide_by_zero)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        /* E - E is zero at run time; volatile keeps the compiler from folding anything. */
        volatile double e = properties[0];
        double zero = e - e;
        stress[0] = stress[0] + e / zero;
    }
}

TC_ROUTINE(bad_log_of_negative)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        /* -E is negative at run time; volatile keeps the compiler from folding the call. */
        volatile double e = -properties[0];
        stress[0] = stress[0] + tc_log(e);
    }
}

TC_ROUTINE(bad_abort)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        abort();
    }
}

TC_ROUTINE(bad_exit)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        exit(0);
    }
}

/* One 4 KiB frame per level; the sum after the call keeps it from being a tail call, and
 * volatile keeps the frame from being optimised away. */
static double misbehave_descend(const volatile double *above, long depth)
{
    volatile double frame[512];
    if (above[0] < 0.0) {
        return 0.0; /* never: the values only grow; the compiler cannot know that */
    }
    frame[0] = above[0] + (double)depth;
    frame[511] = frame[0];
    return misbehave_descend(frame, depth + 1) + frame[511];
}

TC_ROUTINE(bad_infinite_loop)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        volatile unsigned long spin = 0;
        for (;;) {
            spin = spin + 1;
        }
    }
}

TC_ROUTINE(bad_deep_recursion)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                           report)) {
        return;
    }
    if (call->increment >= 2) {
        volatile double seed = 0.0;
        double r = misbehave_descend(&seed, 0);
        stress[0] = r; /* never reached */
    }
}

TC_ROUTINE(bad_state_overrun)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* An off-by-one loop bound: state[nstate] is one past the end. */
    for (int k = 0; k <= call->nstate; ++k) {
        state[k] = (k < call->nstate) ? state0[k] : 0.0;
    }
}

TC_ROUTINE(bad_perturbed_overrun)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* A scratch entry one past the state, written only where no tangent is formed. */
    if (!(call->flags & TC_WANT_TANGENT)) {
        state[call->nstate] = 0.0;
    }
}

TC_ROUTINE(bad_perturbed_crash)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* A pointer set only where the tangent is formed, used in every call. */
    if (!(call->flags & TC_WANT_TANGENT)) {
        volatile double *p = NULL;
        *p = 1.0;
    }
}

TC_ROUTINE(bad_props_overread)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* Reads one property more than it was given: whatever lies there shifts the stress. */
    stress[0] = stress[0] + properties[call->nproperties];
}

TC_ROUTINE(bad_tangent_hole)
{
    MISBEHAVE_UNUSED;
    /* The elastic update with the stiffness in a local array, copied into the tangent entry by
     * entry; from increment 2 on the copy skips entry 1 (row 2, column 1), which keeps what
     * arrived there. */
    tc_real c[36];
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, c, report)) {
        return;
    }
    const int n = call->ncomp;
    for (int k = 0; k < n * n; ++k) {
        if (k != 1 || call->increment < 2) {
            tangent[k] = c[k];
        }
    }
}

TC_ROUTINE(bad_writes_strain)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* Uses the strain as scratch space, as if it were its own. */
    ((tc_real *)strain)[0] = 0.0;
}

TC_ROUTINE(bad_scratch_increment)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* The update is made; the increment is then used as work space, as if it were its own. */
    for (int i = 0; i < call->ncomp; ++i) {
        ((tc_real *)dstrain)[i] = 0.0;
    }
}

TC_ROUTINE(bad_unasked_tangent)
{
    MISBEHAVE_UNUSED;
    if (call->flags & TC_WANT_TANGENT) {
        if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent,
                               report)) {
            return;
        }
    }
    /* The stress from the tangent array, whether or not this call formed it. */
    misbehave_update(call, tangent, dstrain, stress0, state0, stress, state);
    report->branch = 0;
    report->status = TC_STATUS_OK;
}

TC_ROUTINE(bad_hidden_state)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* A call counter kept between calls: every call gives another stress. */
    static long calls = 0;
    calls += 1;
    stress[0] = stress[0] + (double)calls;
}

TC_ROUTINE(bad_branch_overread)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent, report)) {
        return;
    }
    /* A second branch that reads one property more than it was given. */
    if (tc_re(strain[0] + dstrain[0]) > 5e-4) {
        report->branch = 1;
        stress[0] = stress[0] + properties[call->nproperties];
    }
}

TC_ROUTINE(bad_unguarded_norm)
{
    MISBEHAVE_UNUSED;
    if (!misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent, report)) {
        return;
    }
    /* The direction of the increment, normalised without a guard: 0/0 for a zero increment. */
    tc_real norm2 = 0.0;
    for (int i = 0; i < call->ncomp; ++i) {
        norm2 += dstrain[i] * dstrain[i];
    }
    tc_real dir0 = dstrain[0] / tc_sqrt(norm2);
    stress[0] = stress[0] + 0.0 * dir0;
}

TC_ROUTINE(bad_sleep)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    struct timespec hour = {3600, 0};
    while (nanosleep(&hour, &hour) != 0) {
    }
}

TC_ROUTINE(bad_heap_corruption)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    /* A write just before a block (an index of -1) lands on the allocator's size field;
     * free() then finds a size no block can have and the C library aborts. */
    volatile size_t *volatile block = malloc(8 * sizeof(size_t));
    if (block == NULL) {
        return;
    }
    block[-1] = 0x11;
    free((void *)block);
}

/* Thread bodies (static: each build, real and twin, has its own copy). */
static void *misbehave_exit_now(void *arg)
{
    (void)arg;
    exit(0);
}

static void *misbehave_exit_soon(void *arg)
{
    (void)arg;
    struct timespec moment = {0, 1000 * 1000};
    nanosleep(&moment, NULL);
    exit(0);
}

/* Runs the library's code for ever: if the library were unloaded, this thread would crash. */
static volatile unsigned long misbehave_busy_count;

static void *misbehave_keep_busy(void *arg)
{
    (void)arg;
    for (;;) {
        struct timespec moment = {0, 1000 * 1000};
        nanosleep(&moment, NULL);
        misbehave_busy_count = misbehave_busy_count + 1;
    }
    return NULL;
}

TC_ROUTINE(bad_thread_exit)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    pthread_t t;
    if (pthread_create(&t, NULL, misbehave_exit_now, NULL) == 0) {
        pthread_join(t, NULL); /* never returns: the thread ends the process */
    }
}

TC_ROUTINE(bad_late_exit)
{
    MISBEHAVE_UNUSED;
    MISBEHAVE_FROM_INCREMENT_2;
    static int started = 0;
    pthread_t t;
    if (!started && pthread_create(&t, NULL, misbehave_exit_soon, NULL) == 0) {
        started = 1;
        pthread_detach(t);
    }
}

TC_ROUTINE(bad_helper_thread)
{
    MISBEHAVE_UNUSED;
    static int started = 0;
    pthread_t t;
    if (!started && pthread_create(&t, NULL, misbehave_keep_busy, NULL) == 0) {
        started = 1;
        pthread_detach(t);
    }
    misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent, report);
}

TC_ROUTINE(bad_printf)
{
    MISBEHAVE_UNUSED;
    printf("bad_printf: increment %d, a line on standard output\n", call->increment);
    puts("{ not json");
    misbehave_elastic(call, properties, dstrain, stress0, state0, stress, state, tangent, report);
}
