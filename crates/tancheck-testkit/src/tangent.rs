//! Pure operations on a returned tangent that several tests read it through: the entry at
//! (i, j) of a column-major matrix, the 6 × 6 tangent condensed to uniaxial stress, and
//! relative errors where a zero reference demands an exact zero.

/// Entry (i, j) of a column-major n × n tangent, as routines return it.
pub fn at(t: &[f64], n: usize, i: usize, j: usize) -> f64 {
    t[i + j * n]
}

/// The 11 modulus of a 6 × 6 tangent (components 11, 22, 33, …) under uniaxial stress,
/// σ22 = σ33 = 0: C11 − C1L C_LL⁻¹ C_L1 with L = 22, 33 (static condensation; the 2 × 2 block
/// inverted in closed form). For J2 plasticity it is the elastoplastic modulus E h/(E + h)
/// (derived from the closed form of Simo & Hughes 1998, Box 3.2).
pub fn condensed_uniaxial(t: &[f64]) -> f64 {
    let (a, b, c, d) = (at(t, 6, 1, 1), at(t, 6, 1, 2), at(t, 6, 2, 1), at(t, 6, 2, 2));
    let det = a * d - b * c;
    let (c12, c13, c21, c31) = (at(t, 6, 0, 1), at(t, 6, 0, 2), at(t, 6, 1, 0), at(t, 6, 2, 0));
    at(t, 6, 0, 0) - (c12 * (d * c21 - b * c31) + c13 * (a * c31 - c * c21)) / det
}

/// The isotropic elastic stiffness in Voigt form with engineering shear, column-major 6 × 6:
/// λ + 2μ on the normal diagonal, λ off it, μ on the shear diagonal (Hooke's law; any
/// elasticity text, e.g. Hughes 2000, ch. 2, from memory).
pub fn isotropic_stiffness(e: f64, nu: f64) -> [f64; 36] {
    let mu = e / (2.0 * (1.0 + nu));
    let lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
    let mut c = [0.0; 36];
    for i in 0..3 {
        for j in 0..3 {
            c[i + 6 * j] = lambda;
        }
        c[i + 6 * i] = lambda + 2.0 * mu;
    }
    for i in 3..6 {
        c[i + 6 * i] = mu;
    }
    c
}

/// ‖a − b‖ / ‖b‖ (Euclidean) where a zero reference demands an exact zero: 0 when both are
/// zero, ∞ when only the reference is.
pub fn rel_or_exact(a: &[f64], b: &[f64]) -> f64 {
    let norm = |v: &mut dyn Iterator<Item = f64>| v.map(|x| x * x).sum::<f64>().sqrt();
    let d = norm(&mut a.iter().zip(b).map(|(x, y)| x - y));
    let r = norm(&mut b.iter().copied());
    if r == 0.0 {
        if d == 0.0 {
            0.0
        } else {
            f64::INFINITY
        }
    } else {
        d / r
    }
}

/// The relative error of a column-major n × n tangent against a reference: the worse of the
/// whole matrix's and the worst column's ([`rel_or_exact`]).
pub fn matrix_error(n: usize, got: &[f64], reference: &[f64]) -> f64 {
    let mut worst = rel_or_exact(got, reference);
    for j in 0..n {
        worst = worst.max(rel_or_exact(&got[j * n..(j + 1) * n], &reference[j * n..(j + 1) * n]));
    }
    worst
}

#[cfg(test)]
mod tests {
    use super::*;

    // Isotropic elasticity (E = 200, ν = 0.25): condensed to uniaxial stress it is E itself
    // (Hooke's law, any elasticity text).
    #[test]
    fn isotropic_elasticity_condenses_to_e() {
        let (e, nu) = (200.0, 0.25);
        let lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
        let t = isotropic_stiffness(e, nu).to_vec();
        assert!((condensed_uniaxial(&t) - e).abs() < 1e-12 * e);
        assert_eq!(at(&t, 6, 0, 1), lambda);
        assert_eq!(matrix_error(6, &t, &t), 0.0);
        assert_eq!(rel_or_exact(&[1.0], &[0.0]), f64::INFINITY);
        let mut u = t.clone();
        u[0] *= 1.0 + 1e-6; // one entry of one column: that column's error is the larger
        assert!(matrix_error(6, &u, &t) > rel_or_exact(&u, &t));
    }
}
