//! Paths in the deformation gradient: uniaxial stretch, simple shear, biaxial stretch, each
//! optionally with a rigid rotation superposed, and explicit lists of F.

use serde::{Deserialize, Serialize};

use super::mat3::{self, Mat3};
use super::numeric::Start;

/// A path: the deformation gradient at the start and at the end of every increment
/// (`gradients[0]` is the start).
#[derive(Clone, Debug, PartialEq)]
pub struct FinitePath {
    pub gradients: Vec<Mat3<f64>>,
    /// The time each increment takes; empty: 1 each (an increment cut into parts by the check
    /// gives each part its share).
    pub dtime: Vec<f64>,
}

/// A rigid rotation superposed on a path, growing linearly to `angle` (radians) about `axis`.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Superposed {
    pub axis: [f64; 3],
    pub angle: f64,
}

/// The path a manifest asks for.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "shape", rename_all = "kebab-case", deny_unknown_fields)]
pub enum FinitePathSpec {
    /// F = diag(s, 1, 1), s from 1 to `stretch`.
    UniaxialStretch {
        stretch: f64,
        increments: usize,
        #[serde(default)]
        rotation: Option<Superposed>,
    },
    /// F = I + γ e₁⊗e₂, γ from 0 to `amount`.
    SimpleShear {
        amount: f64,
        increments: usize,
        #[serde(default)]
        rotation: Option<Superposed>,
    },
    /// F = diag(s₁, s₂, 1).
    Biaxial {
        stretch: [f64; 2],
        increments: usize,
        #[serde(default)]
        rotation: Option<Superposed>,
    },
    /// Explicit deformation gradients, each 9 numbers column-major (entry (i, j) at
    /// i + 3 j); the path starts at the identity unless `start` is given.
    Gradients {
        gradients: Vec<[f64; 9]>,
        #[serde(default)]
        start: Option<[f64; 9]>,
    },
}

impl Default for FinitePathSpec {
    fn default() -> Self {
        FinitePathSpec::SimpleShear { amount: 0.5, increments: 5, rotation: None }
    }
}

impl FinitePathSpec {
    /// The path, or why it cannot be made.
    pub fn build(&self) -> Result<FinitePath, String> {
        let linear = |n: usize, at: &dyn Fn(f64) -> Mat3<f64>, rot: &Option<Superposed>| {
            if n == 0 {
                return Err("a path needs at least one increment".to_string());
            }
            if let Some(r) = rot {
                let l = r.axis.iter().map(|x| x * x).sum::<f64>().sqrt();
                if !(l > 0.0 && l.is_finite() && r.angle.is_finite()) {
                    return Err(format!(
                        "rotation: the axis {:?} must be a nonzero vector of finite numbers and the angle {} a \
                         finite number (radians)",
                        r.axis, r.angle
                    ));
                }
            }
            let mut g = Vec::with_capacity(n + 1);
            for k in 0..=n {
                let t = k as f64 / n as f64;
                let f = at(t);
                g.push(match rot {
                    Some(r) => mat3::mul(&mat3::axis_rotation(r.axis, r.angle * t), &f),
                    None => f,
                });
            }
            Ok(g)
        };
        let gradients = match self {
            FinitePathSpec::UniaxialStretch { stretch, increments, rotation } => {
                let s = *stretch;
                linear(*increments, &|t| diag(1.0 + t * (s - 1.0), 1.0, 1.0), rotation)?
            }
            FinitePathSpec::SimpleShear { amount, increments, rotation } => {
                let a = *amount;
                linear(*increments, &|t| shear(a * t), rotation)?
            }
            FinitePathSpec::Biaxial { stretch, increments, rotation } => {
                let [s1, s2] = *stretch;
                linear(*increments, &|t| diag(1.0 + t * (s1 - 1.0), 1.0 + t * (s2 - 1.0), 1.0), rotation)?
            }
            FinitePathSpec::Gradients { gradients, start } => {
                if gradients.is_empty() {
                    return Err("`gradients` is empty".into());
                }
                let mut g = vec![start.map(|s| mat3::from_flat(&s)).unwrap_or_else(mat3::identity)];
                g.extend(gradients.iter().map(mat3::from_flat));
                g
            }
        };
        for (k, f) in gradients.iter().enumerate() {
            let j = mat3::det(f);
            if j.is_nan() || j <= 0.0 || !j.is_finite() {
                return Err(format!("deformation gradient {k} has det F = {j}; it must be positive"));
            }
        }
        // A path whose every gradient is its start's deforms nothing: at F = I and zero stress
        // no confusion of measures shows, and wrong tangents passed (a stretch of 1; a
        // user-style sweep). Bad input, as a point path that loads nothing is.
        if gradients.iter().all(|f| f == &gradients[0]) {
            return Err(format!(
                "every deformation gradient of the path is its start's{}: no increment deforms the point, and \
                 nothing would be checked; give a stretch other than 1, an amount of shear other than 0, or \
                 gradients that change",
                if gradients[0] == mat3::identity::<f64>() { " (F = I)" } else { "" }
            ));
        }
        Ok(FinitePath { gradients, dtime: Vec::new() })
    }
}

fn diag(a: f64, b: f64, c: f64) -> Mat3<f64> {
    [[a, 0.0, 0.0], [0.0, b, 0.0], [0.0, 0.0, c]]
}

/// F = I + γ e₁⊗e₂.
pub fn shear(g: f64) -> Mat3<f64> {
    [[1.0, g, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]]
}

/// The start of a path's first increment (stress zero, 20 °C, time 0): where the check and
/// the probes begin, written once.
pub(super) fn path_start(properties: &[f64], state0: &[f64], path: &FinitePath) -> Start {
    Start {
        properties: properties.to_vec(),
        f0: path.gradients[0],
        stress0: [0.0; 6],
        state0: state0.to_vec(),
        temperature: [20.0, 0.0],
        time: [0.0, 1.0],
        increment: 1,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shapes_and_rotation() {
        let p = FinitePathSpec::SimpleShear {
            amount: 1.0,
            increments: 4,
            rotation: Some(Superposed { axis: [0.0, 0.0, 1.0], angle: std::f64::consts::FRAC_PI_2 }),
        }
        .build()
        .unwrap();
        assert_eq!(p.gradients.len(), 5);
        // at the end: Q(90° about 3) (I + e₁⊗e₂): first row (0, −1, 0), second (1, 1, 0)
        let f = p.gradients[4];
        assert!(
            (f[0][1] + 1.0).abs() < 1e-15 && (f[1][0] - 1.0).abs() < 1e-15 && (f[1][1] - 1.0).abs() < 1e-15
        );
        let bad: Result<FinitePathSpec, _> =
            serde_json::from_str(r#"{"shape": "gradients", "gradients": [[1,0,0, 0,-1,0, 0,0,1]]}"#);
        assert!(bad.unwrap().build().unwrap_err().contains("det F"));
    }

    // A zero rotation axis is named (it was told as "det F = NaN").
    #[test]
    fn a_zero_rotation_axis_is_named() {
        let p = FinitePathSpec::UniaxialStretch {
            stretch: 1.5,
            increments: 2,
            rotation: Some(Superposed { axis: [0.0; 3], angle: 0.7 }),
        };
        let e = p.build().unwrap_err();
        assert!(e.contains("rotation: the axis") && !e.contains("det F"), "{e}");
    }

    // A path that deforms nothing is refused: at F = I wrong tangents passed (a stretch of 1;
    // a user-style sweep). A superposed rotation deforms it (rigidly), and is taken.
    #[test]
    fn a_path_that_deforms_nothing_is_refused() {
        let p = FinitePathSpec::UniaxialStretch { stretch: 1.0, increments: 3, rotation: None };
        let e = p.build().unwrap_err();
        assert!(e.contains("every deformation gradient of the path is its start's (F = I)"), "{e}");
        let g: FinitePathSpec = serde_json::from_str(
            r#"{"shape": "gradients", "start": [1.1,0,0, 0,1,0, 0,0,1], "gradients": [[1.1,0,0, 0,1,0, 0,0,1]]}"#,
        )
        .unwrap();
        let e = g.build().unwrap_err();
        assert!(e.contains("is its start's:"), "{e}");
        let turned = FinitePathSpec::UniaxialStretch {
            stretch: 1.0,
            increments: 3,
            rotation: Some(Superposed { axis: [0.0, 0.0, 1.0], angle: 0.5 }),
        };
        assert!(turned.build().is_ok());
    }
}
