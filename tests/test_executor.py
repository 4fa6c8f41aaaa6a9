"""The one executor of the studies (harbor.study.executor): serial, threads, an embedded
Dask cluster of worker processes and a remote scheduler give the same numbers; a worker
lost mid-run is replaced and the result is complete and identical; an unreachable
scheduler is one line, exit 2, nothing written.

One two-process LocalCluster serves the whole module. The climate is small (points-only
solves of the invented collinear entrance of tests/test_climate.py, two layouts); the
reference downtimes are worked out by hand from K' of plain `harbor.solve` runs.
"""

import dataclasses
import os
import signal

import numpy as np
import pytest

import harbor
from harbor.cli import main
from harbor.errors import InputError
from harbor.study.alternatives import compare_alternatives, group_tasks, solve_group
from harbor.study.executor import (SCHEDULER_ENV, TIMEOUT_ENV, TaskEstimate, make_executor,
                                   plan_local_cluster)
from harbor.study.scenario import Sea
from tests.test_alternatives import NARROW_TOML
from tests.test_climate import GAP_TOML

distributed = pytest.importorskip("distributed")

#: (T1/3 s, from deg, s_max, percent); 4 (period, spreading) tasks per layout, two of
#: them with two directions
ROWS = [(5.0, 180.0, 10.0, 20.0), (5.0, 200.0, 10.0, 10.0), (7.0, 190.0, 25.0, 15.0),
        (7.0, 160.0, 25.0, 15.0), (9.0, 185.0, 10.0, 25.0), (10.0, 175.0, 75.0, 15.0)]
#: the Penney & Price superposition: the fastest screening method for this entrance, which
#: keeps the module within its time budget (the executor does not depend on the method)
M = "superposition"
#: an address where nothing listens (port 9 is the discard service, closed here)
NOWHERE = "tcp://127.0.0.1:9"


@pytest.fixture(scope="module")
def study(tmp_path_factory):
    d = tmp_path_factory.mktemp("executor")
    (d / "wide.toml").write_text(GAP_TOML)
    (d / "narrow.toml").write_text(NARROW_TOML)
    scs = [harbor.load_scenario(d / "wide.toml"), harbor.load_scenario(d / "narrow.toml")]
    # heights: half the rows at 2 m, half at 0.2 m, so that the berths are down in some
    # rows and not in others
    heights = [2.0 if i % 2 == 0 else 0.2 for i in range(len(ROWS))]
    table = d / "climate.csv"
    table.write_text("height,period,from,percent,spreading\n" + "".join(
        f"{h:g},{t:g},{f:g},{p:g},{s:g}\n" for h, (t, f, s, p) in zip(heights, ROWS)))
    # by hand: K' of one plain solve per row (no executor, no grouping), then
    # D_j = sum_i p_i [K'_ij H_i > limit_j]
    hand = {}
    for name, sc in zip(("wide", "narrow"), scs):
        seas = tuple(Sea(name=f"r{i}", kind="random", height=1.0, period=t, from_deg=f,
                         spreading=s) for i, (t, f, s, _) in enumerate(ROWS))
        limited = tuple(p for p in sc.points if p.limit is not None)
        ds = harbor.solve(dataclasses.replace(sc, seas=seas, points=limited), grid=False,
                          method=M)
        kd = ds.point_kd.values                                  # (rows, points)
        lim = np.array([p.limit for p in limited])
        pct = np.array([r[3] for r in ROWS])
        hand[name] = (kd, (pct[:, None] * (kd * np.array(heights)[:, None] > lim)).sum(0))
    return scs, table, hand


@pytest.fixture(scope="module")
def cluster(study):
    # the embedded cluster of `--executor local`, limited to two worker processes
    ex = make_executor("local", workers=2, n_tasks=8,
                       estimate=TaskEstimate(1.0, 100 * 2**20))
    assert ex.kind == "local" and ex.workers == 2
    ex.client.wait_for_workers(2, timeout=60)
    # warm both workers (imports, compiled kernels) while this process computes the
    # serial reference: one small solve pinned to each, not waited for
    task = group_tasks("w", [5.0], [180.0], [10.0])[0][0]
    payload = {"scenarios": {"w": study[0][0]}, "method": M}
    warm = [ex.client.submit(solve_group, payload, task, workers=[w], pure=False)
            for w in ex.client.scheduler_info()["workers"]]
    yield ex.cluster, ex.client
    del warm
    ex.close()


def _check(ds, hand):
    for alt, (kd, total) in hand.items():
        np.testing.assert_allclose(ds.kd.sel(alternative=alt).values, kd, rtol=0,
                                   atol=1e-12)
        np.testing.assert_allclose(ds.downtime_total.sel(alternative=alt).values, total,
                                   rtol=0, atol=1e-12)


@pytest.fixture(scope="module")
def serial(study, cluster):
    scs, table, hand = study
    ds = compare_alternatives(scs, table, kind="serial", method=M)
    assert ds.attrs["tasks"] == 8 and ds.attrs["executor"].startswith("one task")
    _check(ds, hand)
    # the hand rows are not trivial: each layout has berths down in some rows only
    assert 0 < ds.exceeds.values.sum() < ds.exceeds.size
    return ds


def _same(a, b):
    for v in ("kd", "point_height", "downtime", "downtime_total", "reaching"):
        np.testing.assert_allclose(a[v].values, b[v].values, rtol=0, atol=1e-12,
                                   equal_nan=True)
    assert (a.exceeds.values == b.exceeds.values).all()


def test_threads_same_as_serial(study, serial):
    scs, table, hand = study
    with make_executor("threads", workers=2, n_tasks=8) as ex:
        assert ex.kind == "threads" and ex.workers == 2
        ds = compare_alternatives(scs, table, executor=ex, method=M)
    _same(ds, serial)


def test_local_cluster_same_as_serial(study, serial, cluster):
    scs, table, hand = study
    _, client = cluster
    with make_executor(client=client) as ex:
        assert ex.workers == 2
        ds = compare_alternatives(scs, table, executor=ex, method=M)
    assert "Dask scheduler" in ds.attrs["executor"]
    _same(ds, serial)
    _check(ds, hand)
    # the payload went to the workers in a plugin and was removed afterwards
    left = client.run(lambda: sorted(__import__(
        "harbor.study._dask_plugin", fromlist=["_SHARED"])._SHARED))
    assert all(v == [] for v in left.values())


def test_remote_scheduler_by_address_and_env(study, serial, cluster, monkeypatch):
    scs, table, _ = study
    c, _ = cluster
    ds = compare_alternatives(scs, table, scheduler=c.scheduler_address, method=M)
    _same(ds, serial)
    monkeypatch.setenv(SCHEDULER_ENV, c.scheduler_address)
    with make_executor("auto", n_tasks=8) as ex:
        assert ex.kind == "remote" and ex.address == c.scheduler_address


def test_lost_worker_is_replaced(study, serial, cluster):
    scs, table, _ = study
    _, client = cluster
    pids = client.run(os.getpid)                      # worker address -> process id
    before = set(pids)
    killed = []

    def kill_one_busy_worker(name, done, total):
        # after the first result, end a worker process that holds work, abruptly (as a
        # machine lost from a cluster): its tasks are lost with it and its nanny starts
        # a new worker
        if killed:
            return
        busy = [w for w, keys in client.processing().items() if keys and w in pids]
        victim = (busy or sorted(before))[0]
        killed.append(victim)
        os.kill(pids[victim], signal.SIGKILL)

    with make_executor(client=client) as ex:
        ds = compare_alternatives(scs, table, executor=ex, progress=kill_one_busy_worker,
                                  method=M)
    assert killed and killed[0] in before
    assert killed[0] not in set(client.scheduler_info()["workers"])   # really lost
    _same(ds, serial)


def test_unreachable_scheduler_cli(study, tmp_path, capsys, monkeypatch):
    scs, table, _ = study
    monkeypatch.setenv(TIMEOUT_ENV, "1")
    out = tmp_path / "out"
    rc = main(["climate", scs[0].path, scs[1].path, "--table", str(table), "--out",
               str(out), "--scheduler", NOWHERE])
    err = capsys.readouterr().err.strip().splitlines()
    assert rc == 2
    assert len(err) == 1 and "cannot reach the Dask scheduler" in err[0] and NOWHERE in err[0]
    assert not out.exists()
    # the same through the environment variable, one scenario
    monkeypatch.setenv(SCHEDULER_ENV, NOWHERE)
    rc = main(["climate", scs[0].path, "--table", str(table), "--out", str(out)])
    err = capsys.readouterr().err.strip().splitlines()
    assert rc == 2 and len(err) == 1 and "--scheduler" in err[0]
    assert not out.exists()


def test_cli_one_scenario_scheduler(study, cluster, tmp_path, capsys):
    # the single-scenario command routed through a remote scheduler: its downtime.csv
    # holds the hand-computed totals
    import pandas as pd

    scs, table, hand = study
    c, _ = cluster
    out = tmp_path / "remote"
    assert main(["climate", scs[0].path, "--table", str(table), "--out", str(out),
                 "--quiet", "--method", M, "--scheduler", c.scheduler_address]) == 0
    capsys.readouterr()
    got = pd.read_csv(out / "downtime.csv")["total"].to_numpy()
    np.testing.assert_allclose(got, hand["wide"][1], atol=1e-9)


def test_plan_local_cluster():
    # workers limited by cores, tasks and memory: 0.8 x available / (worker base + task)
    gib = 2**30
    assert plan_local_cluster(100, TaskEstimate(10, 100 * 2**20), cores=8,
                              memory=64 * gib)[0] == 8
    assert plan_local_cluster(3, TaskEstimate(10, 100 * 2**20), cores=8,
                              memory=64 * gib)[0] == 3
    n, mem = plan_local_cluster(100, TaskEstimate(60, 3 * gib), cores=64, memory=16 * gib)
    assert n == int(0.8 * 16 * gib // (3 * gib + 400 * 2**20)) == 3
    assert mem >= 3 * gib
    assert plan_local_cluster(100, TaskEstimate(60, 64 * gib), cores=8,
                              memory=16 * gib)[0] == 1
    with pytest.raises(InputError):
        make_executor("processes")
