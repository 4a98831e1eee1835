! elastic.F90 -- linear isotropic elasticity, the reference routine "elastic" in Fortran.
!
! Layout (DEVELOPERS.md, "Reference models"): properties [E, nu], no state. Components in the
! default order with engineering shear strain:
!   ncomp 6: 11, 22, 33, 23, 13, 12 (3D)
!   ncomp 4: 11, 22, 33, 12 (plane strain / axisymmetric)
!   ncomp 3: 11, 22, 12 (plane stress)
!   ncomp 1: 11 (uniaxial stress, sigma = E eps)
! Incremental form sigma = sigma0 + C dstrain. Energy: stored = 1/2 sigma . (strain + dstrain),
! the work-conjugate dot product with engineering shear; dissipated = 0. Branch 0.
! State entries, if the caller passes any, are carried through unchanged.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c elastic.F90               exports f_elastic
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c elastic.F90  exports f_elastic_cx
! An external procedure, not a module procedure, so that both builds link into one library.

#include "tancheck_twin.inc"

subroutine f_elastic(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                     tangent, dstress_dtemp, energy, report) bind(C, name="f_elastic"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
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

  ! The ABI passes these, but this isothermal model neither reads temperature nor writes
  ! dstress_dtemp. Naming them in a namelist that is never read or written tells
  ! gfortran -Wall (-Wunused-dummy-argument) that this is deliberate; it generates no code.
  namelist /unused_arguments/ temperature, dstress_dtemp

  TC_REAL :: e, nu, mu, lambda, f, s, stored
  integer :: n, i, j

  n = callinfo%ncomp
  if (n /= 6 .and. n /= 4 .and. n /= 3 .and. n /= 1) then
    report%status = tc_status_failed
    call tc_set_message(report, "elastic: ncomp must be 6, 4, 3 or 1")
    return
  end if
  if (callinfo%nproperties < 2) then
    report%status = tc_status_failed
    call tc_set_message(report, "elastic: needs 2 properties [E, nu]")
    return
  end if

  e = properties(1)
  nu = properties(2)

  ! Elastic stiffness in Voigt form, engineering shear columns. Lame constants
  ! lambda = E nu / ((1 + nu)(1 - 2 nu)), mu = E / (2 (1 + nu)); plane stress reduces to
  ! E / (1 - nu^2) [[1, nu, 0], [nu, 1, 0], [0, 0, (1 - nu)/2]]
  ! (Hughes 2000, The Finite Element Method, ch. 2; chapter from memory).
  ! The tangent buffer holds the stiffness: written in full here, then only read.
  tangent = 0.0_c_double
  select case (n)
  case (1)
    tangent(1, 1) = e
  case (3)
    f = e / (1.0_c_double - nu * nu)
    tangent(1, 1) = f
    tangent(2, 2) = f
    tangent(1, 2) = f * nu
    tangent(2, 1) = f * nu
    tangent(3, 3) = f * (1.0_c_double - nu) / 2.0_c_double
  case default
    ! 6 or 4: three normal components first, then the shear ones.
    mu = e / (2.0_c_double * (1.0_c_double + nu))
    lambda = e * nu / ((1.0_c_double + nu) * (1.0_c_double - 2.0_c_double * nu))
    do j = 1, 3
      do i = 1, 3
        tangent(i, j) = lambda
      end do
      tangent(j, j) = lambda + 2.0_c_double * mu
    end do
    do i = 4, n
      tangent(i, i) = mu
    end do
  end select

  ! sigma = sigma0 + C dstrain, and the stored energy density. Products are written out: no
  ! dot_product, which would conjugate its first argument in the complex twin.
  stored = 0.0_c_double
  do i = 1, n
    s = stress0(i)
    do j = 1, n
      s = s + tangent(i, j) * dstrain(j)
    end do
    stress(i) = s
    stored = stored + s * (strain(i) + dstrain(i))
  end do
  do i = 1, callinfo%nstate
    state(i) = state0(i)
  end do

  energy%stored = 0.5_c_double * stored
  energy%dissipated = 0.0_c_double
  report%provides = tc_provides_energy
  report%branch = 0
  report%status = tc_status_ok
end subroutine f_elastic

! f_elastic_uncondensed -- the zoo's flawed plane-stress variant: the stress of f_elastic in
! plane stress, but the tangent is rows and columns 11, 22, 12 of the 3D stiffness
! (lambda + 2 mu, lambda, mu), the condensation for sigma33 = 0 forgotten. Plane stress
! (ncomp 3) only; properties [E, nu].
subroutine f_elastic_uncondensed(callinfo, properties, strain, dstrain, temperature, stress0, state0, &
                                 stress, state, tangent, dstress_dtemp, energy, report) &
    bind(C, name="f_elastic_uncondensed"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
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

  namelist /unused_arguments/ temperature, dstress_dtemp

  TC_REAL :: e, nu, mu, lambda, f, s, stored, c(3, 3)
  integer :: i, j

  if (callinfo%ncomp /= 3) then
    report%status = tc_status_failed
    call tc_set_message(report, "elastic_uncondensed: ncomp must be 3 (plane stress)")
    return
  end if
  if (callinfo%nproperties < 2) then
    report%status = tc_status_failed
    call tc_set_message(report, "elastic_uncondensed: needs 2 properties [E, nu]")
    return
  end if

  e = properties(1)
  nu = properties(2)
  ! The plane-stress stiffness for the stress (as f_elastic)...
  f = e / (1.0_c_double - nu * nu)
  c = 0.0_c_double
  c(1, 1) = f
  c(2, 2) = f
  c(1, 2) = f * nu
  c(2, 1) = f * nu
  c(3, 3) = f * (1.0_c_double - nu) / 2.0_c_double
  stored = 0.0_c_double
  do i = 1, 3
    s = stress0(i)
    do j = 1, 3
      s = s + c(i, j) * dstrain(j)
    end do
    stress(i) = s
    stored = stored + s * (strain(i) + dstrain(i))
  end do
  do i = 1, callinfo%nstate
    state(i) = state0(i)
  end do
  ! ... and the in-plane block of the 3D stiffness for the tangent.
  mu = e / (2.0_c_double * (1.0_c_double + nu))
  lambda = e * nu / ((1.0_c_double + nu) * (1.0_c_double - 2.0_c_double * nu))
  tangent = 0.0_c_double
  tangent(1, 1) = lambda + 2.0_c_double * mu
  tangent(2, 2) = lambda + 2.0_c_double * mu
  tangent(1, 2) = lambda
  tangent(2, 1) = lambda
  tangent(3, 3) = mu

  energy%stored = 0.5_c_double * stored
  energy%dissipated = 0.0_c_double
  report%provides = tc_provides_energy
  report%branch = 0
  report%status = tc_status_ok
end subroutine f_elastic_uncondensed
