/*
 * loop_check.c -- the tangent check a user would write by hand in C, for the benchmark
 * benches/against_c.rs to measure tancheck against.
 *
 * It loads the routine library with dlopen and walks a strain path. Per increment:
 *   - the base call, with the tangent (TC_WANT_TANGENT);
 *   - the central-difference Jacobian: two calls per column (+h and -h on dstrain[j]) at
 *     h = rel_central * max(|strain + dstrain|_inf, |dstrain|_inf, step_floor);
 *   - the complex-step Jacobian with the twin (symbol + "_cx"): one call per column with
 *     imaginary part rel_complex times the same scale on dstrain[j];
 *   - an entry-wise comparison of each Jacobian with the returned tangent,
 *     |C_ret - C_num| / max(|C_num|, entry_floor * |C_num|_F), the worst error kept;
 *   - the end state of the base call becomes the next start state.
 * Perturbed calls get the same read-only start state; they do not ask for the tangent.
 * Routine calls are counted, so that the benchmark can show both sides made the same calls.
 */
#include <complex.h>
#include <dlfcn.h>
#include <math.h>
#include <string.h>

#include "tancheck_routine.h"

/* tc_temperature and tc_energy as the twin sees them (tc_real = double _Complex). */
typedef struct loop_temperature_cx {
    double _Complex start;
    double _Complex increment;
} loop_temperature_cx;
typedef struct loop_energy_cx {
    double _Complex stored;
    double _Complex dissipated;
} loop_energy_cx;

typedef void (*loop_cx_fn)(const tc_call *call, const double _Complex *properties,
                           const double _Complex *strain, const double _Complex *dstrain,
                           const loop_temperature_cx *temperature, const double _Complex *stress0,
                           const double _Complex *state0, double _Complex *stress,
                           double _Complex *state, double _Complex *tangent,
                           double _Complex *dstress_dtemp, loop_energy_cx *energy,
                           tc_report *report);

#define LOOP_MAX_STATE 64
#define LOOP_MAX_PROP 64

/* What one run found. */
typedef struct loop_result {
    long long real_calls;
    long long complex_calls;
    double worst_central;  /* worst entry error of the central differences */
    double worst_complex;  /* worst entry error of the complex step */
    int failed_increment;  /* 0, or the increment whose call reported a failure */
} loop_result;

static double loop_worst(int n, const double *ret, const double *num, double entry_floor,
                         double worst)
{
    double norm = 0.0;
    for (int k = 0; k < n * n; ++k) {
        norm += num[k] * num[k];
    }
    const double floor = entry_floor * sqrt(norm);
    for (int k = 0; k < n * n; ++k) {
        const double scale = fabs(num[k]) > floor ? fabs(num[k]) : floor;
        const double e = fabs(ret[k] - num[k]) / scale;
        if (!(e <= worst)) {
            worst = e; /* NaN wins too */
        }
    }
    return worst;
}

/*
 * Walk `nincr` increments (dstrain row-major, nincr x ncomp, in the routine's own order and
 * shear measure) from a zero start state. Returns 0, or -1 when the library or a symbol could
 * not be loaded, -2 when the sizes exceed the loop's fixed buffers.
 */
int loop_check_run(const char *library, const char *symbol, const char *twin_symbol, int ncomp,
                   int nstate, int nproperties, const double *properties, double temp, int nincr,
                   const double *dstrain, double dtime, double rel_central, double rel_complex,
                   double step_floor, double entry_floor, loop_result *out)
{
    memset(out, 0, sizeof *out);
    if (ncomp < 1 || ncomp > 6 || nstate > LOOP_MAX_STATE || nproperties > LOOP_MAX_PROP) {
        return -2;
    }
    void *lib = dlopen(library, RTLD_NOW | RTLD_LOCAL);
    if (lib == NULL) {
        return -1;
    }
    tc_routine_fn f = (tc_routine_fn)dlsym(lib, symbol);
    loop_cx_fn fc = (loop_cx_fn)dlsym(lib, twin_symbol);
    if (f == NULL || fc == NULL) {
        dlclose(lib);
        return -1;
    }
    const int n = ncomp;
    double strain[6] = {0}, stress0[6] = {0}, state0[LOOP_MAX_STATE] = {0};
    double stress[6], state[LOOP_MAX_STATE + 1], tangent[36], dsdt[6];
    tc_energy energy;
    double pstress[6], pstate[LOOP_MAX_STATE + 1], ptangent[36];
    double mstress[6];
    double dpert[6], numerical[36];
    const tc_temperature t2 = {temp, 0.0};
    double _Complex cprops[LOOP_MAX_PROP], cstrain[6], cd[6], cstress0[6],
        cstate0[LOOP_MAX_STATE + 1];
    double _Complex cstress[6], cstate[LOOP_MAX_STATE + 1], ctangent[36], cdsdt[6];
    loop_energy_cx cenergy;
    const loop_temperature_cx ct2 = {temp, 0.0};
    for (int k = 0; k < nproperties; ++k) {
        cprops[k] = properties[k];
    }
    tc_call call = {TC_ROUTINE_ABI_VERSION, n, nstate, nproperties, 0, 0, 0.0, dtime};
    tc_report report;
    double worst_central = 0.0, worst_complex = 0.0;

    for (int inc = 0; inc < nincr; ++inc) {
        const double *d = dstrain + (long)inc * n;
        call.increment = inc + 1;
        call.time = inc * dtime;

        /* The base call, with the tangent. */
        memset(&report, 0, sizeof report);
        report.branch = -1;
        call.flags = TC_WANT_TANGENT;
        f(&call, properties, strain, d, &t2, stress0, state0, stress, state, tangent, dsdt, &energy,
          &report);
        out->real_calls++;
        if (report.status == TC_STATUS_FAILED) {
            out->failed_increment = inc + 1;
            break;
        }

        double scale = step_floor;
        for (int i = 0; i < n; ++i) {
            scale = fmax(scale, fmax(fabs(strain[i] + d[i]), fabs(d[i])));
        }

        /* Central differences, two calls per column. */
        const double h = rel_central * scale;
        call.flags = 0;
        for (int j = 0; j < n; ++j) {
            memcpy(dpert, d, (size_t)n * sizeof *d);
            dpert[j] = d[j] + h;
            memset(&report, 0, sizeof report);
            report.branch = -1;
            f(&call, properties, strain, dpert, &t2, stress0, state0, pstress, pstate, ptangent, dsdt,
              &energy, &report);
            dpert[j] = d[j] - h;
            memset(&report, 0, sizeof report);
            report.branch = -1;
            f(&call, properties, strain, dpert, &t2, stress0, state0, mstress, pstate, ptangent, dsdt,
              &energy, &report);
            out->real_calls += 2;
            for (int i = 0; i < n; ++i) {
                numerical[i + j * n] = (pstress[i] - mstress[i]) / (2.0 * h);
            }
        }
        worst_central = loop_worst(n, tangent, numerical, entry_floor, worst_central);

        /* The complex step with the twin, one call per column. */
        const double hc = rel_complex * scale;
        for (int i = 0; i < n; ++i) {
            cstrain[i] = strain[i];
            cstress0[i] = stress0[i];
        }
        for (int k = 0; k < nstate; ++k) {
            cstate0[k] = state0[k];
        }
        for (int j = 0; j < n; ++j) {
            for (int i = 0; i < n; ++i) {
                cd[i] = d[i];
            }
            cd[j] = CMPLX(d[j], hc);
            memset(&report, 0, sizeof report);
            report.branch = -1;
            fc(&call, cprops, cstrain, cd, &ct2, cstress0, cstate0, cstress, cstate, ctangent,
               cdsdt, &cenergy, &report);
            out->complex_calls++;
            for (int i = 0; i < n; ++i) {
                numerical[i + j * n] = cimag(cstress[i]) / hc;
            }
        }
        worst_complex = loop_worst(n, tangent, numerical, entry_floor, worst_complex);

        /* Accept the base call. */
        for (int i = 0; i < n; ++i) {
            strain[i] += d[i];
            stress0[i] = stress[i];
        }
        memcpy(state0, state, (size_t)nstate * sizeof *state);
    }
    out->worst_central = worst_central;
    out->worst_complex = worst_complex;
    dlclose(lib);
    return 0;
}
