! jc_block.F90 -- Johnson-Cook plasticity with damage and deletion as a block routine
! (tancheck_block.h / module tancheck_block), the reference block routine "johnson-cook-block"
! and the flawed variants of the selftest zoo, in Fortran. Model, layouts and flaws as the Rust
! model (crates/tancheck-models/src/block/johnson_cook.rs) and jc_block.c.
!
!   f_jc_block                     the correct block routine
!   f_jc_block_revived             a deleted point comes back when compressed (damage cleared)
!   f_jc_block_unguarded_rate      rate factor 1 + C ln(rate*) of the total strain rate, folded
!                                  into A and B, without the floor: ln 0 at a zero rate
!   f_jc_block_wrong_temperature   the elastic response (wave speed) from E at room temperature
!   f_jc_block_deleted_stress      a deleted point freezes its last stress instead of zero
!   f_jc_block_unclipped_temperature  the thermal factor 1 - T*^m on a yielding point's stress
!                                  without the clip at T* = 0: NaN below the room temperature
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
#define TC_VARIANT f_jc_block
#define TC_VARIANT_NAME "f_jc_block"
#define TC_FLAW 0
#include "jc_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! a deleted point comes back when compressed (damage cleared)
#define TC_VARIANT f_jc_block_revived
#define TC_VARIANT_NAME "f_jc_block_revived"
#define TC_FLAW 1
#include "jc_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! rate factor of the total strain rate without the floor: ln 0 at a zero rate
#define TC_VARIANT f_jc_block_unguarded_rate
#define TC_VARIANT_NAME "f_jc_block_unguarded_rate"
#define TC_FLAW 2
#include "jc_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! the elastic response (wave speed) from E at room temperature
#define TC_VARIANT f_jc_block_wrong_temperature
#define TC_VARIANT_NAME "f_jc_block_wrong_temperature"
#define TC_FLAW 3
#include "jc_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! a deleted point freezes its last stress instead of zero
#define TC_VARIANT f_jc_block_deleted_stress
#define TC_VARIANT_NAME "f_jc_block_deleted_stress"
#define TC_FLAW 4
#include "jc_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW

! the thermal factor without the clip at T* = 0: NaN below the room temperature
#define TC_VARIANT f_jc_block_unclipped_temperature
#define TC_VARIANT_NAME "f_jc_block_unclipped_temperature"
#define TC_FLAW 5
#include "jc_block_variant.inc"
#undef TC_VARIANT
#undef TC_VARIANT_NAME
#undef TC_FLAW
