"""Errors raised by rotorcalc.

Every error the package raises on purpose derives from :class:`RotorcalcError`.
Bad input raises :class:`InputError`, which carries the key path
(``bearing[2].kxx[4]``), the offending value, what was expected, and where
known the file and line, so the command line can print one clear paragraph.
"""

from __future__ import annotations


class RotorcalcError(Exception):
    """Base class of every error rotorcalc raises on purpose."""


class InputError(RotorcalcError, ValueError):
    """A rotor or variants description that cannot be used as written.

    Parameters
    ----------
    key : str
        Key path of the offending entry, e.g. ``"bearing[1].kxx"``.
    problem : str
        What is wrong, in a few words.
    value : object, optional
        The value found.
    expected : str, optional
        What would have been accepted.
    file, line : optional
        Where the entry is, when known.
    kind : str
        A short machine-readable label of the kind of error
        (``"unknown-key"``, ``"unit"``, ``"range"`` ...); required, so that
        every raise is classified (docs/robustness.md lists the kinds).
    """

    def __init__(self, key, problem, *, kind, value=None, expected=None, file=None,
                 line=None):
        self.key = key
        self.problem = problem
        self.value = value
        self.expected = expected
        self.file = file
        self.line = line
        self.kind = kind
        super().__init__(self.message())

    def with_location(self, file=None, line=None):
        """Return a copy that also carries the file and line."""
        return InputError(self.key, self.problem, value=self.value,
                          expected=self.expected,
                          file=file if file is not None else self.file,
                          line=line if line is not None else self.line,
                          kind=self.kind)

    def message(self):
        """One paragraph: where, what, the value, and what was expected."""
        where = ""
        if self.file is not None:
            where = f"{self.file}"
            if self.line is not None:
                where += f", line {self.line}"
            where += ": "
        text = f"{where}'{self.key}': {self.problem}"
        if self.value is not None:
            text += f" (found {self.value!r})"
        if self.expected:
            lead = "" if self.expected.startswith(("did you mean", "one of")) else "expected "
            text += f"; {lead}{self.expected}"
        return text if text.endswith((".", "?")) else text + "."


class SolverError(RotorcalcError, RuntimeError):
    """An eigen-solve or harmonic solve that failed or cannot be trusted."""
