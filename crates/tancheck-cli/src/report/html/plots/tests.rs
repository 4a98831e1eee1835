//! Tick labels of the plots.

use super::*;

#[test]
fn tick_labels_read_as_the_numbers_they_stand_for() {
    // A tick the arithmetic left a hair off zero reads as 0 on its axis, a small number on
    // an axis of small numbers stays itself.
    assert_eq!(num_label_on(&(-2e-3..2e-3))(&3.5e-18), "0");
    assert_eq!(num_label_on(&(-2.2e-15..2.2e-15))(&1e-15), "1.0e-15");
    // Four significant digits: 0.0015 beside 0.002 are two ticks.
    assert_eq!(num_label(&0.0015), "0.0015");
    assert_eq!(num_label(&0.002), "0.002");
    assert_eq!(num_label(&12.5), "12.5");
    assert_eq!(num_label(&250.0), "250");
}

/// The response curves start where the path starts (a cohesive law's first loading line began
/// at the first increment's end, off the origin; a user-style sweep): the reference cohesive
/// model from a zero start, its opening's first point (0, 0), then the increments' ends.
#[test]
fn the_response_curves_start_at_the_start_of_the_path() {
    use tancheck_core::path::{Path, Shape};
    use tancheck_core::{check, Caller, PointKind, PointState, Settings};
    let mut m = tancheck_models::reference("cohesive", PointKind::Cohesive3d).unwrap();
    let info = tancheck_core::Routine::info(&m).clone();
    let mut caller = Caller::new(&mut m);
    let path = Path::ramp(Shape::MixedMode, 4e-3, 8, 4);
    let props = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];
    let r =
        check::run(&mut caller, &props, PointState::zero(&info, 20.0), &path, &Settings::default()).unwrap();
    let incs: Vec<_> = r.records.iter().collect();
    let (e, s) = (response_values(&r, &incs, 0, false), response_values(&r, &incs, 0, true));
    assert_eq!(e.len(), incs.len() + 1);
    assert_eq!((e[0], s[0]), (0.0, 0.0));
    assert_eq!((e[1], s[1]), (incs[0].strain()[0], incs[0].stress()[0]));
}
