/*
 * finite_nh.c -- compressible neo-Hookean finite-strain routine (tancheck_finite.h), the
 * reference model "neo-hookean" in C, and flawed variants for the finite-strain diagnosis.
 *
 * Psi = mu/2 (I1 - 3) - mu ln J + lambda/2 (ln J)^2 (Bonet & Wood, Nonlinear Continuum
 * Mechanics for FEA, 2nd ed. 2008, ch. 5-6; from memory). Properties [E, nu] (lambda, mu from
 * the small-strain relations), no state. Kirchhoff stress tau = mu (b - I) + lambda ln J I;
 * the Truesdell tangent c_T = lambda I(x)I + 2 (mu - lambda ln J) II; the Jaumann one adds
 * 1/2 (d_ik tau_jl + tau_ik d_jl + d_il tau_jk + tau_il d_jk). Stress in the measure the call
 * declares (Cauchy = tau / J). Tangent measures: tau- and sigma-jaumann, tau- and
 * sigma-truesdell (others: status failed). Energy: stored Psi, dissipated 0.
 *
 * Symbols: c_nh (correct), c_nh_truesdell_for_jaumann (returns the Truesdell tangent where
 * Jaumann is asked), c_nh_missing_over_j (the tangent times J), c_nh_extra_over_j (the
 * tangent divided by J), c_nh_cauchy_for_kirchhoff (returns Cauchy stress whatever the
 * declared measure), c_nh_kirchhoff_for_cauchy (returns Kirchhoff stress whatever the declared
 * measure); each with its twin _cx. The material-as-spatial and geometric-terms-missing
 * flaws are in finite_j2.c, which implements the material measures.
 *
 * Misbehaving variants, correct but from increment 2 on: c_nh_nan_at_2 (computes a NaN into
 * tangent[7]), c_nh_unwritten_at_2 (never writes tangent[20]), c_nh_spin_at_2 (never returns),
 * c_nh_state_overrun_at_2 (writes state[nstate], one past the end), c_nh_nan_stress_at_2 and
 * c_nh_nan_state_at_2 (compute a NaN into stress[0], or state[0] when there is a state),
 * c_nh_exit_at_2 (ends the process with exit(9)) and c_nh_abort_at_2 (raises SIGABRT, as a
 * failed assertion or a heap check of the C library would).
 *
 * Build: cc -I fortran-shim/include -c finite_nh.c; again with -DTC_COMPLEX for the twins.
 */

#include <stdlib.h>

#include "tancheck_cstep.h"
#include "tancheck_finite.h"

enum nh_flaw {
    NH_NONE,
    NH_TRUESDELL_FOR_JAUMANN,
    NH_MISSING_OVER_J,
    NH_EXTRA_OVER_J,
    NH_CAUCHY_FOR_KIRCHHOFF,
    NH_KIRCHHOFF_FOR_CAUCHY
};

/* Row and column of the slots 11, 22, 33, 23, 13, 12. */
static const int NH_I[6] = {0, 1, 2, 1, 0, 0};
static const int NH_J[6] = {0, 1, 2, 2, 2, 1};

static void nh_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    int k = 0;
    for (const char *c = text; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
        report->message[k++] = *c;
    }
    report->message[k] = '\0';
}

static void nh_point(const tc_finite_call *call, const tc_real *properties, const tc_real *f1,
                     tc_real *stress, tc_real *tangent, tc_energy *energy, tc_report *report,
                     enum nh_flaw flaw)
{
    const int m = call->tangent_measure;
    if (m != TC_TANGENT_TAU_JAUMANN && m != TC_TANGENT_SIGMA_JAUMANN && m != TC_TANGENT_TAU_TRUESDELL &&
        m != TC_TANGENT_SIGMA_TRUESDELL) {
        nh_fail(report, "neo-hookean: this tangent measure is not implemented in C");
        return;
    }
    tc_real e = properties[0], nu = properties[1];
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    tc_real mu = e / (2.0 * (1.0 + nu));
    tc_real f[3][3], b[3][3], tau[3][3];
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) f[i][j] = f1[i + 3 * j];
    tc_real jac = f[0][0] * (f[1][1] * f[2][2] - f[1][2] * f[2][1]) - f[0][1] * (f[1][0] * f[2][2] - f[1][2] * f[2][0]) +
                  f[0][2] * (f[1][0] * f[2][1] - f[1][1] * f[2][0]);
    if (tc_re(jac) <= 0.0) {
        nh_fail(report, "neo-hookean: det F <= 0");
        return;
    }
    tc_real lnj = tc_log(jac);
    tc_real i1 = 0.0;
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            b[i][j] = f[i][0] * f[j][0] + f[i][1] * f[j][1] + f[i][2] * f[j][2];
            tau[i][j] = mu * b[i][j] + (i == j ? lambda * lnj - mu : 0.0);
        }
        i1 += b[i][i];
    }
    int cauchy = (call->stress_measure == TC_STRESS_CAUCHY || flaw == NH_CAUCHY_FOR_KIRCHHOFF) &&
                 flaw != NH_KIRCHHOFF_FOR_CAUCHY;
    for (int s = 0; s < 6; ++s) stress[s] = cauchy ? tau[NH_I[s]][NH_J[s]] / jac : tau[NH_I[s]][NH_J[s]];
    int jaumann = (m == TC_TANGENT_TAU_JAUMANN || m == TC_TANGENT_SIGMA_JAUMANN) && flaw != NH_TRUESDELL_FOR_JAUMANN;
    int over_j = m == TC_TANGENT_SIGMA_JAUMANN || m == TC_TANGENT_SIGMA_TRUESDELL;
    tc_real g = mu - lambda * lnj;
    for (int r = 0; r < 6; ++r) {
        for (int c = 0; c < 6; ++c) {
            int i = NH_I[r], j = NH_J[r], k = NH_I[c], l = NH_J[c];
            /* c_T = lambda I(x)I + 2 g II, II_ijkl = (d_ik d_jl + d_il d_jk) / 2 */
            tc_real v = (i == j && k == l ? lambda : 0.0) + g * ((i == k && j == l ? 1.0 : 0.0) + (i == l && j == k ? 1.0 : 0.0));
            if (jaumann) {
                v += 0.5 * ((i == k ? tau[j][l] : 0.0) + (j == l ? tau[i][k] : 0.0) + (i == l ? tau[j][k] : 0.0) +
                            (j == k ? tau[i][l] : 0.0));
            }
            if (over_j) v /= jac;
            if (flaw == NH_MISSING_OVER_J) v *= jac;
            if (flaw == NH_EXTRA_OVER_J) v /= jac;
            tangent[r + 6 * c] = v;
        }
    }
    energy->stored = 0.5 * mu * (i1 - 3.0) - mu * lnj + 0.5 * lambda * lnj * lnj;
    energy->dissipated = 0.0;
    report->branch = 0;
    report->provides = TC_PROVIDES_ENERGY;
}

#define NH_ROUTINE(name, flaw)                                                                  \
    TC_FINITE_ROUTINE(name)                                                                     \
    {                                                                                           \
        (void)f0;                                                                               \
        (void)rotation;                                                                         \
        (void)temperature;                                                                      \
        (void)stress0;                                                                          \
        for (int k = 0; k < call->nstate; ++k) state[k] = state0[k];                            \
        nh_point(call, properties, f1, stress, tangent, energy, report, flaw);                  \
    }

NH_ROUTINE(c_nh, NH_NONE)
NH_ROUTINE(c_nh_truesdell_for_jaumann, NH_TRUESDELL_FOR_JAUMANN)
NH_ROUTINE(c_nh_missing_over_j, NH_MISSING_OVER_J)
NH_ROUTINE(c_nh_extra_over_j, NH_EXTRA_OVER_J)
NH_ROUTINE(c_nh_cauchy_for_kirchhoff, NH_CAUCHY_FOR_KIRCHHOFF)
NH_ROUTINE(c_nh_kirchhoff_for_cauchy, NH_KIRCHHOFF_FOR_CAUCHY)

enum nh_misbehaviour {
    NH_NAN_AT_2,
    NH_UNWRITTEN_AT_2,
    NH_SPIN_AT_2,
    NH_STATE_OVERRUN_AT_2,
    NH_NAN_STRESS_AT_2,
    NH_NAN_STATE_AT_2,
    NH_EXIT_AT_2,
    NH_ABORT_AT_2
};

#define NH_MISBEHAVING(name, what)                                                              \
    TC_FINITE_ROUTINE(name)                                                                     \
    {                                                                                           \
        (void)f0;                                                                               \
        (void)rotation;                                                                         \
        (void)temperature;                                                                      \
        (void)stress0;                                                                          \
        for (int k = 0; k < call->nstate; ++k) state[k] = state0[k];                            \
        tc_real t[81] = {0};                                                                    \
        nh_point(call, properties, f1, stress, t, energy, report, NH_NONE);                     \
        const int late = call->increment >= 2;                                                  \
        for (int k = 0; k < call->ntangent * call->ntangent; ++k) {                             \
            if (!(what == NH_UNWRITTEN_AT_2 && late && k == 20)) tangent[k] = t[k];             \
        }                                                                                       \
        if (what == NH_NAN_AT_2 && late) {                                                      \
            volatile double zero = 0.0;                                                         \
            tangent[7] = tangent[7] + zero / zero;                                              \
        }                                                                                       \
        if (what == NH_STATE_OVERRUN_AT_2 && late) state[call->nstate] = 0.0;                    \
        if ((what == NH_NAN_STRESS_AT_2 || what == NH_NAN_STATE_AT_2) && late) {                \
            volatile double zero = 0.0;                                                         \
            if (what == NH_NAN_STRESS_AT_2) stress[0] = stress[0] + zero / zero;                \
            if (what == NH_NAN_STATE_AT_2 && call->nstate > 0) state[0] = zero / zero;          \
        }                                                                                       \
        volatile int spin = what == NH_SPIN_AT_2 && late;                                       \
        while (spin) {                                                                          \
        }                                                                                       \
        if (what == NH_EXIT_AT_2 && late) exit(9);                                              \
        if (what == NH_ABORT_AT_2 && late) abort();                                             \
    }

NH_MISBEHAVING(c_nh_nan_at_2, NH_NAN_AT_2)
NH_MISBEHAVING(c_nh_unwritten_at_2, NH_UNWRITTEN_AT_2)
NH_MISBEHAVING(c_nh_spin_at_2, NH_SPIN_AT_2)
NH_MISBEHAVING(c_nh_state_overrun_at_2, NH_STATE_OVERRUN_AT_2)
NH_MISBEHAVING(c_nh_nan_stress_at_2, NH_NAN_STRESS_AT_2)
NH_MISBEHAVING(c_nh_nan_state_at_2, NH_NAN_STATE_AT_2)
NH_MISBEHAVING(c_nh_exit_at_2, NH_EXIT_AT_2)
NH_MISBEHAVING(c_nh_abort_at_2, NH_ABORT_AT_2)
