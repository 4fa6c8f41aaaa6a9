"""Faults of the machine during a run: SIGTERM while staging, a full disk, a read-only or
forbidden output location, two runs into one folder. Each ends with one line, its
documented exit code (docs/errors.md) and nothing left behind.
"""

import errno
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from harbor.cli import main
from harbor.errors import (EXIT_CANNOT_WRITE, EXIT_DISK_FULL, EXIT_TERMINATED,
                           MachineError, Terminated)
from harbor.outputs import _atomic
from tests.test_bad_inputs import BASE

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture()
def scenario(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(BASE)
    return p


def _leftovers(folder):
    return sorted(p.name for p in Path(folder).iterdir() if p.name != "s.toml")


def _one_line(err):
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in err, err
    return lines[0]


def test_disk_full_while_writing(scenario, tmp_path, capsys, monkeypatch):
    import xarray as xr

    def full(self, path, *a, **k):
        Path(path).write_bytes(b"partial")         # a half-written file, then ENOSPC
        raise OSError(errno.ENOSPC, "No space left on device", str(path))

    monkeypatch.setattr(xr.Dataset, "to_netcdf", full)
    code = main(["map", str(scenario), "--out", str(tmp_path / "out"), "--quiet"])
    err = capsys.readouterr().err
    assert code == EXIT_DISK_FULL
    assert "no space left" in _one_line(err)
    assert _leftovers(tmp_path) == []               # no staging folder, no out, no lock


@pytest.mark.parametrize("eno,word", [(errno.EROFS, "read-only"),
                                      (errno.EACCES, "permission")])
def test_unwritable_location_found_before_solving(scenario, tmp_path, capsys, monkeypatch,
                                                  eno, word):
    import harbor.solver.assemble as A

    def refuse(*a, **k):
        raise OSError(eno, os.strerror(eno))

    def no_solve(*a, **k):
        raise AssertionError("solved before checking --out")

    monkeypatch.setattr(_atomic.tempfile, "mkstemp", refuse)
    monkeypatch.setattr(A, "solve", no_solve)
    code = main(["map", str(scenario), "--out", str(tmp_path / "out"), "--quiet"])
    err = capsys.readouterr().err
    assert code == EXIT_CANNOT_WRITE
    assert word in _one_line(err) and "before solving" in err
    assert _leftovers(tmp_path) == []


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes through any permission")
def test_folder_without_write_permission(scenario, tmp_path, capsys):
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o555)
    try:
        code = main(["map", str(scenario), "--out", str(locked / "out"), "--quiet"])
    finally:
        locked.chmod(0o755)
    assert code == EXIT_CANNOT_WRITE
    assert "permission" in _one_line(capsys.readouterr().err)
    assert list(locked.iterdir()) == []


def test_second_run_into_same_out_refused(scenario, tmp_path, capsys):
    out = tmp_path / "out"
    with _atomic.claim_output(out):
        code = main(["map", str(scenario), "--out", str(out), "--quiet"])
        err = capsys.readouterr().err
    assert code == EXIT_CANNOT_WRITE
    assert "another harbor run" in _one_line(err)
    assert _leftovers(tmp_path) == []               # the lock file went with the claim
    with _atomic.claim_output(out):                 # and the location is free again
        pass
    with pytest.raises(MachineError):
        with _atomic.claim_output(out):
            with _atomic.claim_output(out):
                pass


def test_terminated_in_process_cleans_staging(scenario, tmp_path, capsys, monkeypatch):
    import xarray as xr

    def killed(self, path, *a, **k):
        Path(path).write_bytes(b"partial")
        os.kill(os.getpid(), signal.SIGTERM)        # handled: raises Terminated here
        time.sleep(5)
        raise AssertionError("SIGTERM was not handled")

    monkeypatch.setattr(xr.Dataset, "to_netcdf", killed)
    code = main(["map", str(scenario), "--out", str(tmp_path / "out"), "--quiet"])
    err = capsys.readouterr().err
    assert code == EXIT_TERMINATED
    assert "terminated" in _one_line(err)
    assert _leftovers(tmp_path) == []
    # the handler is put back after the run
    assert signal.getsignal(signal.SIGTERM) is not None
    assert not isinstance(Terminated(), Exception)  # not caught by `except Exception`


def test_sigterm_during_staging_subprocess(scenario, tmp_path):
    out = tmp_path / "out"
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.Popen([sys.executable, "-m", "harbor", "map", str(scenario), "--out",
                             str(out), "--quiet"], cwd=tmp_path, env=env,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 60
    staged = False
    while time.monotonic() < deadline and proc.poll() is None:
        if any(p.name.startswith(".out.staging-") for p in tmp_path.iterdir()):
            staged = True
            proc.send_signal(signal.SIGTERM)
            break
        time.sleep(0.005)
    _, err = proc.communicate(timeout=60)
    if not staged:
        pytest.skip("the run finished before its staging folder could be seen")
    if proc.returncode == 0:                         # the signal came after publishing
        assert sorted(p.name for p in out.iterdir())
        return
    assert proc.returncode == EXIT_TERMINATED, err
    assert "terminated" in _one_line(err)
    assert _leftovers(tmp_path) == []


@pytest.mark.parametrize("sig,code", [(signal.SIGINT, 130), (signal.SIGTERM, EXIT_TERMINATED)])
def test_signal_turned_into_another_error_still_reported(scenario, tmp_path, capsys,
                                                         monkeypatch, sig, code):
    # An extension module imported while the signal arrives reports its own
    # "ImportError: initialization failed" instead of the signal's exception.
    import xarray as xr

    def import_hit(self, path, *a, **k):
        Path(path).write_bytes(b"partial")
        try:
            os.kill(os.getpid(), sig)
            time.sleep(5)
        except BaseException:
            raise ImportError("initialization failed") from None
        raise AssertionError("the signal was not handled")

    monkeypatch.setattr(xr.Dataset, "to_netcdf", import_hit)
    got = main(["map", str(scenario), "--out", str(tmp_path / "out"), "--quiet"])
    err = capsys.readouterr().err
    assert got == code
    assert "no output written" in _one_line(err) and "internal error" not in err
    assert _leftovers(tmp_path) == []
