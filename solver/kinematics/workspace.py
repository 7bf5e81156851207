"""Scratch memory that outlives one solve, so that the next solve finds it mapped.

Evaluating thousands of instants needs temporaries of several megabytes.
Memory the allocator takes fresh from the operating system costs a page
fault on the first touch of every 4 KiB page; a cycle of 3,600 instants
made about 2,000 of them per solve, a quarter of its time.  So a `System`
borrows a `Workspace` — one flat backing array per named buffer, grown to
the largest size asked for and handed out as a contiguous prefix of the
right shape — and gives it back to a small pool when it is done (or
garbage).  The next System borrows it with its pages already mapped.

A workspace has one owner at a time (borrowing pops it from the pool), so
systems in different threads never share one.  What a buffer holds is
valid until its owner asks for the same name again.

The temporaries of a solve that are not in a workspace (a few hundred KiB
each at 3,600 instants) are reused through the C allocator.  glibc's malloc
serves blocks above its mmap threshold (128 KiB at start) as fresh mappings
that fault page by page, but raises the threshold to the size of any such
block that is freed (mallopt(3), "dynamic mmap threshold").  Pooled
workspaces are never freed, so the first new workspace frees one block of
ALLOCATOR_WARM_BYTES once, and the temporaries then come from the heap and
are reused (elsewhere this is one harmless allocation).
"""

from __future__ import annotations

import numpy as np

POOL_SIZE = 4  # idle workspaces kept: one per system alive at once in typical use (a result and its successor)
MAX_POOLED_BYTES = 64 * 2**20  # a workspace grown beyond this (huge instant counts) is not kept
ALLOCATOR_WARM_BYTES = 4 * 2**20  # above any one temporary of a six-bar at 3,600 instants (~0.8 MB); no page is touched


VIEWS_KEPT = 256  # shaped views remembered per workspace (a handful per instant count in use)


class Workspace:
    """Named scratch arrays, each a prefix of a flat store that only grows.

    The shaped view of a (name, shape) is made once and handed out again
    (the same object) until its store has to grow.
    """

    __slots__ = ("stores", "views")

    def __init__(self):
        self.stores: dict = {}
        self.views: dict = {}

    def array(self, key, shape: tuple) -> np.ndarray:
        """A C-contiguous float array of `shape` under name `key` (contents undefined)."""
        view = self.views.get((key, shape))
        if view is not None:
            return view
        size = 1
        for extent in shape:
            size *= extent
        store = self.stores.get(key)
        if store is None or store.size < size:
            store = self.stores[key] = np.empty(size)
            self.views = {k: v for k, v in self.views.items() if k[0] != key}  # views of the old store
        if len(self.views) >= VIEWS_KEPT:
            self.views.clear()
        view = self.views[(key, shape)] = store[:size].reshape(shape)
        return view

    def nbytes(self) -> int:
        return sum(store.nbytes for store in self.stores.values())


_pool: list[Workspace] = []
_allocator_warm = False


def _warm_allocator() -> None:
    """Free one large block, once, so that malloc serves the solve's temporaries from its heap (see above)."""
    global _allocator_warm
    if not _allocator_warm:
        _allocator_warm = True
        block = np.empty(ALLOCATOR_WARM_BYTES // 8)
        del block


def borrow() -> Workspace:
    """A workspace from the pool, or a new one."""
    try:
        return _pool.pop()
    except IndexError:
        _warm_allocator()
        return Workspace()


def give_back(workspace: Workspace) -> None:
    """Return a workspace its owner no longer uses."""
    if len(_pool) < POOL_SIZE and workspace.nbytes() <= MAX_POOLED_BYTES:
        _pool.append(workspace)
