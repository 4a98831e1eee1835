! tancheck_cstep.f90 -- complex-step-safe scalar helpers for material routines in Fortran.
!
! The same semantics as fortran-shim/include/tancheck_cstep.h. Each generic has a specific for
! real(c_double) and one for complex(c_double_complex), so one routine source compiles as the
! ordinary routine and as its complex-step twin (see tancheck_twin.inc).
!
! The complex-step derivative (Squire & Trapp 1998; Martins, Sturdza & Alonso 2003, ACM TOMS
! 29(3)) evaluates f(x + ih) with a tiny real h and reads df/dx = aimag(f) / h. That is exact to
! rounding only if every operation is the analytic continuation of its real counterpart:
!   - compare real parts only: real(x, c_double);
!   - cs_abs, cs_max, cs_min, cs_sign decide on the real part and return the whole number
!     (the intrinsic abs of a complex number is its modulus: never use it here);
!   - no conjugation: a norm is cs_sqrt(sum(x*x)), never sqrt(sum(abs(x)**2));
!   - the elementary functions use their first-order forms f(a + ib) = f(a) + i f'(a) b,
!     which is what the complex step needs and is exact for tiny b.
! The usual culprits of a twin that is not complex-step safe (tancheck reports it as its own
! finding, exit 4, when the real differences agree with the returned tangent and the complex
! step does not):
!   - conjugating intrinsics: dot_product of complex arrays (it conjugates its first
!     argument), conjg, and norms built from them;
!   - complex abs: the intrinsic abs of a complex number is its modulus; use cs_abs;
!   - real-only sqrt / abs / exp: sqrt(real(x)) or any real(x, c_double) inside the
!     arithmetic keeps the value and drops the derivative;
!   - comparisons of complex values: compare real(x, c_double) only.
module tancheck_cstep
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  implicit none
  private

  public :: cs_abs, cs_max, cs_min, cs_sign, cs_sqrt, cs_exp, cs_log, cs_pow

  !> |x| decided on the real part: -x when real(x) < 0, else x.
  interface cs_abs
    module procedure cs_abs_r, cs_abs_c
  end interface cs_abs

  !> Larger of two by real part; the first when the real parts are equal.
  interface cs_max
    module procedure cs_max_r, cs_max_c
  end interface cs_max

  !> Smaller of two by real part; the first when the real parts are equal.
  interface cs_min
    module procedure cs_min_r, cs_min_c
  end interface cs_min

  !> cs_abs(a) with the sign of real(b): negative when real(b) < 0, else positive (a zero of
  !> either sign counts as positive, unlike the intrinsic sign on processors with signed zeros).
  interface cs_sign
    module procedure cs_sign_r, cs_sign_c
  end interface cs_sign

  !> Square root, guarded: exactly 0 when real(x) <= 0, where its derivative is unbounded.
  interface cs_sqrt
    module procedure cs_sqrt_r, cs_sqrt_c
  end interface cs_sqrt

  !> Exponential.
  interface cs_exp
    module procedure cs_exp_r, cs_exp_c
  end interface cs_exp

  !> Natural logarithm (real(x) > 0).
  interface cs_log
    module procedure cs_log_r, cs_log_c
  end interface cs_log

  !> x raised to a real(c_double) power p.
  interface cs_pow
    module procedure cs_pow_r, cs_pow_c
  end interface cs_pow

contains

  elemental function cs_abs_r(x) result(y)
    real(c_double), intent(in) :: x
    real(c_double) :: y
    if (x < 0.0_c_double) then
      y = -x
    else
      y = x
    end if
  end function cs_abs_r

  elemental function cs_abs_c(x) result(y)
    complex(c_double_complex), intent(in) :: x
    complex(c_double_complex) :: y
    if (real(x, c_double) < 0.0_c_double) then
      y = -x
    else
      y = x
    end if
  end function cs_abs_c

  elemental function cs_max_r(x, y) result(z)
    real(c_double), intent(in) :: x, y
    real(c_double) :: z
    if (x >= y) then
      z = x
    else
      z = y
    end if
  end function cs_max_r

  elemental function cs_max_c(x, y) result(z)
    complex(c_double_complex), intent(in) :: x, y
    complex(c_double_complex) :: z
    if (real(x, c_double) >= real(y, c_double)) then
      z = x
    else
      z = y
    end if
  end function cs_max_c

  elemental function cs_min_r(x, y) result(z)
    real(c_double), intent(in) :: x, y
    real(c_double) :: z
    if (x <= y) then
      z = x
    else
      z = y
    end if
  end function cs_min_r

  elemental function cs_min_c(x, y) result(z)
    complex(c_double_complex), intent(in) :: x, y
    complex(c_double_complex) :: z
    if (real(x, c_double) <= real(y, c_double)) then
      z = x
    else
      z = y
    end if
  end function cs_min_c

  elemental function cs_sign_r(a, b) result(z)
    real(c_double), intent(in) :: a, b
    real(c_double) :: z
    z = cs_abs_r(a)
    if (b < 0.0_c_double) z = -z
  end function cs_sign_r

  elemental function cs_sign_c(a, b) result(z)
    complex(c_double_complex), intent(in) :: a, b
    complex(c_double_complex) :: z
    z = cs_abs_c(a)
    if (real(b, c_double) < 0.0_c_double) z = -z
  end function cs_sign_c

  elemental function cs_sqrt_r(x) result(y)
    real(c_double), intent(in) :: x
    real(c_double) :: y
    if (x <= 0.0_c_double) then
      y = 0.0_c_double
    else
      y = sqrt(x)
    end if
  end function cs_sqrt_r

  ! sqrt(a + ib) = sqrt(a) + i b / (2 sqrt(a))   (Martins, Sturdza & Alonso 2003)
  elemental function cs_sqrt_c(x) result(y)
    complex(c_double_complex), intent(in) :: x
    complex(c_double_complex) :: y
    real(c_double) :: a, r
    a = real(x, c_double)
    if (a <= 0.0_c_double) then
      y = (0.0_c_double, 0.0_c_double)
    else
      r = sqrt(a)
      y = cmplx(r, aimag(x) / (2.0_c_double * r), kind=c_double_complex)
    end if
  end function cs_sqrt_c

  elemental function cs_exp_r(x) result(y)
    real(c_double), intent(in) :: x
    real(c_double) :: y
    y = exp(x)
  end function cs_exp_r

  ! exp(a + ib) = e^a + i e^a b   (Martins, Sturdza & Alonso 2003)
  elemental function cs_exp_c(x) result(y)
    complex(c_double_complex), intent(in) :: x
    complex(c_double_complex) :: y
    real(c_double) :: e
    e = exp(real(x, c_double))
    y = cmplx(e, e * aimag(x), kind=c_double_complex)
  end function cs_exp_c

  elemental function cs_log_r(x) result(y)
    real(c_double), intent(in) :: x
    real(c_double) :: y
    y = log(x)
  end function cs_log_r

  ! log(a + ib) = log(a) + i b / a   (Martins, Sturdza & Alonso 2003)
  elemental function cs_log_c(x) result(y)
    complex(c_double_complex), intent(in) :: x
    complex(c_double_complex) :: y
    real(c_double) :: a
    a = real(x, c_double)
    y = cmplx(log(a), aimag(x) / a, kind=c_double_complex)
  end function cs_log_c

  elemental function cs_pow_r(x, p) result(y)
    real(c_double), intent(in) :: x, p
    real(c_double) :: y
    y = x**p
  end function cs_pow_r

  ! (a + ib)^p = a^p + i p a^(p-1) b   (Martins, Sturdza & Alonso 2003)
  elemental function cs_pow_c(x, p) result(y)
    complex(c_double_complex), intent(in) :: x
    real(c_double), intent(in) :: p
    complex(c_double_complex) :: y
    real(c_double) :: a
    a = real(x, c_double)
    ! For p = 0 the derivative is 0, also at a = 0 (where p a**(p-1) is 0 times infinity).
    ! With no derivative part (b = 0, a start state) it is 0 too, also at a = 0 for p < 1.
    if (abs(p) <= 0.0_c_double) then
      y = cmplx(1.0_c_double, 0.0_c_double, kind=c_double_complex)
    else if (abs(aimag(x)) <= 0.0_c_double) then
      y = cmplx(a**p, 0.0_c_double, kind=c_double_complex)
    else
      y = cmplx(a**p, p * a**(p - 1.0_c_double) * aimag(x), kind=c_double_complex)
    end if
  end function cs_pow_c

end module tancheck_cstep
