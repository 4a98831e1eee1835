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
! Both routines share one entry, jc_variant.inc (they differ only in the rate term's flag), which
! calls the one stress update, jc_update.inc, included as an internal procedure of each (as j2.F90
! does with j2_return_map.inc).
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c jc.F90               exports f_jc,
!                                                                  f_jc_no_rate_term
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c jc.F90  exports the _cx twins

#include "tancheck_twin.inc"

#define TC_VARIANT f_jc
#define TC_VARIANT_NAME "f_jc"
#define TC_RATE_TERM .true.
#include "jc_variant.inc"

#define TC_VARIANT f_jc_no_rate_term
#define TC_VARIANT_NAME "f_jc_no_rate_term"
#define TC_RATE_TERM .false.
#include "jc_variant.inc"
