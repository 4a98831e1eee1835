! misbehave.F90 -- Fortran routines that misbehave on purpose, for testing tancheck:
!   f_bad_stop  ends the program with STOP from increment 2 on (tancheck reports it; with
!               --isolate the check survives and says so);
!   f_print     correct, but writes to standard output with print * in every call.
! Both are linear isotropic elasticity (properties [E, nu], no state, ncomp 6).

#include "tancheck_twin.inc"

subroutine f_bad_stop(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                      tangent, dstress_dtemp, energy, report) bind(C, name="f_bad_stop"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
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
  ! Arguments of the ABI this routine does not use (see elastic.F90).
  namelist /unused_arguments/ strain, temperature, dstress_dtemp, energy
  TC_REAL :: mu, lambda
  integer :: i, j, n

  n = callinfo%ncomp
  if (n /= 6 .or. callinfo%nproperties < 2) then
    report%status = tc_status_failed
    call tc_set_message(report, "f_bad_stop: needs 6 components and properties [E, nu]")
    return
  end if
  ! Lame constants (textbook relations of isotropic elasticity).
  mu = properties(1) / (2.0_c_double * (1.0_c_double + properties(2)))
  lambda = properties(1) * properties(2) / ((1.0_c_double + properties(2)) * (1.0_c_double - 2.0_c_double * properties(2)))
  tangent = 0.0_c_double
  do j = 1, 3
    do i = 1, 3
      tangent(i, j) = lambda
    end do
    tangent(j, j) = lambda + 2.0_c_double * mu
  end do
  do i = 4, 6
    tangent(i, i) = mu
  end do
  stress = stress0 + matmul(tangent, dstrain)
  state = state0
  report%status = tc_status_ok
  report%branch = 0
  if (callinfo%increment >= 2) then
    stop "f_bad_stop: stopping on purpose"
  end if
end subroutine f_bad_stop

subroutine f_print(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                   tangent, dstress_dtemp, energy, report) bind(C, name="f_print"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, tc_status_failed
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
  ! Arguments of the ABI this routine does not use (see elastic.F90).
  namelist /unused_arguments/ strain, temperature, dstress_dtemp, energy
  TC_REAL :: mu, lambda
  integer :: i, j, n

  n = callinfo%ncomp
  if (n /= 6 .or. callinfo%nproperties < 2) then
    report%status = tc_status_failed
    call tc_set_message(report, "f_print: needs 6 components and properties [E, nu]")
    return
  end if
  print *, "f_print: increment", callinfo%increment, "{ not json"
  ! Lame constants (textbook relations of isotropic elasticity).
  mu = properties(1) / (2.0_c_double * (1.0_c_double + properties(2)))
  lambda = properties(1) * properties(2) / ((1.0_c_double + properties(2)) * (1.0_c_double - 2.0_c_double * properties(2)))
  tangent = 0.0_c_double
  do j = 1, 3
    do i = 1, 3
      tangent(i, j) = lambda
    end do
    tangent(j, j) = lambda + 2.0_c_double * mu
  end do
  do i = 4, 6
    tangent(i, i) = mu
  end do
  stress = stress0 + matmul(tangent, dstrain)
  state = state0
  report%status = tc_status_ok
  report%branch = 0
end subroutine f_print
