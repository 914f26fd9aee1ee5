"""The package's docstring examples: they run with the tests (pyproject: ``--doctest-modules`` over ``engine_air``),
collecting them imports no Qt and no optional heavy library, and every public physics function carries one."""

from __future__ import annotations

import doctest
import importlib
import inspect
import pkgutil
import subprocess
import sys
from pathlib import Path

import pytest

import engine_air

ROOT = Path(__file__).resolve().parents[1]

# modules whose public functions must each show a worked example (a doctest)
DOCUMENTED = [
    "engine_air.physics.isentropic",
    "engine_air.physics.shocks",
    "engine_air.physics.atmosphere",
    "engine_air.physics.reference_recovery",
    "engine_air.flow.demand",
    "engine_air.inlets.ramp_layout",
    "engine_air.physics.starting",
    "engine_air.inlets.mixed_compression",
    "engine_air.physics.conical",
    "engine_air.physics.taylor_maccoll",
    "engine_air.physics.detached_shock",
]


def _modules():
    return sorted(m.name for m in pkgutil.walk_packages(engine_air.__path__, "engine_air.")
                  if not m.name.endswith("__main__"))


def test_the_test_command_collects_doctests():
    from engine_air.project.load import tomllib  # tomli on Python 3.10

    ini = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["tool"]["pytest"]["ini_options"]
    assert "--doctest-modules" in ini["addopts"] and "engine_air" in ini["testpaths"]


def test_importing_every_module_imports_no_qt_and_nothing_optional():
    # in a fresh interpreter: the GUI tests of this session have imported Qt already
    code = (
        "import importlib, sys\n"
        f"for name in {_modules()!r}:\n"
        "    importlib.import_module(name)\n"
        "bad = sorted({m.split('.')[0] for m in sys.modules} & {'PySide6', 'shiboken6', 'pyqtgraph', 'PyQt5', 'PyQt6',"
        " 'dask', 'distributed', 'pytest', 'hypothesis'})\n"
        "print(','.join(bad))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == ""


@pytest.mark.parametrize("name", DOCUMENTED)
def test_public_physics_functions_have_a_worked_example(name):
    module = importlib.import_module(name)
    finder = doctest.DocTestFinder()
    missing = []
    for attr, obj in vars(module).items():
        if attr.startswith("_") or not inspect.isfunction(obj) or obj.__module__ != name:
            continue
        tests = finder.find(obj, attr, module=module)
        if not any(t.examples for t in tests):
            missing.append(attr)
        doc = inspect.getdoc(obj) or ""
        if inspect.signature(obj).parameters and "Parameters" not in doc:
            missing.append(f"{attr} (no Parameters section)")
    assert missing == [], f"{name}: public functions without a worked example: {missing}"
