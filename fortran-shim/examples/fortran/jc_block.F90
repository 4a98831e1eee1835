! jc_block.F90 -- Johnson-Cook plasticity with damage and deletion as a block routine
! (tancheck_block.h / module tancheck_block), the reference block routine "johnson-cook-block"
! and three flawed variants of the selftest zoo, in Fortran. Model, layouts and flaws as the Rust
! model (crates/tancheck-models/src/block/johnson_cook.rs) and jc_block.c.
!
!   f_jc_block                     the correct block routine
!   f_jc_block_revived             a deleted point comes back when compressed (damage cleared)
!   f_jc_block_unguarded_rate      rate factor 1 + C ln(rate*) of the total strain rate, folded
!                                  into A and B, without the floor: ln 0 at a zero rate
!   f_jc_block_wrong_temperature   the elastic response (wave speed) from E at room temperature
!
! Every point is updated by the point routine's jc_update (jc_update.inc, as in jc.F90).
! Properties (21): the 18 of jc.F90, then [k_E, G_f, d_max]; state (ncomp + 7): jc.F90's
! [eps_p (ncomp), ep, D, dT_heat], then [d, sigma_y0, u, deleted].
!
! Build (after compiling the modules tancheck_routine, tancheck_cstep and tancheck_block):
!   gfortran -cpp -I fortran-shim/include -c jc_block.F90               exports f_jc_block, ...
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c jc_block.F90  exports the _cx twins

#include "tancheck_twin.inc"
#include "tancheck_block_twin.inc"

! the correct block routine
subroutine f_jc_block(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_jc_block"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t, c_null_char
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, tc_set_message, &
                              tc_status_ok, tc_status_failed, tc_provides_dstress_dtemp, &
                              tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp, cs_log, cs_max
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

  call jc_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 0)

contains

#include "jc_block_update.inc"
#include "jc_update.inc"

end subroutine f_jc_block

! a deleted point revived under compression
subroutine f_jc_block_revived(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_jc_block_revived"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t, c_null_char
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, tc_set_message, &
                              tc_status_ok, tc_status_failed, tc_provides_dstress_dtemp, &
                              tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp, cs_log, cs_max
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

  call jc_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 1)

contains

#include "jc_block_update.inc"
#include "jc_update.inc"

end subroutine f_jc_block_revived

! the rate term not guarded at zero rate
subroutine f_jc_block_unguarded_rate(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_jc_block_unguarded_rate"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t, c_null_char
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, tc_set_message, &
                              tc_status_ok, tc_status_failed, tc_provides_dstress_dtemp, &
                              tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp, cs_log, cs_max
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

  call jc_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 2)

contains

#include "jc_block_update.inc"
#include "jc_update.inc"

end subroutine f_jc_block_unguarded_rate

! the elastic response at the wrong temperature
subroutine f_jc_block_wrong_temperature(block, properties, strain, strain_increment, stress_start, state_start, &
                  energy_start, conditions, stress, state, energy, deleted, report) &
                  bind(C, name="f_jc_block_wrong_temperature"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex, c_int32_t, c_null_char
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, tc_set_message, &
                              tc_status_ok, tc_status_failed, tc_provides_dstress_dtemp, &
                              tc_routine_abi_version
  use tancheck_block, only: tc_block, tc_point_conditions, tc_block_report, &
                            tc_specific_energy, tc_block_status_failed, &
                            tc_block_elastic_response, tc_block_set_message
  use tancheck_cstep, only: cs_sqrt, cs_exp, cs_log, cs_max
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

  call jc_block_update(block, properties, strain, strain_increment, stress_start, state_start, &
                       energy_start, conditions, stress, state, energy, deleted, report, 3)

contains

#include "jc_block_update.inc"
#include "jc_update.inc"

end subroutine f_jc_block_wrong_temperature
