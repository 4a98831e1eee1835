! orthotropic.F90 -- linear orthotropic elasticity with material axes among the properties,
! the reference routine "orthotropic" in Fortran.
!
! Layout (DEVELOPERS.md, "Reference models"): ncomp 6 (11, 22, 33, 23, 13, 12) or 4
! (11, 22, 33, 12: plane strain / axisymmetric, the matching rows and columns of the 3D
! stiffness), engineering shear strain, no state (entries passed are carried through).
!   properties [E1, E2, E3, nu12, nu13, nu23, G12, G13, G23, a1x, a1y, a1z, a2x, a2y, a2z]:
!     engineering constants in the material frame (nu_ij / E_i = nu_ji / E_j), then the
!     directions of material axes 1 and 2 in the global frame. Gram-Schmidt makes them
!     orthonormal: e1 = a1/|a1|, e2 = the part of a2 normal to e1, normalised; e3 = e1 x e2.
! Incremental form sigma = sigma0 + C dstrain with C the material stiffness (the inverse of
! the orthotropic compliance, Jones, Mechanics of Composite Materials, 2nd ed. 1999, ch. 2;
! from memory) turned into the global frame, C_ijkl = R_ia R_jb R_kc R_ld C'_abcd with
! R = [e1 e2 e3]; the turn is done in Mandel form, where it is an orthogonal 6x6 matrix.
! Energy: stored = 1/2 sigma . (strain + dstrain), dissipated = 0. Branch 0.
!
! Build (after compiling the modules tancheck_routine and tancheck_cstep):
!   gfortran -cpp -I fortran-shim/include -c orthotropic.F90               exports f_orthotropic
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c orthotropic.F90  exports
!                                                                     f_orthotropic_cx
! An external procedure, not a module procedure, so that both builds link into one library.

#include "tancheck_twin.inc"

subroutine f_orthotropic(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, &
                         state, tangent, dstress_dtemp, energy, report) &
                         bind(C, name="f_orthotropic"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use, intrinsic :: ieee_arithmetic, only: ieee_is_finite
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy, &
                              tc_set_message, tc_status_ok, &
                              tc_status_failed, tc_provides_energy
  use tancheck_cstep, only: cs_sqrt
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

  ! Below this |a2 - (a2.e1) e1| / |a2| the two axes count as parallel.
  real(c_double), parameter :: parallel_tol = 1.0e-8_c_double
  ! Tensor indices (i, j) of the canonical slots 11, 22, 33, 23, 13, 12.
  integer, parameter :: pair_i(6) = [1, 2, 3, 2, 1, 1]
  integer, parameter :: pair_j(6) = [1, 2, 3, 3, 3, 2]
  integer, parameter :: slots6(6) = [1, 2, 3, 4, 5, 6]
  integer, parameter :: slots4(4) = [1, 2, 3, 6]

  TC_REAL :: e1v(3), e2v(3), e3v(3), b(3), r(3, 3), q(6, 6), qc(6, 6), cm(6, 6), c(6, 6)
  TC_REAL :: n1, l1, p, nb, lb, s11, s22, s33, s12, s13, s23
  TC_REAL :: c11, c12, c13, c22, c23, c33, det, v, s, stored
  real(c_double) :: w(6), n2, x
  integer :: n, i, j, k, l, bi, bk, a, bb, slots(6)
  logical :: finite

  n = callinfo%ncomp
  if (n /= 6 .and. n /= 4) then
    report%status = tc_status_failed
    call tc_set_message(report, "orthotropic: ncomp must be 6 or 4")
    return
  end if
  if (callinfo%nproperties < 15) then
    report%status = tc_status_failed
    call tc_set_message(report, &
      "orthotropic: needs 15 properties [E1, E2, E3, nu12, nu13, nu23, G12, G13, G23, a1, a2]")
    return
  end if
  if (n == 6) then
    slots = slots6
  else
    slots(1:4) = slots4
    slots(5:6) = 0
  end if

  ! Material stiffness: the inverse of the compliance [[1/E1, -nu12/E1, -nu13/E1],
  ! [., 1/E2, -nu23/E2], [., ., 1/E3]] (symmetric) with shear diagonal G23, G13, G12.
  do k = 1, 9
    if (k >= 4 .and. k <= 6) cycle
    x = real(properties(k), c_double)
    if (.not. (x > 0.0_c_double .and. ieee_is_finite(x))) then
      report%status = tc_status_failed
      call tc_set_message(report, &
        "orthotropic: E1, E2, E3, G12, G13, G23 (properties[0..3], properties[6..9]) must be positive")
      return
    end if
  end do
  do k = 4, 6
    if (.not. ieee_is_finite(real(properties(k), c_double))) then
      report%status = tc_status_failed
      call tc_set_message(report, "orthotropic: nu12, nu13, nu23 (properties[3..6]) must be finite")
      return
    end if
  end do
  s11 = 1.0_c_double / properties(1)
  s22 = 1.0_c_double / properties(2)
  s33 = 1.0_c_double / properties(3)
  s12 = -properties(4) / properties(1)
  s13 = -properties(5) / properties(1)
  s23 = -properties(6) / properties(2)
  ! Cofactors; positive definite when the leading minors are (Sylvester).
  c11 = s22 * s33 - s23 * s23
  c12 = s13 * s23 - s12 * s33
  c13 = s12 * s23 - s13 * s22
  c22 = s11 * s33 - s13 * s13
  c23 = s12 * s13 - s11 * s23
  c33 = s11 * s22 - s12 * s12
  det = s11 * c11 + s12 * c12 + s13 * c13
  if (.not. (real(c33, c_double) > 0.0_c_double .and. real(det, c_double) > 0.0_c_double)) then
    report%status = tc_status_failed
    call tc_set_message(report, "orthotropic: the compliance is not positive definite " // &
                        "(check the Poisson ratios against the moduli)")
    return
  end if
  cm = 0.0_c_double
  cm(1, 1) = c11 / det
  cm(2, 2) = c22 / det
  cm(3, 3) = c33 / det
  cm(1, 2) = c12 / det
  cm(2, 1) = c12 / det
  cm(1, 3) = c13 / det
  cm(3, 1) = c13 / det
  cm(2, 3) = c23 / det
  cm(3, 2) = c23 / det
  cm(4, 4) = properties(9)
  cm(5, 5) = properties(8)
  cm(6, 6) = properties(7)

  ! Material axes by Gram-Schmidt, as the columns of r (r(i, a) = component i of axis a).
  finite = .true.
  do k = 1, 3
    finite = finite .and. ieee_is_finite(real(properties(9 + k), c_double)) .and. &
             ieee_is_finite(real(properties(12 + k), c_double))
  end do
  n1 = properties(10) * properties(10) + properties(11) * properties(11) + properties(12) * properties(12)
  if (.not. finite .or. .not. (real(n1, c_double) > 0.0_c_double)) then
    report%status = tc_status_failed
    call tc_set_message(report, "orthotropic: axis 1 (properties[9..12]) must be a finite nonzero vector")
    return
  end if
  l1 = cs_sqrt(n1)
  do k = 1, 3
    e1v(k) = properties(9 + k) / l1
  end do
  p = properties(13) * e1v(1) + properties(14) * e1v(2) + properties(15) * e1v(3)
  do k = 1, 3
    b(k) = properties(12 + k) - p * e1v(k)
  end do
  nb = b(1) * b(1) + b(2) * b(2) + b(3) * b(3)
  n2 = real(properties(13) * properties(13) + properties(14) * properties(14) + properties(15) * properties(15), c_double)
  if (.not. (real(nb, c_double) > 0.0_c_double) .or. &
      real(nb, c_double) <= parallel_tol * parallel_tol * n2) then
    report%status = tc_status_failed
    call tc_set_message(report, &
      "orthotropic: axis 2 (properties[12..15]) must be nonzero and not parallel to axis 1")
    return
  end if
  lb = cs_sqrt(nb)
  do k = 1, 3
    e2v(k) = b(k) / lb
  end do
  e3v(1) = e1v(2) * e2v(3) - e1v(3) * e2v(2)
  e3v(2) = e1v(3) * e2v(1) - e1v(1) * e2v(3)
  e3v(3) = e1v(1) * e2v(2) - e1v(2) * e2v(1)
  do i = 1, 3
    r(i, 1) = e1v(i)
    r(i, 2) = e2v(i)
    r(i, 3) = e3v(i)
  end do

  ! Mandel rotation: with I = (i, j), K = (k, l),
  ! Q_IK = (w_I / w_K)(R_ik R_jl + [k /= l] R_il R_jk); C^M = Q C'^M Q^T, C^M_IJ = w_I C_IJ w_J.
  ! Products are written out: no matmul or dot_product (the latter conjugates in the twin).
  w = [1.0_c_double, 1.0_c_double, 1.0_c_double, sqrt(2.0_c_double), sqrt(2.0_c_double), &
       sqrt(2.0_c_double)]
  do bi = 1, 6
    i = pair_i(bi)
    j = pair_j(bi)
    do bk = 1, 6
      k = pair_i(bk)
      l = pair_j(bk)
      v = r(i, k) * r(j, l)
      if (k /= l) v = v + r(i, l) * r(j, k)
      q(bi, bk) = v * (w(bi) / w(bk))
    end do
  end do
  do bb = 1, 6
    do a = 1, 6
      cm(a, bb) = cm(a, bb) * (w(a) * w(bb))
    end do
  end do
  qc = product6(q, cm)
  c = product6(qc, transpose(q))
  do bb = 1, 6
    do a = 1, 6
      c(a, bb) = c(a, bb) / (w(a) * w(bb))
    end do
  end do

  ! sigma = sigma0 + C dstrain on the kind's rows and columns, and the stored energy.
  stored = 0.0_c_double
  do i = 1, n
    s = stress0(i)
    do j = 1, n
      tangent(i, j) = c(slots(i), slots(j))
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

contains

  ! The matrix product x y of two 6x6 matrices, summed in the order of k (no matmul, whose order
  ! of summation is the library's).
  pure function product6(x, y) result(z)
    TC_REAL, intent(in) :: x(6, 6), y(6, 6)
    TC_REAL :: z(6, 6), t
    integer :: i6, j6, k6
    do j6 = 1, 6
      do i6 = 1, 6
        t = 0.0_c_double
        do k6 = 1, 6
          t = t + x(i6, k6) * y(k6, j6)
        end do
        z(i6, j6) = t
      end do
    end do
  end function product6
end subroutine f_orthotropic
