//! The command-line tool's allocator: jemalloc, with every block of 2 MiB
//! or more marked for transparent huge pages on Linux.
//!
//! A calc of a million parts keeps a few large arrays (the text, the list of
//! declarations, the name table, the nodes and parts, the solver's vectors).
//! On a virtual machine each first touch of a 4 KiB page and each miss of
//! the address cache costs dearly; in 2 MiB pages both are 512 times rarer.
//! Small blocks (the syntax tree of a statement, names, messages) are left
//! alone, so a small calc starts as fast as before: marking every block, as
//! jemalloc's own `thp:always` does, made a 20-part calc a millisecond
//! slower.

use std::alloc::{GlobalAlloc, Layout};

use tikv_jemallocator::Jemalloc;

/// jemalloc, with large blocks advised to use huge pages.
pub struct Allocator;

/// The huge-page size on x86-64 and the usual arm64 kernels.
const HUGE: usize = 2 << 20;

/// Mark the whole 2 MiB pages inside a block for huge pages.
#[cfg(target_os = "linux")]
fn advise(ptr: *mut u8, size: usize) {
    if size < HUGE || ptr.is_null() {
        return;
    }
    let start = (ptr as usize).next_multiple_of(HUGE);
    let end = (ptr as usize + size) / HUGE * HUGE;
    if end > start {
        // SAFETY: the range lies inside a block the allocator just handed
        // out; MADV_HUGEPAGE changes how it is backed, never its contents.
        // A refusal (no THP on this kernel) leaves ordinary pages.
        unsafe {
            libc::madvise(start as *mut libc::c_void, end - start, libc::MADV_HUGEPAGE);
        }
    }
}

#[cfg(not(target_os = "linux"))]
fn advise(_ptr: *mut u8, _size: usize) {}

// SAFETY: every call is passed to jemalloc unchanged; `advise` only marks
// memory of the block returned.
unsafe impl GlobalAlloc for Allocator {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        let p = Jemalloc.alloc(layout);
        advise(p, layout.size());
        p
    }

    unsafe fn alloc_zeroed(&self, layout: Layout) -> *mut u8 {
        let p = Jemalloc.alloc_zeroed(layout);
        advise(p, layout.size());
        p
    }

    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        Jemalloc.dealloc(ptr, layout);
    }

    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        let p = Jemalloc.realloc(ptr, layout, new_size);
        advise(p, new_size);
        p
    }
}
