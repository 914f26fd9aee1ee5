"""Cuts through the map: the lines drawn are the map's own row and column, failing stretches marked.

The expected values are read straight from the evaluated grid (``MapResult.quantity``) and the face Mach
limit of the sample file; the plots must show exactly those numbers.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from engine_air.envelope.evaluate import WORST, evaluate_project  # noqa: E402
from engine_air.project.toml_file import load_project  # noqa: E402

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"


def test_sections_draw_the_map_row_and_column_for_every_case(qtbot, tmp_path):
    from app.views.section_plots_view import SectionPlots

    project = load_project(SAMPLES / "undersized_business_jet.toml")
    result = evaluate_project(project)
    view = SectionPlots()
    qtbot.addWidget(view)
    i, j = len(result.altitude_m) // 2, len(result.mach) // 2
    view.show_sections(result, WORST, "face_mach", i, j)
    for case in result.cases:
        values = result.quantity(case.name, "face_mach")
        x, y = view.lines[("mach", case.name)]
        np.testing.assert_array_equal(x, result.mach)
        np.testing.assert_array_equal(y, values[i, :])
        x, y = view.lines[("altitude", case.name)]
        np.testing.assert_array_equal(x, values[:, j])
        np.testing.assert_array_equal(y, result.altitude_m)
        # failing where the face Mach exceeds the file's limit, inside the envelope
        expected = np.nan_to_num(values[:, j], nan=-1.0) > project.limits.face_mach_max
        np.testing.assert_array_equal(view.failing[("altitude", case.name)], expected)
    view.export(str(tmp_path / "cuts.png"))
    assert (tmp_path / "cuts.png").stat().st_size > 1000
