//! Options a kind of manifest does not honour (a block routine's, a finite-strain one's):
//! refused before any work, naming the manifest and where its own settings are.

use anyhow::{bail, Result};

/// What a block routine's check and probe do instead of the point options they refuse.
pub(crate) const BLOCK_CHECKS_INSTEAD: &str =
    "a block routine gets the block checks (elastic response, point \
independence, tangent and wave speed, energy, deletion, rate, refinement, counterpart) with the \
settings of the manifest's `block`";

/// Where a finite-strain manifest sets what these options set for a point routine.
pub(crate) const FINITE_CHECK_INSTEAD: &str =
    "a finite-strain check walks the manifest's `path` of deformation \
     gradients with central differences and the complex step, at the steps and the one tolerance of its \
     `check` section (central_step, complex_step, tolerance); set them there";
pub(crate) const FINITE_PROBES_INSTEAD: &str = "the finite-strain probes run along the manifest's `path` of \
     deformation gradients, with the options of its `probes` section; set them there";

/// Refuse the options `given` (set, name) that a finite-strain run does not honour, naming
/// the manifest and where its own settings are (`instead`): exit 2 before any work.
pub(crate) fn refuse_for_finite(
    manifest: &std::path::Path,
    given: &[(bool, &str)],
    instead: &str,
) -> Result<()> {
    refuse_options(manifest, "a finite-strain manifest", given, instead)
}

/// Options given (`given`: set, name) that do not apply to a kind of manifest (`what`): an
/// error naming them, with what the manifest does `instead`.
pub(crate) fn refuse_options(
    manifest: &std::path::Path,
    what: &str,
    given: &[(bool, &str)],
    instead: &str,
) -> Result<()> {
    let names: Vec<&str> = given.iter().filter(|(set, _)| *set).map(|(_, n)| *n).collect();
    if !names.is_empty() {
        bail!(
            "{}: {what}; {} {} not apply to it: {instead}",
            manifest.display(),
            names.join(", "),
            if names.len() == 1 { "does" } else { "do" }
        );
    }
    Ok(())
}
