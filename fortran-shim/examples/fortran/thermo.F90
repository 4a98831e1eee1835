! thermo.F90 -- thermo-elasticity with temperature-dependent modulus, Poisson's ratio and
! thermal strain, the reference routines "thermo" and "thermo-dtemp-sign" in Fortran.
!
!   f_thermo             the correct routine: stress, tangent and d stress / d temperature
!   f_thermo_partial_dtemp  the same update with d stress / d temperature missing its
!                        thermal-expansion term (deliberately flawed)
!   f_thermo_dtemp_sign  the same update returning -d stress / d temperature: a deliberately
!                        wrong temperature derivative, for tancheck to find (the tangent is
!                        right; d stress / dT is off by a relative 2 wherever it is not zero)
!   f_thermo_start_temperature  the same update with its tangent C(T) taken at the temperature
!                        of the start of the increment (deliberately flawed)
!
! Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12), 4 (plane strain
! or axisymmetric: 11, 22, 33, 12), 3 (plane stress: 11, 22, 12) or 1 (uniaxial), engineering
! shear strain. Temperatures in degrees C; 20 C is the reference of every law.
!   properties [E20, nu0, nu1, modulus_law, expansion_law, alpha, (T_1, k_1, T_2, k_2, ...)]:
!     E(T) = E20 k(T), k: law 0 none (k = 1), 1 EN 1993-1-2 Table 3.1 (carbon steel k_E),
!       2 the table of (T_i, k_i) points after properties(6) (at least 2, T increasing, k >= 0);
!     nu(T) = nu0 + nu1 (T - 20), which must stay in (-1, 0.5);
!     eps_th(T): law 0 alpha (T - 20), 1 EN 1993-1-2 section 3.4.1.1 (carbon steel).
!   No state; state entries, if the caller passes any, are carried through unchanged.
! Total form at the end temperature T = temperature%start + temperature%increment:
!   sigma = C(T) (strain + dstrain - eps_th(T) 1), 1 = ones on the normal components;
!   tangent C(T); dstress_dtemp = C'(T) (eps - eps_th 1) - C(T) 1 eps_th'(T);
!   energy: stored 1/2 sigma . (eps - eps_th 1), dissipated 0. Branch 0.
! Tables are linear between points and held at their end values outside; the EN elongation
! uses its first range below 750 C, 1.1e-2 on [750, 860), the third range from 860 C. At a
! point or boundary the segment on its right is used: d stress / dT is the right derivative.
!
! The four routines share one entry, thermo_variant.inc (they differ only in the sign and the
! expansion factor it passes on, and whether the tangent is taken at the start temperature), which calls the one update, thermo_update.inc, included as
! internal procedures of each (as j2.F90 does), so that the real and the complex build export no
! clashing symbols.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c thermo.F90               exports f_thermo,
!                                                                      f_thermo_dtemp_sign
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c thermo.F90  exports the same with _cx

#include "tancheck_twin.inc"

#define TC_VARIANT f_thermo
#define TC_VARIANT_NAME "f_thermo"
#define TC_SIGN 1.0_c_double
#define TC_EXPANSION 1.0_c_double
#define TC_AT_START 0
#include "thermo_variant.inc"

#define TC_VARIANT f_thermo_dtemp_sign
#define TC_VARIANT_NAME "f_thermo_dtemp_sign"
#define TC_SIGN -1.0_c_double
#define TC_EXPANSION 1.0_c_double
#define TC_AT_START 0
#include "thermo_variant.inc"

#define TC_VARIANT f_thermo_partial_dtemp
#define TC_VARIANT_NAME "f_thermo_partial_dtemp"
#define TC_SIGN 1.0_c_double
#define TC_EXPANSION 0.0_c_double
#define TC_AT_START 0
#include "thermo_variant.inc"

#define TC_VARIANT f_thermo_start_temperature
#define TC_VARIANT_NAME "f_thermo_start_temperature"
#define TC_SIGN 1.0_c_double
#define TC_EXPANSION 1.0_c_double
#define TC_AT_START 1
#include "thermo_variant.inc"
