//! The block trampoline from the Rust side: the arguments of one block call as the C side
//! (fortran-shim/src/guard_block.inc) reads them, and the guarded call.

use std::ffi::{c_char, c_void};

use tancheck_core::block::{BlockCall, BlockOutcome, Conditions};

use crate::signal_guard::{guarded, Crash, GuardResult};

/// A block routine's entry point, real or twin: every array as a pointer.
pub type BlockFn = unsafe extern "C" fn(
    block: *const BlockCall,
    properties: *const c_void,
    strain: *const c_void,
    strain_increment: *const c_void,
    stress_start: *const c_void,
    state_start: *const c_void,
    energy_start: *const c_void,
    conditions: *const Conditions,
    stress: *mut c_void,
    state: *mut c_void,
    energy: *mut c_void,
    deleted: *mut i32,
    report: *mut BlockOutcome,
);

/// One block call's arguments for the trampoline (`struct tc_guard_block_args`).
#[derive(Clone, Copy, Debug)]
#[repr(C)]
pub(crate) struct BlockGuardArgs {
    pub block: *const BlockCall,
    pub properties: *const c_void,
    pub strain: *const c_void,
    pub strain_increment: *const c_void,
    pub stress_start: *const c_void,
    pub state_start: *const c_void,
    pub energy_start: *const c_void,
    pub conditions: *const Conditions,
    pub stress: *mut c_void,
    pub state: *mut c_void,
    pub energy: *mut c_void,
    pub deleted: *mut i32,
    pub report: *mut BlockOutcome,
    pub label: *const c_char,
    pub fp_traps: i32,
    pub reserved: i32,
}

extern "C" {
    fn tc_guard_call_block(
        f: BlockFn,
        args: *const BlockGuardArgs,
        complex: i32,
        result: *mut GuardResult,
    ) -> i32;
    #[cfg(test)]
    fn tc_guard_block_layout(out: *mut u64);
}

/// Call a block routine through the guard.
///
/// # Safety
/// `f` must have the block ABI's signature (with complex arrays when `complex`), and every
/// pointer in `args` must be valid for the lengths its `tc_block` announces.
pub(crate) unsafe fn call_block(f: BlockFn, args: &BlockGuardArgs, complex: bool) -> Result<(), Crash> {
    // SAFETY: forwarded from the caller's contract; `r` is a valid out-pointer.
    guarded(|r| unsafe { tc_guard_call_block(f, args, i32::from(complex), r) })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::mem::{offset_of, size_of};

    /// The structs shared with C have the same layout on both sides.
    #[test]
    fn block_layouts_match_the_c_side() {
        let mut c = [0u64; 8];
        // SAFETY: the C side writes exactly 8 values.
        unsafe { tc_guard_block_layout(c.as_mut_ptr()) };
        let rust = [
            size_of::<BlockCall>(),
            offset_of!(BlockCall, time),
            size_of::<Conditions>(),
            size_of::<BlockOutcome>(),
            offset_of!(BlockOutcome, largest_fraction),
            offset_of!(BlockOutcome, message),
            size_of::<BlockGuardArgs>(),
            offset_of!(BlockGuardArgs, fp_traps),
        ];
        assert_eq!(c.map(|x| x as usize), rust);
    }
}
