/*
 * j2_block.c -- J2 plasticity with linear kinematic hardening as a block routine
 * (tancheck_block.h), the reference block routine "j2-block" and three flawed variants of the
 * selftest zoo, in C.
 *
 *   c_j2_block                      the correct block routine
 *   c_j2_block_neighbour_state      point p starts from the state of point p + 1
 *   c_j2_block_old_stress_energy    internal energy from the start stress only
 *   c_j2_block_dissipation_sign     dissipation added with the wrong sign
 *   c_j2_block_total_back_stress    back stress from the total plastic strain, not its increment
 *   c_j2_block_corrector_sign       plastic corrector added: sigma = 2 sigma_trial - sigma_return
 *   c_j2_block_double_correction    plastic corrector twice: sigma = 2 sigma_return - sigma_trial
 *   c_j2_block_midpoint             (correct) internal energy by the midpoint rule
 *
 * Every point is updated by the point routine's radial return (j2_update of j2.c, which this
 * file includes, so the library also exports the point routines c_j2 and c_j2_continuum: do not
 * link it together with j2.c). Properties and state as j2.c: [E, nu, sigma_y0, H_iso, Q, b,
 * H_kin], state [eps_p (ncomp), alpha, beta (ncomp)]. Specific energies: internal energy by the
 * trapezoid rule 1/2 (sigma_start + sigma) . dstrain / density, dissipation sigma_y0 dalpha /
 * density. No point is ever deleted. The elastic response (TC_BLOCK_ELASTIC_RESPONSE) returns
 * stress_start + C dstrain with the isotropic C(E, nu) and updates nothing.
 *
 * Build: cc -I fortran-shim/include -c j2_block.c               exports c_j2_block, ...
 *        cc -I fortran-shim/include -DTC_COMPLEX -c j2_block.c  exports the _cx twins
 */
#include "j2.c"

#include "tancheck_block.h"

typedef enum {
    J2B_CORRECT,
    J2B_NEIGHBOUR_STATE,
    J2B_OLD_STRESS_ENERGY,
    J2B_DISSIPATION_SIGN,
    J2B_TOTAL_BACK_STRESS,
    J2B_CORRECTOR_SIGN,
    J2B_DOUBLE_CORRECTION,
    J2B_MIDPOINT
} j2b_flaw;

static void j2_block(const tc_block *block, const tc_real *properties, const tc_real *strain,
                     const tc_real *strain_increment, const tc_real *stress_start,
                     const tc_real *state_start, const tc_specific_energy *energy_start,
                     const tc_point_conditions *conditions, tc_real *stress, tc_real *state,
                     tc_specific_energy *energy, int32_t *deleted, tc_block_report *report,
                     j2b_flaw flaw)
{
    const int n = block->ncomp, ns = block->nstate, np = block->npoints;
    if ((n != 6 && n != 4) || ns < 2 * n + 1 || ns > 64 || block->nproperties < J2_NPROP) {
        tc_block_fail(report, -1, "j2-block: needs ncomp 6 or 4, 7 properties, 2*ncomp+1 state");
        return;
    }
    const tc_real e = properties[J2_E], nu = properties[J2_NU];
    const tc_real mu = e / (2.0 * (1.0 + nu));
    const tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    for (int p = 0; p < np; ++p) {
        const tc_real *de = strain_increment + p * n;
        const tc_real *s0 = stress_start + p * n;
        tc_real *s = stress + p * n;
        deleted[p] = 0;
        if (block->flags & TC_BLOCK_ELASTIC_RESPONSE) {
            const tc_real tr = de[0] + de[1] + de[2];
            for (int i = 0; i < n; ++i) {
                s[i] = s0[i] + (i < 3 ? lambda * tr + 2.0 * mu * de[i] : mu * de[i]);
            }
            for (int k = 0; k < ns; ++k) {
                state[p * ns + k] = state_start[p * ns + k];
            }
            energy[p] = energy_start[p];
            continue;
        }
        const int from = (flaw == J2B_NEIGHBOUR_STATE && p + 1 < np) ? p + 1 : p;
        /* The point routine's call description, positionally: version, ncomp, nstate,
         * properties, increment, flags, time, time increment. */
        const tc_call call = {TC_ROUTINE_ABI_VERSION, n, ns, block->nproperties, block->increment,
                              0, block->time, block->time_increment};
        tc_report point_report = {0};
        point_report.branch = -1;
        tc_real tangent[36];
        j2_update(&call, properties, strain + p * n, de, state_start + from * ns, s,
                  state + p * ns, tangent, &point_report, J2_TANGENT_CONSISTENT);
        if (point_report.status != 0) {
            tc_block_fail(report, p, "j2-block: the point update failed");
            return;
        }
        if (flaw == J2B_TOTAL_BACK_STRESS) {
            /* beta_n + 2/3 H_kin eps_p(n+1) = the return's beta + 2/3 H_kin eps_p(n). */
            for (int i = 0; i < n; ++i) {
                state[p * ns + n + 1 + i] += properties[J2_H_KIN] * (2.0 / 3.0) * state_start[p * ns + i];
            }
        } else if (flaw == J2B_CORRECTOR_SIGN || flaw == J2B_DOUBLE_CORRECTION) {
            const tc_real tr = de[0] + de[1] + de[2];
            for (int i = 0; i < n; ++i) {
                const tc_real trial = s0[i] + (i < 3 ? lambda * tr + 2.0 * mu * de[i] : mu * de[i]);
                s[i] = flaw == J2B_CORRECTOR_SIGN ? 2.0 * trial - s[i] : 2.0 * s[i] - trial;
            }
        }
        const double rho = conditions[p].density;
        tc_real work = 0.0;
        if (flaw == J2B_MIDPOINT) {
            /* The point update over half the increment from the same start. */
            const tc_call half_call = {TC_ROUTINE_ABI_VERSION, n, ns, block->nproperties, block->increment,
                                       0, block->time, 0.5 * block->time_increment};
            tc_real half_de[6], half[6], half_state[64];
            for (int i = 0; i < n; ++i) half_de[i] = 0.5 * de[i];
            tc_report half_report = {0};
            half_report.branch = -1;
            j2_update(&half_call, properties, strain + p * n, half_de, state_start + p * ns, half,
                      half_state, tangent, &half_report, J2_TANGENT_CONSISTENT);
            for (int i = 0; i < n; ++i) work += half[i] * de[i];
        } else {
            for (int i = 0; i < n; ++i) {
                work += (flaw == J2B_OLD_STRESS_ENERGY ? s0[i] : 0.5 * (s0[i] + s[i])) * de[i];
            }
        }
        const tc_real dalpha = state[p * ns + n] - state_start[p * ns + n];
        tc_real dissipation = properties[J2_SIGMA_Y0] * dalpha / rho;
        if (flaw == J2B_DISSIPATION_SIGN) {
            dissipation = -dissipation;
        }
        energy[p].internal = energy_start[p].internal + work / rho;
        energy[p].dissipated = energy_start[p].dissipated + dissipation;
    }
}

#define J2_BLOCK_VARIANT(name, flaw)                                                           \
    TC_BLOCK_ROUTINE(name)                                                                     \
    {                                                                                          \
        j2_block(block, properties, strain, strain_increment, stress_start, state_start,       \
                 energy_start, conditions, stress, state, energy, deleted, report, flaw);      \
    }

J2_BLOCK_VARIANT(c_j2_block, J2B_CORRECT)
J2_BLOCK_VARIANT(c_j2_block_neighbour_state, J2B_NEIGHBOUR_STATE)
J2_BLOCK_VARIANT(c_j2_block_old_stress_energy, J2B_OLD_STRESS_ENERGY)
J2_BLOCK_VARIANT(c_j2_block_dissipation_sign, J2B_DISSIPATION_SIGN)
J2_BLOCK_VARIANT(c_j2_block_total_back_stress, J2B_TOTAL_BACK_STRESS)
J2_BLOCK_VARIANT(c_j2_block_corrector_sign, J2B_CORRECTOR_SIGN)
J2_BLOCK_VARIANT(c_j2_block_double_correction, J2B_DOUBLE_CORRECTION)
J2_BLOCK_VARIANT(c_j2_block_midpoint, J2B_MIDPOINT)
