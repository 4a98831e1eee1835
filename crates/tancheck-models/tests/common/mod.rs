//! Shared by the model tests: tancheck-testkit's counting allocator as this test binary's
//! global allocator, so a test can show that one call of a model allocates nothing
//! (DEVELOPERS.md: the hot path).
#![allow(dead_code)] // each test binary uses part of this

tancheck_testkit::counting_allocator!();

#[allow(unused_imports)] // zoo.rs counts through tancheck_testkit::call instead
pub use tancheck_testkit::alloc::allocations;
