/*
 * cohesive.c -- bilinear mixed-mode cohesive law with irreversible damage and a contact
 * penalty, the reference routine "cohesive" and its flawed variants in C (Camanho & Davila
 * 2002, NASA/TM-2002-211737; Camanho, Davila & de Moura 2003, J. Compos. Mater. 37(16);
 * propagation by Benzeggagh & Kenane 1996, Compos. Sci. Technol. 56).
 *
 *   c_cohesive              the consistent tangent
 *   c_cohesive_secant       the secant (1 - d) K during damage growth (wrong in branch 1)
 *   c_cohesive_no_coupling  the damage-growth term kept on the diagonal only (wrong in branch 1
 *                           when two or more separation components are nonzero)
 *   c_cohesive_symmetrized  the symmetric part of the tangent, 1/2 (C + C^T) (wrong in
 *                           mixed-mode damage growth, where the tangent is unsymmetric)
 *   c_cohesive_transposed   the transposed tangent (wrong in mixed-mode damage growth, where
 *                           the tangent is unsymmetric)
 *   c_cohesive_undamaged    the undamaged stiffness K on the diagonal on every branch (wrong
 *                           wherever the point is damaged, and in contact slip with damage)
 *
 * Layout (DEVELOPERS.md, "Reference models"): ncomp 3 (opening, slip 1, slip 2) or 2 (opening,
 * slip); strain = separation, stress = traction, total form (stress0 is not read).
 *   properties [K, N, S, G_Ic, G_IIc, eta]: penalty stiffness, normal and shear strength,
 *     mode I and mode II toughness, B-K exponent (>= 1);
 *   state [d, G_d]: damage and dissipated energy per unit area; entries past these are
 *     carried through unchanged.
 * With <d3> = max(d3, 0), lambda = sqrt(<d3>^2 + d_shear^2), shear fraction
 * B = d_shear^2 / lambda^2 = beta^2 / (1 + beta^2) (B = 1 when closed):
 *   onset d0m = d03 d0s / sqrt((1 - B) d0s^2 + B d03^2), d03 = N / K, d0s = S / K;
 *   G_c = G_Ic + (G_IIc - G_Ic) B^eta, final dfm = 2 G_c / (K d0m);
 *   trial damage dfm (lambda - d0m) / (lambda (dfm - d0m)), 0 below d0m, 1 beyond dfm.
 * Branches: 0 undamaged and open, 1 damage growth, 2 unloading/reloading with damage, 3 closed
 * (opening < 0) without growth, 4 fully failed. A negative opening carries K d3 and adds no
 * damage; the opening counts as open at d3 = 0 (right derivative there).
 * Energy: stored 1/2 t . delta, dissipated G_d; each increment of growth adds
 * G_c (lambda(d) - lambda(d_n)) / (dfm - d0m), lambda(d) = dfm d0m / (dfm - d (dfm - d0m)).
 *
 * Complex-step safety (Martins, Sturdza & Alonso 2003): every branch test compares real parts,
 * the equivalent separation is a scaled sqrt of a sum of squares (no conjugate, no modulus),
 * B^eta is exp(eta log B).
 *
 * Build: cc -I fortran-shim/include -c cohesive.c               exports the six routines
 *        cc -I fortran-shim/include -DTC_COMPLEX -c cohesive.c  exports them with _cx
 */

#include "tancheck_cstep.h"
#include "tancheck_routine.h"

/* Property indices. */
enum { CZ_K, CZ_N, CZ_S, CZ_GIC, CZ_GIIC, CZ_ETA, CZ_NPROP };

/* Branch ids. */
enum { CZ_ELASTIC, CZ_GROWTH, CZ_UNLOADING, CZ_CLOSED, CZ_FAILED };

typedef enum {
    CZ_CONSISTENT,
    CZ_SECANT,
    CZ_NO_COUPLING,
    CZ_TRANSPOSED,
    CZ_SYMMETRIZED,
    CZ_UNDAMAGED
} cz_flaw;

static void cz_fail(tc_report *report, const char *text)
{
    report->status = TC_STATUS_FAILED;
    /* "<model>: <text>" into the report's message, cut to fit and NUL-terminated. */
    const char *parts[2] = {"cohesive: ", text};
    int k = 0;
    for (int p = 0; p < 2; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/* lambda = m sqrt(sum (x_i / m)^2), m the largest |x_i| by real part: exact, derivative part
 * included, when one component alone is nonzero. */
static tc_real cz_norm(int n, const tc_real *x)
{
    tc_real big = 0.0;
    for (int i = 0; i < n; ++i) {
        if (tc_re(tc_abs(x[i])) > tc_re(big)) {
            big = tc_abs(x[i]);
        }
    }
    if (tc_re(big) <= 0.0) {
        return 0.0;
    }
    tc_real q = 0.0;
    for (int i = 0; i < n; ++i) {
        const tc_real r = x[i] / big;
        q += r * r;
    }
    return big * tc_sqrt(q);
}

static void cz_update(const tc_call *call, const tc_real *properties, const tc_real *strain,
                      const tc_real *dstrain, const tc_real *state0, tc_real *stress,
                      tc_real *state, tc_real *tangent, tc_energy *energy, tc_report *report,
                      cz_flaw flaw)
{
    const int n = call->ncomp;
    if (n != 3 && n != 2) {
        cz_fail(report, "ncomp must be 3 or 2");
        return;
    }
    if (call->nproperties < CZ_NPROP) {
        cz_fail(report, "needs 6 properties [K, N, S, G_Ic, G_IIc, eta]");
        return;
    }
    if (call->nstate < 2) {
        cz_fail(report, "needs 2 state variables [damage, dissipated]");
        return;
    }
    const tc_real k = properties[CZ_K];
    const tc_real sn = properties[CZ_N];
    const tc_real ss = properties[CZ_S];
    const tc_real g1 = properties[CZ_GIC];
    const tc_real g2 = properties[CZ_GIIC];
    const tc_real eta = properties[CZ_ETA];
    if (!(tc_re(k) > 0.0)) {
        cz_fail(report, "K (properties[0]) must be positive");
        return;
    }
    if (!(tc_re(sn) > 0.0 && tc_re(ss) > 0.0)) {
        cz_fail(report, "strengths N, S (properties[1], properties[2]) must be positive");
        return;
    }
    if (!(tc_re(g1) > 0.0 && tc_re(g2) > 0.0)) {
        cz_fail(report, "G_Ic, G_IIc (properties[3], properties[4]) must be positive");
        return;
    }
    if (!(tc_re(eta) >= 1.0 && isfinite(tc_re(eta)))) {
        cz_fail(report, "eta (properties[5]) must be finite and >= 1");
        return;
    }
    const tc_real d_old = state0[0];
    if (!(tc_re(d_old) >= 0.0 && tc_re(d_old) <= 1.0)) {
        cz_fail(report, "damage state0[0] must lie in [0, 1]");
        return;
    }
    if (!isfinite(tc_re(state0[1]))) {
        cz_fail(report, "dissipated energy state0[1] must be finite");
        return;
    }

    tc_real sep[3] = {0.0, 0.0, 0.0};
    for (int i = 0; i < n; ++i) {
        sep[i] = strain[i] + dstrain[i];
    }
    const int open = tc_re(sep[0]) >= 0.0;
    const tc_real dnp = open ? sep[0] : 0.0;
    tc_real sh2 = 0.0;
    for (int i = 1; i < n; ++i) {
        sh2 += sep[i] * sep[i];
    }
    const tc_real lam2 = dnp * dnp + sh2;
    const tc_real eff[3] = {dnp, sep[1], sep[2]};
    const tc_real lam = cz_norm(n, eff);
    const tc_real b = tc_re(lam2) > 0.0 ? sh2 / lam2 : 0.0;

    /* Mixed-mode law and its derivatives in B (Camanho & Davila 2002; B-K 1996). */
    const tc_real d03 = sn / k;
    const tc_real d0s = ss / k;
    const tc_real h = (1.0 - b) * d0s * d0s + b * d03 * d03;
    const tc_real dh = d03 * d03 - d0s * d0s;
    const tc_real d0 = d03 * d0s / tc_sqrt(h);
    const tc_real dd0 = -d0 * dh / (2.0 * h);
    tc_real pw = 0.0;
    tc_real dpw = 0.0;
    if (tc_re(b) > 0.0) {
        pw = tc_exp(eta * tc_log(b));
        dpw = eta * pw / b;
    } else if (tc_re(eta) == 1.0) {
        dpw = 1.0;
    }
    const tc_real gc = g1 + (g2 - g1) * pw;
    const tc_real dgc = (g2 - g1) * dpw;
    const tc_real df = 2.0 * gc / (k * d0);
    const tc_real ddf = df * (dgc / gc - dd0 / d0);
    const tc_real span = df - d0;
    if (!(tc_re(span) > 0.0)) {
        cz_fail(report, "final separation not beyond onset; needs 2 G_c K > strength^2");
        return;
    }

    /* Trial damage and the branch. */
    const int beyond = tc_re(lam) >= tc_re(df);
    tc_real d_trial;
    if (tc_re(lam) <= tc_re(d0)) {
        d_trial = 0.0;
    } else if (beyond) {
        d_trial = 1.0;
    } else {
        d_trial = df * (lam - d0) / (lam * span);
    }
    const int grows = tc_re(d_trial) > tc_re(d_old);
    tc_real d;
    int branch;
    if (grows) {
        d = d_trial;
        branch = beyond ? CZ_FAILED : CZ_GROWTH;
    } else {
        d = d_old;
        if (tc_re(d_old) >= 1.0) {
            branch = CZ_FAILED;
        } else if (!open) {
            branch = CZ_CLOSED;
        } else if (tc_re(d_old) <= 0.0) {
            branch = CZ_ELASTIC;
        } else {
            branch = CZ_UNLOADING;
        }
    }

    /* Dissipation of this increment. */
    tc_real dissipated = state0[1];
    if (grows) {
        const tc_real lam_new = beyond ? df : lam;
        const tc_real lam_old = df * d0 / (df - d_old * span);
        dissipated += gc * (lam_new - lam_old) / span;
    }

    tc_real tan3[3][3] = {{0.0, 0.0, 0.0}, {0.0, 0.0, 0.0}, {0.0, 0.0, 0.0}};
    tc_real stored = 0.0;
    if (branch != CZ_GROWTH) {
        /* t = (1 - d) K delta (K delta_3 when closed); diagonal tangent. */
        const tc_real kd = (1.0 - d) * k;
        for (int i = 0; i < n; ++i) {
            const tc_real ki = (i == 0 && !open) ? k : kd;
            stress[i] = ki * sep[i];
            stored += stress[i] * sep[i];
            tan3[i][i] = ki;
        }
    } else {
        /* Growth as magnitude times direction: t = T n, n = eff / lambda,
         * T = (1 - d) K lambda = K d0m (dfm - lambda) / (dfm - d0m); a closed opening adds K d3.
         * d t_i / d delta_j = (T / lambda)(P_ij - n_i n_j) + T_lambda n_i n_j + T_B n_i dB_j,
         * P = d eff / d delta, T_lambda = -K d0m / (dfm - d0m),
         * dB_j = 2 n_j ([j is a slip] - B) / lambda,
         * T_B = K [d0m' (dfm - lambda) + d0m dfm' - d0m (dfm - lambda)(dfm' - d0m') / (dfm - d0m)]
         *       / (dfm - d0m). */
        const tc_real mag = k * d0 * (df - lam) / span;
        tc_real nh[3] = {0.0, 0.0, 0.0};
        for (int i = 0; i < n; ++i) {
            nh[i] = eff[i] / lam;
            stress[i] = (i == 0 && !open) ? k * sep[0] : mag * nh[i];
            stored += stress[i] * sep[i];
        }
        const tc_real secant = mag / lam;
        const tc_real t_lam = -k * d0 / span;
        const tc_real t_b =
            k * (dd0 * (df - lam) + d0 * ddf - d0 * (df - lam) * (ddf - dd0) / span) / span;
        for (int j = 0; j < n; ++j) {
            const tc_real db = 2.0 * nh[j] * ((j == 0 ? 0.0 : 1.0) - b) / lam;
            for (int i = 0; i < n; ++i) {
                const double p_ij = (i == j && (i > 0 || open)) ? 1.0 : 0.0;
                tan3[i][j] = secant * (p_ij - nh[i] * nh[j]) + t_lam * nh[i] * nh[j] +
                             t_b * nh[i] * db;
            }
        }
        if (!open) {
            tan3[0][0] = k;
        }
        if (flaw == CZ_SECANT) {
            for (int i = 0; i < n; ++i) {
                for (int j = 0; j < n; ++j) {
                    tan3[i][j] = 0.0;
                }
                tan3[i][i] = (i == 0 && !open) ? k : (1.0 - d) * k;
            }
        } else if (flaw == CZ_NO_COUPLING) {
            for (int i = 0; i < n; ++i) {
                for (int j = 0; j < n; ++j) {
                    if (i != j) {
                        tan3[i][j] = 0.0;
                    }
                }
            }
        }
    }
    if (flaw == CZ_UNDAMAGED) {
        for (int i = 0; i < n; ++i) {
            for (int j = 0; j < n; ++j) {
                tan3[i][j] = i == j ? k : 0.0;
            }
        }
    }
    for (int j = 0; j < n; ++j) {
        for (int i = 0; i < n; ++i) {
            tangent[i + j * n] = flaw == CZ_TRANSPOSED    ? tan3[j][i]
                                 : flaw == CZ_SYMMETRIZED ? 0.5 * (tan3[i][j] + tan3[j][i])
                                                          : tan3[i][j];
        }
    }

    state[0] = d;
    state[1] = dissipated;
    for (int i = 2; i < call->nstate; ++i) {
        state[i] = state0[i];
    }
    energy->stored = 0.5 * stored;
    energy->dissipated = dissipated;
    report->provides = TC_PROVIDES_ENERGY;
    report->branch = branch;
    report->status = TC_STATUS_OK;
}

TC_ROUTINE(c_cohesive)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    cz_update(call, properties, strain, dstrain, state0, stress, state, tangent, energy, report,
              CZ_CONSISTENT);
}

TC_ROUTINE(c_cohesive_secant)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    cz_update(call, properties, strain, dstrain, state0, stress, state, tangent, energy, report,
              CZ_SECANT);
}

TC_ROUTINE(c_cohesive_no_coupling)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    cz_update(call, properties, strain, dstrain, state0, stress, state, tangent, energy, report,
              CZ_NO_COUPLING);
}

TC_ROUTINE(c_cohesive_transposed)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    cz_update(call, properties, strain, dstrain, state0, stress, state, tangent, energy, report,
              CZ_TRANSPOSED);
}

TC_ROUTINE(c_cohesive_symmetrized)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    cz_update(call, properties, strain, dstrain, state0, stress, state, tangent, energy, report,
              CZ_SYMMETRIZED);
}

TC_ROUTINE(c_cohesive_undamaged)
{
    (void)temperature;
    (void)stress0;
    (void)dstress_dtemp;
    cz_update(call, properties, strain, dstrain, state0, stress, state, tangent, energy, report,
              CZ_UNDAMAGED);
}
