"""Where independent pieces of work run: one interface, three places.

* :class:`InProcess`: here, one after another (one worker, or a single piece);
* :class:`LocalPool`: worker processes on this machine (:mod:`rotorcalc.workers` starts
  them: fork where BLAS is single-threaded, one BLAS thread each);
* :class:`DaskCluster`: the workers of a Dask distributed scheduler (``dask.distributed``,
  the optional ``cluster`` extra), on this machine (``"local"``: a LocalCluster) or on
  many (a scheduler address such as ``"tcp://10.0.0.5:8786"``).

Every executor has ``results(function, pieces)``: an iterator of ``(index, outcome)`` in
the order the pieces finish, ``outcome`` being the function's value or, when the piece
raised, the exception (a failed piece is recorded by the caller, never dropped here).  A
piece's result depends on the piece alone, so a study gives the same numbers on any
executor and any number of workers; callers order the results by index.
"""

from __future__ import annotations

from concurrent.futures import as_completed

#: Times Dask re-runs a piece whose worker was lost before it is reported as failed.
DASK_RETRIES = 3


class InProcess:
    """Every piece in this process, in order."""

    name = "this process"
    workers = 1

    def results(self, function, pieces):
        for i, piece in enumerate(pieces):
            try:
                yield i, function(*piece)
            except Exception as exc:   # recorded by the caller with the piece's index
                yield i, exc

    def close(self):
        pass

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()


class LocalPool(InProcess):
    """Worker processes on this machine (0: one per available core)."""

    def __init__(self, workers=0):
        from .workers import worker_count, worker_pool
        self.workers = worker_count(workers)
        self.name = f"{self.workers} local worker process{'es' if self.workers > 1 else ''}"
        self._context = worker_pool(self.workers)
        self._pool = self._context.__enter__()

    def results(self, function, pieces):
        futures = {self._pool.submit(function, *piece): i for i, piece in enumerate(pieces)}
        try:
            for future in as_completed(futures):
                try:
                    yield futures[future], future.result()
                except Exception as exc:
                    yield futures[future], exc
        finally:
            for future in futures:
                future.cancel()

    def close(self):
        if self._context is not None:
            self._context.__exit__(None, None, None)
            self._context = None


class DaskCluster(InProcess):
    """The workers of a Dask scheduler: ``address`` ``"local"`` starts a LocalCluster of
    ``workers`` processes (0: one per core) on this machine, one thread each."""

    def __init__(self, address="local", workers=0):
        try:
            from dask.distributed import Client, LocalCluster
        except ImportError:
            from .errors import InputError
            raise InputError("--scheduler", "needs Dask's distributed scheduler, which is not "
                             "installed", value=address,
                             expected="pip install 'rotorcalc[cluster]'", kind="option") from None
        from .workers import worker_count
        self._cluster = None
        if address == "local":
            n = worker_count(workers)
            self._cluster = LocalCluster(n_workers=n, threads_per_worker=1, processes=True,
                                         dashboard_address=None)
            self.client = Client(self._cluster)
        else:
            self.client = Client(address)
        self.workers = len(self.client.scheduler_info()["workers"])
        self.name = (f"Dask {'LocalCluster' if self._cluster is not None else address} "
                     f"({self.workers} workers)")

    def results(self, function, pieces):
        from dask.distributed import as_completed as dask_completed
        futures = self.client.map(function, *zip(*pieces), pure=False,
                                  retries=DASK_RETRIES) if pieces else []
        index = {f.key: i for i, f in enumerate(futures)}
        try:
            for future in dask_completed(futures):
                try:
                    yield index[future.key], future.result()
                except Exception as exc:
                    yield index[future.key], exc
                future.release()
        finally:
            for future in futures:
                future.cancel()

    def close(self):
        self.client.close()
        if self._cluster is not None:
            self._cluster.close()


def make_executor(workers=1, scheduler=None):
    """The executor a command's options ask for: ``scheduler`` (a Dask address or
    ``"local"``) when given, else a local pool of ``workers`` processes (0: one per core),
    or this process for one worker."""
    if scheduler:
        return DaskCluster(scheduler, workers)
    from .workers import worker_count
    return InProcess() if worker_count(workers) <= 1 else LocalPool(workers)
