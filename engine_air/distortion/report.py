"""The distortion results as a JSON record, a per-ring table and characteristics-table columns.

The JSON keys are those of ``engine-air distortion --json`` in the interfaces document ("Additions 2");
undefined values are ``null``. ``characteristics_columns`` reduces a rake set to the distortion columns of the
characteristics table (method §17/§18): one row per rake point.
"""

from __future__ import annotations

import math

import numpy as np

from engine_air.distortion.assessment import Assessment
from engine_air.distortion.rake import POINT_COLUMNS
from engine_air.project.errors import ProjectError


def _num(x) -> float | None:
    x = float(x)
    return x if math.isfinite(x) else None


def _arcs(g, row: int, ring: int) -> list[dict]:
    a = g.arcs
    present = np.flatnonzero(~np.isnan(a.start_deg[row, ring]))
    return [{"start_deg": float(a.start_deg[row, ring, k] % 360.0), "end_deg": float(a.end_deg[row, ring, k] % 360.0),
             "extent_deg": float(a.extent_deg[row, ring, k]), "intensity": float(a.intensity[row, ring, k])}
            for k in present]


def _rings(g, row: int) -> list[dict]:
    return [{"ring": i + 1, "average_pa": float(g.ring_average_pa[row, i]),
             "circumferential_intensity": float(g.circumferential_intensity[row, i]),
             "extent_deg": float(g.extent_deg[row, i]), "multiple_per_rev": float(g.multiple_per_rev[row, i]),
             "radial_intensity": float(g.radial_intensity[row, i]), "arcs": _arcs(g, row, i)}
            for i in range(g.group.rings)]


def point_record(assessment: Assessment, point: int) -> dict:
    """One point's record (``points[k]`` of the JSON)."""
    d = assessment.descriptors
    g, row = d.where(point)
    columns = d.rakes.point_columns
    return {
        "point": d.rakes.labels[point],
        "face_average_pa": float(g.face_average_pa[row]),
        "dc60": _num(g.dc60[row]),
        "surge_margin_loss": _num(assessment.surge_margin_loss[point]),
        "remaining_surge_margin": _num(assessment.remaining_surge_margin[point]),
        "dc_sector": _num(g.dc[row]),
        "worst_sector_start_deg": float(g.sector_start_deg[row]),
        "worst_sector_mean_pa": float(g.sector_mean_pa[row]),
        "conditions": {name: float(columns[name][point]) for name in POINT_COLUMNS if name in columns},
        "rings": _rings(g, row),
    }


def distortion_record(assessment: Assessment) -> dict:
    """The whole JSON of ``engine-air distortion --json``."""
    d = assessment.descriptors
    stability = assessment.stability
    return {
        "rakes": d.rakes.path,
        "sector_deg": d.sector_deg,
        "rating": assessment.rating,
        "available_surge_margin": None if stability is None else stability.available_surge_margin,
        "other_losses": None if stability is None else dict(stability.other_losses),
        "checks": [{"name": v.name, "limit": v.limit_text, "holds": v.holds,
                    "failing_points": [d.rakes.labels[k] for k in np.flatnonzero(v.fails)]}
                   for v in assessment.verdicts],
        "holds": assessment.holds,
        "points": [point_record(assessment, k) for k in range(d.rakes.points)],
    }


def ring_table_columns(assessment: Assessment) -> dict[str, object]:
    """One row per point and ring: the ring descriptors beside the point's face values."""
    d = assessment.descriptors
    cols: dict[str, list] = {k: [] for k in (
        "point", "ring", "average_pa", "circumferential_intensity", "extent_deg", "multiple_per_rev",
        "radial_intensity", "arc_count", "face_average_pa", "dc60", "surge_margin_loss", "remaining_surge_margin")}
    for g in d.groups:
        p, r = g.ring_average_pa.shape
        idx = np.repeat(g.group.point_index, r)
        cols["point"].append(np.asarray(d.rakes.labels, dtype=object)[idx])
        cols["ring"].append(np.tile(np.arange(1, r + 1), p))
        cols["average_pa"].append(g.ring_average_pa.ravel())
        cols["circumferential_intensity"].append(g.circumferential_intensity.ravel())
        cols["extent_deg"].append(g.extent_deg.ravel())
        cols["multiple_per_rev"].append(g.multiple_per_rev.ravel())
        cols["radial_intensity"].append(g.radial_intensity.ravel())
        cols["arc_count"].append((~np.isnan(g.arcs.start_deg)).sum(-1).ravel())
        cols["face_average_pa"].append(np.repeat(g.face_average_pa, r))
        cols["dc60"].append(np.repeat(g.dc60, r))
        cols["surge_margin_loss"].append(assessment.surge_margin_loss[idx])
        cols["remaining_surge_margin"].append(assessment.remaining_surge_margin[idx])
    return {k: np.concatenate(v) if v else np.array([]) for k, v in cols.items()}


CHARACTERISTICS_NEEDS = ("mach", "mass_flow_ratio", "free_stream_total_pressure_pa")


def characteristics_columns(assessment: Assessment, path=None) -> dict[str, np.ndarray]:
    """The rake set as rows of a characteristics table (method §17/§18): ``mach``, ``mass_flow_ratio``,
    ``recovery`` (PFAV over the free-stream total pressure), ``alpha_deg``, ``beta_deg`` (0 when absent),
    ``dc60`` (empty without face Mach), ``surge_margin_loss`` (empty without a stability table), and per ring
    ``circumferential_intensity_ring_<i>`` and ``radial_intensity_ring_<i>`` (empty for a point with fewer
    rings)."""
    d = assessment.descriptors
    columns = d.rakes.point_columns
    for name in CHARACTERISTICS_NEEDS:
        if name not in columns:
            raise ProjectError(path or d.rakes.path, f"column {name}", None,
                               "missing; a characteristics table needs the columns "
                               + ", ".join(CHARACTERISTICS_NEEDS) + " in the rake file")
    n = d.rakes.points
    zeros = np.zeros(n)
    out = {"mach": columns["mach"], "mass_flow_ratio": columns["mass_flow_ratio"],
           "recovery": d.per_point("face_average_pa") / columns["free_stream_total_pressure_pa"],
           "alpha_deg": columns.get("alpha_deg", zeros), "beta_deg": columns.get("beta_deg", zeros),
           "dc60": d.per_point("dc60"), "surge_margin_loss": assessment.surge_margin_loss}
    rings = max(g.group.rings for g in d.groups)
    for kind in ("circumferential_intensity", "radial_intensity"):
        for i in range(rings):
            values = np.full(n, np.nan)
            for g in d.groups:
                if i < g.group.rings:
                    values[g.group.point_index] = getattr(g, kind)[:, i]
            out[f"{kind}_ring_{i + 1}"] = values
    return out
