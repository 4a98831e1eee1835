/*
 * probe_zoo.c -- routines flawed on purpose, each in a way that only one of tancheck's probes
 * beyond the tangent check is meant to catch. Apart from its one flaw each is linear isotropic
 * elasticity (properties [E, nu], engineering shear, default component order), written to the
 * routine ABI with its complex-step twin (TC_COMPLEX, symbol + "_cx"), and its returned
 * tangent is the derivative of its own stress update in the call it is returned from.
 *
 * Expected findings:
 *
 *   pz_saved_state
 *       Keeps the strain increment of its previous call in a static array and adds
 *       PZ_LEAK * C * dstrain_prev to the stress ("rate smoothing" with the memory in the wrong
 *       place). The first call after loading has no previous increment and is plain elasticity.
 *       Finding: hidden state. Calls A, B, A give two different answers for A (they differ by
 *       PZ_LEAK * C * (dstrain_B - dstrain_A') where A' is the call before the first A), and
 *       two identical calls in a row differ unless the call before had the same increment
 *       (the full memory guard reports "different results for two identical calls").
 *       The tangent C is the derivative with respect to this call's dstrain, and the leak is
 *       real-valued (only real parts are kept), so complex-step derivatives through the twin
 *       agree with it; the twin, a separate object, keeps its own memory. Real finite
 *       differences, whose calls each see the previous call's increment, are disturbed.
 *       ncomp 6, 4, 3 or 1; state entries carried through.
 *
 *   pz_writes_strain
 *       Correct elasticity that stores strain + dstrain back into its strain input (casting
 *       const away), as if the caller wanted the updated strain.
 *       Finding: a read-only input written. The memory guard reports the strain as written
 *       (every component whose increment is nonzero); with guards on, the caller's strain is
 *       untouched. Stress, tangent and energy are those of elasticity.
 *       ncomp 6, 4, 3 or 1; state entries carried through.
 *
 *   pz_not_objective
 *       Claims isotropy (only [E, nu]) but adds the energy PZ_ANISO mu / 2 (eps11 - eps22)^2:
 *       sigma = sigma0 + (C + c d (x) d) dstrain with d = e11 - e22 (Voigt [1, -1, 0, ...]),
 *       c = PZ_ANISO mu, mu = E / (2 (1 + nu)). The returned tangent C + c d (x) d is the exact
 *       derivative, symmetric and positive definite, and the energy is consistent, so the
 *       tangent, symmetry, energy and stability checks pass.
 *       Finding: not frame-indifferent. Rotating strain, increment and start stress by R does
 *       not give R sigma R^T (the term singles out the global 1 and 2 axes). Rotations by a
 *       multiple of 90 degrees about axis 3 leave d (x) d unchanged and do not show it; a
 *       45-degree rotation about axis 3 of a pure shear gamma12 = g shows a discrepancy of
 *       Frobenius norm sqrt(2) c |g|.
 *       ncomp 6, 4 or 3 (a single component has no frame to turn); state carried through.
 *
 *   pz_negative_dissipation
 *       Correct elastic stress and tangent, but its energy bookkeeping integrates the work
 *       with the start stress only (left rectangle rule): state[0] = W, W += stress0 . dstrain,
 *       and reports dissipated = W - stored with stored = 1/2 sigma . (strain + dstrain).
 *       Along a path with stress0 = C strain (each increment starting where the last ended),
 *       each increment changes the reported dissipation by -1/2 dstrain . C dstrain < 0.
 *       Finding: dissipation decreases (and is negative) for an elastic response that
 *       dissipates nothing.
 *       ncomp 6, 4, 3 or 1; needs nstate >= 1 (state[0] = W); further entries carried through.
 *
 * Build: cc -I fortran-shim/include -c probe_zoo.c               exports pz_*
 *        cc -I fortran-shim/include -DTC_COMPLEX -c probe_zoo.c  exports pz_*_cx
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

#include "isotropic_elastic.h"

/* Share of the previous call's increment that pz_saved_state adds. */
#define PZ_LEAK 0.5
/* c / mu of the anisotropic term of pz_not_objective. */
#define PZ_ANISO 0.5

/*
 * The honest part: checks, the stiffness into the tangent, sigma = sigma0 + C dstrain, the
 * state carried through from entry `keep` on, status OK, branch 0. Returns 0 after reporting a
 * failure. `kinds` is a bit set of the ncomp values accepted (bit n for ncomp n).
 */
static int pz_elastic(const char *model, unsigned kinds, const tc_call *call, const tc_real *properties,
                      const tc_real *dstrain, const tc_real *stress0, const tc_real *state0,
                      tc_real *stress, tc_real *state, tc_real *tangent, int keep,
                      tc_report *report)
{
    const int n = call->ncomp;
    if (n < 1 || n > 6 || !(kinds & (1u << n))) {
        ex_fail(report, model, "unsupported ncomp");
        return 0;
    }
    if (call->nproperties < 2) {
        ex_fail(report, model, "needs 2 properties [E, nu]");
        return 0;
    }
    if (!(tc_re(properties[0]) > 0.0) || !(tc_re(properties[1]) > -1.0 && tc_re(properties[1]) < 0.5)) {
        ex_fail(report, model, "needs E > 0 and -1 < nu < 0.5");
        return 0;
    }
    ex_isotropic_stiffness(n, properties[0], properties[1], tangent);
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) {
            s += tangent[i + j * n] * dstrain[j];
        }
        stress[i] = s;
    }
    for (int k = keep; k < call->nstate; ++k) {
        state[k] = state0[k];
    }
    report->branch = 0;
    report->status = TC_STATUS_OK;
    return 1;
}

/* energy->stored = 1/2 sigma . (strain + dstrain) (engineering shear: the work-conjugate product),
 * energy->dissipated = dissipated, and the ENERGY bit. */
static void pz_energy(int n, const tc_real *stress, const tc_real *strain, const tc_real *dstrain,
                      tc_real dissipated, tc_energy *energy, tc_report *report)
{
    tc_real stored = 0.0;
    for (int i = 0; i < n; ++i) {
        stored += stress[i] * (strain[i] + dstrain[i]);
    }
    energy->stored = 0.5 * stored;
    energy->dissipated = dissipated;
    report->provides = TC_PROVIDES_ENERGY;
}

#define PZ_SOLID_KINDS ((1u << 6) | (1u << 4) | (1u << 3) | (1u << 1))

/* The previous call's strain increment, real parts (one copy per build: the twin is another
 * object file with its own). pz_last_n = 0: no previous call. */
static double pz_last_dstrain[6];
static int pz_last_n = 0;

TC_ROUTINE(pz_saved_state)
{
    (void)temperature;
    (void)dstress_dtemp;
    if (!pz_elastic("pz_saved_state", PZ_SOLID_KINDS, call, properties, dstrain, stress0, state0,
                    stress, state, tangent, 0, report)) {
        return;
    }
    const int n = call->ncomp;
    if (pz_last_n == n) {
        for (int i = 0; i < n; ++i) {
            for (int j = 0; j < n; ++j) {
                stress[i] += PZ_LEAK * tangent[i + j * n] * pz_last_dstrain[j];
            }
        }
    }
    for (int j = 0; j < n; ++j) {
        pz_last_dstrain[j] = tc_re(dstrain[j]);
    }
    pz_last_n = n;
    pz_energy(n, stress, strain, dstrain, 0.0, energy, report);
}

TC_ROUTINE(pz_writes_strain)
{
    (void)temperature;
    (void)dstress_dtemp;
    if (!pz_elastic("pz_writes_strain", PZ_SOLID_KINDS, call, properties, dstrain, stress0, state0,
                    stress, state, tangent, 0, report)) {
        return;
    }
    const int n = call->ncomp;
    pz_energy(n, stress, strain, dstrain, 0.0, energy, report);
    /* The flaw: the strain input updated in place. */
    tc_real *writable = (tc_real *)strain;
    for (int i = 0; i < n; ++i) {
        writable[i] = strain[i] + dstrain[i];
    }
}

TC_ROUTINE(pz_not_objective)
{
    (void)temperature;
    (void)dstress_dtemp;
    const unsigned kinds = (1u << 6) | (1u << 4) | (1u << 3);
    if (!pz_elastic("pz_not_objective", kinds, call, properties, dstrain, stress0, state0, stress,
                    state, tangent, 0, report)) {
        return;
    }
    const int n = call->ncomp;
    /* d = e11 - e22 in Voigt form; the extra energy c/2 (d . eps)^2 adds c d (x) d. */
    const tc_real c = PZ_ANISO * properties[0] / (2.0 * (1.0 + properties[1]));
    const tc_real d_eps = dstrain[0] - dstrain[1];
    stress[0] += c * d_eps;
    stress[1] -= c * d_eps;
    tangent[0 + 0 * n] += c;
    tangent[1 + 1 * n] += c;
    tangent[0 + 1 * n] -= c;
    tangent[1 + 0 * n] -= c;
    pz_energy(n, stress, strain, dstrain, 0.0, energy, report);
}

TC_ROUTINE(pz_negative_dissipation)
{
    (void)temperature;
    (void)dstress_dtemp;
    if (call->nstate < 1) {
        ex_fail(report, "pz_negative_dissipation", "needs 1 state variable [work]");
        return;
    }
    if (!pz_elastic("pz_negative_dissipation", PZ_SOLID_KINDS, call, properties, dstrain, stress0,
                    state0, stress, state, tangent, 1, report)) {
        return;
    }
    const int n = call->ncomp;
    /* The flaw: the work of the increment by the start stress alone. */
    tc_real work = state0[0];
    for (int i = 0; i < n; ++i) {
        work += stress0[i] * dstrain[i];
    }
    state[0] = work;
    tc_real stored = 0.0;
    for (int i = 0; i < n; ++i) {
        stored += stress[i] * (strain[i] + dstrain[i]);
    }
    pz_energy(n, stress, strain, dstrain, work - 0.5 * stored, energy, report);
}
