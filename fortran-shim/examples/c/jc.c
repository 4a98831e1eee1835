/*
 * jc.c -- Johnson-Cook plasticity as a point routine, the reference routines "johnson-cook"
 * and "johnson-cook-no-rate-term" in C: small-strain J2 radial return (the trial state and
 * tangent of j2.c, without back stress) with the flow stress of Johnson & Cook (1983), Proc.
 * 7th Int. Symp. Ballistics, 541-547,
 *   sigma_y = [A + B ep^n] [1 + C ln rate*] [1 - T*^m],  T* = (T - T_r) / (T_m - T_r),
 * and the damage indicator of Johnson & Cook (1985), Eng. Fract. Mech. 21(1):31-48,
 *   D += d(ep) / eps_f,  eps_f = [D1 + D2 exp(D3 s*)] [1 + D4 ln rate*] [1 + D5 T*].
 *
 *   c_jc                    the consistent tangent, rate term included
 *   c_jc_no_rate_term    the same update with the tangent missing the rate term: a
 *                           deliberately wrong Jacobian, for tancheck to find
 *
 * Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
 * (11, 22, 33, 12), engineering shear strain.
 *   properties [E, nu, A, B, n, C, m, T_room, T_melt, rate0, density, heat_capacity,
 *               taylor_quinney, D1, D2, D3, D4, D5] (18);
 *   state [eps_p (ncomp, engineering shear), ep, D, dT_heat] (ncomp + 3); entries past these
 *     are carried through unchanged.
 * The model, its guards (rate floor rate* >= 1, bracketed Newton so the unbounded slope at
 * ep = 0 is never evaluated, dt <= 0 with C > 0 -> elastic, T* <= 0 -> no softening,
 * T* >= 1 fails, adiabatic heating within the step, damage without effect on the stress) and its tangent are those of the Rust model,
 * crates/tancheck-models/src/johnson_cook.rs, which documents each choice.
 * Branch 0 elastic, 1 plastic. Provides dstress_dtemp; no energies.
 *
 * Complex-step safety (Martins, Sturdza & Alonso 2003): every test looks at real parts only,
 * the norm is sqrt(sum x_i^2) without conjugation, and the last iteration of the return map
 * is a Newton correction of the derivative (imaginary) part only.
 *
 * Build: cc -I fortran-shim/include -c jc.c               exports c_jc, c_jc_no_rate_term
 *        cc -I fortran-shim/include -DTC_COMPLEX -c jc.c  exports c_jc_cx,
 *                                                          c_jc_no_rate_term_cx
 */
#include <math.h>

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

/* Property indices. */
enum {
    JC_E, JC_NU, JC_A, JC_B, JC_N, JC_C, JC_M, JC_T_ROOM, JC_T_MELT, JC_RATE0, JC_DENSITY,
    JC_HEAT_CAPACITY, JC_TAYLOR_QUINNEY, JC_D1, JC_D2, JC_D3, JC_D4, JC_D5, JC_NPROP
};

/* Return-map iteration limit and tolerance (relative to the plastic multiplier). */
#define JC_MAX_ITER 200
#define JC_STEP_TOL 1e-14
/* Lower bound of the fracture strain. */
#define JC_MIN_FRACTURE_STRAIN 1e-6

typedef struct {
    tc_real stress, d_strain, d_rate, d_temp;
} jc_flow;

static void jc_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    const char *parts[2] = {"johnson-cook: ", text};
    int k = 0;
    for (int p = 0; p < 2; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/* The flow stress and its slopes; 0 when T* >= 1 (melted). The strain slope only for ep > 0. */
static int jc_flow_at(const tc_real *p, tc_real ep, tc_real rate_star, tc_real temp, jc_flow *f)
{
    tc_real hard = p[JC_A], d_hard = 0.0;
    if (tc_re(ep) > 0.0) {
        const tc_real pw = tc_exp(tc_log(ep) * p[JC_N]);
        hard = p[JC_A] + p[JC_B] * pw;
        d_hard = p[JC_B] * p[JC_N] * pw / ep;
    }
    tc_real rate = 1.0, d_rate = 0.0;
    if (tc_re(rate_star) > 1.0) {
        rate = 1.0 + p[JC_C] * tc_log(rate_star);
        d_rate = p[JC_C] / rate_star;
    }
    const tc_real range = p[JC_T_MELT] - p[JC_T_ROOM];
    const tc_real ts = (temp - p[JC_T_ROOM]) / range;
    if (tc_re(ts) >= 1.0) {
        return 0;
    }
    tc_real therm = 1.0, d_therm = 0.0;
    if (tc_re(ts) > 0.0) {
        const tc_real tm = tc_exp(tc_log(ts) * p[JC_M]);
        therm = 1.0 - tm;
        d_therm = -p[JC_M] * tm / ts / range;
    }
    f->stress = hard * rate * therm;
    f->d_strain = d_hard * rate * therm;
    f->d_rate = hard * d_rate * therm;
    f->d_temp = hard * rate * d_therm;
    return 1;
}

static tc_real jc_fracture_strain(const tc_real *p, tc_real triax, tc_real rate_star, tc_real temp)
{
    tc_real ef = p[JC_D1] + p[JC_D2] * tc_exp(p[JC_D3] * triax);
    if (tc_re(rate_star) > 1.0) {
        ef *= 1.0 + p[JC_D4] * tc_log(rate_star);
    }
    const tc_real ts = (temp - p[JC_T_ROOM]) / (p[JC_T_MELT] - p[JC_T_ROOM]);
    if (tc_re(ts) > 0.0) {
        ef *= 1.0 + p[JC_D5] * ts;
    }
    return tc_max(ef, JC_MIN_FRACTURE_STRAIN);
}

/* The flow stress at the end of a plastic step d(ep) = da from ep_n, heated within the step
 * (as heated_step in crates/tancheck-models/src/johnson_cook.rs): dT = h sigma_y(T_s) da,
 * sigma_y(T_s + dT); its total slope d/d(da), the rate part of that slope, d/dT_s and dT.
 * 0 when either temperature is at or above T_m. */
typedef struct {
    tc_real stress, slope, rate_slope, d_temp0, heat;
} jc_step;

static int jc_heated_step(const tc_real *p, tc_real h, tc_real ep_n, tc_real da,
                          tc_real rate_per_a, tc_real t_start, jc_step *st)
{
    const tc_real ep = ep_n + da;
    const tc_real rate = rate_per_a * da;
    jc_flow fs, fe;
    if (!jc_flow_at(p, ep, rate, t_start, &fs)) return 0;
    if (tc_re(h) == 0.0) {
        st->stress = fs.stress;
        st->rate_slope = fs.d_rate * rate_per_a;
        st->slope = fs.d_strain + st->rate_slope;
        st->d_temp0 = fs.d_temp;
        st->heat = 0.0;
        return 1;
    }
    const tc_real heat = h * fs.stress * da;
    if (!jc_flow_at(p, ep, rate, t_start + heat, &fe)) return 0;
    const tc_real d_heat = h * ((fs.d_strain + fs.d_rate * rate_per_a) * da + fs.stress);
    st->stress = fe.stress;
    st->slope = fe.d_strain + fe.d_rate * rate_per_a + fe.d_temp * d_heat;
    st->rate_slope = fe.d_rate * rate_per_a + fe.d_temp * h * fs.d_rate * rate_per_a * da;
    st->d_temp0 = fe.d_temp * (1.0 + h * fs.d_temp * da);
    st->heat = heat;
    return 1;
}

static const char *jc_check_props(const tc_real *p)
{
    if (!(tc_re(p[JC_E]) > 0.0)) return "E (properties[0]) must be positive";
    if (!(tc_re(p[JC_NU]) > -1.0 && tc_re(p[JC_NU]) < 0.5)) return "nu (properties[1]) must lie in (-1, 0.5)";
    if (!(tc_re(p[JC_A]) > 0.0)) return "A (properties[2]) must be positive";
    if (!(tc_re(p[JC_B]) >= 0.0 && tc_re(p[JC_N]) > 0.0 && tc_re(p[JC_N]) <= 1.0))
        return "B (properties[3]) must be >= 0 and n (properties[4]) in (0, 1]";
    if (!(tc_re(p[JC_C]) >= 0.0 && isfinite(tc_re(p[JC_C])) && tc_re(p[JC_M]) > 0.0 &&
          isfinite(tc_re(p[JC_M]))))
        return "C (properties[5]) must be >= 0 and m (properties[6]) positive";
    if (!(isfinite(tc_re(p[JC_T_ROOM])) && isfinite(tc_re(p[JC_T_MELT])) &&
          tc_re(p[JC_T_MELT]) > tc_re(p[JC_T_ROOM])))
        return "T_melt (properties[8]) must exceed T_room (properties[7])";
    if (!(tc_re(p[JC_RATE0]) > 0.0 && isfinite(tc_re(p[JC_RATE0]))))
        return "rate0 (properties[9]) must be positive";
    const double chi = tc_re(p[JC_TAYLOR_QUINNEY]);
    if (!(chi >= 0.0 && chi <= 1.0)) return "taylor_quinney (properties[12]) must lie in [0, 1]";
    if (chi > 0.0 && !(tc_re(p[JC_DENSITY]) > 0.0 && tc_re(p[JC_HEAT_CAPACITY]) > 0.0 &&
                       isfinite(tc_re(p[JC_DENSITY] * p[JC_HEAT_CAPACITY]))))
        return "density, heat_capacity (properties[10..12]) must be > 0 when taylor_quinney > 0";
    for (int k = JC_D1; k <= JC_D5; ++k) {
        if (!isfinite(tc_re(p[k]))) return "D1..D5 (properties[13..18]) must be finite";
    }
    return 0;
}

static void jc_update(const tc_call *call, const tc_real *p, const tc_real *strain,
                      const tc_real *dstrain, const tc_temperature *temperature, const tc_real *state0,
                      tc_real *stress, tc_real *state, tc_real *tangent, tc_real *dstress_dtemp,
                      tc_energy *energy, tc_report *report, int with_rate_term)
{
    const int n = call->ncomp;
    if (n != 6 && n != 4) {
        jc_fail(report, "ncomp must be 6 or 4");
        return;
    }
    if (call->nproperties < JC_NPROP) {
        jc_fail(report, "needs 18 properties (DEVELOPERS.md, Reference models)");
        return;
    }
    if (call->nstate < n + 3) {
        jc_fail(report, "needs ncomp+3 state variables [eps_p, ep, D, dT_heat]");
        return;
    }
    const char *bad = jc_check_props(p);
    if (bad) {
        jc_fail(report, bad);
        return;
    }
    const double r23 = sqrt(2.0 / 3.0);
    const tc_real nu = p[JC_NU];
    const tc_real lambda = p[JC_E] * nu / ((nu + 1.0) * (1.0 - nu * 2.0));
    const tc_real mu = p[JC_E] / ((nu + 1.0) * 2.0);
    const tc_real two_mu = mu * 2.0;
    const tc_real kappa = lambda + mu * (2.0 / 3.0);
    const tc_real ep_n = state0[n], damage_n = state0[n + 1], heat_n = state0[n + 2];
    if (!(tc_re(ep_n) >= 0.0 && isfinite(tc_re(ep_n)))) {
        jc_fail(report, "the equivalent plastic strain of the start state is negative");
        return;
    }
    const tc_real t = temperature->start + temperature->increment + heat_n;
    jc_flow f0;
    if (!jc_flow_at(p, ep_n, 1.0, t, &f0)) {
        jc_fail(report, "the temperature is at or above T_melt");
        return;
    }

    /* Trial state (as j2.c, no back stress). */
    tc_real eps_e[6];
    for (int i = 0; i < n; ++i) {
        eps_e[i] = strain[i] + dstrain[i] - state0[i];
        if (i >= 3) eps_e[i] = 0.5 * eps_e[i];
    }
    const tc_real trace = eps_e[0] + eps_e[1] + eps_e[2];
    tc_real sigma_tr[6], xi[6];
    tc_real norm2 = 0.0;
    for (int i = 0; i < n; ++i) {
        sigma_tr[i] = eps_e[i] * two_mu + (i < 3 ? lambda * trace : 0.0);
    }
    const tc_real tr3 = (sigma_tr[0] + sigma_tr[1] + sigma_tr[2]) / 3.0;
    for (int i = 0; i < n; ++i) {
        xi[i] = i < 3 ? sigma_tr[i] - tr3 : sigma_tr[i];
        norm2 += (i < 3 ? 1.0 : 2.0) * xi[i] * xi[i];
    }
    const tc_real norm = tc_sqrt(norm2);
    const tc_real f_trial = norm - f0.stress * r23;

    tc_real n_dir[6] = {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
    tc_real theta = 1.0, theta_bar = 0.0;
    for (int k = n + 3; k < call->nstate; ++k) state[k] = state0[k];
    for (int i = 0; i < n; ++i) dstress_dtemp[i] = 0.0;

    /* No plastic flow in no time when the flow stress depends on the rate (dt <= 0, C > 0). */
    const double dt = call->dtime;
    const int no_time = dt <= 0.0 && tc_re(p[JC_C]) > 0.0;
    if (tc_re(f_trial) <= 0.0 || no_time) {
        for (int i = 0; i < n; ++i) stress[i] = sigma_tr[i];
        for (int k = 0; k < n + 3; ++k) state[k] = state0[k];
        report->branch = 0;
    } else {
        /* rate* = d(ep) / (dt rate0) = rate_per_a d(ep) (dt > 0 here, or C = 0). */
        const tc_real rate_per_a = dt > 0.0 ? 1.0 / (p[JC_RATE0] * dt) : 0.0;
        const tc_real h = tc_re(p[JC_TAYLOR_QUINNEY]) > 0.0
                              ? p[JC_TAYLOR_QUINNEY] / (p[JC_DENSITY] * p[JC_HEAT_CAPACITY])
                              : 0.0;
        /* Bracketed Newton on g(dg) = |xi_tr| - 2 mu dg - sqrt(2/3) sigma_y in (0, f_tr/(2mu)]
         * (as radial_return in crates/tancheck-models/src/j2.rs). */
        double lo = 0.0, hi = tc_re(f_trial / two_mu);
        tc_real dg = f_trial / two_mu;
        int iter = 0, extra = 0, done = 0;
        jc_step st;
        while (iter < JC_MAX_ITER || extra) {
            tc_real r = NAN, dr = NAN;
            if (jc_heated_step(p, h, ep_n, dg * r23, rate_per_a, t, &st)) {
                r = st.stress * r23;
                dr = st.slope * (2.0 / 3.0);
            }
            const tc_real g = norm - two_mu * dg - r;
            const tc_real slope = -two_mu - dr;
            tc_real step = -g / slope;
            ++iter;
            if (extra) {
                dg = dg + (step - tc_re(step)); /* the derivative part only */
                done = 1;
                break;
            }
            int newton = 1;
            if (tc_re(g) > 0.0) lo = tc_re(dg); else hi = tc_re(dg);
            const double next = tc_re(dg) + tc_re(step);
            if (!(next > lo && next < hi && isfinite(tc_re(step)))) {
                step = 0.5 * (lo + hi) - dg;
                newton = 0;
            }
            dg += step;
            extra = (newton && fabs(tc_re(step)) <= JC_STEP_TOL * fabs(tc_re(dg))) ||
                    hi - lo <= 4e-16 * hi;
        }
        const tc_real ep = ep_n + dg * r23;
        const tc_real rate_star = rate_per_a * dg * r23;
        if (!done) {
            jc_fail(report, "the return mapping did not converge in 200 iterations");
            return;
        }
        if (!(tc_re(dg) > 0.0) || !jc_heated_step(p, h, ep_n, dg * r23, rate_per_a, t, &st) ||
            !isfinite(tc_re(st.stress)) || !isfinite(tc_re(st.slope))) {
            jc_fail(report, "the return mapping found no positive plastic step");
            return;
        }
        if (fabs(tc_re(norm - two_mu * dg - st.stress * r23)) > 1e-8 * tc_re(norm)) {
            jc_fail(report, "thermal softening in this increment leaves no plastic step on the yield surface");
            return;
        }
        tc_real mean = 0.0;
        for (int i = 0; i < n; ++i) {
            n_dir[i] = xi[i] / norm;
            stress[i] = sigma_tr[i] - two_mu * dg * n_dir[i];
            state[i] = state0[i] + (i < 3 ? 1.0 : 2.0) * dg * n_dir[i];
            if (i < 3) mean += stress[i];
        }
        state[n] = ep;
        const tc_real triax = mean / 3.0 / st.stress;
        state[n + 1] = damage_n + dg * r23 / jc_fracture_strain(p, triax, rate_star, t + st.heat);
        state[n + 2] = heat_n + st.heat;

        /* K' = d(sigma_y)/d(ep) along the step: strain, rate (rate* = d(ep)/(dt rate0)) and the
         * heating of the step. */
        const tc_real slope_full = st.slope;
        const tc_real k_slope = with_rate_term ? slope_full : st.slope - st.rate_slope;
        theta = 1.0 - two_mu * dg / norm;
        theta_bar = 1.0 / (k_slope / (mu * 3.0) + 1.0) - (1.0 - theta);
        const tc_real ddg_dt = -st.d_temp0 * r23 / (two_mu + slope_full * (2.0 / 3.0));
        for (int i = 0; i < n; ++i) dstress_dtemp[i] = -two_mu * n_dir[i] * ddg_dt;
        report->branch = 1;
    }

    /* C = kappa 1(x)1 + 2 mu theta (I - 1/3 1(x)1) - 2 mu theta_bar n(x)n (as j2.c). */
    for (int j = 0; j < n; ++j) {
        for (int i = 0; i < n; ++i) {
            tc_real c = 0.0;
            if (i < 3 && j < 3) {
                c = kappa + two_mu * theta * ((i == j ? 1.0 : 0.0) - 1.0 / 3.0);
            } else if (i == j) {
                c = mu * theta;
            }
            tangent[i + j * n] = c - two_mu * theta_bar * n_dir[i] * n_dir[j];
        }
    }
    energy->stored = 0.0;
    energy->dissipated = 0.0;
    report->provides = TC_PROVIDES_DSTRESS_DTEMP;
    report->status = TC_STATUS_OK;
}

TC_ROUTINE(c_jc)
{
    (void)stress0;
    jc_update(call, properties, strain, dstrain, temperature, state0, stress, state, tangent, dstress_dtemp,
              energy, report, 1);
}

TC_ROUTINE(c_jc_no_rate_term)
{
    (void)stress0;
    jc_update(call, properties, strain, dstrain, temperature, state0, stress, state, tangent, dstress_dtemp,
              energy, report, 0);
}
