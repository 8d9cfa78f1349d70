"""Choosing and naming what a response picture draws: the case, the probes, their
colours and line styles, the peaks of a case, the stations' names.

Shared by the Bode plot, the polar plot and the orbits; a probe keeps one colour
per station and one line style per direction at that station in every picture.
"""

from __future__ import annotations

import os

import numpy as np

from ..errors import InputError
from . import _style as st

#: A peak whose drawn curve stays below this share of its refined amplitude is one
#: the sweep did not resolve; a dotted stem joins the curve to the peak marker.
UNRESOLVED = 0.9
#: What may part a station's name from a probe's direction ("DE x", "DE_y", "NDE-45").
SEPARATORS = " _-:."


def case_index(response, index):
    """``index`` into ``response.cases`` made non-negative; IndexError when out of range."""
    n = len(response.cases)
    if not -n <= index < n:
        raise IndexError(f"case index {index} is out of range: the response has {n} "
                         f"case{'s' if n != 1 else ''} ({', '.join(response.cases)})")
    return index % n


def probe_indices(response, probes):
    """Probe indices from indices, names, a mix of both, or a single one (None: all)."""
    names = [p.name for p in response.probes]
    if not names:
        raise InputError("plot arguments", "the response has no probes to draw", kind="option")
    if probes is None:
        return list(range(len(names)))
    if isinstance(probes, (str, int, np.integer)):
        probes = [probes]
    out = []
    for p in probes:
        k = _one_probe(p, names)
        if k not in out:
            out.append(k)
    if not out:
        raise InputError("plot arguments", "no probe is chosen", kind="option")
    return out


def _one_probe(p, names):
    if isinstance(p, str):
        if p not in names:
            raise InputError("plot arguments", f"no probe is named {p!r}: the probes are "
                             + ", ".join(repr(n) for n in names), kind="option")
        return names.index(p)
    if isinstance(p, (int, np.integer)) and not isinstance(p, bool):
        if not -len(names) <= p < len(names):
            raise IndexError(f"probe index {p} is out of range: the response has "
                             f"{len(names)} probes")
        return int(p) % len(names)
    raise TypeError(f"a probe is chosen by index or name, not by {p!r}")


def probe_looks(response, indices):
    """Colour by station, line style by order at the station, for every probe."""
    stations = []
    for p in response.probes:
        if p.station not in stations:
            stations.append(p.station)
    seen = {}
    looks = {}
    colours, styles = st.SERIES_COLOURS, st.SERIES_STYLES
    for k, p in enumerate(response.probes):
        n = seen.get(p.station, 0)
        seen[p.station] = n + 1
        looks[k] = (colours[stations.index(p.station) % len(colours)], styles[n % len(styles)])
    return {k: looks[k] for k in indices}


def probe_label(probe, k):
    return probe.name or f"probe {k + 1} (station {probe.station})"


def case_peaks(response, index, probe_index):
    """The peaks of case ``index`` on probe ``probe_index``."""
    case = response.cases[index]
    name = response.probes[probe_index].name
    return [p for p in response.peaks if p.case == case and p.probe == name]


def station_name(response, station):
    """What the probes at a station have in common (``"DE x"``, ``"DE y"``: ``"DE"``)."""
    names = [p.name for p in response.probes if p.station == station and p.name]
    if not names:
        return ""
    if len(names) == 1:
        return names[0]
    common = os.path.commonprefix(names)
    # Whole words only: "DE 45" and "DE 40" have "DE" in common, not "DE 4".
    if any(len(n) > len(common) and n[len(common)] not in SEPARATORS for n in names) \
            and common and common[-1] not in SEPARATORS:
        cut = max(common.rfind(c) for c in SEPARATORS)
        common = common[:cut] if cut > 0 else ""
    return common.strip(SEPARATORS)


def station_title(response, station):
    name = station_name(response, station)
    return f"station {station}" + (f"  \u00b7  {name}" if name else "")


def direction_tag(response, k):
    """What tells a probe from the others at its station (``"DE y"``: ``"y"``), or ""."""
    probe = response.probes[k]
    mates = [p for p in response.probes if p.station == probe.station]
    if len(mates) < 2:
        return ""
    common = station_name(response, probe.station)
    rest = probe.name[len(common):].strip(SEPARATORS) if probe.name.startswith(common) else ""
    return rest or probe.name or f"#{mates.index(probe) + 1}"
