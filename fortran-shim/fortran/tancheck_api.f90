! tancheck_api.f90 -- the C API of tancheck (fortran-shim/include/tancheck.h) for Fortran.
!
! A Fortran test program checks a material routine's tangent in-process: it passes the
! routine (a bind(C) procedure of the routine ABI, see tancheck_routine.f90) with c_funloc,
! the properties and the state count as arrays and numbers, and the rest in a tck_options
! value filled by tck_init_options. The result is a handle (type(c_ptr)) that the library
! makes and tck_free_result frees.
!
!   type(tck_options) :: opts
!   type(c_ptr) :: result
!   integer :: verdict
!   character(len=:), allocatable :: text
!   call tck_init_options(opts)
!   call tck_run_check(result, c_funloc(f_j2), opts, properties, 13, twin=c_funloc(f_j2_cx))
!   call tck_get_verdict(result, verdict)
!   call tck_get_summary(result, text)
!   call tck_free_result(result)
!
! Every wrapper takes an optional err argument. Given, it receives the status (tck_ok or a
! tck_error_* code) and the library's message; omitted, a failure writes the message to the
! error unit and ends the program with error stop.
!
! Arrays passed to tck_run_check are read during the call only. The interfaces to the C
! functions themselves are private: use the wrappers.
module tancheck_api
  use, intrinsic :: iso_c_binding, only: c_int, c_int32_t, c_double, c_char, c_size_t, &
                                         c_ptr, c_funptr, c_null_ptr, c_null_funptr, &
                                         c_null_char, c_loc, c_associated, c_f_pointer
  use, intrinsic :: iso_fortran_env, only: error_unit
  implicit none
  private

  public :: tck_options, tck_error_type
  public :: tck_version_major, tck_version_minor, tck_version_patch, tck_options_version
  public :: tck_ok, tck_error_null, tck_error_version, tck_error_invalid, tck_error_guard, &
            tck_error_buffer, tck_error_internal
  public :: tck_kind_solid_3d, tck_kind_plane_strain, tck_kind_axisymmetric, &
            tck_kind_plane_stress, tck_kind_uniaxial, tck_kind_cohesive_3d, tck_kind_cohesive_2d
  public :: tck_component_opening, tck_component_slip1, tck_component_slip2, &
            tck_component_11, tck_component_12, tck_component_13, tck_component_22, &
            tck_component_23, tck_component_33
  public :: tck_shear_engineering, tck_shear_tensor
  public :: tck_shape_default, tck_shape_uniaxial_strain, tck_shape_shear_12, tck_shape_biaxial, &
            tck_shape_hydrostatic, tck_shape_tension_shear, tck_shape_mixed_mode, &
            tck_shape_uniaxial_stress
  public :: tck_scheme_forward, tck_scheme_backward, tck_scheme_central, tck_scheme_central4, &
            tck_scheme_richardson, tck_scheme_complex_step, tck_scheme_slots
  public :: tck_guard_off, tck_guard_light, tck_guard_full
  public :: tck_verdict_pass, tck_verdict_tangent_failure, tck_verdict_routine_fault, &
            tck_verdict_twin_not_safe
  public :: tck_init_options, tck_run_check, tck_free_result
  public :: tck_get_verdict, tck_get_summary, tck_get_json, tck_get_finding_count, &
            tck_get_finding
  public :: tck_get_version, tck_get_version_string

  !> Version of tancheck.h this module mirrors (TCK_VERSION_*); tck_get_version gives the
  !> library's.
  integer, parameter :: tck_version_major = 0
  integer, parameter :: tck_version_minor = 1
  integer, parameter :: tck_version_patch = 0
  !> Layout version of tck_options (TCK_OPTIONS_VERSION).
  integer(c_int32_t), parameter :: tck_options_version = 2_c_int32_t

  !> Status codes (tck_status).
  integer, parameter :: tck_ok = 0
  integer, parameter :: tck_error_null = 1
  integer, parameter :: tck_error_version = 2
  integer, parameter :: tck_error_invalid = 3
  integer, parameter :: tck_error_guard = 4
  integer, parameter :: tck_error_buffer = 5
  integer, parameter :: tck_error_internal = 6

  !> Kinds of material point (tck_kind).
  integer(c_int32_t), parameter :: tck_kind_solid_3d = 1_c_int32_t
  integer(c_int32_t), parameter :: tck_kind_plane_strain = 2_c_int32_t
  integer(c_int32_t), parameter :: tck_kind_axisymmetric = 3_c_int32_t
  integer(c_int32_t), parameter :: tck_kind_plane_stress = 4_c_int32_t
  integer(c_int32_t), parameter :: tck_kind_uniaxial = 5_c_int32_t
  integer(c_int32_t), parameter :: tck_kind_cohesive_3d = 6_c_int32_t
  integer(c_int32_t), parameter :: tck_kind_cohesive_2d = 7_c_int32_t

  !> Components for the order argument (tck_component).
  integer(c_int32_t), parameter :: tck_component_opening = 1_c_int32_t
  integer(c_int32_t), parameter :: tck_component_slip1 = 2_c_int32_t
  integer(c_int32_t), parameter :: tck_component_slip2 = 3_c_int32_t
  integer(c_int32_t), parameter :: tck_component_11 = 11_c_int32_t
  integer(c_int32_t), parameter :: tck_component_12 = 12_c_int32_t
  integer(c_int32_t), parameter :: tck_component_13 = 13_c_int32_t
  integer(c_int32_t), parameter :: tck_component_22 = 22_c_int32_t
  integer(c_int32_t), parameter :: tck_component_23 = 23_c_int32_t
  integer(c_int32_t), parameter :: tck_component_33 = 33_c_int32_t

  !> Shear measures (tck_shear).
  integer(c_int32_t), parameter :: tck_shear_engineering = 0_c_int32_t
  integer(c_int32_t), parameter :: tck_shear_tensor = 1_c_int32_t

  !> Built-in path shapes (tck_shape); default: the kind's own (tck_shape_default).
  integer(c_int32_t), parameter :: tck_shape_default = 0_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_uniaxial_strain = 1_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_shear_12 = 2_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_biaxial = 3_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_hydrostatic = 4_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_tension_shear = 5_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_mixed_mode = 6_c_int32_t
  integer(c_int32_t), parameter :: tck_shape_uniaxial_stress = 7_c_int32_t

  !> Derivative schemes (tck_scheme): the index into rel_step(0:) and tol(0:), and
  !> ibset(0, index) is its bit in schemes.
  integer(c_int32_t), parameter :: tck_scheme_forward = 0_c_int32_t
  integer(c_int32_t), parameter :: tck_scheme_backward = 1_c_int32_t
  integer(c_int32_t), parameter :: tck_scheme_central = 2_c_int32_t
  integer(c_int32_t), parameter :: tck_scheme_central4 = 3_c_int32_t
  integer(c_int32_t), parameter :: tck_scheme_richardson = 4_c_int32_t
  integer(c_int32_t), parameter :: tck_scheme_complex_step = 5_c_int32_t
  integer, parameter :: tck_scheme_slots = 8

  !> Guard levels (tck_guard_level).
  integer(c_int32_t), parameter :: tck_guard_off = 0_c_int32_t
  integer(c_int32_t), parameter :: tck_guard_light = 1_c_int32_t
  integer(c_int32_t), parameter :: tck_guard_full = 2_c_int32_t

  !> Verdicts (tck_verdict), equal to the exit codes of the tancheck command.
  integer, parameter :: tck_verdict_pass = 0
  integer, parameter :: tck_verdict_tangent_failure = 1
  integer, parameter :: tck_verdict_routine_fault = 3
  !> The tangent agrees with the real differences; the complex-step twin is not safe.
  integer, parameter :: tck_verdict_twin_not_safe = 4

  !> Everything about one check (struct tck_options). Fill it with tck_init_options. The
  !> pointer fields properties, state0, strain0, stress0, order, increments and name are set by
  !> tck_run_check from its array arguments; when such an argument is absent, the field is
  !> passed as it is (null after tck_init_options).
  type, bind(C) :: tck_options
    integer(c_int32_t) :: version        ! tck_options_version
    integer(c_int32_t) :: kind           ! tck_kind_*
    integer(c_int32_t) :: shear          ! tck_shear_*
    integer(c_int32_t) :: norder         ! entries of order; 0: the kind's default order
    type(c_ptr) :: order                 ! tck_component_* values in the routine's order
    type(c_ptr) :: name                  ! NUL-terminated name for the report
    integer(c_int32_t) :: nproperties
    integer(c_int32_t) :: nstate
    type(c_ptr) :: properties
    type(c_ptr) :: state0                ! nstate start values, or null for zeros
    type(c_ptr) :: strain0               ! ncomp start strains (routine order), or null
    type(c_ptr) :: stress0               ! ncomp start stresses, or null
    real(c_double) :: temperature        ! start temperature
    integer(c_int32_t) :: shape          ! tck_shape_*, unless increments are given
    integer(c_int32_t) :: steps          ! increments out to the peak
    integer(c_int32_t) :: back           ! increments back to zero
    integer(c_int32_t) :: nincrements    ! columns of increments
    real(c_double) :: peak               ! leading strain component at the peak
    type(c_ptr) :: increments            ! (6, nincrements) tensor strain increments
    type(c_ptr) :: increment_dtemp       ! nincrements temperature increments, or null
    type(c_ptr) :: increment_dtime       ! nincrements time increments, or null
    integer(c_int32_t) :: schemes        ! bits ibset(0, tck_scheme_*)
    integer(c_int32_t) :: guard_level    ! tck_guard_*
    real(c_double) :: rel_step(0:tck_scheme_slots - 1)  ! relative step by tck_scheme_*
    real(c_double) :: tol(0:tck_scheme_slots - 1)       ! tolerance by tck_scheme_*
    integer(c_int32_t) :: diagnose       ! nonzero: a failing check gets a closer look
    integer(c_int32_t) :: fp_traps       ! nonzero: floating-point traps in the routine
  end type tck_options

  !> A failure of a wrapper: the status code and the library's message.
  type :: tck_error_type
    integer :: status = tck_ok
    character(len=:), allocatable :: message
  end type tck_error_type

  interface
    function c_options_init(opts) result(status) bind(C, name="tck_options_init")
      import :: tck_options, c_int
      type(tck_options), intent(out) :: opts
      integer(c_int) :: status
    end function c_options_init

    function c_check(result, routine, twin, opts) result(status) bind(C, name="tck_check")
      import :: tck_options, c_ptr, c_funptr, c_int
      type(c_ptr), intent(out) :: result
      type(c_funptr), value, intent(in) :: routine
      type(c_funptr), value, intent(in) :: twin
      type(tck_options), intent(in) :: opts
      integer(c_int) :: status
    end function c_check

    subroutine c_result_free(result) bind(C, name="tck_result_free")
      import :: c_ptr
      type(c_ptr), value, intent(in) :: result
    end subroutine c_result_free

    function c_result_verdict(result) result(verdict) bind(C, name="tck_result_verdict")
      import :: c_ptr, c_int
      type(c_ptr), value, intent(in) :: result
      integer(c_int) :: verdict
    end function c_result_verdict

    function c_result_exit_code(result) result(code) bind(C, name="tck_result_exit_code")
      import :: c_ptr, c_int
      type(c_ptr), value, intent(in) :: result
      integer(c_int) :: code
    end function c_result_exit_code

    function c_result_summary(result) result(text) bind(C, name="tck_result_summary")
      import :: c_ptr
      type(c_ptr), value, intent(in) :: result
      type(c_ptr) :: text
    end function c_result_summary

    function c_result_json_copy(result, buf, size, length) result(status) &
        bind(C, name="tck_result_json_copy")
      import :: c_ptr, c_size_t, c_int
      type(c_ptr), value, intent(in) :: result
      type(c_ptr), value, intent(in) :: buf
      integer(c_size_t), value, intent(in) :: size
      integer(c_size_t), intent(out) :: length
      integer(c_int) :: status
    end function c_result_json_copy

    function c_result_finding_count(result) result(n) bind(C, name="tck_result_finding_count")
      import :: c_ptr, c_size_t
      type(c_ptr), value, intent(in) :: result
      integer(c_size_t) :: n
    end function c_result_finding_count

    function c_result_finding(result, index) result(text) bind(C, name="tck_result_finding")
      import :: c_ptr, c_size_t
      type(c_ptr), value, intent(in) :: result
      integer(c_size_t), value, intent(in) :: index
      type(c_ptr) :: text
    end function c_result_finding

    function c_last_error() result(text) bind(C, name="tck_last_error")
      import :: c_ptr
      type(c_ptr) :: text
    end function c_last_error

    subroutine c_version(major, minor, patch) bind(C, name="tck_version")
      import :: c_int32_t
      integer(c_int32_t), intent(out) :: major, minor, patch
    end subroutine c_version

    function c_version_string() result(text) bind(C, name="tck_version_string")
      import :: c_ptr
      type(c_ptr) :: text
    end function c_version_string

    function c_strlen(text) result(n) bind(C, name="strlen")
      import :: c_ptr, c_size_t
      type(c_ptr), value, intent(in) :: text
      integer(c_size_t) :: n
    end function c_strlen
  end interface

contains

  !> Fill opts with the layout version and every default (tck_options_init).
  subroutine tck_init_options(opts, err)
    type(tck_options), intent(out) :: opts
    type(tck_error_type), intent(out), optional :: err

    call handle(int(c_options_init(opts)), "tck_init_options", err)
  end subroutine tck_init_options

  !> Check routine (from c_funloc of a bind(C) procedure with the interface
  !> tc_routine_real) with the given properties and number of state variables, as opts says.
  !> twin is its complex-step twin (interface tc_routine_complex), when there is one. A
  !> failing tangent or a crashing routine is a verdict of the result, not an error; an error
  !> means the check could not run (bad options), and result is then null.
  subroutine tck_run_check(result, routine, opts, properties, nstate, twin, state0, strain0, &
                           stress0, order, increments, name, err)
    type(c_ptr), intent(out) :: result
    type(c_funptr), value, intent(in) :: routine  ! by value: c_funloc(...) needs no temporary
    type(tck_options), intent(in) :: opts
    real(c_double), intent(in), target, contiguous :: properties(:)
    integer, intent(in) :: nstate
    type(c_funptr), intent(in), optional :: twin
    real(c_double), intent(in), target, contiguous, optional :: state0(:)
    real(c_double), intent(in), target, contiguous, optional :: strain0(:)
    real(c_double), intent(in), target, contiguous, optional :: stress0(:)
    integer(c_int32_t), intent(in), target, contiguous, optional :: order(:)
    real(c_double), intent(in), target, contiguous, optional :: increments(:, :)
    character(len=*), intent(in), optional :: name
    type(tck_error_type), intent(out), optional :: err

    type(tck_options) :: o
    type(c_funptr) :: twin_ptr
    character(kind=c_char), allocatable, target :: cname(:)
    integer :: i

    o = opts
    o%nproperties = int(size(properties), c_int32_t)
    o%properties = address(properties)
    o%nstate = int(nstate, c_int32_t)
    if (present(state0)) then
      if (size(state0) /= nstate) then
        call fail(tck_error_invalid, "tck_run_check", "state0 must have nstate entries", err)
        result = c_null_ptr
        return
      end if
      o%state0 = address(state0)
    end if
    ! The start strain and stress have the point kind's components: a shorter array was
    ! read past its end (a user-style sweep), a longer one is a mistake too.
    if (present(strain0)) then
      if (kind_components(opts%kind) > 0 .and. size(strain0) /= kind_components(opts%kind)) then
        call fail(tck_error_invalid, "tck_run_check", &
                  "strain0 must have as many entries as the point kind has components", err)
        result = c_null_ptr
        return
      end if
      o%strain0 = address(strain0)
    end if
    if (present(stress0)) then
      if (kind_components(opts%kind) > 0 .and. size(stress0) /= kind_components(opts%kind)) then
        call fail(tck_error_invalid, "tck_run_check", &
                  "stress0 must have as many entries as the point kind has components", err)
        result = c_null_ptr
        return
      end if
      o%stress0 = address(stress0)
    end if
    if (present(order)) then
      o%norder = int(size(order), c_int32_t)
      if (size(order) > 0) o%order = c_loc(order)
    end if
    if (present(increments)) then
      if (size(increments, 1) /= 6 .or. size(increments, 2) < 1) then
        call fail(tck_error_invalid, "tck_run_check", &
                  "increments must be shaped (6, n) with n >= 1", err)
        result = c_null_ptr
        return
      end if
      o%nincrements = int(size(increments, 2), c_int32_t)
      o%increments = c_loc(increments)
    end if
    if (present(name)) then
      allocate (cname(len_trim(name) + 1))
      do i = 1, len_trim(name)
        cname(i) = name(i:i)
      end do
      cname(len_trim(name) + 1) = c_null_char
      o%name = c_loc(cname)
    end if
    twin_ptr = c_null_funptr
    if (present(twin)) twin_ptr = twin

    call handle(int(c_check(result, routine, twin_ptr, o)), "tck_run_check", err)
  end subroutine tck_run_check

  !> The components of a point of kind `kind` (tck_kind_*); -1 for an unknown kind (no size is
  !> checked then: the C side names the kind as unknown).
  pure function kind_components(kind) result(n)
    integer(c_int32_t), intent(in) :: kind
    integer :: n

    select case (kind)
    case (tck_kind_solid_3d)
      n = 6
    case (tck_kind_plane_strain, tck_kind_axisymmetric)
      n = 4
    case (tck_kind_plane_stress, tck_kind_cohesive_3d)
      n = 3
    case (tck_kind_cohesive_2d)
      n = 2
    case (tck_kind_uniaxial)
      n = 1
    case default
      n = -1
    end select
  end function kind_components

  !> Free a result (tck_result_free) and set the handle to null; a null handle is allowed.
  subroutine tck_free_result(result)
    type(c_ptr), intent(inout) :: result

    call c_result_free(result)
    result = c_null_ptr
  end subroutine tck_free_result

  !> The verdict (tck_verdict_*) and the exit code the tancheck command would give.
  subroutine tck_get_verdict(result, verdict, exit_code, err)
    type(c_ptr), intent(in) :: result
    integer, intent(out) :: verdict
    integer, intent(out), optional :: exit_code
    type(tck_error_type), intent(out), optional :: err

    verdict = -1
    if (present(exit_code)) exit_code = 2
    if (.not. live(result, "tck_get_verdict", err)) return
    verdict = int(c_result_verdict(result))
    if (present(exit_code)) exit_code = int(c_result_exit_code(result))
  end subroutine tck_get_verdict

  !> One line for people: verdict, routine, each scheme's worst error, the first fault.
  subroutine tck_get_summary(result, summary, err)
    type(c_ptr), intent(in) :: result
    character(len=:), allocatable, intent(out) :: summary
    type(tck_error_type), intent(out), optional :: err

    summary = ""
    if (.not. live(result, "tck_get_summary", err)) return
    summary = c_string(c_result_summary(result))
  end subroutine tck_get_summary

  !> The whole report as JSON text.
  subroutine tck_get_json(result, json, err)
    type(c_ptr), intent(in) :: result
    character(len=:), allocatable, intent(out) :: json
    type(tck_error_type), intent(out), optional :: err

    character(kind=c_char), allocatable, target :: buf(:)
    integer(c_size_t) :: length, copied
    integer :: i

    json = ""
    length = 0
    copied = 0
    if (.not. live(result, "tck_get_json", err)) return
    ! First the length, then the text into a buffer of that size.
    call handle(int(c_result_json_copy(result, c_null_ptr, 0_c_size_t, length)), &
                "tck_get_json", err)
    if (present(err)) then
      if (err%status /= tck_ok) return
    end if
    allocate (buf(length + 1))
    call handle(int(c_result_json_copy(result, c_loc(buf), length + 1, copied)), &
                "tck_get_json", err)
    if (present(err)) then
      if (err%status /= tck_ok) return
    end if
    deallocate (json)
    allocate (character(len=length) :: json)
    do i = 1, int(length)
      json(i:i) = buf(i)
    end do
  end subroutine tck_get_json

  !> How many guard findings (misbehaviour besides the tangent) the result holds.
  subroutine tck_get_finding_count(result, count, err)
    type(c_ptr), intent(in) :: result
    integer, intent(out) :: count
    type(tck_error_type), intent(out), optional :: err

    count = 0
    if (.not. live(result, "tck_get_finding_count", err)) return
    count = int(c_result_finding_count(result))
  end subroutine tck_get_finding_count

  !> Guard finding number index, counted from 1, as a sentence.
  subroutine tck_get_finding(result, index, text, err)
    type(c_ptr), intent(in) :: result
    integer, intent(in) :: index
    character(len=:), allocatable, intent(out) :: text
    type(tck_error_type), intent(out), optional :: err

    type(c_ptr) :: p

    text = ""
    if (.not. live(result, "tck_get_finding", err)) return
    if (index < 1) then
      call fail(tck_error_invalid, "tck_get_finding", "index counts from 1", err)
      return
    end if
    p = c_result_finding(result, int(index - 1, c_size_t))
    if (.not. c_associated(p)) then
      call fail(tck_error_invalid, "tck_get_finding", "index is past the last finding", err)
      return
    end if
    text = c_string(p)
  end subroutine tck_get_finding

  !> The library's version (tck_version).
  subroutine tck_get_version(major, minor, patch)
    integer, intent(out) :: major, minor, patch

    integer(c_int32_t) :: a, b, c

    call c_version(a, b, c)
    major = int(a)
    minor = int(b)
    patch = int(c)
  end subroutine tck_get_version

  !> The library's version as text, e.g. "0.1.0".
  subroutine tck_get_version_string(text)
    character(len=:), allocatable, intent(out) :: text

    text = c_string(c_version_string())
  end subroutine tck_get_version_string

  ! ---- private helpers -------------------------------------------------------------------

  !> The address of a real array, or null for an empty one (c_loc needs a nonzero size).
  function address(values) result(p)
    real(c_double), intent(in), target, contiguous :: values(:)
    type(c_ptr) :: p

    p = c_null_ptr
    if (size(values) > 0) p = c_loc(values)
  end function address

  !> A NUL-terminated C string as a Fortran string ("" for null).
  function c_string(p) result(text)
    type(c_ptr), intent(in) :: p
    character(len=:), allocatable :: text

    character(kind=c_char), pointer :: chars(:)
    integer(c_size_t) :: n
    integer :: i

    if (.not. c_associated(p)) then
      text = ""
      return
    end if
    n = c_strlen(p)
    call c_f_pointer(p, chars, [n])
    allocate (character(len=n) :: text)
    do i = 1, int(n)
      text(i:i) = chars(i)
    end do
  end function c_string

  !> Whether result is a handle; if not, fail with the wrapper's name.
  logical function live(result, where, err)
    type(c_ptr), intent(in) :: result
    character(len=*), intent(in) :: where
    type(tck_error_type), intent(inout), optional :: err

    live = c_associated(result)
    if (.not. live) call fail(tck_error_null, where, "the result handle is null", err)
  end function live

  !> A status from the C API: on failure, the library's message into err, or stop.
  subroutine handle(status, where, err)
    integer, intent(in) :: status
    character(len=*), intent(in) :: where
    type(tck_error_type), intent(inout), optional :: err

    if (present(err)) then
      err%status = status
      if (.not. allocated(err%message)) err%message = ""
    end if
    if (status == tck_ok) return
    call fail(status, where, c_string(c_last_error()), err)
  end subroutine handle

  !> Report a failure: into err when given, else on the error unit, ending the program.
  subroutine fail(status, where, message, err)
    integer, intent(in) :: status
    character(len=*), intent(in) :: where, message
    type(tck_error_type), intent(inout), optional :: err

    if (present(err)) then
      err%status = status
      err%message = message
      return
    end if
    write (error_unit, '(a, i0, a)') "tancheck_api: " // where // " failed (status ", status, &
      "): " // message
    error stop 2
  end subroutine fail

end module tancheck_api
