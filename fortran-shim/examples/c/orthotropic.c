/*
 * orthotropic.c -- linear orthotropic elasticity with material axes among the properties, the
 * reference routine "orthotropic" in C.
 *
 * Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
 * (11, 22, 33, 12: plane strain / axisymmetric, the matching rows and columns of the 3D
 * stiffness), engineering shear strain, no state (entries passed are carried through).
 *   properties [E1, E2, E3, nu12, nu13, nu23, G12, G13, G23, a1x, a1y, a1z, a2x, a2y, a2z]:
 *     engineering constants in the material frame (nu_ij / E_i = nu_ji / E_j), then the
 *     directions of material axes 1 and 2 in the global frame. Gram-Schmidt makes them
 *     orthonormal: e1 = a1/|a1|, e2 = the part of a2 normal to e1, normalised; e3 = e1 x e2.
 * Incremental form sigma = sigma0 + C dstrain with C the material stiffness (the inverse of
 * the orthotropic compliance, Jones, Mechanics of Composite Materials, 2nd ed. 1999, ch. 2;
 * from memory) turned into the global frame, C_ijkl = R_ia R_jb R_kc R_ld C'_abcd with
 * R = [e1 e2 e3]; the turn is done in Mandel form, where it is an orthogonal 6x6 matrix.
 * Energy: stored = 1/2 sigma . (strain + dstrain), dissipated = 0. Branch 0.
 *
 * Build: cc -I fortran-shim/include -c orthotropic.c               exports c_orthotropic
 *        cc -I fortran-shim/include -DTC_COMPLEX -c orthotropic.c  exports c_orthotropic_cx
 */
#include <math.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"
#include "isotropic_elastic.h"
#include "material_axes.h"

enum { OR_E1, OR_E2, OR_E3, OR_NU12, OR_NU13, OR_NU23, OR_G12, OR_G13, OR_G23, OR_A1 = 9,
       OR_A2 = 12, OR_NPROP = 15 };

/* Below this |a2 - (a2.e1) e1| / |a2| the two axes count as parallel. */
#define OR_PARALLEL_TOL 1e-8

static void or_fail(tc_report *report, const char *text) { ex_fail(report, "orthotropic", text); }

/* The orthonormal material axes as the columns of r (r[i][a] = component i of axis a).
 * Returns 0 after reporting a failure. */
static int or_axes(const tc_real *properties, tc_real r[3][3], tc_report *report)
{
    switch (ma_axes(properties + OR_A1, properties + OR_A2, OR_PARALLEL_TOL * OR_PARALLEL_TOL, r)) {
    case 1:
        or_fail(report, "axis 1 (properties[9..12]) must be a finite nonzero vector");
        return 0;
    case 2:
        or_fail(report, "axis 2 (properties[12..15]) must be nonzero and not parallel to axis 1");
        return 0;
    default:
        return 1;
    }
}

/* The material stiffness in canonical Voigt order, engineering-shear columns: the inverse of
 * the compliance [[1/E1, -nu12/E1, -nu13/E1], [., 1/E2, -nu23/E2], [., ., 1/E3]] (symmetric)
 * with shear diagonal G23, G13, G12. Returns 0 after reporting a failure. */
static int or_material(const tc_real *properties, tc_real c[6][6], tc_report *report)
{
    const int moduli[6] = {OR_E1, OR_E2, OR_E3, OR_G12, OR_G13, OR_G23};
    for (int k = 0; k < 6; ++k) {
        const double x = tc_re(properties[moduli[k]]);
        if (!(x > 0.0 && isfinite(x))) {
            or_fail(report, "E1, E2, E3, G12, G13, G23 (properties[0..3], properties[6..9]) must be positive");
            return 0;
        }
    }
    for (int k = OR_NU12; k <= OR_NU23; ++k) {
        if (!isfinite(tc_re(properties[k]))) {
            or_fail(report, "nu12, nu13, nu23 (properties[3..6]) must be finite");
            return 0;
        }
    }
    const tc_real s11 = 1.0 / properties[OR_E1];
    const tc_real s22 = 1.0 / properties[OR_E2];
    const tc_real s33 = 1.0 / properties[OR_E3];
    const tc_real s12 = -properties[OR_NU12] / properties[OR_E1];
    const tc_real s13 = -properties[OR_NU13] / properties[OR_E1];
    const tc_real s23 = -properties[OR_NU23] / properties[OR_E2];
    /* Cofactors; positive definite when the leading minors are (Sylvester). */
    const tc_real c11 = s22 * s33 - s23 * s23;
    const tc_real c12 = s13 * s23 - s12 * s33;
    const tc_real c13 = s12 * s23 - s13 * s22;
    const tc_real c22 = s11 * s33 - s13 * s13;
    const tc_real c23 = s12 * s13 - s11 * s23;
    const tc_real c33 = s11 * s22 - s12 * s12;
    const tc_real det = s11 * c11 + s12 * c12 + s13 * c13;
    if (!(tc_re(c33) > 0.0 && tc_re(det) > 0.0)) {
        or_fail(report, "the compliance is not positive definite (check the Poisson ratios "
                        "against the moduli)");
        return 0;
    }
    for (int a = 0; a < 6; ++a) {
        for (int b = 0; b < 6; ++b) {
            c[a][b] = 0.0;
        }
    }
    c[0][0] = c11 / det;
    c[1][1] = c22 / det;
    c[2][2] = c33 / det;
    c[0][1] = c[1][0] = c12 / det;
    c[0][2] = c[2][0] = c13 / det;
    c[1][2] = c[2][1] = c23 / det;
    c[3][3] = properties[OR_G23];
    c[4][4] = properties[OR_G13];
    c[5][5] = properties[OR_G12];
    return 1;
}

/* The global stiffness (canonical Voigt order, engineering-shear columns). With I = (i, j),
 * K = (k, l), the Mandel rotation is Q_IK = (w_I / w_K)(R_ik R_jl + [k != l] R_il R_jk), and
 * C^M = Q C'^M Q^T with C^M_IJ = w_I C_IJ w_J. Returns 0 after reporting a failure. */
static int or_global(const tc_real *properties, tc_real c[6][6], tc_report *report)
{
    tc_real cmat[6][6], r[3][3], q[6][6], qc[6][6];
    if (!or_material(properties, cmat, report) || !or_axes(properties, r, report)) {
        return 0;
    }
    ma_rotation(r, q);
    for (int a = 0; a < 6; ++a) {
        for (int b = 0; b < 6; ++b) {
            cmat[a][b] = cmat[a][b] * (ma_weight(a) * ma_weight(b));
        }
    }
    ma_product(q, cmat, 0, qc);
    ma_product(qc, q, 1, c);
    for (int a = 0; a < 6; ++a) {
        for (int b = 0; b < 6; ++b) {
            c[a][b] = c[a][b] / (ma_weight(a) * ma_weight(b));
        }
    }
    return 1;
}

TC_ROUTINE(c_orthotropic)
{
    (void)temperature;
    (void)dstress_dtemp;

    static const int slots6[6] = {0, 1, 2, 3, 4, 5};
    static const int slots4[4] = {0, 1, 2, 5};
    const int n = call->ncomp;
    if (n != 6 && n != 4) {
        or_fail(report, "ncomp must be 6 or 4");
        return;
    }
    if (call->nproperties < OR_NPROP) {
        or_fail(report, "needs 15 properties [E1, E2, E3, nu12, nu13, nu23, G12, G13, G23, a1, a2]");
        return;
    }
    const int *slots = n == 6 ? slots6 : slots4;

    tc_real c[6][6];
    if (!or_global(properties, c, report)) {
        return;
    }

    for (int j = 0; j < n; ++j) {
        for (int i = 0; i < n; ++i) {
            tangent[i + j * n] = c[slots[i]][slots[j]];
        }
    }
    ex_linear_response(call, strain, dstrain, stress0, state0, tangent, stress, state, energy, report);
}
