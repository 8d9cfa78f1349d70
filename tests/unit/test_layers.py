"""The data flow stays one-directional and the command line only prints (DEVELOPERS.md,
"Layout and data flow").  Checked by reading the source, as a reviewer would with grep."""

import ast
import re
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[2] / "rotorcalc"
COMMANDS = sorted((PACKAGE / "cli").glob("*.py"))

#: Layers, lowest first; a module may import its own layer and the ones below.
LAYERS = [
    {"errors", "notices", "vocabulary", "units", "threads", "_checks", "_toml"},
    {"rules", "supports", "unbalance", "standards", "statics", "model", "_read_response", "reader",
     "variants", "fe", "assembly", "solvers", "output", "bearings"},
    {"analysis"},
    {"tables", "plotting"},
    {"cli"},
]


def _layer(module):
    top = module.split(".")[0]
    for i, names in enumerate(LAYERS):
        if top in names:
            return i
    return None


def _imports(path):
    """(module imported, at top level?) for every relative import of ``path``."""
    tree = ast.parse(path.read_text())
    top_level = {id(n) for n in tree.body}
    rel = path.relative_to(PACKAGE).with_suffix("")
    here = list(rel.parts[:-1])
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.level:
            base = here[:len(here) - node.level + 1]
            target = ".".join(base + ([node.module] if node.module else []))
            names = [target] if node.module else [a.name for a in node.names]
            out += [(n or target, id(node) in top_level) for n in names]
    return out


@pytest.mark.parametrize("path", sorted(PACKAGE.rglob("*.py")),
                         ids=lambda p: str(p.relative_to(PACKAGE)))
def test_no_module_imports_a_higher_layer_at_import_time(path):
    """Analyses may draw themselves (``.plot()`` imports the pictures when called); no
    module imports a higher layer when it is loaded."""
    mine = _layer(".".join(path.relative_to(PACKAGE).with_suffix("").parts))
    if mine is None:
        return
    for target, top_level in _imports(path):
        theirs = _layer(target)
        if theirs is not None and top_level:
            assert theirs <= mine, f"{path.name} imports {target} at import time"


@pytest.mark.parametrize("path", COMMANDS, ids=lambda p: p.name)
def test_command_modules_do_no_arithmetic(path):
    """No numpy, no math, no operator between numbers: numbers come from the analysis
    layer and the command line formats them (the issue that asked for this found the
    stiffness-map command deriving its own defaults)."""
    text = path.read_text()
    assert not re.search(r"^\s*(import numpy|from numpy|import math|from math)", text, re.M)
    numeric = (ast.Sub, ast.Mult, ast.Div, ast.FloorDiv, ast.Pow)   # + and % also join text
    tree = ast.parse(text)
    timing = {id(n) for c in ast.walk(tree) if isinstance(c, ast.ClassDef)
              and c.name.endswith("Progress") for n in ast.walk(c)}   # when to show a bar
    for node in ast.walk(tree):
        if id(node) in timing:
            continue
        clock = "perf_counter" in ast.unparse(node.left) if isinstance(node, ast.BinOp) else False
        if isinstance(node, ast.BinOp) and isinstance(node.op, numeric) and not clock:
            raise AssertionError(f"{path.name}:{node.lineno}: {ast.unparse(node)}")
