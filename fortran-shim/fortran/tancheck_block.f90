! tancheck_block.f90 -- the block-routine ABI of tancheck for Fortran (explicit dynamics).
!
! Mirrors fortran-shim/include/tancheck_block.h: the structs as interoperable derived types and
! the constants. A Fortran block routine is a bind(C) external procedure; with the number type
! TC_REAL of tancheck_twin.inc and tc_specific_energy (see tancheck_block_twin.inc) it reads
!
!   subroutine my_block(block, properties, strain, strain_increment, stress_start, &
!                       state_start, energy_start, conditions, stress, state, energy, &
!                       deleted, report) bind(C, name="my_block"//TC_SUFFIX)
!     type(tc_block), intent(in) :: block
!     TC_REAL, intent(in) :: properties(block%nproperties)
!     TC_REAL, intent(in) :: strain(block%ncomp, block%npoints)        ! at the start
!     TC_REAL, intent(in) :: strain_increment(block%ncomp, block%npoints)
!     TC_REAL, intent(in) :: stress_start(block%ncomp, block%npoints)
!     TC_REAL, intent(in) :: state_start(block%nstate, block%npoints)
!     type(tc_specific_energy), intent(in) :: energy_start(block%npoints)
!     type(tc_point_conditions), intent(in) :: conditions(block%npoints)
!     TC_REAL, intent(out) :: stress(block%ncomp, block%npoints)
!     TC_REAL, intent(out) :: state(block%nstate, block%npoints)
!     type(tc_specific_energy), intent(out) :: energy(block%npoints)
!     integer(c_int32_t), intent(out) :: deleted(block%npoints)      ! 1 deleted, 0 active
!     type(tc_block_report), intent(inout) :: report
!
! Components 11, 22, 33, 23, 13, 12 (ncomp 6) or 11, 22, 33, 12 (ncomp 4), engineering shear.
! Energies per unit mass: internal = work done so far, dissipated = its dissipated part. The
! first call (time 0, time increment 0, tc_block_elastic_response set in block%flags) returns
! stress = stress_start + C(T) : strain_increment and updates nothing (see the C header).
module tancheck_block
  use, intrinsic :: iso_c_binding, only: c_int32_t, c_double, c_double_complex, c_char, &
                                         c_null_char
  implicit none
  private

  public :: tc_block, tc_point_conditions, tc_block_report
  public :: tc_specific_energy, tc_specific_energy_cx
  public :: tc_block_abi_version, tc_block_message_len, tc_block_elastic_response
  public :: tc_block_status_ok, tc_block_status_smaller_increment, tc_block_status_failed
  public :: tc_block_set_message

  !> Version of the block layout (TC_BLOCK_ABI_VERSION).
  integer(c_int32_t), parameter :: tc_block_abi_version = 1_c_int32_t
  !> Length of the message buffer, including the terminating NUL (TC_BLOCK_MESSAGE_LEN).
  integer, parameter :: tc_block_message_len = 96
  !> Bit of tc_block%flags: the first call, the elastic response only.
  integer(c_int32_t), parameter :: tc_block_elastic_response = 1_c_int32_t

  !> Status codes in tc_block_report%status.
  integer(c_int32_t), parameter :: tc_block_status_ok = 0_c_int32_t
  !> The increment is too large: see tc_block_report%largest_fraction.
  integer(c_int32_t), parameter :: tc_block_status_smaller_increment = 1_c_int32_t
  integer(c_int32_t), parameter :: tc_block_status_failed = 2_c_int32_t

  !> Read-only description of one call (struct tc_block).
  type, bind(C) :: tc_block
    integer(c_int32_t) :: abi_version   ! tc_block_abi_version of the caller
    integer(c_int32_t) :: npoints       ! points in this block
    integer(c_int32_t) :: ncomp         ! 6 or 4
    integer(c_int32_t) :: nstate        ! state variables per point
    integer(c_int32_t) :: nproperties   ! material properties
    integer(c_int32_t) :: increment     ! from 1; 0 for the elastic response
    integer(c_int32_t) :: flags         ! tc_block_* bits
    integer(c_int32_t) :: reserved
    real(c_double) :: time              ! at the start of the increment
    real(c_double) :: time_increment
  end type tc_block

  !> The conditions of one point (struct tc_point_conditions); real in the twin too.
  type, bind(C) :: tc_point_conditions
    real(c_double) :: temperature            ! at the start of the increment
    real(c_double) :: temperature_increment
    real(c_double) :: density
    real(c_double) :: characteristic_length
  end type tc_point_conditions

  !> Specific energies of one point (struct tc_specific_energy), real build.
  type, bind(C) :: tc_specific_energy
    real(c_double) :: internal
    real(c_double) :: dissipated
  end type tc_specific_energy

  !> The same in the complex-step twin.
  type, bind(C) :: tc_specific_energy_cx
    complex(c_double_complex) :: internal
    complex(c_double_complex) :: dissipated
  end type tc_specific_energy_cx

  !> What the routine reports for the block (struct tc_block_report).
  type, bind(C) :: tc_block_report
    integer(c_int32_t) :: status        ! tc_block_status_*; 0 before the call
    integer(c_int32_t) :: point         ! 0-based point the status is about, or -1
    integer(c_int32_t) :: reserved(2)
    real(c_double) :: largest_fraction  ! with smaller_increment: largest admissible fraction
    character(kind=c_char) :: message(tc_block_message_len)
  end type tc_block_report

contains

  !> Copy text into report%message as a NUL-terminated C string, cut to fit.
  pure subroutine tc_block_set_message(report, text)
    type(tc_block_report), intent(inout) :: report
    character(len=*), intent(in) :: text
    integer :: i, n

    n = min(len_trim(text), tc_block_message_len - 1)
    do i = 1, n
      report%message(i) = text(i:i)
    end do
    report%message(n + 1:) = c_null_char
  end subroutine tc_block_set_message

end module tancheck_block
