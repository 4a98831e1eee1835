/*
 * j2_return_map.h -- the J2 radial return shared by the reference routines (j2.c) and the
 * flawed ones of the selftest zoo (zoo_j2.c): yield stress, trial state, Newton on the
 * consistency condition, the radial update of stress and state, the tangent moduli and the
 * tangent matrix (Simo & Taylor 1985, CMAME 48; Simo & Hughes 1998, Computational
 * Inelasticity, Box 3.2). Layout: DEVELOPERS.md, "Reference models", j2.
 *
 * Include after tancheck_routine.h and tancheck_cstep.h; every function is static, so each
 * source (and its complex twin) gets its own copy.
 *
 * Complex-step safety (Martins, Sturdza & Alonso 2003): tests on real parts only, the norm as
 * sqrt(sum w x_i^2) without conjugation, and one more Newton iteration after convergence so
 * that the imaginary part has converged too.
 */
#ifndef J2_RETURN_MAP_H
#define J2_RETURN_MAP_H

#include <math.h>

/* Property indices. */
enum { J2_E, J2_NU, J2_SIGMA_Y0, J2_H_ISO, J2_Q, J2_B, J2_H_KIN, J2_NPROP };

/* Newton iteration limit and relative step tolerance on the plastic multiplier (the step is
 * compared with |xi_tr| / (2 mu), the natural scale of dgamma). */
#define J2_MAX_ITER 50
#define J2_STEP_TOL 1e-14

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

/* The elastic moduli of the properties: shear modulus mu = E / (2 (1 + nu)) and bulk modulus
 * kappa = E / (3 (1 - 2 nu)). */
static void j2_elastic_moduli(const tc_real *properties, tc_real *mu, tc_real *kappa)
{
    const tc_real e = properties[J2_E];
    const tc_real nu = properties[J2_NU];
    *mu = e / (2.0 * (1.0 + nu));
    *kappa = e / (3.0 * (1.0 - 2.0 * nu));
}

/* An elastic step: the trial stress is the solution and the first nkeep state variables are
 * carried through unchanged; branch 0. */
static void j2_elastic_step(int n, int nkeep, const tc_real *sigma_tr, const tc_real *state0, tc_real *stress,
                            tc_real *state, tc_report *report)
{
    for (int i = 0; i < n; ++i) {
        stress[i] = sigma_tr[i];
    }
    for (int k = 0; k < nkeep; ++k) {
        state[k] = state0[k];
    }
    report->branch = 0;
}

/* Status FAILED with the message "<name>: <text>", cut to fit and NUL-terminated. */
static void j2_fail_as(tc_report *report, const char *name, const char *text)
{
    report->status = TC_STATUS_FAILED;
    const char *parts[3] = {name, ": ", text};
    int k = 0;
    for (int p = 0; p < 3; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/* Trial state: the elastic strain eps_e = strain + dstrain - eps_p (dstrain NULL: the start
 * state) in tensor components (engineering shear halved), sigma = kappa tr(eps_e) 1 +
 * 2 mu dev(eps_e) and the relative stress xi = dev(sigma) - beta. */
static void j2_trial(int n, tc_real mu, tc_real kappa, const tc_real *strain, const tc_real *dstrain,
                     const tc_real *eps_p, const tc_real *beta, tc_real *sigma, tc_real *xi)
{
    tc_real eps_e[6];
    for (int i = 0; i < n; ++i) {
        eps_e[i] = dstrain != 0 ? strain[i] + dstrain[i] - eps_p[i] : strain[i] - eps_p[i];
        if (i >= 3) {
            eps_e[i] = 0.5 * eps_e[i];
        }
    }
    const tc_real trace = eps_e[0] + eps_e[1] + eps_e[2];
    const tc_real pressure = kappa * trace;
    for (int i = 0; i < n; ++i) {
        const tc_real s = i < 3 ? 2.0 * mu * (eps_e[i] - trace / 3.0) : 2.0 * mu * eps_e[i];
        sigma[i] = i < 3 ? pressure + s : s;
        xi[i] = s - beta[i];
    }
}

/* |xi| = sqrt(sum w_i xi_i^2), w = 2 for a shear component (it stands for two equal tensor
 * components). */
static tc_real j2_norm(int n, const tc_real *xi)
{
    tc_real norm2 = 0.0;
    for (int i = 0; i < n; ++i) {
        norm2 += (i < 3 ? 1.0 : 2.0) * xi[i] * xi[i];
    }
    return tc_sqrt(norm2);
}

/* Newton on g(dg) = |xi_tr| - (2 mu + 2/3 H_kin) dg - sqrt(2/3) K(alpha_n + sqrt(2/3) dg) = 0
 * from dg = 0; after the step that meets the tolerance, one more step. Returns 1 when it
 * converged in J2_MAX_ITER iterations, with dg in *dgamma. */
static int j2_newton(const tc_real *properties, tc_real norm, tc_real mu, tc_real h_kin, tc_real alpha_n,
                     tc_real *dgamma)
{
    const double sqrt23 = sqrt(2.0 / 3.0);
    const tc_real c_lin = 2.0 * mu + (2.0 / 3.0) * h_kin;
    tc_real dg = 0.0;
    int iter = 0;
    int converged = 0;
    for (;;) {
        const tc_real alpha = alpha_n + sqrt23 * dg;
        const tc_real g = norm - c_lin * dg - sqrt23 * j2_yield(properties, alpha);
        const tc_real g_slope = -c_lin - (2.0 / 3.0) * j2_yield_slope(properties, alpha);
        const tc_real step = -g / g_slope;
        dg += step;
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
    *dgamma = dg;
    return converged;
}

/* Radial return: n = xi_tr / |xi_tr|, sigma = sigma_tr - 2 mu dg n, eps_p += dg n (engineering
 * shear: 2 dg n_ij), alpha = alpha_n + sqrt(2/3) dg, beta += 2/3 H_kin dg n. State layout
 * [eps_p (n), alpha, beta (n)]. */
static void j2_radial_update(int n, tc_real mu, tc_real h_kin, tc_real norm, tc_real dgamma,
                             const tc_real *sigma_tr, const tc_real *xi, const tc_real *state0,
                             tc_real *n_dir, tc_real *stress, tc_real *state)
{
    for (int i = 0; i < n; ++i) {
        n_dir[i] = xi[i] / norm;
        stress[i] = sigma_tr[i] - 2.0 * mu * dgamma * n_dir[i];
        state[i] = state0[i] + (i < 3 ? 1.0 : 2.0) * dgamma * n_dir[i];
        state[n + 1 + i] = state0[n + 1 + i] + (2.0 / 3.0) * h_kin * dgamma * n_dir[i];
    }
    state[n] = state0[n] + sqrt(2.0 / 3.0) * dgamma;
}

/* Tangent moduli with hardening = K'(alpha_{n+1}) + H_kin:
 *   consistent (Simo & Taylor 1985; Simo & Hughes 1998, Box 3.2):
 *     theta = 1 - 2 mu dg / |xi_tr|, theta_bar = 1 / (1 + hardening / (3 mu)) - (1 - theta);
 *   continuum elastoplastic (Simo & Hughes 1998, ch. 3):
 *     theta = 1, theta_bar = 1 / (1 + hardening / (3 mu)). */
static void j2_moduli(int consistent, tc_real mu, tc_real hardening, tc_real dgamma, tc_real norm,
                      tc_real *theta, tc_real *theta_bar)
{
    const tc_real ratio = 1.0 / (1.0 + hardening / (3.0 * mu));
    if (consistent) {
        *theta = 1.0 - 2.0 * mu * dgamma / norm;
        *theta_bar = ratio - (1.0 - *theta);
    } else {
        *theta = 1.0;
        *theta_bar = ratio;
    }
}

/* C = kappa 1(x)1 + 2 mu theta (I - 1/3 1(x)1) - 2 mu theta_bar n(x)n (Simo & Hughes 1998,
 * Box 3.2). Voigt with engineering shear columns: the column of a shear strain holds the
 * tensor component C_ijkl itself, and I_klkl = 1/2 for k != l. Column-major. */
static void j2_matrix(int n, tc_real kappa, tc_real mu, tc_real theta, tc_real theta_bar,
                      const tc_real *n_dir, tc_real *tangent)
{
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
}

#endif /* J2_RETURN_MAP_H */
