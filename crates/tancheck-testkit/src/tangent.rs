//! Pure operations on a returned tangent that several tests read it through: the entry at
//! (i, j) of a column-major matrix, and the 6 × 6 tangent condensed to uniaxial stress.

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

#[cfg(test)]
mod tests {
    use super::*;

    // Isotropic elasticity (E = 200, ν = 0.25): condensed to uniaxial stress it is E itself
    // (Hooke's law, any elasticity text).
    #[test]
    fn isotropic_elasticity_condenses_to_e() {
        let (e, nu) = (200.0, 0.25);
        let lambda = e * nu / ((1.0 + nu) * (1.0 - 2.0 * nu));
        let mu = e / (2.0 * (1.0 + nu));
        let mut t = vec![0.0; 36];
        for i in 0..3 {
            for j in 0..3 {
                t[i + 6 * j] = lambda + if i == j { 2.0 * mu } else { 0.0 };
            }
            t[(i + 3) * 7] = mu;
        }
        assert!((condensed_uniaxial(&t) - e).abs() < 1e-12 * e);
        assert_eq!(at(&t, 6, 0, 1), lambda);
    }
}
