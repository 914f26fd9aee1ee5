"""The inlet side view draws each shock at its computed angle and place.

References: oblique-shock wave angles from ``pygasflow`` (NACA Report 1135 relations); a normal shock stands
at 90 deg to the local flow (NACA Report 1135, normal-shock relations).
"""

from __future__ import annotations

import math
import os
from pathlib import Path

import numpy as np
import pytest

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pygasflow.solvers import oblique_shockwave_solver  # noqa: E402

from engine_air.envelope.conditions import evaluate_conditions  # noqa: E402
from engine_air.outputs.inlet_sketch import inlet_sketch  # noqa: E402
from engine_air.project.toml_file import load_project  # noqa: E402

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"


def _point(sample: str, mach: float, altitude: float = 10000.0):
    project = load_project(SAMPLES / f"{sample}.toml")
    points = evaluate_conditions(project, project.cases[0], np.array([mach]), np.array([altitude]))
    return project, points


def _line_angle(line) -> float:
    return math.degrees(math.atan2(line.y_m[-1] - line.y_m[0], line.x_m[-1] - line.x_m[0]))


def _pygasflow_beta(mach: float, theta_deg: float) -> tuple[float, float]:
    """Weak wave angle (deg) and downstream Mach from pygasflow's oblique-shock solver."""
    r = oblique_shockwave_solver("mu", mach, "theta", theta_deg, flag="weak", to_dict=True)
    return float(r["beta"]), float(r["md"])


@pytest.mark.parametrize("mach", [1.7, 1.9, 2.1])
def test_ramp_shocks_drawn_at_their_wave_angles(mach):
    project, points = _point("supersonic_two_ramp", mach)
    sketch = inlet_sketch(project, points, (0,))
    angles = project.inlet.ramp_angles_deg
    m, turned = mach, 0.0
    shocks = sketch.of_role("shock")
    assert len(shocks) == len(angles)
    for k, theta in enumerate(angles):
        beta, m = _pygasflow_beta(m, theta)
        assert _line_angle(shocks[k]) == pytest.approx(turned + beta, abs=1e-6)
        turned += theta


def test_ramp_terminal_shock_normal_to_the_local_flow():
    project, points = _point("supersonic_two_ramp", 1.8)
    sketch = inlet_sketch(project, points, (0,))
    (terminal,) = sketch.of_role("terminal-shock")
    local = sum(project.inlet.ramp_angles_deg)
    assert _line_angle(terminal) == pytest.approx(90.0 + local, abs=1e-9)


def test_pitot_subsonic_has_no_shock_and_a_stream_tube():
    project, points = _point("subsonic_transport_nacelle", 0.8)
    sketch = inlet_sketch(project, points, (0,))
    assert not sketch.of_role("shock") and not sketch.of_role("terminal-shock")
    tube = sketch.of_role("stream-tube")[0]
    r_lip = math.sqrt(project.inlet.capture_area_m2 / math.pi)
    mfr = float(points.mass_flow_ratio[0])
    assert tube.y_m[0] == pytest.approx(math.sqrt(mfr) * r_lip, rel=1e-12)  # A0 = MFR * A_c, circular


def test_detached_ramp_draws_a_bow_shock_normal_at_its_nose():
    project, points = _point("supersonic_two_ramp", 1.15)
    sketch = inlet_sketch(project, points, (0,))
    (bow,) = sketch.of_role("bow-shock")
    k = int(np.argmin(bow.x_m))
    # vertical tangent at the nose: a normal shock there
    assert abs(bow.x_m[k + 1] - bow.x_m[k - 1]) < 0.05 * abs(bow.y_m[k + 1] - bow.y_m[k - 1])


def test_sketch_widget_draws_the_computed_angles(qtbot):
    from app.views.inlet_sketch_view import InletSketchView

    project, points = _point("supersonic_two_ramp", 1.9)
    view = InletSketchView()
    qtbot.addWidget(view)
    view.resize(500, 300)
    view.show_point(project, points, (0,))
    beta, _ = _pygasflow_beta(1.9, project.inlet.ramp_angles_deg[0])
    assert view.drawn_angle_deg("shock 1") == pytest.approx(beta, abs=1e-6)


# -- the drawing as a drawing: mixed compression, merged shocks, no crossings, a tight frame, units, doors ------

SHOCK_ROLES = ("shock", "cowl-shock", "terminal-shock", "bow-shock")


def _segments(sketch):
    """Every straight piece of every shock line, with the line's label."""
    for line in sketch.lines:
        if line.role in SHOCK_ROLES:
            for k in range(len(line.x_m) - 1):
                yield line.label, (line.x_m[k], line.y_m[k]), (line.x_m[k + 1], line.y_m[k + 1])


def _proper_crossing(p0, p1, q0, q1, tol=1e-9) -> bool:
    """Segments cross at a point inside both (touching at an end, as merging shocks do, is not crossing)."""
    d = np.subtract(p1, p0)
    e = np.subtract(q1, q0)
    det = d[0] * e[1] - d[1] * e[0]
    if abs(det) < 1e-15:
        return False
    w = np.subtract(q0, p0)
    t = (w[0] * e[1] - w[1] * e[0]) / det
    s = (w[0] * d[1] - w[1] * d[0]) / det
    return tol < t < 1.0 - tol and tol < s < 1.0 - tol


def _crossings(sketch) -> list[tuple[str, str]]:
    segs = list(_segments(sketch))
    out = []
    for a in range(len(segs)):
        for b in range(a + 1, len(segs)):
            if segs[a][0] != segs[b][0] and _proper_crossing(*segs[a][1:], *segs[b][1:]):
                out.append((segs[a][0], segs[b][0]))
    return out


MIXED = "mixed_compression_throat_schedule"


def _mixed_at(mach):
    from engine_air.inlets.mixed_compression import started_accelerating

    project, points = _point(MIXED, mach, 14000.0)
    return project, points, bool(started_accelerating(project.inlet, np.array([mach]))[0])


@pytest.mark.parametrize("mach", [1.95, 2.2, 2.45])
def test_started_mixed_inlet_entrance_throat_and_terminal_shock_behind_the_throat(mach):
    project, points, started = _mixed_at(mach)
    assert started and bool(points.started[0])
    sketch = inlet_sketch(project, points, (0,))
    inlet = project.inlet
    h = math.sqrt(inlet.capture_area_m2)  # capture height of the square 2-D capture
    (entrance,) = sketch.of_role("entrance")
    (throat,) = sketch.of_role("throat")
    (terminal,) = sketch.of_role("terminal-shock")
    (cowl_shock,) = sketch.of_role("cowl-shock")
    h_e = math.hypot(entrance.x_m[1] - entrance.x_m[0], entrance.y_m[1] - entrance.y_m[0])
    h_th = float(throat.y_m[1] - throat.y_m[0])
    # the entrance drawn is A_e over the span (method §11: A_e from continuity, reported per point)
    assert h_e == pytest.approx(float(points.entrance_area_m2[0]) / h, rel=1e-9)
    assert h_e < h  # entrance < capture
    # throat at the scheduled area, at most the entrance when started
    a_th = float(np.interp(mach, inlet.schedule.mach, inlet.schedule.throat_area_m2))
    assert h_th == pytest.approx(a_th / h, rel=1e-9)
    assert h_th <= h_e
    # the terminal shock just downstream of the throat, normal to the (axial) internal flow, across the duct
    assert min(terminal.x_m) > throat.x_m[0]
    assert terminal.x_m[0] == pytest.approx(terminal.x_m[1], abs=1e-12)
    # the cowl shock from the lip, ahead of the throat
    lip = (entrance.x_m[0], entrance.y_m[0])
    assert (cowl_shock.x_m[0], cowl_shock.y_m[0]) == pytest.approx(lip)
    assert max(cowl_shock.x_m) < throat.x_m[0]
    assert _crossings(sketch) == []


def test_cowl_shock_drawn_at_its_wave_angle():
    # the cowl turns the post-ramp flow (ramp sum) back to axial: weak oblique shock at M_e (pygasflow)
    project, points, _ = _mixed_at(2.2)
    sketch = inlet_sketch(project, points, (0,))
    m_e = 2.2
    for theta in project.inlet.ramp_angles_deg:
        _, m_e = _pygasflow_beta(m_e, theta)
    turn = sum(project.inlet.ramp_angles_deg)
    beta, _ = _pygasflow_beta(m_e, turn)
    assert _line_angle(sketch.line("cowl shock")) == pytest.approx(turn - beta, abs=1e-6)


@pytest.mark.parametrize("mach", [1.7, 1.85])
def test_unstarted_mixed_inlet_has_its_normal_shock_ahead_of_the_cowl(mach):
    project, points, started = _mixed_at(mach)
    assert not started and not bool(points.started[0])
    sketch = inlet_sketch(project, points, (0,))
    (terminal,) = sketch.of_role("terminal-shock")
    (entrance,) = sketch.of_role("entrance")
    assert max(terminal.x_m) < entrance.x_m[0]  # ahead of the lip
    assert not sketch.of_role("cowl-shock")
    assert _crossings(sketch) == []


CASES = [("supersonic_two_ramp", m) for m in (1.15, 1.5, 1.8, 2.0, 2.1)] + \
        [("supersonic_spike_nacelle", m) for m in (1.4, 1.6, 1.8, 2.0)] + \
        [(MIXED, m) for m in (1.5, 1.8, 2.0, 2.3, 2.5)] + \
        [("variable_geometry_fighter", m) for m in (1.3, 1.6, 2.0, 2.2)]


@pytest.mark.parametrize("sample, mach", CASES)
def test_shocks_never_cross(sample, mach):
    project, points = _point(sample, mach, 12000.0)
    assert _crossings(inlet_sketch(project, points, (0,))) == []


def test_two_cone_shocks_merge_where_the_second_would_cross_the_first():
    project, points = _point("supersonic_spike_nacelle", 2.0, 12000.0)
    sketch = inlet_sketch(project, points, (0,))
    first, second = sketch.line("shock 1"), sketch.line("shock 2")
    lip_radius = math.sqrt(project.inlet.capture_area_m2 / math.pi)
    # the first cone's shock stops short of the lip height, on the second cone's shock, which carries on
    assert first.y_m[1] < lip_radius - 1e-6
    assert second.y_m[1] == pytest.approx(lip_radius, rel=1e-12)
    p, q = np.array([second.x_m[0], second.y_m[0]]), np.array([second.x_m[1], second.y_m[1]])
    end = np.array([first.x_m[1], first.y_m[1]])
    cross = (q - p)[0] * (end - p)[1] - (q - p)[1] * (end - p)[0]
    assert abs(cross) < 1e-9 * np.dot(q - p, q - p)  # the meeting point lies on the second shock
    # each is still drawn at its computed angle (first cone: the conical wave angle of the shock system)
    beta_1 = math.degrees(float(points.ramp_wave_angle_rad[0][0]))
    assert _line_angle(first) == pytest.approx(beta_1, abs=1e-9)


def test_doors_drawn_open_where_they_pass_flow():
    project, points = _point("variable_geometry_fighter", 0.2, 0.0)
    sketch = inlet_sketch(project, points, (0,))
    assert float(points.auxiliary_flow_kg_s[0]) > 0.0 and sketch.of_role("auxiliary-door")
    project, points = _point("variable_geometry_fighter", 2.0, 12000.0)
    sketch = inlet_sketch(project, points, (0,))
    assert (float(points.bypass_flow_kg_s[0]) > 0.0) == bool(sketch.of_role("bypass-door"))
    assert not sketch.of_role("auxiliary-door")  # shut above their Mach number
    project, points = _point("supersonic_two_ramp", 1.8)
    assert not any(inlet_sketch(project, points, (0,)).of_role(r) for r in ("auxiliary-door", "bypass-door"))


def _docked_view(qtbot, sample, mach, altitude=14000.0):
    from app.views.inlet_sketch_view import InletSketchView

    project, points = _point(sample, mach, altitude)
    view = InletSketchView()
    qtbot.addWidget(view)
    view.resize(700, 160)  # the dock's size in the window at 1600 x 1000
    view.show()
    view.show_point(project, points, (0,))
    qtbot.wait(20)
    return view, project, points


@pytest.mark.parametrize("sample, mach", [(MIXED, 2.2), ("supersonic_two_ramp", 1.8), ("supersonic_spike_nacelle", 2.0)])
def test_view_frames_the_drawing_tightly_with_the_legend_outside(qtbot, sample, mach):
    view, _, _ = _docked_view(qtbot, sample, mach)
    (vx0, vx1), (vy0, vy1) = view.getViewBox().viewRange()
    x0, x1, y0, y1 = view.frame_rect()
    assert vx0 <= x0 and x1 <= vx1 and vy0 <= y0 and y1 <= vy1  # everything is in view
    # equal scales: one direction is filled (to the padding), the other at least half
    fill = sorted(((x1 - x0) / (vx1 - vx0), (y1 - y0) / (vy1 - vy0)))
    assert fill[1] > 0.85 and fill[0] > 0.5, fill
    # the legend is not on the plotting area
    box = view.getViewBox().sceneBoundingRect()
    legend = view.legend.sceneBoundingRect()
    assert legend.width() > 0
    assert legend.left() >= box.right() - 1.0 or legend.top() >= box.bottom() - 1.0  # beside or below (1 px)


def test_view_draws_in_the_chosen_units(qtbot):
    from app.units import US, Units

    view, _, _ = _docked_view(qtbot, MIXED, 2.2)
    x_si, y_si = view.curves["cowl shock"].getData()
    view.set_units(Units(US))
    x_us, y_us = view.curves["cowl shock"].getData()
    np.testing.assert_allclose(x_us, x_si / 0.3048, rtol=1e-12)  # international foot, exact
    np.testing.assert_allclose(y_us, y_si / 0.3048, rtol=1e-12)
    assert "ft" in view.getPlotItem().getAxis("left").labelText
    assert view.getPlotItem().getAxis("left").autoSIPrefix is False
    assert view.drawn_angle_deg("cowl shock") == pytest.approx(math.degrees(math.atan2(y_si[-1] - y_si[0],
                                                                                        x_si[-1] - x_si[0])))
