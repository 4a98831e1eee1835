//! Finite-strain reference models, written once over [`tancheck_core::Scalar`]:
//! [`NeoHookean`] (with its flaws [`NhFlaw`]), [`HypoJaumann`] and [`J2Log`] (finite-strain
//! J2 with logarithmic elastic strain; its tensor functions in [`logexp`]).

pub mod hypo;
pub mod j2_log;
pub mod logexp;
pub mod neo_hookean;
pub mod zoo;

#[cfg(test)]
mod j2_log_tests;
#[cfg(test)]
mod tests;

pub use hypo::HypoJaumann;
pub use j2_log::J2Log;
pub use neo_hookean::{NeoHookean, NhFlaw};
pub use zoo::{finite_zoo, zoo_path, FiniteZooEntry, FiniteZooModel, J2_PROPERTIES, ZOO_PROPERTIES};
