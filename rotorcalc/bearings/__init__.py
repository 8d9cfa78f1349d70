"""Bearing models: one small module per model, all behind one interface,
``coefficients(speed, load, *, whirl=None)`` returning ``stiffness`` and ``damping``.

``table`` holds the first model (coefficients given over speed, and whirl frequency);
``journal`` the fixed-geometry fluid-film journal bearing (``FilmJournal``).  The film
models share one film solver: ``geometry`` holds the bores (plain, lobed), ``film``
solves Reynolds' equation on their lands, ``equilibrium`` finds where the film carries
a static load and ``fixed_film`` linearises the film there into the eight coefficients;
``lubricant`` gives the film its viscosity at a temperature.  ``tabulate`` turns film
models into the speed tables the analyses read, under the rotor's own static loads.
Theory and conventions: docs/bearings.md.  Screening only: confirm bearing data against the
maker's analysis, the applicable standard and a licensed engineer's review.
"""

from .equilibrium import Equilibrium, find_equilibrium
from .journal import BORES, FilmJournal
from .table import CoefficientTable, Coefficients, read_table
from .film import CAVITATION_MODELS, FilmOptions, FilmSolution, solve_film
from .fixed_film import FilmCoefficients, coefficients
from .lubricant import Lubricant, effective_temperature
from .geometry import (Groove, Land, LobedBore, PlainBore, elliptical_bore, lobe,
                       offset_halves_bore, plain_bore)

__all__ = ["coefficients", "FilmCoefficients", "find_equilibrium", "Equilibrium",
           "CAVITATION_MODELS", "FilmOptions", "FilmSolution", "solve_film", "Groove", "Land",
           "LobedBore", "PlainBore", "elliptical_bore", "lobe", "offset_halves_bore",
           "plain_bore", "Lubricant", "effective_temperature", "FilmJournal", "BORES",
           "CoefficientTable", "Coefficients", "read_table",
           "tabulate_films", "FilmRecord"]


def __getattr__(name):
    # tabulate_films needs the statics (and so the assembly): loaded when first asked for,
    # so that the film solver alone stays light and free of the model's import chain
    if name in ("tabulate_films", "FilmRecord"):
        from . import tabulate
        return getattr(tabulate, name)
    raise AttributeError(name)
