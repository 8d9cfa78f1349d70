"""Fluid-film bearings computed from their geometry: one film solver, many geometries.

``geometry`` holds the bores (plain, lobed), ``film`` solves Reynolds' equation on
their lands, ``equilibrium`` finds where the film carries a static load and
``fixed_film`` linearises the film there into the eight coefficients; ``lubricant``
gives the film its viscosity at a temperature.  Theory and
conventions: docs/bearings.md.  Screening only: confirm bearing data against the
maker's analysis, the applicable standard and a licensed engineer's review.
"""

from .equilibrium import Equilibrium, find_equilibrium
from .journal import BORES, FilmJournal
from .film import CAVITATION_MODELS, FilmOptions, FilmSolution, solve_film
from .fixed_film import FilmCoefficients, coefficients
from .lubricant import Lubricant, effective_temperature
from .geometry import (Groove, Land, LobedBore, PlainBore, elliptical_bore, lobe,
                       offset_halves_bore, plain_bore)

__all__ = ["coefficients", "FilmCoefficients", "find_equilibrium", "Equilibrium",
           "CAVITATION_MODELS", "FilmOptions", "FilmSolution", "solve_film", "Groove", "Land",
           "LobedBore", "PlainBore", "elliptical_bore", "lobe", "offset_halves_bore",
           "plain_bore", "Lubricant", "effective_temperature", "FilmJournal", "BORES",
           "tabulate_films", "FilmRecord"]


def __getattr__(name):
    # tabulate_films needs the statics (and so the assembly): loaded when first asked for,
    # so that the film solver alone stays light and free of the model's import chain
    if name in ("tabulate_films", "FilmRecord"):
        from . import tabulate
        return getattr(tabulate, name)
    raise AttributeError(name)
