"""The one table writer: CSV or Parquet from named columns, vectorised with pyarrow.

``write_table(columns, dest, fmt="csv")`` takes an ordered mapping of column
name -> values (a numpy array of floats, ints or bools, or a sequence of texts)
or an Arrow table, and writes it to ``dest`` (a path, or a binary file object
open for writing: the caller's atomic writer may hand its temporary file):

- floats are written in the shortest text that reads back to the same double
  (the round trip is exact, as Python's ``repr``: ``2.0``, ``0.1``, ``1e-7``); a value that is not finite
  (NaN, +-inf) is an empty cell in CSV and a null in Parquet (the point's flags
  say why);
- integers and bools as whole numbers (0/1 for bools);
- a text cell that begins with ``=``, ``+``, ``-``, ``@``, a tab or a carriage
  return is neutralised for spreadsheets by a leading single quote (``'=SUM(1)``);
  numbers are never changed. Texts are quoted where needed (commas, quotes,
  line breaks).

CSV is written in batches of rows by ``engine_air.outputs.csv_lines`` (no Python code per row or per cell, the
text of the whole table never in memory at once): floats by orjson, a column with few distinct values (an axis of
the grid, a quantity of the altitude or the Mach number only, a constant, a text column) turned into text once per
distinct value and taken.

``point_table(result)`` builds the columns of ``engine-air map`` (and of the
program's CSV export) from an ``engine_air.envelope.evaluate.MapResult``: ``case``,
``inside_envelope``, the historic quantities (``HISTORIC_TABLE_KEYS``), ``regime``,
``limiting`` (the limiting check's name), ``holds`` (1/0; every check at the point
holds, as computed, inside or outside the envelope), ``flags``, ``judged`` (1 where
the point is judged: inside the envelope with some check applying; read ``holds``
only there), then the quantities added since (e.g. ``worst_relative_margin``), all
from ``engine_air.outputs.quantities``. ``write_point_table(result, dest)`` writes
the same columns case by case and batch by batch without building that table.
"""

from __future__ import annotations

import csv
import io
from contextlib import contextmanager
from pathlib import Path
from typing import Iterable, Mapping, Sequence

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from engine_air.outputs import csv_lines as L

FORMULA_LEADS = ("=", "+", "-", "@", "\t", "\r")
"""First characters a spreadsheet may take as the start of a formula."""

BATCH_ROWS = L.BATCH_ROWS


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
    if isinstance(values, pa.ChunkedArray):  # one chunk (a table's usual column) taken as it is: no copy
        values = values.chunk(0) if values.num_chunks == 1 else values.combine_chunks()
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


# -- CSV text, batch by batch -----------------------------------------------------------------------------------------

def _csv_quote(text: str) -> str:
    if any(ch in text for ch in ',"\n\r'):
        return '"' + text.replace('"', '""') + '"'
    return text


_pool, _numbers, _strings, _number_text = L.pool, L.numbers, L.strings, L.number_texts
_Coded, _Plain = L.Coded, L.Plain


def _coded_text(texts: Sequence[str | None], codes) -> _Coded:
    """Texts (neutralised and quoted once) with codes into them."""
    return _Coded(_strings([None if t is None else _csv_quote(neutralise(str(t))) for t in texts]), np.asarray(codes))


def _column(values) -> _Coded | _Plain:
    """One column of ``write_table``'s input, ready to be turned into text batch by batch."""
    if isinstance(values, pa.ChunkedArray):  # one chunk (a table's usual column) taken as it is: no copy
        values = values.chunk(0) if values.num_chunks == 1 else values.combine_chunks()
    if isinstance(values, pa.DictionaryArray):
        texts = values.dictionary.cast(pa.string()).to_pylist()  # an Arrow input: pandas is no matter then
        codes = pc.fill_null(values.indices, len(texts)).to_numpy(zero_copy_only=False)
        return _coded_text(texts + [None], codes)
    if isinstance(values, pa.Array):
        if pa.types.is_string(values.type) or pa.types.is_large_string(values.type):
            return _column(values.dictionary_encode())
        few = _few(values)
        if few is not None:
            return few
        if pa.types.is_floating(values.type):  # nulls read as NaN: empty cells either way
            return _Plain(values.to_numpy(zero_copy_only=False).astype(np.float64, copy=False))
        return _Plain(values)
    if isinstance(values, np.ndarray) and values.dtype.kind in "fiub":
        return _Plain(values.ravel())
    texts = [None if v is None else str(v) for v in (values.ravel().tolist() if isinstance(values, np.ndarray)
                                                      else values)]
    unique = sorted(set(t for t in texts if t is not None))
    index = {t: k for k, t in enumerate(unique)}
    return _coded_text(unique + [None], [index.get(t, len(unique)) for t in texts])


def _few(values: pa.Array) -> _Coded | None:
    """An Arrow column of numbers with few distinct values (an axis, a quantity of one axis, a constant: a sample
    of every n-th value repeats) as the texts of its distinct values and codes; None otherwise."""
    n = len(values)
    if n <= 4096:
        return None
    sample = pc.take(values, _numbers(np.arange(0, n, max(1, n // 1024))))
    if len(pc.unique(sample)) >= 0.5 * len(sample):
        return None
    enc = values.dictionary_encode()
    codes = pc.fill_null(enc.indices, len(enc.dictionary)).to_numpy(zero_copy_only=False)
    texts = pa.concat_arrays([_number_text(enc.dictionary), _strings([None])])
    return _Coded(texts, codes)


@contextmanager
def _binary_sink(dest):
    """``dest`` as a binary file: a path is opened (and closed) here, a file object is used as it is."""
    if hasattr(dest, "write"):
        yield dest
    else:
        with open(Path(dest), "wb") as fh:
            yield fh


def write_csv_batches(names: Sequence[str], parts: Iterable[tuple[int, list]], dest,
                      batch_rows: int | None = None) -> int:
    """CSV of ``names`` from ``parts``: (rows, columns ready for ``text(a, b)``) each; returns the rows written
    (``engine_air.outputs.csv_lines.write_lines``: batch after batch of rows)."""
    head = io.StringIO()
    csv.writer(head, lineterminator="\n").writerow([neutralise(n) for n in names])
    with _binary_sink(dest) as fh:
        fh.write(head.getvalue()[:-1].encode("utf-8"))  # each line starts with its line feed
        rows = L.write_lines(fh, parts, batch_rows)
        fh.write(b"\n")
        return rows


class Streamed:
    """A table given part by part (``write_point_table``): column ``names`` and ``parts``, an iterable of
    (rows, columns ready for ``text(a, b)``)."""

    def __init__(self, names: Sequence[str], parts: Iterable[tuple[int, list]]):
        self.names, self.parts = list(names), parts


def write_csv(table, dest) -> int:
    """``table`` (an Arrow table, a mapping of name -> values or a ``Streamed`` table) as CSV to ``dest`` (a path
    or a binary file): a header, then one line per row, cells joined by commas, nulls and non-finite numbers as
    empty cells. Returns the number of rows."""
    if isinstance(table, Streamed):
        return write_csv_batches(table.names, table.parts, dest)
    columns = dict(zip(table.column_names, table.columns)) if isinstance(table, pa.Table) else dict(table)
    n = len(next(iter(columns.values()))) if columns else 0
    return write_csv_batches(list(columns), [(n, _columns(list(columns.values())))], dest, L.TABLE_BATCH_ROWS)


def _columns(values: list) -> list:
    """``_column`` of each input column, an Arrow table's on two threads (its dictionary encodings and copies
    release the interpreter's lock)."""
    if not any(isinstance(v, (pa.Array, pa.ChunkedArray)) for v in values):
        return [_column(v) for v in values]
    from concurrent.futures import ThreadPoolExecutor

    with ThreadPoolExecutor(2, thread_name_prefix="csv-columns") as pool:
        return list(pool.map(_column, values))


@contextmanager
def _output(dest, inputs):
    """Where to write: a binary file object as it is, a path through the one output writer
    (``engine_air.outputs.writer.output_path``: never an input, a temporary file renamed over it when complete)."""
    if hasattr(dest, "write"):
        yield dest
        return
    from engine_air.outputs.writer import output_path

    with output_path(str(Path(dest)), inputs) as tmp:
        yield tmp


def write_table(columns: Mapping[str, object] | pa.Table, dest, fmt: str = "csv", inputs=()) -> int:
    """Write ``columns`` to ``dest`` as CSV (``fmt="csv"``) or Parquet (``"parquet"``); returns the number of rows.

    ``dest`` is a binary file object, or a path written through the one output writer
    (``engine_air.outputs.writer.output_path``): ``OutputIsInputError`` when ``path`` is one of ``inputs`` (links
    followed); the table goes to a temporary file renamed over ``path`` when complete, so a failed write (a full
    disk) leaves the old file as it was and no partial file.
    """
    if fmt not in ("csv", "parquet"):
        raise ValueError(f"unknown table format {fmt!r}: csv or parquet")
    with _output(dest, inputs) as target:
        if fmt == "csv":
            return write_csv(columns, target)
        import pyarrow.parquet as pq

        table = columns if isinstance(columns, pa.Table) else to_arrow(columns)
        pq.write_table(table, target)
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


def _grid_column(values, shape: tuple[int, int], by_mach: np.ndarray, by_alt: np.ndarray) -> _Coded | _Plain:
    """A float quantity over the (altitude, Mach) grid of one case: texts of its distinct values once where it
    depends on one axis only (or on neither; ``by_mach``, ``by_alt``: each row's code into the axis), else turned
    into text batch by batch."""
    v = np.asarray(values, dtype=float)
    if v.ndim == 1 and v.size == shape[0] * shape[1]:
        v = v.reshape(shape)
    full = np.broadcast_to(v, shape)
    if v.shape == shape:  # the first and last rows (columns) compared first: most quantities differ there
        mach_only = shape[0] == 1 or (np.array_equal(v[-1], v[0], equal_nan=True)
                                      and np.array_equal(v, np.broadcast_to(v[:1], shape), equal_nan=True))
        alt_only = not mach_only and (np.array_equal(v[:, -1], v[:, 0], equal_nan=True)
                                      and np.array_equal(v, np.broadcast_to(v[:, :1], shape), equal_nan=True))
    else:  # stored on one axis: (n_mach,), (1, n_mach), a scalar, or (n_alt, 1)
        mach_only = v.ndim < 2 or v.shape[0] == 1
        alt_only = not mach_only
    if mach_only:
        return _Coded(L.float_texts(full[0]), by_mach)
    if alt_only:
        return _Coded(L.float_texts(full[:, 0]), by_alt)
    return _Plain(np.ascontiguousarray(v.ravel()))


def _grid(values, shape) -> np.ndarray:
    """``values`` over the (altitude, Mach) grid: reshaped when stored flat, else broadcast (a view)."""
    a = np.asarray(values)
    return a.reshape(shape) if a.ndim == 1 and a.size == shape[0] * shape[1] else np.broadcast_to(a, shape)


def _codes(values, shape) -> np.ndarray:
    """Integer codes (< 0: none) as indices into a list with the empty text first."""
    c = _grid(values, shape).ravel()
    return np.where(c < 0, 0, c + 1)


PART_POINTS = 65_536
"""About the most grid points of one case whose columns are made at once (whole altitude rows)."""


def _row_parts(shape: tuple[int, int]) -> list[slice]:
    """The altitude rows of a grid in parts of about ``PART_POINTS`` points each."""
    per = max(1, PART_POINTS // max(1, shape[1]))
    return [slice(a, min(shape[0], a + per)) for a in range(0, shape[0], per)]


def _point_columns(result, cm, keys: Sequence[str], rows: slice | None = None) -> dict[str, _Coded | _Plain]:
    """The columns of ``point_table`` for one case (its altitude ``rows`` only, when given), ready to be turned
    into text batch by batch."""
    from engine_air.envelope import flags as F
    from engine_air.flow.match import REGIMES
    from engine_air.outputs.quantities import REGISTRY

    whole = np.asarray(result.inside, dtype=bool)
    part = rows is not None and (rows.start, rows.stop) != (0, whole.shape[0])
    shape = whole[rows].shape if part else whole.shape
    inside = (whole[rows] if part else whole).ravel()
    pts = cm.points.at((rows,)) if part else cm.points
    n = inside.size
    fails = np.zeros(n, bool)
    for c in pts.checks:
        fails |= _grid(np.asarray(c.fails, dtype=bool), shape).ravel()
    limiting = _grid(pts.limiting if pts.limiting is not None else -1, shape).ravel()
    by_mach = np.tile(np.arange(shape[1], dtype=np.int32), shape[0])  # each row's code into an axis, shared
    by_alt = np.repeat(np.arange(shape[0], dtype=np.int32), shape[1])
    judged = inside & (limiting >= 0)
    if hasattr(pts, "judged"):  # inside the case's region too
        judged &= _grid(pts.judged, shape).ravel()
    bits, bit_codes = np.unique(_grid(pts.flags, shape).ravel(), return_inverse=True)
    zero_one = ["0", "1"]
    cols = {
        "case": _coded_text([cm.name], np.zeros(n)),
        "inside_envelope": _coded_text(zero_one, inside),
        "regime": _coded_text(["", *REGIMES], _codes(pts.regime, shape)),
        "limiting": _coded_text(["", *(c.name for c in pts.checks)], _codes(limiting, shape)),
        "holds": _coded_text(zero_one, ~fails),
        "flags": _coded_text([";".join(F.names_of(int(b))) for b in bits], bit_codes.ravel()),
        "judged": _coded_text(zero_one, judged),
    }
    first = [k for k in keys if k in _HEAVY]  # its temporaries before the other columns are held, not on top
    for k in first + [k for k in keys if k not in _HEAVY]:
        cols[k] = _grid_column(REGISTRY[k].values(pts), shape, by_mach, by_alt)
    return cols


_HEAVY = ("worst_relative_margin",)
"""Quantities whose making holds several grid arrays at once (every check's margin, ranked)."""


def write_point_table(result, dest, fmt: str = "csv", inputs=()) -> int:
    """``point_table(result)`` written to ``dest`` (a path through the one output writer, or a binary file) as CSV
    or Parquet; returns the number of rows. CSV is written case by case and batch by batch, without the whole
    table in memory. ``result`` may be an iterable of ``MapResult`` (CSV only): each is written and let go before
    the next is made (``engine-air map --csv`` evaluates one case at a time)."""
    if fmt != "csv":
        return write_table(point_table(result), dest, fmt, inputs)
    from engine_air.outputs.quantities import TABLE_KEYS

    order = point_table_columns(TABLE_KEYS)
    results = [result] if hasattr(result, "cases") else result

    def parts():
        for r in results:
            for k in range(len(r.cases)):
                for rows in _row_parts(np.shape(r.inside)):
                    cols = _point_columns(r, r.cases[k], TABLE_KEYS, rows)
                    n = int(np.size(r.inside[rows]))
                    yield n, [cols.pop(name) for name in order]  # one part of one case's columns at a time
            del r  # no reference left to a result once its rows are written
    with _output(dest, inputs) as target:
        return write_csv(Streamed(order, parts()), target)


__all__ = ["BATCH_ROWS", "FORMULA_LEADS", "Streamed", "coded_text", "flag_text", "neutralise", "point_table",
           "point_table_columns", "to_arrow", "write_csv", "write_csv_batches", "write_point_table", "write_table"]
