"""Reading a table of measured or computed inlet characteristics (method §17).

A characteristics table holds points on characteristic curves from wind-tunnel tests or CFD, one row each:
``mach``, ``mass_flow_ratio``, ``recovery`` (total, face over free stream, p_t2/p_t0), and optionally
``alpha_deg``, ``beta_deg`` (default 0), ``stable`` (1 a stable operating point, 0 buzz or unstable),
``additive_drag_coefficient`` and the distortion columns of method §18 (``dc60``, ``surge_margin_loss``,
``circumferential_intensity_ring_<N>``, ``radial_intensity_ring_<N>``).

The file is CSV (UTF-8, comma separated, one header row) or Parquet, read with pyarrow. Every cell is
checked like a project key: a bad one raises ``ProjectError`` naming the file, the data row (1 = the first row
under the header), the column, the value and what is allowed. Unknown columns are errors. Files are data:
nothing in them is executed.

Example
-------
>>> import tempfile, os
>>> folder = tempfile.mkdtemp()
>>> path = os.path.join(folder, "t.csv")
>>> _ = open(path, "w").write("mach,mass_flow_ratio,recovery\\n2.0,0.6,0.90\\n2.0,0.8,0.92\\n")
>>> table = read_characteristics(path)
>>> table.rows, table.column("recovery").tolist()
(2, [0.9, 0.92])
"""

from __future__ import annotations

import io
import os
import re
import stat
from dataclasses import dataclass, field

import numpy as np

from engine_air.spec.errors import ProjectError

MAX_TABLE_BYTES = 64 * 1024 * 1024
"""Largest characteristics file read (64 MiB: some hundred thousand rows); a larger file is refused unread."""

MAX_TABLE_ROWS = 500_000

REQUIRED_COLUMNS = ("mach", "mass_flow_ratio", "recovery")
OPTIONAL_COLUMNS = ("alpha_deg", "beta_deg", "stable", "additive_drag_coefficient", "dc60", "surge_margin_loss")
RING_COLUMN = re.compile(r"^(circumferential|radial)_intensity_ring_([1-9][0-9]?)$")
"""The per-ring distortion columns ``engine-air distortion --characteristics-out`` writes (method §18)."""

# column -> (low, high, low open, high open, words)
_BOUNDS = {
    "mach": (0.0, 10.0, False, False, "a flight Mach number from 0 to 10"),
    "mass_flow_ratio": (0.0, 10.0, True, False, "a mass-flow ratio above 0 and at most 10"),
    "recovery": (0.0, 1.0, True, False, "a total-pressure recovery above 0 and at most 1"),
    "alpha_deg": (-90.0, 90.0, False, False, "an angle of attack from -90 to 90 deg"),
    "beta_deg": (-90.0, 90.0, False, False, "a sideslip angle from -90 to 90 deg"),
    "stable": (0.0, 1.0, False, False, "0 (buzz or unstable) or 1 (stable)"),
    "additive_drag_coefficient": (-1e3, 1e3, False, False, "a finite drag coefficient within +-1000"),
    "dc60": (0.0, 100.0, False, False, "a distortion coefficient DC(60) from 0 to 100"),
    "surge_margin_loss": (-1.0, 1.0, False, False, "a loss of surge margin as a fraction from -1 to 1"),
}
_RING_BOUNDS = (-1.0, 1.0, False, False, "a distortion intensity as a fraction from -1 to 1")


@dataclass(frozen=True)
class CharacteristicsTable:
    """The validated columns of a characteristics table (float64 arrays of one length)."""

    path: str
    columns: dict[str, np.ndarray] = field(default_factory=dict)

    @property
    def rows(self) -> int:
        return len(self.columns["mach"])

    def column(self, name: str) -> np.ndarray:
        """A column by name; the defaults of the optional angle columns (0) when the file has none."""
        if name in self.columns:
            return self.columns[name]
        if name in ("alpha_deg", "beta_deg"):
            return np.zeros(self.rows)
        raise KeyError(name)

    def has(self, name: str) -> bool:
        return name in self.columns


def allowed_column(name: str) -> bool:
    return name in REQUIRED_COLUMNS or name in OPTIONAL_COLUMNS or RING_COLUMN.match(name) is not None


def _allowed_words() -> str:
    return ("columns " + ", ".join(REQUIRED_COLUMNS) + " (required); " + ", ".join(OPTIONAL_COLUMNS)
            + ", circumferential_intensity_ring_<N>, radial_intensity_ring_<N> (optional)")


def _read_bounded(path: str) -> bytes:
    """The file's bytes: a regular file only (no FIFO or device), at most MAX_TABLE_BYTES, read without trusting
    the size the file system reports."""
    try:
        info = os.stat(path)
    except OSError as exc:
        raise ProjectError(path, "(file)", None, f"cannot be read: {exc.strerror or exc}") from None
    if not stat.S_ISREG(info.st_mode):
        raise ProjectError(path, "(file)", None, "must be a regular file (not a folder, pipe or device)")
    if info.st_size > MAX_TABLE_BYTES:
        raise ProjectError(path, "(file)", f"{info.st_size} bytes",
                           f"a characteristics table may hold at most {MAX_TABLE_BYTES // (1024 * 1024)} MiB")
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0)
    try:
        fd = os.open(path, flags)
        with os.fdopen(fd, "rb") as handle:
            data = handle.read(MAX_TABLE_BYTES + 1)
    except OSError as exc:
        raise ProjectError(path, "(file)", None, f"cannot be read: {exc.strerror or exc}") from None
    if len(data) > MAX_TABLE_BYTES:
        raise ProjectError(path, "(file)", None,
                           f"a characteristics table may hold at most {MAX_TABLE_BYTES // (1024 * 1024)} MiB")
    return data


def _is_parquet(path: str, data: bytes) -> bool:
    return data[:4] == b"PAR1" or path.lower().endswith((".parquet", ".pq"))


def _arrow_table(path: str, data: bytes):
    """pyarrow Table of the file; CSV cells read as text (converted and checked per column afterwards)."""
    import pyarrow as pa
    import pyarrow.csv as pacsv
    import pyarrow.parquet as pq

    if _is_parquet(path, data):
        try:
            return pq.read_table(io.BytesIO(data))
        except Exception as exc:  # noqa: BLE001 - pyarrow raises several types for a broken file
            raise ProjectError(path, "(file)", None, f"is not a readable Parquet file ({exc})") from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise ProjectError(path, f"line {line}", None,
                           f"the CSV file must be UTF-8 text (byte {exc.start} is not)") from None
    if not text.strip():
        raise ProjectError(path, "(file)", None, "is empty: a header row and at least two rows per curve are needed")
    header = next(iter(text.splitlines()), "")
    names = [h.strip() for h in header.split(",")]
    try:
        return pacsv.read_csv(
            io.BytesIO(data),
            parse_options=pacsv.ParseOptions(newlines_in_values=False),
            convert_options=pacsv.ConvertOptions(column_types={n: pa.string() for n in names if n},
                                                 strings_can_be_null=True),
        )
    except Exception as exc:  # noqa: BLE001
        raise ProjectError(path, "(file)", None, f"is not a readable CSV table ({' '.join(str(exc).split())})") from None


MAY_BE_EMPTY = ("additive_drag_coefficient", "dc60", "surge_margin_loss")
"""Optional measured columns whose cells may be left empty where a point has no such measurement (NaN)."""


def _may_be_empty(name: str) -> bool:
    return name in MAY_BE_EMPTY or RING_COLUMN.match(name) is not None


def _float_column(path: str, name: str, array) -> np.ndarray:
    """A pyarrow column as float64, with the first cell that is not a number named; an empty cell is NaN in the
    columns that may be empty (``MAY_BE_EMPTY``, ring intensities) and an error elsewhere."""
    import pyarrow as pa

    empty_ok = _may_be_empty(name)
    kind = array.type
    if pa.types.is_string(kind) or pa.types.is_large_string(kind):
        texts = array.to_pylist()
        out = np.empty(len(texts))
        for row, text in enumerate(texts):  # only text cells: a CSV column, converted once
            if text is None or not text.strip():
                if empty_ok:
                    out[row] = np.nan
                    continue
                raise ProjectError(path, f"row {row + 1}, column {name}", None, "is empty: every cell needs a number")
            try:
                out[row] = float(text)
            except ValueError:
                raise ProjectError(path, f"row {row + 1}, column {name}", text.strip(), "must be a number") from None
        return out
    if not (pa.types.is_integer(kind) or pa.types.is_floating(kind) or pa.types.is_boolean(kind)):
        raise ProjectError(path, f"column {name}", str(kind), "must hold numbers (integer or floating point)")
    if array.null_count and not empty_ok:
        row = int(np.flatnonzero(np.asarray(array.is_null()))[0])
        raise ProjectError(path, f"row {row + 1}, column {name}", None, "is empty: every cell needs a number")
    return np.asarray(array.cast(pa.float64()).fill_null(np.nan), dtype=float)


def _check_bounds(path: str, name: str, values: np.ndarray) -> None:
    lo, hi, lo_open, hi_open, words = _BOUNDS.get(name, _RING_BOUNDS)
    with np.errstate(invalid="ignore"):
        missing = np.isnan(values) if _may_be_empty(name) else np.zeros(values.shape, bool)
        too_low = values <= lo if lo_open else values < lo
        too_high = values >= hi if hi_open else values > hi
        bad = (~np.isfinite(values) | too_low | too_high) & ~missing  # an allowed empty cell is not judged
        if name == "stable":
            bad |= (values != 0.0) & (values != 1.0)
    if bad.any():
        row = int(np.flatnonzero(bad)[0])
        raise ProjectError(path, f"row {row + 1}, column {name}", float(values[row]), f"must be {words}")


def _check_duplicates(path: str, columns: dict[str, np.ndarray], n: int) -> None:
    keys = np.stack([columns.get(c, np.zeros(n)) for c in ("mach", "alpha_deg", "beta_deg", "mass_flow_ratio", "recovery")],
                    axis=1)
    order = np.lexsort(keys.T[::-1])
    same = np.all(keys[order][1:] == keys[order][:-1], axis=1)
    if same.any():
        i = int(np.flatnonzero(same)[0])
        first, second = sorted((int(order[i]) + 1, int(order[i + 1]) + 1))
        raise ProjectError(path, f"row {second}", None,
                           f"repeats row {first} (same mach, alpha_deg, beta_deg, mass_flow_ratio and recovery): "
                           "each point of a curve must appear once")


def read_characteristics(path: str | os.PathLike) -> CharacteristicsTable:
    """Read and check a characteristics table (CSV or Parquet); see the module text for the columns.

    Raises ``ProjectError`` (file, row, column, value, what is allowed) for a missing or unknown column, an
    empty or non-numeric cell, a value out of range, a repeated row, a curve with fewer than two points, a
    non-UTF-8 CSV or a file over ``MAX_TABLE_BYTES``."""
    path = os.fspath(path)
    data = _read_bounded(path)
    table = _arrow_table(path, data)
    names = [str(n).strip() for n in table.column_names]
    missing = [c for c in REQUIRED_COLUMNS if c not in names]
    if missing:
        raise ProjectError(path, "(header)", ", ".join(names) or None,
                           f"missing column {', '.join(missing)}; the table needs {_allowed_words()}")
    for name in names:
        if not allowed_column(name):
            raise ProjectError(path, f"column {name}", None, f"is not a known column; allowed: {_allowed_words()}")
    if len(set(names)) != len(names):
        twice = next(n for n in names if names.count(n) > 1)
        raise ProjectError(path, f"column {twice}", None, "appears twice in the header")
    n = table.num_rows
    if n == 0:
        raise ProjectError(path, "(file)", None, "has no rows: at least two rows per curve are needed")
    if n > MAX_TABLE_ROWS:
        raise ProjectError(path, "(file)", f"{n} rows", f"at most {MAX_TABLE_ROWS} rows are read")
    columns: dict[str, np.ndarray] = {}
    for raw, name in zip(table.column_names, names):
        values = _float_column(path, name, table.column(raw).combine_chunks())
        _check_bounds(path, name, values)
        columns[name] = values
    _check_duplicates(path, columns, n)
    result = CharacteristicsTable(path, columns)
    from engine_air.characteristics.curves import find_curves

    find_curves(result)  # a curve with one point is refused here, with its rows named
    return result
