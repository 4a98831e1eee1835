/*
 * check_from_c.c -- a C test program that checks the J2 routines of j2.c in-process through
 * tancheck's C API (tancheck.h).
 *
 * The consistent routine c_j2 must pass; c_j2_continuum, which returns the continuum
 * tangent, must fail the tangent check. The program prints both summaries and exits 0 when
 * both verdicts are the expected ones, 1 otherwise (2 when the check could not run).
 *
 * Build (with j2.c compiled twice, the second time with -DTC_COMPLEX, for the twins):
 *   cc -I fortran-shim/include -c fortran-shim/examples/c/j2.c -o j2.o
 *   cc -I fortran-shim/include -DTC_COMPLEX -c fortran-shim/examples/c/j2.c -o j2_cx.o
 *   cc -I fortran-shim/include fortran-shim/examples/c/check_from_c.c j2.o j2_cx.o \
 *      $(pkg-config --libs tancheck) -lm -o check_from_c
 */
#include <stdio.h>
#include <string.h>

#include "tancheck.h"

/* The routines of j2.c and their complex-step twins (compiled with TC_COMPLEX, where
 * tc_temperature and tc_energy hold double _Complex; this file sees them as the structs
 * below). */
typedef struct cfc_temperature_cx {
    double _Complex start;
    double _Complex increment;
} cfc_temperature_cx;
typedef struct cfc_energy_cx {
    double _Complex stored;
    double _Complex dissipated;
} cfc_energy_cx;
TC_ROUTINE(c_j2);
TC_ROUTINE(c_j2_continuum);
void c_j2_cx(const tc_call *call, const double _Complex *properties, const double _Complex *strain,
             const double _Complex *dstrain, const cfc_temperature_cx *temperature,
             const double _Complex *stress0, const double _Complex *state0,
             double _Complex *stress, double _Complex *state, double _Complex *tangent,
             double _Complex *dstress_dtemp, cfc_energy_cx *energy, tc_report *report);
void c_j2_continuum_cx(const tc_call *call, const double _Complex *properties,
                       const double _Complex *strain, const double _Complex *dstrain,
                       const cfc_temperature_cx *temperature, const double _Complex *stress0,
                       const double _Complex *state0, double _Complex *stress,
                       double _Complex *state, double _Complex *tangent,
                       double _Complex *dstress_dtemp, cfc_energy_cx *energy,
                       tc_report *report);

/* J2 properties [E, nu, sigma_y0, H_iso, Q, b, H_kin] (DEVELOPERS.md, "Reference models"). */
static const double j2_properties[7] = {200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0};
#define J2_NSTATE 13 /* 2 * 6 + 1 for a 3D solid */

/* Check one routine; returns 1 when its verdict is `want`, 0 when not, -1 when the check
 * could not run. */
static int check_one(const char *name, tc_routine_fn routine, tck_twin_fn twin, int want)
{
    tck_options opts;
    if (tck_options_init(&opts) != TCK_OK) {
        fprintf(stderr, "tck_options_init: %s\n", tck_last_error());
        return -1;
    }
    opts.name = name;
    opts.kind = TCK_KIND_SOLID_3D;
    opts.nproperties = 7;
    opts.properties = j2_properties;
    opts.nstate = J2_NSTATE;
    opts.guard_level = TCK_GUARD_FULL;

    tck_result *result = NULL;
    if (tck_check(&result, routine, twin, &opts) != TCK_OK) {
        fprintf(stderr, "tck_check(%s): %s\n", name, tck_last_error());
        return -1;
    }
    int verdict = tck_result_verdict(result);
    printf("%s\n", tck_result_summary(result));
    for (size_t i = 0; i < tck_result_finding_count(result); ++i) {
        printf("  guard: %s\n", tck_result_finding(result, i));
    }

    /* The JSON by buffer query: the length first, then the text. */
    size_t length = 0;
    int ok = tck_result_json_copy(result, NULL, 0, &length) == TCK_OK && length > 0;
    char small[8];
    ok = ok && tck_result_json_copy(result, small, sizeof small, NULL) == TCK_ERROR_BUFFER &&
         strlen(small) == sizeof small - 1;
    static char json[1 << 20];
    ok = ok && length < sizeof json &&
         tck_result_json_copy(result, json, sizeof json, NULL) == TCK_OK &&
         strcmp(json, tck_result_json(result)) == 0 && strstr(json, "\"verdict\"") != NULL &&
         strstr(json, "\"guard\"") != NULL;
    if (!ok) {
        fprintf(stderr, "%s: the JSON report could not be read back (%s)\n", name,
                tck_last_error());
    }
    if (verdict != want) {
        fprintf(stderr, "%s: verdict %d, expected %d\n", name, verdict, want);
    }
    tck_result_free(result);
    return ok && verdict == want;
}

int main(void)
{
    int major = -1, minor = -1, patch = -1;
    tck_version(&major, &minor, &patch);
    printf("tancheck %s (header %d.%d.%d)\n", tck_version_string(), TCK_VERSION_MAJOR,
           TCK_VERSION_MINOR, TCK_VERSION_PATCH);
    int good = major == TCK_VERSION_MAJOR && minor == TCK_VERSION_MINOR;
    if (!good) {
        fprintf(stderr, "the library (%d.%d.%d) does not match the header\n", major, minor, patch);
    }

    /* A bad option is an error with a message, not a verdict. */
    tck_options bad;
    tck_options_init(&bad);
    bad.kind = 99;
    tck_result *none = (tck_result *)&bad; /* must be set to NULL by the failing call */
    if (tck_check(&none, c_j2, NULL, &bad) != TCK_ERROR_INVALID || none != NULL ||
        strstr(tck_last_error(), "tck_options.kind is 99") == NULL) {
        fprintf(stderr, "a bad kind was not refused as expected: %s\n", tck_last_error());
        good = 0;
    }

    int consistent = check_one("c_j2", c_j2, (tck_twin_fn)c_j2_cx, TCK_VERDICT_PASS);
    int continuum = check_one("c_j2_continuum", c_j2_continuum, (tck_twin_fn)c_j2_continuum_cx,
                              TCK_VERDICT_TANGENT_FAILURE);
    if (consistent < 0 || continuum < 0) {
        return 2;
    }
    good = good && consistent && continuum;
    printf("%s\n", good ? "as expected: c_j2 passes, c_j2_continuum fails"
                        : "NOT as expected");
    return good ? 0 : 1;
}
