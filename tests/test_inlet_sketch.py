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
