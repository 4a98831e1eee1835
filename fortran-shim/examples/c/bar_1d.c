/*
 * bar_1d.c -- one-dimensional routines (a bar, kind uniaxial) for the verdicts at and next to
 * a branch boundary. Elastoplasticity with linear isotropic hardening:
 *
 *   c_bar_plastic        the return map and its consistent tangent: E in the elastic range,
 *                        E H / (E + H) when the increment ends plastic
 *   c_bar_sticky         the same stress update; its tangent stays E H / (E + H) for an
 *                        increment that starts on the yield surface, also when it ends elastic
 *                        (unloading): deliberately wrong there
 *
 * Layout: kind uniaxial (ncomp 1); properties [E, sigma_y, H]; state [eps_p, alpha] (plastic
 * strain, accumulated plastic strain). With eps = strain + dstrain and the trial stress
 * s = E (eps - eps_p), f = |s| - (sigma_y + H alpha):
 *   f <= 0: sigma = s, tangent E, state unchanged, branch 0;
 *   f > 0:  dg = f / (E + H), sigma = s - E dg sign(s), eps_p += dg sign(s), alpha += dg,
 *           tangent E H / (E + H), branch 1
 * (the return map of Simo & Hughes 1998, ch. 1, from memory). stress0 is not read.
 *
 * Thermo-elasticity whose modulus starts to fall at a temperature T0:
 *
 *   c_bar_thermal        E(T) = E0 (1 - a <T - T0>), sigma = E(T) eps; d sigma / dT the right
 *                        side's at T = T0 exactly (-a E0 eps; the ramp's complex step there too)
 *   c_bar_thermal_mean   the same stress; at T = T0 exactly d sigma / dT is the mean of the two
 *                        sides' (-a E0 eps / 2), and its twin's ramp, a sign function that is 0
 *                        at 0, gives the same mean: deliberately wrong there
 *   c_bar_thermal_real_e c_bar_thermal with a twin that holds E(T) in a real variable (its real
 *                        part): the real routine and every strain derivative are right, the
 *                        twin's d sigma / dT misses the modulus' temperature dependence: a twin
 *                        that is not complex-step safe in the temperature only
 *
 * Layout: properties [E0, a, T0]; no state (entries passed are carried through); T the end
 * temperature, temperature->start + temperature->increment; tangent E(T); branch 0 below T0,
 * 1 from T0 on.
 *
 * Build: cc -I fortran-shim/include -c bar_1d.c               exports c_bar_plastic, ...
 *        cc -I fortran-shim/include -DTC_COMPLEX -c bar_1d.c  exports c_bar_plastic_cx, ...
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

static void bar_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    int k = 0;
    for (const char *c = text; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
        report->message[k++] = *c;
    }
    report->message[k] = '\0';
}

static void bar_update(int sticky, const tc_call *call, const tc_real *properties, const tc_real *strain,
                       const tc_real *dstrain, const tc_real *state0, tc_real *stress, tc_real *state,
                       tc_real *tangent, tc_real *dstress_dtemp, tc_report *report)
{
    if (call->ncomp != 1 || call->nproperties < 3 || call->nstate < 2) {
        bar_fail(report, "hardening_1d: needs ncomp 1, properties [E, sigma_y, H], 2 state variables");
        return;
    }
    const tc_real e = properties[0], sy = properties[1], h = properties[2];
    const tc_real eps = strain[0] + dstrain[0];
    const tc_real eps_p = state0[0], alpha = state0[1];
    const tc_real trial = e * (eps - eps_p);
    const tc_real radius = sy + h * alpha;
    const double sign = tc_re(trial) >= 0.0 ? 1.0 : -1.0;
    const tc_real f = sign * trial - radius;
    const tc_real plastic_modulus = e * h / (e + h);
    /* The start of the increment on the yield surface (for the flawed variant only). */
    const tc_real start = e * (strain[0] - eps_p);
    const int started_on_yield = tc_re(tc_abs(start)) >= tc_re(radius) * (1.0 - 1e-12);
    dstress_dtemp[0] = 0.0;
    report->status = TC_STATUS_OK;
    if (tc_re(f) <= 0.0) {
        stress[0] = trial;
        state[0] = eps_p;
        state[1] = alpha;
        tangent[0] = (sticky && started_on_yield) ? plastic_modulus : e;
        report->branch = 0;
        return;
    }
    const tc_real dg = f / (e + h);
    stress[0] = trial - e * dg * sign;
    state[0] = eps_p + dg * sign;
    state[1] = alpha + dg;
    tangent[0] = plastic_modulus;
    report->branch = 1;
}

TC_ROUTINE(c_bar_plastic)
{
    (void)temperature;
    (void)stress0;
    (void)energy;
    bar_update(0, call, properties, strain, dstrain, state0, stress, state, tangent, dstress_dtemp, report);
}

TC_ROUTINE(c_bar_sticky)
{
    (void)temperature;
    (void)stress0;
    (void)energy;
    bar_update(1, call, properties, strain, dstrain, state0, stress, state, tangent, dstress_dtemp, report);
}

/* mode: 0 right, 1 the mean of the sides at T0, 2 E(T) held in a real variable. */
static void bar_thermal(int mode, const tc_call *call, const tc_real *properties, const tc_real *strain,
                        const tc_real *dstrain, const tc_temperature *temperature, const tc_real *state0,
                        tc_real *stress, tc_real *state, tc_real *tangent, tc_real *dstress_dtemp,
                        tc_report *report)
{
    if (call->ncomp != 1 || call->nproperties < 3) {
        bar_fail(report, "bar_1d: needs ncomp 1 and properties [E0, a, T0]");
        return;
    }
    const tc_real e0 = properties[0], a = properties[1], t0 = properties[2];
    const tc_real eps = strain[0] + dstrain[0];
    const tc_real x = temperature->start + temperature->increment - t0;
    /* The ramp <x> and its slope: the right side's at x = 0, or for the flawed variant a sign
     * function that is 0 at 0, whose ramp (x + sign(x) x) / 2 has the slope 1/2 there, in the
     * twin as well. */
    const double sign = tc_re(x) > 0.0 ? 1.0 : (tc_re(x) < 0.0 ? -1.0 : (mode == 1 ? 0.0 : 1.0));
    const tc_real ramp = 0.5 * (x + sign * x);
    const double slope = 0.5 * (1.0 + sign);
    const tc_real e_exact = e0 * (1.0 - a * ramp);
    const tc_real e = mode == 2 ? (tc_real)tc_re(e_exact) : e_exact;
    for (int k = 0; k < call->nstate; ++k) {
        state[k] = state0[k];
    }
    stress[0] = e * eps;
    tangent[0] = e;
    dstress_dtemp[0] = -e0 * a * slope * eps;
    report->provides = TC_PROVIDES_DSTRESS_DTEMP;
    report->branch = tc_re(x) >= 0.0 ? 1 : 0;
    report->status = TC_STATUS_OK;
}

TC_ROUTINE(c_bar_thermal)
{
    (void)stress0;
    (void)energy;
    bar_thermal(0, call, properties, strain, dstrain, temperature, state0, stress, state, tangent,
                dstress_dtemp, report);
}

TC_ROUTINE(c_bar_thermal_mean)
{
    (void)stress0;
    (void)energy;
    bar_thermal(1, call, properties, strain, dstrain, temperature, state0, stress, state, tangent,
                dstress_dtemp, report);
}

TC_ROUTINE(c_bar_thermal_real_e)
{
    (void)stress0;
    (void)energy;
    bar_thermal(2, call, properties, strain, dstrain, temperature, state0, stress, state, tangent,
                dstress_dtemp, report);
}
