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
!   f_cohesive_undamaged    the undamaged stiffness K on the diagonal on every branch (wrong
!                           wherever the point is damaged, and in contact slip with damage)
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
! The six routines share one entry, cohesive_variant.inc (the flaw code is its only difference),
! which calls the one update, cohesive_update.inc, included as internal procedures of each (as
! j2.F90 does), so that the real and the complex build export no clashing symbols.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c cohesive.F90               exports the six routines
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c cohesive.F90  exports them with _cx

#include "tancheck_twin.inc"

#define TC_VARIANT f_cohesive
#define TC_VARIANT_NAME "f_cohesive"
#define TC_FLAW 0
#include "cohesive_variant.inc"

#define TC_VARIANT f_cohesive_secant
#define TC_VARIANT_NAME "f_cohesive_secant"
#define TC_FLAW 1
#include "cohesive_variant.inc"

#define TC_VARIANT f_cohesive_no_coupling
#define TC_VARIANT_NAME "f_cohesive_no_coupling"
#define TC_FLAW 2
#include "cohesive_variant.inc"

#define TC_VARIANT f_cohesive_transposed
#define TC_VARIANT_NAME "f_cohesive_transposed"
#define TC_FLAW 3
#include "cohesive_variant.inc"

#define TC_VARIANT f_cohesive_symmetrized
#define TC_VARIANT_NAME "f_cohesive_symmetrized"
#define TC_FLAW 4
#include "cohesive_variant.inc"

#define TC_VARIANT f_cohesive_undamaged
#define TC_VARIANT_NAME "f_cohesive_undamaged"
#define TC_FLAW 5
#include "cohesive_variant.inc"
