/*
 * tancheck_finite.h -- the C ABI of a finite-strain material routine that tancheck can check.
 *
 * Beside the small-strain point routine of tancheck_routine.h, with the same conventions:
 * one C-callable procedure, read-only inputs, outputs arriving filled with NaN, tc_real and
 * TC_NAME for the complex-step twin (compile again with TC_COMPLEX defined; the library
 * then exports "x" and "x_cx"), and the same tc_report.
 *
 * Storage:
 *   f0[9], f1[9], rotation[9]   3x3 tensors, COLUMN-MAJOR: entry (i, j) at [i + 3*j]
 *   stress0[6], stress[6]       symmetric, order 11, 22, 33, 23, 13, 12
 *   tangent[n*n]                column-major, n = call->ntangent (6, or 9 for dP/dF):
 *                               tangent[i + n*j] = d stress-like[i] / d strain-like[j]; for
 *                               the 6-column measures the column of a shear (23, 13, 12)
 *                               holds the tensor component (the column of 12 holds C_ij12)
 *
 * Inputs: the deformation gradient at the start (f0) and end (f1) of the increment; the
 * rotation increment of the corotational frame the manifest declares (call->frame; the
 * identity without one); the stress at the start in the declared measure
 * (call->stress_measure); state; temperature; time. Outputs: the stress at the end in the
 * same measure, the state, the energies, and the tangent in the declared measure
 * (call->tangent_measure):
 *
 *   TC_TANGENT_TAU_JAUMANN      spatial tangent of the Jaumann rate of Kirchhoff stress
 *   TC_TANGENT_SIGMA_JAUMANN    the same divided by J = det F (paired with Cauchy stress)
 *   TC_TANGENT_TAU_TRUESDELL    spatial tangent of the Truesdell rate of Kirchhoff stress
 *   TC_TANGENT_SIGMA_TRUESDELL  the same divided by J
 *   TC_TANGENT_TAU_GREEN_NAGHDI spatial tangent of the Green-Naghdi rate of Kirchhoff stress
 *   TC_TANGENT_DP_DF            dP/dF, 9x9 (P and F column-major as 9-vectors)
 *   TC_TANGENT_DS_DE            dS/dE, second Piola-Kirchhoff against Green-Lagrange strain
 *
 * In the complex-step twin tancheck puts the perturbation into the imaginary part of f1
 * (and of the rotation increment it derives from f1).
 *
 * Versioning: TC_FINITE_ABI_VERSION changes only when this layout changes.
 */
#ifndef TANCHECK_FINITE_H
#define TANCHECK_FINITE_H

#include "tancheck_routine.h"

#define TC_FINITE_ABI_VERSION 1

#if TC_ROUTINE_ABI_VERSION < 2
#error "tancheck_finite.h needs tancheck_routine.h version 2 (tc_temperature, tc_energy)"
#endif

#define TC_STRESS_CAUCHY 0
#define TC_STRESS_KIRCHHOFF 1

#define TC_TANGENT_TAU_JAUMANN 0
#define TC_TANGENT_SIGMA_JAUMANN 1
#define TC_TANGENT_TAU_TRUESDELL 2
#define TC_TANGENT_SIGMA_TRUESDELL 3
#define TC_TANGENT_TAU_GREEN_NAGHDI 4
#define TC_TANGENT_DP_DF 5
#define TC_TANGENT_DS_DE 6

#define TC_FRAME_NONE 0
#define TC_FRAME_JAUMANN 1
#define TC_FRAME_GREEN_NAGHDI 2

/* Read-only description of one finite-strain call. */
typedef struct tc_finite_call {
    int32_t abi_version;     /* TC_FINITE_ABI_VERSION of the caller */
    int32_t nstate;          /* state variables */
    int32_t nproperties;     /* material properties */
    int32_t increment;       /* increment number along the path, from 1 */
    int32_t flags;           /* TC_WANT_* bits */
    int32_t stress_measure;  /* TC_STRESS_* */
    int32_t tangent_measure; /* TC_TANGENT_* */
    int32_t frame;           /* TC_FRAME_* */
    int32_t ntangent;        /* rows of the tangent: 6, or 9 for TC_TANGENT_DP_DF */
    int32_t reserved;        /* 0 */
    double time;             /* time at the start of the increment */
    double dtime;            /* time increment */
} tc_finite_call;

/*
 * The routine's prototype. properties[nproperties], f0[9], f1[9], rotation[9],
 * stress0[6], state0[nstate], stress[6], state[nstate], tangent[ntangent*ntangent].
 */
typedef void (*tc_finite_fn)(const tc_finite_call *call, const tc_real *properties,
                             const tc_real *f0, const tc_real *f1, const tc_real *rotation,
                             const tc_temperature *temperature, const tc_real *stress0,
                             const tc_real *state0, tc_real *stress, tc_real *state,
                             tc_real *tangent, tc_energy *energy, tc_report *report);

#define TC_FINITE_ROUTINE(name)                                                              \
    void TC_NAME(name)(const tc_finite_call *call, const tc_real *properties,                \
                       const tc_real *f0, const tc_real *f1, const tc_real *rotation,        \
                       const tc_temperature *temperature, const tc_real *stress0,            \
                       const tc_real *state0, tc_real *stress, tc_real *state,               \
                       tc_real *tangent, tc_energy *energy, tc_report *report)

#endif /* TANCHECK_FINITE_H */
