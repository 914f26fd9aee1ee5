"""Reading a rake file (CSV or Parquet) into columns, before any rule about rakes is checked.

CSV: UTF-8 text (a byte-order mark is allowed), a header row of column names, one row per probe; blank
lines and lines starting with ``#`` (comments) are skipped. Parquet: read with ``pyarrow`` (imported here
only when a Parquet file is read). A file over ``MAX_RAKE_FILE_BYTES`` or of more than ``MAX_RAKE_ROWS``
rows is refused. Every problem raises ``ProjectError`` naming the file, the row (CSV: its line number,
Parquet: its row number counted from 1), the column, the value and what is allowed.
"""

from __future__ import annotations

import csv
import os
from dataclasses import dataclass

import numpy as np

from engine_air.project.bounded_read import read_regular_file, utf8_text
from engine_air.project.errors import ProjectError

MAX_RAKE_FILE_BYTES = 256 * 1_048_576
"""Largest rake file accepted, bytes (256 MiB: about four million probes of CSV)."""
MAX_RAKE_ROWS = 4_000_000
"""Most probe rows in one rake file (100 000 points of 40 probes)."""
PARQUET_MAGIC = b"PAR1"


@dataclass(frozen=True)
class RawColumns:
    """The columns of a rake file: the numeric columns as float64, every other column as str objects."""

    path: str
    columns: dict[str, np.ndarray]
    row_numbers: np.ndarray  # CSV: the line of each row; Parquet: row number from 1
    row_word: str  # "line" or "row"

    @property
    def rows(self) -> int:
        return len(self.row_numbers)

    def where(self, index: int, column: str) -> str:
        """The key of a message: ``line 7, column total_pressure_pa``."""
        return f"{self.row_word} {int(self.row_numbers[index])}, column {column}"




def _open_bytes(path: str) -> bytes:
    return read_regular_file(path, MAX_RAKE_FILE_BYTES, "rake file", f"rake files may be at most "
                             f"{MAX_RAKE_FILE_BYTES} bytes ({MAX_RAKE_FILE_BYTES // 1_048_576} MiB)")


def _numbers(path: str, texts: list[str], column: str, where) -> np.ndarray:
    """Text cells to float64; the first cell that is not a number is named in the error."""
    try:
        return np.asarray(texts, dtype=float)
    except ValueError:
        pass
    for k, text in enumerate(texts):
        try:
            float(text)
        except ValueError:
            shown = text if text.strip() else None
            what = "is empty" if shown is None else "is not a number"
            raise ProjectError(path, where(k, column), shown, f"{what}; a number is required") from None
    raise AssertionError("unreachable")


def _decode(path: str, raw: bytes) -> str:
    return utf8_text(path, raw, "UTF-8 CSV")


def _read_csv(path: str, raw: bytes, numeric: tuple[str, ...]) -> RawColumns:
    text = _decode(path, raw)
    del raw
    lines = text.splitlines()
    del text
    kept = _kept_lines(lines)
    if not kept:
        raise ProjectError(path, "(file)", None, "is empty: a header row and at least one probe row are needed")
    if len(kept) - 1 > MAX_RAKE_ROWS:
        raise ProjectError(path, "(file)", len(kept) - 1, f"too many rows; at most {MAX_RAKE_ROWS} probes")
    header = [h.strip() for h in _csv_rows(path, [lines[kept[0]]])[0]]
    _check_header(path, header, f"line {kept[0] + 1}")
    if len(kept) < 2:
        raise ProjectError(path, "(file)", None, "has a header but no probe rows")
    line_numbers = np.asarray(kept[1:], dtype=np.int64) + 1
    fast = _arrow_columns(lines, kept, header, numeric)
    if fast is not None:
        return RawColumns(path, fast, line_numbers, "line")
    rows = _csv_rows(path, (lines[k] for k in kept[1:]))
    for k, row in enumerate(rows):
        if len(row) != len(header):
            raise ProjectError(path, f"line {line_numbers[k]}", None,
                               f"has {len(row)} fields; the header (line {kept[0] + 1}) has {len(header)}")
    cells = list(zip(*rows))
    columns: dict[str, np.ndarray] = {}
    raw_cols = RawColumns(path, columns, line_numbers, "line")
    for c, name in enumerate(header):
        texts = [t.strip() for t in cells[c]]
        if name in numeric:
            columns[name] = _numbers(path, texts, name, raw_cols.where)
        else:
            columns[name] = np.asarray(texts, dtype=object)
    return raw_cols


def _csv_rows(path: str, lines) -> list[list[str]]:
    try:
        return list(csv.reader(lines))
    except csv.Error as exc:
        raise ProjectError(path, "(file)", None, f"is not valid CSV: {exc}") from exc


def _kept_lines(lines: list[str]) -> list[int]:
    """Indices of the lines that are neither blank nor comments."""
    return [k for k, line in enumerate(lines) if line.strip() and not line.lstrip().startswith("#")]


def _arrow_columns(lines: list[str], kept: list[int], header: list[str], numeric) -> dict | None:
    """The fast path: the data rows parsed by ``pyarrow.csv`` when they are contiguous lines and every numeric
    cell parses; None otherwise (the caller then reads cell by cell and names the first bad one)."""
    if len(kept) < 2 or kept[-1] - kept[1] + 1 != len(kept) - 1:
        return None
    try:
        import io

        import pyarrow as pa
        import pyarrow.compute as pc
        import pyarrow.csv as pacsv

        body = "\n".join(lines[kept[1]: kept[-1] + 1]).encode("utf-8")
        types = {h: (pa.float64() if h in numeric else pa.string()) for h in header}
        table = pacsv.read_csv(io.BytesIO(body), read_options=pacsv.ReadOptions(column_names=header),
                               convert_options=pacsv.ConvertOptions(column_types=types, strings_can_be_null=False,
                                                                    quoted_strings_can_be_null=False))
    except Exception:  # noqa: BLE001 - any trouble: the careful path says what it is
        return None
    if table.num_rows != len(kept) - 1 or any(col.null_count for col in table.columns):
        return None
    out = {}
    for name, col in zip(header, table.columns):
        if name in numeric:
            out[name] = col.to_numpy()
        else:
            out[name] = pc.utf8_trim_whitespace(col).to_numpy(zero_copy_only=False).astype(object)
    return out


def _check_header(path: str, header: list[str], where: str) -> None:
    seen = set()
    for name in header:
        if not name:
            raise ProjectError(path, where, header, "a column has no name in the header row")
        if name in seen:
            raise ProjectError(path, where, name, "the column is named twice in the header row")
        seen.add(name)


def _read_parquet(path: str, numeric: tuple[str, ...]) -> RawColumns:
    try:
        import pyarrow.parquet as pq

        table = pq.read_table(path)
    except Exception as exc:  # noqa: BLE001 - pyarrow raises several types for a damaged file
        raise ProjectError(path, "(file)", None, f"is not a readable Parquet file: {exc}") from exc
    if table.num_rows == 0:
        raise ProjectError(path, "(file)", None, "has no probe rows")
    if table.num_rows > MAX_RAKE_ROWS:
        raise ProjectError(path, "(file)", table.num_rows, f"too many rows; at most {MAX_RAKE_ROWS} probes")
    header = [str(n) for n in table.column_names]
    _check_header(path, header, "(columns)")
    numbers = np.arange(1, table.num_rows + 1, dtype=np.int64)
    columns: dict[str, np.ndarray] = {}
    raw_cols = RawColumns(path, columns, numbers, "row")
    for name, col in zip(header, table.columns):
        nulls = np.asarray(col.is_null().to_numpy(zero_copy_only=False), bool)
        if nulls.any():
            raise ProjectError(path, raw_cols.where(int(np.argmax(nulls)), name), None, "is empty; a value is required")
        values = col.to_pylist() if name not in numeric else col.to_numpy(zero_copy_only=False)
        if name not in numeric:
            columns[name] = np.asarray([str(v) for v in values], dtype=object)
        elif values.dtype.kind in "iufb":
            columns[name] = values.astype(float)
        else:
            columns[name] = _numbers(path, [str(v) for v in values], name, raw_cols.where)
    return raw_cols


def read_rake_columns(path, numeric: tuple[str, ...]) -> RawColumns:
    """The columns of the rake file at ``path``, those named in ``numeric`` as numbers: Parquet when it starts
    with the Parquet magic bytes (or is named ``*.parquet``/``*.pq``), CSV otherwise."""
    p = os.fspath(path)
    raw = _open_bytes(p)
    if raw[:4] == PARQUET_MAGIC or p.lower().endswith((".parquet", ".pq")):
        del raw
        return _read_parquet(p, numeric)
    return _read_csv(p, raw, numeric)
