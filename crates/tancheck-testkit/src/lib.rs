//! Test support shared by tancheck's test binaries (not published): the bundled example
//! routines built once per test binary ([`libs`]), owned call buffers and the derivatives tests
//! compare against ([`call`]), the points model tests call ([`point`]), a counting allocator for the no-allocation tests ([`alloc`]),
//! reference values that carry their source and kind ([`reference`]), pure reads of a
//! returned tangent ([`tangent`]), the tensors tests draw and convert ([`tensor`]) and a whole
//! check with its one-line-per-increment summary ([`check`]).
//!
//! Module order is data-flow order: `reference`, `alloc`, `tangent` and `tensor`
//! stand alone, `call` and `check` use core (`call` also `tangent`), `point` uses `call`, `libs` uses abi.

pub mod alloc;
pub mod call;
pub mod check;
pub mod libs;
pub mod point;
pub mod reference;
pub mod tangent;
pub mod tensor;
