! finite_nh.F90 -- compressible neo-Hookean finite-strain routine (tancheck_finite.h), the
! reference model "neo-hookean" in Fortran: the same model as fortran-shim/examples/c/finite_nh.c
! (Psi = mu/2 (I1 - 3) - mu ln J + lambda/2 (ln J)^2; Bonet & Wood 2008, ch. 5-6, from memory).
! Properties [E, nu], no state. Stress in the declared measure (Cauchy = tau / J). Tangent
! measures: tau- and sigma-jaumann, tau- and sigma-truesdell (others: status failed).
! Energy: stored Psi, dissipated 0.
!
! Build (after compiling the modules tancheck_routine, tancheck_cstep, tancheck_finite):
!   gfortran -cpp -I fortran-shim/include -c finite_nh.F90               exports f_nh
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c finite_nh.F90  exports f_nh_cx

#include "tancheck_twin.inc"

subroutine f_nh(callinfo, properties, f0, f1, rotation, temperature, stress0, state0, stress, state, &
                tangent, energy, report) bind(C, name="f_nh"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_report, tc_temperature, tc_energy, tc_set_message, &
                              tc_status_failed, tc_provides_energy
  use tancheck_finite, only: tc_finite_call, tc_stress_cauchy, tc_tangent_tau_jaumann, &
                             tc_tangent_sigma_jaumann, tc_tangent_tau_truesdell, tc_tangent_sigma_truesdell
  use tancheck_cstep, only: cs_log
  implicit none
  type(tc_finite_call), intent(in) :: callinfo
  TC_REAL, intent(in) :: properties(callinfo%nproperties)
  TC_REAL, intent(in) :: f0(3, 3), f1(3, 3), rotation(3, 3)
  type(tc_temperature), intent(in) :: temperature
  TC_REAL, intent(in) :: stress0(6), state0(callinfo%nstate)
  TC_REAL, intent(out) :: stress(6), state(callinfo%nstate)
  TC_REAL, intent(out) :: tangent(callinfo%ntangent, callinfo%ntangent)
  type(tc_energy), intent(inout) :: energy
  type(tc_report), intent(inout) :: report

  ! Hyperelastic: the start configuration, rotation, temperature and start stress are not used.
  namelist /unused_arguments/ f0, rotation, temperature, stress0

  integer, parameter :: ii(6) = [1, 2, 3, 2, 1, 1], jj(6) = [1, 2, 3, 3, 3, 2]
  TC_REAL :: e, nu, lambda, mu, jac, lnj, g, v, b(3, 3), tau(3, 3), i1
  integer :: m, r, c, i, j, k, l
  logical :: jaumann, over_j

  m = callinfo%tangent_measure
  if (m /= tc_tangent_tau_jaumann .and. m /= tc_tangent_sigma_jaumann .and. &
      m /= tc_tangent_tau_truesdell .and. m /= tc_tangent_sigma_truesdell) then
    report%status = tc_status_failed
    call tc_set_message(report, "neo-hookean: this tangent measure is not implemented in Fortran")
    return
  end if
  e = properties(1)
  nu = properties(2)
  lambda = e * nu / ((1.0_c_double + nu) * (1.0_c_double - 2.0_c_double * nu))
  mu = e / (2.0_c_double * (1.0_c_double + nu))
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
  do r = 1, 6
    if (callinfo%stress_measure == tc_stress_cauchy) then
      stress(r) = tau(ii(r), jj(r)) / jac
    else
      stress(r) = tau(ii(r), jj(r))
    end if
  end do
  jaumann = m == tc_tangent_tau_jaumann .or. m == tc_tangent_sigma_jaumann
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
      tangent(r, c) = v
    end do
  end do
  state = state0
  energy%stored = 0.5_c_double * mu * (i1 - 3.0_c_double) - mu * lnj + 0.5_c_double * lambda * lnj * lnj
  energy%dissipated = 0.0_c_double
  report%branch = 0
  report%provides = tc_provides_energy
end subroutine f_nh
