/*
 * thermo.c -- thermo-elasticity with temperature-dependent modulus, Poisson's ratio and
 * thermal strain, the reference routines "thermo" and "thermo-dtemp-sign" in C.
 *
 *   c_thermo             the correct routine: stress, tangent and d stress / d temperature
 *   c_thermo_partial_dtemp  the same update with d stress / d temperature missing its
 *                        thermal-expansion term (deliberately flawed)
 *   c_thermo_dtemp_sign  the same update returning -d stress / d temperature: a deliberately
 *                        wrong temperature derivative, for tancheck to find (the tangent is
 *                        right; d stress / dT is off by a relative 2 wherever it is not zero)
 *   c_thermo_start_temperature  the same update with its tangent C(T) taken at the temperature of the
 *                        start of the increment (deliberately flawed)
 *
 * Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12), 4 (plane strain
 * or axisymmetric: 11, 22, 33, 12), 3 (plane stress: 11, 22, 12) or 1 (uniaxial), engineering
 * shear strain. Temperatures in degrees C; 20 C is the reference of every law.
 *   properties [E20, nu0, nu1, modulus_law, expansion_law, alpha, (T_1, k_1, T_2, k_2, ...)]:
 *     E(T) = E20 k(T), k: law 0 none (k = 1), 1 EN 1993-1-2 Table 3.1 (carbon steel k_E),
 *       2 the table of (T_i, k_i) points after properties[5] (at least 2, T increasing, k >= 0);
 *     nu(T) = nu0 + nu1 (T - 20), which must stay in (-1, 0.5);
 *     eps_th(T): law 0 alpha (T - 20), 1 EN 1993-1-2 section 3.4.1.1 (carbon steel).
 *   No state; state entries, if the caller passes any, are carried through unchanged.
 * Total form at the end temperature T = temperature->start + temperature->increment:
 *   sigma = C(T) (strain + dstrain - eps_th(T) 1), 1 = ones on the normal components;
 *   tangent C(T); dstress_dtemp = C'(T) (eps - eps_th 1) - C(T) 1 eps_th'(T);
 *   energy: stored 1/2 sigma . (eps - eps_th 1), dissipated 0. Branch 0.
 * Tables are linear between points and held at their end values outside; the EN elongation
 * uses its first range below 750 C, 1.1e-2 on [750, 860), the third range from 860 C. At a
 * point or boundary the segment on its right is used: d stress / dT is the right derivative.
 *
 * Complex-step safety (Martins, Sturdza & Alonso 2003): every segment test looks at the real
 * part of the temperature only; nothing conjugates.
 *
 * Build: cc -I fortran-shim/include -c thermo.c               exports c_thermo, c_thermo_dtemp_sign
 *        cc -I fortran-shim/include -DTC_COMPLEX -c thermo.c  exports the same with _cx
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

/* Property indices. */
enum { TH_E20, TH_NU0, TH_NU1, TH_MODULUS_LAW, TH_EXPANSION_LAW, TH_ALPHA, TH_NFIXED };

/* Reference temperature of every law (degrees C). */
#define TH_T_REF 20.0

/* EN 1993-1-2:2005 Table 3.1, carbon steel: (theta, k_E,theta). */
#define TH_EN_ROWS 13
static const double th_en_table[TH_EN_ROWS][2] = {
    {20.0, 1.0},    {100.0, 1.0},   {200.0, 0.9},    {300.0, 0.8},    {400.0, 0.7},
    {500.0, 0.6},   {600.0, 0.31},  {700.0, 0.13},   {800.0, 0.09},   {900.0, 0.0675},
    {1000.0, 0.045}, {1100.0, 0.0225}, {1200.0, 0.0},
};

static void th_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    /* "<model>: <text>" into the report's message, cut to fit and NUL-terminated. */
    const char *parts[2] = {"thermo: ", text};
    int k = 0;
    for (int p = 0; p < 2; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/* Piecewise-linear interpolation of npts points (x_i, y_i) = (pts[2i], pts[2i+1]) at t, held
 * at the end values outside: value and slope, the slope on the segment right of t. */
static void th_interpolate(tc_real t, int npts, const tc_real *pts, tc_real *value, tc_real *slope)
{
    const double x = tc_re(t);
    if (x < tc_re(pts[0])) {
        *value = pts[1];
        *slope = 0.0;
        return;
    }
    for (int i = 1; i < npts; ++i) {
        if (x < tc_re(pts[2 * i])) {
            const tc_real s = (pts[2 * i + 1] - pts[2 * i - 1]) / (pts[2 * i] - pts[2 * i - 2]);
            *value = pts[2 * i - 1] + s * (t - pts[2 * i - 2]);
            *slope = s;
            return;
        }
    }
    *value = pts[2 * npts - 1];
    *slope = 0.0;
}

/* EN 1993-1-2 section 3.4.1.1, carbon steel: 1.2e-5 T + 0.4e-8 T^2 - 2.416e-4 below 750 C,
 * 1.1e-2 on [750, 860), 2e-5 T - 6.2e-3 from 860 C. */
static void th_en_elongation(tc_real t, tc_real *eps, tc_real *deps)
{
    const double x = tc_re(t);
    if (x < 750.0) {
        *eps = 1.2e-5 * t + 0.4e-8 * t * t - 2.416e-4;
        *deps = 0.8e-8 * t + 1.2e-5;
    } else if (x < 860.0) {
        *eps = 1.1e-2;
        *deps = 0.0;
    } else {
        *eps = 2e-5 * t - 6.2e-3;
        *deps = 2e-5;
    }
}

/* A law code held as a real: 0, 1, ..., max; -1 otherwise. */
static int th_law(tc_real x, int max)
{
    for (int c = 0; c <= max; ++c) {
        if (tc_re(x) == (double)c) {
            return c;
        }
    }
    return -1;
}

/* The elastic matrix per unit modulus, c = C / E, and dc / dnu, column-major n x n, engineering
 * shear columns. 3D and the 4-component kinds: lambda^ = nu / ((1 + nu)(1 - 2 nu)),
 * mu^ = 1 / (2 (1 + nu)); plane stress: 1 / (1 - nu^2) [[1, nu, 0], [nu, 1, 0], [0, 0, (1-nu)/2]]
 * (Hughes 2000, The Finite Element Method, ch. 2); uniaxial: 1. */
static void th_unit_matrix(int n, tc_real nu, tc_real *c, tc_real *dc)
{
    for (int k = 0; k < n * n; ++k) {
        c[k] = 0.0;
        dc[k] = 0.0;
    }
    if (n == 1) {
        c[0] = 1.0;
        return;
    }
    const tc_real one_p = 1.0 + nu;
    const tc_real mu = 1.0 / (2.0 * one_p);
    const tc_real dmu = -1.0 / (2.0 * one_p * one_p);
    if (n == 3) {
        const tc_real q = 1.0 - nu * nu;
        const tc_real f = 1.0 / q;
        const tc_real df = 2.0 * nu / (q * q);
        const tc_real dfnu = (1.0 + nu * nu) / (q * q);
        c[0 + 0 * 3] = f;
        c[1 + 1 * 3] = f;
        c[0 + 1 * 3] = f * nu;
        c[1 + 0 * 3] = f * nu;
        c[2 + 2 * 3] = mu;
        dc[0 + 0 * 3] = df;
        dc[1 + 1 * 3] = df;
        dc[0 + 1 * 3] = dfnu;
        dc[1 + 0 * 3] = dfnu;
        dc[2 + 2 * 3] = dmu;
        return;
    }
    /* d lambda^ / d nu = (1 + 2 nu^2) / ((1 + nu)^2 (1 - 2 nu)^2). */
    const tc_real one_m2 = 1.0 - 2.0 * nu;
    const tc_real lambda = nu / (one_p * one_m2);
    const tc_real dlambda = (1.0 + 2.0 * nu * nu) / (one_p * one_p * one_m2 * one_m2);
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            c[i + j * n] = lambda;
            dc[i + j * n] = dlambda;
        }
        c[i + i * n] = lambda + 2.0 * mu;
        dc[i + i * n] = dlambda + 2.0 * dmu;
    }
    for (int i = 3; i < n; ++i) {
        c[i + i * n] = mu;
        dc[i + i * n] = dmu;
    }
}

static void th_update(const tc_call *call, const tc_real *properties, const tc_real *strain,
                      const tc_real *dstrain, const tc_temperature *temperature, const tc_real *state0,
                      tc_real *stress, tc_real *state, tc_real *tangent, tc_real *dstress_dtemp,
                      tc_energy *energy, tc_report *report, double sign,
                      double expansion)
{
    const int n = call->ncomp;
    if (n != 6 && n != 4 && n != 3 && n != 1) {
        th_fail(report, "ncomp must be 6, 4, 3 or 1");
        return;
    }
    if (call->nproperties < TH_NFIXED) {
        th_fail(report, "needs 6 properties [E20, nu0, nu1, modulus_law, expansion_law, alpha]");
        return;
    }
    const tc_real e20 = properties[TH_E20];
    const tc_real nu0 = properties[TH_NU0];
    const tc_real nu1 = properties[TH_NU1];
    if (!(tc_re(e20) > 0.0)) {
        th_fail(report, "E20 (properties[0]) must be positive");
        return;
    }
    if (!(isfinite(tc_re(nu0)) && isfinite(tc_re(nu1)))) {
        th_fail(report, "nu0, nu1 (properties[1], properties[2]) must be finite");
        return;
    }
    const int modulus_law = th_law(properties[TH_MODULUS_LAW], 2);
    if (modulus_law < 0) {
        th_fail(report, "modulus_law (properties[3]) must be 0, 1 or 2");
        return;
    }
    const int expansion_law = th_law(properties[TH_EXPANSION_LAW], 1);
    if (expansion_law < 0) {
        th_fail(report, "expansion_law (properties[4]) must be 0 or 1");
        return;
    }
    if (!isfinite(tc_re(properties[TH_ALPHA]))) {
        th_fail(report, "alpha (properties[5]) must be finite");
        return;
    }
    const int ntab = call->nproperties - TH_NFIXED;
    const tc_real *table = properties + TH_NFIXED;
    if (modulus_law == 2) {
        if (ntab < 4 || ntab % 2 != 0) {
            th_fail(report, "modulus_law 2 needs at least 2 (T, k) points after properties[5]");
            return;
        }
        for (int i = 0; i < ntab / 2; ++i) {
            const double t = tc_re(table[2 * i]);
            const double k = tc_re(table[2 * i + 1]);
            if (!(isfinite(t) && k >= 0.0 && isfinite(k))) {
                th_fail(report, "table points need finite T and finite k >= 0");
                return;
            }
            if (i > 0 && !(t > tc_re(table[2 * i - 2]))) {
                th_fail(report, "table temperatures must increase strictly");
                return;
            }
        }
    }

    const tc_real t = temperature->start + temperature->increment;
    if (!isfinite(tc_re(t))) {
        th_fail(report, "temperature must be finite");
        return;
    }
    /* E(T) = E20 k(T). */
    tc_real k = 1.0;
    tc_real dk = 0.0;
    if (modulus_law == 1) {
        tc_real en[2 * TH_EN_ROWS];
        for (int i = 0; i < TH_EN_ROWS; ++i) {
            en[2 * i] = th_en_table[i][0];
            en[2 * i + 1] = th_en_table[i][1];
        }
        th_interpolate(t, TH_EN_ROWS, en, &k, &dk);
    } else if (modulus_law == 2) {
        th_interpolate(t, ntab / 2, table, &k, &dk);
    }
    const tc_real e = e20 * k;
    const tc_real de = e20 * dk;
    /* nu(T) = nu0 + nu1 (T - 20). */
    const tc_real nu = nu0 + nu1 * (t - TH_T_REF);
    if (!(tc_re(nu) > -1.0 && tc_re(nu) < 0.5)) {
        th_fail(report, "nu(T) = nu0 + nu1 (T - 20) must lie in (-1, 0.5)");
        return;
    }
    /* eps_th(T). */
    tc_real eps_th;
    tc_real deps_th;
    if (expansion_law == 0) {
        eps_th = properties[TH_ALPHA] * (t - TH_T_REF);
        deps_th = properties[TH_ALPHA];
    } else {
        th_en_elongation(t, &eps_th, &deps_th);
    }

    tc_real c[36];
    tc_real dc[36];
    th_unit_matrix(n, nu, c, dc);
    /* Normal components carrying the thermal strain. */
    const int nn = n == 3 ? 2 : (n == 1 ? 1 : 3);
    tc_real eps_e[6];
    for (int i = 0; i < n; ++i) {
        eps_e[i] = strain[i] + dstrain[i] - (i < nn ? eps_th : 0.0);
    }

    /* sigma = E c eps_e; d sigma / dT = (E' c + E c' nu') eps_e - E c 1 eps_th'. */
    tc_real stored = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = 0.0;
        tc_real ds = 0.0;
        tc_real c_one = 0.0;
        for (int j = 0; j < n; ++j) {
            s += c[i + j * n] * eps_e[j];
            ds += (c[i + j * n] * de + dc[i + j * n] * (e * nu1)) * eps_e[j];
            if (j < nn) {
                c_one += c[i + j * n];
            }
        }
        s = s * e;
        stress[i] = s;
        dstress_dtemp[i] = sign * (ds - expansion * c_one * e * deps_th);
        stored += s * eps_e[i];
        for (int j = 0; j < n; ++j) {
            tangent[i + j * n] = c[i + j * n] * e;
        }
    }
    for (int i = 0; i < call->nstate; ++i) {
        state[i] = state0[i];
    }
    energy->stored = 0.5 * stored;
    energy->dissipated = 0.0;
    report->provides = TC_PROVIDES_DSTRESS_DTEMP | TC_PROVIDES_ENERGY;
    report->branch = 0;
    report->status = TC_STATUS_OK;
}

TC_ROUTINE(c_thermo)
{
    (void)stress0;
    th_update(call, properties, strain, dstrain, temperature, state0, stress, state, tangent, dstress_dtemp,
              energy, report, 1.0, 1.0);
}

TC_ROUTINE(c_thermo_dtemp_sign)
{
    (void)stress0;
    th_update(call, properties, strain, dstrain, temperature, state0, stress, state, tangent, dstress_dtemp,
              energy, report, -1.0, 1.0);
}

/* A deliberately flawed routine: d stress / d temperature without its thermal-expansion term
 * (-C:1 eps_th'), the stiffness term kept. */
TC_ROUTINE(c_thermo_partial_dtemp)
{
    (void)stress0;
    th_update(call, properties, strain, dstrain, temperature, state0, stress, state, tangent, dstress_dtemp,
              energy, report, 1.0, 0.0);
}

/* A deliberately flawed routine: the tangent C(T) at the temperature of the start of the
 * increment, where the stress uses the end one (the update made a second time with the
 * temperature increment left out, for its tangent alone). */
TC_ROUTINE(c_thermo_start_temperature)
{
    (void)stress0;
    const int n = call->ncomp;
    tc_temperature at_start = {temperature->start, 0.0};
    tc_real s0[6], ds0[6], tan0[36];
    tc_energy en0 = *energy;
    tc_report r0 = *report;
    th_update(call, properties, strain, dstrain, &at_start, state0, s0, state, tan0, ds0, &en0, &r0, 1.0,
              1.0);
    th_update(call, properties, strain, dstrain, temperature, state0, stress, state, tangent, dstress_dtemp,
              energy, report, 1.0, 1.0);
    if (report->status == TC_STATUS_OK && r0.status == TC_STATUS_OK && n >= 1 && n <= 6) {
        for (int k = 0; k < n * n; ++k) {
            tangent[k] = tan0[k];
        }
    }
}
