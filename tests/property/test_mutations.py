"""Random mutations of valid rotor files end in an InputError, never another exception.

Mutations act on the parsed document (values, types, keys, units, structure)
and on the raw text (syntax).  A mutation may leave the file valid; then the
rotor must simply build.  What must never happen is any exception other than
the package's InputError.
"""

import copy
import io
import math
import sys
import warnings

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from rotorcalc.errors import InputError
from rotorcalc.reader import load_toml, parse_rotor, rotor_from_dict
from rotorcalc.vocabulary import RenamedWarning
from tests.conftest import CASES

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib

DOCS = {c.stem: tomllib.loads(c.read_text()) for c in CASES}
TEXTS = {c.stem: c.read_text() for c in CASES}

BAD_VALUES = st.sampled_from([
    -1, 0, -0.0, 1e308 * 10, math.nan, "nan", "inf m", "-3 mm", "3 kg", "3 N/m", "12 rpm",
    "abc", "", "1 +", "__import__('os')", "().__class__", True, [], {}, [1, "a"], "3 m/s",
    "1e400 N/m", "5 /s", 2**70, "0 rpm", "residual",
    # round two: dimensionless units, extreme magnitudes, power towers, odd speed units
    "50 percent", "500 mm/m", "500000 ppm", "1e300 N/m", "1e-300 m", "1e300 rpm", "9**9**9 mm",
    "150 rad*Hz", "-3000 rpm", "[/]", "$x", "x" * 300,
])


def paths(doc, prefix=()):
    """Every (container, key) pair in a nested document."""
    out = []
    if isinstance(doc, dict):
        for k, v in doc.items():
            out.append((prefix + (k,)))
            out.extend(paths(v, prefix + (k,)))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            out.append(prefix + (i,))
            out.extend(paths(v, prefix + (i,)))
    return out


def parent(doc, path):
    for key in path[:-1]:
        doc = doc[key]
    return doc


@st.composite
def mutated(draw):
    name = draw(st.sampled_from(sorted(DOCS)))
    doc = copy.deepcopy(DOCS[name])
    for _ in range(draw(st.integers(1, 3))):
        every = paths(doc)
        if not every:
            break
        path = draw(st.sampled_from(every))
        holder = parent(doc, path)
        key = path[-1]
        action = draw(st.sampled_from(["value", "delete", "rename", "wrap", "duplicate"]))
        if action == "value":
            # a copy: the sampled list or table must not be mutated by a later action
            holder[key] = copy.deepcopy(draw(BAD_VALUES))
        elif action == "delete":
            del holder[key]
        elif action == "rename" and isinstance(holder, dict):
            holder[str(key) + draw(st.sampled_from(["_", "s", "x"]))] = holder.pop(key)
        elif action == "wrap":
            holder[key] = [holder[key]]
        elif action == "duplicate" and isinstance(holder, list):
            holder.append(copy.deepcopy(holder[key]))
    return doc


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_document_mutations_give_input_errors(doc):
    """A valid rotor, an input error naming its key, or (deleting e.g. residual_multiple)
    a rotor read with an old spelling's warning: never anything else."""
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", RenamedWarning)
            rotor_from_dict(doc)
    except InputError as err:
        assert err.key is not None and err.message()


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(sorted(TEXTS)), st.data())
def test_text_mutations_give_input_errors(name, data):
    text = TEXTS[name]
    at = data.draw(st.integers(0, len(text) - 1))
    piece = data.draw(st.sampled_from(["[", "]", "=", '"', "\n[[x]]\n", "#", "{", "'", "==",
                                       "\x00", "é", " = = ", "[[section]]\n"]))
    cut = data.draw(st.integers(0, 5))
    bad = text[:at] + piece + text[at + cut:]
    try:
        parse_rotor(bad, source="mutated.toml")
    except InputError as err:
        assert err.file == "mutated.toml"


@pytest.mark.parametrize("attempt", [
    '__import__("os").system("echo pwned")', "().__class__.__bases__[0]", "eval('1')",
    "1 m; import os", "exec('x=1') m", "${HOME} mm", "`ls` mm", "lambda: 0",
    "9" * 500 + " mm", "1" + " * 1" * 400 + " m",
])
def test_injection_attempts_are_refused(attempt):
    """Quantities are parsed by the units library's own small grammar, never evaluated."""
    text = TEXTS["feed_pump"].replace('length = "140 mm"', f"length = {attempt!r}", 1)
    text = text.replace("length = '", 'length = "').replace("'\n", '"\n', 1) \
        if "'" not in attempt else text
    try:
        rotor = parse_rotor(text)
    except InputError as err:
        assert err.key.startswith("section[0]") or err.key == "(syntax)"
    else:  # the text happened to be a valid length: then it must be finite and positive
        assert math.isfinite(rotor.sections[0].length) and rotor.sections[0].length > 0


def test_load_toml_reports_line_and_column():
    with pytest.raises(InputError) as info:
        load_toml('a = 1\nb = = 2\n', "x.toml")
    assert info.value.line == 2 and "column" in info.value.message()
    with pytest.raises(InputError) as info:
        load_toml('a = 1\nb = [1, 2\n', "x.toml")  # unclosed at the end: the last line
    assert info.value.line == 3


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.text(min_size=0, max_size=80))
def test_any_name_is_text_or_an_input_error(name):
    """A bearing name and a title of any characters: read as written or refused with an
    input error (control characters, length), and printed in a table without markup
    errors."""
    from rich.console import Console

    from rotorcalc.cli import common
    from rotorcalc.tables import Column
    doc = copy.deepcopy(DOCS["feed_pump"])
    doc["bearing"][0]["name"] = name
    doc["title"] = name
    try:
        rotor = rotor_from_dict(doc)
    except InputError:
        return
    assert rotor.bearings[0].name == name and rotor.name == name
    quiet = Console(file=io.StringIO(), width=120)
    old, common.console = common.console, quiet
    try:
        common.print_table(rotor.name, [Column("Bearing", lambda r: r, "{}")], [name])
    finally:
        common.console = old
