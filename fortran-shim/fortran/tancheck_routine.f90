! tancheck_routine.f90 -- the routine ABI of tancheck for Fortran.
!
! Mirrors fortran-shim/include/tancheck_routine.h: the structs as interoperable derived types,
! the constants, and the interface of a material routine (once with real and once with
! complex numbers, for the complex-step twin). A Fortran routine is a bind(C) external
! procedure with this interface; see fortran-shim/examples/fortran for two of them.
!
! Arguments, with n = callinfo%ncomp:
!   properties(nproperties), strain(n), dstrain(n), temperature (tc_temperature: start and
!   increment), stress0(n), state0(nstate), stress(n), state(nstate), tangent(n, n) with
!   tangent(i, j) = d stress(i) / d dstrain(j), dstress_dtemp(n), energy (tc_energy: stored
!   and dissipated energy densities at the end of the increment).
! tc_temperature and tc_energy hold real(c_double) values; tc_temperature_cx and tc_energy_cx
! hold complex(c_double_complex) ones for the twin. tancheck_twin.inc makes the names
! tc_temperature and tc_energy stand for the complex types in the twin build, as TC_REAL does
! for the numbers, so one source declares type(tc_temperature) and type(tc_energy) for both.
! Inputs are read-only. Outputs arrive filled with NaN; a routine writes every entry of stress,
! state and tangent, and writes dstress_dtemp and energy only when it sets the matching bit in
! report%provides.
module tancheck_routine
  use, intrinsic :: iso_c_binding, only: c_int32_t, c_double, c_double_complex, c_char, &
                                         c_null_char
  implicit none
  private

  public :: tc_call, tc_report, tc_temperature, tc_energy, tc_temperature_cx, tc_energy_cx
  public :: tc_routine_abi_version, tc_message_len, tc_twin_suffix
  public :: tc_want_tangent
  public :: tc_provides_dstress_dtemp, tc_provides_energy
  public :: tc_status_ok, tc_status_smaller_increment, tc_status_failed
  public :: tc_routine_real, tc_routine_complex
  public :: tc_set_message

  !> Version of the struct layout (TC_ROUTINE_ABI_VERSION).
  integer(c_int32_t), parameter :: tc_routine_abi_version = 2_c_int32_t
  !> Length of the message buffer, including the terminating NUL (TC_MESSAGE_LEN).
  integer, parameter :: tc_message_len = 96
  !> Suffix of the complex-step twin's symbol (TC_TWIN_SUFFIX).
  character(len=*), parameter :: tc_twin_suffix = "_cx"

  !> Bits of tc_call%flags (TC_WANT_*): the tangent is used; without it a routine may skip it.
  integer(c_int32_t), parameter :: tc_want_tangent = 1_c_int32_t

  !> Bits of tc_report%provides (TC_PROVIDES_*): optional outputs the routine has written.
  integer(c_int32_t), parameter :: tc_provides_dstress_dtemp = 1_c_int32_t
  integer(c_int32_t), parameter :: tc_provides_energy = 2_c_int32_t

  !> Status codes in tc_report%status (TC_STATUS_*).
  integer(c_int32_t), parameter :: tc_status_ok = 0_c_int32_t
  !> Increment too large: see tc_report%largest_fraction.
  integer(c_int32_t), parameter :: tc_status_smaller_increment = 1_c_int32_t
  !> The routine could not compute this increment.
  integer(c_int32_t), parameter :: tc_status_failed = 2_c_int32_t

  !> Read-only description of one call (struct tc_call).
  type, bind(C) :: tc_call
    integer(c_int32_t) :: abi_version  ! tc_routine_abi_version of the caller
    integer(c_int32_t) :: ncomp        ! stress/strain components: 6, 4, 3, 2 or 1
    integer(c_int32_t) :: nstate       ! state variables
    integer(c_int32_t) :: nproperties  ! material properties
    integer(c_int32_t) :: increment    ! increment number along the path, from 1
    integer(c_int32_t) :: flags        ! tc_want_* bits
    real(c_double) :: time             ! time at the start of the increment
    real(c_double) :: dtime            ! time increment
  end type tc_call

  !> What the routine reports besides its arrays (struct tc_report). Written by the routine.
  type, bind(C) :: tc_report
    integer(c_int32_t) :: status       ! tc_status_*; tancheck sets 0 before the call
    integer(c_int32_t) :: branch       ! the routine's own branch id, or -1 (set before call)
    integer(c_int32_t) :: provides     ! tc_provides_* bits; tancheck sets 0 before the call
    integer(c_int32_t) :: reserved     ! keep 0
    real(c_double) :: largest_fraction ! with tc_status_smaller_increment: the largest fraction
                                       ! of this increment the routine expects to manage, in (0,1)
    character(kind=c_char) :: message(tc_message_len)  ! NUL-terminated text, or empty
  end type tc_report

  !> Temperature at the start of the increment and its increment (struct tc_temperature).
  type, bind(C) :: tc_temperature
    real(c_double) :: start
    real(c_double) :: increment
  end type tc_temperature

  !> Energy densities at the end of the increment, per unit reference volume (struct tc_energy).
  type, bind(C) :: tc_energy
    real(c_double) :: stored
    real(c_double) :: dissipated
  end type tc_energy

  !> tc_temperature of the complex-step twin.
  type, bind(C) :: tc_temperature_cx
    complex(c_double_complex) :: start
    complex(c_double_complex) :: increment
  end type tc_temperature_cx

  !> tc_energy of the complex-step twin.
  type, bind(C) :: tc_energy_cx
    complex(c_double_complex) :: stored
    complex(c_double_complex) :: dissipated
  end type tc_energy_cx

  abstract interface
    !> A material routine (the real one).
    subroutine tc_routine_real(callinfo, properties, strain, dstrain, temperature, stress0, &
                               state0, stress, state, tangent, dstress_dtemp, energy, report) &
                               bind(C)
      import :: tc_call, tc_report, tc_temperature, tc_energy, c_double
      type(tc_call), intent(in) :: callinfo
      real(c_double), intent(in) :: properties(callinfo%nproperties)
      real(c_double), intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
      type(tc_temperature), intent(in) :: temperature
      real(c_double), intent(in) :: stress0(callinfo%ncomp), state0(callinfo%nstate)
      real(c_double), intent(out) :: stress(callinfo%ncomp), state(callinfo%nstate)
      real(c_double), intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
      real(c_double), intent(inout) :: dstress_dtemp(callinfo%ncomp)
      type(tc_energy), intent(inout) :: energy
      type(tc_report), intent(inout) :: report
    end subroutine tc_routine_real

    !> A material routine's complex-step twin (the same source compiled with -DTC_COMPLEX).
    subroutine tc_routine_complex(callinfo, properties, strain, dstrain, temperature, &
                                  stress0, state0, stress, state, tangent, dstress_dtemp, &
                                  energy, report) bind(C)
      import :: tc_call, tc_report, tc_temperature_cx, tc_energy_cx, c_double_complex
      type(tc_call), intent(in) :: callinfo
      complex(c_double_complex), intent(in) :: properties(callinfo%nproperties)
      complex(c_double_complex), intent(in) :: strain(callinfo%ncomp), dstrain(callinfo%ncomp)
      type(tc_temperature_cx), intent(in) :: temperature
      complex(c_double_complex), intent(in) :: stress0(callinfo%ncomp)
      complex(c_double_complex), intent(in) :: state0(callinfo%nstate)
      complex(c_double_complex), intent(out) :: stress(callinfo%ncomp)
      complex(c_double_complex), intent(out) :: state(callinfo%nstate)
      complex(c_double_complex), intent(out) :: tangent(callinfo%ncomp, callinfo%ncomp)
      complex(c_double_complex), intent(inout) :: dstress_dtemp(callinfo%ncomp)
      type(tc_energy_cx), intent(inout) :: energy
      type(tc_report), intent(inout) :: report
    end subroutine tc_routine_complex
  end interface

contains

  !> Copy text (without trailing blanks) into report%message as a NUL-terminated C string,
  !> cut to tc_message_len - 1 characters; the rest of the buffer is filled with NULs.
  pure subroutine tc_set_message(report, text)
    type(tc_report), intent(inout) :: report
    character(len=*), intent(in) :: text
    integer :: i, n

    n = min(len_trim(text), tc_message_len - 1)
    do i = 1, n
      report%message(i) = text(i:i)
    end do
    do i = n + 1, tc_message_len
      report%message(i) = c_null_char
    end do
  end subroutine tc_set_message

end module tancheck_routine
