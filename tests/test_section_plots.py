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


def test_export_is_large_with_every_label_inside(qtbot, tmp_path):
    """Issue 14: the exported sections are at least 1200 x 500 px (they were 702 x 176) and every axis label
    and title lies inside the picture at its full length (none cut at an edge or shortened by eliding)."""
    from PySide6.QtGui import QFontMetrics, QImage

    from app.views.section_plots_view import SectionPlots

    project = load_project(SAMPLES / "supersonic_two_ramp.toml")
    result = evaluate_project(project)
    view = SectionPlots()
    qtbot.addWidget(view)
    view.resize(400, 300)  # a small tab on screen: the file does not follow it
    i, j = len(result.altitude_m) // 2, len(result.mach) * 3 // 4
    view.show_sections(result, WORST, "worst_relative_margin", i, j)
    view.export(str(tmp_path / "cuts.png"))
    image = QImage(str(tmp_path / "cuts.png"))
    assert image.width() >= 1200 and image.height() >= 500
    page = view.export_page()
    try:
        frame = page.ci.sceneBoundingRect()
        for plot in (page.by_mach, page.by_altitude):
            for side in ("left", "bottom"):
                axis = plot.getAxis(side)
                label = axis.label
                rect = label.mapRectToScene(label.boundingRect())
                assert frame.contains(rect), f"{side} label of {plot.titleLabel.text!r} cut: {rect} in {frame}"
                text = label.toPlainText()
                need = QFontMetrics(label.font()).horizontalAdvance(text)
                assert need <= label.boundingRect().width() + 1, f"label {text!r} shortened"
                along = plot.getViewBox().sceneBoundingRect()
                assert need <= (along.height() if side == "left" else along.width()), f"{text!r} longer than its axis"
            assert frame.contains(plot.titleLabel.sceneBoundingRect())
    finally:
        page.deleteLater()
