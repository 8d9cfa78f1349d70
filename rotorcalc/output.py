"""Machine-readable output: JSON and CSV, written whole or not at all.

JSON documents carry the tool version, the input file's SHA-256 and the
warnings; key order is fixed by the result objects and floats are written by
Python's shortest round-trip repr, so the same input gives the same bytes.

Every file the tool writes (these and the pictures in
:mod:`rotorcalc.plotting.output`) goes through :func:`open_replacement`: a
temporary file beside the target, flushed to disk, then renamed over it.
"""

from __future__ import annotations

import atexit
import csv
import errno
import hashlib
import io
import json
import os
import re
import secrets
import signal
import stat
import threading
import time
from contextlib import contextmanager
from pathlib import Path

from . import __version__
from .notices import record
from .errors import InputError

FORMAT = "rotorcalc-results-1"

#: A temporary file of the target's name older than this (seconds) is taken to be
#: left over by a killed run and removed at the next write; a live one is younger.
STALE_AFTER = 60.0

#: Temporary files being written now, path -> the process that made them. A forked
#: child inherits the dict but must not remove its parent's files, hence the pid.
_LIVE: dict[str, int] = {}

#: Signals that by default end the process without running any Python cleanup.
_ENDING_SIGNALS = tuple(getattr(signal, name) for name in ("SIGTERM", "SIGHUP", "SIGINT")
                        if hasattr(signal, name))


def _temp_name(path: Path) -> Path:
    return path.with_name(f".{path.name}.{secrets.token_hex(6)}.tmp")


def _temp_pattern(name: str):
    # Twelve hex digits as made by _temp_name; eight of [a-z0-9_] as made by
    # tempfile.mkstemp in earlier versions.
    return re.compile(r"\." + re.escape(name) + r"\.(?:[0-9a-f]{12}|[a-z0-9_]{8})\.tmp")


def _remove_live():
    """Remove the temporary files this process is writing (at exit or on a signal)."""
    pid = os.getpid()
    for tmp, owner in _LIVE.copy().items():     # no lock: may run in a signal handler
        if owner == pid:
            try:
                os.unlink(tmp)
            except OSError:
                pass


atexit.register(_remove_live)


def _on_ending_signal(signum, frame):
    """Remove the temporary files, then end the process as the signal would have."""
    _remove_live()
    signal.signal(signum, signal.SIG_DFL)
    signal.raise_signal(signum)
    raise SystemExit(128 + signum)              # reached only if the signal is blocked


@contextmanager
def _signals_remove_temps():
    """While a write is under way, make ending signals remove its temporary file.

    Only signals left at their default action are taken over (a program or a
    worker pool that set its own handler keeps it), only in the main thread
    (the only one allowed to), and each is restored afterwards. SIGINT usually
    raises KeyboardInterrupt, which the writer's own cleanup handles.
    """
    taken = []
    if threading.current_thread() is threading.main_thread():
        for signum in _ENDING_SIGNALS:
            if signal.getsignal(signum) == signal.SIG_DFL:
                signal.signal(signum, _on_ending_signal)
                taken.append(signum)
    try:
        yield
    finally:
        for signum in taken:
            if signal.getsignal(signum) is _on_ending_signal:
                signal.signal(signum, signal.SIG_DFL)


def _regular_mode(path: Path):
    """Permission bits of the regular file at ``path``, or None when there is none.

    Raises
    ------
    IsADirectoryError
        When ``path`` is a folder.
    OSError
        With errno EINVAL when ``path`` is a device, pipe or socket (also behind a
        symbolic link): renaming over one would replace it.
    """
    try:
        info = os.stat(path)                    # follows links: a link to a device is refused
    except FileNotFoundError:
        return None
    if stat.S_ISDIR(info.st_mode):
        raise IsADirectoryError(errno.EISDIR, "is a folder; rotorcalc writes only regular files",
                                str(path))
    if not stat.S_ISREG(info.st_mode):
        raise OSError(errno.EINVAL, "is not a regular file (a device, pipe or socket); "
                                    "rotorcalc writes only regular files", str(path))
    return stat.S_IMODE(info.st_mode) & 0o777


def _remove_stale(path: Path):
    """Remove temporary files of this target left by a run that was killed."""
    pattern, now = _temp_pattern(path.name), time.time()
    live = {Path(tmp) for tmp in _LIVE.copy()}  # a slow write in another thread is not stale
    try:
        entries = list(os.scandir(path.parent))
    except OSError:
        return
    for entry in entries:
        if not pattern.fullmatch(entry.name) or path.parent / entry.name in live:
            continue
        try:
            info = entry.stat(follow_symlinks=False)
            if stat.S_ISREG(info.st_mode) and now - info.st_mtime > STALE_AFTER:
                os.unlink(entry.path)
        except OSError:
            pass                                # gone already, or not ours to remove


def _sync_folder(folder: Path):
    """Flush the folder entry of a rename; some platforms cannot open a folder."""
    try:
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


@contextmanager
def open_replacement(path):
    """A binary stream whose bytes replace ``path`` whole when the block ends.

    The bytes go to a temporary file ``.NAME.<12 hex digits>.tmp`` in the
    target's folder, are flushed to disk and then renamed over ``path``, so a
    reader sees the old file or the new one, never part of one. On any
    exception, KeyboardInterrupt included, or on SIGTERM the temporary file is
    removed and an earlier file is left untouched. The file keeps an existing
    target's permission bits; a new one gets those of any new file (0666 less
    the umask).

    Parameters
    ----------
    path : str or os.PathLike
        The file to write. Missing parent folders are created. A symbolic link
        there is replaced by the file, not written through.

    Yields
    ------
    io.BufferedWriter

    Raises
    ------
    OSError
        Before anything is written when ``path`` is a folder
        (IsADirectoryError), a device, pipe or socket; or when the file
        cannot be written.
    """
    path = Path(path)
    mode = _regular_mode(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    _remove_stale(path)
    tmp = _temp_name(path)
    with _signals_remove_temps():
        _LIVE[str(tmp)] = os.getpid()           # before the file exists: no window
        try:
            fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0),
                         0o666)
            with os.fdopen(fd, "wb") as stream:
                if mode is not None:            # before the bytes: never more open than the target
                    os.chmod(fd if os.chmod in os.supports_fd else tmp, mode)
                yield stream
                stream.flush()
                os.fsync(stream.fileno())
            _regular_mode(path)                 # again: the target may have changed meanwhile
            os.replace(tmp, path)
        except BaseException:
            try:
                os.unlink(tmp)
            except FileNotFoundError:
                pass
            raise
        finally:
            _LIVE.pop(str(tmp), None)
    _sync_folder(path.parent)


def atomic_write(path, text: str):
    """Write ``text`` as UTF-8 to ``path``, whole or not at all (see :func:`open_replacement`)."""
    with open_replacement(path) as stream:
        stream.write(text.encode("utf-8"))


def file_hash(path):
    """SHA-256 of a file's bytes, hex."""
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


def envelope(command: str, input_path, result: dict, warnings=()):
    """Wrap a result dict with provenance."""
    return {
        "format": FORMAT,
        "tool": "rotorcalc",
        "version": __version__,
        "command": command,
        "input": {"path": str(input_path), "sha256": file_hash(input_path)},
        "warnings": [record(w) for w in warnings],
        "result": result,
    }


def to_json(document: dict) -> str:
    return json.dumps(document, indent=2, allow_nan=False) + "\n"


def write_json(path, document: dict):
    atomic_write(path, to_json(document))


def read_json(path) -> dict:
    """Read back a results file written by :func:`write_json`."""
    data = json.loads(Path(path).read_text(encoding="utf-8"))
    if data.get("format") != FORMAT:
        raise InputError("file", f"{path} is not a rotorcalc results file", kind="file")
    return data


def to_csv(header, rows) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow(["" if v is None else v for v in row])
    return buffer.getvalue()


def write_csv(path, header, rows):
    atomic_write(path, to_csv(header, rows))
