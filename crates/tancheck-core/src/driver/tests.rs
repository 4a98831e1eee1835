//! The increment a perturbed call passes: the one set, moved by h in one entry only, and
//! back to the one set after the call (also after a failed one), for the real and the
//! complex calls, whatever set the increment last.
use super::*;
use crate::convention::{Convention, PointKind, ShearMeasure};
use crate::routine::{CallInput, CallOutput, ComplexRoutine, Routine};

/// Records the increment of every call; fails every call while `fail` is set. On entry it
/// notes whether the stress and state arrived as NaN (the prefill).
struct Recorder {
    info: RoutineInfo,
    fail: bool,
    real: Vec<(Vec<f64>, f64)>,
    complex: Vec<(Vec<Complex64>, Complex64)>,
    prefilled: Vec<bool>,
}

impl Recorder {
    fn new() -> Recorder {
        let info = RoutineInfo {
            name: "recorder".into(),
            convention: Convention::new(PointKind::Solid3d, ShearMeasure::Engineering),
            nstate: 2,
            nprop: 1,
        };
        Recorder { info, fail: false, real: vec![], complex: vec![], prefilled: vec![] }
    }
    fn end(&self, outcome: &mut Outcome) -> Result<(), Fault> {
        if self.fail {
            outcome.status = crate::routine::status::FAILED;
        }
        crate::routine::status_fault(outcome)
    }
}

impl Routine for Recorder {
    fn info(&self) -> &RoutineInfo {
        &self.info
    }
    fn call(&mut self, i: &CallInput<'_, f64>, o: &mut CallOutput<'_, f64>) -> Result<(), Fault> {
        self.prefilled.push(o.stress.iter().chain(o.state.iter()).all(|x| x.is_nan()));
        self.real.push((i.dstrain.to_vec(), i.temp[1]));
        o.stress.fill(1.0);
        o.state.fill(0.0);
        self.end(o.outcome)
    }
    fn complex(&mut self) -> Option<&mut dyn ComplexRoutine> {
        Some(self)
    }
}

impl ComplexRoutine for Recorder {
    fn call_complex(
        &mut self,
        i: &CallInput<'_, Complex64>,
        o: &mut CallOutput<'_, Complex64>,
    ) -> Result<(), Fault> {
        self.prefilled.push(o.stress.iter().chain(o.state.iter()).all(|x| x.re.is_nan()));
        self.complex.push((i.dstrain.to_vec(), i.temp[1]));
        o.stress.fill(Complex64::new(1.0, 0.0));
        o.state.fill(Complex64::new(0.0, 0.0));
        self.end(o.outcome)
    }
}

fn moved(d: &[f64], j: usize, h: f64) -> Vec<f64> {
    let mut m = d.to_vec();
    m[j] += h;
    m
}

fn cx(d: &[f64], j: Option<(usize, f64)>) -> Vec<Complex64> {
    let mut c: Vec<Complex64> = d.iter().map(|&x| Complex64::new(x, 0.0)).collect();
    if let Some((j, h)) = j {
        c[j].im = h;
    }
    c
}

#[test]
fn a_driver_set_like_another_makes_the_same_calls() {
    let mut r = Recorder::new();
    let info = r.info.clone();
    let mut a = Driver::new(&info, &[1.0], PointState::zero(&info, 20.0)).unwrap();
    let mut b = a.clone();
    a.set_increment(&[1e-3, -2e-3, 3e-4, 0.0, 5e-4, -7e-4], 1.5, 0.1);
    {
        let mut c = Caller::new(&mut r);
        a.base_call(&mut c).unwrap();
    }
    a.advance();
    a.set_increment(&[2e-3, 0.0, -3e-4, 1e-4, 0.0, 7e-4], -0.5, 0.2);
    b.set_like(&a);
    assert_eq!(
        (b.start(), b.dstrain(), b.dtemp(), b.dtime(), b.increment()),
        (a.start(), a.dstrain(), a.dtemp(), a.dtime(), a.increment())
    );
    {
        let mut c = Caller::new(&mut r);
        for d in [&mut a, &mut b] {
            d.base_call(&mut c).unwrap();
            d.complex_call(&mut c, Direction::Strain(1), 1e-30).unwrap();
        }
    }
    assert_eq!(r.real[1], r.real[2]);
    assert_eq!(r.complex[0], r.complex[1]);
}

#[test]
fn perturbed_calls_move_one_entry_and_put_it_back() {
    let mut r = Recorder::new();
    let info = r.info.clone();
    let mut d = Driver::new(&info, &[1.0], PointState::zero(&info, 20.0)).unwrap();
    let first = [1e-3, -2e-3, 3e-4, 0.0, 5e-4, -7e-4];
    d.set_increment(&first, 1.5, 0.1);
    let h = 1.0e-7;
    {
        let mut c = Caller::new(&mut r);
        d.perturbed_call(&mut c, Direction::Strain(2), h).unwrap();
        d.perturbed_call(&mut c, Direction::Strain(2), -h).unwrap();
        d.complex_call(&mut c, Direction::Strain(4), 1e-30).unwrap();
        d.perturbed_call(&mut c, Direction::Temperature, h).unwrap();
        d.complex_call(&mut c, Direction::Temperature, 1e-30).unwrap();
        d.base_call(&mut c).unwrap();
    }
    assert_eq!(r.real[0], (moved(&first, 2, h), 1.5));
    assert_eq!(r.real[1], (moved(&first, 2, -h), 1.5));
    assert_eq!(r.complex[0], (cx(&first, Some((4, 1e-30))), Complex64::new(1.5, 0.0)));
    assert_eq!(r.real[2], (first.to_vec(), 1.5 + h));
    assert_eq!(r.complex[1], (cx(&first, None), Complex64::new(1.5, 1e-30)));
    assert_eq!(r.real[3], (first.to_vec(), 1.5));
    assert!(r.prefilled.iter().all(|&p| p), "stress and state arrive as NaN: {:?}", r.prefilled);

    // A failed call puts the entry back too.
    r.fail = true;
    {
        let mut c = Caller::new(&mut r);
        assert!(d.perturbed_call(&mut c, Direction::Strain(0), h).is_err());
        assert!(d.complex_call(&mut c, Direction::Strain(1), 1e-30).is_err());
    }
    r.fail = false;
    // Every way of setting the increment carries over to the perturbed calls.
    let second = [2e-3, 0.0, -1e-3, 4e-4, 0.0, 1e-4];
    type Set = fn(&mut Driver, &[f64]);
    let steps: [(&str, Set); 4] = [
        ("set_increment", |d, s| d.set_increment(s, 1.5, 0.1)),
        ("set_increment_keep_count", |d, s| d.set_increment_keep_count(s, 1.5)),
        ("set_dstrain", |d, s| d.set_dstrain(s)),
        ("rescale", |d, _| d.rescale(0.5)),
    ];
    for (what, set) in steps {
        set(&mut d, &second);
        let now = d.dstrain().to_vec();
        let (nr, nc) = (r.real.len(), r.complex.len());
        {
            let mut c = Caller::new(&mut r);
            d.perturbed_call(&mut c, Direction::Strain(5), h).unwrap();
            d.complex_call(&mut c, Direction::Strain(3), 1e-30).unwrap();
        }
        assert_eq!(r.real[nr].0, moved(&now, 5, h), "after {what}");
        assert_eq!(r.complex[nc].0, cx(&now, Some((3, 1e-30))), "after {what}");
    }
    assert_eq!(d.dstrain(), &second.map(|x| 0.5 * x)[..], "rescale(0.5) halves the increment");
}

/// A fraction of an increment is a fraction of its temperature change too, at the same
/// rates (the cause trials' refined increments kept the whole temperature increment, and a
/// continuum tangent on a thermal path read as unexplained).
#[test]
fn rescale_scales_the_temperature_and_time_increments() {
    let r = Recorder::new();
    let mut d = Driver::new(&r.info, &[1.0], PointState::zero(&r.info, 20.0)).unwrap();
    d.set_increment(&[8e-4, 0.0, 0.0, 0.0, 0.0, 0.0], 16.0, 2.0);
    d.rescale(0.125);
    assert_eq!((d.dstrain()[0], d.dtemp(), d.dtime()), (1e-4, 2.0, 0.25));
    d.rescale(-0.5);
    assert_eq!((d.dstrain()[0], d.dtemp(), d.dtime()), (-4e-4, -8.0, 1.0));
    d.rescale(1.0);
    assert_eq!((d.dstrain()[0], d.dtemp(), d.dtime()), (8e-4, 16.0, 2.0));
}
