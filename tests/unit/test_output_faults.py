"""Output files under faults: targets that are not regular files, interrupted and
killed writes, permissions, flushing to disk, and pictures that repeat byte for byte.

Where a check rests on an operating-system rule, the rule is cited from
IEEE Std 1003.1-2017 (POSIX.1-2017, "The Open Group Base Specifications Issue 7"),
the page of the function named.
"""

import errno
import os
import signal
import stat
import subprocess
import sys
import textwrap
import threading
import time

import matplotlib

matplotlib.use("Agg")

import pytest
from matplotlib.figure import Figure
from typer.testing import CliRunner

import rotorcalc.output as out
from rotorcalc.cli import app
from rotorcalc.output import atomic_write, open_replacement, write_csv, write_json
from rotorcalc.plotting import save
from tests.conftest import ROOT

posix_only = pytest.mark.skipif(os.name != "posix", reason="POSIX files and signals")

#: The three ways to write a file, each taking a path.
WRITERS = {
    "json": lambda p: write_json(p, {"a": 1}),
    "csv": lambda p: write_csv(p, ["a", "b"], [[1, 2]]),
    "picture": lambda p: save(_figure(), p),
}
SUFFIX = {"json": ".json", "csv": ".csv", "picture": ".svg"}


def _figure():
    fig = Figure(figsize=(2.0, 1.5))
    ax = fig.add_subplot()
    ax.plot([0.0, 1.0, 2.0], [1.0, 0.0, 2.0])
    ax.text(0.5, 1.5, "trial rotor, 2nd mode")
    ax.set_title("invented case")
    return fig


def _temps(folder):
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


# --- 1. only regular files ---------------------------------------------------------

@posix_only
@pytest.mark.parametrize("kind", WRITERS)
def test_a_named_pipe_is_refused_before_anything_is_written(tmp_path, kind):
    # POSIX rename(): a new name that exists is removed and replaced whatever it is,
    # so the writer has to look first; a pipe must survive the call.
    fifo = tmp_path / f"pipe{SUFFIX[kind]}"
    os.mkfifo(fifo)
    with pytest.raises(OSError) as caught:
        WRITERS[kind](fifo)
    assert caught.value.errno == errno.EINVAL
    assert "not a regular file" in caught.value.strerror
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)
    assert [p.name for p in tmp_path.iterdir()] == [fifo.name]


@pytest.mark.parametrize("kind", WRITERS)
def test_a_folder_is_refused(tmp_path, kind):
    folder = tmp_path / f"results{SUFFIX[kind]}"
    folder.mkdir()
    with pytest.raises(IsADirectoryError) as caught:
        WRITERS[kind](folder)
    assert "folder" in caught.value.strerror
    assert folder.is_dir() and list(folder.iterdir()) == []
    assert [p.name for p in tmp_path.iterdir()] == [folder.name]


@posix_only
def test_a_link_to_a_pipe_is_refused_and_a_link_to_a_file_replaced(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    (tmp_path / "to_pipe.json").symlink_to(fifo)
    with pytest.raises(OSError, match="not a regular file"):
        atomic_write(tmp_path / "to_pipe.json", "{}\n")
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)
    # A link to a regular file: the rename replaces the link, the old file stays.
    old = tmp_path / "old.json"
    old.write_text("old")
    link = tmp_path / "to_old.json"
    link.symlink_to(old)
    atomic_write(link, "new")
    assert not link.is_symlink() and link.read_text() == "new"
    assert old.read_text() == "old"


def test_a_parent_that_is_a_file_gives_an_os_error(tmp_path):
    (tmp_path / "plain").write_text("x")
    with pytest.raises(OSError):
        atomic_write(tmp_path / "plain" / "out.json", "{}")
    assert (tmp_path / "plain").read_text() == "x"


def test_missing_folders_are_made(tmp_path):
    target = tmp_path / "a" / "b" / "out.csv"
    write_csv(target, ["x"], [[1]])
    assert target.read_text() == "x\n1\n"


@posix_only
def test_the_null_device_is_refused_and_left_a_device():
    # /dev/null is a character device (POSIX.1-2017, Base Definitions, 10.1
    # "Directory Structure and Devices"). Run as root a faulty writer would replace it,
    # so the pipe tests above run first in this file.
    null = "/dev/null"
    if not stat.S_ISCHR(os.stat(null).st_mode):
        pytest.skip("no /dev/null device here")

    def raw(path):                          # what save() uses; save() itself wants a suffix
        with open_replacement(path) as stream:
            stream.write(b"never")

    for write in (WRITERS["json"], WRITERS["csv"], raw):
        with pytest.raises(OSError) as caught:
            write(null)
        assert caught.value.errno == errno.EINVAL
        assert stat.S_ISCHR(os.lstat(null).st_mode)
    assert not [n for n in os.listdir("/dev") if n.startswith(".null.")]


@posix_only
def test_command_line_reports_a_pipe_as_an_output_error(tmp_path):
    fifo = tmp_path / "side.svg"
    os.mkfifo(fifo)
    result = CliRunner().invoke(app, ["layout", str(ROOT / "cases" / "feed_pump.toml"),
                                      "--plot", str(fifo)])
    assert result.exit_code == 4, result.output
    assert "cannot write" in result.output and "not a regular file" in result.output
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)


# --- 2. temporary files removed on every path ----------------------------------------

def test_keyboard_interrupt_mid_picture_leaves_the_old_file(tmp_path):
    target = tmp_path / "map.pdf"
    target.write_bytes(b"old")
    fig = _figure()

    def interrupted(stream, **kwargs):
        stream.write(b"%PDF-half")
        raise KeyboardInterrupt

    fig.savefig = interrupted
    with pytest.raises(KeyboardInterrupt):
        save(fig, target)
    assert target.read_bytes() == b"old"
    assert _temps(tmp_path) == []


def test_keyboard_interrupt_mid_json_leaves_the_old_file(tmp_path, monkeypatch):
    target = tmp_path / "out.json"
    target.write_text("old")

    def interrupted(fd):
        raise KeyboardInterrupt      # the bytes are in the temporary file, not yet renamed

    monkeypatch.setattr(os, "fsync", interrupted)
    with pytest.raises(KeyboardInterrupt):
        write_json(target, {"a": 1})
    assert target.read_text() == "old"
    assert _temps(tmp_path) == []
    assert out._LIVE == {}


def test_signal_handlers_are_restored(tmp_path):
    before = {s: signal.getsignal(s) for s in out._ENDING_SIGNALS}
    atomic_write(tmp_path / "a.json", "{}")
    assert {s: signal.getsignal(s) for s in out._ENDING_SIGNALS} == before


def test_a_write_from_another_thread_works(tmp_path):
    # Only the main thread may set signal handlers; a writer elsewhere must not try.
    failures = []

    def work():
        try:
            atomic_write(tmp_path / "t.json", "{}")
        except BaseException as exc:    # pragma: no cover - reported below
            failures.append(exc)

    thread = threading.Thread(target=work)
    thread.start()
    thread.join()
    assert failures == [] and (tmp_path / "t.json").read_text() == "{}"


CHILD = textwrap.dedent("""
    import signal, sys, threading, time
    from rotorcalc.output import open_replacement
    how, target = sys.argv[1], sys.argv[2]
    # Model an ordinary terminal session whatever the test runner inherited.
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    signal.signal(signal.SIGINT, signal.default_int_handler)

    def write(wait):
        with open_replacement(target) as stream:
            stream.write(b"partial")
            stream.flush()
            print("writing", flush=True)
            time.sleep(wait)
            stream.write(b" and the rest")

    if how == "exit":      # main thread ends while a daemon thread is mid-write
        threading.Thread(target=write, args=(60,), daemon=True).start()
        time.sleep(1.0)
        sys.exit(0)
    write(60)
""")


@posix_only
@pytest.mark.parametrize("how, code", [("SIGTERM", -signal.SIGTERM), ("SIGINT", -signal.SIGINT),
                                       ("exit", 0)])
def test_an_ended_process_leaves_no_temporary_file(tmp_path, how, code):
    # SIGTERM: the writer's handler removes the file and ends the process by the
    # signal; SIGINT: KeyboardInterrupt, which CPython turns back into death by
    # SIGINT (Python 3.8 changelog, bpo-1054041); exit: the atexit hook.
    target = tmp_path / "out.json"
    target.write_text("old")
    child = subprocess.Popen([sys.executable, "-c", CHILD, how, str(target)], cwd=ROOT,
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        assert child.stdout.readline().strip() == "writing"
        assert len(_temps(tmp_path)) == 1
        if how != "exit":
            child.send_signal(getattr(signal, how))
        child.wait(timeout=20)
    finally:
        if child.poll() is None:
            child.kill()
            child.wait()
    assert child.returncode == code, child.stderr.read()
    assert target.read_text() == "old"
    assert _temps(tmp_path) == []


def test_stale_temporary_files_of_the_target_are_removed(tmp_path):
    target = tmp_path / "out.json"
    old = time.time() - 3600.0
    stale = tmp_path / ".out.json.0123456789ab.tmp"            # this version's names
    stale_mkstemp = tmp_path / ".out.json.k2_9zq0a.tmp"        # earlier versions' names
    fresh = tmp_path / ".out.json.ba9876543210.tmp"            # a parallel writer's, live
    other = tmp_path / ".other.json.0123456789ab.tmp"          # another target's
    unlike = tmp_path / ".out.json.notes.tmp"                  # not our pattern
    for path in (stale, stale_mkstemp, fresh, other, unlike):
        path.write_text("x")
    for path in (stale, stale_mkstemp, other, unlike):
        os.utime(path, (old, old))
    atomic_write(target, "{}")
    assert _temps(tmp_path) == sorted(p.name for p in (fresh, other, unlike))
    assert target.read_text() == "{}"


def test_stale_removal_spares_a_folder_named_like_a_temporary_file(tmp_path):
    odd = tmp_path / ".out.json.0123456789ab.tmp"
    odd.mkdir()
    os.utime(odd, (time.time() - 3600.0,) * 2)
    atomic_write(tmp_path / "out.json", "{}")
    assert odd.is_dir()


# --- 3. flushed to disk ------------------------------------------------------------

@pytest.mark.parametrize("kind", WRITERS)
def test_file_is_synced_before_the_rename(tmp_path, monkeypatch, kind):
    # POSIX.1-2017 fsync(): data reach the storage device before it returns; the
    # rename is only safe after that. The folder sync afterwards is best effort.
    calls = []
    real_fsync, real_replace = os.fsync, os.replace
    monkeypatch.setattr(os, "fsync", lambda fd: (calls.append(("fsync", fd)), real_fsync(fd)))
    monkeypatch.setattr(os, "replace",
                        lambda a, b: (calls.append(("replace", b)), real_replace(a, b)))
    target = tmp_path / f"out{SUFFIX[kind]}"
    WRITERS[kind](target)
    steps = [name for name, _ in calls]
    assert steps[:2] == ["fsync", "replace"]
    if os.name == "posix":
        assert steps == ["fsync", "replace", "fsync"]


# --- 4. permissions ----------------------------------------------------------------

@posix_only
@pytest.mark.parametrize("kind", WRITERS)
def test_overwrite_keeps_the_permission_bits(tmp_path, kind):
    target = tmp_path / f"out{SUFFIX[kind]}"
    target.write_text("old")
    os.chmod(target, 0o640)
    WRITERS[kind](target)
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o640
    assert target.read_bytes() != b"old"


@posix_only
@pytest.mark.parametrize("mask", [0o022, 0o027, 0o077])
def test_a_new_file_follows_the_umask(tmp_path, mask):
    # POSIX.1-2017 open() and umask(): a new file's permission bits are the
    # requested mode less the umask; an ordinary file asks for 0666.
    previous = os.umask(mask)
    try:
        for kind, write in WRITERS.items():
            target = tmp_path / f"new{SUFFIX[kind]}"
            write(target)
            assert stat.S_IMODE(os.stat(target).st_mode) == 0o666 & ~mask, kind
    finally:
        os.umask(previous)


# --- 5. the same figure gives the same bytes ---------------------------------------

@pytest.mark.parametrize("suffix", [".svg", ".pdf", ".png"])
def test_a_figure_saved_twice_gives_the_same_bytes(tmp_path, suffix):
    fig = _figure()
    first = save(fig, tmp_path / f"a{suffix}").read_bytes()
    second = save(fig, tmp_path / f"b{suffix}").read_bytes()
    again = save(_figure(), tmp_path / f"c{suffix}").read_bytes()
    assert first == second == again
    for stamp in (b"<dc:date>", b"/CreationDate", b"/ModDate"):
        assert stamp not in first
