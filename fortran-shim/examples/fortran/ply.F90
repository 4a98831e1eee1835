! ply.F90 -- composite ply damage at a point, the reference routine "ply" and its flawed
! variants in Fortran (the Rust model crates/tancheck-models/src/ply.rs; layouts in
! DEVELOPERS.md, "Reference models").
!
! ncomp 6 (solid-3d: 11, 22, 33, 23, 13, 12) or 3 (plane stress: 11, 22, 12; material axis 3
! must be global 3), engineering shear, total form (stress0 is not read).
!   properties (26) [E1, E2, E3, nu12, nu13, nu23, G12, G13, G23, a1x, a1y, a1z, a2x, a2y, a2z,
!                    Xt, Xc, Yt, Yc, SL, G_ft, G_fc, G_mt, G_mc, L, eta]
!   state (8)       [r_ft, r_fc, r_mt, r_mc, d_ft, d_fc, d_mt, d_mc]
! Effective stress s = C e in the material frame (plane stress: reduced stiffness); Hashin
! (1980) indices per mode with S_T = Yc/2; damage per mode d = rf (r - 1) / (r (rf - 1)),
! rf = 2 G C_kk / (X^2 L) (linear softening over the characteristic length, crack band;
! rf <= 1 fails naming the largest admissible L); viscous d_v = (eta d_v,n + dt d)/(eta + dt);
! stress (1 - D) s with D = d_f on 11, d_m on 22 and 33, 1 - prod(1 - d_I) on the shears;
! consistent tangent (1 - D_i) C_ij - s_i dD_i/ds . C, the growth term times dt/(eta + dt).
! Branches 0 undamaged, 1 growth, 2 damaged without growth, 3 a mode fully damaged.
!
! The six routines share one update, ply_update.inc, included as internal procedures of each.
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c ply.F90               exports f_ply, f_ply_*
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c ply.F90  exports them with _cx

#include "tancheck_twin.inc"

! f_ply: correct.
subroutine f_ply(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_ply"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
  use tancheck_cstep, only: cs_sqrt, cs_max
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

  ! The ABI passes these; this isothermal, total-form model reads neither temperature nor stress0.
  ! Naming them in a namelist that is never used keeps gfortran -Wall quiet; no code.
  namelist /unused_arguments/ temperature, stress0

  call ply_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                  dstress_dtemp, energy, report, 0)

contains

#include "ply_update.inc"

end subroutine f_ply

! f_ply_secant: the secant (1 - D) C in damage growth.
subroutine f_ply_secant(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_ply_secant"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
  use tancheck_cstep, only: cs_sqrt, cs_max
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

  ! The ABI passes these; this isothermal, total-form model reads neither temperature nor stress0.
  ! Naming them in a namelist that is never used keeps gfortran -Wall quiet; no code.
  namelist /unused_arguments/ temperature, stress0

  call ply_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                  dstress_dtemp, energy, report, 1)

contains

#include "ply_update.inc"

end subroutine f_ply_secant

! f_ply_no_coupling: the growth of the shear damage left out of the tangent.
subroutine f_ply_no_coupling(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_ply_no_coupling"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
  use tancheck_cstep, only: cs_sqrt, cs_max
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

  ! The ABI passes these; this isothermal, total-form model reads neither temperature nor stress0.
  ! Naming them in a namelist that is never used keeps gfortran -Wall quiet; no code.
  namelist /unused_arguments/ temperature, stress0

  call ply_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                  dstress_dtemp, energy, report, 2)

contains

#include "ply_update.inc"

end subroutine f_ply_no_coupling

! f_ply_viscous_no_factor: the viscous tangent without dt/(eta + dt).
subroutine f_ply_viscous_no_factor(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_ply_viscous_no_factor"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
  use tancheck_cstep, only: cs_sqrt, cs_max
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

  ! The ABI passes these; this isothermal, total-form model reads neither temperature nor stress0.
  ! Naming them in a namelist that is never used keeps gfortran -Wall quiet; no code.
  namelist /unused_arguments/ temperature, stress0

  call ply_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                  dstress_dtemp, energy, report, 3)

contains

#include "ply_update.inc"

end subroutine f_ply_viscous_no_factor

! f_ply_length_dropped: L dropped from the regularisation (as if 1).
subroutine f_ply_length_dropped(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_ply_length_dropped"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
  use tancheck_cstep, only: cs_sqrt, cs_max
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

  ! The ABI passes these; this isothermal, total-form model reads neither temperature nor stress0.
  ! Naming them in a namelist that is never used keeps gfortran -Wall quiet; no code.
  namelist /unused_arguments/ temperature, stress0

  call ply_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                  dstress_dtemp, energy, report, 4)

contains

#include "ply_update.inc"

end subroutine f_ply_length_dropped

! f_ply_healing: damage from the current failure measure: heals on unloading.
subroutine f_ply_healing(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                tangent, dstress_dtemp, energy, report) bind(C, name="f_ply_healing"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
  use tancheck_cstep, only: cs_sqrt, cs_max
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

  ! The ABI passes these; this isothermal, total-form model reads neither temperature nor stress0.
  ! Naming them in a namelist that is never used keeps gfortran -Wall quiet; no code.
  namelist /unused_arguments/ temperature, stress0

  call ply_update(callinfo, properties, strain, dstrain, state0, stress, state, tangent, &
                  dstress_dtemp, energy, report, 5)

contains

#include "ply_update.inc"

end subroutine f_ply_healing
