! zoo_j2.F90 -- J2 routines with a deliberately wrong tangent, for `tancheck selftest`, in
! Fortran. The stress update is that of the reference f_j2 (j2.F90 and j2_return_map.inc;
! Simo & Taylor 1985, CMAME 48; Simo & Hughes 1998, Computational Inelasticity, Box 3.2); only
! the returned tangent is spoiled, as in the Rust models and C routines of the same names:
!
!   f_j2_shear_factor           shear columns of the consistent tangent halved (written as if
!                               for tensor shear strain)
!   f_j2_shear_permuted         tangent rows and columns in shear order 12, 13, 23 while stress
!                               and strain use 23, 13, 12 (ncomp 6 only)
!   f_j2_elastic_first_plastic  elastic tangent in a plastic increment from alpha_n = 0
!   f_j2_unit_factor            consistent tangent times 1000
!   f_j2_one_column             after yield, the 13 column of the tangent taken from the
!                               elastic tangent (ncomp 6 only)
!   f_j2_single_entry           entry 33/22 of the consistent tangent times 1 + 1e-4
!   f_j2_plastic_sign           plastic correction with the wrong sign in every plastic increment
!   f_j2_rank_two               after yield, + c (n(x)1 + 1(x)n), c = 0.05 mu (rank two)
!   f_j2_term_missing           after yield, the plastic correction 2 mu theta_bar n(x)n left out
!   f_j2_no_kinematic           H_kin left out of theta_bar (the update keeps it)
!   f_twin_real_sqrt            tangent and real update correct; after yield the complex twin
!                               divides by a norm taken with a real-only square root,
!                               sqrt(real(x)): NOT complex-step safe, on purpose
!   f_twin_conjugate            the same with the norm from dot_product, which conjugates its
!                               first argument: NOT complex-step safe, on purpose
!
! Layout: that of j2 (DEVELOPERS.md, "Reference models"): ncomp 6 or 4, engineering shear;
! properties [E, nu, sigma_y0, H_iso, Q, b, H_kin]; state [eps_p, alpha, beta], 2 ncomp + 1
! entries. Branch 0 elastic, 1 plastic. No energy output.
!
! Each routine is an external procedure that contains the shared update (j2_return_map.inc)
! and the spoiling step (zoo_j2_flawed.inc) as internal procedures, as j2.F90 does, so the
! real and the complex build link into one library without clashing symbols.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c zoo_j2.F90               exports f_j2_shear_factor, ...
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c zoo_j2.F90  exports the same with _cx

#include "tancheck_twin.inc"


subroutine f_j2_shear_factor(callinfo, properties, strain, dstrain, temperature, stress0, &
                             state0, stress, state, tangent, dstress_dtemp, energy, report) &
                             bind(C, name="f_j2_shear_factor"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "shear-factor")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_shear_factor


subroutine f_j2_shear_permuted(callinfo, properties, strain, dstrain, temperature, stress0, &
                               state0, stress, state, tangent, dstress_dtemp, energy, report) &
                               bind(C, name="f_j2_shear_permuted"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "shear-permuted")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_shear_permuted


subroutine f_j2_elastic_first_plastic(callinfo, properties, strain, dstrain, temperature, stress0, &
                                      state0, stress, state, tangent, dstress_dtemp, &
                                      energy, report) &
                                      bind(C, name="f_j2_elastic_first_plastic"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "elastic-first-plastic")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_elastic_first_plastic


subroutine f_j2_unit_factor(callinfo, properties, strain, dstrain, temperature, stress0, &
                            state0, stress, state, tangent, dstress_dtemp, energy, report) &
                            bind(C, name="f_j2_unit_factor"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "unit-factor")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_unit_factor


subroutine f_j2_one_column(callinfo, properties, strain, dstrain, temperature, stress0, &
                           state0, stress, state, tangent, dstress_dtemp, energy, report) &
                           bind(C, name="f_j2_one_column"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "one-column")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_one_column

subroutine f_j2_single_entry(callinfo, properties, strain, dstrain, temperature, stress0, &
                             state0, stress, state, tangent, dstress_dtemp, energy, report) &
                             bind(C, name="f_j2_single_entry"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "single-entry")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_single_entry

subroutine f_j2_plastic_sign(callinfo, properties, strain, dstrain, temperature, stress0, &
                             state0, stress, state, tangent, dstress_dtemp, energy, report) &
                             bind(C, name="f_j2_plastic_sign"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "plastic-sign")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_plastic_sign

subroutine f_j2_rank_two(callinfo, properties, strain, dstrain, temperature, stress0, &
                         state0, stress, state, tangent, dstress_dtemp, energy, report) &
                         bind(C, name="f_j2_rank_two"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "rank-two")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_rank_two

subroutine f_twin_real_sqrt(callinfo, properties, strain, dstrain, temperature, stress0, &
                            state0, stress, state, tangent, dstress_dtemp, energy, report) &
                            bind(C, name="f_twin_real_sqrt"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "twin-real-sqrt")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_twin_real_sqrt

subroutine f_twin_conjugate(callinfo, properties, strain, dstrain, temperature, stress0, &
                            state0, stress, state, tangent, dstress_dtemp, energy, report) &
                            bind(C, name="f_twin_conjugate"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "twin-conjugate")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_twin_conjugate


subroutine f_j2_term_missing(callinfo, properties, strain, dstrain, temperature, stress0, &
                             state0, stress, state, tangent, dstress_dtemp, energy, report) &
                             bind(C, name="f_j2_term_missing"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "term-missing")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_term_missing


subroutine f_j2_no_kinematic(callinfo, properties, strain, dstrain, temperature, stress0, &
                             state0, stress, state, tangent, dstress_dtemp, energy, report) &
                             bind(C, name="f_j2_no_kinematic"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt, cs_exp
  implicit none
  type(tc_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
  TC_REAL, intent(inout) :: dstress_dtemp(callinfo%ncomp)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Passed by the ABI, unused by this isothermal, total-form model (see j2.F90).
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call zoo_j2_flawed(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, "no-kinematic")
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"
#include "zoo_j2_flawed.inc"

end subroutine f_j2_no_kinematic
