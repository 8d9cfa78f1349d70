"""rotorcalc: lateral rotor-dynamics screening of rotating machinery.

Typical use::

    import rotorcalc as rc
    rotor = rc.read_rotor("cases/pump.toml")
    result = rc.sweep(rotor)
    criticals = rc.critical_speeds(rotor, result)
"""

__version__ = "0.1.0"
