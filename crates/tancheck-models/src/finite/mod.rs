//! Finite-strain reference models, written once over [`tancheck_core::Scalar`]:
//! [`NeoHookean`] (with its flaws [`NhFlaw`]) and [`HypoJaumann`].

pub mod hypo;
pub mod neo_hookean;
pub mod zoo;

#[cfg(test)]
mod tests;

pub use hypo::HypoJaumann;
pub use neo_hookean::{NeoHookean, NhFlaw};
pub use zoo::{finite_zoo, zoo_path, FiniteZooEntry, FiniteZooModel, ZOO_PROPERTIES};
