"""Fleet screening: many rotor files, each read and screened as ``check`` does, on one
executor (:mod:`rotorcalc.executor`); one row per file."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

#: The outcome of a file that could not be judged, beside the screening's own verdicts.
BAD_INPUT, NUMERICAL = "bad input", "numerical failure"
#: Exit code of the whole fleet, worst first: a failed check, a numerical failure, bad
#: input, not covered, pass (the codes of ``check``).
SEVERITY = {"fail": 1, NUMERICAL: 3, BAD_INPUT: 2, "incomplete": 5, "pass": 0}


@dataclass(frozen=True)
class FleetRow:
    """One file: its verdict ("pass", "fail", "incomplete", or why it was not judged), the
    rotor's name and the first item that failed or was not covered (or the error)."""

    path: str
    verdict: str
    name: str = ""
    first: str = ""
    items: int = 0

    def to_dict(self):
        return {"file": self.path, "verdict": self.verdict, "rotor": self.name,
                "first_item": self.first, "items": self.items}


def rotor_files(paths):
    """The rotor files among ``paths`` (files, or folders searched for ``*.toml``): a
    folder's variants and study files (``base =``, ``uncertain``) are not rotors."""
    from .._toml import load_toml
    out = []
    for p in map(Path, paths):
        if p.is_dir():
            for f in sorted(p.rglob("*.toml")):
                try:
                    data = load_toml(f.read_text(encoding="utf-8-sig"), str(f))
                except Exception:      # unreadable: screened, and reported as bad input
                    data = {}
                if "base" not in data and "uncertain" not in data:
                    out.append(f)
        else:
            out.append(p)
    return out


def screen_file(path):
    """The :class:`FleetRow` of one rotor file."""
    from ..errors import InputError, SolverError
    from ..reader import read_rotor
    from .review import findings
    from .screening import screen
    try:
        rotor = read_rotor(path)
        result = screen(rotor)
    except InputError as err:
        return FleetRow(str(path), BAD_INPUT, first=str(err).splitlines()[0])
    except SolverError as err:
        return FleetRow(str(path), NUMERICAL, first=str(err))
    found = findings(result)
    return FleetRow(str(path), result.verdict, rotor.name,
                    found[0].text if found else "", len(found))


def screen_files(files, executor=None, progress=None):
    """The :class:`FleetRow` of every file, in order, screened on ``executor``
    (:mod:`rotorcalc.executor`; this process by default); ``progress(done, total)``."""
    from ..executor import InProcess
    executor = executor or InProcess()
    rows = [None] * len(files)
    for done, (i, row) in enumerate(executor.results(screen_file, [(f,) for f in files]), 1):
        if isinstance(row, BaseException):      # the worker itself failed: say so
            row = FleetRow(str(files[i]), NUMERICAL, first=f"{type(row).__name__}: {row}")
        rows[i] = row
        if progress is not None:
            progress(done, len(files))
    return rows


def exit_code(rows):
    """The worst of the rows' codes (:data:`SEVERITY`)."""
    codes = [SEVERITY.get(r.verdict, 3) for r in rows]
    for code in (1, 3, 2, 5):
        if code in codes:
            return code
    return 0
