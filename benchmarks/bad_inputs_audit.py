"""Feed bad and extreme inputs and a few machine faults to the command line; print the
table of outcomes (set / tried / clear refusal / wrong exit code / partial output /
silent nonsense).

Not a test: a measurement, run by hand after touching a reader, an output writer or the
command line (``python3 benchmarks/bad_inputs_audit.py [--no-faults]``; a few minutes).
Most cases run in-process (``harbor.cli.main``); the signals run as subprocesses.

Classification of each case:
- clear: the expected exit code (2, or the documented code of a machine fault), one line
  on stderr, no traceback, no RuntimeWarning, nothing written; or, for a valid input
  (marked ``ok``), exit 0 with finite outputs;
- wrong exit code: anything else that ends with a code (1 = internal error, 0 for an
  input that must be refused ...);
- partial output: files left in the working folder by a refused or failed run;
- silent nonsense: exit 0 for an absurd input without a warning, or inf/NaN or
  RuntimeWarning text in an output or on stderr.
"""

from __future__ import annotations

import argparse
import contextlib
import errno
import io
import os
import re
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from harbor.cli import main  # noqa: E402

BASE = (ROOT / "tests" / "test_bad_inputs.py").read_text().split('BASE = """', 1)[1] \
    .split('"""', 1)[0]
BIG = "1" + "0" * 400
SHOW = False


def _sub(text, old, new):
    assert old in text, old
    return text.replace(old, new, 1)


def scenario_cases():
    """(name, text, expect, argv-tail) for ``harbor check`` / ``points``."""
    vals = ["0", "-1", "1e308", "-1e308", "5e-324", "1e-300", BIG, "-" + BIG, "inf", "nan",
            '"abc"', "true", "1e-6", "1e6"]
    keys = {
        "depth": ("depth = 8.0", "depth = {}"),
        "g": ("depth = 8.0", "depth = 8.0\ng = {}"),
        "height": ("height = 1.2", "height = {}"),
        "period": ("period = 7.0", "period = {}"),
        "from": ("from = 10.0", "from = {}"),
        "limit": ("limit = 0.4", "limit = {}"),
        "spacing": ("spacing = 10.0", "spacing = {}"),
        "x of a vertex": ("[[500000.0, 6300000.0]", "[[{}, 6300000.0]"),
        "x of a point": ("at = [500150.0", "at = [{}"),
        "x of bounds": ("bounds = [499950.0", "bounds = [{}"),
    }
    out = []
    # values that are valid for a key: north is 0, a direction may be tiny, a grid may
    # start anywhere in the CRS as long as it stays within its size limit
    valid = {("from", "0"), ("from", "5e-324"), ("from", "1e-300"), ("from", "1e-6"),
             ("x of bounds", "1e-6"), ("x of bounds", "0"), ("x of bounds", "-1"),
             ("x of bounds", "5e-324"), ("x of bounds", "1e-300")}
    for k, (old, new) in keys.items():
        for v in vals:
            text = _sub(BASE, old, new.format(v))
            out.append((f"{k} = {v[:12]}", text, "ok" if (k, v) in valid else "refuse", []))
    rnd = ("\n[[sea]]\nname = \"wind\"\nkind = \"random\"\nheight = 1.0\nperiod = 7.0\n"
           "from = 0.0\n")
    for v in ["0", "-3", "1e308", "inf", BIG, "1e-6"]:
        out.append((f"spreading = {v[:12]}", BASE + rnd + f"spreading = {v}\n", "refuse", []))
        out.append((f"gamma = {v[:12]}", BASE + rnd + f"spectrum = \"jonswap\"\ngamma = {v}\n",
                    "refuse", []))
    for v in ["1e-6", "1000.0", "0.1"]:
        out.append((f"peak_period = {v}", BASE + rnd + f"spectrum = \"jonswap\"\n"
                    f"peak_period = {v}\n", "refuse", []))
    out += [
        ("T 3 s, 10 m spacing (1.4 pts/L)", _sub(BASE, "period = 7.0", "period = 3.0"),
         "refuse", []),
        ("T 3 s, 3 m spacing (4.7 pts/L): warning", _sub(_sub(BASE, "period = 7.0",
                                                              "period = 3.0"),
                                                         "spacing = 10.0", "spacing = 3.0"),
         "warn", []),
        ("collinear outline", _sub(BASE, "[500500.0, 6299800.0], [499800.0, 6299800.0]]",
                                   "[500900.0, 6300010.0]]"), "refuse", []),
        ("arms touching corner to corner", _sub(
            BASE, "[[500300.0, 6300000.0], [500300.0, 6300200.0], [500130.0, 6300200.0]]",
            "[[500000.0, 6300300.0], [500000.0, 6300200.0], [499900.0, 6300100.0]]"),
         "ok", []),
        ("arms crossing at a shared vertex", _sub(
            BASE, "[[500300.0, 6300000.0], [500300.0, 6300200.0], [500130.0, 6300200.0]]",
            "[[500000.0, 6300300.0], [500000.0, 6300200.0], [500100.0, 6300100.0]]"),
         "refuse", []),
        ("point on an arm head", _sub(BASE, "at = [500150.0, 6300100.0]",
                                      "at = [500070.0, 6300200.0]"), "refuse", []),
        ("valid scenario", BASE, "ok", []),
    ]
    return out


def points_cases():
    xy = [("1e308", "1e308"), ("inf", "0"), ("nan", "nan"), ("500070.0", "6300200.0"),
          ("500000.0", "6300200.0"), ("500000.0", "6300100.0"), ("500100.0", "6300000.0"),
          (BIG, "0"), ("abc", "1")]
    return [(f"--at {x[:10]} {y[:10]}", ["--at", x, y], "refuse") for x, y in xy] + \
        [("--at in the basin", ["--at", "500150.0", "6300150.0"], "ok")]


def diagram_cases():
    base = ["diagram", "gap", "--direction", "90"]
    c = []
    for w in ["1e4", "inf", "nan", "0", "-1", "1e308"]:
        c.append((f"gap --width {w}", base + ["--width", w], "refuse"))
    for r in ["-0.1", "nan", "1e-4", "0", "inf", "5"]:
        c.append((f"--resolution {r}", base + ["--width", "2", "--resolution", r], "refuse"))
    for d in ["0", "180", "nan", "inf"]:
        c.append((f"--direction {d}", ["diagram", "semi-infinite", "--direction", d],
                  "refuse"))
    c.append(("--extent inf", ["diagram", "semi-infinite", "--extent", "-4", "-2", "inf",
                               "8"], "refuse"))
    c.append(("--extent 1e308 span", ["diagram", "semi-infinite", "--extent", "-4", "-2",
                                      "1e308", "8"], "refuse"))
    c.append(("--random --spreading nan", base + ["--width", "2", "--random", "--spreading",
                                                  "nan"], "refuse"))
    c.append(("gap --width 2 (valid)", base + ["--width", "2"], "ok"))
    c.append(("--extent reversed", ["diagram", "semi-infinite", "--extent", "4", "-2", "-4",
                                    "8"], "refuse"))
    c.append(("--extent 1e6 wide", ["diagram", "semi-infinite", "--extent", "-4", "-2",
                                    "1e6", "8"], "refuse"))
    c.append(("--extent nan", ["diagram", "semi-infinite", "--extent", "-4", "-2",
                               "nan", "8"], "refuse"))
    c.append(("gap without --width", ["diagram", "gap"], "refuse"))
    c.append(("unknown case", ["diagram", "ring"], "refuse"))
    return c


def other_cli_cases():
    """(name, argv after 'harbor', expect); s.toml is BASE, c.csv a valid table."""
    return [
        ("sweep --move nan", ["sweep", "s.toml", "--arm", "west arm", "--move", "nan", "1",
                              "1"], "refuse"),
        ("sweep --move inf", ["sweep", "s.toml", "--arm", "west arm", "--move", "0", "inf",
                              "1"], "refuse"),
        ("sweep --move 1e9 steps", ["sweep", "s.toml", "--arm", "west arm", "--move", "0",
                                    "1e9", "1"], "refuse"),
        ("sweep --move step 0", ["sweep", "s.toml", "--arm", "west arm", "--move", "0", "10",
                                 "0"], "refuse"),
        ("sweep --arm unknown", ["sweep", "s.toml", "--arm", "nowhere", "--move", "0", "10",
                                 "5"], "refuse"),
        ("climate --workers 0", ["climate", "s.toml", "--table", "c.csv", "--workers", "0"],
         "refuse"),
        ("climate --max-cases 0", ["climate", "s.toml", "--table", "c.csv", "--max-cases",
                                   "0"], "refuse"),
        ("climate --move inf", ["climate", "s.toml", "--table", "c.csv", "--arm", "west arm",
                                "--move", "inf"], "refuse"),
        ("climate --arm without --move", ["climate", "s.toml", "--table", "c.csv", "--arm",
                                          "west arm"], "refuse"),
        ("points --sea unknown", ["points", "s.toml", "--sea", "nope"], "refuse"),
        ("map --sea unknown", ["map", "s.toml", "--sea", "nope", "--out", "o"], "refuse"),
        ("map --show bogus", ["map", "s.toml", "--show", "bogus"], "refuse"),
        ("unknown command", ["bogus"], "refuse"),
        ("no command", [], "refuse"),
        ("points --at one number", ["points", "s.toml", "--at", "1"], "refuse"),
    ]


def climate_cases():
    h = "height,period,from,percent\n"
    rows = {
        "percent 1e308": h + "1.0,7,10,1e308\n",
        "percent 120": h + "1.0,7,10,120\n",
        "duplicate rows to 115 %": h + "1.0,7,10,57.5\n1.0,7,10,57.5\n",
        "height 400 digits": h + f"{BIG},7,10,50\n",
        "height 1e308": h + "1e308,7,10,50\n",
        "period 1e-6": h + "1.0,1e-6,10,50\n",
        "period 1e308": h + "1.0,1e308,10,50\n",
        "from 400": h + "1.0,7,400,50\n",
        "from nan": h + "1.0,7,nan,50\n",
        "spreading inf": "height,period,from,percent,spreading\n1.0,7,10,50,inf\n",
        "no rows": h,
        "empty": "",
        "missing column": "height,period,percent\n1,7,50\n",
        "BOM, valid": "\ufeff" + h + "1.0,7,10,100\n",
        "height -1": h + "-1,7,10,50\n",
        "percent -5": h + "1.0,7,10,-5\n",
        "spreading 0": "height,period,from,percent,spreading\n1.0,7,10,50,0\n",
        "spreading 1e-6": "height,period,from,percent,spreading\n1.0,7,10,50,1e-6\n",
        "text in a cell": h + "1.0,seven,10,50\n",
        "too many cells": h + "1.0,7,10,50,9\n",
        "duplicated column": "height,period,from,percent,percent\n1,7,10,50,50\n",
        "unbalanced quote": h + '1.0,"7,10,50\n',
        "percent 1e-300 (valid)": h + "1.0,7,10,100\n0.5,7,20,1e-300\n",
        "duplicates within 100 % (valid, warned)": h + "1.0,7,10,40\n1.0,7,10,40\n",
        "period 600.5": h + "1.0,600.5,10,50\n",
    }
    c = [(k, v, [], "ok" if "valid" in k else "refuse") for k, v in rows.items()]
    many = h + "".join(f"1.0,{5 + i * 0.001:.3f},10,0.01\n" for i in range(3000))
    c.append(("3000 distinct cases", many, [], "refuse"))
    c.append(("2 cases, --max-cases 1", h + "1,7,10,50\n1,8,10,50\n", ["--max-cases", "1"],
              "refuse"))
    return c


class Outcome:
    def __init__(self, code, out, err, written, secs):
        self.code, self.out, self.err, self.written, self.secs = code, out, err, written, secs


def _snapshot(folder):
    return {str(p.relative_to(folder)) for p in Path(folder).rglob("*")}


def run_inproc(argv, folder):
    before = _snapshot(folder)
    o, e = io.StringIO(), io.StringIO()
    cwd = os.getcwd()
    os.chdir(folder)
    t0 = time.perf_counter()
    try:
        with contextlib.redirect_stdout(o), contextlib.redirect_stderr(e):
            import warnings

            with warnings.catch_warnings(record=True) as caught:
                warnings.simplefilter("always")
                try:
                    code = main([str(a) for a in argv])
                except SystemExit as s:
                    code = s.code
                for w in caught:
                    e.write(f"{w.category.__name__}: {w.message}\n")
    finally:
        os.chdir(cwd)
    written = sorted(_snapshot(folder) - before)
    return Outcome(code, o.getvalue(), e.getvalue(), written, time.perf_counter() - t0)


def classify(res, expect, want_code=2):
    nonsense_text = re.search(r"\b(nan|inf)\b", res.out, re.I) or "RuntimeWarning" in res.err \
        or "Traceback" in res.err
    if expect in ("ok", "warn"):
        if res.code != 0:
            return "wrong"
        if nonsense_text:
            return "nonsense"
        if expect == "warn" and "warning" not in res.out.lower():
            return "nonsense"
        return "clear"
    if res.code == 0:
        return "nonsense"
    if res.code != want_code:
        return "wrong"
    if res.written:
        return "partial"
    if len(res.err.strip().splitlines()) != 1 or nonsense_text:
        return "wrong"
    return "clear"


def audit_inproc(tmp):
    table = {}
    details = []

    def record(set_, name, res, verdict):
        table.setdefault(set_, []).append(verdict)
        if SHOW:
            line = (res.err.strip().splitlines() or [""])[-1]
            print(f"[{set_[:8]}] {name}: exit {res.code}: {line[:150]}")
        if verdict != "clear":
            details.append((set_, name, res.code, verdict, res.err.strip()[:160]))

    for name, text, expect, tail in scenario_cases():
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(text)
        res = run_inproc(["check", "s.toml"], d)
        res.written = [w for w in res.written if w != "s.toml"]
        record("scenario TOML", name, res, classify(res, expect))
    special = {"FIFO": "fifo", "/dev/zero": "/dev/zero", "symlink loop": "loop",
               "folder": "dir", "17 MiB file": "huge", "BOM (valid)": "bom",
               "not UTF-8": "latin", "missing": "none"}
    for name, kind in special.items():
        d = Path(tempfile.mkdtemp(dir=tmp))
        p = d / "s.toml"
        if kind == "fifo":
            os.mkfifo(p)
        elif kind == "/dev/zero":
            p = Path("/dev/zero")
        elif kind == "loop":
            os.symlink(p, p)
        elif kind == "dir":
            p.mkdir()
        elif kind == "huge":
            with open(p, "wb") as fh:
                fh.truncate(17 * 2**20)
        elif kind == "bom":
            p.write_bytes(b"\xef\xbb\xbf" + BASE.encode())
        elif kind == "latin":
            p.write_bytes(BASE.replace("Skerrow", "Sk\xe9rrow").encode("latin-1"))
        before = _snapshot(d)
        res = run_inproc(["check", str(p)], d)
        res.written = sorted(_snapshot(d) - before)
        record("CLI arguments, special files", f"check {name}", res,
               classify(res, "ok" if "valid" in name else "refuse"))
    for name, tail, expect in points_cases():
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        res = run_inproc(["points", "s.toml", *tail], d)
        record("CLI arguments, special files", name, res, classify(res, expect))
    for name, argv, expect in diagram_cases():
        d = Path(tempfile.mkdtemp(dir=tmp))
        res = run_inproc(argv + ["--out", "d.png"], d)
        if expect == "ok":
            res.written = []
        record("CLI arguments, special files", name, res, classify(res, expect))
    for name, out, code in [("map --out existing file", "afile", 2),
                            ("map --out /dev/null", "/dev/null", 2),
                            ("map --out /proc/x", "/proc/x", 2),
                            ("diagram --out folder", "folder.png", 2),
                            ("diagram --out .txt", "d.txt", 2)]:
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        (d / "afile").write_text("keep")
        (d / "folder.png").mkdir()
        argv = (["diagram", "semi-infinite", "--out", out] if name.startswith("diagram")
                else ["map", "s.toml", "--out", out, "--quiet"])
        res = run_inproc(argv, d)
        record("CLI arguments, special files", name, res, classify(res, "refuse", code))
    for name, kind in special.items():          # harbor import of a layout file
        if "valid" in name or kind in ("bom", "latin"):
            continue
        d = Path(tempfile.mkdtemp(dir=tmp))
        p = d / "layout.gpkg"
        if kind == "fifo":
            os.mkfifo(p)
        elif kind == "/dev/zero":
            os.symlink("/dev/zero", p)
        elif kind == "loop":
            os.symlink(p, p)
        elif kind == "dir":
            p.mkdir()
        elif kind == "huge":
            p = d / "layout.geojson"
            with open(p, "wb") as fh:
                fh.truncate(17 * 2**20)     # within the 1 GiB limit: GDAL must refuse it
        before = _snapshot(d)
        res = run_inproc(["import", str(p), "--arms", "arms", "--out", "new.toml"], d)
        res.written = sorted(_snapshot(d) - before)
        record("CLI arguments, special files", f"import {name}", res, classify(res, "refuse"))
    for name, argv, expect in other_cli_cases():
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        (d / "c.csv").write_text("height,period,from,percent\n1.0,7,10,100\n")
        before = _snapshot(d)
        res = run_inproc(argv, d)
        res.written = sorted(_snapshot(d) - before)
        record("CLI arguments, special files", name, res, classify(res, expect))
    for name, kind in special.items():
        if "valid" in name or kind in ("bom", "latin"):
            continue
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        p = d / "c.csv"
        if kind == "fifo":
            os.mkfifo(p)
        elif kind == "/dev/zero":
            p = Path("/dev/zero")
        elif kind == "loop":
            os.symlink(p, p)
        elif kind == "dir":
            p.mkdir()
        elif kind == "huge":
            with open(p, "wb") as fh:
                fh.truncate(17 * 2**20)
        before = _snapshot(d)
        res = run_inproc(["climate", "s.toml", "--table", str(p), "--out", "out"], d)
        res.written = sorted(_snapshot(d) - before)
        record("climate CSV", f"--table {name}", res, classify(res, "refuse"))
    for name, text, tail, expect in climate_cases():
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        (d / "c.csv").write_text(text)
        res = run_inproc(["climate", "s.toml", "--table", "c.csv", "--out", "out",
                          "--quiet", *tail], d)
        if expect == "ok":
            res.written = []
        record("climate CSV", name, res, classify(res, expect))
    return table, details


def audit_faults(tmp):
    import xarray as xr

    from harbor.outputs import _atomic

    verdicts, details = [], []

    def rec(name, res, want):
        v = classify(res, "refuse", want)
        verdicts.append(v)
        if v != "clear":
            details.append(("faults", name, res.code, v, res.err.strip()[:160]))

    real_nc = xr.Dataset.to_netcdf
    for name, eno, want in [("ENOSPC writing grid.nc", errno.ENOSPC, 4),
                            ("EDQUOT writing grid.nc", errno.EDQUOT, 4),
                            ("EIO-free EACCES writing grid.nc", errno.EACCES, 3)]:
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)

        def fail(self, path, *a, _e=eno, **k):
            Path(path).write_bytes(b"partial")
            raise OSError(_e, os.strerror(_e), str(path))

        xr.Dataset.to_netcdf = fail
        try:
            res = run_inproc(["map", "s.toml", "--out", "out", "--quiet"], d)
        finally:
            xr.Dataset.to_netcdf = real_nc
        res.written = [w for w in res.written]
        rec(name, res, want)
    real_mk = _atomic.tempfile.mkstemp
    for name, eno in [("read-only file system", errno.EROFS), ("no permission", errno.EACCES)]:
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)

        def refuse(*a, _e=eno, **k):
            raise OSError(_e, os.strerror(_e))

        _atomic.tempfile.mkstemp = refuse
        try:
            res = run_inproc(["map", "s.toml", "--out", "out", "--quiet"], d)
        finally:
            _atomic.tempfile.mkstemp = real_mk
        rec(name + " (found in %.1f s)" % res.secs, res, 3)
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    for name, sig, want in [("SIGTERM while staging #1", signal.SIGTERM, 143),
                            ("SIGTERM while staging #2", signal.SIGTERM, 143),
                            ("SIGINT while staging", signal.SIGINT, 130)]:
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        p = subprocess.Popen([sys.executable, "-m", "harbor", "map", "s.toml", "--out",
                              "out", "--quiet"], cwd=d, env=env, stdout=subprocess.PIPE,
                             stderr=subprocess.PIPE, text=True)
        t0 = time.monotonic()
        while p.poll() is None and time.monotonic() - t0 < 120:
            if any(x.name.startswith(".out.staging-") for x in d.iterdir()):
                time.sleep(0.05)
                p.send_signal(sig)
                break
            time.sleep(0.005)
        out, err = p.communicate(timeout=120)
        left = sorted(x.name for x in d.iterdir() if x.name != "s.toml")
        rec(name, Outcome(p.returncode, "", err, left, 0), want)
    for name, argv, after in [
            ("SIGTERM while solving a map", ["map", "s.toml", "--out", "out", "--quiet"], 1.0),
            ("SIGTERM during a climate run (threads)",
             ["climate", "s.toml", "--table", "c.csv", "--out", "out", "--quiet"], 2.0)]:
        d = Path(tempfile.mkdtemp(dir=tmp))
        (d / "s.toml").write_text(BASE)
        (d / "c.csv").write_text("height,period,from,percent\n" + "".join(
            f"1.0,{5 + 0.5 * i:.1f},{(10 * i) % 360},2.5\n" for i in range(40)))
        p = subprocess.Popen([sys.executable, "-m", "harbor", *argv], cwd=d, env=env,
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        # the run has started once it holds its output location (before solving); a
        # SIGTERM during the imports before that ends the process by the default action,
        # before anything could be written
        t0 = time.monotonic()
        while p.poll() is None and time.monotonic() - t0 < 120 and not any(
                x.name.startswith(".harbor-lock-") for x in d.iterdir()):
            time.sleep(0.01)
        time.sleep(after)
        p.send_signal(signal.SIGTERM)
        out, err = p.communicate(timeout=120)
        left = sorted(x.name for x in d.iterdir() if x.name not in ("s.toml", "c.csv"))
        rec(name, Outcome(p.returncode, "", err, left, 0), 143)
    # two runs at once into one folder
    d = Path(tempfile.mkdtemp(dir=tmp))
    (d / "s.toml").write_text(BASE)
    cmd = [sys.executable, "-m", "harbor", "map", "s.toml", "--out", "out", "--quiet"]
    a = subprocess.Popen(cmd, cwd=d, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                         text=True)
    while not any(x.name.startswith(".harbor-lock-") for x in d.iterdir()) and a.poll() is None:
        time.sleep(0.01)
    b = subprocess.run(cmd, cwd=d, env=env, capture_output=True, text=True)
    a.communicate()
    rec("second run into the same --out", Outcome(b.returncode, "", b.stderr, [], 0), 3)
    ok = a.returncode == 0 and sorted(x.name for x in d.iterdir()) == ["out", "s.toml"]
    verdicts.append("clear" if ok else "partial")
    if not ok:
        details.append(("faults", "first run of the two", a.returncode, "partial", ""))
    return verdicts, details


def main_():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--no-faults", action="store_true")
    ap.add_argument("--show", action="store_true", help="print each case's last stderr line")
    args = ap.parse_args()
    global SHOW
    SHOW = args.show
    with tempfile.TemporaryDirectory() as tmp:
        table, details = audit_inproc(tmp)
        if not args.no_faults:
            v, d2 = audit_faults(tmp)
            table["faults"] = v
            details += d2
    print("| set | tried | clear exit 2 / documented code | wrong exit code | partial output "
          "| silent nonsense |")
    print("|---|---|---|---|---|---|")
    for s, v in table.items():
        print(f"| {s} | {len(v)} | {v.count('clear')} | {v.count('wrong')} | "
              f"{v.count('partial')} | {v.count('nonsense')} |")
    if details:
        print("\nnot clear:")
        for d in details:
            print("  ", d)


if __name__ == "__main__":
    main_()
