! finite_j2.F90 -- finite-strain J2 plasticity with the multiplicative split, logarithmic
! elastic strain and exponential-map return (tancheck_finite.h), the reference model "j2-log"
! in Fortran: the same model and tangent as fortran-shim/examples/c/finite_j2.c and
! crates/tancheck-models/src/finite/j2_log.rs (Simo 1992, CMAME 99:61-112; Eterovic & Bathe
! 1990, IJNME 30:1099-1114; from memory).
!
! b_n = exp(2 ee_n), f = F1 F0^-1, btr = f b_n f^T, etr = ln(btr)/2; tau = K tr(ee) I
! + 2G dev(ee); radial return in ee with sy = sy0 + H alpha. ln, exp and square roots are
! eigen-free (Denman-Beavers, inverse scaling and squaring, scaling and squaring) so the twin's
! derivative parts are exact with coinciding stretches. Tangent cJ = D : M (consistent
! small-strain tangent D, M the derivative of ln(btr)/2 along d btr + btr d by divided
! differences in the Jacobi eigenbasis); other measures from dtau = cJ : sym l + w tau - tau w
! for dF = l F (tau-green-naghdi: minus Omega tau - tau Omega, Omega = dR R^T of F = R U).
!
! Properties [E, nu, sy0, H]; state [ee (11 22 33 23 13 12), alpha]. Energy: stored
! K/2 tr(ee)^2 + G dev ee : dev ee + H alpha^2/2, dissipated sy0 alpha.
!
! Symbols (each with its twin _cx): f_j2log, and the flawed f_j2log_material_as_spatial
! (dS/dE returned where a spatial measure is declared) and f_j2log_geometric_missing (dP/dF
! without the initial-stress term dF S, i.e. delta_ik S_JL).
!
! Build (after the modules tancheck_routine, tancheck_cstep, tancheck_finite):
!   gfortran -cpp -I fortran-shim/include -c finite_j2.F90               exports f_j2log, ...
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c finite_j2.F90  exports f_j2log_cx, ...

#include "tancheck_twin.inc"

! The update lives in a module whose name differs between the two builds, so that the
! ordinary and the twin object link into one library.
#ifdef TC_COMPLEX
#define J2_IMPL finite_j2_impl_cx
#else
#define J2_IMPL finite_j2_impl
#endif

module J2_IMPL
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_report, tc_temperature, tc_energy, tc_set_message, &
                              tc_status_failed, tc_provides_energy, tc_want_tangent
  use tancheck_finite, only: tc_finite_call, tc_stress_cauchy, tc_tangent_tau_jaumann, &
                             tc_tangent_sigma_jaumann, tc_tangent_tau_truesdell, tc_tangent_sigma_truesdell, &
                             tc_tangent_tau_green_naghdi, tc_tangent_dp_df, tc_tangent_ds_de
  use tancheck_cstep, only: cs_sqrt
  implicit none
  private
  public :: j2_point, j2_none, j2_material_as_spatial, j2_geometric_missing

  integer, parameter :: j2_none = 0, j2_material_as_spatial = 1, j2_geometric_missing = 2

contains

subroutine j2_point(callinfo, properties, f0, f1, rotation, temperature, stress0, state0, stress, state, &
                    tangent, energy, report, flaw)
#include "finite_entry_args.inc"
  integer, intent(in) :: flaw

  ! Rate-independent and driven by F: the rotation, temperature and start stress are not used.
  namelist /unused_arguments/ rotation, temperature, stress0

  integer, parameter :: ii(6) = [1, 2, 3, 2, 1, 1], jj(6) = [1, 2, 3, 3, 3, 2]
  TC_REAL :: e, nu, sy0, h, k, g, jac, alpha_n, alpha, tr, dd, qtr, ftr, factor, dalpha
  TC_REAL :: ee2(3, 3), bn(3, 3), fr(3, 3), btr(3, 3), etr(3, 3), dev(3, 3), tau(3, 3)
  real(c_double) :: rk, rg, theta, theta_bar, lam(3), q(3, 3), n(3, 3), rtau(3, 3), rf(3, 3), rfi(3, 3)
  real(c_double) :: rrot(3, 3), ru(3, 3)
  integer :: m, s, i
  logical :: plastic

  m = callinfo%tangent_measure
  if (callinfo%nproperties < 4 .or. callinfo%nstate < 7) then
    report%status = tc_status_failed
    call tc_set_message(report, "j2-log: needs 4 properties (E, nu, sy0, H) and 7 state variables")
    return
  end if
  if (m < tc_tangent_tau_jaumann .or. m > tc_tangent_ds_de) then
    report%status = tc_status_failed
    call tc_set_message(report, "j2-log: this tangent measure is not implemented in Fortran")
    return
  end if
  e = properties(1)
  nu = properties(2)
  sy0 = properties(3)
  h = properties(4)
  k = e / (3.0_c_double * (1.0_c_double - 2.0_c_double * nu))
  g = e / (2.0_c_double * (1.0_c_double + nu))
  jac = det3(f1)
  if (real(jac, c_double) <= 0.0_c_double .or. real(det3(f0), c_double) <= 0.0_c_double) then
    report%status = tc_status_failed
    call tc_set_message(report, "j2-log: det F <= 0")
    return
  end if
  do s = 1, 6
    ee2(ii(s), jj(s)) = 2.0_c_double * state0(s)
    ee2(jj(s), ii(s)) = 2.0_c_double * state0(s)
  end do
  alpha_n = state0(7)
  fr = matmul(f1, inv3(f0))
  bn = expm(ee2)
  btr = matmul(matmul(fr, bn), transpose(fr))
  etr = 0.5_c_double * logm(btr)
  tr = etr(1, 1) + etr(2, 2) + etr(3, 3)
  dev = etr
  do i = 1, 3
    dev(i, i) = dev(i, i) - tr / 3.0_c_double
  end do
  dd = sum(dev * dev)
  qtr = 2.0_c_double * g * cs_sqrt(1.5_c_double * dd)
  ftr = qtr - (sy0 + h * alpha_n)
  plastic = real(ftr, c_double) > 1.0e-12_c_double * abs(real(sy0, c_double))
  factor = 1.0_c_double
  dalpha = 0.0_c_double
  if (plastic) then
    dalpha = ftr / (3.0_c_double * g + h)
    factor = 1.0_c_double - 3.0_c_double * g * dalpha / qtr
  end if
  tau = 2.0_c_double * g * factor * dev
  do i = 1, 3
    tau(i, i) = tau(i, i) + k * tr
  end do
  do s = 1, 6
    if (callinfo%stress_measure == tc_stress_cauchy) then
      stress(s) = tau(ii(s), jj(s)) / jac
    else
      stress(s) = tau(ii(s), jj(s))
    end if
    state(s) = factor * dev(ii(s), jj(s))
    if (s <= 3) state(s) = state(s) + tr / 3.0_c_double
  end do
  alpha = alpha_n + dalpha
  state(7) = alpha
  if (callinfo%nstate > 7) state(8:) = state0(8:)
  energy%stored = 0.5_c_double * k * tr * tr + g * dd * factor * factor + 0.5_c_double * h * alpha * alpha
  energy%dissipated = sy0 * alpha
  report%branch = merge(1, 0, plastic)
  report%provides = tc_provides_energy
  if (iand(callinfo%flags, tc_want_tangent) == 0) return

  rk = real(k, c_double)
  rg = real(g, c_double)
  theta = 1.0_c_double
  theta_bar = 0.0_c_double
  n = 0.0_c_double
  if (plastic) then
    n = real(dev, c_double) / sqrt(real(dd, c_double))
    theta = 1.0_c_double - 3.0_c_double * rg * real(dalpha, c_double) / real(qtr, c_double)
    theta_bar = 3.0_c_double * rg / (3.0_c_double * rg + real(h, c_double)) - (1.0_c_double - theta)
  end if
  rtau = real(tau, c_double)
  rf = real(f1, c_double)
  rfi = real(inv3(f1), c_double)
  call eigen(real(btr, c_double), lam, q)
  call polar()
  if (flaw == j2_material_as_spatial .and. m /= tc_tangent_dp_df) m = tc_tangent_ds_de
  call measure_tangent()

contains

#include "finite_tensor.inc"

  ! Square root of an SPD tensor, Denman-Beavers; stops on real parts, then two more.
  function sqrtm(a) result(y)
    TC_REAL, intent(in) :: a(3, 3)
    TC_REAL :: y(3, 3), z(3, 3), yn(3, 3), yi(3, 3)
    integer :: it, extra
    y = a
    z = eye()
    extra = 0
    do it = 1, 100
      yi = inv3(y)
      yn = 0.5_c_double * (y + inv3(z))
      z = 0.5_c_double * (z + yi)
      if (maxval(abs(real(yn, c_double) - real(y, c_double))) <= 1.0e-15_c_double * maxval(abs(real(yn, c_double)))) &
        extra = extra + 1
      y = yn
      if (extra > 2) exit
    end do
  end function sqrtm

  ! ln of an SPD tensor: square roots until |Y - I| <= 0.1, then 2 artanh((Y - I)(Y + I)^-1).
  function logm(a) result(r)
    TC_REAL, intent(in) :: a(3, 3)
    TC_REAL :: r(3, 3), y(3, 3), z(3, 3), z2(3, 3), term(3, 3)
    integer :: p, nroot
    y = a
    nroot = 0
    do while (nroot < 60 .and. sqrt(sum((real(y, c_double) - real(eye(), c_double))**2)) > 0.1_c_double)
      y = sqrtm(y)
      nroot = nroot + 1
    end do
    z = matmul(y - eye(), inv3(y + eye()))
    z2 = matmul(z, z)
    term = z
    r = z
    do p = 1, 7
      term = matmul(term, z2)
      r = r + term / real(2 * p + 1, c_double)
    end do
    r = r * (2.0_c_double * 2.0_c_double**nroot)
  end function logm

  ! exp of a symmetric tensor: scaled to norm <= 1/4, Taylor to degree 16, squared back.
  function expm(a) result(r)
    TC_REAL, intent(in) :: a(3, 3)
    TC_REAL :: r(3, 3), x(3, 3), term(3, 3)
    integer :: p, nsq
    real(c_double) :: nrm
    nrm = sqrt(sum(real(a, c_double)**2))
    nsq = 0
    do while (nsq < 60 .and. nrm / 2.0_c_double**nsq > 0.25_c_double)
      nsq = nsq + 1
    end do
    x = a / 2.0_c_double**nsq
    term = eye()
    r = term
    do p = 1, 16
      term = matmul(term, x) / real(p, c_double)
      r = r + term
    end do
    do p = 1, nsq
      r = matmul(r, r)
    end do
  end function expm

  ! Eigenvalues and eigenvectors (columns of v) of a real symmetric tensor, cyclic Jacobi.
  subroutine eigen(a, w, v)
    real(c_double), intent(in) :: a(3, 3)
    real(c_double), intent(out) :: w(3), v(3, 3)
    integer, parameter :: pp(3) = [1, 1, 2], rr(3) = [2, 3, 3]
    real(c_double) :: b(3, 3), th, t, c, sn
    integer :: sweep, kk, p, r
    b = a
    v = real(eye(), c_double)
    do sweep = 1, 60
      if (abs(b(1, 2)) + abs(b(1, 3)) + abs(b(2, 3)) <= 1.0e-18_c_double * (abs(b(1, 1)) + abs(b(2, 2)) &
          + abs(b(3, 3)))) exit
      do kk = 1, 3
        p = pp(kk)
        r = rr(kk)
        if (b(p, r) == 0.0_c_double) cycle
        th = (b(r, r) - b(p, p)) / (2.0_c_double * b(p, r))
        if (th == 0.0_c_double) then
          t = 1.0_c_double
        else
          t = sign(1.0_c_double, th) / (abs(th) + sqrt(th * th + 1.0_c_double))
        end if
        c = 1.0_c_double / sqrt(t * t + 1.0_c_double)
        sn = t * c
        call rotate_pair(b(:, p), b(:, r), c, sn)
        call rotate_pair(b(p, :), b(r, :), c, sn)
        call rotate_pair(v(:, p), v(:, r), c, sn)
      end do
    end do
    w = [b(1, 1), b(2, 2), b(3, 3)]
  end subroutine eigen

  ! One Jacobi rotation of the pair (x, y) of columns or rows: x = c x - sn y, y = sn x + c y.
  pure subroutine rotate_pair(x, y, c, sn)
    real(c_double), intent(inout) :: x(3), y(3)
    real(c_double), intent(in) :: c, sn
    real(c_double) :: x1, x2
    integer :: l
    do l = 1, 3
      x1 = x(l)
      x2 = y(l)
      x(l) = c * x1 - sn * x2
      y(l) = sn * x1 + c * x2
    end do
  end subroutine rotate_pair

  pure function rinv3(a) result(r)
    real(c_double), intent(in) :: a(3, 3)
    real(c_double) :: r(3, 3), d
    d = a(1, 1) * (a(2, 2) * a(3, 3) - a(2, 3) * a(3, 2)) - a(1, 2) * (a(2, 1) * a(3, 3) - a(2, 3) * a(3, 1)) &
        + a(1, 3) * (a(2, 1) * a(3, 2) - a(2, 2) * a(3, 1))
    r(1, 1) = (a(2, 2) * a(3, 3) - a(2, 3) * a(3, 2)) / d
    r(1, 2) = -(a(1, 2) * a(3, 3) - a(1, 3) * a(3, 2)) / d
    r(1, 3) = (a(1, 2) * a(2, 3) - a(1, 3) * a(2, 2)) / d
    r(2, 1) = -(a(2, 1) * a(3, 3) - a(2, 3) * a(3, 1)) / d
    r(2, 2) = (a(1, 1) * a(3, 3) - a(1, 3) * a(3, 1)) / d
    r(2, 3) = -(a(1, 1) * a(2, 3) - a(1, 3) * a(2, 1)) / d
    r(3, 1) = (a(2, 1) * a(3, 2) - a(2, 2) * a(3, 1)) / d
    r(3, 2) = -(a(1, 1) * a(3, 2) - a(1, 2) * a(3, 1)) / d
    r(3, 3) = (a(1, 1) * a(2, 2) - a(1, 2) * a(2, 1)) / d
  end function rinv3

  ! The rotation of F = R U by Newton's iteration R <- (R + R^-T)/2, and U = R^T F.
  subroutine polar()
    real(c_double) :: x(3, 3)
    integer :: it
    rrot = rf
    do it = 1, 100
      x = 0.5_c_double * (rrot + transpose(rinv3(rrot)))
      if (maxval(abs(x - rrot)) <= 1.0e-15_c_double) then
        rrot = x
        exit
      end if
      rrot = x
    end do
    ru = matmul(transpose(rrot), rf)
  end subroutine polar

  ! Omega = dR R^T for dF = d F: W = R^T dR has the axial vector (tr U I - U)^-1 axial(G - G^T),
  ! G = R^T dF (from W U + U W = G - G^T); Omega = R W R^T.
  function polar_spin(d) result(om)
    real(c_double), intent(in) :: d(3, 3)
    real(c_double) :: om(3, 3), gm(3, 3), k(3, 3), v(3), w(3, 3)
    integer :: p
    gm = matmul(transpose(rrot), matmul(d, rf))
    k = -ru
    do p = 1, 3
      k(p, p) = k(p, p) + ru(1, 1) + ru(2, 2) + ru(3, 3)
    end do
    v = matmul(rinv3(k), [gm(3, 2) - gm(2, 3), gm(1, 3) - gm(3, 1), gm(2, 1) - gm(1, 2)])
    w = 0.0_c_double
    w(3, 2) = v(1)
    w(2, 3) = -v(1)
    w(1, 3) = v(2)
    w(3, 1) = -v(2)
    w(2, 1) = v(3)
    w(1, 2) = -v(3)
    om = matmul(matmul(rrot, w), transpose(rrot))
  end function polar_spin

  ! (la + lb)/2 (ln la - ln lb)/(la - lb), 1 when equal (series of ln(1 + u)/u near u = 0).
  pure function divided(la, lb) result(d)
    real(c_double), intent(in) :: la, lb
    real(c_double) :: d, u, gg
    u = (la - lb) / lb
    if (abs(u) < 1.0e-3_c_double) then
      gg = 1.0_c_double - u / 2.0_c_double + u**2 / 3.0_c_double - u**3 / 4.0_c_double + u**4 / 5.0_c_double
    else
      gg = log(la / lb) / u
    end if
    d = 0.5_c_double * (la + lb) * gg / lb
  end function divided

  ! dtau for dF = l F: cJ : sym l + w tau - tau w.
  function response(l) result(dtau)
    real(c_double), intent(in) :: l(3, 3)
    real(c_double) :: dtau(3, 3), dt(3, 3), ep(3, 3), w(3, 3), trd, nn
    integer :: a, b, p
    dt = matmul(matmul(transpose(q), 0.5_c_double * (l + transpose(l))), q)
    do b = 1, 3
      do a = 1, 3
        dt(a, b) = dt(a, b) * divided(lam(a), lam(b))
      end do
    end do
    ep = matmul(matmul(q, dt), transpose(q))
    trd = ep(1, 1) + ep(2, 2) + ep(3, 3)
    nn = sum(n * ep)
    dtau = 2.0_c_double * rg * theta * ep - 2.0_c_double * rg * theta_bar * n * nn
    do p = 1, 3
      dtau(p, p) = dtau(p, p) + (rk - 2.0_c_double * rg * theta / 3.0_c_double) * trd
    end do
    w = 0.5_c_double * (l - transpose(l))
    dtau = dtau + matmul(w, rtau) - matmul(rtau, w)
  end function response

  ! The tangent in the declared measure.
  subroutine measure_tangent()
    real(c_double) :: d(3, 3), df(3, 3), l(3, 3), dtau(3, 3), x(3, 3), o(3, 3), rjac
    integer :: c, ncol, r
    rjac = real(jac, c_double)
    ncol = merge(9, 6, m == tc_tangent_dp_df)
    do c = 1, ncol
      d = 0.0_c_double
      if (m == tc_tangent_dp_df) then
        d(mod(c - 1, 3) + 1, (c - 1) / 3 + 1) = 1.0_c_double
      else
        d(ii(c), jj(c)) = merge(1.0_c_double, 0.5_c_double, ii(c) == jj(c))
        d(jj(c), ii(c)) = d(ii(c), jj(c))
      end if
      if (m == tc_tangent_dp_df .or. m == tc_tangent_ds_de) then
        if (m == tc_tangent_dp_df) then
          df = d
        else
          df = matmul(transpose(rfi), d)
        end if
        l = matmul(df, rfi)
        dtau = response(l)
        if (m == tc_tangent_dp_df) then
          x = dtau - matmul(rtau, transpose(l))
          if (flaw == j2_geometric_missing) x = x - matmul(l, rtau) ! drops dF S
          o = matmul(x, transpose(rfi))
        else
          x = dtau - matmul(l, rtau) - matmul(rtau, transpose(l))
          o = matmul(matmul(rfi, x), transpose(rfi))
        end if
      else
        o = response(d)
        if (m == tc_tangent_tau_green_naghdi) then
          x = polar_spin(d)
          o = o - matmul(x, rtau) + matmul(rtau, x)
        end if
        if (m == tc_tangent_tau_truesdell .or. m == tc_tangent_sigma_truesdell) &
          o = o - matmul(d, rtau) - matmul(rtau, d)
        if (m == tc_tangent_sigma_jaumann .or. m == tc_tangent_sigma_truesdell) o = o / rjac
      end if
      if (ncol == 9) then
        do r = 1, 9
          tangent(r, c) = o(mod(r - 1, 3) + 1, (r - 1) / 3 + 1)
        end do
      else
        do r = 1, 6
          tangent(r, c) = o(ii(r), jj(r))
        end do
      end if
    end do
  end subroutine measure_tangent
end subroutine j2_point
end module J2_IMPL

! The exported routines (finite_entry.inc): each hands its arguments to j2_point with its flaw.
#define TC_MODEL_MODULE J2_IMPL
#define TC_MODEL j2_point

#define TC_VARIANT f_j2log
#define TC_VARIANT_NAME "f_j2log"
#define TC_FLAW j2_none
#include "finite_entry.inc"

#define TC_VARIANT f_j2log_material_as_spatial
#define TC_VARIANT_NAME "f_j2log_material_as_spatial"
#define TC_FLAW j2_material_as_spatial
#include "finite_entry.inc"

#define TC_VARIANT f_j2log_geometric_missing
#define TC_VARIANT_NAME "f_j2log_geometric_missing"
#define TC_FLAW j2_geometric_missing
#include "finite_entry.inc"
