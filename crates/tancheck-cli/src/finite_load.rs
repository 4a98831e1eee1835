//! Finite-strain manifests and their routines: a manifest with a `finite` section names the
//! routine's stress and tangent measure and its corotational frame; the path is a path in
//! the deformation gradient. The routine is a Rust model or a library routine called
//! through the guarded shim.
//!
//! ```json
//! { "finite": { "stress": "kirchhoff", "tangent": "tau-jaumann", "frame": "none" },
//!   "routine": { "model": "neo-hookean", "properties": [1000, 0.3] },
//!   "path": { "shape": "simple-shear", "amount": 1.0, "increments": 5 } }
//! ```

use std::path::{Path as FsPath, PathBuf};

use anyhow::{anyhow, bail, Result};
use serde::Deserialize;
use tancheck_abi::Library;
use tancheck_core::finite::check::FiniteSettings;
use tancheck_core::finite::probe::ProbeOptions;
use tancheck_core::finite::{
    FiniteInfo, FiniteModelRoutine, FinitePathSpec, FiniteRoutine, Frame, StressMeasure, TangentMeasure,
};
use tancheck_models::finite::{finite_zoo, FiniteZooModel, HypoJaumann, J2Log, NeoHookean};

use crate::manifest::Guards;

/// The measures a finite-strain routine declares.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FiniteSpec {
    /// `cauchy` or `kirchhoff`.
    pub stress: String,
    /// One of the tangent measures (`tau-jaumann`, `sigma-jaumann`, `tau-truesdell`,
    /// `sigma-truesdell`, `tau-green-naghdi`, `dp-df`, `ds-de`).
    pub tangent: String,
    /// The corotational frame whose rotation increment the routine receives: `none`
    /// (default), `jaumann` or `green-naghdi`.
    #[serde(default)]
    pub frame: Option<String>,
}

#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FiniteRoutineSpec {
    pub library: Option<PathBuf>,
    pub symbol: Option<String>,
    /// A built-in model: `neo-hookean` or `j2-log` (in the declared measures), `hypo-jaumann`, `hypo-j2` (with von Mises plasticity), or a row
    /// of the finite-strain zoo.
    pub model: Option<String>,
    #[serde(default)]
    pub states: usize,
    pub properties: Vec<f64>,
}

#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FiniteStart {
    #[serde(default)]
    pub state: Vec<f64>,
}

/// A finite-strain manifest.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FiniteManifest {
    pub finite: FiniteSpec,
    pub routine: FiniteRoutineSpec,
    #[serde(default)]
    pub start: FiniteStart,
    #[serde(default)]
    pub path: FinitePathSpec,
    #[serde(default)]
    pub check: FiniteSettings,
    #[serde(default)]
    pub probes: ProbeOptions,
    /// Memory guards around a library routine: `off`, `light` (default) or `full`.
    #[serde(default)]
    pub guards: Guards,
    /// Floating-point traps inside a library routine (as a point manifest's `fp_traps`; the
    /// command line's `--fp-traps` sets them too).
    #[serde(default)]
    pub fp_traps: bool,
}

/// The measures, parsed.
pub struct Declared {
    pub stress: StressMeasure,
    pub tangent: TangentMeasure,
    pub frame: Frame,
}

impl FiniteManifest {
    /// Whether the file is a finite-strain manifest (valid JSON with a `finite` key); a file
    /// that is not valid JSON is left to the ordinary manifest's error messages.
    pub fn detect(path: &FsPath) -> bool {
        let Ok(text) = std::fs::read_to_string(path) else { return false };
        match serde_json::from_str::<serde_json::Value>(&text) {
            Ok(v) => v.get("finite").is_some(),
            // Not valid JSON: a manifest with a `"finite":` key is read as a finite-strain one,
            // whose loader names the syntax error where it is (the point manifest's loader
            // stopped at the `finite` field first, "unknown field", found by a user-style
            // sweep).
            Err(_) => has_key(&text, "finite"),
        }
    }

    /// Read and validate; errors name the file.
    pub fn load(path: &FsPath) -> Result<(FiniteManifest, Declared, PathBuf)> {
        let file = path.display();
        let text = std::fs::read_to_string(path).map_err(|e| anyhow::anyhow!("cannot read {file}: {e}"))?;
        let m: FiniteManifest = serde_json::from_str(&text).map_err(|e| {
            anyhow::anyhow!(
                "{file}:{}:{}: {}",
                e.line(),
                e.column(),
                crate::manifest::json_message(&e, &text)
            )
        })?;
        let d = m.declared().map_err(|e| anyhow::anyhow!("{file}: {e}"))?;
        m.path.build().map_err(|e| anyhow::anyhow!("{file}: path: {e}"))?;
        let r = &m.routine;
        match (&r.library, &r.symbol, &r.model) {
            (Some(_), Some(_), None) | (None, None, Some(_)) => {}
            _ => bail!("{file}: give routine.library and routine.symbol, or routine.model"),
        }
        if r.properties.iter().any(|p| !p.is_finite()) {
            bail!("{file}: routine.properties must be finite numbers");
        }
        if !m.start.state.is_empty() && m.start.state.len() != r.states {
            bail!("{file}: start.state has {} entries, routine.states is {}", m.start.state.len(), r.states);
        }
        // A symmetric tensor in the state takes 6 entries from its first slot, a rotation 9:
        // inside the state, and no two of them sharing an entry (the probes rotate each one).
        let mut slots: Vec<(usize, usize, &str)> =
            m.probes.tensor_state.iter().map(|&t| (t, 6, "tensor_state")).collect();
        slots.extend(m.probes.rotation_state.iter().map(|&t| (t, 9, "rotation_state")));
        slots.sort_unstable();
        if let Some(&(t, w, key)) = slots.iter().find(|&&(t, w, _)| t + w > r.states) {
            bail!(
                "{file}: probes.{key}: the {} at slot {t} takes state entries {t} to {}, and routine.states is {} \
                 (slots count from 0)",
                if w == 6 { "tensor" } else { "rotation" },
                t + w - 1,
                r.states
            );
        }
        if let Some(p) = slots.windows(2).find(|p| p[1].0 < p[0].0 + p[0].1) {
            bail!(
                "{file}: probes.{} and probes.{}: the entries at slots {} and {} share state entries (a tensor \
                 takes 6, a rotation 9)",
                p[0].2,
                p[1].2,
                p[0].0,
                p[1].0
            );
        }
        let s = m.check;
        if !(s.central_step > 0.0 && s.complex_step > 0.0 && s.tolerance > 0.0) {
            bail!("{file}: check.central_step, check.complex_step and check.tolerance must be positive");
        }
        let dir = path.parent().map(FsPath::to_path_buf).unwrap_or_default();
        Ok((m, d, dir))
    }

    /// The declared measures and frame, parsed (as [`FiniteManifest::load`] checks them).
    pub fn declared_measures(&self) -> Result<Declared, String> {
        self.declared()
    }

    fn declared(&self) -> Result<Declared, String> {
        let f = &self.finite;
        let stress = StressMeasure::parse(&f.stress)
            .ok_or_else(|| format!("finite.stress is `{}`; it must be cauchy or kirchhoff", f.stress))?;
        let tangent = TangentMeasure::parse(&f.tangent).ok_or_else(|| {
            let names: Vec<&str> = TangentMeasure::ALL.iter().map(|m| m.name()).collect();
            format!("finite.tangent is `{}`; it must be one of {}", f.tangent, names.join(", "))
        })?;
        let frame = match &f.frame {
            None => Frame::None,
            Some(s) => Frame::parse(s)
                .ok_or_else(|| format!("finite.frame is `{s}`; it must be none, jaumann or green-naghdi"))?,
        };
        Ok(Declared { stress, tangent, frame })
    }
}

/// The routine a finite-strain manifest names.
pub fn open(m: &FiniteManifest, d: &Declared, dir: &FsPath, file: &str) -> Result<Box<dyn FiniteRoutine>> {
    if let (Some(lib), Some(sym)) = (&m.routine.library, &m.routine.symbol) {
        return open_library(m, d, &dir.join(lib), sym, file);
    }
    let name = m.routine.model.as_deref().unwrap_or_default();
    let check = |s: StressMeasure, t: TangentMeasure, f: Frame| -> Result<()> {
        if (s, t, f) != (d.stress, d.tangent, d.frame) {
            bail!(
                "{file}: model `{name}` takes {} stress, returns the {} tangent and uses frame {}; \
                 the manifest declares {}, {}, {}",
                s.name(),
                t.name(),
                f.name(),
                d.stress.name(),
                d.tangent.name(),
                d.frame.name()
            );
        }
        Ok(())
    };
    if name == NeoHookean::NAME {
        check(d.stress, d.tangent, Frame::None)?;
        let nh = NeoHookean::new(d.stress, d.tangent);
        // Its sizes as the other models' (a property short ended in a panic; found trying the
        // commands as a user).
        let i = tancheck_core::finite::FiniteModel::info(&nh);
        model_sizes(m, i.nproperties, i.nstate, file)?;
        return Ok(Box::new(FiniteModelRoutine(nh)));
    }
    if name == J2Log::NAME {
        check(d.stress, d.tangent, Frame::None)?;
        model_sizes(m, 4, J2Log::NSTATE, file)?;
        return Ok(Box::new(FiniteModelRoutine(J2Log::new(d.stress, d.tangent))));
    }
    if name == HypoJaumann::NAME || name == HypoJaumann::NO_ROTATION_NAME {
        check(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann, Frame::Jaumann)?;
        let h = if name == HypoJaumann::NAME { HypoJaumann::new() } else { HypoJaumann::without_rotation() };
        model_sizes(m, 2, 0, file)?;
        return Ok(Box::new(FiniteModelRoutine(h)));
    }
    for row in finite_zoo() {
        if row.name == name {
            return Ok(match row.model {
                FiniteZooModel::NeoHookean(nh) => {
                    let i = tancheck_core::finite::FiniteModel::info(&nh);
                    check(i.stress, i.tangent, i.frame)?;
                    model_sizes(m, i.nproperties, i.nstate, file)?;
                    Box::new(FiniteModelRoutine(nh))
                }
                FiniteZooModel::Hypo(h) => {
                    check(StressMeasure::Kirchhoff, TangentMeasure::TauJaumann, Frame::Jaumann)?;
                    let i = tancheck_core::finite::FiniteModel::info(&h);
                    model_sizes(m, i.nproperties, i.nstate, file)?;
                    Box::new(FiniteModelRoutine(h))
                }
                FiniteZooModel::J2(j2) => {
                    let i = tancheck_core::finite::FiniteModel::info(&j2);
                    check(i.stress, i.tangent, i.frame)?;
                    model_sizes(m, i.nproperties, i.nstate, file)?;
                    Box::new(FiniteModelRoutine(j2))
                }
            });
        }
    }
    let rows: Vec<&str> = finite_zoo().iter().map(|r| r.name).collect();
    bail!(
        "{file}: no finite-strain model is called `{name}`; they are neo-hookean, j2-log, hypo-jaumann, hypo-no-rotation, {}",
        rows.join(", ")
    )
}

/// A built-in model's properties and states against the manifest's.
fn model_sizes(m: &FiniteManifest, nproperties: usize, nstate: usize, file: &str) -> Result<()> {
    let name = m.routine.model.as_deref().unwrap_or_default();
    if m.routine.properties.len() != nproperties {
        bail!(
            "{file}: model `{name}` takes {nproperties} properties, routine.properties has {}",
            m.routine.properties.len()
        );
    }
    if m.routine.states != nstate {
        bail!("{file}: model `{name}` has {nstate} state variables; set routine.states to {nstate}");
    }
    Ok(())
}

/// The finite-strain routine `symbol` of `library`, with the measures the manifest declares.
pub fn open_library(
    m: &FiniteManifest,
    d: &Declared,
    library: &FsPath,
    symbol: &str,
    file: &str,
) -> Result<Box<dyn FiniteRoutine>> {
    let lib = Library::open(library).map_err(|e| anyhow!("{file}: {e}"))?;
    let info = FiniteInfo {
        name: format!("{}:{symbol}", library.display()),
        stress: d.stress,
        tangent: d.tangent,
        frame: d.frame,
        nstate: m.routine.states,
        nproperties: m.routine.properties.len(),
    };
    let mut r = lib.finite_routine(symbol, info).map_err(|e| anyhow!("{file}: {e}"))?;
    r.set_checks(m.guards != Guards::Off);
    r.set_fp_traps(crate::load::traps_wanted(&lib, m.fp_traps, library, true));
    Ok(Box::new(r))
}

/// Whether `text` holds `"key"` followed (after white space) by a colon: a JSON object key.
pub(crate) fn has_key(text: &str, key: &str) -> bool {
    let quoted = format!("\"{key}\"");
    text.match_indices(&quoted).any(|(at, q)| text[at + q.len()..].trim_start().starts_with(':'))
}

#[cfg(test)]
mod key_tests {
    #[test]
    fn a_key_is_a_quoted_name_before_a_colon() {
        assert!(super::has_key("{ \"finite\" : {}, }", "finite"));
        assert!(!super::has_key("{ \"name\": \"finite\" }", "finite"));
    }
}
