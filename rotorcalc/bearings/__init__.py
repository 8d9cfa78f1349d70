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

import importlib

#: Where each name lives.  Every module is loaded when a name of it is first asked for: a
#: rotor with table bearings never needs the film solvers, and loading them cost every
#: command about 0.017 s of CPU (docs/performance.md, "seventh pass").
_HOMES = {
    "equilibrium": ("Equilibrium", "find_equilibrium"),
    "journal": ("BORES", "FilmJournal"),
    "table": ("CoefficientTable", "Coefficients", "read_table"),
    "film": ("CAVITATION_MODELS", "FilmOptions", "FilmSolution", "solve_film"),
    "fixed_film": ("FilmCoefficients", "coefficients"),
    "lubricant": ("Lubricant", "effective_temperature"),
    "geometry": ("Groove", "Land", "LobedBore", "PlainBore", "elliptical_bore", "lobe",
                 "offset_halves_bore", "plain_bore"),
    # tabulate_films needs the statics (and so the assembly): the film solver alone stays
    # light and free of the model's import chain
    "tabulate": ("tabulate_films", "FilmRecord"),
}
_HOME_OF = {name: module for module, names in _HOMES.items() for name in names}

__all__ = [name for names in _HOMES.values() for name in names]


def __getattr__(name):
    if name in _HOME_OF:
        module = importlib.import_module(f".{_HOME_OF[name]}", __name__)
        value = globals()[name] = getattr(module, name)     # found once
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def __dir__():
    return sorted(set(globals()) | set(__all__))
