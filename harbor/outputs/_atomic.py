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
    stage = Path(tempfile.mkdtemp(prefix=f".{out.name}.staging-", dir=parent))
    names: list[str] = []
    try:
        yield stage, names
        out.mkdir(parents=True, exist_ok=True)
        for n in names:
            os.replace(stage / n, out / n)
    finally:
        shutil.rmtree(stage, ignore_errors=True)
