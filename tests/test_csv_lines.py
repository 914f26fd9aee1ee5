"""The CSV text of the one table writer against Python's own ``csv`` reader (RFC 4180) and ``float``.

Every kind of column the writer treats apart is here, across batch boundaries: a float column first (never in a
block), neighbouring float columns (one orjson block, with NaN and infinities as empty cells), columns of few
values side by side (merged when they share their codes or their combinations stay few), integers, texts with
commas, quotes and formula leads, and a table of no rows.
"""

import csv

import numpy as np
import pytest

from engine_air.outputs import batch_writer, csv_lines
from engine_air.outputs.table import write_table


def _read(path):
    with open(path, newline="", encoding="utf-8") as fh:
        return list(csv.reader(fh))


def _table(n, rng):
    full = rng.normal(size=(3, n)) * np.exp(rng.normal(scale=20, size=(3, n)))  # tiny to huge magnitudes
    full[0, ::7] = np.nan
    full[1, ::11] = np.inf
    full[2, ::13] = -np.inf
    return {
        "first": rng.random(n),
        "a": full[0], "b": full[1], "c": full[2],
        "mach_like": np.tile(np.linspace(0.2, 2.2, 41), n // 41 + 1)[:n],  # few values, same codes as the next
        "mach_too": np.tile(np.linspace(0.2, 2.2, 41) ** 2, n // 41 + 1)[:n],
        "zero_one": (np.arange(n) % 3 == 0),
        "label": [("=1+1", "plain", 'say "a,b"', "x\ny")[k % 4] for k in range(n)],
        "count": np.arange(n, dtype=np.int64) - 5,
        "last": rng.random(n) * 1e-300,
    }


@pytest.mark.parametrize("n", [1, 5, csv_lines.BATCH_ROWS + 1, 2 * csv_lines.BATCH_ROWS + 4_103])
def test_every_cell_reads_back_exactly(tmp_path, n):
    rng = np.random.default_rng(n)
    cols = _table(n, rng)
    out = tmp_path / "t.csv"
    assert write_table(cols, out) == n
    rows = _read(out)
    assert rows[0] == list(cols) and len(rows) == n + 1
    body = np.array(rows[1:], dtype=object)
    for k, (name, values) in enumerate(cols.items()):
        got = body[:, k]
        if name == "label":  # formula leads neutralised with a quote (common practice), the rest as written
            assert list(got) == ["'" + v if v[:1] == "=" else v for v in values]
        elif name == "zero_one":
            assert list(got) == ["1" if v else "0" for v in values]
        elif name == "count":
            assert list(got) == [str(v) for v in values]
        else:
            finite = np.isfinite(values)
            assert all(g == "" for g in got[~finite])  # not finite: an empty cell
            back = np.array([float(g) for g in got[finite]])
            assert np.array_equal(back.view(np.uint64), values[finite].view(np.uint64))  # the same bits


def test_floats_are_the_shortest_round_trip_text(tmp_path):
    values = [0.1, 2.0, -0.0, 1e-7, 1e21, 5e-324, 1.7976931348623157e308, 1 / 3]
    out = tmp_path / "t.csv"
    write_table({"k": np.arange(len(values)), "v": np.array(values)}, out)
    got = [r[1] for r in _read(out)[1:]]
    # Python's repr is the shortest text that reads back to the same double (Python docs, "Floating-point
    # arithmetic"); orjson writes the same digits, its exponent unpadded
    assert [float(g) for g in got] == [float(repr(v)) for v in values]
    assert [len(g.replace("e+", "e").replace("e-0", "e-")) for g in got] == \
           [len(repr(v).replace("e+", "e").replace("e-0", "e-")) for v in values]


def test_a_table_of_no_rows_is_its_header(tmp_path):
    out = tmp_path / "t.csv"
    assert write_table({"x": np.zeros(0), "y": np.zeros(0)}, out) == 0
    assert out.read_bytes() == b"x,y\n"


def test_neighbouring_coded_columns_are_merged_only_while_few():
    n = 20_000
    shared = np.arange(n, dtype=np.int32) % 50
    few = csv_lines.Coded(csv_lines.strings([str(k) for k in range(50)]), shared)
    same = csv_lines.Coded(csv_lines.strings([f"s{k}" for k in range(50)]), shared)
    two = csv_lines.Coded(csv_lines.strings(["0", "1"]), np.arange(n) % 2)
    many = csv_lines.Coded(csv_lines.strings([str(k) for k in range(5_000)]), np.arange(n) % 5_000)
    prepared = csv_lines.prepared([few, same, two, many])
    assert len(prepared) == 2  # few+same share codes, then x two (100 combinations); many stays apart
    text = csv_lines.lines(prepared, 0, 3).to_pylist()
    assert text == ["\n0,s0,0,0", "\n1,s1,1,1", "\n2,s2,0,2"]


@pytest.mark.parametrize("sample", ["supersonic_two_ramp.toml", "variable_geometry_fighter.toml",
                                    "mixed_compression_throat_schedule.toml", "undersized_business_jet.toml",
                                    "supersonic_spike_nacelle.toml", "subsonic_transport_nacelle.toml",
                                    "tunnel_data/two_ramp_with_tunnel_data.toml"])
def test_a_map_written_in_parts_of_rows_is_the_map_written_whole(tmp_path, monkeypatch, sample):
    # map --csv makes one case's columns for a few altitude rows at a time (the memory of a part, not of a case):
    # the bytes must be those of the columns made for the whole case at once
    from pathlib import Path

    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.outputs import table
    from engine_air.project import load_project

    result = evaluate_project(load_project(Path(__file__).parent.parent / "sample_projects" / sample))
    monkeypatch.setattr(table, "PART_POINTS", 10 ** 9)
    table.write_point_table(result, tmp_path / "whole.csv")
    monkeypatch.setattr(table, "PART_POINTS", 3 * len(result.mach) + 1)  # three rows a part, the last one shorter
    assert len(table._row_parts(result.inside.shape)) > 3
    table.write_point_table(result, tmp_path / "parts.csv")
    assert (tmp_path / "parts.csv").read_bytes() == (tmp_path / "whole.csv").read_bytes()


# The writer thread (batch_writer.BatchWriter): the lines of each batch are joined and written by a second thread while
# the next batch's floats are formatted. What it writes must be what one thread would write, in order, and a
# failure on it must reach the caller, with the old file kept (the one output writer renames only a whole file).

def _many(n=3 * csv_lines.TABLE_BATCH_ROWS + 17):
    return _table(n, np.random.default_rng(5))


def test_disk_write_back_gives_the_same_bytes(tmp_path, monkeypatch):
    # the system is asked to start writing every few MB (posix_fadvise); here after every batch
    cols = _many()
    write_table(cols, tmp_path / "plain.csv")
    monkeypatch.setattr(batch_writer, "WRITE_BACK", 1)
    write_table(cols, tmp_path / "early.csv")
    assert (tmp_path / "early.csv").read_bytes() == (tmp_path / "plain.csv").read_bytes()


def test_a_failed_write_reaches_the_caller_and_keeps_the_old_file(tmp_path, monkeypatch):
    import errno

    out = tmp_path / "t.csv"
    out.write_text("old\n")
    calls = []

    def fail_on_third(fh, text):
        calls.append(len(text))
        if len(calls) == 3:
            raise OSError(errno.ENOSPC, "No space left on device")
        return real(fh, text)

    real = batch_writer.write_text
    monkeypatch.setattr(batch_writer, "write_text", fail_on_third)
    with pytest.raises(OSError) as caught:
        write_table(_many(), out)
    assert caught.value.errno == errno.ENOSPC
    assert len(calls) == 3  # the batches after the failure are dropped, not written
    assert out.read_text() == "old\n"
    assert [p.name for p in tmp_path.iterdir()] == ["t.csv"]  # no temporary file left


def test_a_pipe_takes_the_same_text(tmp_path):
    # not a regular file: no write-back asked, the text as to a file
    import os
    import threading

    cols = _many()
    write_table(cols, tmp_path / "file.csv")
    r, w = os.pipe()
    got = []
    reader = threading.Thread(target=lambda: got.append(os.fdopen(r, "rb").read()))
    reader.start()
    with os.fdopen(w, "wb") as sink:
        write_table(cols, sink)
    reader.join()
    assert got[0] == (tmp_path / "file.csv").read_bytes()
