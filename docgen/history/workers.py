"""Worker processes for the history's bulk work (old revisions' solves, figures).

Forked, like the site build's own pool: a worker starts with the parent's imports, so what the
work needs is imported once here (``preload``) instead of once per worker.
"""

from __future__ import annotations

import multiprocessing
import sys
from collections.abc import Callable, Iterator
from concurrent.futures import Executor, ProcessPoolExecutor
from contextlib import contextmanager


@contextmanager
def worker_pool(workers: int, tasks: int, preload: Callable[[], None] | None = None
                ) -> Iterator[Executor | None]:
    """A pool of up to ``workers`` forked processes for ``tasks`` tasks, or ``None`` when one
    process will do.  ``preload`` runs here first, so the workers inherit its imports."""
    if workers <= 1 or tasks < 2:
        yield None
        return
    if preload is not None:
        preload()
    context = multiprocessing.get_context("fork" if sys.platform.startswith("linux") else None)
    with ProcessPoolExecutor(max_workers=min(workers, tasks), mp_context=context) as pool:
        yield pool
