/*
 * guard.c -- the guarded trampoline through which tancheck calls a material routine.
 *
 * A routine that crashes (writes through a bad pointer, traps on a floating-point
 * exception, calls abort, runs out of stack) should end one call, not the whole check.
 * Every call into a loaded routine goes through tc_guard_call_real or tc_guard_call_complex.
 * The trampoline marks the thread as "inside a guarded call", sets a jump point with
 * sigsetjmp in its own frame and calls the routine. When SIGSEGV, SIGBUS, SIGFPE, SIGILL or
 * SIGABRT arrives on that thread while the mark is set, the handler records the signal and
 * jumps back to the trampoline, which returns a filled tc_guard_result. The jump crosses only
 * the routine's frames (C or Fortran), never a Rust frame.
 *
 * A signal that arrives outside a guarded call goes to the handler that was installed before
 * ours (for SIGSEGV and SIGBUS that is normally the Rust runtime's stack-overflow reporter),
 * or gets the default action. Handlers run on the alternate signal stack; the trampoline
 * gives a thread one when it has none, so that a stack overflow inside a routine is caught.
 *
 * Optionally the call runs with floating-point traps for invalid operation, division by
 * zero and overflow. After the call, however it ended, the exception flags are cleared and
 * the caller's trap mask (and, after a caught signal, its rounding mode) is restored.
 *
 * A routine that calls exit() during a guarded call (a Fortran STOP or ERROR STOP, a
 * failed run-time check of the Fortran library) cannot be turned into a status: the process
 * is going away. The guard then writes a message naming the routine to stderr and ends the
 * process with TC_GUARD_EXIT_STATUS, so that a STOP can never look like a successful check.
 *
 * Armed by the tancheck program (tc_guard_arm), the guard also watches the whole process:
 * an exit() from any thread, or from a library's constructor while it loads, a SIGABRT
 * (heap corruption found by the C library, abort) inside a call, and a fatal signal outside
 * a call all end the process with "last words": the fault line with the increment and the
 * inputs of the call that was running, and a JSON report naming the fault, written from
 * static buffers with plain write(2). Call counters and the pointer to the running call's
 * arguments, one set per thread on a cache line of its own (watch_slot), let a watchdog
 * thread see a call that never returns; it sums the threads' counters.
 *
 * The hot path allocates nothing and makes no system call: sigsetjmp saves no signal mask,
 * handlers are installed once per process and the alternate stack and watch slot once per
 * thread; the watch costs two atomic increments and three stores per call, all on the
 * calling thread's own line (threads calling at once do not pass a line between cores).
 */
#define _GNU_SOURCE
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <fenv.h>
#include <pthread.h>
#include <setjmp.h>
#include <signal.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#if defined(__linux__)
#include <ucontext.h>
#include <sys/prctl.h>
#include <sys/uio.h>
#endif
#include <unistd.h>

#include "tancheck_routine.h"

/* Exit status of a process whose routine called exit() during a guarded call. */
#define TC_GUARD_EXIT_STATUS 70

/* Portable kinds of caught signal (the numbers differ between systems). */
#define TC_GUARD_SEGV 1
#define TC_GUARD_BUS 2
#define TC_GUARD_FPE 3
#define TC_GUARD_ILL 4
#define TC_GUARD_ABRT 5

/* Portable details of a caught signal, from si_code. 0 is "nothing more known". */
#define TC_GUARD_SEGV_MAPERR 1 /* address not mapped */
#define TC_GUARD_SEGV_ACCERR 2 /* mapped, but not with that access */
#define TC_GUARD_SEGV_STACK 3  /* the address lies in the thread's stack guard region */
#define TC_GUARD_BUS_ADRALN 1
#define TC_GUARD_BUS_ADRERR 2
#define TC_GUARD_BUS_OBJERR 3
#define TC_GUARD_FPE_INTDIV 1
#define TC_GUARD_FPE_INTOVF 2
#define TC_GUARD_FPE_FLTDIV 3
#define TC_GUARD_FPE_FLTOVF 4
#define TC_GUARD_FPE_FLTUND 5
#define TC_GUARD_FPE_FLTRES 6
#define TC_GUARD_FPE_FLTINV 7
#define TC_GUARD_FPE_FLTSUB 8
#define TC_GUARD_ILL_OPCODE 1 /* illegal opcode or operand, e.g. a compiler-inserted trap */
#define TC_GUARD_ILL_PRIV 2   /* privileged instruction or register */
#define TC_GUARD_ILL_OTHER 3

/* The arguments of one routine call, in ABI order, plus the guard's own options.
 * Mirrored by GuardArgs in crates/tancheck-abi/src/guard.rs. */
typedef struct tc_guard_args {
    const tc_call *call;
    const void *props;
    const void *strain;
    const void *dstrain;
    const void *temp;
    const void *stress0;
    const void *state0;
    void *stress;
    void *state;
    void *tangent;
    void *dstress_dtemp;
    void *energy;
    tc_report *report;
    const char *label; /* NUL-terminated routine name for the exit() message, or NULL */
    int32_t fp_traps;  /* nonzero: trap FE_INVALID, FE_DIVBYZERO, FE_OVERFLOW in the call */
    int32_t reserved;
} tc_guard_args;

/* tc_guard_args.reserved of a finite-strain call (tancheck_finite.h): `call` then points at a
 * tc_finite_call, and the arrays are properties, f0, f1 (in strain, dstrain), temperature,
 * stress0, state0, stress, state, tangent, rotation (in dstress_dtemp), energy, report. */
#define TC_GUARD_LAYOUT_FINITE 1

/* The leading fields of tc_finite_call (tancheck_finite.h), mirrored here so that the guard
 * does not depend on that header; tc_guard_layout reports its size for the Rust side. */
typedef struct guard_finite_call {
    int32_t abi_version, nstate, nproperties, increment, flags;
    int32_t stress_measure, tangent_measure, frame, ntangent, reserved;
    double time, dtime;
} guard_finite_call;

static inline const guard_finite_call *finite_call_of(const tc_guard_args *a) {
    return (a != NULL && a->reserved == TC_GUARD_LAYOUT_FINITE) ? (const guard_finite_call *)(const void *)a->call
                                                                : NULL;
}

/* How a guarded call ended. Mirrored by GuardResult in guard.rs. */
typedef struct tc_guard_result {
    int32_t caught; /* 0: the routine returned; 1: a signal ended the call */
    int32_t signal; /* the signal number */
    int32_t kind;   /* TC_GUARD_SEGV ... */
    int32_t detail; /* TC_GUARD_*_* from si_code */
    int32_t code;   /* raw si_code */
    int32_t reserved;
    uint64_t address; /* si_addr for SIGSEGV, SIGBUS, SIGFPE and SIGILL; else 0 */
    uint64_t pc;      /* the interrupted instruction (from the signal context), or 0 */
} tc_guard_result;

/* tc_temperature and tc_energy of the complex-step twin (tc_real = double _Complex). */
typedef struct tc_guard_temperature_cx {
    _Complex double start;
    _Complex double increment;
} tc_guard_temperature_cx;
typedef struct tc_guard_energy_cx {
    _Complex double stored;
    _Complex double dissipated;
} tc_guard_energy_cx;

typedef void (*tc_guard_cx_fn)(const tc_call *call, const _Complex double *properties,
                               const _Complex double *strain, const _Complex double *dstrain,
                               const tc_guard_temperature_cx *temperature,
                               const _Complex double *stress0, const _Complex double *state0,
                               _Complex double *stress, _Complex double *state,
                               _Complex double *tangent, _Complex double *dstress_dtemp,
                               tc_guard_energy_cx *energy, tc_report *report);

/* ---- per-thread state -------------------------------------------------------------- */

typedef struct guard_thread {
    sigjmp_buf *volatile jump;      /* where the handler lands; valid while inside != 0 */
    volatile sig_atomic_t inside;   /* nonzero during the routine call */
    const char *volatile label;     /* routine name of the current call */
    volatile int sig, code;
    void *volatile addr;
    void *volatile pc;
    int prepared;                   /* alternate stack and stack bounds are set up */
    struct watch_slot *slot;        /* this thread's calls (see watch_slot) */
    uintptr_t stack_lo;             /* lowest usable address of this thread's stack, or 0 */
    uintptr_t stack_hi;             /* the address just past its highest, or 0 */
    sigjmp_buf *volatile probe;     /* a read of the last words that may fault lands here */
} guard_thread;

/* initial-exec: the handler must reach the variable without a lazy allocation. */
static __thread guard_thread tc_thread __attribute__((tls_model("initial-exec")));

#define GUARD_FENCE() __atomic_signal_fence(__ATOMIC_SEQ_CST)

/* ---- process-wide state ------------------------------------------------------------ */

static const int guarded_signals[] = {SIGSEGV, SIGBUS, SIGFPE, SIGILL, SIGABRT};
#define N_GUARDED ((int)(sizeof guarded_signals / sizeof guarded_signals[0]))

static struct sigaction previous[N_GUARDED]; /* handlers in place before ours */
static pthread_once_t install_once = PTHREAD_ONCE_INIT;
static pthread_key_t altstack_key;
static int install_error; /* errno of a failed sigaction, 0 when all went well */

static int slot_of(int sig) {
    for (int i = 0; i < N_GUARDED; i++)
        if (guarded_signals[i] == sig) return i;
    return -1;
}

static void write_stderr(const char *s) {
    size_t n = strlen(s);
    while (n > 0) {
        ssize_t w = write(2, s, n);
        if (w <= 0) {
            if (w < 0 && errno == EINTR) continue;
            return;
        }
        s += w;
        n -= (size_t)w;
    }
}

/* ---- the watch: call counters, the current call, last words ------------------------ */

/* What tancheck is doing, set by the program (tc_guard_set_phase); 0: not armed. */
#define TC_PHASE_OFF 0
#define TC_PHASE_STARTING 1
#define TC_PHASE_LOADING 2
#define TC_PHASE_CHECKING 3
#define TC_PHASE_REPORTING 4

#define LW_PATH 4352
static int watch_phase;                        /* TC_PHASE_*, atomic */
/* The calls of one thread: each thread writes only its own slot, on a cache line of its own,
 * so that threads calling the routine at once do not pass one line between the cores. The
 * watch sums the slots. A thread takes a free slot when it is prepared and frees it when it
 * ends (the counts stay in the slot: its next owner counts on from them). Threads beyond
 * WATCH_SLOTS share the last slot (the counters are atomic, so the sums stay right). */
#define WATCH_SLOTS 64
typedef struct watch_slot {
    uint64_t begun, ended;      /* atomic; a call of this thread runs while they differ */
    const tc_guard_args *args;  /* the running call's arguments, atomic (NULL: block call) */
    int complex_call;           /* the running call is the complex twin */
    int increment;              /* increment of the thread's last call begun */
    int npoints;                /* points of the running block call; 0 for a point call */
    int owned;                  /* atomic: a thread holds the slot */
    int sweep_column;           /* atomic: the strain column a sweep's running call moves, or -1 */
    double sweep_step;          /* atomic: and by how much (the imaginary part in the twin) */
} __attribute__((aligned(64))) watch_slot;
static watch_slot watch_slots[WATCH_SLOTS];
static int watch_used;                         /* atomic: slots ever handed out */
static pthread_key_t watch_key;                /* frees the thread's slot when it ends */
static int tool_stdout = -1;                   /* tancheck's own standard output */
static char lw_label[512];                     /* routine name for messages outside calls */
static char lw_head[16384];                    /* the JSON report's opening, from the program */
static char lw_report[LW_PATH];                /* where the JSON report goes, "" for nowhere */
static char lw_tmp[LW_PATH];                   /* the program's temporary name for it */
static char lw_own_tmp[LW_PATH + 8];           /* the last words' own temporary name for it */
static int lw_json_stdout;                     /* the JSON report goes to standard output */
static char lw_remove[8][LW_PATH];             /* removed on SIGINT/SIGTERM (files, then folders) */
static int lw_nremove;
static volatile sig_atomic_t stop_signal;      /* a stop signal that arrived while deferred */
static volatile sig_atomic_t defer_stop;       /* record stop signals instead of acting on them */
static int dying;                              /* atomic: last words are being written */
static char lw_buf[96 * 1024];                 /* the text, then the JSON of the last words */
static size_t lw_len;

static int tc_armed(void) { return __atomic_load_n(&watch_phase, __ATOMIC_RELAXED) != TC_PHASE_OFF; }

/* The calling thread's slot (set by prepare_thread). */
static inline watch_slot *own_slot(void) { return tc_thread.slot; }

/* Count a call begun or ended in the calling thread's slot `c` (begun or ended). A slot of its
 * own has one writer: a load and a release store are enough (the watch reads with acquire),
 * and cost no locked instruction, which took some 20 cycles twice per call. The last slot,
 * which threads beyond WATCH_SLOTS share with its owner, is counted atomically. */
static inline void slot_count(uint64_t *c) {
    if (c >= &watch_slots[WATCH_SLOTS - 1].begun) {
        __atomic_fetch_add(c, 1, __ATOMIC_RELEASE);
    } else {
        __atomic_store_n(c, __atomic_load_n(c, __ATOMIC_RELAXED) + 1, __ATOMIC_RELEASE);
    }
}

static inline void watch_enter_slot(const tc_guard_args *a, int complex_call, int increment, int npoints) {
    watch_slot *s = own_slot();
    __atomic_store_n(&s->args, a, __ATOMIC_RELAXED);
    __atomic_store_n(&s->complex_call, complex_call, __ATOMIC_RELAXED);
    __atomic_store_n(&s->increment, increment, __ATOMIC_RELAXED);
    __atomic_store_n(&s->npoints, npoints, __ATOMIC_RELAXED);
    __atomic_store_n(&s->sweep_column, -1, __ATOMIC_RELAXED);
    slot_count(&s->begun);
}

/* A sweep's call: the column it moves and the step, for the last words of a call that hangs
 * or crashes there (they read "perturbation": null beside a moved dstrain; a user-style
 * sweep). After watch_enter. */
static inline void watch_sweep_call(int column, double step) {
    watch_slot *s = own_slot();
    __atomic_store(&s->sweep_step, &step, __ATOMIC_RELAXED);
    __atomic_store_n(&s->sweep_column, column, __ATOMIC_RELAXED);
}

static inline void watch_enter(const tc_guard_args *a, int complex_call) {
    const guard_finite_call *fc = finite_call_of(a);
    watch_enter_slot(a, complex_call,
                     fc != NULL ? fc->increment : (a->call != NULL ? a->call->increment : -1), 0);
}

static inline void watch_leave(void) { slot_count(&own_slot()->ended); }

/* The sums over the slots: calls ended (read first, so that it never exceeds calls begun),
 * calls begun, and a slot whose call runs (the calling thread's first), or NULL. `last` gets
 * the slot of the most calls begun, for the increment of the last call. */
static int lw_hung_slot = -1; /* atomic: the slot whose call the watchdog found hung */

static void watch_sums(uint64_t *begun, uint64_t *ended, watch_slot **running, watch_slot **last) {
    int used = __atomic_load_n(&watch_used, __ATOMIC_ACQUIRE);
    if (used > WATCH_SLOTS) used = WATCH_SLOTS;
    uint64_t e = 0, b = 0, most = 0;
    watch_slot *run = NULL, *top = NULL;
    for (int i = 0; i < used; i++) e += __atomic_load_n(&watch_slots[i].ended, __ATOMIC_ACQUIRE);
    for (int i = 0; i < used; i++) {
        watch_slot *s = &watch_slots[i];
        const uint64_t sb = __atomic_load_n(&s->begun, __ATOMIC_ACQUIRE);
        b += sb;
        if (sb != __atomic_load_n(&s->ended, __ATOMIC_ACQUIRE) && (run == NULL || s == tc_thread.slot)) run = s;
        if (top == NULL || sb > most) {
            most = sb;
            top = s;
        }
    }
    *begun = b;
    *ended = e;
    if (running != NULL) *running = run;
    if (last != NULL) *last = top;
}

static void copy_string(char *dst, size_t cap, const char *src) {
    size_t i = 0;
    if (src != NULL)
        for (; src[i] != '\0' && i + 1 < cap; i++) dst[i] = src[i];
    dst[i] = '\0';
}

static void put(const char *s) {
    while (s != NULL && *s != '\0' && lw_len + 1 < sizeof lw_buf) lw_buf[lw_len++] = *s++;
    lw_buf[lw_len] = '\0';
}

/* A string inside JSON quotes. */
static void put_escaped(const char *s) {
    char one[8];
    for (; s != NULL && *s != '\0'; s++) {
        unsigned char c = (unsigned char)*s;
        if (c == '"' || c == '\\') {
            one[0] = '\\';
            one[1] = (char)c;
            one[2] = '\0';
        } else if (c < 0x20) {
            static const char hex[] = "0123456789abcdef";
            one[0] = '\\';
            one[1] = 'u';
            one[2] = '0';
            one[3] = '0';
            one[4] = hex[c >> 4];
            one[5] = hex[c & 15];
            one[6] = '\0';
        } else {
            one[0] = (char)c;
            one[1] = '\0';
        }
        put(one);
    }
}

static void put_int(long long v) {
    char d[24];
    int n = 0;
    unsigned long long u = v < 0 ? 0ull - (unsigned long long)v : (unsigned long long)v;
    do {
        d[n++] = (char)('0' + u % 10);
        u /= 10;
    } while (u > 0 && n < 22);
    if (v < 0) put("-");
    char out[24];
    for (int i = 0; i < n; i++) out[i] = d[n - 1 - i];
    out[n] = '\0';
    put(out);
}

/* A number (JSON null when not finite), in the fewest of 15, 16 or 17 significant digits that
 * read back as the same double (%g drops trailing zeros, so 15 covers every shorter form:
 * 0.3, not 0.29999999999999999). snprintf and strtod on stack buffers: no allocation. */
static void put_real(double x) {
    char b[40];
    if (x != x || x - x != 0.0) {
        put("null");
        return;
    }
    for (int digits = 15; digits <= 17; digits++) {
        snprintf(b, sizeof b, "%.*g", digits, x);
        if (digits == 17 || strtod(b, NULL) == x) break;
    }
    put(b);
}

/* `n` values of a call's array: real, or the real parts of a complex one. */
static void put_array(const void *p, long n, int complex_call) {
    put("[");
    for (long i = 0; p != NULL && i < n && i < 4096; i++) {
        if (i > 0) put(", ");
        put_real(complex_call ? ((const double *)p)[2 * i] : ((const double *)p)[i]);
    }
    put("]");
}

static void write_fd(int fd, const char *s, size_t n) {
    while (n > 0) {
        ssize_t w = write(fd, s, n);
        if (w <= 0) {
            if (w < 0 && errno == EINTR) continue;
            return;
        }
        s += w;
        n -= (size_t)w;
    }
}

static const char *signal_name(int sig) {
    switch (sig) {
    case SIGSEGV: return "SIGSEGV";
    case SIGBUS: return "SIGBUS";
    case SIGFPE: return "SIGFPE";
    case SIGILL: return "SIGILL";
    case SIGABRT: return "SIGABRT";
    default: return "a signal";
    }
}

/* ---- another thread's running call, copied ---------------------------------------- */

/* Entries of an array the last words copy and show (as put_array). */
#define LW_MAX_ENTRIES 4096

/* `n` bytes at `src` into `dst` by a plain copy, with a fault in it caught by the guard's
 * handler (which lands on `probe` instead of ending the process): 0, or -1 when it faulted. */
static int lw_probed_copy(void *dst, const void *src, size_t n) {
    sigjmp_buf env;
    guard_thread *t = &tc_thread;
    if (sigsetjmp(env, 1) != 0) {
        t->probe = NULL;
        return -1;
    }
    t->probe = &env;
    GUARD_FENCE();
    const volatile unsigned char *from = (const volatile unsigned char *)src;
    unsigned char *to = (unsigned char *)dst;
    for (size_t i = 0; i < n; i++) to[i] = from[i];
    GUARD_FENCE();
    t->probe = NULL;
    return 0;
}

/* `n` bytes at `src` into `dst` with a read that cannot end the process: 0, or -1 when some
 * byte could not be read. process_vm_readv on this process where the system allows it (it
 * returns EFAULT instead of faulting), else a copy whose fault is caught. */
static int lw_safe_read(void *dst, const void *src, size_t n) {
    if (n == 0) return 0;
#if defined(__linux__)
    struct iovec here = {dst, n};
    struct iovec there = {(void *)(uintptr_t)src, n};
    const ssize_t got = process_vm_readv(getpid(), &here, 1, &there, 1, 0);
    if (got == (ssize_t)n) return 0;
    if (got >= 0 || errno == EFAULT) return -1;
    /* Not allowed here (a sandbox), or not there: the caught copy. */
#endif
    return lw_probed_copy(dst, src, n);
}

/* The routine name of a call running on another thread (its argument block's label), read a
 * byte at a time with the caught reads into static storage; NULL when it cannot be read. A
 * hung call in a campaign named only the campaign, where several routines share a library. */
static char lw_running_label[512];
static const char *lw_label_of(const char *p) {
    if (p == NULL) return NULL;
    size_t i = 0;
    for (; i + 1 < sizeof lw_running_label; ++i) {
        if (lw_safe_read(&lw_running_label[i], p + i, 1) != 0) return NULL;
        if (lw_running_label[i] == '\0') return i > 0 ? lw_running_label : NULL;
    }
    lw_running_label[i] = '\0';
    return lw_running_label;
}

/* The copy: the argument block, its call description and arrays, in static storage (the last
 * words allocate nothing). */
static tc_guard_args lw_args;
static union {
    tc_call real;
    guard_finite_call finite;
} lw_call;
static double lw_props[2 * LW_MAX_ENTRIES], lw_state0[2 * LW_MAX_ENTRIES];
static double lw_strain[2 * 9], lw_dstrain[2 * 9], lw_stress0[2 * 9], lw_temp[4];

/* One array of the copy: `n` entries (each 1 or 2 doubles) from `src` into `dst`, which then
 * stands in for it; 0, or -1 when it cannot be read or is too long. */
static int lw_copy_array(const void **field, double *dst, long n, long cap, int cx) {
    if (n < 0 || n > cap) return -1;
    if (n == 0 || *field == NULL) {
        *field = dst;
        return 0;
    }
    if (lw_safe_read(dst, *field, (size_t)n * (cx ? 2 : 1) * sizeof(double)) != 0) return -1;
    *field = dst;
    return 0;
}

/* The inputs of the call running on another thread (`run`, whose argument block is `a`), for
 * the last words: that thread goes on while they are said, so its call may return and its
 * argument block (on its stack) be overwritten at any moment, and reading through the
 * pointers it then holds could fault. Everything is copied with reads that cannot fault, and
 * the copy is used only when the same call was still running after it was made; NULL
 * otherwise (the last words then leave the inputs out). */
static const tc_guard_args *lw_copy_running(const watch_slot *run, const tc_guard_args *a, int cx) {
    const uint64_t begun = __atomic_load_n(&run->begun, __ATOMIC_ACQUIRE);
    if (__atomic_load_n(&run->ended, __ATOMIC_ACQUIRE) == begun) return NULL;
    if (lw_safe_read(&lw_args, a, sizeof lw_args) != 0) return NULL;
    const int finite = lw_args.reserved == TC_GUARD_LAYOUT_FINITE;
    if (lw_args.call == NULL ||
        lw_safe_read(&lw_call, lw_args.call, finite ? sizeof lw_call.finite : sizeof lw_call.real) != 0)
        return NULL;
    lw_args.call = &lw_call.real;
    long ncomp, nstate, nprop, nf;
    if (finite) {
        ncomp = 6;
        nf = 9;
        nstate = lw_call.finite.nstate;
        nprop = lw_call.finite.nproperties;
    } else {
        ncomp = lw_call.real.ncomp;
        nf = ncomp;
        nstate = lw_call.real.nstate;
        nprop = lw_call.real.nproperties;
        if (ncomp < 1 || ncomp > 6) return NULL;
    }
    if (lw_copy_array(&lw_args.props, lw_props, nprop, LW_MAX_ENTRIES, cx) != 0 ||
        lw_copy_array(&lw_args.strain, lw_strain, nf, 9, cx) != 0 ||
        lw_copy_array(&lw_args.dstrain, lw_dstrain, nf, 9, cx) != 0 ||
        lw_copy_array(&lw_args.temp, lw_temp, 2, 2, cx) != 0 ||
        lw_copy_array(&lw_args.stress0, lw_stress0, ncomp, 9, cx) != 0 ||
        lw_copy_array(&lw_args.state0, lw_state0, nstate, LW_MAX_ENTRIES, cx) != 0)
        return NULL;
    /* The same call still running: its block and arrays were the call's own all along. */
    if (__atomic_load_n(&run->begun, __ATOMIC_ACQUIRE) != begun ||
        __atomic_load_n(&run->ended, __ATOMIC_ACQUIRE) == begun ||
        __atomic_load_n(&run->args, __ATOMIC_ACQUIRE) != a)
        return NULL;
    return &lw_args;
}

/* Last words: the fault line with when it happened and the inputs of the running call, and
 * the JSON report naming the fault; then the process ends with `status`. `in_call` is 1 when
 * the dying thread is inside a guarded call, 0 when not, -1 when unknown (another thread). */
static void last_words(int status, int sig, int in_call, const char *what) __attribute__((noreturn));
static void last_words(int status, int sig, int in_call, const char *what) {
    if (__atomic_exchange_n(&dying, 1, __ATOMIC_ACQ_REL)) {
        /* Another thread is saying them already; a second fault in the same thread ends. */
        if (tc_thread.prepared == 2) _exit(status);
        for (;;) pause();
    }
    tc_thread.prepared = 2;
    uint64_t begun, ended;
    watch_slot *run, *last;
    watch_sums(&begun, &ended, &run, &last);
    /* A fault inside a call is that thread's call; a call the watchdog found hung is its slot's;
     * otherwise a call running on any thread. */
    if (in_call == 1 && tc_thread.slot != NULL) run = tc_thread.slot;
    const int hung = __atomic_load_n(&lw_hung_slot, __ATOMIC_ACQUIRE);
    if (in_call != 1 && hung >= 0 && hung < WATCH_SLOTS) run = &watch_slots[hung];
    const int running = in_call == 1 || run != NULL;
    const int phase = __atomic_load_n(&watch_phase, __ATOMIC_RELAXED);
    const watch_slot *seen = run != NULL ? run : last;
    const int increment = seen != NULL ? __atomic_load_n(&seen->increment, __ATOMIC_RELAXED) : -1;
    const tc_guard_args *a = running && run != NULL ? __atomic_load_n(&run->args, __ATOMIC_RELAXED) : NULL;
    const int cx = run != NULL ? __atomic_load_n(&run->complex_call, __ATOMIC_RELAXED) : 0;
    const int npoints = running && run != NULL ? __atomic_load_n(&run->npoints, __ATOMIC_RELAXED) : 0;
    const int sweep_column = running && run != NULL ? __atomic_load_n(&run->sweep_column, __ATOMIC_RELAXED) : -1;
    double sweep_step = 0.0;
    if (sweep_column >= 0) __atomic_load(&run->sweep_step, &sweep_step, __ATOMIC_RELAXED);
    /* Another thread's call (not this thread's own, which waits here): a checked copy. */
    if (a != NULL && run != tc_thread.slot) a = lw_copy_running(run, a, cx);
    const guard_finite_call *fc = finite_call_of(a);
    const tc_call *c = (a != NULL && fc == NULL) ? a->call : NULL;
    const char *running_label = (in_call != 1 && a != NULL) ? lw_label_of(a->label) : NULL;
    const char *label = (in_call == 1 && tc_thread.label != NULL) ? tc_thread.label
                        : running_label != NULL                   ? running_label
                                                                  : lw_label;

    /* When, in words (kept in its own buffer: it goes into the text and the JSON). */
    char when[256];
    lw_len = 0;
    if (phase == TC_PHASE_LOADING) {
        put("while the library was being loaded (in a constructor or initialiser)");
    } else if (running && c != NULL) {
        put("during a call of increment ");
        put_int(c->increment);
        if (cx) put(" (the complex-step twin)");
        if (in_call == 0) put(", from another thread of the routine");
    } else if (running && fc != NULL) {
        put("during a finite-strain call of increment ");
        put_int(fc->increment);
        if (cx) put(" (the complex-step twin)");
        if (in_call == 0) put(", from another thread of the routine");
    } else if (running && npoints > 0) {
        put("during a block call of increment ");
        put_int(increment);
        put(" (a block of ");
        put_int(npoints);
        put(npoints == 1 ? " point" : " points");
        put(cx ? ", the complex-step twin)" : ")");
        if (in_call == 0) put(", from another thread of the routine");
    } else if (phase == TC_PHASE_REPORTING) {
        put("after the check, while tancheck wrote the report (from a thread the routine left running?)");
    } else if (phase == TC_PHASE_STARTING) {
        put("before the routine's library was loaded");
    } else {
        put("between two calls, after ");
        put_int((long long)ended);
        put(" calls (the last in increment ");
        put_int(increment);
        /* The watchdog's own end (in_call -1: the check past --suite-timeout) comes between
         * calls as a slow check does; anything else there came from outside the calls. */
        put(in_call == -1 ? ")" : "): from a thread the routine left running?");
    }
    copy_string(when, sizeof when, lw_buf);

    /* The text. */
    lw_len = 0;
    put("tancheck: FAULT: ");
    put(what);
    put(", ");
    put(when);
    put(".\n");
    if (label[0] != '\0') {
        put("   routine: ");
        put(label);
        put("\n");
    }
    if (c != NULL) {
        put("   the inputs of that call (increment ");
        put_int(c->increment);
        put(cx ? ", real parts" : "");
        if (sweep_column >= 0) {
            put(cx ? "; a complex-step call, dstrain[" : "; a perturbed call, dstrain[");
            put_int(sweep_column);
            put(cx ? "] given the imaginary part " : "] moved by ");
            put_real(sweep_step);
        }
        put("):\n     strain   ");
        put_array(a->strain, c->ncomp, cx);
        put("\n     dstrain  ");
        put_array(a->dstrain, c->ncomp, cx);
        put("\n     stress0  ");
        put_array(a->stress0, c->ncomp, cx);
        put("\n     state0   ");
        put_array(a->state0, c->nstate, cx);
        put("\n     props    ");
        put_array(a->props, c->nproperties, cx);
        if (a->temp != NULL) {
            put("\n     temp, dtemp ");
            put_real(((const double *)a->temp)[0]);
            put(", ");
            put_real(((const double *)a->temp)[cx ? 2 : 1]);
        }
        put("\n");
    }
    if (fc != NULL) {
        put("   the inputs of that call (increment ");
        put_int(fc->increment);
        put(cx ? ", real parts" : "");
        put("):\n     F0 (column-major) ");
        put_array(a->strain, 9, cx);
        put("\n     F1 (column-major) ");
        put_array(a->dstrain, 9, cx);
        put("\n     stress0  ");
        put_array(a->stress0, 6, cx);
        put("\n     state0   ");
        put_array(a->state0, fc->nstate, cx);
        put("\n     properties ");
        put_array(a->props, fc->nproperties, cx);
        put("\n");
    }
    put("   verdict: FAULT (exit ");
    put_int(status);
    put(")");
    if (lw_report[0] != '\0' || lw_json_stdout) put("; the JSON report names the fault");
    put("\n");
    int text_fd = (!lw_json_stdout && tool_stdout >= 0) ? tool_stdout : 2;
    write_fd(text_fd, lw_buf, lw_len);

    /* The JSON report. */
    if (lw_head[0] != '\0' && (lw_report[0] != '\0' || lw_json_stdout)) {
        lw_len = 0;
        put(lw_head);
        put(", \"verdict\": \"routine-fault\", \"last_words\": true, \"fault\": {\"message\": \"");
        put_escaped(what);
        put("\", \"when\": \"");
        put_escaped(when);
        put("\", \"exit_status\": ");
        put_int(status);
        put(", \"signal\": ");
        if (sig > 0) put_int(sig); else put("null");
        put(", \"increment\": ");
        if (c != NULL) put_int(c->increment); else if (fc != NULL) put_int(fc->increment); else if (increment >= 0) put_int(increment); else put("null");
        put(", \"calls\": ");
        put_int((long long)begun);
        put(", \"routine\": ");
        if (label[0] != '\0') {
            put("\"");
            put_escaped(label);
            put("\"");
        } else {
            put("null");
        }
        put(", \"call\": ");
        if (c != NULL) {
            put("{\"increment\": ");
            put_int(c->increment);
            if (sweep_column >= 0) {
                put(cx ? ", \"perturbation\": \"complex-step twin (real parts), dstrain[" : ", \"perturbation\": \"dstrain[");
                put_int(sweep_column);
                put(cx ? "] given the imaginary part " : "] moved by ");
                put_real(sweep_step);
                put("\"");
            } else {
                put(cx ? ", \"perturbation\": \"complex-step twin (real parts)\"" : ", \"perturbation\": null");
            }
            put(", \"props\": ");
            put_array(a->props, c->nproperties, cx);
            put(", \"strain\": ");
            put_array(a->strain, c->ncomp, cx);
            put(", \"dstrain\": ");
            put_array(a->dstrain, c->ncomp, cx);
            const double *temp = (const double *)a->temp;
            put(", \"temp\": ");
            put_real(temp != NULL ? temp[0] : 0.0);
            put(", \"dtemp\": ");
            put_real(temp != NULL ? temp[cx ? 2 : 1] : 0.0);
            put(", \"stress0\": ");
            put_array(a->stress0, c->ncomp, cx);
            put(", \"state0\": ");
            put_array(a->state0, c->nstate, cx);
            put(", \"time\": ");
            put_real(c->time);
            put(", \"dtime\": ");
            put_real(c->dtime);
            put("}");
        } else if (fc != NULL) {
            put("{\"increment\": ");
            put_int(fc->increment);
            put(cx ? ", \"perturbation\": \"complex-step twin (real parts)\"" : ", \"perturbation\": null");
            put(", \"properties\": ");
            put_array(a->props, fc->nproperties, cx);
            put(", \"f0\": ");
            put_array(a->strain, 9, cx);
            put(", \"f1\": ");
            put_array(a->dstrain, 9, cx);
            put(", \"stress0\": ");
            put_array(a->stress0, 6, cx);
            put(", \"state0\": ");
            put_array(a->state0, fc->nstate, cx);
            put(", \"time\": ");
            put_real(fc->time);
            put(", \"dtime\": ");
            put_real(fc->dtime);
            put("}");
        } else {
            put("null");
        }
        put("}}\n");
        if (lw_json_stdout) {
            write_fd(tool_stdout >= 0 ? tool_stdout : 1, lw_buf, lw_len);
        } else {
            /* A name of their own: the program may be writing the report under its temporary
             * name at this moment (a thread of the routine ending the process while the report
             * is written), and two writers of one file would mix their bytes. */
            /* The program's unfinished copy goes (it checks tc_guard_dying before its
             * rename, and a rename of a removed file fails), so theirs never replaces these
             * last words, and nothing of it is left behind. */
            if (lw_tmp[0] != '\0') unlink(lw_tmp);
            int fd = open(lw_own_tmp, O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
            if (fd >= 0) {
                write_fd(fd, lw_buf, lw_len);
                close(fd);
                if (rename(lw_own_tmp, lw_report) != 0) unlink(lw_own_tmp);
            }
            if (lw_tmp[0] != '\0') unlink(lw_tmp); /* begun by the program meanwhile */
        }
    }
    _exit(status);
}

static void last_words_signal(int sig, int in_call) {
    if (in_call && sig == SIGABRT)
        last_words(3, sig, 1,
                   "the routine aborted (SIGABRT: the C library found the heap corrupted, or "
                   "the routine called abort()); with the heap in doubt tancheck stops here");
    lw_len = 0;
    char what[256];
    put("a fatal signal ");
    put(signal_name(sig));
    put(" arrived outside any routine call (a thread the routine left running, memory it "
        "corrupted, or a fault in tancheck itself)");
    copy_string(what, sizeof what, lw_buf);
    last_words(3, sig, in_call, what);
}

/* SIGINT, SIGTERM, SIGHUP while armed: remove the temporary files, then die of the signal
 * as usual; or, deferred, only record the first for the program's own loop (the --isolate
 * parent, a campaign): a second one acts at once. */
static int stop_stderr_tty; /* standard error is a terminal (set when armed) */

static void stop_handler(int sig) {
    if (defer_stop && stop_signal == 0) {
        stop_signal = sig;
        return;
    }
    if (lw_tmp[0] != '\0') unlink(lw_tmp);
    if (lw_own_tmp[0] != '\0') unlink(lw_own_tmp);
    for (int i = 0; i < lw_nremove; i++) unlink(lw_remove[i]);
    for (int i = lw_nremove - 1; i >= 0; i--) rmdir(lw_remove[i]);
    {
        /* After the files are removed (the sooner the better), the stop is said: on a terminal
         * after clearing a progress line, so that the shell's next line starts on a line of its
         * own (it landed after the bar; a user-style sweep), and in a log too (a run stopped so
         * said nothing there; a user-style sweep). */
        char m[96] = "\r\033[Ktancheck: stopped by signal ";
        size_t k = strlen(m);
        size_t from = stop_stderr_tty ? 0 : 4;
        if (sig >= 10) m[k++] = (char)('0' + sig / 10);
        m[k++] = (char)('0' + sig % 10);
        const char *tail = " before the check finished\n";
        for (const char *q = tail; *q != '\0' && k + 1 < sizeof m; q++) m[k++] = *q;
        ssize_t w = write(2, m + from, k - from);
        (void)w;
    }
    signal(sig, SIG_DFL);
    raise(sig);
}

/* Hand a signal that is not ours to whoever had it before, or apply the default action. */
static void chain(int sig, siginfo_t *info, void *context) {
    int slot = slot_of(sig);
    const struct sigaction *old = slot >= 0 ? &previous[slot] : NULL;
    int fault = info != NULL && info->si_code > 0; /* raised by the CPU, not sent */

    if (old != NULL && old->sa_handler != SIG_DFL && old->sa_handler != SIG_IGN) {
        if (old->sa_flags & SA_SIGINFO)
            old->sa_sigaction(sig, info, context);
        else
            old->sa_handler(sig);
        return;
    }
    if (old != NULL && old->sa_handler == SIG_IGN && !fault) return;

    /* Default action: put it back and let the signal happen again. A fault re-executes
     * the faulting instruction on return; a sent signal is raised anew. */
    struct sigaction dfl;
    memset(&dfl, 0, sizeof dfl);
    dfl.sa_handler = SIG_DFL;
    sigemptyset(&dfl.sa_mask);
    sigaction(sig, &dfl, NULL);
    if (!fault) raise(sig);
}

static int detail_of(int sig, int code, uintptr_t addr, uintptr_t stack_lo) {
    switch (sig) {
    case SIGSEGV:
        /* The guard page (or gap) lies just below the lowest usable stack address. A
         * stack overflow faults there or, with a large frame, up to a few MiB below. */
        if (stack_lo != 0 && addr < stack_lo + 4096 && addr + (8u << 20) >= stack_lo)
            return TC_GUARD_SEGV_STACK;
        if (code == SEGV_MAPERR) return TC_GUARD_SEGV_MAPERR;
        if (code == SEGV_ACCERR) return TC_GUARD_SEGV_ACCERR;
        return 0;
    case SIGBUS:
        if (code == BUS_ADRALN) return TC_GUARD_BUS_ADRALN;
        if (code == BUS_ADRERR) return TC_GUARD_BUS_ADRERR;
        if (code == BUS_OBJERR) return TC_GUARD_BUS_OBJERR;
        return 0;
    case SIGFPE:
        switch (code) {
        case FPE_INTDIV: return TC_GUARD_FPE_INTDIV;
        case FPE_INTOVF: return TC_GUARD_FPE_INTOVF;
        case FPE_FLTDIV: return TC_GUARD_FPE_FLTDIV;
        case FPE_FLTOVF: return TC_GUARD_FPE_FLTOVF;
        case FPE_FLTUND: return TC_GUARD_FPE_FLTUND;
        case FPE_FLTRES: return TC_GUARD_FPE_FLTRES;
        case FPE_FLTINV: return TC_GUARD_FPE_FLTINV;
        case FPE_FLTSUB: return TC_GUARD_FPE_FLTSUB;
        default: return 0;
        }
    case SIGILL:
        if (code == ILL_ILLOPC || code == ILL_ILLOPN) return TC_GUARD_ILL_OPCODE;
        if (code == ILL_PRVOPC || code == ILL_PRVREG) return TC_GUARD_ILL_PRIV;
        return code > 0 ? TC_GUARD_ILL_OTHER : 0;
    default:
        return 0;
    }
}

/* The interrupted stack pointer, read from the signal context, or 0. */
static uintptr_t context_sp(void *context) {
    (void)context;
#if defined(__linux__)
    if (context == NULL) return 0;
#endif
#if defined(__linux__) && defined(__x86_64__)
    return (uintptr_t)((ucontext_t *)context)->uc_mcontext.gregs[REG_RSP];
#elif defined(__linux__) && defined(__aarch64__)
    return (uintptr_t)((ucontext_t *)context)->uc_mcontext.sp;
#elif defined(__linux__) && defined(__i386__)
    return (uintptr_t)((ucontext_t *)context)->uc_mcontext.gregs[REG_ESP];
#else
    return 0;
#endif
}

/* The words at the top of the interrupted stack, per watch slot (not thread-local: the
 * initial-exec thread storage of a library loaded at run time is small). A fault inside a
 * system library (a trap in libm's log or sqrt of a negative number) names the routine's own
 * frame by the first return address into other code among them, found after the call
 * (tc_guard_fault_stack). */
#define GUARD_STACK_WORDS 64
static uint64_t slot_stack[WATCH_SLOTS][GUARD_STACK_WORDS];
static int32_t slot_nstack[WATCH_SLOTS];

/* In the handler: copy the words from the interrupted stack pointer up, within the thread's
 * stack (plain loads of mapped memory: async-signal-safe). */
static void record_stack(const guard_thread *t, void *context) {
    if (t->slot == NULL) return;
    const long k = t->slot - watch_slots;
    if (k < 0 || k >= WATCH_SLOTS) return;
    slot_nstack[k] = 0;
    const uintptr_t sp = context_sp(context);
    if (sp == 0 || t->stack_hi == 0 || sp < t->stack_lo || sp >= t->stack_hi) return;
    uintptr_t n = (t->stack_hi - sp) / sizeof(uint64_t);
    if (n > GUARD_STACK_WORDS) n = GUARD_STACK_WORDS;
    const volatile uint64_t *w = (const volatile uint64_t *)sp;
    for (uintptr_t i = 0; i < n; i++) slot_stack[k][i] = w[i];
    slot_nstack[k] = (int32_t)n;
}

/* The stack words the calling thread's last caught signal left (see record_stack): copies up
 * to `max` into `out` and returns how many. */
int32_t tc_guard_fault_stack(uint64_t *out, int32_t max) {
    const guard_thread *t = &tc_thread;
    if (t->slot == NULL) return 0;
    const long k = t->slot - watch_slots;
    if (k < 0 || k >= WATCH_SLOTS) return 0;
    int32_t n = slot_nstack[k];
    if (n > max) n = max;
    for (int32_t i = 0; i < n; i++) out[i] = slot_stack[k][i];
    return n;
}

/* The interrupted instruction, read from the signal context; only stored here (it is
 * turned into a function, file and line after the call, outside the handler). */
static void *context_pc(void *context) {
    (void)context;
#if defined(__linux__)
    if (context == NULL) return NULL;
#endif
#if defined(__linux__) && defined(__x86_64__)
    return (void *)(uintptr_t)((ucontext_t *)context)->uc_mcontext.gregs[REG_RIP];
#elif defined(__linux__) && defined(__aarch64__)
    return (void *)(uintptr_t)((ucontext_t *)context)->uc_mcontext.pc;
#elif defined(__linux__) && defined(__i386__)
    return (void *)(uintptr_t)((ucontext_t *)context)->uc_mcontext.gregs[REG_EIP];
#else
    return NULL;
#endif
}

static void last_words_signal(int sig, int in_call);

static void guard_handler(int sig, siginfo_t *info, void *context) {
    guard_thread *t = &tc_thread;
    if (t->probe != NULL && (sig == SIGSEGV || sig == SIGBUS)) {
        /* A read of the last words through a pointer that went stale (lw_safe_read). */
        siglongjmp(*t->probe, 1);
    }
    if (t->inside && t->jump != NULL && sig == SIGABRT && tc_armed()) {
        /* abort() inside a call: most often the C library found the heap corrupted. The
         * heap (and the allocator's locks) cannot be trusted any more: last words. */
        last_words_signal(sig, 1);
    }
    if (t->inside && t->jump != NULL) {
        /* Ours only when raised by this call: a CPU fault, or a signal this process sent
         * to itself (abort, raise). A signal sent from elsewhere keeps its meaning. */
        int sent = info != NULL && info->si_code == SI_USER;
#ifdef SI_TKILL
        sent = sent || (info != NULL && info->si_code == SI_TKILL);
#endif
        int own = info == NULL || info->si_code > 0 || (sent && info->si_pid == getpid());
        if (own) {
            t->inside = 0;
            t->sig = sig;
            t->code = info != NULL ? info->si_code : 0;
            t->addr = (info != NULL && info->si_code > 0) ? info->si_addr : NULL;
            t->pc = context_pc(context);
            record_stack(t, context);
            GUARD_FENCE();
            siglongjmp(*t->jump, 1);
        }
    }
    if (tc_armed() && (info == NULL || info->si_code > 0 || sig == SIGABRT)) {
        /* A fault outside any call while tancheck runs: a thread the routine left running,
         * memory it corrupted, or (rarely) tancheck itself. Say so before dying. */
        last_words_signal(sig, 0);
    }
    chain(sig, info, context);
}

/* exit() while tancheck runs (armed), from any thread, or during a guarded call: the
 * routine or its library ended the process. Say so, and make sure the exit status cannot be
 * mistaken for a successful check. */
static void guard_at_exit(void) {
    guard_thread *t = &tc_thread;
    if (!t->inside && !tc_armed()) return;
    if (!tc_armed()) {
        /* Not armed (the C API): the short message of a guarded call. */
        write_stderr("tancheck: the material routine ");
        if (t->label != NULL) {
            write_stderr("`");
            write_stderr(t->label);
            write_stderr("` ");
        }
        write_stderr("ended the process by calling exit() during a call (a Fortran STOP or "
                     "ERROR STOP, or a failed run-time check such as an array bound, does this). "
                     "A routine must report failure through report->status instead. See the "
                     "routine's own message above.\n");
        _exit(TC_GUARD_EXIT_STATUS);
    }
    last_words(TC_GUARD_EXIT_STATUS, 0, t->inside ? 1 : 0,
               "the routine ended the process by calling exit() (a Fortran STOP or ERROR STOP, "
               "or a failed run-time check such as an array bound, does this; a routine must "
               "report failure through report->status instead)");
}

/* ---- installation ------------------------------------------------------------------ */

static size_t page_size = 4096;
static size_t altstack_size = 64 * 1024;

static void free_altstack(void *mem) {
    stack_t cur;
    if (sigaltstack(NULL, &cur) == 0 && cur.ss_sp == (char *)mem + page_size) {
        stack_t off;
        memset(&off, 0, sizeof off);
        off.ss_flags = SS_DISABLE;
        sigaltstack(&off, NULL);
    }
    munmap(mem, page_size + altstack_size);
}

/* A thread that ends frees its watch slot (it is between calls then). */
static void free_slot(void *slot) { __atomic_store_n(&((watch_slot *)slot)->owned, 0, __ATOMIC_RELEASE); }

/* A free slot for the calling thread: a freed or unused one, else the last (shared). */
static watch_slot *claim_slot(void) {
    for (;;) {
        const int used = __atomic_load_n(&watch_used, __ATOMIC_ACQUIRE);
        for (int i = 0; i < used && i < WATCH_SLOTS; i++) {
            int free = 0;
            if (__atomic_compare_exchange_n(&watch_slots[i].owned, &free, 1, 0, __ATOMIC_ACQ_REL,
                                            __ATOMIC_RELAXED)) {
                pthread_setspecific(watch_key, &watch_slots[i]);
                return &watch_slots[i];
            }
        }
        if (used >= WATCH_SLOTS) return &watch_slots[WATCH_SLOTS - 1]; /* not freed at the end */
        /* Open one more slot and try again (another thread may take it first). */
        int seen = used;
        __atomic_compare_exchange_n(&watch_used, &seen, used + 1, 0, __ATOMIC_ACQ_REL, __ATOMIC_RELAXED);
    }
}

static void install(void) {
    long page = sysconf(_SC_PAGESIZE);
    if (page > 0) page_size = (size_t)page;
    size_t want = 64 * 1024;
#ifdef _SC_SIGSTKSZ
    long sys = sysconf(_SC_SIGSTKSZ);
    if (sys > 0 && 4 * (size_t)sys > want) want = 4 * (size_t)sys;
#endif
    altstack_size = (want + page_size - 1) / page_size * page_size;
    if (pthread_key_create(&altstack_key, free_altstack) != 0) install_error = EAGAIN;
    if (pthread_key_create(&watch_key, free_slot) != 0) install_error = EAGAIN;

    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_sigaction = guard_handler;
    sa.sa_flags = SA_SIGINFO | SA_ONSTACK | SA_NODEFER;
    sigemptyset(&sa.sa_mask);
    for (int i = 0; i < N_GUARDED; i++) {
        if (sigaction(guarded_signals[i], &sa, &previous[i]) != 0) {
            install_error = errno;
            continue;
        }
        /* Never chain to ourselves (a second copy of this file in the process). */
        if ((previous[i].sa_flags & SA_SIGINFO) && previous[i].sa_sigaction == guard_handler) {
            memset(&previous[i], 0, sizeof previous[i]);
            previous[i].sa_handler = SIG_DFL;
        }
    }
    /* Many copies: glibc hands each exiting thread the next handler of one shared list, so a
     * second thread calling exit() at the same moment (two OpenMP threads meeting a STOP)
     * must find a copy too, and wait there while the first says the last words. */
    for (int i = 0; i < 64; i++)
        if (atexit(guard_at_exit) != 0 && install_error == 0) install_error = ENOMEM;
}

/* Once per thread: an alternate signal stack when the thread has none, and the stack's
 * lower bound for recognising a stack overflow. */
static void prepare_thread(guard_thread *t) {
    pthread_once(&install_once, install);
    stack_t cur;
    if (sigaltstack(NULL, &cur) != 0 || (cur.ss_flags & SS_DISABLE) ||
        cur.ss_size < (size_t)MINSIGSTKSZ) {
        void *mem = mmap(NULL, page_size + altstack_size, PROT_READ | PROT_WRITE,
                         MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
        if (mem != MAP_FAILED) {
            mprotect(mem, page_size, PROT_NONE); /* guard page below the signal stack */
            stack_t ss;
            memset(&ss, 0, sizeof ss);
            ss.ss_sp = (char *)mem + page_size;
            ss.ss_size = altstack_size;
            if (sigaltstack(&ss, NULL) == 0)
                pthread_setspecific(altstack_key, mem);
            else
                munmap(mem, page_size + altstack_size);
        }
    }
#if defined(__GLIBC__) || defined(__linux__)
    pthread_attr_t attr;
    if (pthread_getattr_np(pthread_self(), &attr) == 0) {
        void *lo;
        size_t size;
        if (pthread_attr_getstack(&attr, &lo, &size) == 0) {
            t->stack_lo = (uintptr_t)lo;
            t->stack_hi = (uintptr_t)lo + size;
        }
        pthread_attr_destroy(&attr);
    }
#endif
    if (t->slot == NULL) t->slot = claim_slot();
    t->prepared = 1;
}

/* Install the handlers (once) and prepare the calling thread. Returns 0, or the errno of
 * the step that failed. Calling it is optional: the trampolines prepare lazily. */
int32_t tc_guard_prepare(void) {
    guard_thread *t = &tc_thread;
    if (!t->prepared) prepare_thread(t);
    return install_error;
}

/* ---- the program's side of the watch ----------------------------------------------- */

/* Arm the watch (the tancheck program, not the C API): install the handlers, register the
 * exit hook, catch SIGINT, SIGTERM and SIGHUP (unless ignored) to remove temporary files.
 * From now on any exit() before tc_guard_set_phase(0) is a fault. */
int32_t tc_guard_arm(void) {
    tc_guard_prepare();
    stop_stderr_tty = isatty(2);
    static const int stops[] = {SIGINT, SIGTERM, SIGHUP};
    for (int i = 0; i < 3; i++) {
        struct sigaction old;
        if (sigaction(stops[i], NULL, &old) == 0 && old.sa_handler == SIG_DFL &&
            !(old.sa_flags & SA_SIGINFO)) {
            struct sigaction sa;
            memset(&sa, 0, sizeof sa);
            sa.sa_handler = stop_handler;
            sigemptyset(&sa.sa_mask);
            sigaction(stops[i], &sa, NULL);
        }
    }
    __atomic_store_n(&watch_phase, TC_PHASE_STARTING, __ATOMIC_SEQ_CST);
    return install_error;
}

/* TC_PHASE_*: 0 disarms (the program is about to exit by itself). */
void tc_guard_set_phase(int32_t phase) { __atomic_store_n(&watch_phase, phase, __ATOMIC_SEQ_CST); }

/* Around loading a library: while armed, the phase is TC_PHASE_LOADING (on != 0), then
 * what it was before (on == 0). Unarmed (the C API), nothing. */
void tc_guard_loading(int32_t on) {
    static int before = TC_PHASE_STARTING;
    if (!tc_armed()) return;
    if (on) {
        before = __atomic_exchange_n(&watch_phase, TC_PHASE_LOADING, __ATOMIC_SEQ_CST);
    } else {
        __atomic_store_n(&watch_phase, before, __ATOMIC_SEQ_CST);
    }
}

/* The routine's name, for last words outside a call. */
void tc_guard_set_label(const char *label) { copy_string(lw_label, sizeof lw_label, label); }

/* Where the last words' JSON goes: `head` opens the report object (`{"tool": ...` without the
 * closing brace), `report` is the file ("" for none), `tmp` its temporary name; to_stdout
 * sends it to tancheck's standard output instead. Returns 0, or 1 when a string is too long. */
int32_t tc_guard_set_report(const char *head, const char *report, const char *tmp, int32_t to_stdout) {
    if (strlen(head) + 1 > sizeof lw_head || strlen(report) + 1 > LW_PATH || strlen(tmp) + 1 > LW_PATH)
        return 1;
    copy_string(lw_head, sizeof lw_head, head);
    copy_string(lw_report, sizeof lw_report, report);
    copy_string(lw_tmp, sizeof lw_tmp, tmp);
    copy_string(lw_own_tmp, sizeof lw_own_tmp, tmp);
    if (tmp[0] != '\0') memcpy(lw_own_tmp + strlen(lw_own_tmp), ".last", sizeof ".last");
    lw_json_stdout = to_stdout != 0;
    return 0;
}

/* A file or folder to remove when a stop signal ends the process (files before folders:
 * give a folder before the files in it). Returns 0, or 1 when full or too long. */
int32_t tc_guard_remove_on_stop(const char *path) {
    if (lw_nremove >= 8 || strlen(path) + 1 > LW_PATH) return 1;
    copy_string(lw_remove[lw_nremove], LW_PATH, path);
    lw_nremove++;
    return 0;
}

/* Record stop signals instead of acting on them (on != 0); tc_guard_stop_signal says which. */
void tc_guard_defer_stop(int32_t on) { defer_stop = on != 0; }
int32_t tc_guard_stop_signal(void) { return stop_signal; }

/* Keep the routine off tancheck's standard output: fd 1 becomes a copy of fd 2, and
 * tancheck's own output goes to the returned descriptor (close-on-exec). Once per process;
 * -1 when it could not be done. */
int32_t tc_guard_protect_stdout(void) {
    if (tool_stdout >= 0) return tool_stdout;
    fflush(stdout);
    int fd = fcntl(1, F_DUPFD_CLOEXEC, 3);
    if (fd < 0) return -1;
    if (dup2(2, 1) < 0) {
        close(fd);
        return -1;
    }
    tool_stdout = fd;
    return fd;
}

/* Nonzero once last words are being said (or the program is ending by tc_guard_finish): the
 * process ends soon, and a report the program is writing must not replace theirs. */
int32_t tc_guard_dying(void) { return __atomic_load_n(&dying, __ATOMIC_ACQUIRE); }

/* The program's own end with `status`: never racing a routine's thread that exits at the same
 * moment. If last words are being said, they win (and end the process); otherwise any later
 * exit() from a thread waits in the exit hook while this one ends the process with _exit. */
void tc_guard_finish(int32_t status) {
    if (__atomic_exchange_n(&dying, 1, __ATOMIC_ACQ_REL))
        for (;;) pause();
    fflush(NULL);
    _exit(status);
}

/* A worker process follows its parent `parent`: when the parent dies, the worker gets
 * SIGTERM (whose handler removes the registered files). Returns 0, 1 when the parent is
 * already gone, or -1 when the system cannot do it. */
int32_t tc_guard_follow_parent(int32_t parent) {
#ifdef __linux__
    if (prctl(PR_SET_PDEATHSIG, SIGTERM) != 0) return -1;
    return getppid() != parent ? 1 : 0; /* the parent died before the call */
#else
    return getppid() != parent ? 1 : -1;
#endif
}

/* The watch for a watchdog thread: calls begun, calls ended, increment of the last call, and
 * the phase (TC_PHASE_*). */
void tc_guard_watch(uint64_t out[4]) {
    watch_slot *run, *last;
    watch_sums(&out[0], &out[1], &run, &last);
    const watch_slot *seen = run != NULL ? run : last;
    out[2] = (uint64_t)(int64_t)(seen != NULL ? __atomic_load_n(&seen->increment, __ATOMIC_RELAXED) : -1);
    out[3] = (uint64_t)__atomic_load_n(&watch_phase, __ATOMIC_RELAXED);
}

/* Last words for a fault the program found (a call that does not return), then exit. */
void tc_guard_die(int32_t status, const char *what) { last_words(status, 0, -1, what); }

/* The call counters of each thread's slot: begun[i], ended[i] for i below the returned count
 * (at most max). A watchdog tells a call that does not return on one thread while others go on. */
int32_t tc_guard_watch_slots(uint64_t *begun, uint64_t *ended, int32_t max) {
    int used = __atomic_load_n(&watch_used, __ATOMIC_ACQUIRE);
    if (used > WATCH_SLOTS) used = WATCH_SLOTS;
    if (used > max) used = max;
    for (int i = 0; i < used; i++) {
        begun[i] = __atomic_load_n(&watch_slots[i].begun, __ATOMIC_ACQUIRE);
        ended[i] = __atomic_load_n(&watch_slots[i].ended, __ATOMIC_ACQUIRE);
    }
    return used;
}

/* tc_guard_die naming the call running in slot `slot` (from tc_guard_watch_slots). */
void tc_guard_die_slot(int32_t status, int32_t slot, const char *what) {
    __atomic_store_n(&lw_hung_slot, slot, __ATOMIC_RELEASE);
    last_words(status, 0, -1, what);
}

/* Nonzero when this thread has an alternate signal stack (after tc_guard_prepare). */
int32_t tc_guard_has_altstack(void) {
    stack_t cur;
    return sigaltstack(NULL, &cur) == 0 && !(cur.ss_flags & SS_DISABLE);
}

/* Drop the calling thread's alternate signal stack, as a thread made outside Rust has none.
 * For tests of the guard only; call it before the thread's first guarded call. */
int32_t tc_guard_drop_altstack(void) {
    stack_t off;
    memset(&off, 0, sizeof off);
    off.ss_flags = SS_DISABLE;
    return sigaltstack(&off, NULL) == 0 ? 0 : errno;
}

/* ---- floating-point traps ---------------------------------------------------------- */

#define GUARD_TRAPS (FE_INVALID | FE_DIVBYZERO | FE_OVERFLOW)

/* Nonzero when this machine can trap the three exceptions. */
int32_t tc_guard_fp_traps_available(void) {
#if defined(__GLIBC__) && defined(FE_INVALID) && defined(FE_DIVBYZERO) && defined(FE_OVERFLOW)
    int before = fegetexcept();
    int ok = feenableexcept(GUARD_TRAPS) != -1 && (fegetexcept() & GUARD_TRAPS) == GUARD_TRAPS;
    fedisableexcept(FE_ALL_EXCEPT);
    if (before > 0) feenableexcept(before);
    return ok;
#else
    return 0;
#endif
}

typedef struct guard_fp {
    int mask;  /* trap mask before the call, or -1 */
    int round; /* rounding mode before the call */
} guard_fp;

static inline guard_fp fp_enter(int traps) {
    guard_fp fp = {-1, 0};
#if defined(__GLIBC__) && defined(FE_INVALID) && defined(FE_DIVBYZERO) && defined(FE_OVERFLOW)
#if defined(__x86_64__) && defined(__GNUC__)
    /* One read of the x87 control word gives both, exactly as glibc's fegetexcept and
     * fegetround on x86-64 derive them (its exception masks and rounding bits), without the
     * two library calls on every routine call. */
    unsigned short cw;
    __asm__ volatile("fnstcw %0" : "=m"(cw));
    fp.mask = (~cw) & FE_ALL_EXCEPT;
    fp.round = cw & 0xc00;
#else
    fp.mask = fegetexcept();
    fp.round = fegetround();
#endif
    if (traps) {
        feclearexcept(FE_ALL_EXCEPT);
        feenableexcept(GUARD_TRAPS);
    }
#else
    (void)traps;
#endif
    return fp;
}

/* Before each further call of a sweep with traps: as fp_enter before a single call (the
 * flags cleared, the traps enabled again, whatever the previous call did to them). */
static inline void fp_rearm(void) {
#if defined(__GLIBC__) && defined(FE_INVALID) && defined(FE_DIVBYZERO) && defined(FE_OVERFLOW)
    feclearexcept(FE_ALL_EXCEPT);
    feenableexcept(GUARD_TRAPS);
#endif
}

/* After the call: clear the flags, restore the trap mask (and the rounding mode when a
 * signal handler ran, since the kernel starts handlers with a fresh floating-point state). */
static inline void fp_leave(int traps, int caught, guard_fp fp) {
#if defined(__GLIBC__) && defined(FE_INVALID) && defined(FE_DIVBYZERO) && defined(FE_OVERFLOW)
    if (traps || caught) {
        feclearexcept(FE_ALL_EXCEPT);
        fedisableexcept(FE_ALL_EXCEPT);
        if (fp.mask > 0) feenableexcept(fp.mask);
    }
    if (caught) fesetround(fp.round);
#else
    (void)traps;
    (void)caught;
    (void)fp;
#endif
}

/* ---- the trampolines --------------------------------------------------------------- */

static int kind_of(int sig) {
    switch (sig) {
    case SIGSEGV: return TC_GUARD_SEGV;
    case SIGBUS: return TC_GUARD_BUS;
    case SIGFPE: return TC_GUARD_FPE;
    case SIGILL: return TC_GUARD_ILL;
    case SIGABRT: return TC_GUARD_ABRT;
    default: return 0;
    }
}

static void fill_caught(const guard_thread *t, tc_guard_result *r) {
    r->caught = 1;
    r->signal = t->sig;
    r->kind = kind_of(t->sig);
    r->code = t->code;
    r->address = (uint64_t)(uintptr_t)t->addr;
    r->pc = (uint64_t)(uintptr_t)t->pc;
    r->detail = detail_of(t->sig, t->code, (uintptr_t)t->addr, t->stack_lo);
}

/* One guarded call: everything that must survive the jump is either set before sigsetjmp and
 * never changed afterwards, or lives in the thread state. The call itself is the variadic
 * argument (one per argument list: point, finite strain). */
#define TC_GUARD_WITH(NAME, FN_T, IS_COMPLEX, ...)                                      \
    int32_t NAME(FN_T fn, const tc_guard_args *a, tc_guard_result *r) {                 \
        guard_thread *t = &tc_thread;                                                   \
        if (!t->prepared) prepare_thread(t);                                            \
        sigjmp_buf *const outer_jump = t->jump;                                         \
        const sig_atomic_t outer_inside = t->inside;                                    \
        const char *const outer_label = t->label;                                       \
        const int traps = a->fp_traps != 0;                                             \
        sigjmp_buf here;                                                                \
        watch_enter(a, IS_COMPLEX);                                                     \
        memset(r, 0, sizeof *r);                                                        \
        const guard_fp fp = fp_enter(traps);                                            \
        if (sigsetjmp(here, 0) == 0) {                                                  \
            t->label = a->label;                                                        \
            t->jump = &here;                                                            \
            GUARD_FENCE();                                                              \
            t->inside = 1;                                                              \
            GUARD_FENCE();                                                              \
            __VA_ARGS__;                                                                \
            GUARD_FENCE();                                                              \
            t->inside = 0;                                                              \
            GUARD_FENCE();                                                              \
        } else {                                                                        \
            fill_caught(t, r);                                                          \
        }                                                                               \
        fp_leave(traps, r->caught, fp);                                                 \
        watch_leave();                                                                  \
        t->jump = outer_jump;                                                           \
        t->label = outer_label;                                                         \
        GUARD_FENCE();                                                                  \
        t->inside = outer_inside;                                                       \
        return r->caught;                                                               \
    }

/* One trampoline per element type of the point interface. */
#define TC_GUARD_TRAMPOLINE(NAME, FN_T, REAL_T, TEMPERATURE_T, ENERGY_T, IS_COMPLEX)                  \
    TC_GUARD_WITH(NAME, FN_T, IS_COMPLEX,                                                   \
                  fn(a->call, (const REAL_T *)a->props, (const REAL_T *)a->strain,          \
                     (const REAL_T *)a->dstrain, (const TEMPERATURE_T *)a->temp,            \
                     (const REAL_T *)a->stress0, (const REAL_T *)a->state0,                 \
                     (REAL_T *)a->stress, (REAL_T *)a->state, (REAL_T *)a->tangent,         \
                     (REAL_T *)a->dstress_dtemp, (ENERGY_T *)a->energy, a->report))

TC_GUARD_TRAMPOLINE(tc_guard_call_real, tc_routine_fn, double, tc_temperature, tc_energy, 0)
TC_GUARD_TRAMPOLINE(tc_guard_call_complex, tc_guard_cx_fn, _Complex double,
                    tc_guard_temperature_cx, tc_guard_energy_cx, 1)

/* ---- the finite-strain trampolines (tancheck_finite.h) ------------------------------ */

typedef void (*tc_guard_finite_fn)(const void *call, const double *properties, const double *f0,
                                   const double *f1, const double *rotation, const void *temperature,
                                   const double *stress0, const double *state0, double *stress,
                                   double *state, double *tangent, void *energy, tc_report *report);
typedef void (*tc_guard_finite_cx_fn)(const void *call, const _Complex double *properties,
                                      const _Complex double *f0, const _Complex double *f1,
                                      const _Complex double *rotation, const void *temperature,
                                      const _Complex double *stress0, const _Complex double *state0,
                                      _Complex double *stress, _Complex double *state,
                                      _Complex double *tangent, void *energy, tc_report *report);

/* The same as TC_GUARD_TRAMPOLINE, with the finite-strain argument list; `a->reserved` must be
 * TC_GUARD_LAYOUT_FINITE (the last words then print F0 and F1). */
#define TC_GUARD_FINITE_TRAMPOLINE(NAME, FN_T, REAL_T, IS_COMPLEX)                           \
    TC_GUARD_WITH(NAME, FN_T, IS_COMPLEX,                                                   \
                  fn((const void *)a->call, (const REAL_T *)a->props,                       \
                     (const REAL_T *)a->strain, (const REAL_T *)a->dstrain,                 \
                     (const REAL_T *)a->dstress_dtemp, a->temp, (const REAL_T *)a->stress0, \
                     (const REAL_T *)a->state0, (REAL_T *)a->stress, (REAL_T *)a->state,    \
                     (REAL_T *)a->tangent, a->energy, a->report))

TC_GUARD_FINITE_TRAMPOLINE(tc_guard_call_finite, tc_guard_finite_fn, double, 0)
TC_GUARD_FINITE_TRAMPOLINE(tc_guard_call_finite_complex, tc_guard_finite_cx_fn, _Complex double, 1)

/* Size of the finite call header and the offset of its time field, for the Rust side. */
void tc_guard_finite_layout(uint64_t out[2]) {
    out[0] = sizeof(guard_finite_call);
    out[1] = offsetof(guard_finite_call, time);
}

/* ---- block routines (their trampoline; see guard_block.inc) ------------------------ */

#include "guard_block.inc"

/* ---- the columns of a derivative scheme in one entry (see guard_sweep.inc) ---------- */

#include "guard_sweep.inc"

/* ---- layout and constants, for the Rust side's checks ------------------------------ */

/* Sizes and offsets of the structs both sides share; see guard.rs. */
void tc_guard_layout(uint64_t out[13]) {
    out[0] = sizeof(tc_call);
    out[1] = offsetof(tc_call, time);
    out[2] = offsetof(tc_call, dtime);
    out[3] = sizeof(tc_report);
    out[4] = offsetof(tc_report, largest_fraction);
    out[5] = offsetof(tc_report, message);
    out[6] = sizeof(tc_guard_args);
    out[7] = offsetof(tc_guard_args, label);
    out[8] = offsetof(tc_guard_args, fp_traps);
    out[9] = sizeof(tc_guard_result);
    out[10] = offsetof(tc_guard_result, address);
    out[11] = offsetof(tc_guard_result, pc);
    out[12] = TC_GUARD_EXIT_STATUS;
}
