"""Start-up stays light: loading and evaluating a pitot project imports no heavy library.

The command line's start-up time is measured against a bare ``python -c "import numpy, tomllib"`` (README,
performance table; ``bench/startup.py``). scipy (the spike's and the studies' solvers), matplotlib (pictures),
pyarrow (tables) and dask (sweeps) are imported only inside the functions that use them, and the inlet registry
imports a type's module only when that type is asked for. Each check runs in a fresh interpreter, since the test
session itself has imported them all.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PITOT = ROOT / "sample_projects" / "subsonic_transport_nacelle.toml"
HEAVY = ("scipy", "matplotlib", "pyarrow", "dask", "polars", "pandas", "PySide6")


def _modules_after(code: str) -> set[str]:
    script = f"import sys, json\nsys.path.insert(0, {str(ROOT)!r})\n{code}\nprint(json.dumps(sorted(sys.modules)))"
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert done.returncode == 0, done.stderr
    return set(json.loads(done.stdout.strip().splitlines()[-1]))


def _heavy(modules: set[str]) -> list[str]:
    return sorted(m for m in modules if m.split(".")[0] in HEAVY)


def test_load_and_evaluate_a_pitot_project_imports_nothing_heavy():
    mods = _modules_after(
        "import engine_air\n"
        f"project = engine_air.load_project({str(PITOT)!r})\n"
        "result = engine_air.evaluate_project(project)\n"
        "assert result.cases")
    assert _heavy(mods) == []
    assert "engine_air.physics.conical" not in mods  # the spike's solver is not needed by a pitot inlet


def test_check_command_imports_nothing_heavy():
    mods = _modules_after(
        "import contextlib, io\n"
        "from engine_air.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    main(['check', {str(PITOT)!r}])")
    assert _heavy(mods) == []
    others = ("maps", "point", "characteristic", "calibrate", "size", "compare", "sweep", "pack", "distortion")
    assert not [m for m in others if f"engine_air.cli.{m}" in mods]  # only the named command's module


def test_registry_imports_a_type_module_when_asked():
    mods = _modules_after("from engine_air.inlets.registry import inlet_type, INLET_TYPES\n"
                          "assert 'axisymmetric-spike' in INLET_TYPES\n"
                          "assert inlet_type('pitot').name == 'pitot'")
    assert "engine_air.inlets.pitot" in mods
    assert "engine_air.inlets.axisymmetric_spike" not in mods
