"""Layout alternatives x a wave climate on Dask: tasks, costs, speed-up and a projection.

    python benchmarks/dask_climate.py [--alternatives 2] [--repeat 3] [--noop 200] [--json FILE]

Uses the bundled demo harbour (points only, screening methods) and alternatives made by
moving the west head (0, +20, -20 m, ...), against an invented 500-row scatter table
(10 H1/3 classes x 10 T1/3 classes x 5 directions; s_max 10 below 7 s, 25 to 10 s, 75
above, so 10 (period, spreading) tasks of 5 directions per alternative). In one process
it measures, side by side:

1. the whole study serially in this process, and each task's wall time there, with one
   BLAS thread per task (as the executor runs them) and, side by side, with the
   libraries' default threads; the peak memory of a task (tracemalloc: numpy reports
   its buffers to it);
2. embedded clusters of one and of two worker processes (started, then warmed up by one
   run each so that imports and compiled-kernel loading are not counted): each task's
   time on a worker, the scheduler's cost per task (no-op tasks through the same
   executor path: submit, plugin look-up, result back), the whole study on each
   cluster, runs interleaved, best of --repeat, the speed-up and the workers' memory;
3. that the serial and both cluster results agree to 1e-12;

and from those projects the wall time of 10 alternatives x the 500-row climate on 1, 8
and 64 workers (assumptions printed with it). The machine this runs on may be shared:
the load average is printed beside the figures.
"""

import argparse
import dataclasses
import json
import math
import os
import statistics
import time
import tracemalloc

import numpy as np
import pandas as pd

import harbor
from harbor.cli import demo_path
from harbor.study.alternatives import compare_alternatives, group_tasks, solve_group
from harbor.study.executor import Executor, task_threads
from harbor.study.sweep import move_head


def climate_500():
    """The invented 500-row scatter table (percentages add up to 100)."""
    H = np.linspace(0.25, 2.5, 10)
    T = np.arange(4.0, 14.0, 1.0)
    D = [300.0, 315.0, 330.0, 345.0, 0.0]
    rows = []
    for h in H:
        for t in T:
            for d in D:
                s = 10.0 if t < 7 else (25.0 if t <= 10 else 75.0)
                rows.append((h, t, d, math.exp(-h) * math.exp(-abs(t - 8) / 3), s))
    df = pd.DataFrame(rows, columns=["height", "period", "from", "percent", "spreading"])
    df["percent"] *= 100.0 / df["percent"].sum()
    return df


def alternatives(n):
    sc = harbor.load_scenario(demo_path())
    out = [sc]
    moves = [20.0, -20.0, 40.0, -40.0, 60.0, -60.0, 80.0, 10.0, -10.0]
    for m in moves[: n - 1]:
        moved, _ = move_head(sc, "west arm", m)
        out.append(moved)
    return out, ["demo"] + [f"west {m:+g} m" for m in moves[: n - 1]]


def _noop(shared, task):
    return task


def _timed(shared, task):
    t0 = time.perf_counter()
    solve_group(shared, task)
    return None, time.perf_counter() - t0


def _rss():
    import psutil

    return psutil.Process().memory_info().rss


def load():
    try:
        return os.getloadavg()
    except OSError:  # pragma: no cover
        return (float("nan"),) * 3


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--alternatives", type=int, default=2)
    ap.add_argument("--noop", type=int, default=200, help="no-op tasks for the overhead")
    ap.add_argument("--repeat", type=int, default=3, help="cluster runs of each size")
    ap.add_argument("--json", help="also write the figures to this file")
    a = ap.parse_args()

    table = climate_500()
    scs, names = alternatives(a.alternatives)
    from harbor.study.climate import climate_table

    tab = climate_table(table)
    print(f"machine: {os.cpu_count()} cores, load average {load()[0]:.1f} at start "
          "(shared with other jobs: timings are noisy)")

    # 1. in this process: the whole study serially, per-task times, per-task memory
    limited = {n: dataclasses.replace(s, points=tuple(p for p in s.points
                                                      if p.limit is not None))
               for n, s in zip(names, scs)}
    tasks, _, cases, _ = group_tasks(names[0], tab["period"], tab["from"], tab["spreading"],
                                     heights=tab["height"])
    shared = {"scenarios": limited, "method": "auto"}
    solve_group(shared, tasks[0])                      # warm: compiled kernels, caches
    t0 = time.perf_counter()
    serial_ds = compare_alternatives(scs, tab, names=names, kind="serial")
    wall_serial = time.perf_counter() - t0
    times_default = [_timed(shared, t)[1] for t in tasks]      # BLAS threads as loaded
    with task_threads():                                         # what the executor does
        times = [_timed(shared, t)[1] for t in tasks]
    peaks = []
    for t in tasks[:3]:                 # tracemalloc slows numpy a lot: memory only
        tracemalloc.start()
        solve_group(shared, t)
        peaks.append(tracemalloc.get_traced_memory()[1])
        tracemalloc.stop()
    print(f"tasks per alternative: {len(tasks)} (period, spreading) with 5 directions "
          f"each, {len(cases)} distinct solves, {len(tab)} rows, "
          f"{len(limited[names[0]].points)} berths")
    print(f"in this process, serial: {a.alternatives} alternatives {wall_serial:.1f} s; "
          f"per task median {statistics.median(times):.2f} s (min {min(times):.2f}, max "
          f"{max(times):.2f}) with one BLAS thread per task; with the libraries' default "
          f"threads median {statistics.median(times_default):.2f} s (min "
          f"{min(times_default):.2f}, max {max(times_default):.2f})")
    print(f"per task peak memory (tracemalloc, numpy buffers): "
          f"{max(peaks) / 2**20:.1f} MiB")

    # 2. embedded clusters of one and two workers, runs interleaved so that both see
    #    the same drift of the machine's load; best of --repeat
    from distributed import Client, LocalCluster

    ex, start, warm = {}, {}, {}
    for n in (1, 2):
        t0 = time.perf_counter()
        cluster = LocalCluster(n_workers=n, threads_per_worker=1, processes=True,
                               dashboard_address=":0")
        client = Client(cluster, set_as_default=False)
        client.wait_for_workers(n)
        start[n] = time.perf_counter() - t0
        ex[n] = Executor("local", n, client=client, cluster=cluster)
        t0 = time.perf_counter()
        compare_alternatives(scs[:1], tab, names=names[:1], executor=ex[n])   # warm-up
        warm[n] = time.perf_counter() - t0
    all_tasks = [t for nm in names for t in group_tasks(
        nm, tab["period"], tab["from"], tab["spreading"], heights=tab["height"])[0]]
    worker_times = [r[1] for r in ex[1].map(_timed, shared, all_tasks)]
    ex[1].map(_noop, None, list(range(10)))
    t0 = time.perf_counter()
    ex[1].map(_noop, None, list(range(a.noop)))
    overhead = (time.perf_counter() - t0) / a.noop
    walls = {1: [], 2: []}
    results = {}
    for _ in range(a.repeat):
        for n in (1, 2):
            t0 = time.perf_counter()
            results[n] = compare_alternatives(scs, tab, names=names, executor=ex[n])
            walls[n].append(time.perf_counter() - t0)
    rss = {n: max(ex[n].client.run(_rss).values()) for n in (1, 2)}
    for n in (1, 2):
        print(f"{n} worker(s): cluster start {start[n]:.1f} s, warm-up run {warm[n]:.1f} s, "
              f"{a.alternatives} alternatives x {len(tab)} rows: best {min(walls[n]):.1f} s "
              f"of {', '.join(f'{w:.1f}' for w in walls[n])}; worker RSS "
              f"{rss[n] / 2**20:.0f} MiB")
    per_task = statistics.median(worker_times)
    print(f"per task on a worker: median {per_task:.2f} s (min {min(worker_times):.2f}, "
          f"max {max(worker_times):.2f}, {len(worker_times)} tasks)")
    print(f"scheduler overhead per task (no-op tasks, 1 worker): {overhead * 1e3:.1f} ms")
    speedup = min(walls[1]) / min(walls[2])
    print(f"speed-up 1 -> 2 workers: {speedup:.2f} (load average now {load()[0]:.1f} on "
          f"{os.cpu_count()} cores)")
    for n, ds in results.items():
        for v in ("kd", "downtime", "downtime_total"):
            d = np.nanmax(np.abs(ds[v].values - serial_ds[v].values))
            assert d <= 1e-12, (n, v, d)
    print("serial, 1-worker and 2-worker results agree to 1e-12: yes")
    for e in ex.values():
        e.close()
    start, warm = start[2], warm[2]

    # projection: 10 alternatives x 500 rows
    n_alt, n_tasks = 10, 10 * len(tasks)
    tt = per_task
    eff = speedup / 2.0
    print("\nprojection, 10 alternatives x 500-row climate (screening methods):")
    print(f"  assumptions: {n_tasks} tasks ({len(tasks)} (period, spreading) per "
          f"alternative, 5 directions each) of {tt:.2f} s (median on a worker, above); "
          f"scheduler cost {overhead * 1e3:.1f} ms per task, paid serially by the scheduler; "
          f"cluster start and first-task warm-up {start + warm:.0f} s once (measured here, "
          "loaded machine); wall = start + ceil(tasks / W) x task / e + tasks x overhead, "
          f"with e = 1 on dedicated cores and e = {eff:.2f} as measured here from 1 to 2 "
          "workers on a shared machine")
    proj = {}
    for w in (1, 8, 64):
        rounds = math.ceil(n_tasks / w)
        ideal = start + warm + rounds * tt + n_tasks * overhead
        shared_eff = start + warm + rounds * tt / (eff if w > 1 else 1.0) + n_tasks * overhead
        proj[w] = (ideal, shared_eff)
        print(f"  {w:>3} workers: {rounds:>3} rounds, {ideal:7.1f} s dedicated, "
              f"{shared_eff:7.1f} s at the measured efficiency")
    print("  (a full-field task -- one factorisation per period of tens of seconds and a "
          "few GB -- changes only the task time and the memory per worker: with 30 s a "
          f"task, {n_tasks} tasks take {n_tasks * 30 / 60:.0f} min on 1 worker, "
          f"{math.ceil(n_tasks / 8) * 30 / 60:.1f} min on 8, "
          f"{math.ceil(n_tasks / 64) * 30 / 60:.1f} min on 64; an assumption, not measured)")
    if a.json:
        with open(a.json, "w") as fh:
            json.dump({"tasks_per_alternative": len(tasks), "per_task_s": times,
                       "per_task_peak_bytes": peaks, "overhead_s": overhead,
                       "worker_task_s": worker_times, "default_threads_task_s": times_default, "serial_s": wall_serial,
                       "walls_s": walls, "speedup": speedup, "cluster_start_s": start,
                       "warm_s": warm, "projection_s": proj, "load": load()}, fh, indent=1)


if __name__ == "__main__":
    main()
