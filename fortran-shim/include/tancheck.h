/*
 * tancheck.h -- the C API of tancheck: check a material routine's tangent in-process.
 *
 * A test program (C, or Fortran through the module tancheck_api) hands tancheck a routine of
 * the routine ABI (tancheck_routine.h) as a function pointer, with its conventions,
 * properties, start state and a strain path. tancheck drives the routine along the path,
 * differentiates its stress update numerically, compares with the tangent it returns and
 * answers with a verdict, an exit code and the whole report as JSON. Every call of the
 * routine goes through tancheck's guarded trampoline (a crash ends the call, not the
 * program) and its memory guards (writes past an array, writes to inputs, outputs left
 * unwritten, and at TCK_GUARD_FULL reads past the inputs).
 *
 *     tck_options opts;
 *     tck_options_init(&opts);
 *     opts.nproperties = 7;  opts.properties = properties;  opts.nstate = 13;
 *     tck_result *result = NULL;
 *     if (tck_check(&result, my_routine, (tck_twin_fn)my_routine_cx, &opts) != TCK_OK) {
 *         fprintf(stderr, "%s\n", tck_last_error());
 *         return 2;
 *     }
 *     printf("%s\n", tck_result_summary(result));
 *     int code = tck_result_exit_code(result);
 *     tck_result_free(result);
 *
 * Conventions (as in every tck_ header to come):
 *   - Every exported name starts with tck_ (functions, types) or TCK_ (macros, constants).
 *   - Functions that can fail return an int status: TCK_OK (0) or one of tck_status. The
 *     message of the last failure on the calling thread is tck_last_error().
 *   - Output parameters come first.
 *   - Handles (tck_result) are made and freed by the library; never free() them.
 *   - Strings returned as const char * belong to the library and stay valid as the function
 *     says; the caller never frees them.
 *   - Option structs start with a version field; tck_options_init fills it and every default.
 *     New fields are only ever appended.
 *   - Enumerations have explicit values that never change; new ones are only added.
 *
 * Threads: any thread may run a check; results and handles are not shared between threads
 * while in use. A routine checked on a thread runs on that thread.
 */
#ifndef TANCHECK_H
#define TANCHECK_H

#ifdef TC_COMPLEX
#error "include tancheck.h without TC_COMPLEX: tc_routine_fn must be the real routine type"
#endif

#include <stddef.h>
#include <stdint.h>

#include "tancheck_routine.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- versions ---------------------------------------------------------------------- */

/* The version of this header (compile time); tck_version gives the library's (run time). */
#define TCK_VERSION_MAJOR 0
#define TCK_VERSION_MINOR 1
#define TCK_VERSION_PATCH 0

/* The layout version of tck_options this header describes. Version 2 renamed v1's nprop and
 * props to nproperties and properties (same layout; the library still accepts version 1). */
#define TCK_OPTIONS_VERSION 2

/* The library's version. Any pointer may be NULL. */
void tck_version(int32_t *major, int32_t *minor, int32_t *patch);

/* The library's version as text, e.g. "0.1.0". Static; never freed. */
const char *tck_version_string(void);

/* ---- status codes and errors ------------------------------------------------------- */

typedef enum tck_status {
    TCK_OK = 0,
    TCK_ERROR_NULL = 1,      /* a required pointer argument is NULL */
    TCK_ERROR_VERSION = 2,   /* tck_options.version is not one this library knows */
    TCK_ERROR_INVALID = 3,   /* an option or argument has an unusable value (the message says which) */
    TCK_ERROR_GUARD = 4,     /* the crash guard could not be installed (signal handlers) */
    TCK_ERROR_BUFFER = 5,    /* a caller's buffer is too small; the needed length was returned */
    TCK_ERROR_INTERNAL = 6   /* a fault inside tancheck itself; please report it */
} tck_status;

/* The message of the last failed tck_ call on this thread, or "" when none has failed. It
 * stays valid until the next failing tck_ call on this thread. Never NULL. */
const char *tck_last_error(void);

/* ---- what is checked --------------------------------------------------------------- */

/* The kind of material point: which components the routine receives. */
typedef enum tck_kind {
    TCK_KIND_SOLID_3D = 1,     /* 11, 22, 33, 23, 13, 12 */
    TCK_KIND_PLANE_STRAIN = 2, /* 11, 22, 33, 12 (eps33 stays 0) */
    TCK_KIND_AXISYMMETRIC = 3, /* 11 radial, 22 axial, 33 hoop, 12 */
    TCK_KIND_PLANE_STRESS = 4, /* 11, 22, 12 */
    TCK_KIND_UNIAXIAL = 5,     /* 11 */
    TCK_KIND_COHESIVE_3D = 6,  /* opening, slip 1, slip 2 */
    TCK_KIND_COHESIVE_2D = 7   /* opening, slip */
} tck_kind;

/* Components, for tck_options.order: the tensor indices for solids. */
typedef enum tck_component {
    TCK_COMPONENT_OPENING = 1,
    TCK_COMPONENT_SLIP1 = 2,
    TCK_COMPONENT_SLIP2 = 3,
    TCK_COMPONENT_11 = 11,
    TCK_COMPONENT_12 = 12,
    TCK_COMPONENT_13 = 13,
    TCK_COMPONENT_22 = 22,
    TCK_COMPONENT_23 = 23,
    TCK_COMPONENT_33 = 33
} tck_component;

/* How the routine measures shear strain. */
typedef enum tck_shear {
    TCK_SHEAR_ENGINEERING = 0, /* gamma = 2 eps */
    TCK_SHEAR_TENSOR = 1       /* eps */
} tck_shear;

/* Built-in path shapes (directions in tensor components 11, 22, 33, 23, 13, 12). */
typedef enum tck_shape {
    TCK_SHAPE_DEFAULT = 0,         /* the kind's own, as the command line's: tension-shear; a bar
                                      uniaxial-strain; a cohesive point mixed-mode (its one slip
                                      for cohesive-2d); entries the kind lacks left out */
    TCK_SHAPE_UNIAXIAL_STRAIN = 1, /* eps11 */
    TCK_SHAPE_SHEAR_12 = 2,        /* eps12 */
    TCK_SHAPE_BIAXIAL = 3,         /* eps11 = eps22 */
    TCK_SHAPE_HYDROSTATIC = 4,     /* eps11 = eps22 = eps33 */
    TCK_SHAPE_TENSION_SHEAR = 5,   /* eps11, eps12 = eps11/2, eps13 = 0.15 eps11, eps23 = -eps11/4 */
    TCK_SHAPE_MIXED_MODE = 6,      /* slots 11, 22, 33 as 1, 0.75, 0.375: a cohesive opening with
                                      its slips; a solid's triaxial normal strain */
    TCK_SHAPE_UNIAXIAL_STRESS = 7  /* eps11 prescribed, every other stress held at zero */
} tck_shape;

/* Derivative schemes: an index into tck_options.rel_step and .tol, and (as 1 << index) a bit
 * of tck_options.schemes. */
typedef enum tck_scheme {
    TCK_SCHEME_FORWARD = 0,      /* (f(x+h) - f(x)) / h */
    TCK_SCHEME_BACKWARD = 1,     /* (f(x) - f(x-h)) / h */
    TCK_SCHEME_CENTRAL = 2,      /* (f(x+h) - f(x-h)) / 2h */
    TCK_SCHEME_CENTRAL4 = 3,     /* five-point central difference */
    TCK_SCHEME_RICHARDSON = 4,   /* Richardson extrapolation of central at h and h/2 */
    TCK_SCHEME_COMPLEX_STEP = 5  /* Im f(x+ih) / h; needs the complex twin */
} tck_scheme;

/* Room for schemes in tck_options.rel_step and .tol. */
#define TCK_SCHEME_SLOTS 8

/* How much the memory guards check around every routine call. */
typedef enum tck_guard_level {
    TCK_GUARD_OFF = 0,   /* none: the routine gets tancheck's buffers directly */
    TCK_GUARD_LIGHT = 1, /* writes past arrays, writes to inputs, outputs left unwritten */
    TCK_GUARD_FULL = 2   /* light, and every call twice to find reads past the inputs */
} tck_guard_level;

/* Everything about one check. Make one with tck_options_init, then set what differs.
 * Arrays are read during tck_check only; tancheck keeps no pointer to them afterwards. */
typedef struct tck_options {
    int32_t version;            /* TCK_OPTIONS_VERSION (set by tck_options_init) */

    /* the routine's conventions */
    int32_t kind;               /* tck_kind; default TCK_KIND_SOLID_3D */
    int32_t shear;              /* tck_shear; default TCK_SHEAR_ENGINEERING */
    int32_t norder;             /* entries in order; 0: the kind's default order */
    const int32_t *order;       /* tck_component values in the routine's order, or NULL */
    const char *name;           /* name for the report (UTF-8), or NULL for "routine" */

    /* material and start state */
    int32_t nproperties;        /* properties */
    int32_t nstate;             /* state variables */
    const double *properties;   /* nproperties values (may be NULL when nproperties is 0) */
    const double *state0;       /* nstate start values, or NULL for zeros */
    const double *strain0;      /* start strain, ncomp values in the routine's order and shear
                                   measure, or NULL for zeros */
    const double *stress0;      /* start stress, ncomp values, or NULL for zeros */
    double temperature;         /* start temperature; default 0 */

    /* the path: the built-in shape, unless increments is given */
    int32_t shape;              /* tck_shape; default TCK_SHAPE_DEFAULT */
    int32_t steps;              /* increments out to peak; default 8 */
    int32_t back;               /* increments back to zero; default 4 */
    int32_t nincrements;        /* rows of increments */
    double peak;                /* size of the leading component at the peak; default 4e-3 */
    const double *increments;   /* nincrements x 6 tensor strain increments, row by row, in
                                   components 11, 22, 33, 23, 13, 12 (tensor shear; cohesive:
                                   opening, slip 1, slip 2, 0, 0, 0), or NULL */
    const double *increment_dtemp; /* nincrements temperature increments, or NULL for zeros */
    const double *increment_dtime; /* nincrements time increments, or NULL for ones */

    /* how the tangent is judged */
    int32_t schemes;            /* bits 1 << tck_scheme; default central and complex step */
    int32_t guard_level;        /* tck_guard_level; default TCK_GUARD_LIGHT */
    double rel_step[TCK_SCHEME_SLOTS]; /* step relative to the strain scale, by tck_scheme */
    double tol[TCK_SCHEME_SLOTS];      /* pass when every error is at most this, by tck_scheme */
    int32_t diagnose;           /* nonzero: a failing check gets a closer look; default 1 */
    int32_t fp_traps;           /* nonzero: trap invalid, divide-by-zero and overflow in the
                                   routine (a SIGFPE is a routine fault); default 0 */
} tck_options;

/* Fill opts with TCK_OPTIONS_VERSION and every default. TCK_ERROR_NULL when opts is NULL. */
int tck_options_init(tck_options *opts);

/* The complex-step twin (the routine compiled with TC_COMPLEX, tc_real = double _Complex),
 * passed as a generic function pointer: (tck_twin_fn)my_routine_cx. */
typedef void (*tck_twin_fn)(void);

/* ---- running a check --------------------------------------------------------------- */

/* The outcome of one check. Made by tck_check, freed by tck_result_free. */
typedef struct tck_result tck_result;

/* The verdict; the values are the exit codes of the tancheck command. */
typedef enum tck_verdict {
    TCK_VERDICT_PASS = 0,            /* every check passed and the guards found nothing */
    TCK_VERDICT_TANGENT_FAILURE = 1, /* at least one tangent check failed */
    TCK_VERDICT_ROUTINE_FAULT = 3,   /* the routine crashed, failed, or misbehaved (guards) */
    TCK_VERDICT_TWIN_NOT_SAFE = 4    /* the tangent agrees with the real differences, but the
                                        complex-step twin is not complex-step safe */
} tck_verdict;

/*
 * Check `routine` (and, when `twin` is not NULL, use its complex-step twin) as `opts` says.
 * On TCK_OK, *out is a new result, whatever the verdict: a failing tangent or a crashing
 * routine is a verdict, not an error. On failure *out is NULL and tck_last_error() says why
 * (bad options, mostly).
 */
int tck_check(tck_result **out, tc_routine_fn routine, tck_twin_fn twin, const tck_options *opts);

/* Free a result (NULL is allowed). Its strings become invalid. */
void tck_result_free(tck_result *result);

/* The verdict (tck_verdict), or -1 for a NULL result. */
int tck_result_verdict(const tck_result *result);

/* The exit code the tancheck command would give: 0 pass, 1 tangent failure, 3 routine
 * fault, 4 twin not complex-step safe; 2 for a NULL result. */
int tck_result_exit_code(const tck_result *result);

/* One line for people: the verdict word, the routine, each scheme's worst error and
 * tolerance, the first fault or guard finding. Valid until the result is freed. */
const char *tck_result_summary(const tck_result *result);

/* The whole report as JSON (UTF-8, NUL-terminated): the tancheck report model plus a
 * "guard" object with the guard level, the extra calls and the findings. Valid until the
 * result is freed. NULL for a NULL result. */
const char *tck_result_json(const tck_result *result);

/* The JSON copied into buf (size bytes, NUL included). *length (when not NULL) gets the
 * JSON's length without the NUL. With size 0 (buf may then be NULL) only the length is
 * returned, with TCK_OK. TCK_ERROR_BUFFER when 0 < size <= length: buf then holds the first
 * size - 1 bytes and a NUL. */
int tck_result_json_copy(const tck_result *result, char *buf, size_t size, size_t *length);

/* Guard findings: what the routine did wrong besides its tangent. */
size_t tck_result_finding_count(const tck_result *result);

/* Finding `index` (from 0) as a sentence, or NULL when out of range. Valid until the result
 * is freed. */
const char *tck_result_finding(const tck_result *result, size_t index);

#ifdef __cplusplus
}
#endif

#endif /* TANCHECK_H */
