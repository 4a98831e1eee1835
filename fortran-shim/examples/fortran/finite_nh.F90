! finite_nh.F90 -- compressible neo-Hookean finite-strain routine (tancheck_finite.h), the
! reference model "neo-hookean" in Fortran: the same model as fortran-shim/examples/c/finite_nh.c
! (Psi = mu/2 (I1 - 3) - mu ln J + lambda/2 (ln J)^2; Bonet & Wood 2008, ch. 5-6, from memory).
! Properties [E, nu], no state. Stress in the declared measure (Cauchy = tau / J). Tangent
! measures: tau- and sigma-jaumann, tau- and sigma-truesdell (others: status failed).
! Energy: stored Psi, dissipated 0.
!
! Symbols (each with its twin _cx): f_nh (correct) and the flawed f_nh_truesdell_for_jaumann
! (the Truesdell tangent where Jaumann is asked), f_nh_missing_over_j (the tangent times J),
! f_nh_extra_over_j (the tangent divided by J), f_nh_cauchy_for_kirchhoff (Cauchy stress
! whatever is declared), f_nh_kirchhoff_for_cauchy (Kirchhoff stress whatever is declared).
! The material-as-spatial and geometric-terms-missing flaws are in finite_j2.F90.
!
! Build (after compiling the modules tancheck_routine, tancheck_cstep, tancheck_finite):
!   gfortran -cpp -I fortran-shim/include -c finite_nh.F90               exports f_nh, ...
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c finite_nh.F90  exports f_nh_cx, ...

#include "tancheck_twin.inc"

! The shared update lives in a module whose name differs between the two builds, so that the
! ordinary and the twin object link into one library.
#ifdef TC_COMPLEX
#define NH_IMPL finite_nh_impl_cx
#else
#define NH_IMPL finite_nh_impl
#endif

module NH_IMPL
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_report, tc_temperature, tc_energy, tc_set_message, tc_status_failed, &
                              tc_provides_energy
  use tancheck_finite, only: tc_finite_call, tc_stress_cauchy, tc_tangent_tau_jaumann, &
                             tc_tangent_sigma_jaumann, tc_tangent_tau_truesdell, tc_tangent_sigma_truesdell
  use tancheck_cstep, only: cs_log
  implicit none
  private
  public :: nh_entry, nh_none, nh_truesdell_for_jaumann, nh_missing_over_j, nh_extra_over_j, &
            nh_cauchy_for_kirchhoff, nh_kirchhoff_for_cauchy

  integer, parameter :: nh_none = 0, nh_truesdell_for_jaumann = 1, nh_missing_over_j = 2, &
                        nh_extra_over_j = 3, nh_cauchy_for_kirchhoff = 4, nh_kirchhoff_for_cauchy = 5

contains

  ! The whole argument list of a finite-strain routine, for finite_entry.inc. Hyperelastic: the
  ! start configuration, rotation, temperature and start stress are not used; no state changes.
  subroutine nh_entry(callinfo, properties, f0, f1, rotation, temperature, stress0, state0, stress, state, &
                      tangent, energy, report, flaw)
#include "finite_entry_args.inc"
    integer, intent(in) :: flaw
    namelist /unused_arguments/ f0, rotation, temperature, stress0
    state = state0
    call nh_point(callinfo, properties, f1, stress, tangent, energy, report, flaw)
  end subroutine nh_entry

  subroutine nh_point(callinfo, properties, f1, stress, tangent, energy, report, flaw)
    type(tc_finite_call), intent(in) :: callinfo
    TC_REAL, intent(in) :: properties(callinfo%nproperties)
    TC_REAL, intent(in) :: f1(3, 3)
    TC_REAL, intent(out) :: stress(6)
    TC_REAL, intent(inout) :: tangent(callinfo%ntangent, callinfo%ntangent)
    type(tc_energy), intent(inout) :: energy
    type(tc_report), intent(inout) :: report
    integer, intent(in) :: flaw

    integer, parameter :: ii(6) = [1, 2, 3, 2, 1, 1], jj(6) = [1, 2, 3, 3, 3, 2]
    TC_REAL :: lambda, mu, jac, lnj, g, v, b(3, 3), tau(3, 3), i1
    integer :: m, r, c, i, j, k, l
    logical :: jaumann, over_j, cauchy

    m = callinfo%tangent_measure
    if (m /= tc_tangent_tau_jaumann .and. m /= tc_tangent_sigma_jaumann .and. &
        m /= tc_tangent_tau_truesdell .and. m /= tc_tangent_sigma_truesdell) then
      report%status = tc_status_failed
      call tc_set_message(report, "neo-hookean: this tangent measure is not implemented in Fortran")
      return
    end if
    call lame(properties(1), properties(2), lambda, mu)
    jac = f1(1, 1) * (f1(2, 2) * f1(3, 3) - f1(2, 3) * f1(3, 2)) &
          - f1(1, 2) * (f1(2, 1) * f1(3, 3) - f1(2, 3) * f1(3, 1)) &
          + f1(1, 3) * (f1(2, 1) * f1(3, 2) - f1(2, 2) * f1(3, 1))
    if (real(jac, c_double) <= 0.0_c_double) then
      report%status = tc_status_failed
      call tc_set_message(report, "neo-hookean: det F <= 0")
      return
    end if
    lnj = cs_log(jac)
    b = matmul(f1, transpose(f1))
    i1 = b(1, 1) + b(2, 2) + b(3, 3)
    tau = mu * b
    do i = 1, 3
      tau(i, i) = tau(i, i) + lambda * lnj - mu
    end do
    cauchy = (callinfo%stress_measure == tc_stress_cauchy .or. flaw == nh_cauchy_for_kirchhoff) &
             .and. flaw /= nh_kirchhoff_for_cauchy
    do r = 1, 6
      if (cauchy) then
        stress(r) = tau(ii(r), jj(r)) / jac
      else
        stress(r) = tau(ii(r), jj(r))
      end if
    end do
    jaumann = (m == tc_tangent_tau_jaumann .or. m == tc_tangent_sigma_jaumann) &
              .and. flaw /= nh_truesdell_for_jaumann
    over_j = m == tc_tangent_sigma_jaumann .or. m == tc_tangent_sigma_truesdell
    g = mu - lambda * lnj
    do c = 1, 6
      do r = 1, 6
        i = ii(r)
        j = jj(r)
        k = ii(c)
        l = jj(c)
        v = 0.0_c_double
        if (i == j .and. k == l) v = v + lambda
        if (i == k .and. j == l) v = v + g
        if (i == l .and. j == k) v = v + g
        if (jaumann) then
          if (i == k) v = v + 0.5_c_double * tau(j, l)
          if (j == l) v = v + 0.5_c_double * tau(i, k)
          if (i == l) v = v + 0.5_c_double * tau(j, k)
          if (j == k) v = v + 0.5_c_double * tau(i, l)
        end if
        if (over_j) v = v / jac
        if (flaw == nh_missing_over_j) v = v * jac
        if (flaw == nh_extra_over_j) v = v / jac
        tangent(r, c) = v
      end do
    end do
    energy%stored = 0.5_c_double * mu * (i1 - 3.0_c_double) - mu * lnj + 0.5_c_double * lambda * lnj * lnj
    energy%dissipated = 0.0_c_double
    report%branch = 0
    report%provides = tc_provides_energy
  end subroutine nh_point

#include "lame.inc"
end module NH_IMPL

! The exported routines (finite_entry.inc): each hands its arguments to nh_entry with its flaw.
#define TC_MODEL_MODULE NH_IMPL
#define TC_MODEL nh_entry

#define TC_VARIANT f_nh
#define TC_VARIANT_NAME "f_nh"
#define TC_FLAW nh_none
#include "finite_entry.inc"

#define TC_VARIANT f_nh_truesdell_for_jaumann
#define TC_VARIANT_NAME "f_nh_truesdell_for_jaumann"
#define TC_FLAW nh_truesdell_for_jaumann
#include "finite_entry.inc"

#define TC_VARIANT f_nh_missing_over_j
#define TC_VARIANT_NAME "f_nh_missing_over_j"
#define TC_FLAW nh_missing_over_j
#include "finite_entry.inc"

#define TC_VARIANT f_nh_extra_over_j
#define TC_VARIANT_NAME "f_nh_extra_over_j"
#define TC_FLAW nh_extra_over_j
#include "finite_entry.inc"

#define TC_VARIANT f_nh_cauchy_for_kirchhoff
#define TC_VARIANT_NAME "f_nh_cauchy_for_kirchhoff"
#define TC_FLAW nh_cauchy_for_kirchhoff
#include "finite_entry.inc"

#define TC_VARIANT f_nh_kirchhoff_for_cauchy
#define TC_VARIANT_NAME "f_nh_kirchhoff_for_cauchy"
#define TC_FLAW nh_kirchhoff_for_cauchy
#include "finite_entry.inc"
