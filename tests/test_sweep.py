"""Trade sweeps: every variant reproduces the single-map evaluation; local, in-process and dask runs agree."""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import Cancelled, evaluate_project
from engine_air.project import load_project
from engine_air.studies.sizing import with_design_values, worst_point
from engine_air.studies.sweep import MAX_POINT_EVALUATIONS, parse_vary, sweep, variant_row, write_sweep_csv

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"
CRUISE = (0.75, 11000.0, None)


@pytest.fixture(scope="module")
def small():
    """The failing sample on a coarse grid (sweeps stay fast)."""
    from dataclasses import replace

    from engine_air.project.model import Grid

    p = load_project(FAILING)
    return replace(p, grid=Grid(mach_points=31, altitude_points=26))


def variables(p):
    return {"throat_area_m2": [0.26, p.inlet.capture_area_m2 * 0.98],
            "face_area_m2": [0.30, 0.40, 0.50]}


def rows_repr(result):
    return [repr(r) for r in result.rows]  # NaN-safe exact comparison of every field


def test_variant_reproduces_the_single_map_result(small):
    r = sweep(small, variables(small), cruise=CRUISE, workers=1)
    assert r.mode == "in-process" and r.shape == (2, 3) and len(r.rows) == 6
    for row in r.rows:
        result = evaluate_project(with_design_values(small, dict(zip(r.variables, row.values))))
        ref = variant_row(result, row.index, row.values, r.cruise)
        assert repr(ref) == repr(row)
        assert row.holds == result.holds
        w = worst_point(result)
        assert row.worst_relative_margin == w.relative_margin and row.worst_check == w.check
        face = {s.name: s for s in result.summary}["face-mach"]
        assert row.worst_face_mach_margin == face.worst_margin
        assert set(row.failing_limits) == {s.name for s in result.summary if not s.holds}
    assert r.grid().shape == (2, 3)
    assert r.count("holds") + r.count("fails") == 6


def test_invalid_combinations_are_rows_not_errors(small):
    r = sweep(small, {"throat_area_m2": [0.2, small.inlet.capture_area_m2 * 1.5]}, workers=1)
    assert [row.verdict for row in r.rows][1] == "invalid"
    assert "inlet.throat_area_m2" in r.rows[1].message
    assert np.isnan(r.grid()[1])
    assert not r.holds


def test_local_processes_equal_in_process(small):
    v = variables(small)
    one = sweep(small, v, cruise=CRUISE, workers=1)
    seen = []
    many = sweep(small, v, cruise=CRUISE, workers=2, chunk_size=2, progress=seen.append)
    assert many.mode == "local" and many.workers == 2
    assert rows_repr(many) == rows_repr(one)
    assert seen[-1] == 1.0 and seen == sorted(seen)


def test_distributed_equals_local(small):
    distributed = pytest.importorskip("distributed")
    v = variables(small)
    local = sweep(small, v, cruise=CRUISE, workers=1)
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, host="127.0.0.1", dashboard_address=None,
                                       processes=True)
    try:
        remote = sweep(small, v, cruise=CRUISE, scheduler=cluster.scheduler_address, chunk_size=1)
        with distributed.Client(cluster, set_as_default=False) as client:  # an existing client works too
            again = sweep(small, v, cruise=CRUISE, scheduler=client)
    finally:
        cluster.close()
    assert remote.mode == "dask"
    assert rows_repr(remote) == rows_repr(local)
    assert rows_repr(again) == rows_repr(local)


def test_size_is_checked_before_any_work(small):
    p = load_project(PITOT)
    t0 = time.perf_counter()
    with pytest.raises(ProjectError) as err:
        sweep(p, {"face_area_m2": np.linspace(1, 3, 1000), "capture_area_m2": np.linspace(2.3, 3, 10)})
    assert time.perf_counter() - t0 < 1.0
    assert f"{MAX_POINT_EVALUATIONS:.0e}" in str(err.value) and "point evaluations" in str(err.value)
    with pytest.raises(ProjectError):
        sweep(p, {})
    with pytest.raises(ProjectError):
        sweep(p, [("face_area_m2", [1.0]), ("face_area_m2", [2.0])])
    with pytest.raises(ProjectError):
        sweep(p, {"a": [1], "b": [1], "c": [1], "d": [1], "e": [1]})
    with pytest.raises(ProjectError):
        sweep(p, {"face_area_m2": [float("nan")]})


def test_cancel(small):
    with pytest.raises(Cancelled):
        sweep(small, {"face_area_m2": np.linspace(0.3, 0.5, 6)}, workers=1, chunk_size=1, cancelled=lambda: True)
    with pytest.raises(Cancelled):
        sweep(small, {"face_area_m2": np.linspace(0.3, 0.5, 40)}, workers=2, chunk_size=1, cancelled=lambda: True)


def test_parse_vary():
    assert parse_vary("face_area_m2=1:2:3") == ("face_area_m2", (1.0, 1.5, 2.0))
    assert parse_vary("ramp_angles_deg[2]=5") == ("ramp_angles_deg[2]", (5.0,))
    assert parse_vary("duct_loss_coefficient=0,0.05") == ("duct_loss_coefficient", (0.0, 0.05))
    for bad in ("face_area_m2", "face_area_m2=1:2", "face_area_m2=1:2:0", "x=1:2:y", "=1:2:3", "v=1:2:1"):
        with pytest.raises(ProjectError):
            parse_vary(bad)


def test_csv(small, tmp_path):
    r = sweep(small, variables(small), cruise=CRUISE, workers=1)
    out = tmp_path / "s.csv"
    assert write_sweep_csv(r, out) == 6
    lines = out.read_text().splitlines()
    assert lines[0].startswith("throat_area_m2,face_area_m2,verdict,worst_relative_margin")
    assert len(lines) == 7


def test_cli_sweep_exit_codes(tmp_path, capsys):
    assert main(["sweep", str(PITOT), "--vary", "face_area_m2=1.9:2.1:2", "--workers", "1"]) == 0
    out = capsys.readouterr()
    assert "2 of 2 variants hold" in out.out and "sweep: 100%" in out.err
    csv = tmp_path / "s.csv"
    assert main(["sweep", str(FAILING), "--vary", "face_area_m2=0.3:0.5:2", "--workers", "1",
                 "--cruise-mach", "0.75", "--cruise-altitude-m", "11000", "--csv", str(csv)]) == 1
    assert csv.exists() and len(csv.read_text().splitlines()) == 3
    capsys.readouterr()
    assert main(["sweep", str(PITOT), "--vary", "face_area_m2=1:2"]) == 2
    assert "VARIABLE=lo:hi:n" in capsys.readouterr().err
    assert main(["sweep", str(PITOT), "--vary", "wing_area=1:2:2"]) == 2
    assert main(["sweep", str(PITOT), "--vary", "face_area_m2=1:3:1000", "--vary", "capture_area_m2=2.3:3:20"]) == 2
    assert "at most" in capsys.readouterr().err
