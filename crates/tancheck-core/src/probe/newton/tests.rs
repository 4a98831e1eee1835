//! Tests of the newton probe's measures: the orders of a solve's residuals, the step below
//! the rounding floor, and the singular block of a tangent.

use super::*;

fn solve(residuals: &[f64], floor: f64) -> IncrementSolve {
    let usable: Vec<f64> = residuals.iter().cloned().filter(|&r| r > floor).collect();
    let orders = SolveLog { residuals: usable.clone(), converged: true, numerical_fallback: false }.orders();
    IncrementSolve {
        increment: 1,
        state_changed: true,
        log: SolveLog { residuals: residuals.to_vec(), converged: true, numerical_fallback: false },
        failure: None,
        refused: false,
        singular: false,
        usable,
        orders,
        tail_order: tail_order(residuals, floor, 10.0 * f64::EPSILON),
        diverged_from_start: None,
        slow_from_start: None,
        elsewhere: None,
    }
}

// An exact tangent settling late (a softening damage law, measured by a user-style
// sweep): the last usable order is 1.33, the step below the floor shows 2.39; the
// increment's order is the higher (orders by the formula of the module documentation).
// A rank-one block (the tangent at the apex of a pressure-dependent surface, K 1⊗1) is
// singular, the isotropic stiffness's is not.
#[test]
fn a_rank_one_block_is_singular() {
    let n = 6;
    let mut t = vec![0.0; 36];
    for j in 0..3 {
        for i in 0..3 {
            t[i + j * n] = 1.5e5;
        }
    }
    let idx: Vec<usize> = (1..6).collect();
    assert!(singular_block(&t, n, &idx));
    let (l, m) = (1.15e5, 7.7e4);
    let mut c = vec![0.0; 36];
    for j in 0..3 {
        for i in 0..3 {
            c[i + j * n] = l + if i == j { 2.0 * m } else { 0.0 };
        }
    }
    for i in 3..6 {
        c[i + i * n] = m;
    }
    assert!(!singular_block(&c, n, &idx));
}

#[test]
fn a_late_quadratic_step_below_the_floor_counts() {
    let s = solve(&[9.73e-1, 9.68e-2, 4.18e-2, 2.61e-4, 3.05e-7, 2.99e-14], 1e-10);
    assert!((s.orders.last().unwrap() - 1.33).abs() < 0.01, "{:?}", s.orders);
    assert!((s.order().unwrap() - 2.39).abs() < 0.01, "{:?}", s.order());
    // Linear convergence (rate 0.1, a continuum tangent) stays at order 1 below the floor.
    let lin: Vec<f64> = (0..14).map(|k| 10f64.powi(-k)).collect();
    let s = solve(&lin, 1e-10);
    assert!((s.order().unwrap() - 1.0).abs() < 1e-6, "{:?}", s.order());
    // Two usable residuals give no order, whatever the step below the floor shows.
    let s = solve(&[1.0, 1e-3, 1e-15], 1e-10);
    assert_eq!(s.order(), None);
    // A linear solve whose residual below the floor came out at rounding by luck: no
    // tail order from it (it would read 3).
    let s = solve(&[1e-9, 1e-10, 1e-11, 1e-16], 1e-12);
    assert_eq!(s.orders.len(), 1);
    assert_eq!(s.tail_order, None);
}

// A single order made with the start residual: a creep routine's exact tangent
// (residuals of a user-style sweep) reads 1.39, pre-asymptotic, and is not judged; a
// constant contraction reads 1.0 from the same three and is; a second order is judged.
#[test]
fn a_single_order_from_the_start_is_judged_only_when_linear() {
    let s = solve(&[2.37e1, 1.78e-3, 3.22e-9, 6.37e-14], 1e-10);
    assert!((s.order().unwrap() - 1.39).abs() < 0.01, "{:?}", s.order());
    assert_eq!(s.judged_order(), None);
    let s = solve(&[2.37e1, 1.78e-3, 1.34e-7, 1.0e-11], 1e-10);
    assert!(s.judged_order().is_some_and(|p| p < FROM_START_LINEAR), "{:?}", s.judged_order());
    let s = solve(&[2.37e1, 1.78e-3, 3.22e-9, 1.0e-11, 1e-16], 1e-13);
    assert_eq!(s.orders.len(), 2);
    assert!(s.judged_order().is_some());
}
