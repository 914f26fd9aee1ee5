"""The one table writer: CSV or Parquet from named columns, vectorised with pyarrow.

``write_table(columns, path, fmt="csv")`` takes an ordered mapping of column
name -> values (a numpy array of floats, ints or bools, or a sequence of texts)
and writes every row at once:

- floats are written in the shortest text that reads back to the same double
  (the round trip is exact, as Python's ``repr``); a value that is not finite
  (NaN, +-inf) is an empty cell in CSV and a null in Parquet (the point's flags
  say why);
- integers and bools as whole numbers (0/1 for bools);
- a text cell that begins with ``=``, ``+``, ``-``, ``@``, a tab or a carriage
  return is neutralised for spreadsheets by a leading single quote (``'=SUM(1)``);
  numbers are never changed. Texts are quoted where needed (commas, quotes,
  line breaks).

``point_table(result)`` builds the columns of ``engine-air map`` (and of the
program's CSV export) from an ``engine_air.envelope.evaluate.MapResult``: ``case``,
``inside_envelope``, the historic quantities (``HISTORIC_TABLE_KEYS``), ``regime``,
``limiting`` (the limiting check's name), ``holds`` (1/0; every check at the point
holds, as computed, inside or outside the envelope), ``flags``, ``judged`` (1 where
the point is judged: inside the envelope with some check applying; read ``holds``
only there), then the quantities added since (e.g. ``worst_relative_margin``), all
from ``engine_air.outputs.quantities``.
"""

from __future__ import annotations

from pathlib import Path
from typing import Mapping, Sequence

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

FORMULA_LEADS = ("=", "+", "-", "@", "\t", "\r")
"""First characters a spreadsheet may take as the start of a formula."""


def neutralise(text: str) -> str:
    """``text`` with a leading single quote when it begins like a spreadsheet formula."""
    return "'" + text if text[:1] in FORMULA_LEADS else text


def _text_array(values) -> pa.Array:
    arr = values if isinstance(values, (pa.Array, pa.ChunkedArray)) else pa.array(
        [None if v is None else str(v) for v in values], type=pa.string())
    if isinstance(arr, pa.ChunkedArray):
        arr = arr.combine_chunks()
    if arr.type != pa.string():
        arr = arr.cast(pa.string())
    lead = pc.utf8_slice_codeunits(arr, 0, 1)
    risky = pc.is_in(lead, value_set=pa.array(FORMULA_LEADS))
    risky = pc.fill_null(risky, False)
    return pc.if_else(risky, pc.binary_join_element_wise(pa.scalar("'"), arr, ""), arr)


def _array(values) -> pa.Array:
    if isinstance(values, pa.ChunkedArray):
        values = values.combine_chunks()
    if isinstance(values, pa.DictionaryArray):
        return pa.DictionaryArray.from_arrays(values.indices, _text_array(values.dictionary.cast(pa.string())))
    if isinstance(values, pa.Array) and pa.types.is_string(values.type):
        return _text_array(values)
    if isinstance(values, np.ndarray):
        if values.dtype.kind == "f":
            v = np.ascontiguousarray(values.ravel(), dtype=np.float64)
            return pa.array(v, mask=~np.isfinite(v))
        if values.dtype.kind == "b":
            return pa.array(values.ravel().astype(np.int8))
        if values.dtype.kind in "iu":
            return pa.array(values.ravel())
        return _text_array(values.ravel().tolist())
    if isinstance(values, (pa.Array, pa.ChunkedArray)):
        return values
    return _text_array(values)


def to_arrow(columns: Mapping[str, object]) -> pa.Table:
    """The columns as an Arrow table (floats not finite become nulls, texts neutralised)."""
    return pa.table({name: _array(values) for name, values in columns.items()})


def _csv_quote(text: str) -> str:
    if any(ch in text for ch in ',"\n\r'):
        return '"' + text.replace('"', '""') + '"'
    return text


def _column_csv_text(arr) -> tuple[pa.Array, bool]:
    """One column as CSV cell texts (nulls stay null: empty cells) and whether a cell needs quoting.

    Numbers are cast by Arrow to their shortest round-trip text; a column with
    few distinct values (an axis, a free-stream quantity that depends on the
    altitude only, a text column) is cast once per distinct value and taken.
    """
    if isinstance(arr, pa.ChunkedArray):
        arr = arr.combine_chunks()
    text = pa.types.is_string(arr.type) or pa.types.is_large_string(arr.type) or (
        pa.types.is_dictionary(arr.type) and pa.types.is_string(arr.type.value_type))
    n = len(arr)
    if text:
        enc = arr if pa.types.is_dictionary(arr.type) else arr.dictionary_encode()
        values = enc.dictionary.to_pylist()
        needs = any(v is not None and any(ch in v for ch in ',"\n\r') for v in values)
        if needs:  # quoted here; written by the caller's own join, never by Arrow's unquoted writer
            quoted = pa.array([None if v is None else _csv_quote(v) for v in values], type=pa.string())
            return pc.take(quoted, enc.indices), True
        return pc.take(enc.dictionary, enc.indices), False
    few = False
    if n > 4096:
        step = max(1, n // 1024)
        sample = pc.take(arr, pa.array(np.arange(0, n, step)))
        few = len(pc.unique(sample)) < 0.9 * len(sample)
    if few:
        enc = arr.dictionary_encode()
        return pc.take(pc.cast(enc.dictionary, pa.string()), enc.indices), False
    return pc.cast(arr, pa.string()), False


def write_csv(table: pa.Table, path) -> None:
    """``table`` as CSV: a header, then one line per row, cells joined by commas, nulls as empty cells.

    The columns are turned into text in parallel threads (Arrow releases the
    interpreter lock) and written by Arrow's CSV writer, so no Python code runs
    per row or per cell. Text cells are quoted where needed (a comma, a quote, a
    line break); numbers never are.
    """
    import csv
    import io
    import os
    from concurrent.futures import ThreadPoolExecutor

    import pyarrow.csv as pacsv

    head = io.StringIO()
    csv.writer(head, lineterminator="\n").writerow([neutralise(n) for n in table.column_names])
    columns = [table.column(k) for k in range(table.num_columns)]
    workers = max(1, min(len(columns), os.cpu_count() or 1))
    if workers > 1 and table.num_rows > 10_000:
        with ThreadPoolExecutor(workers) as ex:
            texts = list(ex.map(_column_csv_text, columns))
    else:
        texts = [_column_csv_text(c) for c in columns]
    with pa.OSFile(str(path), "wb") as fh:
        fh.write(head.getvalue().encode("utf-8"))
        if not table.num_columns:
            return
        quoted = [k for k, (_, needs) in enumerate(texts) if needs]
        if not quoted:
            strings = pa.table([t for t, _ in texts], names=[f"c{k}" for k in range(len(texts))])
            pacsv.write_csv(strings, fh, pacsv.WriteOptions(include_header=False, quoting_style="none"))
        elif quoted[-1] == len(quoted) - 1 < len(texts) - 1:
            # quoted text only in leading columns (e.g. case names with commas): the rest is written unquoted
            # by Arrow, split into lines without a copy, and each line joined behind its leading cells
            rest = pa.table([t for t, _ in texts[len(quoted):]], names=[f"c{k}" for k in range(len(texts) -
                                                                                             len(quoted))])
            sink = pa.BufferOutputStream()
            pacsv.write_csv(rest, sink, pacsv.WriteOptions(include_header=False, quoting_style="none"))
            buf = sink.getvalue()
            # line lengths from the cells' lengths: cells, a comma between them, a line end
            length = np.full(rest.num_rows, rest.num_columns, dtype=np.int64)
            for col in rest.columns:
                length += np.asarray(pc.fill_null(pc.binary_length(col), 0), dtype=np.int64)
            ends = np.cumsum(length)
            if ends.size and ends[-1] != buf.size:  # pragma: no cover - Arrow's writer changed its layout
                ends = np.flatnonzero(np.frombuffer(buf, dtype=np.uint8) == 10) + 1
            offsets = np.concatenate([[0], ends]).astype(np.int64)
            lines = pa.LargeStringArray.from_buffers(len(ends), pa.py_buffer(offsets), buf)
            lead = [pc.fill_null(texts[k][0], "").cast(pa.large_string()) for k in quoted]
            joined = pc.binary_join_element_wise(*lead, lines, pa.scalar(",", pa.large_string()))
            offs = np.frombuffer(joined.buffers()[1], dtype=np.int64)
            data = joined.buffers()[2]
            fh.write(data[int(offs[joined.offset]):int(offs[joined.offset + len(joined)])])
        else:
            # quoted text elsewhere: Arrow quotes every text cell and no number
            pacsv.write_csv(table, fh, pacsv.WriteOptions(include_header=False, quoting_style="needed"))


def write_table(columns: Mapping[str, object] | pa.Table, path, fmt: str = "csv", inputs=()) -> int:
    """Write ``columns`` to ``path`` as CSV (``fmt="csv"``) or Parquet (``"parquet"``); returns the number of rows.

    Through the one output writer (``engine_air.outputs.writer.output_path``): ``OutputIsInputError`` when
    ``path`` is one of ``inputs`` (links followed); the table goes to a temporary file renamed over ``path`` when
    complete, so a failed write (a full disk) leaves the old file as it was and no partial file.
    """
    from engine_air.outputs.writer import output_path

    if fmt not in ("csv", "parquet"):
        raise ValueError(f"unknown table format {fmt!r}: csv or parquet")
    table = columns if isinstance(columns, pa.Table) else to_arrow(columns)
    with output_path(str(Path(path)), inputs) as tmp:
        if fmt == "csv":
            write_csv(table, tmp)
        else:
            import pyarrow.parquet as pq

            pq.write_table(table, tmp)
    return table.num_rows


def coded_text(codes: np.ndarray, names: Sequence[str], missing: str = "") -> pa.Array:
    """Texts from integer ``codes`` into ``names`` (a code < 0 gives ``missing``), without a loop over rows."""
    codes = np.asarray(codes).ravel().astype(np.int32)
    dictionary = pa.array([missing, *names], type=pa.string())
    return pa.DictionaryArray.from_arrays(pa.array(np.where(codes < 0, 0, codes + 1).astype(np.int32)), dictionary)


def flag_text(bits: np.ndarray) -> pa.Array:
    """``;``-joined flag names of every point's bits (one name list per distinct value, not per point)."""
    from engine_air.envelope import flags as F

    bits = np.asarray(bits).ravel()
    unique, inverse = np.unique(bits, return_inverse=True)
    names = [";".join(F.names_of(int(b))) for b in unique]
    return pa.DictionaryArray.from_arrays(pa.array(inverse.ravel().astype(np.int32)), pa.array(names, type=pa.string()))


def point_table_columns(keys: Sequence[str] | None = None) -> list[str]:
    """The column names of ``point_table`` (header of ``map --csv`` and of the program's CSV export)."""
    from engine_air.outputs.quantities import HISTORIC_TABLE_KEYS, TABLE_KEYS

    keys = TABLE_KEYS if keys is None else tuple(keys)
    first = [k for k in keys if k in HISTORIC_TABLE_KEYS]
    later = [k for k in keys if k not in HISTORIC_TABLE_KEYS]
    return ["case", "inside_envelope", *first, "regime", "limiting", "holds", "flags", "judged", *later]


def point_table(result, keys: Sequence[str] | None = None) -> pa.Table:
    """Every grid point of every case of a ``MapResult`` as an Arrow table (see the module text)."""
    from engine_air.flow.match import REGIMES
    from engine_air.outputs.quantities import REGISTRY, TABLE_KEYS

    keys = TABLE_KEYS if keys is None else tuple(keys)
    order = point_table_columns(keys)
    inside = np.asarray(result.inside, dtype=bool).ravel()
    parts = []
    for cm in result.cases:
        pts = cm.points
        n = inside.size
        cols: dict[str, object] = {
            "case": pa.DictionaryArray.from_arrays(pa.array(np.zeros(n, dtype=np.int32)),
                                                   pa.array([cm.name], type=pa.string())),
            "inside_envelope": inside.astype(np.int8),
        }
        for k in keys:
            cols[k] = np.broadcast_to(REGISTRY[k].values(pts), result.inside.shape).astype(float).ravel()
        fails = np.zeros(n, bool)
        for c in pts.checks:
            fails |= np.asarray(c.fails, dtype=bool).ravel()
        limiting = pts.limiting if pts.limiting is not None else np.full(n, -1)
        cols["regime"] = coded_text(np.asarray(pts.regime), REGIMES)
        cols["limiting"] = coded_text(np.asarray(limiting), [c.name for c in pts.checks])
        cols["holds"] = (~fails).astype(np.int8)
        judged = inside & (np.asarray(limiting).ravel() >= 0)
        if hasattr(pts, "judged"):  # inside the case's region too
            judged &= np.broadcast_to(pts.judged, result.inside.shape).ravel()
        cols["judged"] = judged.astype(np.int8)
        cols["flags"] = flag_text(pts.flags)
        parts.append(to_arrow({name: cols[name] for name in order}))
    if not parts:
        empty = {"case": [], "inside_envelope": np.zeros(0, np.int8), **{k: np.zeros(0) for k in keys},
                 "regime": [], "limiting": [], "holds": np.zeros(0, np.int8), "flags": [],
                 "judged": np.zeros(0, np.int8)}
        return to_arrow({name: empty[name] for name in order})
    return pa.concat_tables(parts)


def write_point_table(result, path, fmt: str = "csv", inputs=()) -> int:
    """``point_table(result)`` written to ``path`` as CSV or Parquet (``write_table``); returns the number of rows."""
    return write_table(point_table(result), path, fmt, inputs)


__all__ = ["FORMULA_LEADS", "coded_text", "flag_text", "neutralise", "point_table", "point_table_columns", "to_arrow",
           "write_csv", "write_point_table", "write_table"]
