"""Start-up time of the ``harbor`` command (not a test: run by hand).

Runs each command several times in fresh interpreters, interleaved so that the load of a
shared machine hits every case alike, and prints the median and the best wall time.
The "eager" line imports what ``import harbor`` used to load before the package became
lazy (the solver, numba, xarray, pandas, scipy.sparse), as the old baseline.

    python3 benchmarks/startup.py [--repeat 5]
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "scenarios" / "demo.toml"

CASES = {
    "harbor --version": [sys.executable, "-m", "harbor", "--version"],
    "harbor --help": [sys.executable, "-m", "harbor", "--help"],
    "eager import (old __init__)": [sys.executable, "-c",
                                    "import harbor.solver.kernels, harbor.waves, "
                                    "harbor.study.scenario, harbor.solver.assemble"],
    "harbor check demo": [sys.executable, "-m", "harbor", "check", str(DEMO)],
}


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    env = {"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"}
    times = {k: [] for k in CASES}
    for _ in range(args.repeat):
        for name, cmd in CASES.items():
            t0 = time.perf_counter()
            subprocess.run(cmd, cwd=ROOT, env=env, stdout=subprocess.DEVNULL,
                           stderr=subprocess.DEVNULL, check=True)
            times[name].append(time.perf_counter() - t0)
    print(f"{'command':<30} {'median s':>9} {'best s':>8}   ({args.repeat} runs each)")
    for name, t in times.items():
        print(f"{name:<30} {statistics.median(t):9.2f} {min(t):8.2f}")


if __name__ == "__main__":
    main()
