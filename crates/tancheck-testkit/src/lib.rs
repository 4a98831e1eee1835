//! Test support shared by tancheck's test binaries (not published): the bundled example
//! routines built once per test binary ([`libs`]), owned call buffers and the derivatives tests
//! compare against ([`call`]), the points model tests call ([`point`]), a counting allocator for the no-allocation tests ([`alloc`]),
//! reference values that carry their source and kind ([`reference`]), pure reads of a
//! returned tangent ([`tangent`]) and the tensors tests draw and convert ([`tensor`]).
//!
//! Module order is data-flow order: `reference`, `alloc`, `tangent` and `tensor`
//! stand alone, `call` uses core (and `tangent`), `point` uses `call`, `libs` uses abi.

pub mod alloc;
pub mod call;
pub mod libs;
pub mod point;
pub mod reference;
pub mod tangent;
pub mod tensor;
