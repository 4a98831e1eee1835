! misbehave.F90 -- Fortran routines that misbehave on purpose, for testing tancheck:
!   f_bad_stop  ends the program with STOP from increment 2 on (tancheck reports it; with
!               --isolate the check survives and says so);
!   f_print     correct, but writes to standard output with print * in every call.
! Both are linear isotropic elasticity (properties [E, nu], no state, ncomp 6).

#include "tancheck_twin.inc"

! Both share misbehave_variant.inc; TC_MISBEHAVIOUR picks the misbehaviour.
#define TC_VARIANT f_bad_stop
#define TC_VARIANT_NAME "f_bad_stop"
#define TC_MISBEHAVIOUR 2
#include "misbehave_variant.inc"

#define TC_VARIANT f_print
#define TC_VARIANT_NAME "f_print"
#define TC_MISBEHAVIOUR 1
#include "misbehave_variant.inc"
