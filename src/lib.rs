//! tancheck: checks that the tangent a material routine returns is the derivative of its own
//! stress update, and says where and why when it is not.
//!
//! This crate is the facade over the workspace:
//! - [`core`]: conventions, routine capabilities, driver, schemes, comparison, report model;
//! - [`models`]: reference models in Rust, generic over the scalar;
//! - [`abi`]: the routine ABI, the guarded shim, loading and compiling libraries;
//! - [`cli`]: the command line, manifests and reporters.

pub use tancheck_abi as abi;
pub use tancheck_cli as cli;
pub use tancheck_core as core;
pub use tancheck_models as models;
