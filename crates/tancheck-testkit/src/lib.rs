//! Test support shared by tancheck's test binaries (not published): the bundled example
//! routines built once per test binary ([`libs`]), owned call buffers and the derivatives tests
//! compare against ([`call`]), a counting allocator for the no-allocation tests ([`alloc`]),
//! reference values that carry their source and kind ([`reference`]), and pure reads of a
//! returned tangent ([`tangent`]).
//!
//! Module order is data-flow order: `reference`, `alloc` and `tangent` stand alone, `call` uses core,
//! `libs` uses abi.

pub mod alloc;
pub mod call;
pub mod libs;
pub mod reference;
pub mod tangent;
