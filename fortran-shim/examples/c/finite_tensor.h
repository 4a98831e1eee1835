/*
 * finite_tensor.h -- the 3x3 tensor helpers of the finite-strain examples finite_j2.c and
 * finite_hypo.c: product, determinant and inverse, in tc_real so that the twin differentiates
 * through them. Include it after tancheck_routine.h (tc_real is real or complex).
 */
#ifndef FINITE_TENSOR_H
#define FINITE_TENSOR_H

typedef tc_real ft_m3[3][3];

/* c = a b */
static inline void ft_mul(const ft_m3 a, const ft_m3 b, ft_m3 c)
{
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) c[i][j] = a[i][0] * b[0][j] + a[i][1] * b[1][j] + a[i][2] * b[2][j];
}

static inline tc_real ft_det(const ft_m3 a)
{
    return a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1]) - a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0]) +
           a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0]);
}

/* r = a^-1 by cofactors */
static inline void ft_inverse(const ft_m3 a, ft_m3 r)
{
    tc_real d = ft_det(a);
    r[0][0] = (a[1][1] * a[2][2] - a[1][2] * a[2][1]) / d;
    r[0][1] = -(a[0][1] * a[2][2] - a[0][2] * a[2][1]) / d;
    r[0][2] = (a[0][1] * a[1][2] - a[0][2] * a[1][1]) / d;
    r[1][0] = -(a[1][0] * a[2][2] - a[1][2] * a[2][0]) / d;
    r[1][1] = (a[0][0] * a[2][2] - a[0][2] * a[2][0]) / d;
    r[1][2] = -(a[0][0] * a[1][2] - a[0][2] * a[1][0]) / d;
    r[2][0] = (a[1][0] * a[2][1] - a[1][1] * a[2][0]) / d;
    r[2][1] = -(a[0][0] * a[2][1] - a[0][1] * a[2][0]) / d;
    r[2][2] = (a[0][0] * a[1][1] - a[0][1] * a[1][0]) / d;
}

#endif
