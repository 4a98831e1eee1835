/*
 * maxwell_block.c -- a block routine of linear viscoelasticity for explicit solvers: a bulk
 * spring, an equilibrium shear spring and one Maxwell branch (a standard linear solid in
 * shear; the exact exponential update of a Maxwell element over an increment of constant
 * strain rate, as in Simo & Hughes 1998, Computational Inelasticity, ch. 10, from memory).
 *
 *   c_maxwell_block           correct
 *   c_maxwell_block_relaxed   its elastic response with the equilibrium shear modulus G_inf
 *                             alone (the long-time one): a solver's wave speed too low
 *   c_maxwell_block_real_twin its twin updates the branch with the real part of the strain
 *                             increment (not complex-step safe; the real routine is right)
 *   c_maxwell_block_neighbour_density  divides the work by the next point's density (an
 *                             indexing slip: a point that depends on its neighbour)
 *   c_maxwell_block_first_density  divides the work by the density of the first call's first
 *                             point, kept in a static (right only while every point has it)
 *   c_maxwell_block_static_dissipation  sums the dissipated energy in a static over all
 *                             calls instead of from the point's energy at the start
 *   c_maxwell_block_backward_euler  correct too, but updates the branch by backward Euler,
 *                             h = (h_n + 2 G_1 de) / (1 + dt/tau): first order in dt, and far
 *                             from that order while dt is many relaxation times
 *
 * Properties [K, G_inf, G_1, tau]: bulk modulus, equilibrium and branch shear moduli,
 * relaxation time. State [h (ncomp)]: the branch's deviatoric stress (shear entries as
 * stress). Strain in Voigt form with engineering shear. With a = exp(-dt/tau) and the
 * deviatoric strain increment de (tensor components),
 *   h = a h_n + 2 G_1 (tau/dt)(1 - a) de,   stress = K tr(eps) 1 + 2 G_inf e + h.
 * The stiffness depends on the time increment: 2 (G_inf + G_1 (tau/dt)(1 - a)) in shear,
 * the instantaneous (glassy) G_inf + G_1 as dt -> 0. The elastic response
 * (TC_BLOCK_ELASTIC_RESPONSE) is stress_start + C_glassy dstrain and updates nothing.
 * Energies per unit mass: internal by the trapezoid rule; dissipated by the trapezoid rule in
 * time of the branch's dissipation rate h:h / (2 G_1 tau). No point is ever deleted.
 * The numbers of the demo are made up.
 *
 * Build: cc -I fortran-shim/include -c maxwell_block.c               exports c_maxwell_block
 *        cc -I fortran-shim/include -DTC_COMPLEX -c maxwell_block.c  exports the _cx twin
 */

#include "tancheck_cstep.h"
#include "tancheck_block.h"

/* The planted flaws of the variants. */
enum maxwell_flaw {
    MAXWELL_CORRECT,
    MAXWELL_RELAXED_RESPONSE,
    MAXWELL_REAL_TWIN,
    MAXWELL_NEIGHBOUR_DENSITY,
    MAXWELL_FIRST_DENSITY,
    MAXWELL_STATIC_DISSIPATION,
    MAXWELL_BACKWARD_EULER
};

/* h:h of a deviatoric stress in Voigt form (shear entries counted twice). */
static tc_real maxwell_dot(const tc_real *h, int n)
{
    tc_real s = tc_cst(0.0);
    for (int i = 0; i < n; ++i) s += (i < 3 ? 1.0 : 2.0) * h[i] * h[i];
    return s;
}

static void TC_NAME(maxwell)(const tc_block *block, const tc_real *properties, const tc_real *strain,
                             const tc_real *strain_increment, const tc_real *stress_start,
                             const tc_real *state_start, const tc_specific_energy *energy_start,
                             const tc_point_conditions *conditions, tc_real *stress, tc_real *state,
                             tc_specific_energy *energy, int32_t *deleted, enum maxwell_flaw flaw)
{
    static double first_density = -1.0;
    static tc_real dissipated_sum;
    const int n = block->ncomp, ns = block->nstate, np = block->npoints;
    const tc_real k = properties[0], g_inf = properties[1], g_1 = properties[2], tau = properties[3];
    const double dt = block->time_increment;
    for (int p = 0; p < np; ++p) {
        const tc_real *e0 = strain + p * n, *de = strain_increment + p * n;
        const tc_real *s0 = stress_start + p * n, *h0 = state_start + p * ns;
        tc_real *s = stress + p * n, *h = state + p * ns;
        double rho = conditions[flaw == MAXWELL_NEIGHBOUR_DENSITY ? (p + 1) % np : p].density;
        if (first_density < 0.0) first_density = rho;
        if (flaw == MAXWELL_FIRST_DENSITY) rho = first_density;
        deleted[p] = 0;
        const tc_real dtr = de[0] + de[1] + de[2];
        if (block->flags & TC_BLOCK_ELASTIC_RESPONSE) {
            const tc_real g = flaw == MAXWELL_RELAXED_RESPONSE ? g_inf : g_inf + g_1;
            for (int i = 0; i < n; ++i) {
                s[i] = s0[i] + (i < 3 ? k * dtr + 2.0 * g * (de[i] - dtr / 3.0) : g * de[i]);
            }
            for (int j = 0; j < ns; ++j) h[j] = h0[j];
            energy[p] = energy_start[p];
            continue;
        }
        /* a = exp(-dt/tau); the branch's effective modulus factor (tau/dt)(1 - a), 1 at dt = 0. */
        tc_real a = dt > 0.0 ? tc_exp(-dt / tau) : tc_cst(1.0);
        tc_real f = dt > 0.0 ? (tau / dt) * (1.0 - a) : tc_cst(1.0);
        if (flaw == MAXWELL_BACKWARD_EULER) {
            a = 1.0 / (1.0 + dt / tau);
            f = a;
        }
        const tc_real tr = e0[0] + e0[1] + e0[2] + dtr;
        for (int i = 0; i < n; ++i) {
            /* tensor components of the deviatoric strain and of its increment */
            const tc_real e = i < 3 ? e0[i] + de[i] - tr / 3.0 : 0.5 * (e0[i] + de[i]);
            tc_real d = i < 3 ? de[i] - dtr / 3.0 : 0.5 * de[i];
            if (flaw == MAXWELL_REAL_TWIN) d = tc_cst(tc_re(d)); /* the flaw: in the twin, the derivative is lost */
            h[i] = a * h0[i] + 2.0 * g_1 * f * d;
            s[i] = (i < 3 ? k * tr : tc_cst(0.0)) + 2.0 * g_inf * e + h[i];
        }
        for (int j = n; j < ns; ++j) h[j] = h0[j];
        tc_real work = tc_cst(0.0);
        for (int i = 0; i < n; ++i) work += 0.5 * (s0[i] + s[i]) * de[i];
        energy[p].internal = energy_start[p].internal + work / rho;
        const tc_real dissipated = 0.5 * dt * (maxwell_dot(h0, n) + maxwell_dot(h, n)) / (2.0 * g_1 * tau) / rho;
        dissipated_sum += dissipated;
        energy[p].dissipated =
            flaw == MAXWELL_STATIC_DISSIPATION ? dissipated_sum : energy_start[p].dissipated + dissipated;
    }
}

/* The arguments every variant passes on. */
#define MAXWELL_ARGS                                                                                          \
    block, properties, strain, strain_increment, stress_start, state_start, energy_start, conditions, stress, \
        state, energy, deleted

TC_BLOCK_ROUTINE(c_maxwell_block)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_CORRECT);
}

TC_BLOCK_ROUTINE(c_maxwell_block_relaxed)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_RELAXED_RESPONSE);
}

TC_BLOCK_ROUTINE(c_maxwell_block_real_twin)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_REAL_TWIN);
}

TC_BLOCK_ROUTINE(c_maxwell_block_neighbour_density)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_NEIGHBOUR_DENSITY);
}

TC_BLOCK_ROUTINE(c_maxwell_block_first_density)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_FIRST_DENSITY);
}

TC_BLOCK_ROUTINE(c_maxwell_block_static_dissipation)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_STATIC_DISSIPATION);
}

TC_BLOCK_ROUTINE(c_maxwell_block_backward_euler)
{
    (void)report;
    TC_NAME(maxwell)(MAXWELL_ARGS, MAXWELL_BACKWARD_EULER);
}
