"""Whole-or-nothing file writing shared by every output writer.

A reader (a GIS package, a colleague's script, a file watcher) must never see a
half-written map or grid. Each file is therefore written under a temporary name in the
same directory and renamed into place with :func:`os.replace`, which is atomic on POSIX
and Windows when source and target are on the same file system.
"""

from __future__ import annotations

import contextlib
import os
import re
import shutil
import tempfile
import unicodedata
from pathlib import Path


@contextlib.contextmanager
def atomic_path(path):
    """Yield a temporary path next to ``path``; move it onto ``path`` on success.

    Parameters
    ----------
    path : str or os.PathLike
        The final file name. Its directory must exist.

    Yields
    ------
    pathlib.Path
        A not-yet-existing file name in the same directory, with the same suffix (so
        that writers choosing a format by suffix still work).

    Notes
    -----
    On any exception the temporary file is removed and the final path is left as it
    was (absent, or the previous complete version).
    """
    final = Path(path)
    directory = final.parent if str(final.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{final.stem}.", suffix=f".part{final.suffix}",
                               dir=directory)
    os.close(fd)
    tmp = Path(tmp)
    # Some writers (netCDF4) refuse to open an existing file in certain modes, and
    # none needs the placeholder: keep only the unique name.
    tmp.unlink()
    try:
        yield tmp
        os.replace(tmp, final)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            tmp.unlink()
        raise


def write_text_atomic(path, text: str, encoding: str = "utf-8", newline: str | None = None):
    """Write ``text`` to ``path`` atomically and return the path.

    Parameters
    ----------
    path : str or os.PathLike
        Target file.
    text : str
        Whole content.
    encoding : str
        Text encoding.
    newline : str or None
        Passed to :func:`open` (``""`` for CSV so that the csv module controls line ends).

    Returns
    -------
    pathlib.Path
    """
    with atomic_path(path) as tmp:
        with open(tmp, "w", encoding=encoding, newline=newline) as fh:
            fh.write(text)
    return Path(path)


def slug(name: str, fallback: str = "sea") -> str:
    """Return a file-name-safe, lower-case ASCII form of ``name``.

    ``"Storm SW"`` becomes ``"storm-sw"``; accents are dropped (``"Tempête"`` ->
    ``"tempete"``); a name with no usable character becomes ``fallback``.
    """
    ascii_name = unicodedata.normalize("NFKD", str(name)).encode("ascii", "ignore").decode()
    s = re.sub(r"[^a-z0-9]+", "-", ascii_name.lower()).strip("-")
    return s or fallback


def unique_slugs(names, fallback: str = "sea") -> list[str]:
    """Slug each name; names that slug alike get ``-2``, ``-3``... so no file overwrites
    another."""
    out, seen = [], {}
    for n in names:
        s = slug(n, fallback)
        k = seen.get(s, 0) + 1
        seen[s] = k
        out.append(s if k == 1 else f"{s}-{k}")
    return out


def write_staged(out_dir, texts, chart=None):
    """Write text files and one chart into ``out_dir``, all or none.

    Parameters
    ----------
    out_dir : str or os.PathLike
        Output folder (created if missing).
    texts : sequence of (str, str)
        (file name, text) pairs, written as UTF-8 with the text's own newlines.
    chart : (str, callable), optional
        (file name, ``draw(path)``) for a figure written by the caller's function.

    Returns
    -------
    list of pathlib.Path
        The published files, texts first, in order.
    """
    names = [n for n, _ in texts] + ([chart[0]] if chart else [])
    with staging_dir(out_dir) as (stage, staged):
        for name, text in texts:
            with open(stage / name, "w", encoding="utf-8", newline="") as fh:
                fh.write(text)
            staged.append(name)
        if chart:
            chart[1](stage / chart[0])
            staged.append(chart[0])
    return [Path(out_dir) / n for n in names]


@contextlib.contextmanager
def staging_dir(out_dir):
    """Yield a fresh staging directory for a multi-file run; publish it on success.

    Parameters
    ----------
    out_dir : str or os.PathLike
        Where the files must finally appear (created if missing).

    Yields
    ------
    (pathlib.Path, list)
        The staging directory (inside ``out_dir``'s parent, so the final renames stay on
        one file system) and a list to which the caller appends the file names (relative
        to the staging directory) that must be published.

    Notes
    -----
    Nothing reaches ``out_dir`` until the caller's block has finished without an
    exception; then every staged file is moved into place with :func:`os.replace`. On an
    exception the staging directory is deleted and ``out_dir`` is untouched (a new
    ``out_dir`` is not even created).
    """
    out = Path(out_dir).resolve()
    parent = out.parent
    parent.mkdir(parents=True, exist_ok=True)
    names: list[str] = []
    stage = None
    try:
        # held: a signal between creating the folder and knowing its name would leak it
        with _signals_held():
            stage = Path(tempfile.mkdtemp(prefix=f".{out.name}.staging-", dir=parent))
        yield stage, names
        with _signals_held():
            out.mkdir(parents=True, exist_ok=True)
            for n in names:
                os.replace(stage / n, out / n)
    finally:
        if stage is not None:
            shutil.rmtree(stage, ignore_errors=True)


@contextlib.contextmanager
def _signals_held():
    """Hold SIGINT and SIGTERM back while the staged files are moved into place (a few
    renames), so an interruption cannot leave half of a run published."""
    import signal
    import threading

    held = {signal.SIGINT, signal.SIGTERM}
    if threading.current_thread() is not threading.main_thread() or \
            not hasattr(signal, "pthread_sigmask"):
        yield
        return
    old = signal.pthread_sigmask(signal.SIG_BLOCK, held)
    try:
        yield
    finally:
        signal.pthread_sigmask(signal.SIG_SETMASK, old)


# --------------------------------------------------------------------- output location

#: Folders no output may go to: the kernel's and the devices' views, not storage.
SYSTEM_FOLDERS = ("/proc", "/sys", "/dev")


def _under_system_folder(real: str) -> str | None:
    for top in SYSTEM_FOLDERS:
        if real == top or real.startswith(top + os.sep):
            return top
    return None


def _existing_ancestor(path: Path) -> Path:
    p = path
    while not p.exists():
        if p.parent == p:
            break
        p = p.parent
    return p


def _probe_writable(folder: Path, shown: str):
    """Create and remove a scratch file in ``folder``; turn a refusal into one line."""
    from harbor.errors import MachineError, machine_fault

    try:
        fd, tmp = tempfile.mkstemp(prefix=".harbor-probe-", dir=folder)
    except OSError as e:
        fault = machine_fault(e)
        if fault is not None:
            raise MachineError(fault.problem.replace("; nothing was written", "") +
                               " (checked before solving; nothing was written)",
                               file=shown, exit_code=fault.exit_code) from None
        raise MachineError(f"cannot write there ({e.strerror}); nothing was written",
                           file=shown) from None
    os.close(fd)
    os.unlink(tmp)


def check_output(path, kind: str = "dir") -> Path:
    """Check, before any solving, that an output folder or file can be written.

    Parameters
    ----------
    path : str or os.PathLike
        The ``--out`` of a command.
    kind : {"dir", "file"}
        A folder of outputs (``map``, ``sweep``, ``climate``, ``demo``) or one file
        (``diagram``).

    Returns
    -------
    pathlib.Path
        The absolute path.

    Raises
    ------
    harbor.errors.InputError
        The path is under /proc, /sys or /dev; it exists and is not a folder (``dir``:
        a file, ``/dev/null``) or not a regular file (``file``: a folder, a device); the
        nearest existing ancestor is not a folder.
    harbor.errors.MachineError
        No write permission or a read-only file system (exit code 3), no space (exit
        code 4): a scratch file could not be created where the output will go.

    Notes
    -----
    Nothing is left behind: the scratch file is removed at once, and no folder is
    created (a missing output folder is created only when the outputs are published).
    """
    from harbor.errors import InputError

    shown = str(path)
    absolute = Path(os.path.abspath(path))
    real = os.path.realpath(absolute)
    top = _under_system_folder(real)
    if top is not None:
        raise InputError(f"is under {top}, a system folder, not storage; choose a folder "
                         "of your own", key="--out", file=shown)
    if kind == "dir":
        if absolute.exists() and not absolute.is_dir():
            what = "a file" if absolute.is_file() else "not a folder (a device or a pipe)"
            raise InputError(f"exists and is {what}; --out names a folder", key="--out",
                             file=shown)
    else:
        if absolute.exists() and not absolute.is_file():
            what = "a folder" if absolute.is_dir() else "a device or a pipe"
            raise InputError(f"is {what}, not a file that can be replaced", key="--out",
                             file=shown)
    # staging happens in the parent (created if missing), publishing in the folder
    anc = _existing_ancestor(absolute.parent)
    if not anc.is_dir():
        raise InputError(f"'{anc}' is not a folder", key="--out", file=shown)
    _probe_writable(anc, shown)
    if kind == "dir" and absolute.is_dir():
        _probe_writable(absolute, shown)
    return absolute


@contextlib.contextmanager
def claim_output(path, kind: str = "dir"):
    """Check an output location (:func:`check_output`) and hold it for this run.

    Parameters
    ----------
    path : str or os.PathLike
        The ``--out`` of a command.
    kind : {"dir", "file"}
        See :func:`check_output`.

    Yields
    ------
    pathlib.Path
        The absolute path.

    Raises
    ------
    harbor.errors.MachineError
        Another harbor run is writing to the same location (exit code 3), besides the
        errors of :func:`check_output`.

    Notes
    -----
    The claim is an exclusive ``flock`` on a small lock file beside the location (in
    its nearest existing ancestor), removed when the run ends; the operating system
    releases the lock if the process dies, so a stale file never blocks a later run.
    """
    import hashlib

    absolute = check_output(path, kind)
    try:
        import fcntl
    except ImportError:  # pragma: no cover - not POSIX: no claim, the checks still ran
        yield absolute
        return
    anc = _existing_ancestor(absolute.parent)
    tag = hashlib.sha1(os.path.realpath(absolute).encode()).hexdigest()[:12]
    lock = anc / f".harbor-lock-{tag}"
    fd = None
    try:
        # held: a signal between creating the lock file and the try below would leak it
        with _signals_held():
            fd = _take_lock(lock, fcntl, path)
        yield absolute
    finally:
        if fd is not None:
            with contextlib.suppress(OSError):
                os.unlink(lock)
            os.close(fd)


def _take_lock(lock: Path, fcntl, shown):
    """Open and exclusively lock ``lock``; the descriptor, or MachineError when held."""
    from harbor.errors import MachineError

    while True:
        fd = os.open(lock, os.O_RDWR | os.O_CREAT, 0o644)
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            os.close(fd)
            raise MachineError("another harbor run is writing to this location; wait for "
                               "it to finish or choose another --out", file=str(shown)) from None
        # the previous holder may have removed the file between our open and our lock
        try:
            same = os.path.samestat(os.fstat(fd), os.stat(lock))
        except FileNotFoundError:
            same = False
        if same:
            return fd
        os.close(fd)
