//! Objectivity probes of finite-strain routines, and the simple-shear response.
//!
//! - `rotation-superposed`: the whole motion up to the end of an increment rotated by a
//!   rigid Q (start F, stress and tensorial state rotated too): the stress and tensorial
//!   state at the end must come out rotated, Q τ Qᵀ; scalars and energies unchanged.
//!   Small (0.01 rad) and large (1.2 rad) rotations.
//! - `rotation-increment`: a purely rigid increment F₁ = Q F₀ from the end of each increment
//!   of the path: the stress must rotate with it (a routine that never applies the rotation
//!   increment keeps it fixed). Small and large rotation increments.
//! - `stretch-rotate`: the path, then a rigid rotation of 90° in six increments; the stress
//!   seen in the rotated frame, Qᵀ τ Q, must stay what it was after the stretch.
//! - `simple-shear`: shear to γ = 2π; a hyperelastic routine's shear stress grows
//!   monotonically (neo-Hookean: σ₁₂ = μγ), a hypoelastic update with the Jaumann rate
//!   oscillates, σ₁₂ = G sin γ (Dienes 1979, Acta Mechanica 32:217–232; from memory). The
//!   probe passes when the response is the one the manifest expects (monotonic unless it
//!   says oscillating); for an oscillating routine it also compares with G sin γ, G taken
//!   from the first increment.

use serde::{Deserialize, Serialize};

use super::mat3::{self, Mat3};
use super::numeric::{Start, Workspace};
use super::path::{path_start, shear, FinitePath};
use super::rigid::{asks_smaller, rotate_rigidly, rotation_note, RotationCuts, AXIS};
use super::routine::FiniteRoutine;
use crate::routine::Fault;

/// What the simple-shear probe expects.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ShearResponse {
    #[default]
    Monotonic,
    Oscillating,
}

/// Options of the finite-strain probes.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct ProbeOptions {
    /// First slots of the symmetric tensors (6 entries each, order 11, 22, 33, 23, 13, 12)
    /// in the state; every other state entry is a scalar.
    pub tensor_state: Vec<usize>,
    /// First slots of rotations (9 entries each, column-major R) in the state, which a rigid
    /// rotation Q turns into Q R: the rotation a corotational routine keeps (a Green–Naghdi
    /// routine keeping R failed the rotation probes with its stress right; a user-style sweep).
    pub rotation_state: Vec<usize>,
    pub shear_response: ShearResponse,
}

/// One probe's result.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FiniteProbeResult {
    pub name: String,
    pub passed: bool,
    pub summary: String,
    pub details: Vec<String>,
    /// A routine call failed (a crash the guard caught, a memory guard's finding, a failure
    /// status): the run exits 3, as a point probe's fault does.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub faulted: bool,
}

/// The report of the finite-strain probes of one routine.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct FiniteProbeReport {
    pub routine: String,
    /// Every probe passed.
    pub passed: bool,
    /// The exit code (0 when every probe passed, 3 when a routine call failed, else 1, as
    /// `tancheck probe` exits).
    #[serde(default)]
    pub exit_code: i32,
    pub probes: Vec<FiniteProbeResult>,
    /// What the probes did beyond the calls they describe (increments or rigid rotations cut
    /// where the routine asked for smaller ones).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub notes: Vec<String>,
    pub cautions: Vec<String>,
}

impl FiniteProbeReport {
    /// [`FiniteProbeReport::new`] with the notes of [`run_all_noted`].
    pub fn with_notes(
        routine: &str,
        probes: Vec<FiniteProbeResult>,
        notes: Vec<String>,
    ) -> FiniteProbeReport {
        FiniteProbeReport { notes, ..FiniteProbeReport::new(routine, probes) }
    }

    pub fn new(routine: &str, probes: Vec<FiniteProbeResult>) -> FiniteProbeReport {
        let passed = probes.iter().all(|p| p.passed);
        let faulted = probes.iter().any(|p| p.faulted);
        FiniteProbeReport {
            routine: routine.to_string(),
            passed,
            exit_code: if faulted {
                3
            } else if passed {
                0
            } else {
                1
            },
            probes,
            notes: Vec::new(),
            cautions: crate::report::CAUTIONS.iter().map(|s| s.to_string()).collect(),
        }
    }
}

/// Relative tolerance of the rotation probes (common practice: a few hundred ulps of the
/// stress scale).
pub const ROTATION_TOLERANCE: f64 = 1e-9;

fn rotate6(q: &Mat3<f64>, v: &[f64]) -> [f64; 6] {
    let mut s = [0.0; 6];
    s.copy_from_slice(&v[..6]);
    let t = mat3::mul(&mat3::mul(q, &mat3::from_sym6(&s)), &mat3::transpose(q));
    mat3::to_sym6(&t)
}

fn rotate_state(q: &Mat3<f64>, state: &[f64], options: &ProbeOptions) -> Vec<f64> {
    let mut out = state.to_vec();
    for &s in &options.tensor_state {
        if s + 6 <= state.len() {
            out[s..s + 6].copy_from_slice(&rotate6(q, &state[s..s + 6]));
        }
    }
    for &s in &options.rotation_state {
        if s + 9 <= state.len() {
            let r: [f64; 9] = std::array::from_fn(|k| state[s + k]);
            out[s..s + 9].copy_from_slice(&mat3::to_flat(&mat3::mul(q, &mat3::from_flat(&r))));
        }
    }
    out
}

fn norm(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum::<f64>().sqrt()
}

fn diff(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt()
}

/// The start of every increment of `path` (calling the routine along it); a failed call as
/// its increment (1-based) and fault.
fn walk(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
) -> Result<Vec<Start>, (usize, Fault)> {
    let mut starts = Vec::new();
    let mut s = path_start(properties, state0, path);
    for (k, f1) in path.gradients.iter().enumerate().skip(1) {
        s.increment = k as i32;
        starts.push(s.clone());
        let res = ws.call_full(r, &s, f1).map_err(|e| (k, e))?;
        s.f0 = *f1;
        s.stress0 = res.stress;
        s.state0 = res.state;
    }
    s.increment += 1;
    starts.push(s);
    Ok(starts)
}

/// [`walk`], cutting the increments the routine refuses as too large as the check does
/// (`super::cutback`): the starts, the path walked (`path`, or the path cut) and the note
/// saying what was cut; a failed call as its increment of the path walked and its words.
fn walk_cutting(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
) -> Result<(Vec<Start>, FinitePath, Option<String>), String> {
    match walk(r, ws, properties, state0, path) {
        Ok(starts) => Ok((starts, path.clone(), None)),
        Err((k, e)) => {
            let cut = if asks_smaller(&e) { super::cutback::cut(r, properties, state0, path) } else { None };
            let Some(cut) = cut else { return Err(format!("increment {k}: {e}")) };
            let note = cut.note(path.gradients.len() - 1);
            let starts = walk(r, ws, properties, state0, &cut.path)
                .map_err(|(k, e)| format!("increment {k} of the path cut where the routine asked: {e}"))?;
            Ok((starts, cut.path, Some(note)))
        }
    }
}

/// All probes.
pub fn run_all(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
    options: &ProbeOptions,
) -> Vec<FiniteProbeResult> {
    run_all_noted(r, properties, state0, path, options).0
}

/// [`run_all`], with notes on what the probes did beyond the calls they describe (the path or
/// a rigid rotation cut where the routine asked for smaller increments).
pub fn run_all_noted(
    r: &mut dyn FiniteRoutine,
    properties: &[f64],
    state0: &[f64],
    path: &FinitePath,
    options: &ProbeOptions,
) -> (Vec<FiniteProbeResult>, Vec<String>) {
    let mut ws = Workspace::new(r.info().nstate, r.info().nproperties);
    let mut notes = Vec::new();
    let (starts, path) = match walk_cutting(r, &mut ws, properties, state0, path) {
        Ok((s, p, note)) => {
            notes.extend(note);
            (s, p)
        }
        Err(e) => {
            let failed = FiniteProbeResult {
                name: "path".into(),
                passed: false,
                summary: format!("the routine failed along the path: {e}"),
                details: vec![],
                faulted: true,
            };
            return (vec![failed], notes);
        }
    };
    let scale = starts.iter().map(|s| norm(&s.stress0)).fold(0.0, f64::max).max(1e-300);
    let mut rotation = Rotation {
        r,
        ws: &mut ws,
        starts: &starts,
        options,
        scale,
        cuts: [RotationCuts(1), RotationCuts(1)],
    };
    let mut results = vec![rotation.superposed(&path), rotation.increment(), rotation.stretch_rotate()];
    let [c1, c2] = rotation.cuts;
    notes.extend(rotation_note("rotation-increment", &c1));
    notes.extend(rotation_note("stretch-rotate", &c2));
    let (shear, note) = simple_shear(r, &mut ws, properties, state0, options);
    results.push(shear);
    notes.extend(note.map(|n| format!("simple-shear: {n}")));
    (results, notes)
}

const ANGLES: [f64; 2] = [0.01, 1.2];

/// The small and the large rotation about [`AXIS`]: (angle, Q).
fn rotations() -> impl Iterator<Item = (f64, Mat3<f64>)> {
    ANGLES.into_iter().map(|angle| (angle, mat3::axis_rotation(AXIS, angle)))
}

/// The difference `d` relative to the size of `of` (of a zero vector: `d` itself, large).
fn relative(d: f64, of: &[f64]) -> f64 {
    d / norm(of).max(1e-300)
}

/// ", state E" where there is a state, else nothing: the state part of a detail line.
fn state_part(state: &[f64], error: f64) -> String {
    if state.is_empty() {
        String::new()
    } else {
        format!(", state {error:.2e}")
    }
}

/// The largest relative difference a rotation probe found and a line for each case over the
/// tolerance or whose call failed: the bookkeeping every rotation probe shares.
#[derive(Default)]
struct Findings {
    worst: f64,
    details: Vec<String>,
    faulted: bool,
    /// Some case had the stress rotate (within the tolerance) and the state not.
    state_alone: bool,
    /// A zero increment from a start changed the stress or state (the update does not
    /// settle): said, the rigid increments compared with that zero increment's result.
    unsettled: Option<String>,
}

impl Findings {
    /// A call that failed: the probe cannot pass.
    fn failed(&mut self, detail: String) {
        self.details.push(detail);
        self.worst = f64::INFINITY;
        self.faulted = true;
    }

    /// A relative difference `m`, described by `detail` when it is over the tolerance.
    fn difference(&mut self, m: f64, detail: impl FnOnce() -> String) {
        if m > ROTATION_TOLERANCE {
            self.details.push(detail());
        }
        self.worst = self.worst.max(m);
    }

    /// The stress difference `stress` and the state's `state` of one case: whether the state
    /// alone is off.
    fn note_state(&mut self, stress: f64, state: f64) {
        self.state_alone |= stress <= ROTATION_TOLERANCE && state > ROTATION_TOLERANCE;
    }

    fn verdict(self, name: &str, what: &str) -> FiniteProbeResult {
        let Findings { worst, details, faulted, state_alone, unsettled } = self;
        let unsettled = unsettled.map_or(String::new(), |u| format!("; {u}"));
        // Where the stress rotates and the state does not, the declaration is the likelier
        // culprit (a correct routine keeping a reference-configuration tensor, declared in
        // tensor_state as the README then asked, read "NOT objective" with no word; a
        // user-style sweep).
        let hint = if state_alone {
            "; the stress rotates as it should and the state does not follow: `tensor_state` must list \
             exactly the state's spatial symmetric tensors and `rotation_state` the rotations it keeps (a \
             tensor of the reference configuration, such as an inverse plastic right Cauchy–Green tensor, \
             does not rotate and is left out; a spatial one or a rotation left out is rotated by nobody)"
        } else {
            ""
        };
        let passed = worst <= ROTATION_TOLERANCE;
        FiniteProbeResult {
            name: name.into(),
            passed,
            summary: if passed {
                format!("{what} (largest relative difference {worst:.1e}){unsettled}")
            } else {
                if worst.is_finite() {
                    // The largest of the stress, state and energy differences, each relative
                    // to its own size: the details say which.
                    format!(
                        "NOT objective: it should hold that {what}; largest relative difference {worst:.2e}{hint}{unsettled}"
                    )
                } else {
                    format!("NOT objective: it should hold that {what}; a call failed")
                }
            },
            details,
            faulted,
        }
    }
}

/// What the three rotation probes share: the routine, the starts of the path's increments, the
/// options and the stress scale the differences are relative to.
struct Rotation<'a> {
    r: &'a mut dyn FiniteRoutine,
    ws: &'a mut Workspace,
    starts: &'a [Start],
    options: &'a ProbeOptions,
    scale: f64,
    /// The rigid rotations cut in `rotation-increment` and `stretch-rotate`.
    cuts: [RotationCuts; 2],
}

impl Rotation<'_> {
    fn superposed(&mut self, path: &FinitePath) -> FiniteProbeResult {
        let mut found = Findings::default();
        for (angle, q) in rotations() {
            for (k, s) in self.starts[..self.starts.len() - 1].iter().enumerate() {
                let f1 = path.gradients[k + 1];
                let (Ok(a), Ok(b)) = (self.ws.call_full(self.r, s, &f1), {
                    let mut t = s.clone();
                    t.f0 = mat3::mul(&q, &s.f0);
                    t.stress0 = rotate6(&q, &s.stress0);
                    t.state0 = rotate_state(&q, &s.state0, self.options);
                    self.ws.call_full(self.r, &t, &mat3::mul(&q, &f1))
                }) else {
                    found.failed(format!("increment {}: a call failed", k + 1));
                    continue;
                };
                let e = diff(&b.stress, &rotate6(&q, &a.stress)) / self.scale;
                let es = relative(diff(&b.state, &rotate_state(&q, &a.state, self.options)), &a.state);
                let ee = if a.outcome.provides(crate::routine::provides::ENERGY) {
                    relative(diff(&b.energy, &a.energy), &a.energy)
                } else {
                    0.0
                };
                found.note_state(e, es);
                found.difference(e.max(es).max(ee), || {
                    let state = state_part(&s.state0, es);
                    format!(
                        "increment {}, rotation {angle} rad: stress {e:.2e}{state}, energy {ee:.2e}",
                        k + 1
                    )
                });
            }
        }
        found.verdict("rotation-superposed", "a rigid rotation of the whole motion rotates stress and state")
    }

    /// The stress and state of a zero increment from `s`, and how far they moved from the
    /// start (stress, relative to the scale; state, relative to its size). A routine whose
    /// update does not settle (a hardening variable never stored) moves there too; a zero
    /// increment the routine refuses leaves the start (a rigid increment's own call then says
    /// what it refuses).
    fn zero_increment(&mut self, s: &Start) -> ([f64; 6], Vec<f64>, f64, f64) {
        let (stress, state) = match self.ws.call_full(self.r, s, &s.f0) {
            Ok(z) => (z.stress, z.state.clone()),
            Err(_) => (s.stress0, s.state0.clone()),
        };
        let moved = diff(&stress, &s.stress0) / self.scale;
        let moved_state = relative(diff(&state, &s.state0), &s.state0);
        (stress, state, moved, moved_state)
    }

    fn increment(&mut self) -> FiniteProbeResult {
        let mut found = Findings::default();
        // Each start's zero increment, once: the rigid increment is judged against it, not
        // against the start (an objective routine whose update does not settle read "NOT
        // objective"; a user-style sweep).
        let starts = self.starts[1..].to_vec();
        let zeros: Vec<([f64; 6], Vec<f64>)> = starts
            .iter()
            .map(|s| {
                let (stress, state, moved, moved_state) = self.zero_increment(s);
                if moved.max(moved_state) > ROTATION_TOLERANCE && found.unsettled.is_none() {
                    found.unsettled = Some(format!(
                        "a zero increment after increment {} changes the stress by {moved:.2e} and the state by \
                         {moved_state:.2e} (the update does not settle: a call from its own end state moves it \
                         again); the rigid increments are compared with the zero increment's stress and state",
                        s.increment - 1
                    ));
                }
                (stress, state)
            })
            .collect();
        for (angle, q) in rotations() {
            for (s, (zero_stress, zero_state)) in starts.iter().zip(&zeros) {
                let b = match rotate_rigidly(self.r, self.ws, s, &s.f0, (0.0, angle), &mut self.cuts[0]) {
                    Ok(b) => b,
                    Err(e) => {
                        found.failed(format!(
                            "rigid increment of {angle} rad after increment {}: {e}",
                            s.increment - 1
                        ));
                        continue;
                    }
                };
                let e = diff(&b.stress, &rotate6(&q, zero_stress)) / self.scale;
                let es = relative(diff(&b.state, &rotate_state(&q, zero_state, self.options)), zero_state);
                found.note_state(e, es);
                found.difference(e.max(es), || {
                    let state = state_part(&s.state0, es);
                    format!(
                        "rigid increment of {angle} rad after increment {}: stress {e:.2e}{state}",
                        s.increment - 1
                    )
                });
            }
        }
        found.verdict("rotation-increment", "a rigid increment rotates the stress")
    }

    fn stretch_rotate(&mut self) -> FiniteProbeResult {
        let end = self.starts.last().expect("a path has increments").clone();
        let mut s = end.clone();
        let mut found = Findings::default();
        // An update that does not settle moves the stress at every step, rotated or not: said,
        // as the likelier reason of a difference (a routine that never stored its hardening
        // variable read only "NOT objective"; a user-style sweep).
        let (_, _, moved, moved_state) = self.zero_increment(&end);
        if moved.max(moved_state) > ROTATION_TOLERANCE {
            found.unsettled = Some(format!(
                "a zero increment from the end of the path changes the stress by {moved:.2e} and the state by \
                 {moved_state:.2e}: the update does not settle (a call from its own end state moves it again), \
                 which each rotation step repeats"
            ));
        }
        let steps = 6;
        let step = std::f64::consts::FRAC_PI_2 / steps as f64;
        for k in 1..=steps {
            let q = mat3::axis_rotation(AXIS, step * k as f64);
            let f1 = mat3::mul(&q, &end.f0);
            let angles = (step * (k - 1) as f64, step * k as f64);
            let res = match rotate_rigidly(self.r, self.ws, &s, &end.f0, angles, &mut self.cuts[1]) {
                Ok(x) => x,
                Err(e) => {
                    found.failed(format!("rotation step {k}: {e}"));
                    break;
                }
            };
            let qt = mat3::transpose(&q);
            let e = diff(&rotate6(&qt, &res.stress), &end.stress0) / self.scale;
            let es = relative(diff(&rotate_state(&qt, &res.state, self.options), &end.state0), &end.state0);
            let e = e.max(es);
            found.difference(e, || {
                format!(
                    "rotation step {k} ({:.1} degrees): stress or state in the rotated frame off by {e:.2e}",
                    90.0 * k as f64 / steps as f64
                )
            });
            s.f0 = f1;
            s.stress0 = res.stress;
            s.state0 = res.state;
            s.increment += 1;
        }
        found.verdict(
            "stretch-rotate",
            "after the stretch, a rigid rotation leaves the stress in the rotated frame unchanged",
        )
    }
}

fn simple_shear(
    r: &mut dyn FiniteRoutine,
    ws: &mut Workspace,
    properties: &[f64],
    state0: &[f64],
    options: &ProbeOptions,
) -> (FiniteProbeResult, Option<String>) {
    let n = 400;
    let amount = 2.0 * std::f64::consts::PI;
    let mut gradients = vec![mat3::identity()];
    gradients.extend((1..=n).map(|k| shear(amount * k as f64 / n as f64)));
    let path = FinitePath { gradients, dtime: Vec::new() };
    let (starts, note) = match walk_cutting(r, ws, properties, state0, &path) {
        Ok((s, _, note)) => (s, note),
        Err(e) => {
            let failed = FiniteProbeResult {
                name: "simple-shear".into(),
                passed: false,
                summary: format!("the routine failed in simple shear: {e}"),
                details: vec![],
                faulted: true,
            };
            return (failed, None);
        }
    };
    // The amount of shear of each start is read from its F (the path may have been cut).
    let gamma = |s: &Start| s.f0[0][1];
    let modulus = starts[1].stress0[5] / gamma(&starts[1]);
    let mut peak = f64::NEG_INFINITY;
    let mut drop = 0.0_f64;
    let mut dienes = 0.0_f64;
    for s in starts.iter().skip(1) {
        let t12 = s.stress0[5];
        peak = peak.max(t12);
        drop = drop.max(peak - t12);
        // Both the shear and the normal stress: an update that turns the stress the wrong way
        // round has the shear right and σ₁₁ of the wrong sign (a user-style sweep).
        let g = gamma(s);
        dienes =
            dienes.max((t12 - modulus * g.sin()).abs()).max((s.stress0[0] - modulus * (1.0 - g.cos())).abs());
    }
    let oscillates = drop > 0.01 * peak.abs();
    let expected = options.shear_response == ShearResponse::Oscillating;
    // first-order update: allow a few increments' worth of G Δγ (common practice)
    let dienes_ok = dienes <= 0.05 * modulus.abs();
    let passed = oscillates == expected && (!expected || dienes_ok);
    let what = if oscillates {
        format!(
            "the shear stress oscillates (falls by {:.3} of its peak) as a hypoelastic Jaumann update does",
            drop / peak.abs()
        )
    } else {
        "the shear stress grows monotonically up to gamma = 2 pi".to_string()
    };
    let mut details = vec![format!("shear modulus from the first increment G = {modulus:.6e}")];
    if oscillates {
        details.push(format!(
            "largest distance from sigma12 = G sin(gamma), sigma11 = G (1 - cos(gamma)) (Dienes 1979): {:.2e} G",
            dienes / modulus.abs()
        ));
    }
    let expected_word = match options.shear_response {
        ShearResponse::Monotonic => "monotonic",
        ShearResponse::Oscillating => "oscillating",
    };
    let result = FiniteProbeResult {
        name: "simple-shear".into(),
        passed,
        summary: if passed {
            what
        } else if oscillates == expected {
            format!(
                "the shear stress oscillates, but not as a hypoelastic Jaumann update does: {:.2e} G from \
                 sigma12 = G sin(gamma), sigma11 = G (1 - cos(gamma)) (more than 0.05 G)",
                dienes / modulus.abs()
            )
        } else {
            format!("unexpected: {what} (expected {expected_word})")
        },
        details,
        faulted: false,
    };
    (result, note)
}
