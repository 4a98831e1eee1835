//! The C test routines of `tests/jobs`, as source text (built into one library by `c_lib`).

/// The isotropic elastic tangent from properties [E, nu] (6 components, engineering shear,
/// column-major), as C lines the test routines below put in place of `ISOTROPIC_TANGENT`.
pub const ISOTROPIC_TANGENT_C: &str = "tc_real e = properties[0], nu = properties[1];
    tc_real mu = e / (2.0 * (1.0 + nu));
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    for (int k = 0; k < 36; ++k) tangent[k] = 0.0;
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) tangent[i + 6 * j] = lambda;
        tangent[i + 6 * i] = lambda + 2.0 * mu;
    }
    for (int i = 3; i < 6; ++i) tangent[i + 6 * i] = mu;";

/// An elastic routine that is deliberately not thread-safe: the stress goes through a static
/// work array, and some busy work between writing and reading it leaves time for another
/// thread's call to overwrite it. Serially it is correct and deterministic.
pub const SHARED_BUFFER_C: &str = r#"
#include "tancheck_cstep.h"
#include "tancheck_routine.h"

static tc_real shared_work[6];
static volatile double shared_spin;

TC_ROUTINE(c_elastic_shared)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    const int n = call->ncomp;
    if (n != 6 || call->nproperties < 2) {
        report->status = TC_STATUS_FAILED;
        return;
    }
    ISOTROPIC_TANGENT
    for (int i = 0; i < 6; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < 6; ++j) s += tangent[i + 6 * j] * dstrain[j];
        shared_work[i] = s;
    }
    for (int k = 0; k < 20000; ++k) shared_spin += 1.0;
    for (int i = 0; i < 6; ++i) stress[i] = shared_work[i];
    for (int k = 0; k < call->nstate; ++k) state[k] = state0[k];
    energy->stored = 0.0;
    energy->dissipated = 0.0;
    report->branch = 0;
    report->status = TC_STATUS_OK;
}
"#;

/// Elastic routines that misbehave only once the path has loaded them (the start stress's
/// first component above 300, reported as branch 1): the probe's multiples of the first
/// increment from the unloaded start never see it.
///   - `c_late_shared`: the stress of a loaded call goes through a static work array (a race
///     between threads, as in `c_elastic_shared`);
///   - `c_late_count`: a loaded call adds a static count of loaded calls to the stress (a
///     result that depends on every call before);
///   - `c_late_after_perturbed`: a loaded call asking for the tangent made after three or more
///     calls that did not, on the same thread (the count is thread-local, so calls on other
///     threads do not disturb it), is off in its last bits. The probe's calls (each with the
///     tangent, then once without) and the walk's (all with it) agree; within a check the base
///     call follows the twelve perturbed calls of the increment before.
///
/// And two more:
///   - `c_tangent_then_perturbed`: a call that asks for the tangent leaves its start stress in
///     a static, which the calls that do not ask for it read (right on one thread, where the
///     perturbed calls follow their own base call);
///   - `c_late_fails`: reports that it cannot compute an increment once loaded past 900;
///   - `c_big_abort`: ends the process on a strain increment larger than any of the path's;
///   - `c_late_skip`: leaves its state variable unwritten once loaded.
pub const LATE_C: &str = r#"
#include <stdlib.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

static tc_real late_work[6];
static volatile double late_spin;
static long late_loaded_calls;
static _Thread_local int late_unwanted_run;
static double late_base_stress;

/* The elastic stress into `stress`; returns whether the point is loaded (branch 1). */
static int late_elastic(const tc_call *call, const tc_real *properties, const tc_real *stress0,
                        const tc_real *dstrain, tc_real *stress, tc_real *tangent,
                        tc_report *report)
{
    if (call->ncomp != 6 || call->nproperties < 2) {
        report->status = TC_STATUS_FAILED;
        return 0;
    }
    ISOTROPIC_TANGENT
    for (int i = 0; i < 6; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < 6; ++j) s += tangent[i + 6 * j] * dstrain[j];
        stress[i] = s;
    }
    report->status = TC_STATUS_OK;
    report->branch = tc_re(stress0[0]) > 300.0 ? 1 : 0;
    return report->branch;
}

#define LATE_FINISH                                               \
    for (int k = 0; k < call->nstate; ++k) state[k] = state0[k]; \
    energy->stored = 0.0;                                         \
    energy->dissipated = 0.0;

TC_ROUTINE(c_late_shared)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    if (late_elastic(call, properties, stress0, dstrain, stress, tangent, report)) {
        for (int i = 0; i < 6; ++i) late_work[i] = stress[i];
        for (int k = 0; k < 20000; ++k) late_spin += 1.0;
        for (int i = 0; i < 6; ++i) stress[i] = late_work[i];
    }
    LATE_FINISH
}

TC_ROUTINE(c_late_count)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    if (late_elastic(call, properties, stress0, dstrain, stress, tangent, report)) {
        late_loaded_calls += 1;
        stress[0] += 1e-9 * (double)late_loaded_calls;
    }
    LATE_FINISH
}

TC_ROUTINE(c_tangent_then_perturbed)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    late_elastic(call, properties, stress0, dstrain, stress, tangent, report);
    for (int k = 0; k < 2000; ++k) late_spin += 1.0;
    if (call->flags & TC_WANT_TANGENT) {
        late_base_stress = tc_re(stress0[0]);
    } else {
        stress[0] += 1e-9 * (tc_re(stress0[0]) - late_base_stress);
    }
    LATE_FINISH
}

TC_ROUTINE(c_late_fails)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    late_elastic(call, properties, stress0, dstrain, stress, tangent, report);
    if (tc_re(stress0[0]) > 900.0) report->status = TC_STATUS_FAILED;
    LATE_FINISH
}

TC_ROUTINE(c_big_abort)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    late_elastic(call, properties, stress0, dstrain, stress, tangent, report);
    if (tc_re(dstrain[0]) > 1.0e-4 || tc_re(dstrain[0]) < -1.0e-4) abort();
    LATE_FINISH
}

TC_ROUTINE(c_late_skip)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    if (!late_elastic(call, properties, stress0, dstrain, stress, tangent, report)) {
        for (int k = 0; k < call->nstate; ++k) state[k] = state0[k];
    }
    energy->stored = 0.0;
    energy->dissipated = 0.0;
}

TC_ROUTINE(c_late_after_perturbed)
{
    (void)strain; (void)temperature; (void)dstress_dtemp;
    int loaded = late_elastic(call, properties, stress0, dstrain, stress, tangent, report);
    if (!(call->flags & TC_WANT_TANGENT)) {
        late_unwanted_run += 1;
    } else {
        if (loaded && late_unwanted_run >= 3) stress[0] += 1e-9;
        late_unwanted_run = 0;
    }
    LATE_FINISH
}
"#;
