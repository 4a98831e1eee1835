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
