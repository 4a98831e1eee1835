//! A counting global allocator: one call of a routine allocates nothing (DEVELOPERS.md: the
//! hot path), and a test shows it by counting the allocations of its own thread.
//!
//! A test binary installs it with [`counting_allocator!`](crate::counting_allocator) and reads
//! [`allocations`] before and after the calls it measures.

use std::alloc::{GlobalAlloc, Layout, System};
use std::cell::Cell;

/// Forwards to the system allocator and counts allocations (and reallocations) per thread.
pub struct Counting;

thread_local! {
    /// Allocations made on this thread so far (const-initialized: reading it never allocates).
    static ALLOCATIONS: Cell<usize> = const { Cell::new(0) };
}

fn count() {
    let _ = ALLOCATIONS.try_with(|c| c.set(c.get() + 1));
}

// SAFETY: forwards every request to the system allocator unchanged; the counter is a
// const-initialized thread-local Cell, which never allocates.
unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        count();
        // SAFETY: the caller's contract, passed on.
        unsafe { System.alloc(layout) }
    }
    unsafe fn alloc_zeroed(&self, layout: Layout) -> *mut u8 {
        count();
        // SAFETY: the caller's contract, passed on.
        unsafe { System.alloc_zeroed(layout) }
    }
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        count();
        // SAFETY: the caller's contract, passed on.
        unsafe { System.realloc(ptr, layout, new_size) }
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        // SAFETY: the caller's contract, passed on.
        unsafe { System.dealloc(ptr, layout) }
    }
}

/// Allocations made on the calling thread so far (0 forever when [`Counting`] is not the
/// global allocator: install it with [`counting_allocator!`](crate::counting_allocator)).
pub fn allocations() -> usize {
    ALLOCATIONS.with(Cell::get)
}

/// Allocations `f` makes on the calling thread.
pub fn allocations_in(f: impl FnOnce()) -> usize {
    let before = allocations();
    f();
    allocations() - before
}

/// Make [`Counting`] the global allocator of this test binary.
#[macro_export]
macro_rules! counting_allocator {
    () => {
        #[global_allocator]
        static TANCHECK_TESTKIT_COUNTING: $crate::alloc::Counting = $crate::alloc::Counting;
    };
}
