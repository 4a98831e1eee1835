! tancheck_finite.f90 -- the finite-strain routine ABI of tancheck for Fortran.
!
! Mirrors fortran-shim/include/tancheck_finite.h: the call struct as an interoperable derived
! type, the measure and frame codes, and the interface of a finite-strain routine (real, and
! complex for the twin). Uses tc_report, tc_temperature and tc_energy of module
! tancheck_routine. Arrays: properties(nproperties), f0(3,3), f1(3,3), rotation(3,3) (Fortran's
! column-major order is the ABI's), stress0(6), state0(nstate), stress(6), state(nstate),
! tangent(ntangent, ntangent); symmetric order 11, 22, 33, 23, 13, 12; the column of a shear
! holds tensor components.
module tancheck_finite
  use, intrinsic :: iso_c_binding, only: c_int32_t, c_double, c_double_complex
  use tancheck_routine, only: tc_report, tc_temperature, tc_energy, tc_temperature_cx, tc_energy_cx
  implicit none
  private

  public :: tc_finite_call, tc_finite_abi_version
  public :: tc_stress_cauchy, tc_stress_kirchhoff
  public :: tc_tangent_tau_jaumann, tc_tangent_sigma_jaumann, tc_tangent_tau_truesdell
  public :: tc_tangent_sigma_truesdell, tc_tangent_tau_green_naghdi, tc_tangent_dp_df, tc_tangent_ds_de
  public :: tc_frame_none, tc_frame_jaumann, tc_frame_green_naghdi
  public :: tc_finite_real, tc_finite_complex

  !> TC_FINITE_ABI_VERSION.
  integer(c_int32_t), parameter :: tc_finite_abi_version = 1_c_int32_t

  integer(c_int32_t), parameter :: tc_stress_cauchy = 0_c_int32_t
  integer(c_int32_t), parameter :: tc_stress_kirchhoff = 1_c_int32_t

  integer(c_int32_t), parameter :: tc_tangent_tau_jaumann = 0_c_int32_t
  integer(c_int32_t), parameter :: tc_tangent_sigma_jaumann = 1_c_int32_t
  integer(c_int32_t), parameter :: tc_tangent_tau_truesdell = 2_c_int32_t
  integer(c_int32_t), parameter :: tc_tangent_sigma_truesdell = 3_c_int32_t
  integer(c_int32_t), parameter :: tc_tangent_tau_green_naghdi = 4_c_int32_t
  integer(c_int32_t), parameter :: tc_tangent_dp_df = 5_c_int32_t
  integer(c_int32_t), parameter :: tc_tangent_ds_de = 6_c_int32_t

  integer(c_int32_t), parameter :: tc_frame_none = 0_c_int32_t
  integer(c_int32_t), parameter :: tc_frame_jaumann = 1_c_int32_t
  integer(c_int32_t), parameter :: tc_frame_green_naghdi = 2_c_int32_t

  !> Read-only description of one finite-strain call (struct tc_finite_call).
  type, bind(C) :: tc_finite_call
    integer(c_int32_t) :: abi_version      ! tc_finite_abi_version of the caller
    integer(c_int32_t) :: nstate           ! state variables
    integer(c_int32_t) :: nproperties      ! material properties
    integer(c_int32_t) :: increment        ! increment number along the path, from 1
    integer(c_int32_t) :: flags            ! tc_want_* bits
    integer(c_int32_t) :: stress_measure   ! tc_stress_*
    integer(c_int32_t) :: tangent_measure  ! tc_tangent_*
    integer(c_int32_t) :: frame            ! tc_frame_*
    integer(c_int32_t) :: ntangent         ! 6, or 9 for tc_tangent_dp_df
    integer(c_int32_t) :: reserved         ! 0
    real(c_double) :: time                 ! time at the start of the increment
    real(c_double) :: dtime                ! time increment
  end type tc_finite_call

  abstract interface
    !> A finite-strain routine (the real one).
    subroutine tc_finite_real(callinfo, properties, f0, f1, rotation, temperature, stress0, state0, &
                              stress, state, tangent, energy, report) bind(C)
      import :: tc_finite_call, tc_report, tc_temperature, tc_energy, c_double
      type(tc_finite_call), intent(in) :: callinfo
      real(c_double), intent(in) :: properties(callinfo%nproperties)
      real(c_double), intent(in) :: f0(3, 3), f1(3, 3), rotation(3, 3)
      type(tc_temperature), intent(in) :: temperature
      real(c_double), intent(in) :: stress0(6), state0(callinfo%nstate)
      real(c_double), intent(out) :: stress(6), state(callinfo%nstate)
      real(c_double), intent(out) :: tangent(callinfo%ntangent, callinfo%ntangent)
      type(tc_energy), intent(inout) :: energy
      type(tc_report), intent(inout) :: report
    end subroutine tc_finite_real

    !> A finite-strain routine's complex-step twin.
    subroutine tc_finite_complex(callinfo, properties, f0, f1, rotation, temperature, stress0, state0, &
                                 stress, state, tangent, energy, report) bind(C)
      import :: tc_finite_call, tc_report, tc_temperature_cx, tc_energy_cx, c_double_complex
      type(tc_finite_call), intent(in) :: callinfo
      complex(c_double_complex), intent(in) :: properties(callinfo%nproperties)
      complex(c_double_complex), intent(in) :: f0(3, 3), f1(3, 3), rotation(3, 3)
      type(tc_temperature_cx), intent(in) :: temperature
      complex(c_double_complex), intent(in) :: stress0(6), state0(callinfo%nstate)
      complex(c_double_complex), intent(out) :: stress(6), state(callinfo%nstate)
      complex(c_double_complex), intent(out) :: tangent(callinfo%ntangent, callinfo%ntangent)
      type(tc_energy_cx), intent(inout) :: energy
      type(tc_report), intent(inout) :: report
    end subroutine tc_finite_complex
  end interface
end module tancheck_finite
