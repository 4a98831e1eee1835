//! Finite-strain reference models, written once over [`tancheck_core::Scalar`]:
//! [`NeoHookean`] (with its flaws [`NhFlaw`]) and [`HypoJaumann`].

pub mod hypo;
pub mod neo_hookean;

#[cfg(test)]
mod tests;

pub use hypo::HypoJaumann;
pub use neo_hookean::{NeoHookean, NhFlaw};
