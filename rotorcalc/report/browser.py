"""A headless browser, when one is installed: the report printed to PDF, a page's
screenshot, and the page as the browser sees it after loading (for the tests).

Chromium's command line is used (``--headless``); nothing is fetched from the network
(the report has no external reference) and nothing is needed beyond the browser itself.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import tempfile
from pathlib import Path

#: Names of a Chromium-family browser on PATH, tried in order; ``ROTORCALC_BROWSER``
#: (a path or a name) comes first when set.
BROWSER_NAMES = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")
#: Seconds a browser run may take before it is stopped.
TIMEOUT = 120


class BrowserMissing(RuntimeError):
    """No headless browser was found."""


def find_browser():
    """The path of a headless-capable browser, or None."""
    names = [os.environ["ROTORCALC_BROWSER"]] if os.environ.get("ROTORCALC_BROWSER") else []
    for name in names + list(BROWSER_NAMES):
        path = shutil.which(name)
        if path:
            return path
    return None


def _run(args, page: Path, timeout=TIMEOUT):
    browser = find_browser()
    if browser is None:
        raise BrowserMissing("no headless browser found (looked for "
                             + ", ".join(BROWSER_NAMES) + " on PATH, and ROTORCALC_BROWSER)")
    with tempfile.TemporaryDirectory(prefix="rotorcalc-browser-") as profile:
        command = [browser, "--headless", "--no-sandbox", "--disable-gpu",
                   "--no-first-run", "--no-default-browser-check", "--disable-extensions",
                   f"--user-data-dir={profile}", *args, Path(page).resolve().as_uri()]
        return subprocess.run(command, capture_output=True, text=True, timeout=timeout,
                              check=False)


def print_pdf(page: Path, pdf: Path):
    """Print the HTML ``page`` to ``pdf`` as the browser's print dialog would (the page's
    print stylesheet and paper size), without header or footer of the browser's own."""
    pdf = Path(pdf)
    with tempfile.TemporaryDirectory(prefix="rotorcalc-pdf-") as folder:
        target = Path(folder) / "page.pdf"
        done = _run([f"--print-to-pdf={target}", "--no-pdf-header-footer"], page)
        if not target.exists() or target.stat().st_size == 0:
            raise RuntimeError(f"the browser wrote no PDF (exit {done.returncode}): "
                               f"{done.stderr.strip()[-400:]}")
        from ..output import open_replacement
        with open_replacement(pdf) as stream:
            stream.write(target.read_bytes())


def screenshot(page: Path, png: Path, width=1280, height=1600):
    """A PNG of the top ``width`` x ``height`` pixels of ``page``."""
    done = _run([f"--screenshot={Path(png).resolve()}", f"--window-size={width},{height}",
                 "--hide-scrollbars"], page)
    if not Path(png).exists():
        raise RuntimeError(f"the browser wrote no screenshot (exit {done.returncode}): "
                           f"{done.stderr.strip()[-400:]}")


def loaded_dom(page: Path):
    """(the page's DOM after loading and running its scripts, the browser's log)."""
    done = _run(["--dump-dom", "--virtual-time-budget=5000", "--enable-logging=stderr",
                 "--v=0"], page)
    return done.stdout, done.stderr
