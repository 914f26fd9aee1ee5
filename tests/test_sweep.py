"""Trade sweeps: every variant reproduces the single-map evaluation; local, in-process and dask runs agree."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import Cancelled, evaluate_project
from engine_air.project import load_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.studies.sizing import with_design_values
from engine_air.studies.sweep import MAX_POINT_EVALUATIONS, parse_vary, sweep, write_sweep_csv

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
        variant = with_design_values(small, dict(zip(r.variables, row.values)))
        result = evaluate_project(variant)
        # Expected row fields read straight from the single-map evaluation's check arrays (not from the sweep's
        # own row builder): the least relative margin over every case, check and judged point inside the map.
        assert row.verdict == ("holds" if result.holds else "fails") and row.holds == result.holds
        worst = min(float(np.min(chk.relative_margin[chk.applies & result.inside]))
                    for cm in result.cases for chk in cm.points.checks if (chk.applies & result.inside).any())
        assert row.worst_relative_margin == worst
        # the reported place holds that margin for the reported check and case
        cm = {c.name: c for c in result.cases}[row.worst_case]
        i = int(np.flatnonzero(result.altitude_m == row.worst_altitude_m)[0])
        j = int(np.flatnonzero(result.mach == row.worst_mach)[0])
        assert cm.points.check(row.worst_check).relative_margin[i, j] == worst
        face = min(float(np.min(c.points.check("face-mach").margin[c.points.check("face-mach").applies & result.inside]))
                   for c in result.cases)
        assert row.worst_face_mach_margin == face
        assert row.worst_face_mach_margin == {s.name: s for s in result.summary}["face-mach"].worst_margin
        assert set(row.failing_limits) == {s.name for s in result.summary if not s.holds}
        # cruise spillage: a one-point evaluation of the variant at the cruise point (first case)
        pts = evaluate_conditions(variant, variant.cases[0], np.array([CRUISE[0]]), np.array([CRUISE[1]]))
        assert row.cruise_spillage_fraction == float(pts.spillage_fraction[0])
        assert row.values == tuple(axis[k] for axis, k in zip(r.axes, row.index)) and row.message == ""
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


def test_size_is_checked_before_any_work(small, monkeypatch):
    # No variant is built or evaluated before the refusal (the time to refuse is printed by
    # bench/bench_design.py, not asserted here).
    import engine_air.studies.sweep as sweep_module

    def no_work(*args, **kwargs):
        raise AssertionError("work started before the size check")

    p = load_project(PITOT)
    monkeypatch.setattr(sweep_module, "evaluate_project", no_work)
    monkeypatch.setattr(sweep_module, "with_design_values", no_work)
    with pytest.raises(ProjectError) as err:
        sweep(p, {"face_area_m2": np.linspace(1, 3, 1000), "capture_area_m2": np.linspace(2.3, 3, 10)})
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


# -- issue 9: the scheduler address is parsed first; every wait on the cluster has a time limit ----------------------

@pytest.mark.parametrize("address", ["tcp://", "tcp://host", "tcp://host:99999", "http://host:8786", "host:port",
                                     "tcp://a b:1", "::::"])
def test_unparseable_scheduler_is_exit_2_before_any_work(address, capsys):
    from engine_air.studies.sweep import parse_scheduler

    with pytest.raises(ProjectError):
        parse_scheduler(address)
    code = main(["sweep", str(PITOT), "--vary", "face_area_m2=1.9:2.1:2", "--scheduler", address])
    err = capsys.readouterr().err
    assert code == 2 and "--scheduler" in err and "Traceback" not in err and len(err.strip().splitlines()) == 1
    assert "sweep:" not in err  # no progress: nothing was evaluated


def test_parse_scheduler_accepts_usual_forms():
    from engine_air.studies.sweep import parse_scheduler

    assert parse_scheduler("tcp://127.0.0.1:8786") == ("tcp", "127.0.0.1", 8786)
    assert parse_scheduler("10.0.0.2:8786") == ("tcp", "10.0.0.2", 8786)
    assert parse_scheduler("tls://[::1]:8786/") == ("tls", "::1", 8786)


def _server(answer: bytes | None):
    """A TCP server on 127.0.0.1 that accepts connections and then sends ``answer`` (None: never answers)."""
    import socket
    import threading

    srv = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    srv.bind(("127.0.0.1", 0))
    srv.listen(8)
    held = []
    stop = threading.Event()

    def serve():
        srv.settimeout(0.1)
        while not stop.is_set():
            try:
                conn, _ = srv.accept()
            except OSError:
                continue
            held.append(conn)
            if answer is not None:
                try:
                    conn.sendall(answer)
                except OSError:
                    pass

    thread = threading.Thread(target=serve, daemon=True)
    thread.start()

    def close():
        stop.set()
        thread.join(2)
        for c in held:
            c.close()
        srv.close()

    return f"tcp://127.0.0.1:{srv.getsockname()[1]}", close


def test_scheduler_that_never_answers_times_out(capsys):
    address, close = _server(None)
    try:
        code = main(["sweep", str(PITOT), "--vary", "face_area_m2=1.9:2.1:2", "--scheduler", address,
                     "--timeout", "0.5"])
    finally:
        close()
    err = capsys.readouterr().err
    assert code == 2
    assert "no answer within 0.5 s" in err and len(err.strip().splitlines()) == 1


@pytest.mark.parametrize("garbage", [b"HTTP/1.1 400 Bad Request\r\n\r\n", b"\xff" * 64, b"\x00" * 16,
                                     b"\x40\x00\x00\x00\x00\x00\x00\x00" + b"\x01" * 20])
def test_scheduler_answering_garbage_is_reported_as_such(garbage, capsys):
    address, close = _server(garbage)
    try:
        code = main(["sweep", str(PITOT), "--vary", "face_area_m2=1.9:2.1:2", "--scheduler", address,
                     "--timeout", "0.5"])
    finally:
        close()
    err = capsys.readouterr().err
    assert code == 2 and "memory" not in err
    assert "not the dask.distributed protocol" in err
    assert len(err.strip().splitlines()) == 1


def test_refused_connection_is_one_line(capsys):
    import socket

    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()  # nothing listens there now
    code = main(["sweep", str(PITOT), "--vary", "face_area_m2=1.9:2.1:2", "--scheduler", f"tcp://127.0.0.1:{port}",
                 "--timeout", "1"])
    err = capsys.readouterr().err
    assert code == 2 and "cannot connect" in err and len(err.strip().splitlines()) == 1


def test_invalid_rows_show_their_reason(small, capsys):
    from engine_air.studies.sweep import format_rows

    r = sweep(small, {"throat_area_m2": [0.26, small.inlet.capture_area_m2 * 1.5]}, workers=1)
    lines = format_rows(r)
    invalid = [ln for ln, row in zip(lines[2:], r.rows) if row.verdict == "invalid"]
    assert invalid and all("throat_area_m2" in ln for ln in invalid)
    assert "reason" in lines[0]
