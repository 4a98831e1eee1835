/*
 * isotropic_elastic.h -- pieces shared by the elastic examples (elastic.c, probe_zoo.c,
 * misbehave.c) and the orthotropic ones (orthotropic.c, ply.c): a failed status with
 * "<model>: <text>" as its message, the isotropic elastic stiffness of every solid kind, and the
 * response of a linear elastic routine to its stiffness.
 * Include it after tancheck_routine.h (tc_real is real or complex).
 */
#ifndef ISOTROPIC_ELASTIC_H
#define ISOTROPIC_ELASTIC_H

static inline void ex_fail(tc_report *report, const char *model, const char *text)
{
    report->status = TC_STATUS_FAILED;
    /* "<model>: <text>" into the report's message, cut to fit and NUL-terminated. */
    const char *parts[3] = {model, ": ", text};
    int k = 0;
    for (int p = 0; p < 3; ++p) {
        for (const char *c = parts[p]; *c != '\0' && k < TC_MESSAGE_LEN - 1; ++c) {
            report->message[k++] = *c;
        }
    }
    report->message[k] = '\0';
}

/*
 * Isotropic elastic stiffness in Voigt form, column-major c[i + j*n], engineering shear
 * columns: lambda = E nu / ((1 + nu)(1 - 2 nu)), mu = E / (2 (1 + nu)); plane stress
 * E / (1 - nu^2) [[1, nu, 0], [nu, 1, 0], [0, 0, (1 - nu)/2]] (Hughes 2000, The Finite Element
 * Method, ch. 2; chapter from memory); uniaxial E.
 */
static inline void ex_isotropic_stiffness(int n, tc_real e, tc_real nu, tc_real *c)
{
    for (int k = 0; k < n * n; ++k) {
        c[k] = 0.0;
    }
    if (n == 1) {
        c[0] = e;
        return;
    }
    if (n == 3) {
        tc_real f = e / (1.0 - nu * nu);
        c[0 + 0 * 3] = f;
        c[1 + 1 * 3] = f;
        c[0 + 1 * 3] = f * nu;
        c[1 + 0 * 3] = f * nu;
        c[2 + 2 * 3] = f * (1.0 - nu) / 2.0;
        return;
    }
    /* n == 6 or n == 4: three normal components first, then the shear ones. */
    tc_real mu = e / (2.0 * (1.0 + nu));
    tc_real lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    for (int i = 0; i < 3; ++i) {
        for (int j = 0; j < 3; ++j) {
            c[i + j * n] = lambda;
        }
        c[i + i * n] = lambda + 2.0 * mu;
    }
    for (int i = 3; i < n; ++i) {
        c[i + i * n] = mu;
    }
}

/*
 * The rest of a linear elastic call, once the tangent holds the stiffness C (column-major,
 * n = ncomp): sigma = sigma0 + C dstrain, the stored energy 1/2 sigma . (strain + dstrain) (the
 * work-conjugate product with engineering shear), no dissipation, the state carried through,
 * branch 0 and status ok.
 */
static inline void ex_linear_response(const tc_call *call, const tc_real *strain, const tc_real *dstrain,
                                      const tc_real *stress0, const tc_real *state0, const tc_real *tangent,
                                      tc_real *stress, tc_real *state, tc_energy *energy, tc_report *report)
{
    const int n = call->ncomp;
    tc_real stored = 0.0;
    for (int i = 0; i < n; ++i) {
        tc_real s = stress0[i];
        for (int j = 0; j < n; ++j) {
            s += tangent[i + j * n] * dstrain[j];
        }
        stress[i] = s;
        stored += s * (strain[i] + dstrain[i]);
    }
    for (int k = 0; k < call->nstate; ++k) {
        state[k] = state0[k];
    }

    energy->stored = 0.5 * stored;
    energy->dissipated = 0.0;
    report->provides = TC_PROVIDES_ENERGY;
    report->branch = 0;
    report->status = TC_STATUS_OK;
}

#endif
