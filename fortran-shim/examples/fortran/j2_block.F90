! j2_block.F90 -- J2 plasticity with linear kinematic hardening as a block routine
! (tancheck_block.h / module tancheck_block), the reference block routine "j2-block" and three
! flawed variants of the selftest zoo, in Fortran.
!
!   f_j2_block                      the correct block routine
!   f_j2_block_neighbour_state      point p starts from the state of point p + 1
!   f_j2_block_old_stress_energy    internal energy from the start stress only
!   f_j2_block_dissipation_sign     dissipation added with the wrong sign
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
subroutine f_j2_block(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_j2_block"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t
  use tancheck_routine, only: tc_call, tc_report, tc_energy, tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy, tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_block), intent(in) :: block
  TC_REAL, intent(in) :: properties(block%nproperties)
  TC_REAL, intent(in) :: strain(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: strain_increment(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: stress_start(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: state_start(block%nstate, block%npoints)
  type(tc_specific_energy), intent(in) :: energy_start(block%npoints)
  type(tc_point_conditions), intent(in) :: conditions(block%npoints)
  TC_REAL, intent(out) :: stress(block%ncomp, block%npoints)
  TC_REAL, intent(out) :: state(block%nstate, block%npoints)
  type(tc_specific_energy), intent(out) :: energy(block%npoints)
  integer(c_int32_t), intent(out) :: deleted(block%npoints)
  type(tc_block_report), intent(inout) :: report

  call j2_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 0)

contains

#include "j2_block_update.inc"
#include "j2_return_map.inc"

end subroutine f_j2_block

! point p starts from the state of point p + 1
subroutine f_j2_block_neighbour_state(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_j2_block_neighbour_state"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t
  use tancheck_routine, only: tc_call, tc_report, tc_energy, tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy, tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_block), intent(in) :: block
  TC_REAL, intent(in) :: properties(block%nproperties)
  TC_REAL, intent(in) :: strain(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: strain_increment(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: stress_start(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: state_start(block%nstate, block%npoints)
  type(tc_specific_energy), intent(in) :: energy_start(block%npoints)
  type(tc_point_conditions), intent(in) :: conditions(block%npoints)
  TC_REAL, intent(out) :: stress(block%ncomp, block%npoints)
  TC_REAL, intent(out) :: state(block%nstate, block%npoints)
  type(tc_specific_energy), intent(out) :: energy(block%npoints)
  integer(c_int32_t), intent(out) :: deleted(block%npoints)
  type(tc_block_report), intent(inout) :: report

  call j2_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 1)

contains

#include "j2_block_update.inc"
#include "j2_return_map.inc"

end subroutine f_j2_block_neighbour_state

! internal energy from the start stress only
subroutine f_j2_block_old_stress_energy(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_j2_block_old_stress_energy"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t
  use tancheck_routine, only: tc_call, tc_report, tc_energy, tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy, tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_block), intent(in) :: block
  TC_REAL, intent(in) :: properties(block%nproperties)
  TC_REAL, intent(in) :: strain(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: strain_increment(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: stress_start(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: state_start(block%nstate, block%npoints)
  type(tc_specific_energy), intent(in) :: energy_start(block%npoints)
  type(tc_point_conditions), intent(in) :: conditions(block%npoints)
  TC_REAL, intent(out) :: stress(block%ncomp, block%npoints)
  TC_REAL, intent(out) :: state(block%nstate, block%npoints)
  type(tc_specific_energy), intent(out) :: energy(block%npoints)
  integer(c_int32_t), intent(out) :: deleted(block%npoints)
  type(tc_block_report), intent(inout) :: report

  call j2_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 2)

contains

#include "j2_block_update.inc"
#include "j2_return_map.inc"

end subroutine f_j2_block_old_stress_energy

! dissipation with the wrong sign
subroutine f_j2_block_dissipation_sign(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_j2_block_dissipation_sign"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t
  use tancheck_routine, only: tc_call, tc_report, tc_energy, tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy, tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_block), intent(in) :: block
  TC_REAL, intent(in) :: properties(block%nproperties)
  TC_REAL, intent(in) :: strain(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: strain_increment(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: stress_start(block%ncomp, block%npoints)
  TC_REAL, intent(in) :: state_start(block%nstate, block%npoints)
  type(tc_specific_energy), intent(in) :: energy_start(block%npoints)
  type(tc_point_conditions), intent(in) :: conditions(block%npoints)
  TC_REAL, intent(out) :: stress(block%ncomp, block%npoints)
  TC_REAL, intent(out) :: state(block%nstate, block%npoints)
  type(tc_specific_energy), intent(out) :: energy(block%npoints)
  integer(c_int32_t), intent(out) :: deleted(block%npoints)
  type(tc_block_report), intent(inout) :: report

  call j2_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 3)

contains

#include "j2_block_update.inc"
#include "j2_return_map.inc"

end subroutine f_j2_block_dissipation_sign
