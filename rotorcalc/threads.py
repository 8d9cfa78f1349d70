"""BLAS threads inside the analyses: one per process unless the user chose a number."""

from __future__ import annotations

import functools
import os


@functools.lru_cache(maxsize=1)
def _blas_controller():
    """The BLAS libraries loaded (numpy's and scipy's), found once."""
    from threadpoolctl import ThreadpoolController
    return ThreadpoolController()


def one_blas_thread(function):
    """Run ``function`` with one BLAS thread, unless the user set a thread count.

    Rotor models are small-to-medium matrices solved many times: one thread per
    process is faster than threads fighting over the cores (measured: 10x on a
    120x120 eig on a busy 2-core machine), for Python users as for the command
    line; ``OPENBLAS_NUM_THREADS`` and its kin win when they were set before rotorcalc
    was imported (set later, after numpy started its threads, they no longer decide).
    """
    @functools.wraps(function)
    def limited(*args, **kwargs):
        if _USER_CHOSE:
            return function(*args, **kwargs)
        with _blas_controller().limit(limits=1, user_api="blas"):
            return function(*args, **kwargs)
    return limited


_THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")
#: Whether the user chose a thread count before rotorcalc was imported.
_USER_CHOSE = any(v in os.environ for v in _THREAD_VARIABLES)
