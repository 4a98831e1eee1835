//! The complex-step helpers the shim ships for twins (`tancheck_cstep.h`, module
//! `tancheck_cstep`), at the points where their textbook formula breaks: x⁰ at x = 0, whose
//! twin gave 1 − NaN·i (the derivative p·x^(p−1)·b is 0 · ∞ there) while the real build gives 1.
//! A user's viscoplastic twin raising an overstress to m − 1 with m = 1 went NaN at zero
//! overstress. Each routine below computes σᵢ = E xᵢ · xᵢ⁰ (= E xᵢ) with xᵢ = εᵢ + Δεᵢ, which is
//! 0 in the components a uniaxial strain path leaves alone: the check with the complex step
//! passes only when x⁰'s twin has a zero, finite derivative there.
//!
//! And 0^p for 0 < p < 1 at a base with no derivative part (a start state, which the twin gets
//! real): its twin gave 0 − NaN·i (p·0^(p−1)·0 = ∞ · 0), and a complex property times it a NaN
//! real part, so a Johnson–Cook twin evaluating A + B·p^n at p = 0 took the wrong branch (a
//! user-style sweep). The routines `*_pow_zero_base` add B·s^0.36 with s = state0[0] = 0 to
//! σᵢ = E xᵢ: the stress is finite and the check passes only when that power is 0 + 0i.

use std::path::{Path as FsPath, PathBuf};

use tancheck::assert::{check_tangent, library_routine, Options};
use tancheck::core::{Path, PointKind, Shape};

const C_SOURCE: &str = r#"#include "tancheck_routine.h"
#include "tancheck_cstep.h"

TC_ROUTINE(c_pow_zero)
{
    (void)temperature;
    (void)dstress_dtemp;
    (void)stress0;
    (void)energy;
    (void)report;
    const int n = call->ncomp;
    for (int i = 0; i < n; ++i) {
        const tc_real x = strain[i] + dstrain[i];
        stress[i] = properties[0] * x * tc_pow(x, 0.0);
        for (int j = 0; j < n; ++j) tangent[i + n * j] = i == j ? properties[0] : 0.0;
    }
    for (int k = 0; k < call->nstate; ++k) state[k] = state0[k];
}

TC_ROUTINE(c_pow_zero_base)
{
    (void)temperature;
    (void)dstress_dtemp;
    (void)stress0;
    (void)energy;
    (void)report;
    const int n = call->ncomp;
    const tc_real hardening = properties[1] * tc_pow(state0[0], 0.36);
    for (int i = 0; i < n; ++i) {
        stress[i] = properties[0] * (strain[i] + dstrain[i]) + hardening;
        for (int j = 0; j < n; ++j) tangent[i + n * j] = i == j ? properties[0] : 0.0;
    }
    state[0] = state0[0];
}
"#;

const FORTRAN_SOURCE: &str = r#"#include "tancheck_twin.inc"

subroutine f_pow_zero(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                      tangent, dstress_dtemp, energy, report) bind(C, name="f_pow_zero"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy
  use tancheck_cstep, only: cs_pow
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
  namelist /unused_arguments/ temperature, dstress_dtemp, stress0, energy, report
  TC_REAL :: x
  integer :: i

  tangent = 0.0_c_double
  do i = 1, callinfo%ncomp
    x = strain(i) + dstrain(i)
    stress(i) = properties(1) * x * cs_pow(x, 0.0_c_double)
    tangent(i, i) = properties(1)
  end do
  state = state0
end subroutine f_pow_zero

subroutine f_pow_zero_base(callinfo, properties, strain, dstrain, temperature, stress0, state0, stress, state, &
                           tangent, dstress_dtemp, energy, report) bind(C, name="f_pow_zero_base"//TC_SUFFIX)
  use, intrinsic :: iso_c_binding, only: c_double, c_double_complex
  use tancheck_routine, only: tc_call, tc_report, tc_temperature, tc_energy
  use tancheck_cstep, only: cs_pow
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
  namelist /unused_arguments/ temperature, dstress_dtemp, stress0, energy, report
  TC_REAL :: hardening
  integer :: i

  tangent = 0.0_c_double
  hardening = properties(2) * cs_pow(state0(1), 0.36_c_double)
  do i = 1, callinfo%ncomp
    stress(i) = properties(1) * (strain(i) + dstrain(i)) + hardening
    tangent(i, i) = properties(1)
  end do
  state = state0
end subroutine f_pow_zero_base
"#;

fn built(name: &str, file: &str, source: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("tancheck-cstep-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    let src = d.join(file);
    std::fs::write(&src, source).unwrap();
    let lib = d.join(format!("lib{name}.so"));
    let opts = tancheck::abi::BuildOptions::new([src], &lib);
    tancheck::abi::build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    lib
}

fn check(lib: &FsPath, symbol: &str) {
    check_with(lib, symbol, 0, &[1000.0]);
}

fn check_with(lib: &FsPath, symbol: &str, nstate: usize, properties: &[f64]) {
    let mut r = library_routine(lib, symbol, PointKind::Solid3d, nstate, properties.len()).unwrap();
    let path = Path::ramp(Shape::UniaxialStrain, 1e-3, 3, 0);
    let report =
        check_tangent(&mut r, properties, &path, &Options::default()).unwrap_or_else(|e| panic!("{e}"));
    assert!(report.routine.complex_twin && report.calls.complex > 0, "the twin ran");
}

#[test]
fn the_c_helper_raises_zero_to_the_power_zero_with_a_zero_derivative() {
    check(&built("cpow", "pow_zero.c", C_SOURCE), "c_pow_zero");
}

#[test]
fn the_c_helper_raises_a_zero_without_derivative_part_to_a_fractional_power() {
    check_with(&built("cpowbase", "pow_zero.c", C_SOURCE), "c_pow_zero_base", 1, &[1000.0, 50.0]);
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn the_fortran_helper_raises_zero_to_the_power_zero_with_a_zero_derivative() {
    check(&built("fpow", "pow_zero.F90", FORTRAN_SOURCE), "f_pow_zero");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn the_fortran_helper_raises_a_zero_without_derivative_part_to_a_fractional_power() {
    check_with(&built("fpowbase", "pow_zero.F90", FORTRAN_SOURCE), "f_pow_zero_base", 1, &[1000.0, 50.0]);
}
