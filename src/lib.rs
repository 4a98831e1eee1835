//! tancheck: checks that the tangent a material routine returns is the derivative of its own
//! stress update, and says where and why when it is not.
//!
//! This crate is the facade over the workspace:
//! - [`core`]: conventions, routine capabilities, driver, schemes, comparison, report model;
//! - [`models`]: reference models in Rust, generic over the scalar;
//! - [`abi`]: the routine ABI, the guarded shim, loading and compiling libraries;
//! - [`cli`]: the command line, manifests and reporters;
//! - [`assert`]: assertions for `cargo test` that fail with the finding (a Rust model or a
//!   compiled library, a path), documented with a runnable example.
//!
//! A check in a test of your own crate, on the built-in J2 model:
//!
//! ```
//! use tancheck::core::{ModelRoutine, Path, PointKind, Shape};
//!
//! let mut j2 = ModelRoutine(tancheck::models::J2::new(PointKind::Solid3d).unwrap());
//! let props = [200000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0]; // E, nu, sy0, H_iso, Q, b, H_kin
//! let path = Path::ramp(Shape::TensionShear, 4e-3, 8, 4);
//! tancheck::assert_tangent_consistent(&mut j2, &props, &path);
//! ```

pub use tancheck_abi as abi;
pub use tancheck_cli as cli;
pub use tancheck_core as core;
pub use tancheck_models as models;

pub mod assert;

pub use assert::{assert_finding, assert_tangent_consistent, check_tangent, library_routine};
