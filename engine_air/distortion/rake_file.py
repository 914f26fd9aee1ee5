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
import stat
from dataclasses import dataclass

import numpy as np

from engine_air.project.errors import ProjectError

MAX_RAKE_FILE_BYTES = 256 * 1_048_576
"""Largest rake file accepted, bytes (256 MiB: about four million probes of CSV)."""
MAX_RAKE_ROWS = 4_000_000
"""Most probe rows in one rake file (100 000 points of 40 probes)."""
PARQUET_MAGIC = b"PAR1"


@dataclass(frozen=True)
class RawColumns:
    """The columns of a rake file: text column ``point`` as str objects, every other column as float64."""

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


TEXT_COLUMNS = ("point",)


def _open_bytes(path: str) -> bytes:
    limit = f"rake files may be at most {MAX_RAKE_FILE_BYTES} bytes ({MAX_RAKE_FILE_BYTES // 1_048_576} MiB)"
    try:
        info = os.stat(path)
        if stat.S_ISDIR(info.st_mode):
            raise ProjectError(path, "(file)", None, "is a folder, not a rake file")
        if not stat.S_ISREG(info.st_mode):
            raise ProjectError(path, "(file)", None, "is not a regular file")
        if info.st_size > MAX_RAKE_FILE_BYTES:
            raise ProjectError(path, "(file)", info.st_size, f"the file has {info.st_size} bytes; {limit}")
        with open(path, "rb") as f:
            raw = f.read(MAX_RAKE_FILE_BYTES + 1)
    except OSError as exc:
        raise ProjectError(path, "(file)", None, f"cannot be read: {exc.strerror or exc}") from exc
    if len(raw) > MAX_RAKE_FILE_BYTES:
        raise ProjectError(path, "(file)", None, f"the file has more than {MAX_RAKE_FILE_BYTES} bytes; {limit}")
    return raw


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


def _read_csv(path: str, raw: bytes) -> RawColumns:
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise ProjectError(path, "(file)", None, f"is not UTF-8 text: byte 0x{raw[exc.start]:02x} on line {line} "
                                                 "cannot be decoded; save the file as UTF-8 CSV") from exc
    lines = text.splitlines()
    kept = [k for k, line in enumerate(lines) if line.strip() and not line.lstrip().startswith("#")]
    if not kept:
        raise ProjectError(path, "(file)", None, "is empty: a header row and at least one probe row are needed")
    if len(kept) - 1 > MAX_RAKE_ROWS:
        raise ProjectError(path, "(file)", len(kept) - 1, f"too many rows; at most {MAX_RAKE_ROWS} probes")
    try:
        rows = list(csv.reader(lines[k] for k in kept))
    except csv.Error as exc:
        raise ProjectError(path, "(file)", None, f"is not valid CSV: {exc}") from exc
    header = [h.strip() for h in rows[0]]
    line_numbers = np.asarray(kept[1:], dtype=np.int64) + 1
    for k, row in enumerate(rows[1:]):
        if len(row) != len(header):
            raise ProjectError(path, f"line {line_numbers[k]}", None,
                               f"has {len(row)} fields; the header (line {kept[0] + 1}) has {len(header)}")
    if len(rows) < 2:
        raise ProjectError(path, "(file)", None, "has a header but no probe rows")
    _check_header(path, header, f"line {kept[0] + 1}")
    cells = list(zip(*rows[1:]))
    columns: dict[str, np.ndarray] = {}
    raw_cols = RawColumns(path, columns, line_numbers, "line")
    for c, name in enumerate(header):
        texts = [t.strip() for t in cells[c]]
        if name in TEXT_COLUMNS:
            columns[name] = np.asarray(texts, dtype=object)
        else:
            columns[name] = _numbers(path, texts, name, raw_cols.where)
    return raw_cols


def _check_header(path: str, header: list[str], where: str) -> None:
    seen = set()
    for name in header:
        if not name:
            raise ProjectError(path, where, header, "a column has no name in the header row")
        if name in seen:
            raise ProjectError(path, where, name, "the column is named twice in the header row")
        seen.add(name)


def _read_parquet(path: str) -> RawColumns:
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
        values = col.to_pylist() if name in TEXT_COLUMNS else col.to_numpy(zero_copy_only=False)
        if name in TEXT_COLUMNS:
            columns[name] = np.asarray([str(v) for v in values], dtype=object)
        elif values.dtype.kind in "iufb":
            columns[name] = values.astype(float)
        else:
            columns[name] = _numbers(path, [str(v) for v in values], name, raw_cols.where)
    return raw_cols


def read_rake_columns(path) -> RawColumns:
    """The columns of the rake file at ``path``: Parquet when it starts with the Parquet magic bytes (or is
    named ``*.parquet``/``*.pq``), CSV otherwise."""
    p = os.fspath(path)
    raw = _open_bytes(p)
    if raw[:4] == PARQUET_MAGIC or p.lower().endswith((".parquet", ".pq")):
        del raw
        return _read_parquet(p)
    return _read_csv(p, raw)
