/*
 * elastic.c -- linear isotropic elasticity, the reference routine "elastic" in C.
 *
 * Layout (DEVELOPERS.md, "Reference models"): properties [E, nu], no state. Components in the
 * default order with engineering shear strain:
 *   ncomp 6: 11, 22, 33, 23, 13, 12 (3D)
 *   ncomp 4: 11, 22, 33, 12 (plane strain / axisymmetric)
 *   ncomp 3: 11, 22, 12 (plane stress)
 *   ncomp 1: 11 (uniaxial stress, sigma = E eps)
 * Incremental form sigma = sigma0 + C dstrain. Energy: stored = 1/2 sigma . (strain + dstrain),
 * the work-conjugate dot product with engineering shear; dissipated = 0. Branch 0.
 *
 * State entries, if the caller passes any, are carried through unchanged.
 *
 * Build: cc -I fortran-shim/include -c elastic.c            exports c_elastic
 *        cc -I fortran-shim/include -DTC_COMPLEX -c elastic.c  exports c_elastic_cx
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

#include "isotropic_elastic.h"

TC_ROUTINE(c_elastic)
{
    (void)temperature;
    (void)dstress_dtemp;

    const int n = call->ncomp;
    if (n != 6 && n != 4 && n != 3 && n != 1) {
        ex_fail(report, "elastic", "ncomp must be 6, 4, 3 or 1");
        return;
    }
    if (call->nproperties < 2) {
        ex_fail(report, "elastic", "needs 2 properties [E, nu]");
        return;
    }

    /* The caller's tangent buffer holds the stiffness; it is written in full here and then
     * only read. */
    ex_isotropic_stiffness(n, properties[0], properties[1], tangent);

    ex_linear_response(call, strain, dstrain, stress0, state0, tangent, stress, state, energy, report);
}

/*
 * c_elastic_uncondensed -- the zoo's flawed plane-stress variant: the plane-stress stress, but
 * the tangent is rows and columns 11, 22, 12 of the 3D stiffness (lambda + 2 mu, lambda, mu),
 * the condensation for sigma33 = 0 forgotten. Plane stress (ncomp 3) only; properties [E, nu].
 */
TC_ROUTINE(c_elastic_uncondensed)
{
    (void)temperature;
    (void)dstress_dtemp;

    if (call->ncomp != 3) {
        ex_fail(report, "elastic_uncondensed", "ncomp must be 3 (plane stress)");
        return;
    }
    if (call->nproperties < 2) {
        ex_fail(report, "elastic_uncondensed", "needs 2 properties [E, nu]");
        return;
    }
    ex_isotropic_stiffness(3, properties[0], properties[1], tangent);
    ex_linear_response(call, strain, dstrain, stress0, state0, tangent, stress, state, energy, report);

    tc_real mu = properties[0] / (2.0 * (1.0 + properties[1]));
    tc_real lambda = properties[0] * properties[1] / ((1.0 + properties[1]) * (1.0 - 2.0 * properties[1]));
    tangent[0 + 0 * 3] = lambda + 2.0 * mu;
    tangent[1 + 1 * 3] = lambda + 2.0 * mu;
    tangent[0 + 1 * 3] = lambda;
    tangent[1 + 0 * 3] = lambda;
    tangent[2 + 2 * 3] = mu;
}
