"""Every bad rake file is refused with one clear message: file, row (line), column, value, what is allowed."""

from __future__ import annotations

import numpy as np
import pytest

from engine_air.cli import main
from engine_air.distortion import rake_file
from engine_air.distortion.rake import read_rake_set
from engine_air.project.errors import ProjectError

HEADER = "point,ring,angle_deg,total_pressure_pa"


def good_rows(point="A", rings=2, n=4, pressure=100000.0, extra=""):
    return [f"{point},{r},{k * 360 / n:g},{pressure - 1000 * (k == 0):g}{extra}"
            for r in range(1, rings + 1) for k in range(n)]


def write(tmp_path, lines, name="rakes.csv"):
    path = tmp_path / name
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def refused(tmp_path, lines, name="rakes.csv") -> ProjectError:
    path = write(tmp_path, lines, name)
    with pytest.raises(ProjectError) as info:
        read_rake_set(path)
    assert str(path) in str(info.value)
    return info.value


def test_a_good_file_reads(tmp_path):
    rows = good_rows() + good_rows("B")
    r = read_rake_set(write(tmp_path, ["# invented", HEADER] + rows))
    assert r.labels == ("A", "B") and r.groups[0].pressure_pa.shape == (2, 2, 4)


@pytest.mark.parametrize("lines, key, words", [
    (["point,ring,angle_deg"] + ["A,1,0"], "column total_pressure_pa", "missing"),
    (["point,ring,angle_deg,total_pressure"] + good_rows(), "column total_pressure",
     "did you mean total_pressure_pa"),
    ([HEADER] + good_rows()[:-1] + ["A,2,270,nan"], "line 9, column total_pressure_pa", "NaN"),
    ([HEADER] + good_rows()[:-1] + ["A,2,270,-5"], "line 9, column total_pressure_pa", "0 < total_pressure_pa"),
    ([HEADER] + good_rows()[:-1] + ["A,2,270,"], "line 9, column total_pressure_pa", "empty"),
    ([HEADER] + good_rows()[:-1] + ["A,2,270,high"], "line 9, column total_pressure_pa", "not a number"),
    ([HEADER] + good_rows()[:-1] + ["A,2,360,1e5"], "line 9, column angle_deg", "angle_deg < 360"),
    ([HEADER] + good_rows()[:-1] + ["A,2.5,270,1e5"], "line 9, column ring", "whole number"),
    ([HEADER] + good_rows()[:-1] + ["A,2,90,1e5"], "column angle_deg", "duplicate probe"),
    ([HEADER] + good_rows()[:-1] + ["A,2,260,1e5"], "column angle_deg", "equally spaced"),
    ([HEADER] + good_rows()[:4] + [r.replace("A,2,", "A,3,") for r in good_rows()[4:]], "column ring",
     "ring 2 is missing"),
    ([HEADER] + good_rows()[:4] + good_rows(rings=1, n=8)[:0] + ["A,2,0,1e5", "A,2,180,1e5", "A,2,90,1e5"],
     "column ring", "same number of probes"),
    ([HEADER] + ["A,1,0,1e5", "A,1,180,1e5"], "column ring", "3 to 360"),
    ([HEADER + ",mach"] + [r + ",0.8" for r in good_rows()[:-1]] + ["A,2,270,1e5,0.9"], "line 9, column mach",
     "constant within a point"),
    ([HEADER + ",face_mach"] + [r + ",1.2" for r in good_rows()], "line 2, column face_mach", "face_mach < 1"),
    ([HEADER] + good_rows()[:-1] + ["A,2,270"], "line 9", "has 3 fields"),
    ([HEADER], "(file)", "no probe rows"),
    (["# only a comment"], "(file)", "empty"),
    ([HEADER] + [",1,0,1e5"], "line 2, column point", "empty"),
])
def test_bad_csv_rows_are_refused_with_where_and_why(tmp_path, lines, key, words):
    err = refused(tmp_path, lines)
    assert err.key.startswith(key) or key in err.key, (err.key, str(err))
    assert words in str(err), str(err)


def test_non_utf8_csv_is_refused_clearly(tmp_path):
    path = tmp_path / "latin1.csv"
    path.write_bytes((HEADER + "\n").encode() + "Zürich,1,0,1e5\n".encode("latin-1"))
    with pytest.raises(ProjectError) as info:
        read_rake_set(path)
    assert "not UTF-8" in str(info.value) and "line 2" in str(info.value)


def test_a_file_over_the_size_limit_is_refused(tmp_path, monkeypatch):
    path = write(tmp_path, [HEADER] + good_rows())
    monkeypatch.setattr(rake_file, "MAX_RAKE_FILE_BYTES", 50)
    with pytest.raises(ProjectError) as info:
        read_rake_set(path)
    assert "at most 50 bytes" in str(info.value)


def test_a_folder_and_a_missing_file_are_refused(tmp_path):
    for path in (tmp_path, tmp_path / "nothing.csv"):
        with pytest.raises(ProjectError):
            read_rake_set(path)


def test_parquet_reads_and_its_bad_rows_name_the_row(tmp_path):
    import pyarrow as pa
    import pyarrow.parquet as pq

    cols = {"point": ["A"] * 8, "ring": [1] * 4 + [2] * 4, "angle_deg": [0.0, 90.0, 180.0, 270.0] * 2,
            "total_pressure_pa": [9e4, 1e5, 1e5, 1e5, 1e5, 1e5, 1e5, 1e5]}
    pq.write_table(pa.table(cols), tmp_path / "r.parquet")
    assert read_rake_set(tmp_path / "r.parquet").groups[0].pressure_pa.shape == (1, 2, 4)
    cols["total_pressure_pa"][5] = float("inf")
    pq.write_table(pa.table(cols), tmp_path / "bad.parquet")
    with pytest.raises(ProjectError) as info:
        read_rake_set(tmp_path / "bad.parquet")
    assert info.value.key == "row 6, column total_pressure_pa"
    (tmp_path / "broken.parquet").write_bytes(b"PAR1 not really")
    with pytest.raises(ProjectError) as info:
        read_rake_set(tmp_path / "broken.parquet")
    assert "not a readable Parquet file" in str(info.value)


def test_the_command_exits_2_with_one_line_and_no_traceback(tmp_path, capsys):
    path = write(tmp_path, [HEADER] + good_rows()[:-1] + ["A,2,270,-5"])
    assert main(["distortion", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err and "line 9, column total_pressure_pa" in err


def test_rows_in_any_order_give_the_same_descriptors(tmp_path):
    rows = good_rows(rings=3, n=8)
    a = read_rake_set(write(tmp_path, [HEADER] + rows, "a.csv"))
    b = read_rake_set(write(tmp_path, [HEADER] + rows[::-1], "b.csv"))
    assert np.array_equal(a.groups[0].pressure_pa, b.groups[0].pressure_pa)


def test_the_fast_and_the_careful_csv_paths_agree(tmp_path):
    rows = good_rows(rings=3, n=8, extra=",0.5")
    fast = read_rake_set(write(tmp_path, [HEADER + ",face_mach"] + rows, "fast.csv"))  # contiguous rows
    careful = read_rake_set(write(tmp_path, [HEADER + ",face_mach"] + rows[:5] + ["# a comment", ""] + rows[5:],
                                  "careful.csv"))
    assert fast.labels == careful.labels
    assert np.array_equal(fast.groups[0].pressure_pa, careful.groups[0].pressure_pa)
    assert np.array_equal(fast.point_columns["face_mach"], careful.point_columns["face_mach"])
