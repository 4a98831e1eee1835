//! The bilinear mixed-mode cohesive model (`cohesive`) and its flawed variants against the
//! published law (Camanho & Dávila 2002, NASA/TM-2002-211737; Camanho, Dávila & de Moura
//! 2003; Benzeggagh & Kenane 1996; REFERENCES.md, "Cohesive zone") and num-dual /
//! complex-step derivatives of its own update, branch by branch.

use num_complex::Complex64;
use num_dual::Dual64;
use rand::rngs::StdRng;
use rand::{Rng, SeedableRng};
use tancheck_core::driver::Outputs;
use tancheck_core::routine::{provides, status};
use tancheck_core::{Model, PointKind, Scalar};
use tancheck_models::cohesive::{branch, mode_mix};
use tancheck_models::{AnyModel, Cohesive, CohesiveFlaw};
use tancheck_testkit::call::model_allocations;
use tancheck_testkit::point::{complex_tangent, dual_tangent, run, Point};
use tancheck_testkit::tangent::{matrix_error, rel_or_exact};

// ---------------------------------------------------------------------------------------
// A counting allocator: one call of the model must not allocate (DEVELOPERS.md, hot path).

#[path = "../common/mod.rs"]
mod common;

mod published;
mod random_states;

// ---------------------------------------------------------------------------------------
// One call with owned arrays, in any scalar type.

/// Separation `sep` reached from zero in one increment, from the state [d, G_d].
fn point_at(props: &[f64], sep: &[f64], state0: [f64; 2]) -> Point {
    Point {
        props: props.to_vec(),
        strain: vec![0.0; sep.len()],
        dstrain: sep.to_vec(),
        state0: state0.to_vec(),
        ..Point::default()
    }
}

fn norm(v: impl Iterator<Item = f64>) -> f64 {
    v.map(|x| x * x).sum::<f64>().sqrt()
}

/// Relative error of a tangent (cohesive components carry no Mandel factor): the worse of
/// the whole matrix and the worst column. A zero reference demands an exact zero.
fn tangent_error(n: usize, got: &[f64], reference: &[f64]) -> f64 {
    matrix_error(n, got, reference)
}

fn transpose(n: usize, t: &[f64]) -> Vec<f64> {
    let mut u = vec![0.0; n * n];
    for i in 0..n {
        for j in 0..n {
            u[i + j * n] = t[j + i * n];
        }
    }
    u
}

// ---------------------------------------------------------------------------------------
// The published law, written here again from its formulas (REFERENCES.md): β = δ_sh/δ₃.

/// AS4/PEEK (REFERENCES.md: from memory): K 1e6 N/mm³, N 80 MPa, S 100 MPa, G_Ic 0.969 N/mm,
/// G_IIc 1.719 N/mm, η 2.284.
const AS4_PEEK: [f64; 6] = [1e6, 80.0, 100.0, 0.969, 1.719, 2.284];

/// Onset δ₀ₘ, final δ_fm and G_c of the mixed-mode bilinear law for an open interface with
/// mode ratio β (Camanho & Dávila 2002; B-K 1996), or for pure shear (`beta = None`).
fn published(props: &[f64], beta: Option<f64>) -> (f64, f64, f64) {
    let [k, n, s, g1, g2, eta] = props[..] else { unreachable!() };
    let (d03, d0s) = (n / k, s / k);
    match beta {
        Some(b) => {
            let d0m = d03 * d0s * ((1.0 + b * b) / (d0s * d0s + b * b * d03 * d03)).sqrt();
            let gc = g1 + (g2 - g1) * (b * b / (1.0 + b * b)).powf(eta);
            (d0m, 2.0 * gc / (k * d0m), gc)
        }
        None => (d0s, 2.0 * g2 / s, g2),
    }
}

/// The separation at which damage d is reached on a proportional path,
/// λ(d) = δ_fm δ₀ₘ/(δ_fm − d (δ_fm − δ₀ₘ)): the inverse of the bilinear damage law
/// d = δ_fm (λ − δ₀ₘ)/(λ (δ_fm − δ₀ₘ)) of Camanho & Dávila 2002 (the law from memory; it is
/// not among the REFERENCES.md formulas).
fn lambda_of_damage(d0m: f64, dfm: f64, d: f64) -> f64 {
    dfm * d0m / (dfm - d * (dfm - d0m))
}

fn assert_printed(x: f64, printed: f64, half_unit: f64, what: &str) {
    assert!((x - printed).abs() <= half_unit, "{what} = {x:.10e}, printed {printed:e}");
}
