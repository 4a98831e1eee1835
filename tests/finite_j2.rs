//! The finite-strain J2 routine (logarithmic elastic strain, exponential-map return) compiled
//! from C and Fortran, called through the guarded shim: both agree with the Rust model `j2-log`
//! (itself tied to num-dual, the small-strain J2 model and the exact radial return in
//! crates/tancheck-models/src/finite/j2_log_tests.rs) in stress, state, energy and tangent in
//! every measure, and pass the check with their complex-step twins along a
//! plastic path with a rotation superposed; the numerical tangent's calls into them and into
//! the Rust model allocate nothing.

use std::path::Path;

use tancheck::abi::Library;
use tancheck::core::finite::check::run;
use tancheck::core::finite::numeric::{Start, Workspace};
use tancheck::core::finite::path::Superposed;
use tancheck::core::finite::{
    FiniteInfo, FiniteModelRoutine, FinitePathSpec, FiniteRoutine, FiniteSettings, Frame, StressMeasure,
    TangentMeasure,
};
use tancheck::core::Verdict;
use tancheck::models::finite::J2Log;
use tancheck_testkit::alloc::allocations_in;
use tancheck_testkit::libs::build_examples;

tancheck_testkit::counting_allocator!();

const PROPS: [f64; 4] = [1000.0, 0.3, 5.0, 20.0];

/// The measures the compiled routines implement: all seven.
const MEASURES: [TangentMeasure; 7] = [
    TangentMeasure::TauJaumann,
    TangentMeasure::TauGreenNaghdi,
    TangentMeasure::SigmaJaumann,
    TangentMeasure::TauTruesdell,
    TangentMeasure::SigmaTruesdell,
    TangentMeasure::DpDf,
    TangentMeasure::DsDe,
];

fn c_lib() -> &'static Path {
    build_examples("finite_j2_c", &["c/finite_j2.c"])
}

fn f_lib() -> &'static Path {
    build_examples("finite_j2_f", &["fortran/finite_j2.F90"])
}

fn routine(
    lib: &Path,
    symbol: &str,
    stress: StressMeasure,
    tangent: TangentMeasure,
) -> Box<dyn FiniteRoutine> {
    let lib = Library::open(lib).unwrap();
    let info =
        FiniteInfo { name: symbol.into(), stress, tangent, frame: Frame::None, nstate: 7, nproperties: 4 };
    Box::new(lib.finite_routine(symbol, info).unwrap())
}

fn path() -> FinitePathSpec {
    FinitePathSpec::Biaxial {
        stretch: [1.3, 0.9],
        increments: 4,
        rotation: Some(Superposed { axis: [1.0, -0.5, 0.3], angle: 0.9 }),
    }
}

/// The start of the path's first increment: the model's properties, no stress, no state, 20 °C.
fn first_start(gradients: &[tancheck::core::finite::mat3::Mat3<f64>]) -> Start {
    Start {
        properties: PROPS.to_vec(),
        f0: gradients[0],
        stress0: [0.0; 6],
        state0: vec![0.0; 7],
        temperature: [20.0, 0.0],
        time: [0.0, 1.0],
        increment: 1,
    }
}

/// Walk the path with the Rust model and the compiled routine side by side, comparing every
/// output of every increment; the start state of each increment is the Rust model's.
fn agrees_with_rust(lib: &Path, symbol: &str) {
    let gradients = path().build().unwrap().gradients;
    for sm in StressMeasure::ALL {
        for m in MEASURES {
            let mut compiled = routine(lib, symbol, sm, m);
            let mut rust = FiniteModelRoutine(J2Log::new(sm, m));
            let mut ws = Workspace::new(7, 4);
            let mut start = first_start(&gradients);
            let mut plastic = false;
            for (k, f1) in gradients.iter().enumerate().skip(1) {
                start.increment = k as i32;
                let a = ws.call_full(compiled.as_mut(), &start, f1).unwrap();
                let b = ws.call_full(&mut rust, &start, f1).unwrap();
                plastic |= b.outcome.branch == 1;
                assert_eq!(a.outcome.branch, b.outcome.branch, "{symbol} {m:?} increment {k}");
                let close = |x: &[f64], y: &[f64], what: &str| {
                    let scale = y.iter().fold(1e-300_f64, |s, v| s.max(v.abs()));
                    for (i, (p, q)) in x.iter().zip(y).enumerate() {
                        assert!(
                            (p - q).abs() <= 1e-10 * scale,
                            "{symbol} {sm:?} {m:?} inc {k} {what} {i}: {p} {q}"
                        );
                    }
                };
                close(&a.stress, &b.stress, "stress");
                close(&a.state, &b.state, "state");
                close(&a.energy, &b.energy, "energy");
                let n = m.size();
                close(&a.tangent[..n * n], &b.tangent[..n * n], "tangent");
                start.f0 = *f1;
                start.stress0 = b.stress;
                start.state0 = b.state.clone();
            }
            assert!(plastic);
        }
    }
}

fn passes_the_check(lib: &Path, symbol: &str) {
    let path = path().build().unwrap();
    for m in MEASURES {
        let mut r = routine(lib, symbol, StressMeasure::Cauchy, m);
        assert!(r.has_complex(), "{symbol} exports its twin");
        let rep = run(r.as_mut(), &PROPS, &[0.0; 7], &path, FiniteSettings::default());
        assert_eq!(rep.verdict, Verdict::Pass, "{symbol} {m:?}: {:?}", rep.increments);
        let worst = rep.increments.iter().map(|i| i.error_complex.unwrap()).fold(0.0, f64::max);
        assert!(worst < 1e-8, "{symbol} {m:?}: {worst:e}");
    }
}

#[test]
fn c_j2_log_matches_the_rust_model() {
    agrees_with_rust(c_lib(), "c_j2log");
}

#[test]
fn c_j2_log_passes_with_its_twin() {
    passes_the_check(c_lib(), "c_j2log");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_j2_log_matches_the_rust_model() {
    agrees_with_rust(f_lib(), "f_j2log");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_j2_log_passes_with_its_twin() {
    passes_the_check(f_lib(), "f_j2log");
}

// The perturbed calls of a numerical tangent (central and complex step) allocate nothing, into
// the Rust model and into the compiled routine through the shim, on a plastic increment.
#[test]
fn perturbed_j2_log_calls_allocate_nothing() {
    use tancheck::core::finite::numeric::{self, Ask, Difference};
    let gradients = path().build().unwrap().gradients;
    let start = first_start(&gradients);
    let m = TangentMeasure::SigmaJaumann;
    let mut rust = FiniteModelRoutine(J2Log::new(StressMeasure::Cauchy, m));
    let mut c = routine(c_lib(), "c_j2log", StressMeasure::Cauchy, m);
    let mut ws = Workspace::new(7, 4);
    let mut out = vec![0.0; 36];
    for how in [Difference::Central(1e-6), Difference::ComplexStep(1e-20)] {
        for r in [&mut rust as &mut dyn FiniteRoutine, c.as_mut()] {
            let ask = Ask { measure: m, stress: StressMeasure::Cauchy, how };
            numeric::tangent(r, &mut ws, &start, &gradients[1], ask, &mut out).unwrap(); // warm up
            let n = allocations_in(|| {
                numeric::tangent(r, &mut ws, &start, &gradients[1], ask, &mut out).unwrap()
            });
            assert_eq!(n, 0, "{how:?} {}", r.info().name);
        }
    }
}
