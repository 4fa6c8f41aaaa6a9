"""One executor for many solves: serial, threads, an embedded Dask cluster or a remote one.

A study (a climate, a comparison of layout alternatives, later the full-field solves)
hands the executor a task function, one *shared* payload (the scenarios, later the mesh)
and a list of small task descriptions. The executor returns the task results in the
order of the tasks, whatever the order in which they finished, so that every reduction
done on them afterwards is the same on every backend.

Backends
--------
``serial``
    One task after the other in this process (Dask's synchronous scheduler).
``threads``
    Dask's threaded scheduler in this process; the payload is shared, not copied.
``local``
    An embedded :class:`distributed.LocalCluster` of worker processes sized to the
    machine from a per-task estimate (:func:`plan_local_cluster`).
``remote``
    An existing Dask scheduler, from ``scheduler=ADDRESS`` or the environment variable
    :data:`SCHEDULER_ENV` (``HARBOR_SCHEDULER``).

On the distributed backends the payload travels once to every worker, in a worker
plugin (:mod:`harbor.study._dask_plugin`): a worker that joins later (or replaces a
lost one) receives it on start, and a task whose worker was lost is run again by Dask
elsewhere, with the same inputs, so the result is complete and identical.

``dask`` and ``distributed`` are imported only when an executor runs, so that
``harbor --help`` stays fast.
"""

from __future__ import annotations

import contextlib
import dataclasses
import os
import sys
import uuid

from harbor.errors import InputError

#: Environment variable naming an existing Dask scheduler (``tcp://host:8786``).
SCHEDULER_ENV = "HARBOR_SCHEDULER"
#: Environment variable with the scheduler connection timeout in seconds (default 10).
TIMEOUT_ENV = "HARBOR_SCHEDULER_TIMEOUT"
DEFAULT_TIMEOUT_S = 10.0
#: Backends by name; ``auto`` picks one (see :func:`make_executor`).
KINDS = ("auto", "serial", "threads", "local")
#: ``auto`` starts a local cluster only when the estimated serial work is at least this
#: many seconds: starting worker processes and importing harbor in each costs a few
#: seconds, which threads in this process do not.
LOCAL_CLUSTER_FROM_S = 60.0
#: BLAS / OpenMP threads inside one task. The tasks themselves are the parallelism;
#: measured on the demo climate (2 cores shared with other jobs), a screening task took
#: 2.5 s median with numpy's and scipy's default two OpenBLAS threads and 0.5 s with
#: one, in the same process. Dask's nanny sets the same limit in its workers
#: (``distributed.nanny.pre-spawn-environ``), so every backend computes alike.
TASK_BLAS_THREADS = 1
#: Memory a worker process takes before its first task (interpreter, numpy, scipy,
#: shapely, pyproj, harbor), bytes: a worker measured 290 MB resident after screening
#: tasks (benchmarks/dask_climate.py), rounded up.
WORKER_BASE_MEMORY = 400 * 2**20


@dataclasses.dataclass(frozen=True)
class TaskEstimate:
    """What one task is expected to cost, for sizing a cluster.

    Attributes
    ----------
    seconds : float
        Wall time of one task on one core, s.
    memory : int
        Peak memory of one task, bytes.
    """

    seconds: float
    memory: int


def machine_resources():
    """Cores and memory this process may use.

    Returns
    -------
    cores : int
        CPUs this process may run on (its affinity mask where the platform has one).
    memory : int
        Available physical memory, bytes (psutil, which ``distributed`` depends on;
        total memory from ``os.sysconf`` when psutil is missing).
    """
    try:
        cores = len(os.sched_getaffinity(0))
    except (AttributeError, OSError):  # pragma: no cover - not Linux
        cores = os.cpu_count() or 1
    try:
        import psutil

        memory = int(psutil.virtual_memory().available)
    except ImportError:  # pragma: no cover - distributed brings psutil
        memory = int(os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES"))
    return max(1, cores), memory


def plan_local_cluster(n_tasks, estimate, cores=None, memory=None, workers=None):
    """Workers and memory per worker for an embedded cluster.

    Parameters
    ----------
    n_tasks : int
        Number of tasks to run.
    estimate : TaskEstimate
        Cost of one task.
    cores, memory : int, optional
        The machine's cores and available memory (bytes); default
        :func:`machine_resources`.
    workers : int, optional
        Upper bound asked for by the user.

    Returns
    -------
    n_workers : int
        Worker processes, one thread each.
    memory_limit : int
        Memory limit of each worker, bytes.

    Notes
    -----
    .. math::

        n = \\max(1, \\min(n_{cores}, n_{tasks}, \\lfloor 0.8 M / (m_0 + m_t) \\rfloor))

    with M the available memory, :math:`m_0` = :data:`WORKER_BASE_MEMORY` and
    :math:`m_t` the per-task estimate; each worker may use :math:`1.5 (m_0 + m_t)`
    before Dask pauses it (the 0.8 leaves room for this process and the scheduler).
    One thread per worker: the solves use compiled kernels and LAPACK, and one task at a
    time per process keeps the memory estimate honest.
    """
    if cores is None or memory is None:
        c, m = machine_resources()
        cores = c if cores is None else cores
        memory = m if memory is None else memory
    per = WORKER_BASE_MEMORY + int(estimate.memory)
    n = min(int(cores), int(n_tasks), int(0.8 * memory // per))
    if workers is not None:
        n = min(n, int(workers))
    return max(1, n), int(1.5 * per)


class Executor:
    """Runs many tasks of one kind and returns their results in task order.

    Build one with :func:`make_executor`; use it as a context manager so that an
    embedded cluster is shut down (a remote cluster is only disconnected from).

    Attributes
    ----------
    kind : {"serial", "threads", "local", "remote"}
    workers : int
        Threads or worker processes (for ``remote``, the workers present at connection).
    client : distributed.Client or None
        The Dask client of the distributed backends.
    display : bool
        Show Dask's progress bar on stderr in :meth:`map` unless told otherwise.
    address : str or None
        The scheduler's address (distributed backends).
    """

    def __init__(self, kind, workers=1, client=None, cluster=None, own_client=True,
                 display=False):
        self.kind = kind
        self.display = bool(display)
        self.workers = int(workers)
        self.client = client
        self.cluster = cluster
        self._own_client = own_client
        self.address = client.scheduler.address if client is not None else None

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
        return False

    def close(self):
        """Disconnect from the scheduler and stop an embedded cluster (idempotent)."""
        if self.client is not None and self._own_client:
            with contextlib.suppress(Exception):
                self.client.close()
        if self.cluster is not None:
            with contextlib.suppress(Exception):
                self.cluster.close()
        self.cluster = None
        if self._own_client:
            self.client = None

    def describe(self) -> str:
        """One line saying where the tasks run."""
        if self.kind == "serial":
            return "one task after the other in this process"
        if self.kind == "threads":
            return f"{self.workers} threads in this process"
        if self.kind == "local":
            return f"embedded Dask cluster, {self.workers} worker process(es)"
        return f"Dask scheduler {self.address}, {self.workers} worker(s)"

    def map(self, func, shared, tasks, progress=None, display=None, label="tasks"):
        """Run ``func(shared, task)`` for every task.

        Parameters
        ----------
        func : callable
            A module-level function (the distributed backends send it by reference);
            it must not modify ``shared``.
        shared : object
            The payload every task reads (scenarios, mesh): passed as is to
            ``serial`` and ``threads``, sent once to every worker otherwise.
        tasks : sequence
            Small picklable task descriptions.
        progress : callable, optional
            ``progress(label, done, total)`` after each finished task (not with
            ``display``).
        display : bool, optional
            Show Dask's own progress bar on stderr (default :attr:`display`).
        label : str
            Name given to ``progress``.

        Returns
        -------
        list
            ``[func(shared, t) for t in tasks]``, in the order of ``tasks``.
        """
        tasks = list(tasks)
        if not tasks:
            return []
        if display is None:
            display = self.display
        if self.kind in ("serial", "threads"):
            return self._map_local(func, shared, tasks, progress, display, label)
        return self._map_distributed(func, shared, tasks, progress, display, label)

    # ------------------------------------------------------------------ local schedulers
    def _map_local(self, func, shared, tasks, progress, display, label):
        with task_threads():
            return self._map_local_limited(func, shared, tasks, progress, display, label)

    def _map_local_limited(self, func, shared, tasks, progress, display, label):
        import dask
        from dask.callbacks import Callback
        from dask.diagnostics import ProgressBar

        n = len(tasks)
        results = [None] * n
        # The first task runs alone: it warms the caches, compiles what is compiled on
        # first use and starts the threading layer before several threads want it.
        results[0] = func(shared, tasks[0])
        if progress is not None and not display:
            progress(label, 1, n)
        if n == 1:
            return results
        # the payload is one node of the graph, not walked into or copied per task
        payload = dask.delayed(shared, traverse=False, name=f"shared-{uuid.uuid4().hex}")
        delayed = [dask.delayed(func, pure=False)(payload, t, dask_key_name=f"task-{i}")
                   for i, t in enumerate(tasks[1:], 1)]
        keys = {f"task-{i}" for i in range(1, n)}
        done = [1]

        def posttask(key, result, dsk, state, worker_id):
            if key in keys:
                done[0] += 1
                progress(label, done[0], n)

        cbs = []
        if display:
            cbs.append(ProgressBar(out=sys.stderr))
        elif progress is not None:
            cbs.append(Callback(posttask=posttask))
        scheduler = "sync" if self.kind == "serial" else "threads"
        kw = {} if self.kind == "serial" else {"num_workers": self.workers}
        with contextlib.ExitStack() as stack:
            for cb in cbs:
                stack.enter_context(cb)
            out = dask.compute(*delayed, scheduler=scheduler, **kw)
        results[1:] = list(out)
        return results

    # ------------------------------------------------------------------ distributed
    def _map_distributed(self, func, shared, tasks, progress, display, label):
        from harbor.study import _dask_plugin

        token = f"harbor-shared-{uuid.uuid4().hex}"
        client = self.client
        client.register_plugin(_dask_plugin.SharedPayload(token, shared), name=token)
        # as_completed and the progress bar look for a current client; ours is not the
        # process-wide default (a user's own client may be)
        with contextlib.ExitStack() as stack:
            stack.enter_context(client.as_current())
            stack.callback(self._forget, token)
            return self._submit_all(client, token, func, tasks, progress, display, label)

    def _forget(self, token):
        with contextlib.suppress(Exception):
            self.client.unregister_worker_plugin(token)

    def _submit_all(self, client, token, func, tasks, progress, display, label):
        from distributed import as_completed

        from harbor.study import _dask_plugin

        futures = []
        try:
            futures = [client.submit(_dask_plugin.run_task, func, token, t, pure=False,
                                     key=f"{label.replace(' ', '-')}-{i}-{token[-8:]}")
                       for i, t in enumerate(tasks)]
            index = {f.key: i for i, f in enumerate(futures)}
            results = [None] * len(tasks)
            if display:
                from distributed import progress as dask_progress

                with contextlib.redirect_stdout(sys.stderr):
                    dask_progress(futures, multi=False)
                    sys.stderr.write("\n")
                for i, r in enumerate(client.gather(futures)):
                    results[i] = r
            else:
                for done, f in enumerate(as_completed(futures), 1):
                    results[index[f.key]] = f.result()
                    if progress is not None:
                        progress(label, done, len(tasks))
            return results
        except BaseException:
            # nothing half-done stays on the cluster: cancel what has not run
            with contextlib.suppress(Exception):
                client.cancel(futures)
            raise


def task_threads():
    """Context manager limiting BLAS / OpenMP threads to :data:`TASK_BLAS_THREADS`.

    Returns
    -------
    contextlib.AbstractContextManager
        ``threadpoolctl.threadpool_limits``, or a no-op when threadpoolctl is missing.
    """
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - a dependency
        return contextlib.nullcontext()
    return threadpool_limits(TASK_BLAS_THREADS)


def _connect(address, timeout):
    from distributed import Client

    try:
        return Client(address, timeout=timeout, set_as_default=False)
    except (OSError, TimeoutError, ValueError, TypeError) as e:
        why = str(e).splitlines()[0] if str(e) else type(e).__name__
        if len(why) > 120:
            why = why[:117] + "..."
        raise InputError(f"cannot reach the Dask scheduler at {address!r} within "
                         f"{timeout:g} s ({why}); start one (see docs/cluster.md) or run "
                         f"without --scheduler", key="--scheduler") from None


def scheduler_address(scheduler=None):
    """The scheduler to use: the argument, else :data:`SCHEDULER_ENV`, else None.

    Parameters
    ----------
    scheduler : str, optional
        ``tcp://host:port`` (or any address Dask accepts).

    Returns
    -------
    str or None
    """
    if scheduler:
        return scheduler
    env = os.environ.get(SCHEDULER_ENV, "").strip()
    return env or None


def make_executor(kind="auto", scheduler=None, workers=None, n_tasks=1,
                  estimate=TaskEstimate(1.0, 200 * 2**20), client=None, timeout=None,
                  display=False):
    """Choose and start an executor.

    Parameters
    ----------
    kind : {"auto", "serial", "threads", "local"}
        ``auto``: the remote scheduler when one is given, else serial for one task,
        else an embedded cluster when the estimated serial work is at least
        :data:`LOCAL_CLUSTER_FROM_S` seconds and the machine has more than one core,
        else threads.
    scheduler : str, optional
        Address of an existing Dask scheduler; default the environment variable
        :data:`SCHEDULER_ENV`. Wins over ``kind``.
    workers : int, optional
        Threads (``threads``) or worker processes (``local``) at most; default the
        machine's cores (and, for ``local``, its memory).
    n_tasks : int
        Number of tasks that will be run (sizes the pool).
    estimate : TaskEstimate
        Cost of one task.
    client : distributed.Client, optional
        Use this client (it is not closed afterwards).
    timeout : float, optional
        Seconds to wait for the scheduler; default :data:`TIMEOUT_ENV` or 10.
    display : bool
        Show Dask's own progress bar (on stderr) while tasks run.

    Returns
    -------
    Executor

    Raises
    ------
    InputError
        Unknown ``kind``, ``workers`` below 1, or a scheduler that cannot be reached
        (one line; nothing has been computed or written).
    """
    if kind not in KINDS:
        raise InputError(f"unknown executor {kind!r} (choose from {', '.join(KINDS)})",
                         key="--executor")
    if workers is not None and int(workers) < 1:
        raise InputError(f"--workers must be at least 1, got {workers}", key="--workers")
    if client is not None:
        return Executor("remote", _n_workers(client), client=client, own_client=False,
                        display=display)
    address = scheduler_address(scheduler)
    if address is not None:
        if timeout is None:
            try:
                timeout = float(os.environ.get(TIMEOUT_ENV, DEFAULT_TIMEOUT_S))
            except ValueError:
                raise InputError(f"must be a number of seconds, got "
                                 f"{os.environ[TIMEOUT_ENV]!r}", key=TIMEOUT_ENV) from None
        c = _connect(address, timeout)
        return Executor("remote", _n_workers(c), client=c, display=display)
    cores, memory = machine_resources()
    if kind == "auto":
        if n_tasks <= 1 or workers == 1:
            kind = "serial"
        elif cores > 1 and n_tasks * estimate.seconds >= LOCAL_CLUSTER_FROM_S:
            kind = "local"
        else:
            kind = "threads"
    if kind == "serial":
        return Executor("serial", 1, display=display)
    if kind == "threads":
        n = max(1, min(int(workers or cores), max(int(n_tasks), 1)))
        return Executor("threads", n, display=display)
    from distributed import Client, LocalCluster

    n, mem = plan_local_cluster(max(int(n_tasks), 1), estimate, cores, memory, workers)
    cluster = LocalCluster(n_workers=n, threads_per_worker=1, processes=True,
                           memory_limit=mem, host="127.0.0.1",
                           dashboard_address=":0")
    return Executor("local", n, client=Client(cluster, set_as_default=False),
                    cluster=cluster, display=display)


def _n_workers(client):
    with contextlib.suppress(Exception):
        return max(1, len(client.scheduler_info()["workers"]))
    return 1
