"""The worker side of :mod:`harbor.study.executor` on Dask (imported on the workers).

The shared payload of a run (the scenarios, later the mesh) is carried by a worker
plugin: the scheduler keeps it and hands it to every worker once, including workers
that join or replace a lost one, so it is never sent with each task and a retried task
finds it wherever it lands.
"""

from __future__ import annotations

from distributed.diagnostics.plugin import WorkerPlugin

#: token -> payload, in each worker process
_SHARED: dict = {}


class SharedPayload(WorkerPlugin):
    """Puts one run's payload into the worker process under a token.

    Parameters
    ----------
    token : str
        Unique name of the run (also the plugin's name).
    payload : object
        What every task of the run reads.
    """

    def __init__(self, token, payload):
        self.token = token
        self.payload = payload

    def setup(self, worker):
        _SHARED[self.token] = self.payload

    def teardown(self, worker):
        _SHARED.pop(self.token, None)


def run_task(func, token, task):
    """Run ``func(payload, task)`` with the payload of run ``token``.

    Parameters
    ----------
    func : callable
    token : str
    task : object

    Returns
    -------
    object
        What ``func`` returns.
    """
    try:
        shared = _SHARED[token]
    except KeyError:
        raise RuntimeError(f"worker has no payload for run {token}: the worker plugin "
                           "was not set up") from None
    from harbor.study.executor import task_threads

    with task_threads():
        return func(shared, task)
