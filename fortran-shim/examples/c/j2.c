/*
 * j2.c -- small-strain J2 plasticity with radial return, the reference routines "j2" and
 * "j2-continuum" in C (Simo & Taylor 1985, CMAME 48; Simo & Hughes 1998, Computational
 * Inelasticity, Box 3.2).
 *
 *   c_j2            the consistent (algorithmic) tangent
 *   c_j2_continuum  the same stress update with the continuum elastoplastic tangent: a
 *                   deliberately wrong Jacobian of the update, for tancheck to find
 *
 * Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
 * (11, 22, 33, 12), engineering shear strain.
 *   properties [E, nu, sigma_y0, H_iso, Q, b, H_kin]:
 *     yield stress K(alpha) = sigma_y0 + H_iso alpha + Q (1 - exp(-b alpha)) (linear plus Voce),
 *     linear kinematic hardening modulus H_kin;
 *   state [eps_p (ncomp, engineering shear), alpha, beta (ncomp, back stress)], 2 ncomp + 1
 *     entries; entries past these are carried through unchanged.
 * Branch 0 elastic, 1 plastic. Energies from the end state (j2_energy.h).
 *
 * The radial return itself is j2_return_map.h, shared with the flawed routines of zoo_j2.c;
 * its head says how it stays complex-step safe (Martins, Sturdza & Alonso 2003).
 *
 * Build: cc -I fortran-shim/include -c j2.c               exports c_j2, c_j2_continuum
 *        cc -I fortran-shim/include -DTC_COMPLEX -c j2.c  exports c_j2_cx, c_j2_continuum_cx
 */
#include <math.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

#include "j2_energy.h"
#include "j2_return_map.h"

typedef enum { J2_TANGENT_CONSISTENT, J2_TANGENT_CONTINUUM } j2_tangent_kind;

static void j2_update(const tc_call *call, const tc_real *properties, const tc_real *strain,
                      const tc_real *dstrain, const tc_real *state0, tc_real *stress,
                      tc_real *state, tc_real *tangent, tc_report *report,
                      j2_tangent_kind kind)
{
    const int n = call->ncomp;
    if (n != 6 && n != 4) {
        j2_fail_as(report, "j2", "ncomp must be 6 or 4");
        return;
    }
    if (call->nproperties < J2_NPROP) {
        j2_fail_as(report, "j2", "needs 7 properties [E, nu, sy0, H_iso, Q, b, H_kin]");
        return;
    }
    if (call->nstate < 2 * n + 1) {
        j2_fail_as(report, "j2", "needs 2*ncomp+1 state variables [eps_p, alpha, beta]");
        return;
    }

    const double sqrt23 = sqrt(2.0 / 3.0);
    const tc_real h_kin = properties[J2_H_KIN];
    tc_real mu, kappa;
    j2_elastic_moduli(properties, &mu, &kappa);
    const tc_real alpha_n = state0[n];

    /* Trial state and trial yield function f_tr = |xi_tr| - sqrt(2/3) K(alpha_n). */
    tc_real sigma_tr[6];
    tc_real xi[6];
    j2_trial(n, mu, kappa, strain, dstrain, state0, state0 + n + 1, sigma_tr, xi);
    const tc_real norm = j2_norm(n, xi);
    const tc_real f_trial = norm - sqrt23 * j2_yield(properties, alpha_n);

    tc_real n_dir[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
    tc_real theta = 1.0;
    tc_real theta_bar = 0.0;

    for (int k = 2 * n + 1; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    if (tc_re(f_trial) <= 0.0 || tc_re(norm) <= 0.0) {
        /* Elastic step: the trial state is the solution. */
        j2_elastic_step(n, 2 * n + 1, sigma_tr, state0, stress, state, report);
    } else {
        tc_real dgamma;
        const int converged = j2_newton(properties, norm, mu, h_kin, alpha_n, &dgamma);
        const tc_real alpha_new = alpha_n + sqrt23 * dgamma;
        if (!(tc_re(j2_yield(properties, alpha_new)) > 0.0)) {
            j2_fail_as(report, "j2", "softening takes the yield stress K(alpha) to zero in this increment");
            return;
        }
        j2_radial_update(n, mu, h_kin, norm, dgamma, sigma_tr, xi, state0, n_dir, stress, state);
        j2_moduli(kind == J2_TANGENT_CONSISTENT, mu, j2_yield_slope(properties, alpha_new) + h_kin, dgamma,
                  norm, &theta, &theta_bar);
        report->branch = 1;
        if (!converged) {
            j2_fail_as(report, "j2", "return map did not converge in 50 Newton iterations");
        }
    }

    j2_matrix(n, kappa, mu, theta, theta_bar, n_dir, tangent);
    if (report->status != TC_STATUS_FAILED) {
        report->status = TC_STATUS_OK;
    }
}

TC_ROUTINE(c_j2)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    j2_update(call, properties, strain, dstrain, state0, stress, state, tangent, report,
              J2_TANGENT_CONSISTENT);
    j2_energy(call, properties, strain, dstrain, stress, state, energy, report);
}

TC_ROUTINE(c_j2_continuum)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    j2_update(call, properties, strain, dstrain, state0, stress, state, tangent, report,
              J2_TANGENT_CONTINUUM);
    j2_energy(call, properties, strain, dstrain, stress, state, energy, report);
}
