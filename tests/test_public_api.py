"""The package's public API: the names of ``engine_air.__all__`` resolve, and a point evaluated through it equals
the command line's point JSON (the interfaces contract)."""

from __future__ import annotations

import json
from pathlib import Path

import engine_air
from engine_air.cli import main

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "supersonic_two_ramp.toml"


def test_every_public_name_resolves():
    for name in engine_air.__all__:
        assert getattr(engine_air, name) is not None


def test_evaluate_point_equals_the_cli_point(capsys):
    project = engine_air.load_project(SAMPLE)
    record = engine_air.evaluate_point(project, 1.8, 11000.0)
    assert main(["point", str(SAMPLE), "--mach", "1.8", "--altitude-m", "11000", "--json"]) in (0, 1)
    assert json.loads(capsys.readouterr().out) == json.loads(json.dumps(record))


def test_map_result_of_evaluate_project():
    project = engine_air.load_project(SAMPLE)
    result = engine_air.evaluate_project(project)
    assert isinstance(result, engine_air.MapResult)
    assert [c.name for c in result.cases] == [c.name for c in project.cases]
