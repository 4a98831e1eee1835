! finite_hypo.F90 -- hypoelastic isotropic elasticity with the Jaumann rate of Kirchhoff stress
! (tancheck_finite.h), the reference model "hypo-jaumann" in Fortran: the same update and tangent
! as fortran-shim/examples/c/finite_hypo.c and crates/tancheck-models/src/finite/hypo.rs.
!
! Update of Hughes & Winget (1980), IJNME 15:1862-1867 (from memory): G = (F1 - F0) Fh^-1,
! Fh = (F0 + F1)/2; the rotation increment Q of the Jaumann frame (the call's rotation, frame
! tc_frame_jaumann); tau1 = Q tau0 Q^T + C : sym G. Tangent (tau-jaumann), the exact derivative
! along dF1 = D F1, D symmetric: dG = (I - G/2) D F1 Fh^-1, dQ = (I - dw/2)^-1 (skew dG / 2)
! (Q + I), dtau = dQ tau0 Q^T + Q tau0 dQ^T + C : sym dG. Properties [E, nu]; Kirchhoff stress;
! no state; no energy.
!
! Symbols: f_hypo, and f_hypo_no_rotation (tau1 = tau0 + C : sym G, never rotated, with its own
! exact tangent; the rotation probes catch it); twins f_hypo_cx, f_hypo_no_rotation_cx.
!
! Build (after the modules tancheck_routine, tancheck_cstep, tancheck_finite):
!   gfortran -cpp -I fortran-shim/include -c finite_hypo.F90
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c finite_hypo.F90

#include "tancheck_twin.inc"

! The shared update lives in a module whose name differs between the two builds, so that the
! ordinary and the twin object link into one library.
#ifdef TC_COMPLEX
#define HYPO_IMPL finite_hypo_impl_cx
#else
#define HYPO_IMPL finite_hypo_impl
#endif

module HYPO_IMPL
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_report, tc_temperature, tc_energy, tc_set_message, tc_status_failed
  use tancheck_finite, only: tc_finite_call, tc_stress_kirchhoff, tc_tangent_tau_jaumann
  implicit none
  private
  public :: hypo_entry, hypo_none, hypo_no_rotation

  integer, parameter :: ii(6) = [1, 2, 3, 2, 1, 1], jj(6) = [1, 2, 3, 3, 3, 2]
  ! The flaw codes of hypo_entry: none, or the start stress never rotated.
  integer, parameter :: hypo_none = 0, hypo_no_rotation = 1

contains

  ! The whole argument list of a finite-strain routine, for finite_entry.inc. Isothermal and
  ! without energies; no state changes.
  subroutine hypo_entry(callinfo, properties, f0, f1, rotation, temperature, stress0, state0, stress, state, &
                        tangent, energy, report, flaw)
#include "finite_entry_args.inc"
    integer, intent(in) :: flaw
    namelist /unused_arguments/ temperature, energy
    state = state0
    call hypo_point(callinfo, properties, f0, f1, rotation, stress0, stress, tangent, report, &
                    flaw /= hypo_no_rotation)
  end subroutine hypo_entry

#include "finite_tensor.inc"
#include "lame.inc"

  ! C : sym(a) = lambda tr(a) I + mu (a + a^T)
  pure function elastic(lambda, mu, a) result(r)
    TC_REAL, intent(in) :: lambda, mu, a(3, 3)
    TC_REAL :: r(3, 3)
    integer :: p
    r = mu * (a + transpose(a))
    do p = 1, 3
      r(p, p) = r(p, p) + lambda * (a(1, 1) + a(2, 2) + a(3, 3))
    end do
  end function elastic

  subroutine hypo_point(callinfo, properties, f0, f1, rotation, stress0, stress, tangent, report, rotate)
    type(tc_finite_call), intent(in) :: callinfo
    TC_REAL, intent(in) :: properties(callinfo%nproperties)
    TC_REAL, intent(in) :: f0(3, 3), f1(3, 3), rotation(3, 3), stress0(6)
    TC_REAL, intent(out) :: stress(6)
    TC_REAL, intent(inout) :: tangent(6, 6)
    type(tc_report), intent(inout) :: report
    logical, intent(in) :: rotate
    TC_REAL :: lambda, mu, fhi(3, 3), g(3, 3), q(3, 3), tau0(3, 3), t1(3, 3), m(3, 3)
    TC_REAL :: nmat(3, 3), ai(3, 3), qp(3, 3), d(3, 3), dg(3, 3), dq(3, 3), x(3, 3), dtau(3, 3)
    integer :: s, c

    if (callinfo%tangent_measure /= tc_tangent_tau_jaumann .or. callinfo%stress_measure /= tc_stress_kirchhoff) then
      report%status = tc_status_failed
      call tc_set_message(report, "hypo-jaumann: Kirchhoff stress and the tau-jaumann tangent only")
      return
    end if
    call lame(properties(1), properties(2), lambda, mu)
    if (rotate) then
      q = rotation
    else
      q = eye()
    end if
    do s = 1, 6
      tau0(ii(s), jj(s)) = stress0(s)
      tau0(jj(s), ii(s)) = stress0(s)
    end do
    fhi = inv3(0.5_c_double * (f0 + f1))
    g = matmul(f1 - f0, fhi)
    t1 = matmul(matmul(q, tau0), transpose(q)) + elastic(lambda, mu, g)
    do s = 1, 6
      stress(s) = t1(ii(s), jj(s))
    end do
    m = matmul(f1, fhi)
    nmat = eye() - 0.5_c_double * g
    ai = inv3(eye() - 0.25_c_double * (g - transpose(g)))
    qp = q + eye()
    do c = 1, 6
      d = 0.0_c_double
      d(ii(c), jj(c)) = merge(1.0_c_double, 0.5_c_double, ii(c) == jj(c))
      d(jj(c), ii(c)) = d(ii(c), jj(c))
      dg = matmul(matmul(nmat, d), m)
      dtau = elastic(lambda, mu, dg)
      if (rotate) then
        dq = matmul(matmul(ai, 0.25_c_double * (dg - transpose(dg))), qp)
        x = matmul(matmul(dq, tau0), transpose(q))
        dtau = dtau + x + transpose(x)
      end if
      do s = 1, 6
        tangent(s, c) = dtau(ii(s), jj(s))
      end do
    end do
    report%branch = 0
  end subroutine hypo_point
end module HYPO_IMPL

! The exported routines (finite_entry.inc): each hands its arguments to hypo_entry with its flaw.
#define TC_MODEL_MODULE HYPO_IMPL
#define TC_MODEL hypo_entry

#define TC_VARIANT f_hypo
#define TC_VARIANT_NAME "f_hypo"
#define TC_FLAW hypo_none
#include "finite_entry.inc"

#define TC_VARIANT f_hypo_no_rotation
#define TC_VARIANT_NAME "f_hypo_no_rotation"
#define TC_FLAW hypo_no_rotation
#include "finite_entry.inc"
