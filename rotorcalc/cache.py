"""Where rotorcalc keeps, between runs, what it computes once for many: the film tables
(:mod:`rotorcalc.bearings.film_cache`), pint's parsed unit definitions and the quantity
texts read before (:mod:`rotorcalc.quantity_memo`), both in a ``units`` folder inside.

``$ROTORCALC_CACHE`` names the folder (``off`` keeps nothing on disk), else
``$XDG_CACHE_HOME/rotorcalc/films`` or ``~/.cache/rotorcalc/films``.  Delete it to clear
it; keep it private, as any folder of files a program loads.
"""

from __future__ import annotations

import os
from pathlib import Path

#: The environment variable naming the folder (``off``: keep nothing).
ENV = "ROTORCALC_CACHE"


def folder():
    """The cache folder, or None when the environment turns it off."""
    where = os.environ.get(ENV, "").strip()
    if where.lower() == "off":
        return None
    if where:
        return Path(where)
    base = os.environ.get("XDG_CACHE_HOME", "").strip() or Path.home() / ".cache"
    return Path(base) / "rotorcalc" / "films"
