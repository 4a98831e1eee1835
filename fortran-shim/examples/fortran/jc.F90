! jc.F90 -- Johnson-Cook plasticity as a point routine, the reference routines "johnson-cook"
! and "johnson-cook-no-rate-term" in Fortran: small-strain J2 radial return with the flow
! stress of Johnson & Cook (1983), Proc. 7th Int. Symp. Ballistics, 541-547, and the damage
! indicator of Johnson & Cook (1985), Eng. Fract. Mech. 21(1):31-48.
!
!   f_jc                    the consistent tangent, rate term included
!   f_jc_no_rate_term    the same update with the tangent missing the rate term: a
!                           deliberately wrong Jacobian, for tancheck to find
!
! Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
! (11, 22, 33, 12), engineering shear strain.
!   properties [E, nu, A, B, n, C, m, T_room, T_melt, rate0, density, heat_capacity,
!               taylor_quinney, D1, D2, D3, D4, D5] (18);
!   state [eps_p (ncomp, engineering shear), ep, D, dT_heat] (ncomp + 3); entries past these
!     are carried through unchanged.
! The model, its guards and its tangent are those of the Rust model
! (crates/tancheck-models/src/johnson_cook.rs, which documents each choice) and of jc.c.
! Branch 0 elastic, 1 plastic. Provides dstress_dtemp; no energies.
!
! Both routines share one stress update, jc_update.inc, included as an internal procedure of
! each (as j2.F90 does with j2_return_map.inc).
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c jc.F90               exports f_jc,
!                                                                  f_jc_no_rate_term
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c jc.F90  exports the _cx twins

#include "tancheck_twin.inc"

subroutine f_jc(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_jc"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_dstress_dtemp
  use tancheck_cstep, only: cs_sqrt, cs_exp, cs_log, cs_max
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

  ! Total form: stress0 is not read (see f_j2 in j2.F90 for the namelist).
  namelist /unused_arguments/ stress0

  call jc_update(callinfo, properties, strain, dstrain, temperature, state0, stress, state, tangent, &
                 dstress_dtemp, energy, report, .true.)

contains

#include "jc_update.inc"

end subroutine f_jc


subroutine f_jc_no_rate_term(callinfo, properties, strain, dstrain, temperature, stress0, state0, &
                                stress, state, tangent, dstress_dtemp, energy, report) &
                                bind(C, name="f_jc_no_rate_term"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_dstress_dtemp
  use tancheck_cstep, only: cs_sqrt, cs_exp, cs_log, cs_max
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

  ! See f_jc.
  namelist /unused_arguments/ stress0

  call jc_update(callinfo, properties, strain, dstrain, temperature, state0, stress, state, tangent, &
                 dstress_dtemp, energy, report, .false.)

contains

#include "jc_update.inc"

end subroutine f_jc_no_rate_term
