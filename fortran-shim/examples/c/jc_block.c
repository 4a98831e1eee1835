/*
 * jc_block.c -- Johnson-Cook plasticity with damage and deletion as a block routine
 * (tancheck_block.h), the reference block routine "johnson-cook-block" and three flawed
 * variants of the selftest zoo, in C. The model, its layouts and the flaws are those of the
 * Rust model (crates/tancheck-models/src/block/johnson_cook.rs), which documents each choice.
 *
 *   c_jc_block                     the correct block routine
 *   c_jc_block_revived             a deleted point comes back when compressed (damage cleared)
 *   c_jc_block_unguarded_rate      rate factor 1 + C ln(rate*) of the total strain rate, folded
 *                                  into A and B, without the floor: ln 0 at a zero rate
 *   c_jc_block_wrong_temperature   the elastic response (wave speed) from E at room temperature
 *   c_jc_block_deleted_stress      a deleted point freezes its last stress instead of zero
 *   c_jc_block_unclipped_temperature  the thermal factor 1 - T*^m on a yielding point's stress
 *                                  without the clip at T* = 0: NaN below the room temperature
 *   c_jc_block_healing             an increment without plastic flow "closes the crack": the
 *                                  damage d falls by a tenth (C only; for the damage check)
 *
 * Every point is updated by the point routine's jc_update (jc.c, which this file includes, so
 * the library also exports c_jc and c_jc_no_rate_term: do not link it together with jc.c).
 * Properties (21): the 18 of jc.c, then [k_E, G_f, d_max]: E(T) = E (1 - k_E T*) at the point's
 * temperature; progressive damage after initiation (D >= 1) d = min(u / u_f, 1),
 * u = L * (plastic strain since), u_f = 2 G_f / sigma_y0 (crack band, Bazant & Oh 1983; from
 * memory); deletion at d >= d_max. State (ncomp + 7): jc.c's [eps_p (ncomp), ep, D, dT_heat],
 * then [d, sigma_y0, u, deleted]. Energies per unit mass: internal by the trapezoid rule, stored
 * 1/2 sigma . (eps - eps_p) / density (0 once deleted), dissipated = internal - stored.
 *
 * Build: cc -I fortran-shim/include -c jc_block.c               exports c_jc_block, ...
 *        cc -I fortran-shim/include -DTC_COMPLEX -c jc_block.c  exports the _cx twins
 */
#include "jc.c"

#include "tancheck_block.h"

#define JCB_NPROP (JC_NPROP + 3)

typedef enum {
    JCB_CORRECT,
    JCB_REVIVED,
    JCB_UNGUARDED_RATE,
    JCB_WRONG_TEMPERATURE,
    JCB_DELETED_STRESS,
    JCB_UNCLIPPED_TEMPERATURE,
    JCB_HEALING
} jcb_flaw;

/* E(T) = E (1 - k_E T*), T* clipped to [0, 1). */
static tc_real jcb_modulus(const tc_real *p, double temperature)
{
    double ts = (temperature - tc_re(p[7])) / (tc_re(p[8]) - tc_re(p[7]));
    ts = ts < 0.0 ? 0.0 : (ts > 1.0 - 1e-12 ? 1.0 - 1e-12 : ts);
    return p[0] * (1.0 - p[JC_NPROP] * ts);
}

static tc_real jcb_equivalent(const tc_real *s, int n)
{
    tc_real q = 0.5 * ((s[0] - s[1]) * (s[0] - s[1]) + (s[1] - s[2]) * (s[1] - s[2]) +
                       (s[2] - s[0]) * (s[2] - s[0]));
    for (int i = 3; i < n; ++i) q += 3.0 * s[i] * s[i];
    return tc_re(q) > 0.0 ? tc_sqrt(q) : 0.0;
}

static tc_real jcb_equivalent_strain(const tc_real *de, int n)
{
    const tc_real m = (de[0] + de[1] + de[2]) / 3.0;
    tc_real q = 0.0;
    for (int i = 0; i < n; ++i) q += i < 3 ? (de[i] - m) * (de[i] - m) : 0.5 * de[i] * de[i];
    return tc_sqrt(2.0 / 3.0 * q);
}

static void jc_block(const tc_block *block, const tc_real *properties, const tc_real *strain,
                     const tc_real *strain_increment, const tc_real *stress_start,
                     const tc_real *state_start, const tc_specific_energy *energy_start,
                     const tc_point_conditions *conditions, tc_real *stress, tc_real *state,
                     tc_specific_energy *energy, int32_t *deleted, tc_block_report *report,
                     jcb_flaw flaw)
{
    const int n = block->ncomp, ns = block->nstate;
    if ((n != 6 && n != 4) || ns < n + 7 || block->nproperties < JCB_NPROP) {
        tc_block_fail(report, -1, "johnson-cook-block: needs ncomp 6 or 4, 21 properties, ncomp+7 state");
        return;
    }
    const tc_real k_e = properties[JC_NPROP], g_f = properties[JC_NPROP + 1];
    const tc_real d_max = properties[JC_NPROP + 2];
    if (!(tc_re(k_e) >= 0.0 && tc_re(g_f) > 0.0 && tc_re(d_max) > 0.0 && tc_re(d_max) <= 1.0)) {
        tc_block_fail(report, 0, "johnson-cook-block: needs k_E >= 0, G_f > 0, 0 < d_max <= 1");
        return;
    }
    const int i_ebar = n, i_init = n + 1, i_d = n + 3, i_sy0 = n + 4, i_u = n + 5, i_del = n + 6;
    for (int p = 0; p < block->npoints; ++p) {
        const tc_real *de = strain_increment + p * n;
        const tc_real *s0 = stress_start + p * n;
        const tc_real *old = state_start + p * ns;
        tc_real *s = stress + p * n;
        tc_real *st = state + p * ns;
        const tc_point_conditions c = conditions[p];
        if (block->flags & TC_BLOCK_ELASTIC_RESPONSE) {
            const tc_real e = flaw == JCB_WRONG_TEMPERATURE ? properties[0]
                                                           : jcb_modulus(properties, c.temperature);
            const tc_real nu = properties[1];
            const tc_real mu = e / (2.0 * (1.0 + nu));
            const tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
            const tc_real tr = de[0] + de[1] + de[2];
            for (int i = 0; i < n; ++i) s[i] = s0[i] + (i < 3 ? lambda * tr + 2.0 * mu * de[i] : mu * de[i]);
            for (int k = 0; k < ns; ++k) st[k] = old[k];
            energy[p] = energy_start[p];
            deleted[p] = 0;
            continue;
        }
        int was_deleted = tc_re(old[i_del]) >= 0.5;
        tc_real revived[64];
        if (was_deleted && flaw == JCB_REVIVED && tc_re(de[0] + de[1] + de[2]) < 0.0 && ns <= 64) {
            /* The flaw: compression "closes the crack", clears the damage, brings it back. */
            was_deleted = 0;
            for (int k = 0; k < ns; ++k) revived[k] = old[k];
            revived[i_init] = revived[i_d] = revived[i_sy0] = revived[i_u] = revived[i_del] = 0.0;
            old = revived;
        }
        if (was_deleted) {
            for (int i = 0; i < n; ++i) s[i] = flaw == JCB_DELETED_STRESS ? s0[i] : 0.0;
            for (int k = 0; k < ns; ++k) st[k] = old[k];
            energy[p] = energy_start[p];
            deleted[p] = 1;
            continue;
        }
        tc_real pp[JC_NPROP];
        for (int k = 0; k < JC_NPROP; ++k) pp[k] = properties[k];
        pp[0] = jcb_modulus(properties, c.temperature + c.temperature_increment);
        if (flaw == JCB_UNGUARDED_RATE) {
            const tc_real rate = jcb_equivalent_strain(de, n) / (pp[9] * block->time_increment);
            const tc_real factor = 1.0 + pp[5] * tc_log(rate);
            pp[2] *= factor;
            pp[3] *= factor;
            pp[5] = 0.0;
        }
        /* The point routine's call description, positionally: version, ncomp, nstate,
         * properties, increment, flags, time, time increment. */
        const tc_call call = {TC_ROUTINE_ABI_VERSION, n, n + 3, JC_NPROP, block->increment, 0,
                              block->time, block->time_increment};
        const tc_temperature temperature = {c.temperature, c.temperature_increment};
        tc_report point_report = {0};
        point_report.branch = -1;
        tc_real tangent[36], dsdt[6];
        tc_energy point_energy;
        jc_update(&call, pp, strain + p * n, de, &temperature, old, s, st, tangent, dsdt,
                  &point_energy, &point_report, 1);
        if (point_report.status != TC_STATUS_OK) {
            tc_block_fail(report, p, point_report.message[0] != '\0' ? point_report.message
                                                                : "johnson-cook-block: the point update failed");
            return;
        }
        tc_real d = old[i_d], sy0 = old[i_sy0], u = old[i_u];
        int now_deleted = 0;
        if (tc_re(st[i_init]) >= 1.0) {
            if (tc_re(sy0) <= 0.0) sy0 = jcb_equivalent(s, n);
            u += (st[i_ebar] - old[i_ebar]) * c.characteristic_length;
            d = u / (2.0 * g_f / sy0);
            if (tc_re(d) > 1.0) d = 1.0;
            if (tc_re(d) >= tc_re(d_max)) {
                d = 1.0;
                now_deleted = 1;
            }
        }
        if (flaw == JCB_HEALING && !now_deleted && tc_re(st[i_ebar]) == tc_re(old[i_ebar])) {
            d = 0.9 * d; /* the flaw: damage that heals in unloading */
        }
        for (int i = 0; i < n; ++i) s[i] *= 1.0 - d;
        if (flaw == JCB_UNCLIPPED_TEMPERATURE && tc_re(st[i_ebar]) > tc_re(old[i_ebar])) {
            const double ts = (c.temperature - tc_re(properties[7])) / (tc_re(properties[8]) - tc_re(properties[7]));
            if (ts < 0.0) {
                const double factor = 1.0 - pow(ts, tc_re(properties[6]));
                for (int i = 0; i < n; ++i) s[i] *= factor;
            }
        }
        if (flaw == JCB_DELETED_STRESS && now_deleted) {
            for (int i = 0; i < n; ++i) s[i] = s0[i];
        }
        st[i_d] = d;
        st[i_sy0] = sy0;
        st[i_u] = u;
        st[i_del] = now_deleted ? 1.0 : 0.0;
        deleted[p] = now_deleted;
        const double rho = c.density;
        tc_real work = 0.0, stored = 0.0;
        for (int i = 0; i < n; ++i) work += 0.5 * (s0[i] + s[i]) * de[i];
        if (!now_deleted) {
            for (int i = 0; i < n; ++i) stored += 0.5 * s[i] * (strain[p * n + i] + de[i] - st[i]);
        }
        energy[p].internal = energy_start[p].internal + work / rho;
        energy[p].dissipated = energy[p].internal - stored / rho;
    }
}

#define JC_BLOCK_VARIANT(name, flaw)                                                           \
    TC_BLOCK_ROUTINE(name)                                                                     \
    {                                                                                          \
        jc_block(block, properties, strain, strain_increment, stress_start, state_start,       \
                 energy_start, conditions, stress, state, energy, deleted, report, flaw);      \
    }

JC_BLOCK_VARIANT(c_jc_block, JCB_CORRECT)
JC_BLOCK_VARIANT(c_jc_block_revived, JCB_REVIVED)
JC_BLOCK_VARIANT(c_jc_block_unguarded_rate, JCB_UNGUARDED_RATE)
JC_BLOCK_VARIANT(c_jc_block_wrong_temperature, JCB_WRONG_TEMPERATURE)
JC_BLOCK_VARIANT(c_jc_block_deleted_stress, JCB_DELETED_STRESS)
JC_BLOCK_VARIANT(c_jc_block_unclipped_temperature, JCB_UNCLIPPED_TEMPERATURE)
JC_BLOCK_VARIANT(c_jc_block_healing, JCB_HEALING)
