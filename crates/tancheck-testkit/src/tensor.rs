//! Symmetric tensors as the model tests draw and convert them: canonical components
//! (11, 22, 33, 23, 13, 12, shear not doubled) in a kind's subspace, random draws, and the
//! routine vectors (engineering shear for strains) they become.

use rand::Rng;

/// Canonical slots (11, 22, 33, 23, 13, 12) of the components of a kind with `n` of them:
/// all six, or 11, 22, 33, 12 for the four-component kinds.
pub fn slots(n: usize) -> &'static [usize] {
    if n == 6 {
        &[0, 1, 2, 3, 4, 5]
    } else {
        &[0, 1, 2, 5]
    }
}

/// A random symmetric tensor in the kind's subspace, entries uniform in [−1, 1] (drawn in
/// slot order).
pub fn random_tensor<R: Rng>(rng: &mut R, n: usize) -> [f64; 6] {
    let mut t = [0.0; 6];
    for &s in slots(n) {
        t[s] = rng.gen_range(-1.0..1.0);
    }
    t
}

/// The deviatoric part: the mean of the normal components taken off them.
pub fn deviatoric(mut t: [f64; 6]) -> [f64; 6] {
    let p = (t[0] + t[1] + t[2]) / 3.0;
    for x in t.iter_mut().take(3) {
        *x -= p;
    }
    t
}

/// The tensor's Frobenius norm (shear components counted twice).
pub fn tensor_norm(t: &[f64; 6]) -> f64 {
    (t[0] * t[0] + t[1] * t[1] + t[2] * t[2] + 2.0 * (t[3] * t[3] + t[4] * t[4] + t[5] * t[5])).sqrt()
}

/// Tensor components → a routine vector of `n` components: engineering shear for strains
/// (`shear` = 2), plain for stresses (1).
pub fn to_vector(t: &[f64; 6], n: usize, shear: f64) -> Vec<f64> {
    slots(n).iter().map(|&s| if s >= 3 { shear * t[s] } else { t[s] }).collect()
}

/// A routine vector → tensor components (`shear` as in [`to_vector`]).
pub fn to_tensor(v: &[f64], shear: f64) -> [f64; 6] {
    let mut t = [0.0; 6];
    for (x, &s) in v.iter().zip(slots(v.len())) {
        t[s] = if s >= 3 { x / shear } else { *x };
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vectors_and_tensors_round_trip_and_deviators_have_no_trace() {
        let t = [1.0, 2.0, 3.0, 0.0, 0.0, 0.5];
        assert_eq!(to_vector(&t, 4, 2.0), vec![1.0, 2.0, 3.0, 1.0]);
        assert_eq!(to_tensor(&to_vector(&t, 4, 2.0), 2.0), t);
        let d = deviatoric(t);
        assert!((d[0] + d[1] + d[2]).abs() < 1e-15);
        assert!((tensor_norm(&[0.0, 0.0, 0.0, 0.0, 0.0, 1.0]) - 2f64.sqrt()).abs() < 1e-15);
    }
}
