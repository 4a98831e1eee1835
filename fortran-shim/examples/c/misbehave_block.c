/*
 * misbehave_block.c -- block routines (tancheck_block.h) that break memory on purpose, for the
 * tests of the block trampoline and the block memory guards. Elastic (properties [E, nu], no
 * state) except for their one misbehaviour:
 *
 *   mb_block_ok             correct
 *   mb_block_overrun        writes stress one entry past the last point
 *   mb_block_writes_input   writes its read-only strain_increment
 *   mb_block_unwritten      leaves the energy of the last point unwritten
 *   mb_block_crash          dereferences a null pointer in the last point
 *   mb_block_overread       adds a little of the next point's strain increment to each
 *                           point's stress, the last point's read past strain_increment
 *   mb_block_nan_at_rest    a direction of the strain increment taken without a guard: NaN
 *                           stress for a point at rest
 *   mb_block_state_overread reads the next point's state after the first call, the last
 *                           point's past the end of state_start
 *   mb_block_large_crash    dereferences a null pointer in blocks of more than 100 points
 *   mb_block_large_unwritten leaves the last point's energy unwritten in blocks of 7 points
 *                           or more
 *   mb_block_spin7          never returns from a block of exactly 7 points
 *   mb_block_deleted_unwritten  correct in the first call; after it leaves every point's
 *                           deleted flag unwritten
 * The last three are correct in blocks of one point and in the first call, so only the
 * independence check's blocks of 7 and 128 meet their misbehaviour.
 */
#include <stddef.h>

#include "tancheck_block.h"

static void elastic(const tc_block *block, const tc_real *properties, const tc_real *strain_increment,
                    const tc_real *stress_start, const tc_specific_energy *energy_start,
                    const tc_point_conditions *conditions, tc_real *stress,
                    tc_specific_energy *energy, int32_t *deleted, int skip_last_energy)
{
    const int n = block->ncomp;
    const tc_real e = properties[0], nu = properties[1];
    const tc_real mu = e / (2.0 * (1.0 + nu)), lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    for (int p = 0; p < block->npoints; ++p) {
        const tc_real *de = strain_increment + p * n;
        const tc_real tr = de[0] + de[1] + de[2];
        tc_real work = 0.0;
        for (int i = 0; i < n; ++i) {
            stress[p * n + i] = stress_start[p * n + i] + (i < 3 ? lambda * tr + 2.0 * mu * de[i] : mu * de[i]);
            work += 0.5 * (stress_start[p * n + i] + stress[p * n + i]) * de[i];
        }
        deleted[p] = 0;
        if (skip_last_energy && p == block->npoints - 1) continue;
        energy[p].internal = energy_start[p].internal + work / conditions[p].density;
        energy[p].dissipated = energy_start[p].dissipated;
    }
}

#define ARGS block, properties, strain_increment, stress_start, energy_start, conditions, stress, energy, deleted

TC_BLOCK_ROUTINE(mb_block_ok)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 0);
}

TC_BLOCK_ROUTINE(mb_block_overrun)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 0);
    stress[block->npoints * block->ncomp] = 1.0;
}

TC_BLOCK_ROUTINE(mb_block_writes_input)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 0);
    ((tc_real *)strain_increment)[0] = 0.0;
}

TC_BLOCK_ROUTINE(mb_block_unwritten)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 1);
}

TC_BLOCK_ROUTINE(mb_block_crash)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 0);
    volatile tc_real *nowhere = NULL;
    if (block->npoints > 0) stress[0] = nowhere[block->npoints];
}

TC_BLOCK_ROUTINE(mb_block_overread)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 0);
    const int n = block->ncomp;
    for (int p = 0; p < block->npoints; ++p) stress[p * n] += 1.0e-3 * strain_increment[(p + 1) * n];
}

/* mb_block_nan_at_rest: adds 0 × Δε11 / |Δε|² to each point's stress, a direction taken
 * without a guard: 0/0 = NaN for a point at rest (a zero strain increment). */
TC_BLOCK_ROUTINE(mb_block_nan_at_rest)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic(ARGS, 0);
    const int n = block->ncomp;
    for (int p = 0; p < block->npoints; ++p) {
        /* Otherwise correct: the elastic response (first call) updates no energy. */
        if (block->flags & TC_BLOCK_ELASTIC_RESPONSE) energy[p] = energy_start[p];
        const tc_real *de = strain_increment + p * n;
        tc_real sq = 0.0;
        for (int i = 0; i < n; ++i) sq += de[i] * de[i];
        stress[p * n] += 0.0 * de[0] / sq;
    }
}

/* mb_block_state_overread: carries its state variables through, and outside the first call
 * adds a little of the next point's first state variable to each point's stress: the last
 * point's read is past the end of state_start. The first call (the elastic response) is
 * clean, so the guards find it in the calls after it. */
TC_BLOCK_ROUTINE(mb_block_state_overread)
{
    (void)strain;
    (void)report;
    elastic(ARGS, 0);
    const int n = block->ncomp, ns = block->nstate;
    for (int p = 0; p < block->npoints; ++p) {
        for (int k = 0; k < ns; ++k) state[p * ns + k] = state_start[p * ns + k];
        if (block->flags & TC_BLOCK_ELASTIC_RESPONSE) {
            energy[p] = energy_start[p];
        } else if (ns > 0) {
            stress[p * n] += 1.0e-9 * state_start[p * ns + ns];
        }
    }
}

/* Elastic, the first call's energy carried over; shared by the routines below. */
static void elastic_in_blocks(const tc_block *block, const tc_real *properties,
                              const tc_real *strain_increment, const tc_real *stress_start,
                              const tc_specific_energy *energy_start,
                              const tc_point_conditions *conditions, tc_real *stress,
                              tc_specific_energy *energy, int32_t *deleted, int skip_last_energy)
{
    elastic(ARGS, skip_last_energy);
    if (block->flags & TC_BLOCK_ELASTIC_RESPONSE) {
        for (int p = 0; p < block->npoints; ++p) energy[p] = energy_start[p];
    }
}

TC_BLOCK_ROUTINE(mb_block_large_crash)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic_in_blocks(ARGS, 0);
    volatile tc_real *nowhere = NULL;
    if (block->npoints > 100) stress[0] = nowhere[block->npoints];
}

TC_BLOCK_ROUTINE(mb_block_large_unwritten)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic_in_blocks(ARGS, block->npoints >= 7);
}

TC_BLOCK_ROUTINE(mb_block_spin7)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    elastic_in_blocks(ARGS, 0);
    volatile int spin = block->npoints == 7;
    while (spin) {
    }
}

TC_BLOCK_ROUTINE(mb_block_deleted_unwritten)
{
    (void)strain;
    (void)state_start;
    (void)state;
    (void)report;
    const int first = (block->flags & TC_BLOCK_ELASTIC_RESPONSE) != 0;
    int32_t kept[1024];
    /* The flags written into a scratch array instead, after the first call (the checks' blocks
     * are far smaller). */
    if (block->npoints > 1024) return;
    elastic_in_blocks(block, properties, strain_increment, stress_start, energy_start, conditions, stress,
                      energy, first ? deleted : kept, 0);
}
