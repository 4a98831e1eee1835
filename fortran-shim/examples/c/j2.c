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
 * Complex-step safety (Martins, Sturdza & Alonso 2003): the yield test and the Newton stop test
 * look at real parts only, the norm is sqrt(sum x_i^2) without conjugation, and the Newton loop
 * makes one more iteration after it has converged, so that the derivative part carried by the
 * imaginary part has converged too.
 *
 * Build: cc -I fortran-shim/include -c j2.c               exports c_j2, c_j2_continuum
 *        cc -I fortran-shim/include -DTC_COMPLEX -c j2.c  exports c_j2_cx, c_j2_continuum_cx
 */
#include <math.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

#include "j2_energy.h"

/* Property indices. */
enum { J2_E, J2_NU, J2_SIGMA_Y0, J2_H_ISO, J2_Q, J2_B, J2_H_KIN, J2_NPROP };

/* Newton iteration limit and relative step tolerance on the plastic multiplier. */
#define J2_MAX_ITER 50
#define J2_STEP_TOL 1e-14

typedef enum { J2_TANGENT_CONSISTENT, J2_TANGENT_CONTINUUM } j2_tangent_kind;

/* Yield stress K(alpha) = sigma_y0 + H_iso alpha + Q (1 - exp(-b alpha)) (Voce 1948 saturation
 * term plus linear hardening). */
static tc_real j2_yield(const tc_real *properties, tc_real alpha)
{
    return properties[J2_SIGMA_Y0] + properties[J2_H_ISO] * alpha +
           properties[J2_Q] * (1.0 - tc_exp(-properties[J2_B] * alpha));
}

/* K'(alpha) = H_iso + Q b exp(-b alpha). */
static tc_real j2_yield_slope(const tc_real *properties, tc_real alpha)
{
    return properties[J2_H_ISO] + properties[J2_Q] * properties[J2_B] * tc_exp(-properties[J2_B] * alpha);
}

static void j2_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    /* "<model>: <text>" into the report's message, cut to fit and NUL-terminated. */
    const char *parts[2] = {"j2: ", text};
    int k = 0;
    for (int p = 0; p < 2; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

static void j2_update(const tc_call *call, const tc_real *properties, const tc_real *strain,
                      const tc_real *dstrain, const tc_real *state0, tc_real *stress,
                      tc_real *state, tc_real *tangent, tc_report *report,
                      j2_tangent_kind kind)
{
    const int n = call->ncomp;
    if (n != 6 && n != 4) {
        j2_fail(report, "ncomp must be 6 or 4");
        return;
    }
    if (call->nproperties < J2_NPROP) {
        j2_fail(report, "needs 7 properties [E, nu, sy0, H_iso, Q, b, H_kin]");
        return;
    }
    if (call->nstate < 2 * n + 1) {
        j2_fail(report, "needs 2*ncomp+1 state variables [eps_p, alpha, beta]");
        return;
    }

    const double sqrt23 = sqrt(2.0 / 3.0);
    const tc_real e = properties[J2_E];
    const tc_real nu = properties[J2_NU];
    const tc_real h_kin = properties[J2_H_KIN];
    const tc_real mu = e / (2.0 * (1.0 + nu));
    const tc_real kappa = e / (3.0 * (1.0 - 2.0 * nu));

    const tc_real *eps_p_n = state0;
    const tc_real alpha_n = state0[n];
    const tc_real *beta_n = state0 + n + 1;

    /* Trial state (Simo & Hughes 1998, Box 3.2): elastic strain in tensor components
     * (engineering shear halved), sigma_tr = kappa tr(eps_e) 1 + 2 mu dev(eps_e),
     * xi_tr = dev(sigma_tr) - beta_n. */
    tc_real eps_e[6];
    for (int i = 0; i < n; ++i) {
        eps_e[i] = strain[i] + dstrain[i] - eps_p_n[i];
        if (i >= 3) {
            eps_e[i] = 0.5 * eps_e[i];
        }
    }
    const tc_real trace = eps_e[0] + eps_e[1] + eps_e[2];
    const tc_real pressure = kappa * trace;

    tc_real sigma_tr[6];
    tc_real xi[6];
    tc_real norm2 = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = i < 3 ? 2.0 * mu * (eps_e[i] - trace / 3.0) : 2.0 * mu * eps_e[i];
        sigma_tr[i] = i < 3 ? pressure + s : s;
        xi[i] = s - beta_n[i];
        /* Each shear component stands for two equal tensor components. */
        norm2 += (i < 3 ? 1.0 : 2.0) * xi[i] * xi[i];
    }
    const tc_real norm = tc_sqrt(norm2);

    /* Trial yield function f_tr = |xi_tr| - sqrt(2/3) K(alpha_n) (Simo & Hughes 1998, Box 3.2). */
    const tc_real f_trial = norm - sqrt23 * j2_yield(properties, alpha_n);

    tc_real n_dir[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
    tc_real theta = 1.0;
    tc_real theta_bar = 0.0;

    for (int k = 2 * n + 1; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    if (tc_re(f_trial) <= 0.0 || tc_re(norm) <= 0.0) {
        /* Elastic step: the trial state is the solution. */
        for (int i = 0; i < n; ++i) {
            stress[i] = sigma_tr[i];
        }
        for (int k = 0; k < 2 * n + 1; ++k) {
            state[k] = state0[k];
        }
        report->branch = 0;
    } else {
        /* Return map (Simo & Hughes 1998, Box 3.2): solve
         *   g(dg) = |xi_tr| - (2 mu + 2/3 H_kin) dg - sqrt(2/3) K(alpha_n + sqrt(2/3) dg) = 0
         * by Newton from dg = 0; after the step that meets the tolerance, one more step. */
        const tc_real c_lin = 2.0 * mu + (2.0 / 3.0) * h_kin;
        tc_real dgamma = 0.0;
        int iter = 0;
        int converged = 0;
        for (;;) {
            const tc_real alpha = alpha_n + sqrt23 * dgamma;
            const tc_real g = norm - c_lin * dgamma - sqrt23 * j2_yield(properties, alpha);
            const tc_real dg_slope = -c_lin - (2.0 / 3.0) * j2_yield_slope(properties, alpha);
            const tc_real step = -g / dg_slope;
            dgamma += step;
            ++iter;
            if (converged) {
                break; /* the extra iteration is done */
            }
            if (fabs(tc_re(step)) <= J2_STEP_TOL * tc_re(norm) / (2.0 * tc_re(mu))) {
                converged = 1;
            } else if (iter >= J2_MAX_ITER) {
                break;
            }
        }

        /* Radial return (Simo & Hughes 1998, Box 3.2), n = xi_tr / |xi_tr|. */
        const tc_real alpha_new = alpha_n + sqrt23 * dgamma;
        if (!(tc_re(j2_yield(properties, alpha_new)) > 0.0)) {
            j2_fail(report, "softening takes the yield stress K(alpha) to zero in this increment");
            return;
        }
        for (int i = 0; i < n; ++i) {
            n_dir[i] = xi[i] / norm;
            stress[i] = sigma_tr[i] - 2.0 * mu * dgamma * n_dir[i];
            /* Engineering shear: the plastic shear strain grows by 2 dg n_ij. */
            state[i] = eps_p_n[i] + (i < 3 ? 1.0 : 2.0) * dgamma * n_dir[i];
            state[n + 1 + i] = beta_n[i] + (2.0 / 3.0) * h_kin * dgamma * n_dir[i];
        }
        state[n] = alpha_new;

        /* Tangent moduli, with K' = K'(alpha_{n+1}):
         *   consistent (Simo & Taylor 1985; Simo & Hughes 1998, Box 3.2):
         *     theta = 1 - 2 mu dg / |xi_tr|,
         *     theta_bar = 1 / (1 + (K' + H_kin) / (3 mu)) - (1 - theta);
         *   continuum elastoplastic (Simo & Hughes 1998, ch. 3):
         *     theta = 1, theta_bar = 1 / (1 + (K' + H_kin) / (3 mu)). */
        const tc_real k_slope = j2_yield_slope(properties, alpha_new);
        const tc_real ratio = 1.0 / (1.0 + (k_slope + h_kin) / (3.0 * mu));
        if (kind == J2_TANGENT_CONSISTENT) {
            theta = 1.0 - 2.0 * mu * dgamma / norm;
            theta_bar = ratio - (1.0 - theta);
        } else {
            theta = 1.0;
            theta_bar = ratio;
        }
        report->branch = 1;

        if (!converged) {
            j2_fail(report, "return map did not converge in 50 Newton iterations");
        }
    }

    /* C = kappa 1(x)1 + 2 mu theta (I - 1/3 1(x)1) - 2 mu theta_bar n(x)n
     * (Simo & Hughes 1998, Box 3.2). Voigt with engineering shear columns: the column of a
     * shear strain holds the tensor component C_ijkl itself, and I_klkl = 1/2 for k != l. */
    for (int j = 0; j < n; ++j) {
        for (int i = 0; i < n; ++i) {
            tc_real c = 0.0;
            if (i < 3 && j < 3) {
                c = kappa + 2.0 * mu * theta * ((i == j ? 1.0 : 0.0) - 1.0 / 3.0);
            } else if (i == j) {
                c = mu * theta;
            }
            tangent[i + j * n] = c - 2.0 * mu * theta_bar * n_dir[i] * n_dir[j];
        }
    }
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
