"""The program's exports go through the one table writer and carry each finding's own mechanism."""

from __future__ import annotations

import csv
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

pytest.importorskip("PySide6")

from app import exports  # noqa: E402
from app.units import Units  # noqa: E402
from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.project.toml_file import load_project  # noqa: E402

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"


def _coarse(path):
    from dataclasses import replace

    from engine_air.project.model import Grid

    return replace(load_project(path), grid=Grid(mach_points=31, altitude_points=21))


def test_gui_csv_is_the_map_table(tmp_path):
    from engine_air.cli.maps import write_map_csv

    result = evaluate_project(_coarse(SAMPLES / "undersized_business_jet.toml"))
    a, b = tmp_path / "gui.csv", tmp_path / "cli.csv"
    exports.write_grid_csv(result, a)
    write_map_csv(result, b)
    assert a.read_bytes() == b.read_bytes()
    with open(a, newline="") as fh:
        head = next(csv.reader(fh))
    assert head == exports.CSV_HEADER and "worst_relative_margin" in head


def test_findings_text_has_a_mechanism_per_row():
    result = evaluate_project(_coarse(SAMPLES / "undersized_business_jet.toml"))
    text = exports.findings_text(result, Units(), "t", "f.toml")
    mech = [line.split("; mechanism: ")[1] for line in text.splitlines() if "; mechanism: " in line]
    judged = [s for s in result.summary if s.worst_case]
    assert len(mech) == len(result.summary) and len(set(mech)) >= len(judged)


def test_findings_rows_carry_their_own_mechanism_as_tooltip(qtbot):
    from app.views.findings import FindingsList, mechanisms

    result = evaluate_project(_coarse(SAMPLES / "undersized_business_jet.toml"))
    view = FindingsList()
    qtbot.addWidget(view)
    view.set_summary(result.summary, Units(), mechanisms(result))
    tips = [view.topLevelItem(k).toolTip(1) for k in range(view.topLevelItemCount())]
    assert len(tips) == len(result.summary) and all(tips) and len(set(tips)) == len(tips)


def test_an_empty_file_is_refused_but_a_stream_has_no_size_to_judge(tmp_path):
    # a picture writer that wrote nothing must not replace the old file; a pipe or /dev/null has no size
    empty = tmp_path / "empty.png"
    empty.write_bytes(b"")
    with pytest.raises(OSError, match="nothing was written"):
        exports._non_empty(str(empty), empty)
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    exports._non_empty(str(fifo), fifo)  # no error
