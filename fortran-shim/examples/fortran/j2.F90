! j2.F90 -- small-strain J2 plasticity with radial return, the reference routines "j2" and
! "j2-continuum" in Fortran (Simo & Taylor 1985, CMAME 48; Simo & Hughes 1998, Computational
! Inelasticity, Box 3.2).
!
!   f_j2            the consistent (algorithmic) tangent
!   f_j2_continuum  the same stress update with the continuum elastoplastic tangent: a
!                   deliberately wrong Jacobian of the update, for tancheck to find
!
! Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
! (11, 22, 33, 12), engineering shear strain.
!   properties [E, nu, sigma_y0, H_iso, Q, b, H_kin]:
!     yield stress K(alpha) = sigma_y0 + H_iso alpha + Q (1 - exp(-b alpha)) (linear plus Voce),
!     linear kinematic hardening modulus H_kin;
!   state [eps_p (ncomp, engineering shear), alpha, beta (ncomp, back stress)], 2 ncomp + 1
!     entries; entries past these are carried through unchanged.
! Branch 0 elastic, 1 plastic. Energies from the end state (j2_energy in j2_return_map.inc).
!
! Both routines share one stress update, j2_return_map.inc, included as an internal procedure
! of each: external procedures (not module procedures) keep the real and the complex build
! free of clashing symbols, so both link into one library, and internal procedures export no
! symbol of their own.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c j2.F90               exports f_j2, f_j2_continuum
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c j2.F90  exports f_j2_cx,
!                                                                  f_j2_continuum_cx

#include "tancheck_twin.inc"

subroutine f_j2(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_j2"//TC_SUFFIX)
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

  ! The ABI passes these, but this isothermal, total-form model reads neither temperature nor
  ! stress0 and writes neither dstress_dtemp nor energy. Naming them in a namelist that is
  ! never read or written tells gfortran -Wall (-Wunused-dummy-argument) that this is
  ! deliberate; it generates no code.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call j2_return_map(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, .true.)
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"

end subroutine f_j2


subroutine f_j2_continuum(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                          state, tangent, dstress_dtemp, energy, report) &
                          bind(C, name="f_j2_continuum"//TC_SUFFIX)
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

  ! See f_j2.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call j2_return_map(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                     report, .false.)
  call j2_energy(callinfo, properties, strain, dstrain, stress, state, energy, report)

contains

#include "j2_return_map.inc"

end subroutine f_j2_continuum
