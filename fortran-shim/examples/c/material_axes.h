/*
 * material_axes.h -- the material frame of the orthotropic examples (orthotropic.c, ply.c): the
 * orthonormal axes from the two axis vectors of the properties (Gram-Schmidt), the Mandel
 * weight of a Voigt slot, the Mandel rotation of the axes and the product of two 6x6 matrices. Include it after tancheck_cstep.h (tc_real is real or complex).
 */
#ifndef MATERIAL_AXES_H
#define MATERIAL_AXES_H

#include <math.h>

/* Mandel weight of a canonical slot (11, 22, 33, 23, 13, 12): 1 normal, sqrt(2) shear. */
static inline double ma_weight(int slot) { return slot < 3 ? 1.0 : sqrt(2.0); }

/*
 * The orthonormal material axes as the columns of r (r[i][a] = component i of axis a): e1 along
 * a1, e2 along the part of a2 normal to e1, e3 = e1 x e2. Returns 0, or 1 when a1 is not a finite
 * nonzero vector (or a2 is not finite), or 2 when a2 is zero or its part normal to a1 has a
 * squared length of at most parallel_tol_sq |a2|^2 (the two axes count as parallel); r is then
 * not written.
 */
static inline int ma_axes(const tc_real *a1, const tc_real *a2, double parallel_tol_sq, tc_real r[3][3])
{
    int finite = 1;
    for (int k = 0; k < 3; ++k) {
        finite = finite && isfinite(tc_re(a1[k])) && isfinite(tc_re(a2[k]));
    }
    const tc_real n1 = a1[0] * a1[0] + a1[1] * a1[1] + a1[2] * a1[2];
    if (!finite || !(tc_re(n1) > 0.0)) {
        return 1;
    }
    const tc_real l1 = tc_sqrt(n1);
    tc_real e1[3], b[3], e2[3];
    for (int k = 0; k < 3; ++k) {
        e1[k] = a1[k] / l1;
    }
    const tc_real p = a2[0] * e1[0] + a2[1] * e1[1] + a2[2] * e1[2];
    for (int k = 0; k < 3; ++k) {
        b[k] = a2[k] - p * e1[k];
    }
    const tc_real nb = b[0] * b[0] + b[1] * b[1] + b[2] * b[2];
    const double n2 = tc_re(a2[0] * a2[0] + a2[1] * a2[1] + a2[2] * a2[2]);
    if (!(tc_re(nb) > 0.0) || tc_re(nb) <= parallel_tol_sq * n2) {
        return 2;
    }
    const tc_real lb = tc_sqrt(nb);
    for (int k = 0; k < 3; ++k) {
        e2[k] = b[k] / lb;
    }
    const tc_real e3[3] = {e1[1] * e2[2] - e1[2] * e2[1], e1[2] * e2[0] - e1[0] * e2[2],
                           e1[0] * e2[1] - e1[1] * e2[0]};
    for (int i = 0; i < 3; ++i) {
        r[i][0] = e1[i];
        r[i][1] = e2[i];
        r[i][2] = e3[i];
    }
    return 0;
}

/* Tensor indices (i, j) of the canonical slots 11, 22, 33, 23, 13, 12. */
static const int ma_pairs[6][2] = {{0, 0}, {1, 1}, {2, 2}, {1, 2}, {0, 2}, {0, 1}};

/* The Mandel rotation of the axes r: with I = (i, j), K = (k, l) the slots' tensor indices,
 * Q_IK = (w_I / w_K)(R_ik R_jl + [k != l] R_il R_jk). */
static inline void ma_rotation(tc_real r[3][3], tc_real q[6][6])
{
    for (int bi = 0; bi < 6; ++bi) {
        const int i = ma_pairs[bi][0], j = ma_pairs[bi][1];
        for (int bk = 0; bk < 6; ++bk) {
            const int k = ma_pairs[bk][0], l = ma_pairs[bk][1];
            tc_real v = r[i][k] * r[j][l];
            if (k != l) {
                v += r[i][l] * r[j][k];
            }
            q[bi][bk] = v * (ma_weight(bi) / ma_weight(bk));
        }
    }
}

/* z = x y, or x y^T when y_transposed; each entry summed in the order of k. z is neither x nor y. */
static inline void ma_product(tc_real x[6][6], tc_real y[6][6], int y_transposed, tc_real z[6][6])
{
    for (int a = 0; a < 6; ++a) {
        for (int b = 0; b < 6; ++b) {
            tc_real s = 0.0;
            for (int k = 0; k < 6; ++k) {
                s += x[a][k] * (y_transposed ? y[b][k] : y[k][b]);
            }
            z[a][b] = s;
        }
    }
}

#endif
