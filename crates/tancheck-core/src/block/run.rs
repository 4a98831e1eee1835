//! One block check: the elastic response, the walk of one point (tangent, energy, deletion),
//! point independence and increment refinement, gathered in a [`BlockReport`].

use super::along;
use super::independence;
use super::rate;
use super::refine;
use super::report::BlockReport;
use super::routine::BlockRoutine;
use super::settings::BlockSettings;
use crate::path::Path;

/// The path's increments in the block routine's order (11, 22, 33, 23, 13, 12 or 11, 22, 33,
/// 12) with engineering shear, and their time increments.
pub fn block_increments(path: &Path, ncomp: usize) -> Result<Vec<(Vec<f64>, f64)>, String> {
    path.validate().map_err(|e| e.to_string())?;
    let mut out = Vec::with_capacity(path.increments.len());
    for (k, inc) in path.increments.iter().enumerate() {
        if inc.hold_stress.is_some() {
            return Err(format!(
                "increment {} holds stresses; block routines are checked on strain-controlled paths",
                k + 1
            ));
        }
        let d = inc.dstrain;
        let v = match ncomp {
            6 => vec![d[0], d[1], d[2], 2.0 * d[3], 2.0 * d[4], 2.0 * d[5]],
            4 if d[3] == 0.0 && d[4] == 0.0 => vec![d[0], d[1], d[2], 2.0 * d[5]],
            4 => {
                return Err(format!(
                    "increment {} has 23 or 13 shear, which a 4-component block routine does not have",
                    k + 1
                ))
            }
            _ => return Err(format!("block routines have 6 or 4 components, not {ncomp}")),
        };
        out.push((v, inc.dtime));
    }
    Ok(out)
}

/// Check a block routine along `path`.
pub fn run(
    routine: &mut dyn BlockRoutine,
    properties: &[f64],
    path: &Path,
    settings: &BlockSettings,
) -> Result<BlockReport, String> {
    let info = routine.info().clone();
    if properties.len() != info.nproperties {
        return Err(format!(
            "{} has {} properties, the manifest gives {}",
            info.name,
            info.nproperties,
            properties.len()
        ));
    }
    if settings.state0.len() != info.nstate {
        return Err(format!(
            "{} has {} state variables, the start state has {}",
            info.name,
            info.nstate,
            settings.state0.len()
        ));
    }
    let c = settings.conditions;
    if !(c.density > 0.0 && c.characteristic_length > 0.0 && c.temperature.is_finite()) {
        return Err("the point's density and characteristic length must be positive".into());
    }
    let incs = block_increments(path, info.ncomp)?;
    let mut report = BlockReport {
        routine: info.name.clone(),
        path: path.name.clone(),
        energy_rule: settings.energy_rule.name(),
        ..BlockReport::default()
    };
    let Some(moduli) = along::elastic_response(routine, properties, settings, &mut report) else {
        return Ok(report);
    };
    along::elastic_consistency(routine, properties, &incs[0], &moduli, settings, &mut report);
    along::walk_one_point(routine, properties, &incs, &moduli, settings, &mut report);
    if settings.independence {
        independence::check(routine, properties, &incs, settings, &mut report);
    }
    if let Some(law) = settings.rate_law {
        rate::check(routine, properties, &incs, law, settings, &mut report);
    }
    if settings.refinement {
        refine::check(routine, properties, &incs, settings, &mut report);
    }
    Ok(report)
}
