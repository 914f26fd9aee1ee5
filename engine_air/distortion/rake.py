"""A rake set: the rows of a rake file checked and arranged as points × rings × probes (method §18).

Columns (interfaces "Additions 2"): ``point`` (label), ``ring`` (1 = innermost of equal-area rings),
``angle_deg`` (in [0, 360)), ``total_pressure_pa``; optional per-point columns, constant within a point:
``mach``, ``alpha_deg``, ``beta_deg``, ``mass_flow_ratio``, ``face_mach``, ``free_stream_total_pressure_pa``.
Rules checked on every row: the four required columns are there and no other column is; no empty, NaN or
infinite value; each value within its bounds (``COLUMNS``); no probe twice (same point, ring and angle);
rings of a point numbered 1..R without a gap, each with the same number of probes (at least
``MIN_PROBES``), equally spaced (within ``SPACING_TOLERANCE_DEG``); the per-point columns constant within a
point. A broken rule raises ``ProjectError`` with the file, the row (line), the column, the value and what
is allowed.

Points with the same number of rings and probes per ring form a group, held as arrays of shape
(points, rings, probes), each ring's probes in increasing angle; the rings' clocking may differ from point
to point.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.distortion.rake_file import RawColumns, read_rake_columns
from engine_air.project.errors import ProjectError
from engine_air.project.schema import MAX_RINGS, suggestion

MIN_PROBES = 3
"""Fewest probes on a ring."""
MAX_PROBES = 360
"""Most probes on a ring."""
SPACING_TOLERANCE_DEG = 0.01
"""Largest departure of a gap between neighbouring probes from 360/N degrees."""

# name: (lowest, lowest excluded, highest, highest excluded, unit)
COLUMNS = {
    "ring": (1.0, False, float(MAX_RINGS), False, ""),
    "angle_deg": (0.0, False, 360.0, True, "deg"),
    "total_pressure_pa": (0.0, True, 1.0e8, False, "Pa"),
    "mach": (0.0, False, 6.0, False, ""),
    "alpha_deg": (-90.0, False, 90.0, False, "deg"),
    "beta_deg": (-90.0, False, 90.0, False, "deg"),
    "mass_flow_ratio": (0.0, True, 2.0, False, ""),
    "face_mach": (0.0, True, 1.0, True, ""),
    "free_stream_total_pressure_pa": (0.0, True, 1.0e8, False, "Pa"),
}
REQUIRED_COLUMNS = ("point", "ring", "angle_deg", "total_pressure_pa")
POINT_COLUMNS = ("mach", "alpha_deg", "beta_deg", "mass_flow_ratio", "face_mach", "free_stream_total_pressure_pa")


@dataclass(frozen=True)
class RakeGroup:
    """Points sharing a ring and probe count: ``pressure_pa`` and ``angle_deg`` of shape (P, R, N)."""

    point_index: np.ndarray  # (P,) index into RakeSet.labels
    angle_deg: np.ndarray
    pressure_pa: np.ndarray

    @property
    def rings(self) -> int:
        return self.pressure_pa.shape[1]

    @property
    def probes(self) -> int:
        return self.pressure_pa.shape[2]


@dataclass(frozen=True)
class RakeSet:
    """Every point of a rake file: labels in file order, per-point columns (P,), groups of equal layout."""

    path: str | None
    labels: tuple[str, ...]
    point_columns: dict[str, np.ndarray]
    groups: tuple[RakeGroup, ...]

    @property
    def points(self) -> int:
        return len(self.labels)


def _bounds_text(name: str) -> str:
    lo, lo_open, hi, hi_open, unit = COLUMNS[name]
    text = f"{lo:g} {'<' if lo_open else '<='} {name} {'<' if hi_open else '<='} {hi:g}"
    return text + (f" ({unit})" if unit else "")


def _check_columns(raw: RawColumns) -> None:
    names = list(raw.columns)
    known = REQUIRED_COLUMNS + POINT_COLUMNS
    for name in names:
        if name not in known:
            hint = suggestion(name, known)
            raise ProjectError(raw.path, f"column {name}", None, "unknown column" + (
                f"; did you mean {hint}?" if hint else "") + " (the columns are " + ", ".join(REQUIRED_COLUMNS)
                + ", and optionally " + ", ".join(POINT_COLUMNS) + ")")
    for name in REQUIRED_COLUMNS:
        if name not in raw.columns:
            raise ProjectError(raw.path, f"column {name}", None,
                               "missing; a rake file needs the columns " + ", ".join(REQUIRED_COLUMNS))


def _check_values(raw: RawColumns) -> None:
    labels = raw.columns["point"].astype(str)
    blank = labels == ""
    if blank.any():
        raise ProjectError(raw.path, raw.where(int(np.argmax(blank)), "point"), None, "is empty; a point label is needed")
    for name, values in raw.columns.items():
        if name == "point":
            continue
        lo, lo_open, hi, hi_open, _unit = COLUMNS[name]
        with np.errstate(invalid="ignore"):
            bad = ~np.isfinite(values) | ((values <= lo) if lo_open else (values < lo)) | \
                ((values >= hi) if hi_open else (values > hi))
            if name == "ring":
                bad |= values != np.round(values)
        if bad.any():
            k = int(np.argmax(bad))
            v = float(values[k])
            what = "NaN is not allowed" if np.isnan(v) else ("must be finite" if not np.isfinite(v) else "")
            allowed = "a whole number, " + _bounds_text(name) if name == "ring" else _bounds_text(name)
            raise ProjectError(raw.path, raw.where(k, name), v, (what + "; " if what else "") + "allowed: " + allowed)


def _fail_row(raw, order, at, column, value, allowed):
    raise ProjectError(raw.path, raw.where(int(order[at]), column), value, allowed)


def _check_layout(raw: RawColumns, pid, order, labels):
    """Duplicates, ring numbering, probe counts and spacing; returns per point (rings, probes, first row)."""
    ring = raw.columns["ring"][order].astype(np.int64)
    angle = raw.columns["angle_deg"][order]
    point = pid[order]
    same_ring = (point[1:] == point[:-1]) & (ring[1:] == ring[:-1])
    dup = same_ring & (np.abs(angle[1:] - angle[:-1]) < 1e-9)
    if dup.any():
        k = int(np.argmax(dup))
        a, b = sorted((int(order[k]), int(order[k + 1])))
        raise ProjectError(raw.path, raw.where(b, "angle_deg"), float(angle[k]),
                           f"duplicate probe: point {labels[point[k]]!r}, ring {ring[k]} has this angle already at "
                           f"{raw.row_word} {int(raw.row_numbers[a])}")
    ring_start = np.flatnonzero(np.concatenate([[True], ~same_ring]))
    counts = np.diff(np.append(ring_start, len(order)))
    r_point, r_ring = point[ring_start], ring[ring_start]
    first_of_point = np.concatenate([[True], r_point[1:] != r_point[:-1]])
    rank = np.arange(len(r_ring)) - np.maximum.accumulate(np.where(first_of_point, np.arange(len(r_ring)), 0))
    gap = r_ring != rank + 1
    if gap.any():
        k = int(np.argmax(gap))
        _fail_row(raw, order, ring_start[k], "ring", int(r_ring[k]),
                  f"rings of point {labels[r_point[k]]!r} must be numbered 1, 2, ... without a gap (ring {rank[k] + 1} "
                  "is missing)")
    bad = (counts < MIN_PROBES) | (counts > MAX_PROBES)
    if bad.any():
        k = int(np.argmax(bad))
        _fail_row(raw, order, ring_start[k], "ring", int(r_ring[k]),
                  f"ring {r_ring[k]} of point {labels[r_point[k]]!r} has {counts[k]} probes; {MIN_PROBES} to "
                  f"{MAX_PROBES} are allowed")
    point_first = np.flatnonzero(first_of_point)
    probes = counts[point_first]
    uneven = counts != np.repeat(probes, np.diff(np.append(point_first, len(counts))))
    if uneven.any():
        k = int(np.argmax(uneven))
        _fail_row(raw, order, ring_start[k], "ring", int(r_ring[k]),
                  f"ring {r_ring[k]} of point {labels[r_point[k]]!r} has {counts[k]} probes and ring 1 has "
                  f"{probes[np.searchsorted(point_first, k, 'right') - 1]}: every ring of a point needs the same "
                  "number of probes")
    _check_spacing(raw, order, angle, ring_start, counts, labels, point, ring)
    rings = np.diff(np.append(point_first, len(counts)))
    return rings, probes, ring_start[point_first]


def _check_spacing(raw, order, angle, ring_start, counts, labels, point, ring) -> None:
    n_rows = len(angle)
    per_row_n = np.repeat(counts, counts)
    last_of_ring = np.zeros(n_rows, bool)
    last_of_ring[ring_start + counts - 1] = True
    following = np.append(angle[1:], 0.0)
    wrap = np.repeat(angle[ring_start], counts) + 360.0
    gap = np.where(last_of_ring, wrap, following) - angle
    off = np.abs(gap - 360.0 / per_row_n) > SPACING_TOLERANCE_DEG
    if off.any():
        k = int(np.argmax(off))
        _fail_row(raw, order, k, "angle_deg", float(angle[k]),
                  f"probes of point {labels[point[k]]!r}, ring {ring[k]} must be equally spaced, "
                  f"{360.0 / per_row_n[k]:g} deg apart for {per_row_n[k]} probes (within {SPACING_TOLERANCE_DEG:g} "
                  f"deg); the gap after this probe is {gap[k]:g} deg")


def _point_columns(raw: RawColumns, pid, first_row) -> dict[str, np.ndarray]:
    out = {}
    for name in POINT_COLUMNS:
        if name not in raw.columns:
            continue
        values = raw.columns[name]
        per_point = values[first_row]
        differs = ~np.isclose(values, per_point[pid], rtol=1e-12, atol=0.0)
        if differs.any():
            k = int(np.argmax(differs))
            raise ProjectError(raw.path, raw.where(k, name), float(values[k]),
                               f"must be constant within a point: point {raw.columns['point'][k]!r} has "
                               f"{per_point[pid[k]]:g} at {raw.row_word} {int(raw.row_numbers[first_row[pid[k]]])}")
        out[name] = per_point
    return out


def rake_set_from_columns(raw: RawColumns) -> RakeSet:
    """Check every row of ``raw`` and arrange the probes by point, ring and angle."""
    _check_columns(raw)
    _check_values(raw)
    text = raw.columns["point"].astype(str)
    unique, first_row, inverse = np.unique(text, return_index=True, return_inverse=True)
    by_appearance = np.argsort(first_row, kind="stable")
    rank = np.empty_like(by_appearance)
    rank[by_appearance] = np.arange(len(by_appearance))
    pid = rank[inverse]
    labels = tuple(str(x) for x in unique[by_appearance])
    order = np.lexsort((raw.columns["angle_deg"], raw.columns["ring"], pid))
    rings, probes, starts = _check_layout(raw, pid, order, labels)
    point_columns = _point_columns(raw, pid, first_row[by_appearance])
    angle, pressure = raw.columns["angle_deg"][order], raw.columns["total_pressure_pa"][order]
    groups = []
    for r, n in sorted(set(zip(rings.tolist(), probes.tolist()))):
        members = np.flatnonzero((rings == r) & (probes == n))
        rows = starts[members][:, None] + np.arange(r * n)
        groups.append(RakeGroup(members, angle[rows].reshape(-1, r, n), pressure[rows].reshape(-1, r, n)))
    return RakeSet(raw.path, labels, point_columns, tuple(groups))


def read_rake_set(path) -> RakeSet:
    """Read and check the rake file at ``path`` (CSV or Parquet); ``ProjectError`` on any broken rule."""
    return rake_set_from_columns(read_rake_columns(path, tuple(COLUMNS)))
