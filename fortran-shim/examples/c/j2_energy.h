/*
 * j2_energy.h -- the energies of the J2 examples at the end of an increment, from the end
 * state (shared by j2.c and zoo_j2.c; include after tancheck_routine.h and tancheck_cstep.h).
 *
 * The backward-Euler radial return of associative J2 plasticity is the stationarity condition
 * of an incremental potential (Ortiz & Stainier 1999, CMAME 171:419-444; from memory) with the
 * stored energy psi = 1/2 sigma:eps_e + 1/2 H_iso alpha^2 + Q (alpha - (1 - exp(-b alpha)) / b)
 * + 3 / (4 H_kin) beta:beta and the dissipation D = sigma_y0 alpha. State layout
 * [eps_p (ncomp, engineering shear), alpha, beta (ncomp, tensor components)].
 */
#ifndef TANCHECK_EXAMPLE_J2_ENERGY_H
#define TANCHECK_EXAMPLE_J2_ENERGY_H

static void j2_energy(const tc_call *call, const tc_real *properties, const tc_real *strain,
                      const tc_real *dstrain, const tc_real *stress, const tc_real *state,
                      tc_energy *energy, tc_report *report)
{
    if (report->status != TC_STATUS_OK) {
        return;
    }
    const int n = call->ncomp;
    tc_real psi = 0.0;
    for (int i = 0; i < n; ++i) {
        psi += 0.5 * stress[i] * (strain[i] + dstrain[i] - state[i]);
    }
    const tc_real alpha = state[n];
    psi += 0.5 * properties[3] * alpha * alpha;
    if (tc_re(properties[5]) > 0.0) {
        psi += properties[4] * (alpha - (1.0 - tc_exp(-properties[5] * alpha)) / properties[5]);
    }
    if (tc_re(properties[6]) > 0.0) {
        tc_real bb = 0.0;
        for (int i = 0; i < n; ++i) {
            bb += (i < 3 ? 1.0 : 2.0) * state[n + 1 + i] * state[n + 1 + i];
        }
        psi += 0.75 * bb / properties[6];
    }
    energy->stored = psi;
    energy->dissipated = properties[2] * alpha;
    report->provides |= TC_PROVIDES_ENERGY;
}

#endif
