"""The distortion dialog (app/dialogs/distortion.py): opens on the sample rake file from the Design menu, shows
the face, the ring table and the stack-up; a bad rake file gets a message box and the open project is kept."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

pytest.importorskip("PySide6")
pytest.importorskip("pytestqt")

from PySide6.QtWidgets import QMainWindow, QMessageBox  # noqa: E402

from app.dialogs import add_design_menu  # noqa: E402
from app.dialogs.menu import open_distortion  # noqa: E402
from engine_air.project import load_project  # noqa: E402

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PROJECT = SAMPLES / "supersonic_two_ramp.toml"
RAKES = SAMPLES / "supersonic_two_ramp_rakes.csv"


def test_menu_has_the_distortion_item(qtbot):
    w = QMainWindow()
    qtbot.addWidget(w)
    menu = add_design_menu(w, lambda: load_project(PROJECT))
    assert "Engine-face distortion…" in [a.text() for a in menu.actions()]


def test_dialog_opens_on_the_sample_and_shows_each_point(qtbot, tmp_path):
    w = QMainWindow()
    qtbot.addWidget(w)
    project = load_project(PROJECT)
    dialog = open_distortion(w, project, RAKES)
    qtbot.addWidget(dialog)
    assert dialog.point_box.count() == 8 and dialog.rings.rowCount() == 5
    assert dialog.verdicts.rowCount() == 2  # dc60 and surge-margin from the sample's limits
    assert dialog.rating_box.currentText() == "max-reheat-airflow"
    dialog.point_box.setCurrentIndex(7)
    assert "M2.0-a8-b3" in dialog.summary.text()
    assert float(dialog.rings.item(0, 2).text()) > 0.0
    dialog.grab().save(str(tmp_path / "distortion.png"))
    assert (tmp_path / "distortion.png").stat().st_size > 10000


def test_bad_rake_file_gets_a_message_and_keeps_the_project(qtbot, tmp_path, monkeypatch):
    bad = tmp_path / "bad.csv"
    bad.write_text("point,ring,angle_deg,total_pressure_pa\nA,1,0,-1\n", encoding="utf-8")
    shown = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: shown.append(a[2]))
    w = QMainWindow()
    qtbot.addWidget(w)
    project = load_project(PROJECT)
    assert open_distortion(w, project, bad) is None
    assert shown and "line 2, column total_pressure_pa" in shown[0]
    assert load_project(PROJECT) == project


def test_project_without_stability_shows_the_faces_without_a_stack_up(qtbot):
    w = QMainWindow()
    qtbot.addWidget(w)
    dialog = open_distortion(w, load_project(SAMPLES / "subsonic_transport_nacelle.toml"), RAKES)
    qtbot.addWidget(dialog)
    assert not dialog.rating_box.isEnabled() and dialog.assessment.stability is None


def test_a_rating_whose_stack_up_does_not_fit_gets_a_message(qtbot, monkeypatch):
    from dataclasses import replace

    from engine_air.project.model import Stability

    project = load_project(PROJECT)
    second = replace(project.ratings[0], name="other", stability=Stability(0.2, (1.0,) * 3, (0.1,) * 3))
    project = replace(project, ratings=project.ratings + (second,))
    shown = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: shown.append(a[2]))
    w = QMainWindow()
    qtbot.addWidget(w)
    dialog = open_distortion(w, project, RAKES)
    qtbot.addWidget(dialog)
    before = dialog.assessment
    dialog.rating_box.setCurrentIndex(1)
    assert shown and "3 entries" in shown[0] and dialog.assessment is before
