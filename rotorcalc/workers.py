"""Worker processes for independent pieces of work (a sweep's speeds, the critical-speed
brackets, a film table's runs of speeds): one pool mechanism, one BLAS thread per
worker.  Results never depend on the number of workers: callers split the work in a
fixed way and only hand the pieces out.
"""

from __future__ import annotations

import os
from contextlib import contextmanager

import numpy as np

from .errors import InputError


def worker_count(workers):
    """The number of worker processes ``workers`` asks for (0: one per available core)."""
    if not isinstance(workers, (int, np.integer)) or workers < 0:
        raise InputError("workers", f"workers must be a whole number >= 0, not {workers!r}",
                         kind="option")
    if workers == 0:
        try:
            return len(os.sched_getaffinity(0))
        except AttributeError:  # not on every platform
            return os.cpu_count() or 1
    return int(workers)


@contextmanager
def worker_pool(workers):
    """A pool of ``workers`` processes, each with one BLAS thread (unless set otherwise)."""
    # loaded with the first pool: a command run with one worker never needs it
    from concurrent.futures import ProcessPoolExecutor
    with _one_blas_thread(), ProcessPoolExecutor(workers, mp_context=_context()) as pool:
        yield pool


def _context():
    """'fork' where it exists and BLAS is single-threaded already, else 'spawn'.

    A forked worker starts at once but inherits the parent's BLAS threads; a
    spawned one imports numpy afresh and reads ``OPENBLAS_NUM_THREADS`` then.
    """
    import multiprocessing
    single = all(os.environ.get(v) == "1" for v in BLAS_THREAD_VARIABLES)
    if single and "fork" in multiprocessing.get_all_start_methods():
        return multiprocessing.get_context("fork")
    return multiprocessing.get_context("spawn")


BLAS_THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")


@contextmanager
def _one_blas_thread():
    """One BLAS thread in every worker started inside (the user's own setting wins).

    Several processes each running several BLAS threads on the same cores
    run slower than one thread each (see rotorcalc/cli/__init__.py).
    """
    added = [v for v in BLAS_THREAD_VARIABLES if v not in os.environ]
    for v in added:
        os.environ[v] = "1"
    try:
        yield
    finally:
        for v in added:
            os.environ.pop(v, None)


def run_all(function, pieces, workers, progress=None):
    """``[function(*piece) for piece in pieces]``, in order, on up to ``workers``
    processes (0: one per available core); in this process when one worker (or one
    piece) is asked for.  ``progress(done, total)`` after each piece (as they finish).
    The first piece that raised raises here.  Runs on :mod:`rotorcalc.executor` (the
    local pool), as the uncertainty studies do."""
    from .executor import InProcess, LocalPool
    workers = min(worker_count(workers), len(pieces))
    out = [None] * len(pieces)
    with (InProcess() if workers <= 1 else LocalPool(workers)) as executor:
        for done, (i, outcome) in enumerate(executor.results(function, pieces), start=1):
            if isinstance(outcome, BaseException):
                raise outcome
            out[i] = outcome
            if progress is not None:
                progress(done, len(pieces))
    return out
