"""Reading the user's input files safely: one helper for every file harbor reads.

A scenario or a climate table is a small regular text file. Anything else -- a FIFO (which
would block the reader forever), ``/dev/zero`` (which never ends), a directory, a
symbolic-link loop, a file of hundreds of megabytes -- is refused with one line before a
byte is parsed.
"""

from __future__ import annotations

import errno
import os
import stat

from harbor.errors import InputError

#: Largest scenario file read (bytes). A scenario with a detailed shore line of a hundred
#: thousand vertices takes about 3 MB; anything near this limit is not a hand-made file.
MAX_SCENARIO_BYTES = 16 * 1024 * 1024
#: Largest climate table read (bytes): a hundred thousand rows take about 3 MB.
MAX_TABLE_BYTES = 16 * 1024 * 1024


def _kind(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a directory"
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode):
        return "a character device"
    if stat.S_ISBLK(mode):
        return "a block device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def read_text(path, what: str = "input file", max_bytes: int = MAX_SCENARIO_BYTES,
              encoding: str = "utf-8-sig") -> str:
    """Read a small regular text file, refusing everything else with one line.

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    what : str
        What the file should be, for the messages (``"scenario file"``).
    max_bytes : int
        Largest size accepted, bytes.
    encoding : str
        Text encoding; the default ``"utf-8-sig"`` accepts UTF-8 with or without a
        byte-order mark (spreadsheet programs and some editors write one).

    Returns
    -------
    str
        The whole text.

    Raises
    ------
    InputError
        Naming the file: not found, a symbolic-link loop, no permission, a directory,
        FIFO, device or socket, larger than ``max_bytes``, not valid text in
        ``encoding``.

    Notes
    -----
    The file is opened with ``O_NONBLOCK`` and checked with ``fstat`` on the open
    descriptor, so a FIFO cannot block the open and the checked file is the one read.
    At most ``max_bytes + 1`` bytes are read, whatever the file claims to be.
    """
    file = str(path)
    try:
        fd = os.open(file, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0)
                     | getattr(os, "O_NOCTTY", 0))
    except OSError as e:
        raise InputError(_open_problem(e, what), file=file) from None
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise InputError(f"is {_kind(st.st_mode)}, not a {what}", file=file)
        if st.st_size > max_bytes:
            raise InputError(f"is {st.st_size / 2**20:.1f} MiB, larger than the "
                             f"{max_bytes / 2**20:.0f} MiB a {what} may be", file=file)
        chunks, total = [], 0
        while total <= max_bytes:
            try:
                b = os.read(fd, min(1 << 20, max_bytes + 1 - total))
            except OSError as e:
                raise InputError(f"cannot read the file ({e.strerror})", file=file) from None
            if not b:
                break
            chunks.append(b)
            total += len(b)
        if total > max_bytes:
            raise InputError(f"is larger than the {max_bytes / 2**20:.0f} MiB a {what} "
                             "may be", file=file)
    finally:
        os.close(fd)
    data = b"".join(chunks)
    try:
        return data.decode(encoding)
    except UnicodeDecodeError as e:
        raise InputError(f"not UTF-8 text (byte {e.start + 1} cannot be decoded; a "
                         f"{what} must be UTF-8)", file=file) from None


def _open_problem(e: OSError, what: str) -> str:
    if e.errno == errno.ENOENT:
        return "file not found"
    if e.errno == errno.ELOOP:
        return "symbolic-link loop (the link points, directly or not, back to itself)"
    if e.errno in (errno.EACCES, errno.EPERM):
        return "permission denied (cannot read the file)"
    if e.errno == errno.ENOTDIR:
        return "file not found (a part of the path is not a folder)"
    if e.errno == errno.EISDIR:
        return f"is a directory, not a {what}"
    if e.errno == errno.ENAMETOOLONG:
        return "the file name is too long"
    return f"cannot open the file ({e.strerror})"


#: Largest layout file (GeoPackage, Shapefile, GeoJSON, DXF) opened for import (bytes).
MAX_LAYOUT_FILE_BYTES = 1024**3


def check_file(path, what: str = "input file", max_bytes: int | None = None) -> None:
    """Refuse, with one line, a path that is not a regular file (or is too large),
    without reading it: for files opened by other libraries (GDAL, ezdxf).

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    what : str
        What it should be, for the messages.
    max_bytes : int, optional
        Largest size accepted, bytes.

    Raises
    ------
    InputError
        As :func:`read_text`: not found, a symbolic-link loop, no permission, a
        directory, FIFO, device or socket, larger than ``max_bytes``.
    """
    file = str(path)
    try:
        st = os.stat(file)
    except OSError as e:
        raise InputError(_open_problem(e, what), file=file) from None
    if not stat.S_ISREG(st.st_mode):
        raise InputError(f"is {_kind(st.st_mode)}, not a {what}", file=file)
    if max_bytes is not None and st.st_size > max_bytes:
        raise InputError(f"is {st.st_size / 2**20:.1f} MiB, larger than the "
                         f"{max_bytes / 2**20:.0f} MiB a {what} may be", file=file)
