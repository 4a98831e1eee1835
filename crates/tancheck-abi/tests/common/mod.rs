//! Shared by the integration tests: building the example routines once per test binary,
//! buffers for one call, and the elastic reference values.
#![allow(dead_code)] // each test binary uses part of this

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use num_complex::Complex64;
use tancheck_abi::{build_library, BuildOptions, Library, LibraryRoutine};
use tancheck_core::{CallInput, CallOutput, Convention, Outcome, PointKind, RoutineInfo, ShearMeasure};

pub const SIGILL: i32 = 4;
pub const SIGABRT: i32 = 6;
pub const SIGFPE: i32 = 8;
pub const SIGSEGV: i32 = 11;

pub fn shim() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fortran-shim")
}

pub use tancheck_testkit::libs::scratch;

/// fortran-shim/examples/c/misbehave.c built with its twin, once per test binary.
pub fn misbehave_library() -> &'static Path {
    static LIB: OnceLock<PathBuf> = OnceLock::new();
    LIB.get_or_init(|| {
        let dir = scratch("misbehave");
        let out = dir.join("libmisbehave.so");
        let log = build_library(&BuildOptions::new([shim().join("examples/c/misbehave.c")], &out))
            .unwrap_or_else(|e| panic!("building misbehave.c failed: {e}"));
        assert!(out.is_file(), "{log}");
        out
    })
}

/// 3D solid, properties [E, nu], no state.
pub fn elastic_info(name: &str) -> RoutineInfo {
    RoutineInfo {
        name: name.into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: 0,
        nprop: 2,
    }
}

pub fn load(symbol: &str) -> LibraryRoutine {
    let lib = Library::open(misbehave_library()).expect("the test library loads");
    lib.routine(symbol, elastic_info(symbol)).expect("the symbol is there")
}

pub const E: f64 = 210_000.0;
pub const NU: f64 = 0.3;

/// Isotropic elastic stiffness in Voigt form with engineering shear, column-major 6×6.
pub fn elastic_stiffness(e: f64, nu: f64) -> [f64; 36] {
    tancheck_testkit::tangent::isotropic_stiffness(e, nu)
}

/// Owned buffers for one real call of a 6-component, stateless, 2-property routine.
pub struct Real {
    pub props: [f64; 2],
    pub strain: [f64; 6],
    pub dstrain: [f64; 6],
    pub stress0: [f64; 6],
    pub stress: [f64; 6],
    pub tangent: [f64; 36],
    pub dstress_dtemp: [f64; 6],
    pub energy: [f64; 2],
    pub outcome: Outcome,
}

impl Real {
    pub fn new() -> Real {
        Real {
            props: [E, NU],
            strain: [1e-4, 0.0, 0.0, 0.0, 0.0, 0.0],
            dstrain: [1e-3, -2e-4, 5e-4, 3e-4, -1e-4, 2e-4],
            stress0: [10.0, -5.0, 0.0, 1.0, 2.0, 3.0],
            stress: [f64::NAN; 6],
            tangent: [f64::NAN; 36],
            dstress_dtemp: [f64::NAN; 6],
            energy: [f64::NAN; 2],
            outcome: Outcome::default(),
        }
    }

    /// Call with the given increment number; outputs are NaN-filled first.
    pub fn call(&mut self, r: &mut LibraryRoutine, increment: i32) -> Result<(), tancheck_core::Fault> {
        use tancheck_core::Routine;
        self.stress = [f64::NAN; 6];
        self.tangent = [f64::NAN; 36];
        let (input, mut output) = self.views([293.0, 0.0], increment);
        r.call(&input, &mut output)
    }

    /// The buffers as one call's input and output (a tangent wanted, over [0, 1] in time), so
    /// a test that calls in its own way (through `Caller`, with a cut array) shares this wiring.
    pub fn views(&mut self, temp: [f64; 2], increment: i32) -> (CallInput<'_, f64>, CallOutput<'_, f64>) {
        let input = CallInput {
            props: &self.props,
            strain: &self.strain,
            dstrain: &self.dstrain,
            temp,
            stress0: &self.stress0,
            state0: &[],
            time: [0.0, 1.0],
            increment,
            want_tangent: true,
        };
        let output = CallOutput {
            stress: &mut self.stress,
            state: &mut [],
            tangent: &mut self.tangent,
            dstress_dtemp: &mut self.dstress_dtemp,
            energy: &mut self.energy,
            outcome: &mut self.outcome,
        };
        (input, output)
    }

    /// σ = σ0 + C Δε from the reference stiffness.
    pub fn expected_stress(&self) -> [f64; 6] {
        let c = elastic_stiffness(self.props[0], self.props[1]);
        let mut s = self.stress0;
        for (i, si) in s.iter_mut().enumerate() {
            for j in 0..6 {
                *si += c[i + 6 * j] * self.dstrain[j];
            }
        }
        s
    }

    /// The outputs are the elastic response, to rounding.
    pub fn assert_elastic(&self) {
        let want = self.expected_stress();
        for (i, (got, want)) in self.stress.iter().zip(want).enumerate() {
            assert!((got - want).abs() <= 1e-12 * want.abs().max(1.0), "stress[{i}] = {got} but want {want}");
        }
        let c = elastic_stiffness(self.props[0], self.props[1]);
        for (k, (got, want)) in self.tangent.iter().zip(c).enumerate() {
            assert!((got - want).abs() <= 1e-9 * want.abs().max(1.0), "tangent[{k}] = {got} but want {want}");
        }
    }
}

/// A complex call: the real inputs of `base`, with `h` in the imaginary part of dstrain[j].
pub fn complex_call(
    r: &mut LibraryRoutine,
    base: &Real,
    j: usize,
    h: f64,
    increment: i32,
    stress: &mut [Complex64; 6],
) -> Result<(), tancheck_core::Fault> {
    let cx = |v: &[f64]| -> Vec<Complex64> { v.iter().map(|&x| Complex64::new(x, 0.0)).collect() };
    let props = cx(&base.props);
    let strain = cx(&base.strain);
    let mut dstrain = cx(&base.dstrain);
    dstrain[j].im = h;
    let stress0 = cx(&base.stress0);
    let mut tangent = [Complex64::new(f64::NAN, 0.0); 36];
    let mut dsdt = [Complex64::new(f64::NAN, 0.0); 6];
    let mut energy = [Complex64::new(f64::NAN, 0.0); 2];
    let mut outcome = Outcome::default();
    let input = CallInput {
        props: &props,
        strain: &strain,
        dstrain: &dstrain,
        temp: [Complex64::new(293.0, 0.0), Complex64::new(0.0, 0.0)],
        stress0: &stress0,
        state0: &[],
        time: [0.0, 1.0],
        increment,
        want_tangent: true,
    };
    let mut output = CallOutput {
        stress,
        state: &mut [],
        tangent: &mut tangent,
        dstress_dtemp: &mut dsdt,
        energy: &mut energy,
        outcome: &mut outcome,
    };
    use tancheck_core::Routine;
    r.complex().expect("the twin was built").call_complex(&input, &mut output)
}

/// The twin, with a complex step h in each component of dstrain in turn, gives the real
/// routine's stress in its real part and the real routine's tangent column in Im(σ)/h
/// (Squire & Trapp 1998: exact to rounding for an analytic update).
pub fn assert_twin_gives_tangent(r: &mut LibraryRoutine, b: &Real) {
    let h = 1e-30;
    for j in 0..6 {
        let mut s = [Complex64::new(f64::NAN, f64::NAN); 6];
        complex_call(r, b, j, h, 1, &mut s).unwrap();
        for (i, si) in s.iter().enumerate() {
            assert!((si.re - b.stress[i]).abs() <= 1e-12 * b.stress[i].abs().max(1.0), "stress[{i}]");
            let d = si.im / h;
            let t = b.tangent[i + 6 * j];
            assert!((d - t).abs() <= 1e-9 * t.abs().max(1.0), "column {j}, row {i}: {d} vs {t}");
        }
    }
}
