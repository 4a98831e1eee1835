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
! The six routines share one entry, ply_variant.inc, which calls the one update, ply_update.inc,
! included as internal procedures of each.
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c ply.F90               exports f_ply, f_ply_*
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c ply.F90  exports them with _cx

#include "tancheck_twin.inc"

! f_ply: correct.
#define TC_VARIANT f_ply
#define TC_VARIANT_NAME "f_ply"
#define TC_FLAW 0
#include "ply_variant.inc"

! f_ply_secant: the secant (1 - D) C in damage growth.
#define TC_VARIANT f_ply_secant
#define TC_VARIANT_NAME "f_ply_secant"
#define TC_FLAW 1
#include "ply_variant.inc"

! f_ply_no_coupling: the growth of the shear damage left out of the tangent.
#define TC_VARIANT f_ply_no_coupling
#define TC_VARIANT_NAME "f_ply_no_coupling"
#define TC_FLAW 2
#include "ply_variant.inc"

! f_ply_viscous_no_factor: the viscous tangent without dt/(eta + dt).
#define TC_VARIANT f_ply_viscous_no_factor
#define TC_VARIANT_NAME "f_ply_viscous_no_factor"
#define TC_FLAW 3
#include "ply_variant.inc"

! f_ply_length_dropped: L dropped from the regularisation (as if 1).
#define TC_VARIANT f_ply_length_dropped
#define TC_VARIANT_NAME "f_ply_length_dropped"
#define TC_FLAW 4
#include "ply_variant.inc"

! f_ply_healing: damage from the current failure measure: heals on unloading.
#define TC_VARIANT f_ply_healing
#define TC_VARIANT_NAME "f_ply_healing"
#define TC_FLAW 5
#include "ply_variant.inc"
