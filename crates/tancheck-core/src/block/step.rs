//! The path's increments as block routines see them: strain increments in the routine's
//! component order with engineering shear, with the time and temperature increments.

use crate::path::Path;

/// One increment of the path as block routines see it.
#[derive(Clone, Debug, PartialEq)]
pub struct BlockStep {
    /// In the block routine's order (11, 22, 33, 23, 13, 12 or 11, 22, 33, 12), engineering
    /// shear.
    pub strain_increment: Vec<f64>,
    pub time_increment: f64,
    /// The path's `dtemp`: every point's temperature changes by it over the increment (the
    /// conditions' `temperature_increment`; the temperature at the start of the next one is
    /// the sum).
    pub temperature_increment: f64,
}

/// The path's increments in the block routine's order with engineering shear, their time and
/// temperature increments.
pub fn block_increments(path: &Path, ncomp: usize) -> Result<Vec<BlockStep>, String> {
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
                    "increment {} has 23 or 13 shear, which a 4-component block routine does not have \
                     (the built-in shapes tension-shear and mixed-mode have them): give a path without them, \
                     such as the shapes uniaxial-strain, biaxial or shear-12, or increments of your own",
                    k + 1
                ))
            }
            _ => return Err(format!("block routines have 6 or 4 components, not {ncomp}")),
        };
        out.push(BlockStep {
            strain_increment: v,
            time_increment: inc.dtime,
            temperature_increment: inc.dtemp,
        });
    }
    Ok(out)
}
