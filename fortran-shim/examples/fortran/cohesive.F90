! cohesive.F90 -- bilinear mixed-mode cohesive law with irreversible damage and a contact
! penalty, the reference routine "cohesive" and its flawed variants in Fortran (Camanho &
! Davila 2002, NASA/TM-2002-211737; Camanho, Davila & de Moura 2003, J. Compos. Mater. 37(16);
! propagation by Benzeggagh & Kenane 1996, Compos. Sci. Technol. 56).
!
!   f_cohesive              the consistent tangent
!   f_cohesive_secant       the secant (1 - d) K during damage growth (wrong in branch 1)
!   f_cohesive_no_coupling  the damage-growth term kept on the diagonal only (wrong in branch 1
!                           when two or more separation components are nonzero)
!   f_cohesive_symmetrized  the symmetric part of the tangent, 1/2 (C + C^T) (wrong in
!                           mixed-mode damage growth, where the tangent is unsymmetric)
!   f_cohesive_transposed   the transposed tangent (wrong in mixed-mode damage growth, where
!                           the tangent is unsymmetric)
!
! Layout (DEVELOPERS.md, "Reference models"): ncomp 3 (opening, slip 1, slip 2) or 2 (opening,
! slip); strain = separation, stress = traction, total form (stress0 is not read).
!   properties [K, N, S, G_Ic, G_IIc, eta]: penalty stiffness, normal and shear strength,
!     mode I and mode II toughness, B-K exponent (>= 1);
!   state [d, G_d]: damage and dissipated energy per unit area; entries past these are
!     carried through unchanged.
! With <d3> = max(d3, 0), lambda = sqrt(<d3>**2 + d_shear**2), shear fraction
! B = d_shear**2 / lambda**2 = beta**2 / (1 + beta**2) (B = 1 when closed):
!   onset d0m = d03 d0s / sqrt((1 - B) d0s**2 + B d03**2), d03 = N / K, d0s = S / K;
!   G_c = G_Ic + (G_IIc - G_Ic) B**eta, final dfm = 2 G_c / (K d0m);
!   trial damage dfm (lambda - d0m) / (lambda (dfm - d0m)), 0 below d0m, 1 beyond dfm.
! Branches: 0 undamaged and open, 1 damage growth, 2 unloading/reloading with damage, 3 closed
! (opening < 0) without growth, 4 fully failed. A negative opening carries K d3 and adds no
! damage; the opening counts as open at d3 = 0 (right derivative there).
! Energy: stored 1/2 t . delta, dissipated G_d; each increment of growth adds
! G_c (lambda(d) - lambda(d_n)) / (dfm - d0m), lambda(d) = dfm d0m / (dfm - d (dfm - d0m)).
! dstress_dtemp is not written (the routine does not provide it).
!
! The four routines share one update, cohesive_update.inc, included as internal procedures of
! each (as j2.F90 does), so that the real and the complex build export no clashing symbols.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c cohesive.F90               exports the four routines
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c cohesive.F90  exports them with _cx

#include "tancheck_twin.inc"

subroutine f_cohesive(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                       tangent, dstress_dtemp, energy, report) bind(C, name="f_cohesive"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_abs, cs_sqrt, cs_exp, cs_log
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
  ! stress0 and does not write dstress_dtemp. Naming them in a namelist that is never read or
  ! written tells gfortran -Wall (-Wunused-dummy-argument) that this is deliberate; it
  ! generates no code.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call cohesive_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                       energy, report, 0)

contains

#include "cohesive_update.inc"

end subroutine f_cohesive


subroutine f_cohesive_secant(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                             state, tangent, dstress_dtemp, energy, report) &
                             bind(C, name="f_cohesive_secant"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_abs, cs_sqrt, cs_exp, cs_log
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

  ! See f_cohesive.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call cohesive_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                       energy, report, 1)

contains

#include "cohesive_update.inc"

end subroutine f_cohesive_secant


subroutine f_cohesive_no_coupling(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                                  state, tangent, dstress_dtemp, energy, report) &
                                  bind(C, name="f_cohesive_no_coupling"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_abs, cs_sqrt, cs_exp, cs_log
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

  ! See f_cohesive.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call cohesive_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                       energy, report, 2)

contains

#include "cohesive_update.inc"

end subroutine f_cohesive_no_coupling


subroutine f_cohesive_transposed(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                                 state, tangent, dstress_dtemp, energy, report) &
                                 bind(C, name="f_cohesive_transposed"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_abs, cs_sqrt, cs_exp, cs_log
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

  ! See f_cohesive.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call cohesive_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                       energy, report, 3)

contains

#include "cohesive_update.inc"

end subroutine f_cohesive_transposed


subroutine f_cohesive_symmetrized(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                                  state, tangent, dstress_dtemp, energy, report) &
                                  bind(C, name="f_cohesive_symmetrized"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_abs, cs_sqrt, cs_exp, cs_log
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

  ! See f_cohesive.
  namelist /unused_arguments/ temperature, stress0, dstress_dtemp

  call cohesive_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                       energy, report, 4)

contains

#include "cohesive_update.inc"

end subroutine f_cohesive_symmetrized
