"""Sources and units are written where the code is read.

- Nothing outside ``docs/`` cites a file the repository does not contain.
- Every reference key cited in code or tests, ``[KEY]``, is an entry of
  ``docs/references.md``.
- Public model functions (geo's sailings and crossings; planner's fuels, ship
  and flushing) have numpydoc docstrings: a ``Parameters`` section naming every
  parameter, and a unit in brackets on each numeric one (``[-]`` when it has
  none), as pvlib and the fluids library write them.
- The examples in those docstrings run (doctest).
"""

from __future__ import annotations

import ast
import doctest
import importlib
import inspect
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
REFERENCES = ROOT / "docs" / "references.md"

MODEL_MODULES = (
    "geo.ellipsoid", "geo.rhumb", "geo.curves", "geo.roots", "geo.path", "geo.schedule",
    "geo.plane", "geo.crossings", "geo.compliance", "geo.limits", "geo.area_measure",
)
MODEL_PACKAGES = ("planner.fuels", "planner.ship", "planner.flushing", "planner.calibration")

# a key has a hyphen or a digit (ASTM-D341, WGS84), which keeps subscripts such as [SAMPLE] out
KEY = re.compile(r"(?<=[\s(])\[([A-Z][A-Z0-9]*(?:-[A-Z0-9]+)+|[A-Z]+[0-9]+)\]")
NUMERIC = re.compile(r"\b(float|int|ndarray|ArrayLike|NDArray|Real|np\.)")
UNIT = re.compile(r"\[[^\]]+\]")


def _sources() -> list[Path]:
    files = [p for top in ("geo", "planner", "tests") for p in (ROOT / top).rglob("*")
             if p.suffix in (".py", ".toml", ".json", ".geojson", ".csv", ".md")]
    files += list((ROOT / "areas_sample").rglob("*.*")) + [ROOT / "pyproject.toml"]
    files += [ROOT / "README.md", ROOT / "DEVELOPERS.md", ROOT / ".ci" / "run"]
    return [p for p in files if p.exists()]


def _keys() -> set[str]:
    text = REFERENCES.read_text(encoding="utf-8")
    return set(re.findall(r"^\d+\.\s+\*\*([A-Z0-9-]+)\*\*", text, re.M))


def _model_modules() -> list[str]:
    names = list(MODEL_MODULES)
    for pkg in MODEL_PACKAGES:
        base = ROOT / Path(*pkg.split("."))
        for p in sorted(base.glob("*.py")):
            if not p.stem.startswith("_"):
                names.append(f"{pkg}.{p.stem}")
    return names


def _public_functions():
    for name in _model_modules():
        tree = ast.parse((ROOT / (name.replace(".", "/") + ".py")).read_text(encoding="utf-8"))
        for node in tree.body:
            if isinstance(node, ast.FunctionDef) and not node.name.startswith("_"):
                yield name, node


def test_no_citation_of_a_file_outside_the_repository():
    # notes kept outside the repository, spelled in parts so this file does not name them
    outside = ("REFERENCE" + ".md", "DESIGN" + ".md")
    offenders = [str(p.relative_to(ROOT)) for p in _sources()
                 if any(name in p.read_text(encoding="utf-8") for name in outside)]
    assert not offenders, f"cite docs/references.md keys instead: {offenders}"


def test_references_are_numbered_with_unique_keys():
    text = REFERENCES.read_text(encoding="utf-8")
    numbers = [int(n) for n in re.findall(r"^(\d+)\.\s+\*\*", text, re.M)]
    keys = re.findall(r"^\d+\.\s+\*\*([A-Z0-9-]+)\*\*", text, re.M)
    assert numbers == list(range(1, len(numbers) + 1))
    assert len(keys) == len(set(keys)) == len(numbers)


def test_every_cited_key_is_in_the_bibliography():
    known = _keys()
    unknown = {}
    for p in _sources():
        if p == Path(__file__):
            continue
        for k in KEY.findall(p.read_text(encoding="utf-8")):
            if k not in known:
                unknown.setdefault(k, str(p.relative_to(ROOT)))
    assert not unknown, f"keys not in docs/references.md: {unknown}"


@pytest.mark.parametrize("module,node", list(_public_functions()),
                         ids=lambda v: v if isinstance(v, str) else v.name)
def test_public_model_function_has_units_in_its_docstring(module, node):
    doc = ast.get_docstring(node) or ""
    params = [a for a in node.args.posonlyargs + node.args.args + node.args.kwonlyargs
              if a.arg not in ("self", "cls")]
    if not params:
        assert doc, f"{module}.{node.name} has no docstring"
        return
    assert re.search(r"^Parameters\n-{10}", doc, re.M), \
        f"{module}.{node.name}: no numpydoc 'Parameters' section"
    section = doc.split("Parameters", 1)[1]
    section = re.split(r"\n(?:Returns|Yields|Raises|Notes|References|Examples|See Also)\n-+",
                       section)[0]
    for a in params:
        line = re.search(rf"^{re.escape(a.arg)}(?:, \w+)* : (.*)$", section, re.M) or re.search(
            rf"^(?:\w+, )+{re.escape(a.arg)}(?:, \w+)* : (.*)$", section, re.M)
        assert line, f"{module}.{node.name}: parameter {a.arg!r} not documented"
        annotation = ast.unparse(a.annotation) if a.annotation is not None else ""
        if NUMERIC.search(annotation) or NUMERIC.search(line.group(1)):
            assert UNIT.search(line.group(1)), \
                f"{module}.{node.name}: parameter {a.arg!r} needs its unit in brackets, e.g. [m]"


def _doctests():
    finder = doctest.DocTestFinder(exclude_empty=True)
    for name in _model_modules():
        module = importlib.import_module(name)
        for test in finder.find(module):
            if test.examples and inspect.getmodule(test.globs.get("__name__")) is None:
                yield test


@pytest.mark.parametrize("test", list(_doctests()), ids=lambda t: t.name)
def test_docstring_examples_run(test):
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    runner.run(test)
    assert runner.failures == 0, f"doctest {test.name} failed (run it with python -m doctest)"
