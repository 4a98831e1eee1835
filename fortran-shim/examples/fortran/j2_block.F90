! j2_block.F90 -- J2 plasticity with linear kinematic hardening as a block routine
! (tancheck_block.h / module tancheck_block), the reference block routine "j2-block" and the
! flawed variants of the selftest zoo, in Fortran.
!
!   f_j2_block                      the correct block routine
!   f_j2_block_neighbour_state      point p starts from the state of point p + 1
!   f_j2_block_old_stress_energy    internal energy from the start stress only
!   f_j2_block_dissipation_sign     dissipation added with the wrong sign
!   f_j2_block_total_back_stress    back stress from the total plastic strain, not its increment
!   f_j2_block_corrector_sign       plastic corrector added: sigma = 2 sigma_trial - sigma_return
!   f_j2_block_double_correction    plastic corrector twice: sigma = 2 sigma_return - sigma_trial
!   f_j2_block_midpoint             (correct) internal energy by the midpoint rule
!
! Every point is updated by the point routine's radial return (j2_return_map.inc, as in
! j2.F90). Properties and state as j2.F90: [E, nu, sigma_y0, H_iso, Q, b, H_kin], state
! [eps_p (ncomp), alpha, beta (ncomp)]. Specific energies: internal energy by the trapezoid
! rule 1/2 (sigma_start + sigma) . dstrain / density, dissipation sigma_y0 dalpha / density.
! No point is ever deleted. The elastic response (tc_block_elastic_response) returns
! stress_start + C dstrain with the isotropic C(E, nu) and updates nothing.
!
! Build (after compiling the modules tancheck_routine, tancheck_cstep and tancheck_block):
!   gfortran -cpp -I fortran-shim/include -c j2_block.F90               exports f_j2_block, ...
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c j2_block.F90  exports the _cx twins

#include "tancheck_twin.inc"
#include "tancheck_block_twin.inc"

! the correct block routine
#define TC_VARIANT f_j2_block
#define TC_VARIANT_NAME "f_j2_block"
#define TC_FLAW 0
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! point p starts from the state of point p + 1
#define TC_VARIANT f_j2_block_neighbour_state
#define TC_VARIANT_NAME "f_j2_block_neighbour_state"
#define TC_FLAW 1
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! internal energy from the start stress only
#define TC_VARIANT f_j2_block_old_stress_energy
#define TC_VARIANT_NAME "f_j2_block_old_stress_energy"
#define TC_FLAW 2
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! dissipation added with the wrong sign
#define TC_VARIANT f_j2_block_dissipation_sign
#define TC_VARIANT_NAME "f_j2_block_dissipation_sign"
#define TC_FLAW 3
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! back stress from the total plastic strain, not its increment
#define TC_VARIANT f_j2_block_total_back_stress
#define TC_VARIANT_NAME "f_j2_block_total_back_stress"
#define TC_FLAW 4
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! plastic corrector added: sigma = 2 sigma_trial - sigma_return
#define TC_VARIANT f_j2_block_corrector_sign
#define TC_VARIANT_NAME "f_j2_block_corrector_sign"
#define TC_FLAW 5
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! plastic corrector twice: sigma = 2 sigma_return - sigma_trial
#define TC_VARIANT f_j2_block_double_correction
#define TC_VARIANT_NAME "f_j2_block_double_correction"
#define TC_FLAW 6
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! (correct) internal energy by the midpoint rule
#define TC_VARIANT f_j2_block_midpoint
#define TC_VARIANT_NAME "f_j2_block_midpoint"
#define TC_FLAW 7
#include "j2_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW
