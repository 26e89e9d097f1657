"""The C allocator's hold on freed memory, for processes that plan many points in chunks.

A chunk of a sweep plans its points together on arrays of a few hundred kilobytes, made
and freed many thousands of times. glibc's malloc returns the free top of its heap to
the system as soon as it passes a small threshold (128 KiB by default, 64 KiB in a dask
worker), so the next array takes fresh pages from the kernel, each a page fault.
Measured on a 124-point chunk of a 10-leg mission: about 50 000 faults and 0.21 s,
against none and 0.12 s when the allocator keeps 16 MiB of freed heap; two worker
processes faulting at once also slow each other down in the kernel.
:func:`hold_freed_heap` asks glibc to keep :data:`HEAP_PAD` bytes at the top of the heap
(``M_TOP_PAD``) and to take arrays below :data:`MMAP_FROM` from the heap
(``M_MMAP_THRESHOLD``; a worker thread's arena otherwise maps and unmaps them one by
one): the pages are reused, not returned and faulted in again. The peak memory of a
chunk is unchanged (pages are only kept, never touched ahead), and what is kept is
bounded by the pad.

Elsewhere than on glibc (macOS, Windows, musl) nothing is changed.
"""

from __future__ import annotations

import ctypes
import functools
import platform

#: Freed heap kept by a chunk-planning process [B]: enough for chunks of a few thousand
#: points (a 124-point chunk of a 10-leg mission needs 16 MiB to fault no more).
HEAP_PAD = 64 * 2**20
#: Allocations from this size up get pages of their own from the kernel [B] (glibc's
#: largest dynamic threshold).
MMAP_FROM = 32 * 2**20
#: mallopt's parameter numbers (glibc's malloc.h).
_M_TOP_PAD, _M_MMAP_THRESHOLD = -2, -3


@functools.cache
def _glibc():
    if platform.system() != "Linux" or platform.libc_ver()[0] != "glibc":
        return None
    try:
        # glibc's soname, loaded by name (find_library would start ldconfig).
        return ctypes.CDLL("libc.so.6")
    except OSError:
        return None


def hold_freed_heap(pad: int = HEAP_PAD, mmap_from: int = MMAP_FROM) -> bool:
    """Have this process's C allocator keep ``pad`` bytes of freed heap (glibc only).

    Parameters
    ----------
    pad : int
        Bytes of freed memory to keep at the top of the heap [B].
    mmap_from : int
        Size from which an allocation is mapped on its own rather than taken from the
        heap [B].

    Returns
    -------
    bool
        True if the allocator took the setting; False where it is not glibc's.
    """
    libc = _glibc()
    if libc is None:
        return False
    return (libc.mallopt(_M_TOP_PAD, int(pad)) == 1
            and libc.mallopt(_M_MMAP_THRESHOLD, int(mmap_from)) == 1)
