//! Probes: checks of a routine beyond the tangent, each in its own file, each declaring what
//! it needs ([`Needs`]). The suite runner checks the needs against the routine's declared
//! capabilities, the point and the suite entry, and writes the skip reason. A probe walks the
//! suite's path (or makes calls of its own around it) and returns a [`ProbeResult`]; at each
//! increment it gets its own copy of the walk's driver, so it cannot leave state behind.

use serde::{Deserialize, Serialize};

use crate::check::held_components;
use crate::convention::PointKind;
use crate::driver::{Driver, PointState};
use crate::error::CoreError;
use crate::mixed;
use crate::path::Path;
use crate::routine::{Caller, Capabilities, Fault, RoutineInfo};
use crate::settings::Settings;

pub mod conventions;
pub mod determinism;
pub mod energy;
pub mod frame;
pub mod hidden_state;
pub mod immutability;
pub mod irreversibility;
pub mod newton;
pub mod refinement;
pub mod regularisation;
pub mod snap_back;
pub mod softening;
pub mod stability;
pub mod symmetry;
pub mod tangent;
pub mod viscous_limit;
pub mod zero_increment;

/// One probe of a suite, as written in a suite file.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ProbeSpec {
    /// The probe's name, e.g. "symmetry".
    pub probe: String,
    /// The probe's tolerance (each probe documents its default).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tol: Option<f64>,
    /// Increments (1-based) at which the probe runs; all when absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub at: Option<Vec<usize>>,
    /// symmetry: the model is declared symmetric (an unsymmetric tangent then fails).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub symmetric: Option<bool>,
    /// energy: strain amplitude of the closed elastic cycle; frame: rotation angle (rad).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub amplitude: Option<f64>,
    /// refinement: the largest number of sub-increments (a power of 2).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub subdivisions: Option<usize>,
    /// frame: property indices (0-based) of material axis vectors, three entries each, that
    /// rotate with the frame (anisotropic models); absent for isotropic models.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub axes: Option<Vec<usize>>,
    /// frame: `true`, the model is anisotropic (without `axes` the probe is skipped with that
    /// reason); `false`, it is isotropic (a response that does not rotate fails); absent, the
    /// elastic response at the start decides (anisotropic without `axes`: skipped).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub anisotropic: Option<bool>,
    /// frame: state indices (0-based) of scalar state variables (porosity, damage, an
    /// equivalent plastic strain), which no rotation changes: a start state nonzero only in
    /// these is the same in both frames, and the probe runs from it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub scalar_states: Option<Vec<usize>>,
    /// irreversibility, softening, snap-back: state indices (0-based) of damage variables,
    /// which must never fall (their growth marks where softening is expected).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub damage: Option<Vec<usize>>,
    /// regularisation, snap-back: property index (0-based) of the characteristic length.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub length: Option<usize>,
    /// regularisation, snap-back: the fracture energy (per unit area) the path should dissipate.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fracture_energy: Option<f64>,
    /// viscous-limit: property index (0-based) of the viscosity.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub viscosity: Option<usize>,
}

impl ProbeSpec {
    pub fn named(name: &str) -> ProbeSpec {
        ProbeSpec { probe: name.into(), ..Default::default() }
    }

    /// Whether the probe runs at increment `k` (1-based).
    pub fn runs_at(&self, k: usize) -> bool {
        self.at.as_ref().is_none_or(|a| a.contains(&k))
    }

    /// The fields given that this entry's probe does not read (they are ignored): `axes` on
    /// `newton`, `at` on `softening` (they were taken without a word, and a user believed them
    /// set; a user-style sweep). From the probes' own reads of their spec; empty for a probe
    /// not in the table.
    pub fn unread_fields(&self) -> Vec<&'static str> {
        let reads: &[&str] = match self.probe.as_str() {
            "conventions" => &["tol"],
            "determinism" | "hidden-state" | "immutability" => &["at"],
            "energy" => &["tol", "at", "amplitude"],
            "frame" => &["tol", "at", "amplitude", "anisotropic", "axes", "scalar_states"],
            "irreversibility" => &["tol", "at", "damage"],
            "newton" | "tangent" | "zero-increment" | "stability" => &["tol", "at"],
            "refinement" => &["tol", "at", "subdivisions"],
            "regularisation" => &["tol", "length", "fracture_energy"],
            "snap-back" => &["tol", "damage", "length", "fracture_energy"],
            "softening" => &["tol", "damage"],
            "symmetry" => &["tol", "at", "symmetric"],
            "viscous-limit" => &["tol", "at", "viscosity"],
            _ => return Vec::new(),
        };
        let given = [
            ("tol", self.tol.is_some()),
            ("at", self.at.is_some()),
            ("symmetric", self.symmetric.is_some()),
            ("amplitude", self.amplitude.is_some()),
            ("subdivisions", self.subdivisions.is_some()),
            ("axes", self.axes.is_some()),
            ("anisotropic", self.anisotropic.is_some()),
            ("scalar_states", self.scalar_states.is_some()),
            ("damage", self.damage.is_some()),
            ("length", self.length.is_some()),
            ("fracture_energy", self.fracture_energy.is_some()),
            ("viscosity", self.viscosity.is_some()),
        ];
        given.into_iter().filter(|(f, g)| *g && !reads.contains(f)).map(|(f, _)| f).collect()
    }
}

/// A probe's verdict.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum ProbeStatus {
    Pass,
    Fail,
    /// Not applicable, with the reason in the summary.
    Skipped,
}

impl ProbeStatus {
    pub fn word(self) -> &'static str {
        match self {
            ProbeStatus::Pass => "pass",
            ProbeStatus::Fail => "FAIL",
            ProbeStatus::Skipped => "skipped",
        }
    }
}

/// What a probe found.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct ProbeResult {
    pub probe: String,
    pub status: ProbeStatus,
    /// One line for the table.
    pub summary: String,
    /// The probe's measured number (its meaning in `summary`), e.g. the worst asymmetry.
    pub value: Option<f64>,
    pub tol: Option<f64>,
    /// The first increment where the probe failed, if it did.
    pub increment: Option<usize>,
    /// More lines for the detailed view.
    pub details: Vec<String>,
    /// Curves the probe measured along the path, for plots (e.g. Newton residuals per
    /// iteration, the acoustic determinant per increment, the energies per increment).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub series: Vec<ProbeSeries>,
    /// The probe failed because the routine faulted (crashed, returned a failure status, was
    /// flagged by the memory guards), not on a finding about its results.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub fault: bool,
}

/// One curve a probe measured: points (x, y) with both axes named.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct ProbeSeries {
    /// What the curve is, e.g. "increment 5 (order 1.98)".
    pub name: String,
    /// The quantities on the axes, e.g. "iteration" and "residual".
    pub x: String,
    pub y: String,
    /// The y values span decades (residuals): read on a log scale.
    pub log_y: bool,
    pub points: Vec<[f64; 2]>,
}

impl ProbeResult {
    pub fn new(probe: &str, status: ProbeStatus, summary: impl Into<String>) -> ProbeResult {
        ProbeResult {
            probe: probe.into(),
            status,
            summary: summary.into(),
            value: None,
            tol: None,
            increment: None,
            details: Vec::new(),
            series: Vec::new(),
            fault: false,
        }
    }

    pub fn skipped(probe: &str, reason: impl Into<String>) -> ProbeResult {
        ProbeResult::new(probe, ProbeStatus::Skipped, reason)
    }
}

/// What a probe runs with.
pub struct ProbeEnv<'a> {
    pub props: &'a [f64],
    pub start: &'a PointState,
    pub path: &'a Path,
    pub settings: &'a Settings,
    pub spec: &'a ProbeSpec,
}

bitflags::bitflags! {
    /// What a probe needs before it can say anything. [`run_probes`] checks them in the order
    /// listed here and skips the probe with the reason [`unmet`] writes.
    #[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
    pub struct Needs: u16 {
        /// The routine returns a tangent ([`Capabilities::TANGENT`]).
        const TANGENT = 1;
        /// The routine has the complex-step twin.
        const TWIN = 1 << 1;
        /// The routine fills in its energies on every call.
        const ENERGY = 1 << 2;
        /// The routine fills in ∂σ/∂T on every call.
        const DSTRESS_DTEMP = 1 << 3;
        /// A point with a frame to turn (not uniaxial, not cohesive).
        const FRAME = 1 << 4;
        /// A start at zero strain, stress and state.
        const VIRGIN_START = 1 << 5;
        /// A point of more than one component.
        const SEVERAL_COMPONENTS = 1 << 6;
        /// The suite entry declares `damage` (state indices).
        const DAMAGE_INDICES = 1 << 7;
        /// The suite entry declares `length` or `fracture_energy`.
        const LENGTH_OR_FRACTURE_ENERGY = 1 << 8;
    }
}

/// The first of `needs` that the routine (its declared `capabilities` and `info`) or the suite
/// entry in `env` does not meet, as the reason to skip the probe; `None` when all are met.
pub fn unmet(
    needs: Needs,
    capabilities: Capabilities,
    info: &RoutineInfo,
    env: &ProbeEnv<'_>,
) -> Option<String> {
    let missing = |what: &str| format!("needs {what}, which {} does not declare", info.name);
    let s = env.start;
    for need in needs.iter() {
        let why = if need == Needs::TANGENT && !capabilities.contains(Capabilities::TANGENT) {
            missing("the tangent")
        } else if need == Needs::TWIN && !capabilities.contains(Capabilities::TWIN) {
            missing("the complex-step twin (`<symbol>_cx`, built by `tancheck build`)")
        } else if need == Needs::ENERGY && !capabilities.contains(Capabilities::ENERGY) {
            missing("the energy outputs")
        } else if need == Needs::DSTRESS_DTEMP && !capabilities.contains(Capabilities::DSTRESS_DTEMP) {
            missing("∂σ/∂T")
        } else if need == Needs::FRAME && info.convention.kind() == PointKind::Uniaxial {
            "a uniaxial point has no frame to turn".into()
        } else if need == Needs::FRAME && info.convention.kind().is_cohesive() {
            "a cohesive point's components are already in the interface frame".into()
        } else if need == Needs::VIRGIN_START
            && (s.strain.iter().chain(&s.stress).any(|&x| x != 0.0)
                || s.state.iter().enumerate().any(|(i, &x)| {
                    x != 0.0 && !env.spec.scalar_states.as_ref().is_some_and(|v| v.contains(&i))
                }))
        {
            "the start has nonzero strain, stress or state: rotating it would need the meaning of each state \
             variable (declare the scalar ones, which no rotation changes, with \"scalar_states\": [state indices])"
                .into()
        } else if need == Needs::SEVERAL_COMPONENTS && info.convention.ncomp() < 2 {
            "a point with one component has no component to solve for by Newton's method".into()
        } else if need == Needs::DAMAGE_INDICES && env.spec.damage.as_ref().is_none_or(|v| v.is_empty()) {
            "no damage variables declared (\"damage\": [state indices])".into()
        } else if need == Needs::LENGTH_OR_FRACTURE_ENERGY
            && env.spec.length.is_none()
            && env.spec.fracture_energy.is_none()
        {
            "neither \"length\" nor \"fracture_energy\" declared".into()
        } else {
            continue;
        };
        return Some(why);
    }
    None
}

/// The suite entry's `scalar_states` are state variables of the routine (bad input otherwise).
pub(crate) fn scalar_states_fit(probe: &str, spec: &ProbeSpec, nstate: usize) -> Result<(), CoreError> {
    match spec.scalar_states.iter().flatten().find(|&&i| i >= nstate) {
        Some(&bad) => Err(CoreError::ProbeInput(format!(
            "{probe}: scalar state index {bad} is not a state variable (the routine has {nstate})"
        ))),
        None => Ok(()),
    }
}

/// A probe.
pub trait Probe {
    fn name(&self) -> &'static str;
    /// What it needs; the suite runner checks them before [`Probe::run`].
    fn needs(&self) -> Needs;
    /// Run it. Errors are bad input; a crashing routine is a failed probe with the fault.
    fn run(&self, caller: &mut Caller<'_>, env: &ProbeEnv<'_>) -> Result<ProbeResult, CoreError>;
}

/// Every probe this build knows, by name.
pub fn registry() -> Vec<Box<dyn Probe>> {
    vec![
        Box::new(tangent::Tangent),
        Box::new(symmetry::Symmetry),
        Box::new(zero_increment::ZeroIncrement),
        Box::new(determinism::Determinism),
        Box::new(hidden_state::HiddenState),
        Box::new(immutability::Immutability),
        Box::new(refinement::Refinement),
        Box::new(energy::Energy),
        Box::new(stability::Stability),
        Box::new(newton::NewtonRate),
        Box::new(frame::Frame),
        Box::new(conventions::Conventions),
        Box::new(irreversibility::Irreversibility),
        Box::new(regularisation::Regularisation),
        Box::new(softening::Softening),
        Box::new(viscous_limit::ViscousLimit),
        Box::new(snap_back::SnapBack),
    ]
}

/// The probe called `name`.
pub fn by_name(name: &str) -> Option<Box<dyn Probe>> {
    registry().into_iter().find(|p| p.name() == name)
}

/// Walk the path: for each increment set it on a driver (solving held stress components),
/// make the base call, hand the driver to `each` (1-based increment number), then advance.
pub fn walk(
    caller: &mut Caller<'_>,
    env: &ProbeEnv<'_>,
    mut each: impl FnMut(usize, &mut Driver, &mut Caller<'_>) -> Result<(), Fault>,
) -> Result<(), (usize, Fault)> {
    let info = caller.info().clone();
    let conv = info.convention.clone();
    let mut driver = Driver::new(&info, env.props, env.start.clone())
        .map_err(|e| (0, Fault::Unsupported(e.to_string())))?;
    let mut dstrain = vec![0.0; conv.ncomp()];
    for (k, inc) in env.path.increments.iter().enumerate() {
        conv.strain_from_canonical(&inc.dstrain, &mut dstrain);
        driver.set_increment(&dstrain, inc.dtemp, inc.dtime);
        let r = match &inc.hold_stress {
            None => driver.base_call(caller),
            Some(hold) => {
                let (c, t) = held_components(&conv, hold);
                mixed::solve(&mut driver, caller, &c, &t, &env.settings.mixed, true).map(|_| ())
            }
        };
        r.map_err(|f| (k + 1, f))?;
        // The probe works on its own copy: whatever it does to it, the walk goes on from the
        // base call.
        let mut own = driver.clone();
        each(k + 1, &mut own, caller).map_err(|f| (k + 1, f))?;
        driver.advance();
    }
    Ok(())
}

/// A probe result for a routine that failed during the probe.
pub fn faulted(probe: &str, at: usize, f: &Fault) -> ProbeResult {
    let mut r = faulted_in(probe, &format!("at increment {at}"), f);
    r.increment = Some(at);
    r
}

/// A probe result for a routine that failed in calls of the probe's own, off the path
/// (`place`: "in the closed elastic cycle from the start state").
pub fn faulted_in(probe: &str, place: &str, f: &Fault) -> ProbeResult {
    let mut r = ProbeResult::new(probe, ProbeStatus::Fail, format!("the routine failed {place}: {f}"));
    r.fault = true;
    r
}

/// Relative difference ‖a − b‖ / max(‖b‖, floor).
pub fn rel_diff(a: &[f64], b: &[f64], floor: f64) -> f64 {
    let d = a.iter().zip(b).map(|(x, y)| (x - y) * (x - y)).sum::<f64>().sqrt();
    let n = b.iter().map(|y| y * y).sum::<f64>().sqrt();
    d / n.max(floor)
}

/// The report of a probe suite.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct SuiteReport {
    pub tool: String,
    pub suite: String,
    pub routine: String,
    pub path: String,
    pub results: Vec<ProbeResult>,
    pub pass: bool,
    /// The command's exit code: 0 every probe passed or was skipped, 1 a probe failed on its
    /// finding, 3 a probe failed because the routine faulted in it (as a check's routine
    /// fault). Reports written before it was added read as 0 (use `pass`).
    #[serde(default)]
    pub exit_code: i32,
    /// Things the user should know that are not findings (a path cut where the routine asked
    /// for smaller increments).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub notes: Vec<String>,
    pub cautions: Vec<String>,
}

impl SuiteReport {
    /// The exit code of a suite with these results (see [`SuiteReport::exit_code`]).
    pub fn exit_code_of(results: &[ProbeResult]) -> i32 {
        use crate::report::Verdict;
        let failed = || results.iter().filter(|r| r.status == ProbeStatus::Fail);
        if failed().any(|r| r.fault) {
            Verdict::RoutineFault.exit_code()
        } else if failed().next().is_some() {
            Verdict::TangentFailure.exit_code()
        } else {
            Verdict::Pass.exit_code()
        }
    }
}

/// Run probes given by name on a routine (see [`run_probes`]).
pub fn run_suite(
    caller: &mut Caller<'_>,
    suite: &str,
    specs: &[ProbeSpec],
    props: &[f64],
    start: &PointState,
    path: &Path,
    settings: &Settings,
) -> Result<SuiteReport, CoreError> {
    run_suite_with(caller, suite, specs, props, start, path, settings, &mut |_| {})
}

/// [`run_suite`] calling `progress` with the number of probes done after each probe (the
/// count starts again when the suite runs again on a cut path).
#[allow(clippy::too_many_arguments)]
pub fn run_suite_with(
    caller: &mut Caller<'_>,
    suite: &str,
    specs: &[ProbeSpec],
    props: &[f64],
    start: &PointState,
    path: &Path,
    settings: &Settings,
    progress: &mut dyn FnMut(usize),
) -> Result<SuiteReport, CoreError> {
    let mut probes = Vec::with_capacity(specs.len());
    for spec in specs {
        let probe = by_name(&spec.probe).ok_or_else(|| {
            let names: Vec<_> = registry().iter().map(|p| p.name()).collect();
            CoreError::UnknownProbe { given: spec.probe.clone(), known: names.join(", ") }
        })?;
        probes.push((probe, spec));
    }
    let probes: Vec<(&dyn Probe, &ProbeSpec)> = probes.iter().map(|(p, s)| (p.as_ref(), *s)).collect();
    run_probes_with(caller, suite, &probes, props, start, path, settings, progress)
}

/// Run `probes`, each with its suite entry, on a routine: a probe whose [`Needs`] are not met
/// is skipped with the reason [`unmet`] gives, without a call.
///
/// When a probe faulted and the routine asks for smaller increments along the path, the
/// suite runs again on the path cut where it asked ([`crate::cutback`]), each `at` moved to
/// the last part of its increment, with a note.
pub fn run_probes(
    caller: &mut Caller<'_>,
    suite: &str,
    probes: &[(&dyn Probe, &ProbeSpec)],
    props: &[f64],
    start: &PointState,
    path: &Path,
    settings: &Settings,
) -> Result<SuiteReport, CoreError> {
    run_probes_with(caller, suite, probes, props, start, path, settings, &mut |_| {})
}

/// [`run_probes`] with the progress of [`run_suite_with`].
#[allow(clippy::too_many_arguments)]
fn run_probes_with(
    caller: &mut Caller<'_>,
    suite: &str,
    probes: &[(&dyn Probe, &ProbeSpec)],
    props: &[f64],
    start: &PointState,
    path: &Path,
    settings: &Settings,
    progress: &mut dyn FnMut(usize),
) -> Result<SuiteReport, CoreError> {
    let report = run_probes_on(caller, suite, probes, props, start, path, settings, progress)?;
    if !report.results.iter().any(|r| r.fault) {
        return Ok(report);
    }
    let Some(cut) = crate::cutback::cut(caller, props, start, path)? else {
        return Ok(report);
    };
    // Increment k of the path given ends where its last part ends.
    let mut ends = Vec::with_capacity(path.increments.len());
    let mut at = 0;
    for k in 1..=path.increments.len() {
        at += cut.cuts.iter().find(|(i, _)| *i == k).map_or(1, |(_, parts)| *parts);
        ends.push(at);
    }
    let specs: Vec<ProbeSpec> = probes
        .iter()
        .map(|(_, s)| {
            let mut s = (*s).clone();
            if let Some(at) = &mut s.at {
                for k in at.iter_mut() {
                    *k = k.checked_sub(1).and_then(|i| ends.get(i)).copied().unwrap_or(*k);
                }
            }
            s
        })
        .collect();
    let moved: Vec<(&dyn Probe, &ProbeSpec)> = probes.iter().zip(&specs).map(|((p, _), s)| (*p, s)).collect();
    let mut again = run_probes_on(caller, suite, &moved, props, start, &cut.path, settings, progress)?;
    again.notes.push(cut.note(path.increments.len()));
    Ok(again)
}

/// [`run_probes`] on `path` as given.
#[allow(clippy::too_many_arguments)]
fn run_probes_on(
    caller: &mut Caller<'_>,
    suite: &str,
    probes: &[(&dyn Probe, &ProbeSpec)],
    props: &[f64],
    start: &PointState,
    path: &Path,
    settings: &Settings,
    progress: &mut dyn FnMut(usize),
) -> Result<SuiteReport, CoreError> {
    let mut results = Vec::new();
    let info = caller.info().clone();
    for &(probe, spec) in probes {
        scalar_states_fit(probe.name(), spec, info.nstate)?;
        let env = ProbeEnv { props, start, path, settings, spec };
        match unmet(probe.needs(), caller.capabilities(), &info, &env) {
            Some(why) => results.push(ProbeResult::skipped(probe.name(), why)),
            None => results.push(probe.run(caller, &env)?),
        }
        progress(results.len());
    }
    let pass = results.iter().all(|r| r.status != ProbeStatus::Fail);
    let exit_code = SuiteReport::exit_code_of(&results);
    Ok(SuiteReport {
        tool: format!("tancheck {}", env!("CARGO_PKG_VERSION")),
        suite: suite.into(),
        routine: caller.info().name.clone(),
        path: path.name.clone(),
        results,
        pass,
        exit_code,
        notes: Vec::new(),
        cautions: crate::report::CAUTIONS.iter().map(|s| s.to_string()).collect(),
    })
}
