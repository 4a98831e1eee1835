//! The memory guards find what a routine did to memory it should not touch, and what it left
//! undone. The routines are fortran-shim/examples/c/misbehave.c: elastic in increment 1,
//! misbehaving from increment 2 on.

mod common;

use common::*;
use num_complex::Complex64;
use tancheck_abi::{FindingKind, GuardFinding, GuardLevel, GuardedArray, Library, LibraryRoutine};
use tancheck_core::{
    CallInput, CallOutput, Convention, Outcome, PointKind, Routine, RoutineInfo, ShearMeasure,
};

const NSTATE: usize = 2;

/// A misbehave routine declared with two state variables (carried through unchanged).
fn load_with_state(symbol: &str, level: GuardLevel) -> LibraryRoutine {
    let lib = Library::open(misbehave_library()).expect("the test library loads");
    let info = RoutineInfo {
        name: symbol.into(),
        convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
        nstate: NSTATE,
        nprop: 2,
    };
    let mut r = lib.routine(symbol, info).expect("the symbol is there");
    r.set_guard_level(level);
    r
}

/// Buffers for one call with state; outputs are filled with a quiet NaN before each call,
/// as `Caller` does.
struct Point<S> {
    props: [S; 2],
    strain: [S; 6],
    dstrain: [S; 6],
    stress0: [S; 6],
    state0: [S; NSTATE],
    stress: [S; 6],
    state: [S; NSTATE],
    tangent: [S; 36],
    dstress_dtemp: [S; 6],
    energy: [S; 2],
    outcome: Outcome,
}

impl<S: Copy> Point<S> {
    /// The call's inputs and outputs, pointing into the buffers (temperature and its increment
    /// `temp`, unit time increment).
    fn io(
        &mut self,
        temp: [S; 2],
        increment: i32,
        want_tangent: bool,
    ) -> (CallInput<'_, S>, CallOutput<'_, S>) {
        let Point {
            props,
            strain,
            dstrain,
            stress0,
            state0,
            stress,
            state,
            tangent,
            dstress_dtemp,
            energy,
            outcome,
        } = self;
        let input = CallInput {
            props,
            strain,
            dstrain,
            temp,
            stress0,
            state0,
            time: [0.0, 1.0],
            increment,
            want_tangent,
        };
        let output = CallOutput { stress, state, tangent, dstress_dtemp, energy, outcome };
        (input, output)
    }
}

impl Point<f64> {
    fn new() -> Self {
        let b = Real::new();
        Point {
            props: b.props,
            strain: b.strain,
            dstrain: b.dstrain,
            stress0: b.stress0,
            state0: [0.5, -1.5],
            stress: [f64::NAN; 6],
            tangent: [f64::NAN; 36],
            state: [f64::NAN; NSTATE],
            dstress_dtemp: [f64::NAN; 6],
            energy: [f64::NAN; 2],
            outcome: Outcome::default(),
        }
    }

    fn call(&mut self, r: &mut LibraryRoutine, increment: i32) -> Result<(), tancheck_core::Fault> {
        self.call_wanting(r, increment, true)
    }

    fn call_wanting(
        &mut self,
        r: &mut LibraryRoutine,
        increment: i32,
        want_tangent: bool,
    ) -> Result<(), tancheck_core::Fault> {
        self.stress = [f64::NAN; 6];
        self.tangent = [f64::NAN; 36];
        self.state = [f64::NAN; NSTATE];
        let (input, mut output) = self.io([293.0, 0.0], increment, want_tangent);
        r.call(&input, &mut output)
    }

    /// The elastic answer: σ = σ0 + C Δε, the reference stiffness, the state carried over.
    fn assert_elastic(&self) {
        let c = elastic_stiffness(self.props[0], self.props[1]);
        for i in 0..6 {
            let want: f64 = self.stress0[i] + (0..6).map(|j| c[i + 6 * j] * self.dstrain[j]).sum::<f64>();
            assert!((self.stress[i] - want).abs() <= 1e-12 * want.abs().max(1.0), "stress[{i}]");
        }
        for (k, (got, want)) in self.tangent.iter().zip(c).enumerate() {
            assert!((got - want).abs() <= 1e-9 * want.abs().max(1.0), "tangent[{k}] = {got}");
        }
        assert_eq!(self.state, self.state0);
    }
}

/// The only finding, with its kind and array.
fn only(r: &LibraryRoutine, kind: FindingKind, array: GuardedArray) -> GuardFinding {
    let f = r.findings();
    assert_eq!(f.len(), 1, "expected one finding, got {f:#?}");
    assert_eq!((f[0].kind, f[0].array), (kind, array), "{}", f[0]);
    f[0].clone()
}

#[test]
fn well_behaved_calls_give_no_findings_and_the_same_results_at_every_level() {
    for level in GuardLevel::ALL {
        let mut r = load_with_state("bad_state_overrun", level);
        let mut p = Point::new();
        for _ in 0..3 {
            p.call(&mut r, 1).unwrap();
            p.assert_elastic();
        }
        assert!(r.findings().is_empty(), "{level}: {:#?}", r.findings());
        assert_eq!(r.guard_calls(), if level == GuardLevel::Full { 3 } else { 0 }, "{level}");
    }
}

#[test]
fn a_write_past_the_end_of_the_state_is_named_with_its_index() {
    let mut r = load_with_state("bad_state_overrun", GuardLevel::Light);
    let mut p = Point::new();
    p.call(&mut r, 2)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    p.assert_elastic();
    let f = only(&r, FindingKind::Overrun, GuardedArray::State);
    assert_eq!((f.first, f.len, f.increment, f.calls), (NSTATE, NSTATE, 2, 1));
    let text = f.to_string();
    assert!(
        text.starts_with(
            "the routine wrote past the end of state: state[2] (state(3) counted from 1), but state has 2 state variables"
        ),
        "{text}"
    );
    assert!(text.contains("(first in a call told increment 2 in tc_call; 1 call)"), "{text}");

    // The same again is counted, not repeated; take_findings empties the list.
    p.call(&mut r, 3).unwrap();
    assert_eq!(r.findings()[0].calls, 2);
    assert_eq!(r.take_findings().len(), 1);
    assert!(r.findings().is_empty());
    p.call(&mut r, 1).unwrap();
    assert!(r.findings().is_empty(), "increment 1 is well behaved");
}

#[test]
fn a_tangent_entry_left_unwritten_is_named_by_index_row_and_column() {
    let mut r = load_with_state("bad_tangent_hole", GuardLevel::Light);
    let mut p = Point::new();
    p.call(&mut r, 2)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = only(&r, FindingKind::Unwritten, GuardedArray::Tangent);
    assert_eq!((f.first, f.entries, f.len), (1, 1, 36));
    let text = f.to_string();
    assert!(
        text.starts_with("the routine left tangent[1] unwritten (row 2, column 1, counted from 1)"),
        "{text}"
    );
    assert!(text.contains("1 of 36 tangent entries never written"), "{text}");
    // The caller sees a quiet NaN there, not the guard's signalling one.
    assert!(p.tangent[1].is_nan());
    assert_eq!(p.tangent[1].to_bits(), f64::NAN.to_bits());
    assert!(p.tangent[0].is_finite() && p.tangent[2].is_finite());
}

/// A call that does not want the tangent may leave it alone.
#[test]
fn the_tangent_counts_only_when_asked_for() {
    let mut r = load_with_state("bad_tangent_hole", GuardLevel::Light);
    let mut p = Point::new();
    p.call_wanting(&mut r, 2, false).unwrap();
    assert!(r.findings().is_empty(), "{:#?}", r.findings());
}

#[test]
fn a_write_to_the_strain_is_reported_and_the_callers_strain_is_untouched() {
    let mut r = load_with_state("bad_writes_strain", GuardLevel::Light);
    let mut p = Point::new();
    let strain = p.strain;
    p.call(&mut r, 2)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = only(&r, FindingKind::InputWritten, GuardedArray::Strain);
    assert_eq!((f.first, f.entries, f.len), (0, 1, 6));
    let text = f.to_string();
    assert!(
        text.starts_with(
            "the routine wrote to its read-only input strain: strain[0] (strain(1) counted from 1) changed (1 of 6 strain components)"
        ),
        "{text}"
    );
    assert_eq!(p.strain, strain, "the routine wrote to a guarded copy");
    p.assert_elastic();
}

#[test]
fn reading_past_the_properties_is_found_only_at_the_full_level() {
    let mut r = load_with_state("bad_props_overread", GuardLevel::Light);
    let mut p = Point::new();
    p.call(&mut r, 2).unwrap();
    assert!(r.findings().is_empty(), "light cannot see reads: {:#?}", r.findings());

    r.set_guard_level(GuardLevel::Full);
    p.call(&mut r, 2)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = only(&r, FindingKind::OverRead, GuardedArray::Props);
    assert_eq!(f.len, 2);
    let text = f.to_string();
    assert!(text.starts_with("the routine reads beyond its 2 properties"), "{text}");
    assert!(text.contains("after properties[1]"), "{text}");
    // The rerun with all zones changed, one repeat with the first poison, one per input.
    assert_eq!(r.guard_calls(), 1 + 1 + 6);
}

#[test]
fn a_routine_with_hidden_state_is_not_mistaken_for_an_over_read() {
    let mut r = load_with_state("bad_hidden_state", GuardLevel::Full);
    let mut p = Point::new();
    p.call(&mut r, 2)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = only(&r, FindingKind::Unrepeatable, GuardedArray::Call);
    assert!(f.to_string().contains("different results for two identical calls"), "{f}");
    assert_eq!(r.guard_calls(), 2, "no attribution calls after the repeat differed");
}

#[test]
fn without_guards_nothing_is_found() {
    let mut r = load_with_state("bad_tangent_hole", GuardLevel::Off);
    let mut p = Point::new();
    p.call(&mut r, 2).unwrap();
    assert!(r.findings().is_empty());
    // The caller's own NaN stays where the routine wrote nothing.
    assert!(p.tangent[1].is_nan());
}

#[test]
fn the_complex_twin_is_guarded_too() {
    let mut r = load_with_state("bad_tangent_hole", GuardLevel::Light);
    let p = Point::new();
    let cx = |v: &[f64]| -> Vec<Complex64> { v.iter().map(|&x| Complex64::new(x, 0.0)).collect() };
    let nan = Complex64::new(f64::NAN, f64::NAN);
    let mut z = Point {
        props: cx(&p.props).try_into().unwrap(),
        strain: cx(&p.strain).try_into().unwrap(),
        dstrain: cx(&p.dstrain).try_into().unwrap(),
        stress0: cx(&p.stress0).try_into().unwrap(),
        state0: cx(&p.state0).try_into().unwrap(),
        stress: [nan; 6],
        state: [nan; NSTATE],
        tangent: [nan; 36],
        dstress_dtemp: [nan; 6],
        energy: [nan; 2],
        outcome: Outcome::default(),
    };
    z.dstrain[0].im = 1e-30;
    let (input, mut output) = z.io([Complex64::new(293.0, 0.0), Complex64::new(0.0, 0.0)], 2, true);
    r.complex()
        .expect("the twin was built")
        .call_complex(&input, &mut output)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = only(&r, FindingKind::Unwritten, GuardedArray::Tangent);
    assert!(f.complex);
    assert!(f.to_string().contains("complex-step twin"), "{f}");
    // The complex step still gives the tangent column in the imaginary part.
    let c = elastic_stiffness(E, NU);
    assert!((z.stress[0].im / 1e-30 - c[0]).abs() <= 1e-9 * c[0]);
}

/// The C routine `source`, built as a library of its own (with its complex-step twin when
/// `twin`) in a scratch folder named after `name`, and opened.
fn build_source(name: &str, source: &str, twin: bool) -> Library {
    let dir = scratch(name);
    let src = dir.join(format!("{name}.c"));
    std::fs::write(&src, source).unwrap();
    let out = dir.join(format!("lib{name}.so"));
    let mut opts = tancheck_abi::BuildOptions::new([&src], &out);
    opts.twin = twin;
    tancheck_abi::build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    Library::open(&out).unwrap()
}

const OVERLONG_MESSAGE_C: &str = r#"
#include "tancheck_routine.h"
TC_ROUTINE(long_message)
{
    (void)properties; (void)strain; (void)dstrain; (void)temperature; (void)stress0; (void)state0;
    (void)dstress_dtemp; (void)energy;
    for (int i = 0; i < call->ncomp; ++i) stress[i] = 0.0;
    for (int k = 0; k < call->nstate; ++k) state[k] = 0.0;
    for (int k = 0; k < call->ncomp * call->ncomp; ++k) tangent[k] = 0.0;
    /* Writes two bytes more than the buffer has. */
    for (int k = 0; k < TC_MESSAGE_LEN + 2; ++k) report->message[k] = 'x';
    report->message[TC_MESSAGE_LEN + 1] = '\0';
    ((tc_call *)call)->increment = -1;
}
"#;

/// A message longer than the report's buffer, and a write to the call description.
#[test]
fn a_message_past_its_buffer_and_a_write_to_the_call_are_reported() {
    let lib = build_source("long_message", OVERLONG_MESSAGE_C, false);
    let mut r = lib.routine("long_message", elastic_info("long_message")).unwrap();
    let mut b = Real::new();
    b.call(&mut r, 1)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = r.findings();
    assert_eq!(f.len(), 2, "{f:#?}");
    assert_eq!(
        (f[0].kind, f[0].array, f[0].first, f[0].entries),
        (FindingKind::Overrun, GuardedArray::Report, 96, 2)
    );
    assert!(f[0].to_string().contains("wrote past the end of report->message: byte 96"), "{}", f[0]);
    assert_eq!((f[1].kind, f[1].array), (FindingKind::InputWritten, GuardedArray::Call));
    assert!(f[1].to_string().contains("read-only call description"), "{}", f[1]);
}

/// A crash still ends the call with Fault::Crashed when guarded, and the next call is fine.
#[test]
fn crashes_pass_through_the_guards() {
    let mut r = load("bad_null_deref");
    r.set_guard_level(GuardLevel::Full);
    let mut b = Real::new();
    assert!(matches!(b.call(&mut r, 2), Err(tancheck_core::Fault::Crashed { signal: SIGSEGV, .. })));
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
    assert!(r.findings().is_empty(), "{:#?}", r.findings());
}

/// The first guard finding of a kind ends its call with `Fault::Misbehaved` naming it (the
/// call's outputs are still written, so the tests go on to inspect them).
fn misbehaved(f: tancheck_core::Fault) {
    match f {
        tancheck_core::Fault::Misbehaved { what } => assert!(!what.is_empty()),
        other => panic!("expected a misbehaviour finding, got {other}"),
    }
}

const HALF_WRITTEN_C: &str = r#"
#include "tancheck_routine.h"
TC_ROUTINE(half_written)
{
    (void)properties; (void)strain; (void)temperature; (void)state0; (void)state;
    (void)dstress_dtemp; (void)energy; (void)report;
    for (int i = 0; i < call->ncomp; ++i)
        if (i != 1) stress[i] = stress0[i] + 1000.0 * dstrain[i];
#ifdef TC_COMPLEX
    /* The twin writes only the real part of stress[1], through a cast to double. */
    ((double *)stress)[2] = 1.0;
#else
    stress[1] = stress0[1] + 1000.0 * dstrain[1];
#endif
    for (int k = 0; k < call->ncomp * call->ncomp; ++k) tangent[k] = (k % 7 == 0) ? 1000.0 : 0.0;
}
"#;

/// A twin that writes only one half of a complex output entry leaves the other half
/// unwritten: the light guards name the entry, and the caller gets a quiet NaN there. The
/// real routine, writing every entry, gives no finding.
#[test]
fn a_twin_writing_only_the_real_part_of_an_entry_is_found() {
    let lib = build_source("half_written", HALF_WRITTEN_C, true);
    let mut r = lib.routine("half_written", elastic_info("half_written")).unwrap();
    r.set_guard_level(GuardLevel::Light);
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    assert!(r.findings().is_empty(), "{:#?}", r.findings());

    let mut stress = [Complex64::new(f64::NAN, f64::NAN); 6];
    complex_call(&mut r, &b, 0, 1e-30, 2, &mut stress)
        .map(|_| ())
        .map_or_else(misbehaved, |_| panic!("the first finding ends the call with a fault"));
    let f = only(&r, FindingKind::Unwritten, GuardedArray::Stress);
    assert_eq!((f.first, f.entries, f.complex), (1, 1, true), "{f}");
    assert!(f.to_string().contains("stress[1] unwritten"), "{f}");
    assert!(f.to_string().contains("both its real and imaginary parts"), "{f}");
    assert!(stress[1].re.is_nan() && stress[1].im.is_nan(), "{:?}", stress[1]);
    assert!((stress[0].im / 1e-30 - 1000.0).abs() <= 1e-9, "{:?}", stress[0]);
}
