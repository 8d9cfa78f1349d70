"""The report's pictures: each described by a :class:`Picture` (which plotting function,
on which results), drawn to SVG here or in worker processes.  A picture's ``key`` is its
id prefix in the page, so a picture is the same text wherever it was drawn."""

from __future__ import annotations

from dataclasses import dataclass

from .figures import svg


def _layout(rotor):
    from ..plotting import plot_rotor_layout
    return plot_rotor_layout(rotor)


def _mode_shape(modes, rotor, title):
    from ..plotting import plot_mode_shape
    return plot_mode_shape(modes, 1, rotor=rotor, title=title)


def _bode(response, case_index, operating):
    from ..plotting import plot_bode
    return plot_bode(response, case_index, operating=operating)


def _polar(response, case_index):
    from ..plotting import plot_polar
    return plot_polar(response, case_index)


def _clearance(response, rotor, case_index):
    from ..plotting import plot_clearance_envelope
    return plot_clearance_envelope(response, rotor, case_index)


def _coupling(screen):
    from ..plotting import plot_coupling_screen
    return plot_coupling_screen(screen)


def _variants(comparison, operating):
    from ..plotting import plot_variant_maps
    return plot_variant_maps(comparison, operating=operating)


def _own_plot(result):
    """A result object that draws itself (``.plot()``): a screening's whirl-speed map, the
    rotor at rest, a bearing's coefficients, the critical-speed map."""
    return result.plot()


#: What each kind of picture draws with.
DRAWERS = {"layout": _layout, "mode-shape": _mode_shape, "bode": _bode, "polar": _polar,
           "clearance": _clearance, "coupling": _coupling, "variants": _variants,
           "own": _own_plot}


@dataclass(frozen=True)
class Picture:
    """A picture to draw: ``key`` (unique in the page), ``kind`` (:data:`DRAWERS`) and the
    results it draws."""

    key: str
    kind: str
    args: tuple

    def svg(self):
        return svg(DRAWERS[self.kind](*self.args).figure, self.key)


def _draw_chunk(pictures):
    return [p.svg() for p in pictures]


def draw_all(pictures, workers=1):
    """``{key: svg}`` of every picture, drawn on up to ``workers`` processes (dealt in turn,
    so that each gets some of each kind; a picture's text does not depend on where it was
    drawn)."""
    from ..workers import run_all
    pictures = list(pictures)
    if not pictures:
        return {}
    n = max(1, min(workers, len(pictures)))
    chunks = [pictures[i::n] for i in range(n)]
    drawn = run_all(_draw_chunk, [(chunk,) for chunk in chunks], n)
    return {p.key: text for chunk, texts in zip(chunks, drawn) for p, text in zip(chunk, texts)}
