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
