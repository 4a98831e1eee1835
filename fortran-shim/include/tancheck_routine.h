/*
 * tancheck_routine.h -- the C ABI of a material routine that tancheck can check.
 *
 * A material routine is one C-callable procedure. It takes the state at the start of an
 * increment and the increment, and returns the state at its end and the tangent
 *
 *     tangent[i + j*ncomp] = d stress[i] / d dstrain[j]      (column-major, 0-based here)
 *
 * in the routine's own component order and shear measure (declared to tancheck in the
 * manifest). Inputs are read-only: tancheck compares them after the call.
 *
 * Outputs arrive filled with NaN. A routine writes every entry of stress, state and tangent;
 * it writes dstress_dtemp and energy only when it sets the matching bit in report->provides.
 *
 * The complex-step twin: compile the same source again with TC_COMPLEX defined. Then
 * tc_real is double _Complex and TC_NAME(x) appends TC_TWIN_SUFFIX, so the library exports
 * both "x" and "x_cx". tancheck finds the twin by that suffix and uses it for complex-step
 * derivatives: it puts the perturbation into the imaginary part of dstrain (or of
 * temperature->increment).
 *
 * Versioning: TC_ROUTINE_ABI_VERSION changes only when this layout or its names change; struct
 * fields only ever append. tancheck puts the version it speaks into call->abi_version.
 * Version 2 renamed v1's props/nprop to properties/nproperties, the slots temp[2] and energy[2]
 * to the structs tc_temperature and tc_energy (same memory layout), and TC_STATUS_CUTBACK with
 * report->step_ratio to TC_STATUS_SMALLER_INCREMENT with report->largest_fraction.
 */
#ifndef TANCHECK_ROUTINE_H
#define TANCHECK_ROUTINE_H

#include <stdint.h>

#define TC_ROUTINE_ABI_VERSION 2

/* Suffix of the complex-step twin's symbol. */
#define TC_TWIN_SUFFIX "_cx"

/* Length of the routine's message buffer, including the terminating NUL. */
#define TC_MESSAGE_LEN 96

/* Bits of tc_call.flags: what tancheck asks for in this call. */
#define TC_WANT_TANGENT 1 /* the tangent is used; without it a routine may skip it */

/* Bits of tc_report.provides: optional outputs the routine has written. */
#define TC_PROVIDES_DSTRESS_DTEMP 1
#define TC_PROVIDES_ENERGY 2

/* Status codes a routine may return in tc_report.status. */
#define TC_STATUS_OK 0
#define TC_STATUS_SMALLER_INCREMENT 1 /* increment too large: see tc_report.largest_fraction */
#define TC_STATUS_FAILED 2            /* the routine could not compute this increment */

/* Read-only description of one call. */
typedef struct tc_call {
    int32_t abi_version; /* TC_ROUTINE_ABI_VERSION of the caller */
    int32_t ncomp;       /* stress/strain components: 6, 4, 3, 2 or 1 */
    int32_t nstate;      /* state variables */
    int32_t nproperties; /* material properties */
    int32_t increment;   /* increment number along the path, from 1 */
    int32_t flags;       /* TC_WANT_* bits */
    double time;         /* time at the start of the increment */
    double dtime;        /* time increment */
} tc_call;

/* What the routine reports besides its arrays. Written by the routine. */
typedef struct tc_report {
    int32_t status;                 /* TC_STATUS_*; tancheck sets 0 before the call */
    int32_t branch;                 /* the routine's own branch id, or -1 (set before call) */
    int32_t provides;               /* TC_PROVIDES_* bits; tancheck sets 0 before the call */
    int32_t reserved;               /* keep 0 */
    double largest_fraction;        /* with TC_STATUS_SMALLER_INCREMENT: the largest fraction of
                                       this increment the routine expects to manage, in (0,1) */
    char message[TC_MESSAGE_LEN];   /* NUL-terminated text for the user, or empty */
} tc_report;

#ifdef TC_COMPLEX
#include <complex.h>
typedef double _Complex tc_real;
#define TC_NAME(x) x##_cx
#else
typedef double tc_real;
#define TC_NAME(x) x
#endif

/* Temperature at the start of the increment and its increment. */
typedef struct tc_temperature {
    tc_real start;
    tc_real increment;
} tc_temperature;

/* Energy densities at the end of the increment (per unit reference volume). */
typedef struct tc_energy {
    tc_real stored;
    tc_real dissipated;
} tc_energy;

/*
 * The routine's prototype. Array lengths: properties[nproperties], strain[ncomp],
 * dstrain[ncomp], stress0[ncomp], state0[nstate], stress[ncomp], state[nstate],
 * tangent[ncomp*ncomp], dstress_dtemp[ncomp]; temperature (start, increment) is read-only and
 * energy (stored, dissipated densities at the end of the increment) an output.
 */
typedef void (*tc_routine_fn)(const tc_call *call, const tc_real *properties,
                              const tc_real *strain, const tc_real *dstrain,
                              const tc_temperature *temperature, const tc_real *stress0,
                              const tc_real *state0, tc_real *stress, tc_real *state,
                              tc_real *tangent, tc_real *dstress_dtemp, tc_energy *energy,
                              tc_report *report);

#define TC_ROUTINE(name)                                                                     \
    void TC_NAME(name)(const tc_call *call, const tc_real *properties, const tc_real *strain, \
                       const tc_real *dstrain, const tc_temperature *temperature,            \
                       const tc_real *stress0, const tc_real *state0, tc_real *stress,       \
                       tc_real *state, tc_real *tangent, tc_real *dstress_dtemp,             \
                       tc_energy *energy, tc_report *report)

#endif /* TANCHECK_ROUTINE_H */
