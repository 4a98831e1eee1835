/*
 * tancheck_block.h -- the C ABI of a block routine (explicit dynamics) that tancheck can check.
 *
 * A block routine updates a block of npoints material points in one call. It gets, for every
 * point, the strain at the start of the increment, its increment, the old stress, state and
 * specific energies, and the point's conditions (temperature and its increment, density,
 * characteristic length); it returns the new stress, state and specific energies and whether
 * the point is deleted. It returns no tangent: explicit solvers do not ask for one.
 *
 * Arrays are point by point: strain[p*ncomp + i] is component i of point p (0-based), and
 * state[p*nstate + k] state variable k of point p. Components in the order 11, 22, 33, 23, 13,
 * 12 (ncomp 6) or 11, 22, 33, 12 (ncomp 4), shear as engineering strain (gamma = 2 eps_ij).
 * Inputs are read-only; outputs arrive filled with NaN and the routine writes every entry of
 * stress, state, energy and deleted for every point.
 *
 * Energies are specific (per unit mass): energy.internal is the work done on the point so far
 * divided by its density, energy.dissipated the part of it dissipated. The routine adds the
 * increment to the old values; what it stores is internal - dissipated.
 *
 * The elastic response (the first call). A solver calls the routine once before the analysis
 * with block->time == 0, block->time_increment == 0 and TC_BLOCK_ELASTIC_RESPONSE set in
 * block->flags, and test strains in strain_increment. The routine then returns
 *     stress = stress_start + C(T) : strain_increment
 * with C(T) its elastic moduli at each point's temperature (conditions[p].temperature), and
 * state = state_start, energy = energy_start, deleted = 0: nothing is updated. The solver reads the
 * dilatational modulus from it to size its stable time increment (L / c, c = sqrt(M / density)).
 *
 * The complex-step twin: the same source compiled with TC_COMPLEX defined (tc_real becomes
 * double _Complex, TC_NAME(x) appends "_cx"). The conditions stay real: tancheck perturbs the
 * strain increment only.
 *
 * Versioning: TC_BLOCK_ABI_VERSION changes only when this layout changes; struct fields only
 * ever append. tancheck puts the version it speaks into block->abi_version.
 */
#ifndef TANCHECK_BLOCK_H
#define TANCHECK_BLOCK_H

#include <stdint.h>

#define TC_BLOCK_ABI_VERSION 1

/* Suffix of the complex-step twin's symbol (as for point routines). */
#define TC_BLOCK_TWIN_SUFFIX "_cx"

/* Length of the routine's message buffer, including the terminating NUL. */
#define TC_BLOCK_MESSAGE_LEN 96

/* Bits of tc_block.flags. */
#define TC_BLOCK_ELASTIC_RESPONSE 1 /* the first call: return the elastic response only */

/* Status codes a routine may return in tc_block_report.status. */
#define TC_BLOCK_STATUS_OK 0
#define TC_BLOCK_STATUS_SMALLER_INCREMENT 1 /* see tc_block_report.largest_fraction */
#define TC_BLOCK_STATUS_FAILED 2           /* the routine could not compute this increment */

/* Read-only description of one call. */
typedef struct tc_block {
    int32_t abi_version; /* TC_BLOCK_ABI_VERSION of the caller */
    int32_t npoints;     /* points in this block, >= 1 */
    int32_t ncomp;       /* stress/strain components per point: 6 or 4 */
    int32_t nstate;      /* state variables per point */
    int32_t nproperties; /* material properties (shared by the block) */
    int32_t increment;   /* increment number, from 1; 0 for the elastic response */
    int32_t flags;       /* TC_BLOCK_* bits */
    int32_t reserved;    /* 0 */
    double time;         /* time at the start of the increment */
    double time_increment;
} tc_block;

/* The conditions of one point (read-only; never perturbed, so real in the twin too). */
typedef struct tc_point_conditions {
    double temperature;           /* at the start of the increment */
    double temperature_increment; /* over the increment */
    double density;               /* > 0 */
    double characteristic_length; /* of the element the point stands for, > 0 */
} tc_point_conditions;

/* What the routine reports for the block. Written by the routine. */
typedef struct tc_block_report {
    int32_t status;             /* TC_BLOCK_STATUS_*; tancheck sets 0 before the call */
    int32_t point;              /* 0-based point the status is about, or -1 (set before) */
    int32_t reserved[2];        /* keep 0 */
    double largest_fraction;    /* with SMALLER_INCREMENT: largest admissible fraction of it */
    char message[TC_BLOCK_MESSAGE_LEN]; /* NUL-terminated text for the user, or empty */
} tc_block_report;

/* Fail the call at point `point` (0-based, or -1 for the whole block) with a message, cut to
 * fit TC_BLOCK_MESSAGE_LEN (the C counterpart of the Fortran module's tc_block_set_message). */
static inline void tc_block_fail(tc_block_report *report, int32_t point, const char *text)
{
    report->status = TC_BLOCK_STATUS_FAILED;
    report->point = point;
    int k = 0;
    for (const char *c = text; *c != '\0' && k < TC_BLOCK_MESSAGE_LEN - 1; ++c) report->message[k++] = *c;
    report->message[k] = '\0';
}

#ifndef TC_NAME
#ifdef TC_COMPLEX
#include <complex.h>
typedef double _Complex tc_real;
#define TC_NAME(x) x##_cx
#else
typedef double tc_real;
#define TC_NAME(x) x
#endif
#endif

/* Specific energies of one point (per unit mass). */
typedef struct tc_specific_energy {
    tc_real internal;   /* work done on the point per unit mass */
    tc_real dissipated; /* the dissipated part of it; never decreases */
} tc_specific_energy;

/*
 * The routine's prototype. With n = npoints, c = ncomp, s = nstate:
 * properties[nproperties], strain[n*c] (at the start), strain_increment[n*c], stress_start[n*c],
 * state_start[n*s], energy_start[n], conditions[n]; outputs stress[n*c], state[n*s], energy[n],
 * deleted[n] (1: the point is deleted, 0: active).
 */
#define TC_BLOCK_ROUTINE(name)                                                                 \
    void TC_NAME(name)(const tc_block *block, const tc_real *properties, const tc_real *strain, \
                       const tc_real *strain_increment, const tc_real *stress_start,             \
                       const tc_real *state_start, const tc_specific_energy *energy_start,         \
                       const tc_point_conditions *conditions, tc_real *stress, tc_real *state, \
                       tc_specific_energy *energy, int32_t *deleted, tc_block_report *report)

typedef void (*tc_block_fn)(const tc_block *block, const tc_real *properties,
                            const tc_real *strain, const tc_real *strain_increment,
                            const tc_real *stress_start, const tc_real *state_start,
                            const tc_specific_energy *energy_start,
                            const tc_point_conditions *conditions, tc_real *stress,
                            tc_real *state, tc_specific_energy *energy, int32_t *deleted,
                            tc_block_report *report);

#endif /* TANCHECK_BLOCK_H */
