/*
 * tancheck_cstep.h -- complex-step-safe scalar helpers for material routines in C.
 *
 * Include after tancheck_routine.h. Every helper takes and returns tc_real, so the same
 * routine source compiles as the ordinary routine (tc_real = double) and as its complex-step
 * twin (TC_COMPLEX defined, tc_real = double _Complex).
 *
 * The complex-step derivative (Squire & Trapp 1998; Martins, Sturdza & Alonso 2003, ACM TOMS
 * 29(3)) evaluates f(x + ih) with a tiny real h and reads df/dx = Im f / h. That is exact to
 * rounding only if every operation is the analytic continuation of its real counterpart.
 * The rules, after Martins, Sturdza & Alonso (2003):
 *
 *   - branch and compare on real parts only (tc_re), never on |z|;
 *   - abs, max, min, sign decide on the real part and return the whole number, so the
 *     imaginary part follows the chosen branch;
 *   - no conjugation anywhere: a norm is tc_sqrt(sum x_i*x_i), never cabs() or x*conj(x);
 *   - the elementary functions use their first-order forms
 *         f(a + ib) = f(a) + i f'(a) b,
 *     which is what the complex step needs and is exact for tiny b.
 *
 * The usual culprits of a twin that is not complex-step safe (tancheck reports it as its own
 * finding, exit 4, when the real differences agree with the returned tangent and the
 * complex step does not):
 *   - conjugating functions: conj(), or a norm as x*conj(x) or cabs(x)^2;
 *   - complex abs: cabs() / fabs of a complex value (the modulus, not the signed real part);
 *   - real-only sqrt / fabs / exp: a libm function of double applied to tc_real, or
 *     sqrt(creal(x)), which keeps the value and drops the derivative;
 *   - comparisons of complex values (a == b, or any test not on tc_re).
 *
 * Pitfall in C: passing a tc_real to a libm function of double (fabs, sqrt, exp, ...) is
 * accepted silently and drops the imaginary part. Use these helpers instead; compiling the
 * twin with -Wconversion catches the mistake (a diagnostic about the discarded imaginary part).
 *
 * Also note that <complex.h>, included by tancheck_routine.h in the twin, defines the macros
 * `I` and `complex`: do not use them as identifiers.
 */
#ifndef TANCHECK_CSTEP_H
#define TANCHECK_CSTEP_H

#include <math.h>

#include "tancheck_routine.h"

#ifdef TC_COMPLEX

/* The complex number re + i im, built without arithmetic (re + im*I would turn an infinite
 * re into NaN). */
static inline tc_real tc_cx_make(double re, double im)
{
#ifdef CMPLX
    return CMPLX(re, im);
#else
    union {
        double _Complex z;
        double part[2];
    } u;
    u.part[0] = re;
    u.part[1] = im;
    return u.z;
#endif
}

/* Real part: the value without its derivative part. */
static inline double tc_re(tc_real x) { return creal(x); }

/* Imaginary part: the derivative part (times the step) in the twin. */
static inline double tc_im(tc_real x) { return cimag(x); }

#else /* !TC_COMPLEX */

static inline double tc_re(tc_real x) { return x; }

static inline double tc_im(tc_real x)
{
    (void)x;
    return 0.0;
}

#endif /* TC_COMPLEX */

/* A constant as tc_real. */
static inline tc_real tc_cst(double x) { return (tc_real)x; }

/* |x| decided on the real part: -x when Re x < 0, else x (no modulus, no conjugate). */
static inline tc_real tc_abs(tc_real x) { return tc_re(x) < 0.0 ? -x : x; }

/* Larger of two by real part; the first when the real parts are equal. */
static inline tc_real tc_max(tc_real x, tc_real y) { return tc_re(x) >= tc_re(y) ? x : y; }

/* Smaller of two by real part; the first when the real parts are equal. */
static inline tc_real tc_min(tc_real x, tc_real y) { return tc_re(x) <= tc_re(y) ? x : y; }

/* tc_abs(a) with the sign of Re b: negative when Re b < 0, else positive (a zero of either
 * sign counts as positive). */
static inline tc_real tc_sign(tc_real a, tc_real b)
{
    tc_real m = tc_abs(a);
    return tc_re(b) < 0.0 ? -m : m;
}

/*
 * Square root, guarded: exactly 0 (also 0 derivative part) when Re x <= 0, where the
 * derivative of sqrt is unbounded. Meant for norms, where a zero argument is a zero norm.
 * Twin: sqrt(a + ib) = sqrt(a) + i b / (2 sqrt(a))   (Martins, Sturdza & Alonso 2003).
 */
static inline tc_real tc_sqrt(tc_real x)
{
    double a = tc_re(x);
    if (a <= 0.0) {
        return tc_cst(0.0);
    }
#ifdef TC_COMPLEX
    double r = sqrt(a);
    return tc_cx_make(r, tc_im(x) / (2.0 * r));
#else
    return sqrt(a);
#endif
}

/* Exponential. Twin: exp(a + ib) = e^a + i e^a b   (Martins, Sturdza & Alonso 2003). */
static inline tc_real tc_exp(tc_real x)
{
    double e = exp(tc_re(x));
#ifdef TC_COMPLEX
    return tc_cx_make(e, e * tc_im(x));
#else
    return e;
#endif
}

/* Natural logarithm (Re x > 0). Twin: log(a + ib) = log a + i b / a
 * (Martins, Sturdza & Alonso 2003). */
static inline tc_real tc_log(tc_real x)
{
    double a = tc_re(x);
#ifdef TC_COMPLEX
    return tc_cx_make(log(a), tc_im(x) / a);
#else
    return log(a);
#endif
}

/* x raised to the real power p. Twin: (a + ib)^p = a^p + i p a^(p-1) b
 * (Martins, Sturdza & Alonso 2003). For p = 0 the derivative is 0, also at a = 0 (where
 * p a^(p-1) would be 0 times infinity); the real build's pow(0, 0) is 1. With b = 0 (a value
 * with no derivative part, such as a start state) the derivative part is 0, also at a = 0 for
 * p < 1 (0^n at zero plastic strain in a hardening law: 0 times infinity gave NaN, and a
 * complex factor times it a NaN real part). */
static inline tc_real tc_pow(tc_real x, double p)
{
    double a = tc_re(x);
#ifdef TC_COMPLEX
    const double b = tc_im(x);
    return tc_cx_make(pow(a, p), p == 0.0 || b == 0.0 ? 0.0 : p * pow(a, p - 1.0) * b);
#else
    return pow(a, p);
#endif
}

#endif /* TANCHECK_CSTEP_H */
