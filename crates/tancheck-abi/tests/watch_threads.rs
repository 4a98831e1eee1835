//! The guard's watch counts the calls of every thread: each thread counts on a slot of its own
//! (no cache line shared between threads calling at once), and the watch sums the slots. One
//! test in this binary, so that no other test's calls move the counters meanwhile.

mod common;

use common::*;
use tancheck_abi::watch;

/// Calls made by `threads` threads, `calls` each, through routines loaded beforehand.
fn calls_on_threads(threads: usize, calls: i32) {
    let routines: Vec<_> = (0..threads).map(|_| load("bad_divide_by_zero")).collect();
    std::thread::scope(|s| {
        for mut r in routines {
            s.spawn(move || {
                let mut b = Real::new();
                for k in 0..calls {
                    b.call(&mut r, k + 1).expect("the call returns");
                }
            });
        }
    });
}

#[test]
fn the_watch_sums_the_calls_of_every_thread() {
    let before = watch::watch();
    assert!(!before.in_call());
    calls_on_threads(3, 40);
    let after = watch::watch();
    assert_eq!(after.calls_begun - before.calls_begun, 120, "{before:?} → {after:?}");
    assert_eq!(after.calls_ended - before.calls_ended, 120);
    assert!(!after.in_call());
    // Ended threads free their slots and new ones count on from those counts; over this test
    // more threads run than there are slots (64). Either way the sums grow by exactly the
    // calls made.
    for _ in 0..40 {
        calls_on_threads(2, 5);
    }
    let last = watch::watch();
    assert_eq!(last.calls_begun - after.calls_begun, 400);
    assert_eq!(last.calls_ended - after.calls_ended, 400);
    assert!(!last.in_call());
}
