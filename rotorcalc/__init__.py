"""rotorcalc: lateral rotor-dynamics screening of rotating machinery.

One import gives the whole job (the example runs as a test from the
repository's root; the numbers are the bundled feed pump's)::

    >>> import rotorcalc as rc
    >>> rotor = rc.read_rotor("cases/feed_pump.toml")
    >>> result = rc.screen(rotor)
    >>> result.verdict
    'pass'
    >>> forward = [r for r in result.margins.rows if r.critical.whirl == "forward"][0]
    >>> round(rc.to_rpm(forward.critical.speed))
    5333
    >>> forward.verdict, round(forward.margin, 1)
    ('pass', 48.1)

Screening only: confirm results against the applicable standard, the purchase
specification, local codes and a licensed engineer's review.

The analyses run with one BLAS thread per process (the user's own
``OPENBLAS_NUM_THREADS`` wins), as the command line does.  The pictures
(``rc.plot_whirl_speed_map``, ``rc.plot_bode``, ...) load matplotlib on first use.
"""

__version__ = "0.2.0"

#: Where each public name lives: a name is imported on first use (PEP 562), so that
#: ``import rotorcalc`` (and the command line's ``--help``) loads no numpy or scipy.
_PUBLIC = {
    **dict.fromkeys(("CoverageGap", "CriticalSpeed", "MarginRow", "MarginTable", "Modes",
                     "Screening", "Stability", "Sweep", "critical_speeds", "modes_at",
                     "required_margin", "screen", "separation_margins", "stability", "sweep"),
                    ".analysis"),
    "Response": ".analysis.response", "unbalance_response": ".analysis.response",
    "StiffnessStudy": ".analysis.stiffness_study", "stiffness_study": ".analysis.stiffness_study",
    "assemble": ".assembly",
    **dict.fromkeys(("InputError", "RotorcalcError", "SolverError"), ".errors"),
    **dict.fromkeys(("Bearing", "Disk", "MarginRule", "Material", "OperatingRange", "Rotor",
                     "Section", "Settings", "StabilityRule", "Support"), ".model"),
    "parse_rotor": ".reader", "read_rotor": ".reader",
    "to_hz": ".units", "to_rpm": ".units",
}

#: Pictures, loaded with matplotlib on first use (the analyses never need it).
_PICTURES = ("plot_whirl_speed_map", "plot_mode_shape", "plot_rotor_layout", "plot_bode",
             "plot_polar", "plot_orbits", "plot_critical_speed_map", "plot_variant_maps",
             "plot_map_shapes", "plot_coupling_screen", "plot_clearance_envelope",
             "plot_study_criticals", "plot_study_probability", "plot_study_influence", "save")
#: The 0.1 names of the pictures, read until 0.3 (with a note naming the new one).
_OLD_PICTURES = ("whirl_speed_map", "mode_shape", "rotor_layout", "bode", "polar", "orbits",
                 "critical_speed_map", "variant_maps", "map_shapes")

__all__ = ["read_rotor", "parse_rotor", "assemble", "modes_at", "sweep", "critical_speeds",
           "stability", "screen", "separation_margins", "required_margin",
           "unbalance_response", "Modes", "Sweep", "CriticalSpeed", "MarginRow", "MarginTable",
           "Screening", "Stability", "CoverageGap", "Response", "Rotor", "Section", "Disk",
           "Bearing", "Support", "Material", "OperatingRange", "Settings", "MarginRule",
           "StabilityRule", "stiffness_study", "StiffnessStudy", "InputError", "SolverError", "RotorcalcError", "to_rpm", "to_hz",
           *_PICTURES]


def __getattr__(name):
    if name in _PUBLIC:
        import importlib
        value = getattr(importlib.import_module(_PUBLIC[name], __name__), name)
        globals()[name] = value            # once imported, an ordinary attribute
        return value
    if name in _PICTURES or name in _OLD_PICTURES:
        from . import plotting
        return getattr(plotting, name)
    raise AttributeError(f"module 'rotorcalc' has no attribute {name!r}")


def __dir__():
    return sorted(set(globals()) | set(__all__))
