! check_from_fortran.f90 -- a Fortran test program that checks the J2 routines of j2.F90
! in-process through tancheck's C API (module tancheck_api).
!
! The consistent routine f_j2 must pass; f_j2_continuum, which returns the continuum tangent,
! must fail the tangent check. The program prints both summaries and ends normally when both
! verdicts are the expected ones; otherwise it ends with error stop 1.
!
! Build (modules first; j2.F90 twice, the second time with -DTC_COMPLEX, for the twins):
!   gfortran -c fortran-shim/fortran/tancheck_routine.f90 fortran-shim/fortran/tancheck_cstep.f90 \
!            fortran-shim/fortran/tancheck_api.f90
!   gfortran -cpp -I fortran-shim/include -c fortran-shim/examples/fortran/j2.F90 -o j2.o
!   gfortran -cpp -I fortran-shim/include -DTC_COMPLEX -c fortran-shim/examples/fortran/j2.F90 \
!            -o j2_cx.o
!   gfortran fortran-shim/examples/fortran/check_from_fortran.f90 j2.o j2_cx.o *.o \
!            $(pkg-config --libs tancheck) -o check_from_fortran
program check_from_fortran
  use, intrinsic :: iso_c_binding, only: c_double, c_funloc, c_funptr, c_ptr
  use tancheck_routine, only: tc_routine_real, tc_routine_complex
  use tancheck_api, only: tck_options, tck_error_type, tck_init_options, tck_run_check, &
                          tck_free_result, tck_get_verdict, tck_get_summary, tck_get_json, &
                          tck_get_finding_count, tck_get_finding, tck_get_version, &
                          tck_get_version_string, tck_version_major, tck_version_minor, &
                          tck_ok, tck_error_invalid, tck_kind_solid_3d, tck_guard_full, &
                          tck_verdict_pass, tck_verdict_tangent_failure
  implicit none

  ! The routines of j2.F90 and their complex-step twins.
  procedure(tc_routine_real), bind(C, name="f_j2") :: f_j2
  procedure(tc_routine_real), bind(C, name="f_j2_continuum") :: f_j2_continuum
  procedure(tc_routine_complex), bind(C, name="f_j2_cx") :: f_j2_cx
  procedure(tc_routine_complex), bind(C, name="f_j2_continuum_cx") :: f_j2_continuum_cx

  ! J2 properties [E, nu, sigma_y0, H_iso, Q, b, H_kin] (DEVELOPERS.md, "Reference models").
  real(c_double), parameter :: properties(7) = [200000.0_c_double, 0.3_c_double, 250.0_c_double, &
                                           1000.0_c_double, 0.0_c_double, 0.0_c_double, &
                                           500.0_c_double]
  integer, parameter :: nstate = 13  ! 2 * 6 + 1 for a 3D solid

  type(tck_options) :: opts
  type(tck_error_type) :: err
  type(c_ptr) :: result
  character(len=:), allocatable :: version
  integer :: major, minor, patch
  logical :: good

  call tck_get_version(major, minor, patch)
  call tck_get_version_string(version)
  print '(a, a, a, i0, a, i0, a)', "tancheck ", version, " (module ", tck_version_major, ".", &
    tck_version_minor, ")"
  good = major == tck_version_major .and. minor == tck_version_minor
  if (.not. good) print '(a)', "the library does not match the module's version"

  ! A bad option is an error with a message, not a verdict.
  call tck_init_options(opts)
  opts%kind = 99
  call tck_run_check(result, c_funloc(f_j2), opts, properties, nstate, err=err)
  if (err%status /= tck_error_invalid .or. index(err%message, "kind is 99") == 0) then
    print '(a, i0, a, a)', "a bad kind was not refused as expected: status ", err%status, &
      ", ", err%message
    good = .false.
  end if

  ! A start strain of the wrong length is refused: the library would read past it.
  call tck_init_options(opts)
  opts%kind = tck_kind_solid_3d
  call tck_run_check(result, c_funloc(f_j2), opts, properties, nstate, &
                     strain0=[1.0e-3_c_double, 0.0_c_double], err=err)
  if (err%status /= tck_error_invalid .or. index(err%message, "strain0 must have") == 0) then
    print '(a, i0, a, a)', "a short strain0 was not refused as expected: status ", err%status, &
      ", ", err%message
    good = .false.
  end if

  call tck_init_options(opts)
  opts%kind = tck_kind_solid_3d
  opts%guard_level = tck_guard_full
  good = check_one("f_j2", c_funloc(f_j2), c_funloc(f_j2_cx), tck_verdict_pass) .and. good
  good = check_one("f_j2_continuum", c_funloc(f_j2_continuum), c_funloc(f_j2_continuum_cx), &
                   tck_verdict_tangent_failure) .and. good

  if (.not. good) then
    print '(a)', "NOT as expected"
    error stop 1
  end if
  print '(a)', "as expected: f_j2 passes, f_j2_continuum fails"

contains

  !> Check one routine; true when its verdict is want and its report reads back.
  logical function check_one(name, routine, twin, want) result(ok)
    character(len=*), intent(in) :: name
    type(c_funptr), value, intent(in) :: routine, twin
    integer, intent(in) :: want

    type(c_ptr) :: res
    character(len=:), allocatable :: summary, json, finding
    integer :: verdict, exit_code, nfindings, i

    ! Without err: a failure to run stops the program with the library's message.
    call tck_run_check(res, routine, opts, properties, nstate, twin=twin, name=name)
    call tck_get_verdict(res, verdict, exit_code)
    call tck_get_summary(res, summary)
    print '(a)', summary
    call tck_get_finding_count(res, nfindings)
    do i = 1, nfindings
      call tck_get_finding(res, i, finding)
      print '(a, a)', "  guard: ", finding
    end do
    call tck_get_json(res, json, err)
    ok = verdict == want .and. exit_code == want .and. err%status == tck_ok
    ok = ok .and. index(json, '"verdict"') > 0 .and. index(json, '"guard"') > 0
    if (verdict /= want) print '(a, a, i0, a, i0)', name, ": verdict ", verdict, &
      ", expected ", want
    call tck_free_result(res)
  end function check_one

end program check_from_fortran
