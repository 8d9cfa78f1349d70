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

    #: The kind of every instance of this class (the subclasses set their own).
    kind = "input"

    def __new__(cls, key=None, problem=None, *, kind=None, **fields):
        # InputError(..., kind="unit") makes a UnitError: catch by class, or read .kind
        if cls is InputError and kind in KINDS:
            cls = KINDS[kind]
        return super().__new__(cls)

    def __init__(self, key, problem, *, kind=None, value=None, expected=None, file=None,
                 line=None):
        self.key = key
        self.problem = problem
        self.value = value
        self.expected = expected
        self.file = file
        self.line = line
        if kind is not None and kind != type(self).kind:
            self.kind = kind   # a kind with no class of its own
        super().__init__(self.message())

    def __reduce__(self):
        """Rebuild from the fields, so an error raised in a worker process reaches the
        caller as the same error (the default would call ``cls(message)``)."""
        return (_rebuild, (type(self), self.key, self.problem, self.kind, self.value,
                           self.expected, self.file, self.line))

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


def _rebuild(cls, key, problem, kind, value, expected, file, line):
    return cls(key, problem, kind=kind, value=value, expected=expected, file=file, line=line)


def _kind_class(name, kind, doc):
    return type(name, (InputError,), {"kind": kind, "__doc__": doc, "__module__": __name__})


UnknownKeyError = _kind_class("UnknownKeyError", "unknown-key", "A key the format does not have.")
MissingError = _kind_class("MissingError", "missing", "A required key or part left out.")
WrongTypeError = _kind_class("WrongTypeError", "type", "A value of the wrong type.")
NotFiniteError = _kind_class("NotFiniteError", "not-finite", "NaN or an infinite value.")
OutOfRangeError = _kind_class("OutOfRangeError", "range", "A value outside its allowed range.")
UnitError = _kind_class("UnitError", "unit", "A unit missing, of the wrong dimension or unread.")
OrderError = _kind_class("OrderError", "order", "Values in the wrong order.")
LengthError = _kind_class("LengthError", "length", "A table of the wrong length.")
StationError = _kind_class("StationError", "station", "A station that does not exist.")
DuplicateError = _kind_class("DuplicateError", "duplicate", "A name used twice.")
UnknownMaterialError = _kind_class("UnknownMaterialError", "unknown-material",
                                   "A material that is not defined.")
ConflictError = _kind_class("ConflictError", "conflict", "Keys that exclude each other.")
ChoiceError = _kind_class("ChoiceError", "choice", "A choice that is not one of the options.")
FileError = _kind_class("FileError", "file", "A file that cannot be read.")
TomlSyntaxError = _kind_class("TomlSyntaxError", "syntax", "Text that is not valid TOML, or "
                              "a change outside the grammar.")
SizeError = _kind_class("SizeError", "size", "Beyond a size limit (text, count, file).")
PhysicsError = _kind_class("PhysicsError", "physics", "Physically impossible input.")
OutputError = _kind_class("OutputError", "output", "An output that would not be safe to write.")
OptionError = _kind_class("OptionError", "option", "A command-line option that cannot be used.")

#: The class of each kind: ``InputError(..., kind=k)`` builds ``KINDS[k]``.
KINDS = {c.kind: c for c in (UnknownKeyError, MissingError, WrongTypeError, NotFiniteError,
                             OutOfRangeError, UnitError, OrderError, LengthError, StationError,
                             DuplicateError, UnknownMaterialError, ConflictError, ChoiceError,
                             FileError, TomlSyntaxError, SizeError, PhysicsError, OutputError,
                             OptionError)}
