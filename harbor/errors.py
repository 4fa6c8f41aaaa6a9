"""Exceptions for user mistakes.

A :class:`InputError` is a problem with what the user gave (a scenario file, a
command-line value, a climate table). The command line prints its message as one line on
stderr and exits with code 2; it never shows a traceback for one.
"""

from __future__ import annotations


class InputError(ValueError):
    """A user's input is wrong; the message names the file, the key and the problem.

    Parameters
    ----------
    problem : str
        What is wrong, in plain words.
    file : str, optional
        The file the problem is in.
    where : str, optional
        The table the problem is in, e.g. ``"[[arm]] 'west arm'"``.
    key : str, optional
        The key (or column) that is wrong.
    """

    def __init__(self, problem: str, file: str | None = None, where: str | None = None,
                 key: str | None = None):
        self.problem = problem
        self.file = file
        self.where = where
        self.key = key
        super().__init__(self.line())

    def line(self) -> str:
        """Return the one-line message: ``file: table: key 'k': problem``."""
        parts = []
        if self.file:
            parts.append(str(self.file))
        if self.where:
            parts.append(self.where)
        if self.key:
            parts.append(f"key '{self.key}'")
        parts.append(self.problem)
        return ": ".join(parts)


#: Exit codes of the ``harbor`` command (documented in docs/errors.md).
EXIT_OK = 0
EXIT_INTERNAL = 1
EXIT_INPUT = 2
EXIT_CANNOT_WRITE = 3
EXIT_DISK_FULL = 4
EXIT_INTERRUPTED = 130
EXIT_TERMINATED = 143


class MachineError(Exception):
    """The machine, not the user's input, stopped the run (no permission, read-only file
    system, disk full, output folder in use by another run).

    The command line prints its one line and exits with :attr:`exit_code`
    (:data:`EXIT_CANNOT_WRITE` or :data:`EXIT_DISK_FULL`); nothing is written.

    Parameters
    ----------
    problem : str
        What went wrong, in plain words.
    file : str, optional
        The file or folder concerned.
    exit_code : int
        The command's exit code for this fault.
    """

    def __init__(self, problem: str, file: str | None = None,
                 exit_code: int = EXIT_CANNOT_WRITE):
        self.problem = problem
        self.file = file
        self.exit_code = int(exit_code)
        super().__init__(self.line())

    def line(self) -> str:
        """Return the one-line message: ``file: problem``."""
        return f"{self.file}: {self.problem}" if self.file else self.problem


class Terminated(KeyboardInterrupt):
    """Raised in the main thread when the process receives SIGTERM, so that every
    clean-up that runs for Ctrl-C (staging folders, temporary files) runs for it too."""


def machine_fault(exc: BaseException) -> MachineError | None:
    """The :class:`MachineError` an operating-system error stands for, if any.

    Parameters
    ----------
    exc : BaseException
        Any exception.

    Returns
    -------
    MachineError or None
        For :class:`OSError` with errno ENOSPC or EDQUOT (disk full, exit
        :data:`EXIT_DISK_FULL`), EACCES, EPERM or EROFS (no permission or read-only file
        system, exit :data:`EXIT_CANNOT_WRITE`); None for anything else.
    """
    import errno

    if not isinstance(exc, OSError) or exc.errno is None:
        return None
    name = exc.filename if exc.filename is not None else None
    if exc.errno in (errno.ENOSPC, getattr(errno, "EDQUOT", -1)):
        return MachineError("no space left on the device (disk full or quota reached); "
                            "nothing was written", file=name, exit_code=EXIT_DISK_FULL)
    if exc.errno in (errno.EACCES, errno.EPERM):
        return MachineError("permission denied; nothing was written", file=name)
    if exc.errno == errno.EROFS:
        return MachineError("read-only file system; nothing was written", file=name)
    return None
