"""The table writer in row batches (engine_air.outputs.table): the same text whichever way a table reaches it.

``map --csv`` writes straight from the map result case by case in batches (``write_point_table``); the
program's other tables go through ``write_table``. Both must give exactly the CSV of the whole table written at
once, to a path or to a binary file object (the form the one output writer hands over), with shortest
round-trip numbers (Python's ``repr`` digits read back bit for bit) and empty cells for non-finite values.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np

from engine_air.envelope.evaluate import evaluate_project
from engine_air.outputs import csv_lines, table
from engine_air.project import load_project

ROOT = Path(__file__).resolve().parents[1]


def _map(sample: str):
    return evaluate_project(load_project(ROOT / "sample_projects" / f"{sample}.toml"))


def test_streamed_map_csv_equals_the_whole_table(tmp_path, monkeypatch):
    monkeypatch.setattr(csv_lines, "BATCH_ROWS", 997)  # batches that do not divide the grid rows or the cases,
    monkeypatch.setattr(csv_lines, "TABLE_BATCH_ROWS", 1_499)  # and fall elsewhere in the whole table
    for sample in ("supersonic_two_ramp", "supersonic_spike_nacelle"):
        result = _map(sample)
        streamed, whole = tmp_path / f"{sample}-s.csv", tmp_path / f"{sample}-w.csv"
        rows = table.write_point_table(result, streamed)
        assert rows == table.write_table(table.point_table(result), whole)
        assert streamed.read_bytes() == whole.read_bytes()
        assert rows == sum(1 for _ in open(streamed, encoding="utf-8")) - 1


def test_a_binary_file_object_takes_the_same_text(tmp_path):
    x = np.array([0.1, 1 / 3, -2.0, np.nan, np.inf, 1e300, 5e-324])
    columns = {"case": ["a,b", "=x", "c", None, "d", "e", "f"], "x": x, "k": np.arange(7), "b": x > 0}
    sink = io.BytesIO()
    assert table.write_table(columns, sink) == 7
    path = tmp_path / "t.csv"
    table.write_table(columns, path)
    assert sink.getvalue() == path.read_bytes()
    rows = list(csv.DictReader(io.StringIO(sink.getvalue().decode("utf-8"))))
    assert [r["case"] for r in rows] == ["a,b", "'=x", "c", "", "d", "e", "f"]
    back = [float(r["x"]) if r["x"] else np.nan for r in rows]
    finite = np.isfinite(x)
    assert np.array_equal(np.array(back)[finite], x[finite]) and all(r["x"] == "" for r, f in zip(rows, finite)
                                                                      if not f)
    assert [r["k"] for r in rows] == [str(k) for k in range(7)] and [r["b"] for r in rows] == ["1", "1", "0", "0",
                                                                                              "1", "1", "1"]


def test_columns_of_one_axis_are_written_like_the_others(tmp_path):
    # a quantity of the Mach number only, of the altitude only, a constant and a full grid: each as text once
    # per distinct value where it can be, and the same digits as the cast of every cell
    shape = (3, 4)
    by_mach = np.tile(np.arange(4, dtype=np.int32), 3)
    by_alt = np.repeat(np.arange(3, dtype=np.int32), 4)
    grid = np.arange(12.0).reshape(shape) / 7.0
    cases = {"mach": np.broadcast_to(np.array([0.3, 0.5, 0.7, 0.9]), shape), "alt": np.array([[0.0], [1e3], [2e3]]),
             "const": np.float64(2.5), "grid": grid, "nan": np.full(shape, np.nan)}
    for name, values in cases.items():
        column = table._grid_column(values, shape, by_mach, by_alt)
        text = column.text(0, 12).to_pylist()
        expected = [None if not np.isfinite(v) else repr(float(v)) for v in np.broadcast_to(values, shape).ravel()]
        assert [None if t is None else float(t) for t in text] == [None if e is None else float(e) for e in expected]
        assert isinstance(column, table._Plain) == (name == "grid")
