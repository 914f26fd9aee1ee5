"""The distortion descriptors of every point of a rake set, per ring and per face (method §18).

After SAE ARP1420 (Gas Turbine Engine Inlet Flow Distortion Guidelines), as recalled in method §18, not
copied from the document: check the definitions against ARP1420 before relying on a value.

Per ring i: PAV_i (mean of the periodic linear profile over 360°), the low arcs (``engine_air.distortion.arcs``),
the circumferential intensity (ΔPC/P)_i, the extent θ⁻_i, the multiple-per-rev MPR_i and the radial intensity
(ΔPR/P)_i = (PFAV − PAV_i)/PFAV. Per face: PFAV (mean of the ring averages: equal-area rings), the lowest
mean of a θ-wide sector and DC(θ) (``engine_air.distortion.sector``). Each group of points with the same
rings × probes is reduced in one pass of numpy over (points, rings, probes).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.distortion.arcs import Arcs, low_arcs, ring_circumferential
from engine_air.distortion.profile import RingProfiles
from engine_air.distortion.rake import RakeGroup, RakeSet
from engine_air.distortion.sector import DEFAULT_SECTOR_DEG, distortion_coefficient, worst_sector

MAX_POINTS_PER_PASS = 4096
"""Points reduced together (bounds the memory of the sector search: about 2·R·N candidates per point)."""


@dataclass(frozen=True)
class GroupDescriptors:
    """The descriptors of one group of points: (P,) per face, (P, R) per ring, arcs (P, R, N)."""

    group: RakeGroup
    face_average_pa: np.ndarray
    ring_average_pa: np.ndarray
    circumferential_intensity: np.ndarray
    extent_deg: np.ndarray
    multiple_per_rev: np.ndarray
    radial_intensity: np.ndarray
    arcs: Arcs
    sector_mean_pa: np.ndarray  # lowest θ-sector mean
    sector_start_deg: np.ndarray
    dc: np.ndarray  # DC(θ), NaN without face Mach
    dc60: np.ndarray  # DC(60), NaN without face Mach


@dataclass(frozen=True)
class RakeDescriptors:
    """Every point's descriptors: the rake set, the sector width θ and the groups' results."""

    rakes: RakeSet
    sector_deg: float
    groups: tuple[GroupDescriptors, ...]

    def per_point(self, name: str) -> np.ndarray:
        """A per-face quantity (``face_average_pa``, ``dc60``, ...) for every point, in file order."""
        out = np.full(self.rakes.points, np.nan)
        for g in self.groups:
            out[g.group.point_index] = getattr(g, name)
        return out

    def where(self, point: int) -> tuple[GroupDescriptors, int]:
        """The group holding point ``point`` (index in file order) and its row within the group."""
        for g in self.groups:
            hit = np.flatnonzero(g.group.point_index == point)
            if hit.size:
                return g, int(hit[0])
        raise IndexError(point)


def _reduce_arrays(angle, pressure, face_mach, sector_deg):
    prof = RingProfiles(pressure, angle)
    ring_average = prof.average
    face_average = ring_average.mean(-1)
    arcs = low_arcs(prof)
    circ = ring_circumferential(arcs)
    radial = (face_average[:, None] - ring_average) / face_average[:, None]
    worst = worst_sector(prof, sector_deg)
    dc = distortion_coefficient(face_average, worst.mean_pa, face_mach)
    if sector_deg == DEFAULT_SECTOR_DEG:
        dc60 = dc
    else:
        dc60 = distortion_coefficient(face_average, worst_sector(prof, DEFAULT_SECTOR_DEG).mean_pa, face_mach)
    return dict(face_average_pa=face_average, ring_average_pa=ring_average,
                circumferential_intensity=circ.intensity, extent_deg=circ.extent_deg,
                multiple_per_rev=circ.multiple_per_rev, radial_intensity=radial, arcs=arcs,
                sector_mean_pa=worst.mean_pa, sector_start_deg=worst.start_deg, dc=dc, dc60=dc60)


def _join(parts: list[dict]) -> dict:
    if len(parts) == 1:
        return parts[0]
    out = {}
    for key, first in parts[0].items():
        if isinstance(first, Arcs):
            out[key] = Arcs(*(np.concatenate([getattr(p[key], f) for p in parts]) for f in Arcs.__dataclass_fields__))
        else:
            out[key] = np.concatenate([p[key] for p in parts])
    return out


def reduce_group(group: RakeGroup, face_mach: np.ndarray | None, sector_deg: float) -> GroupDescriptors:
    """The descriptors of one group; ``face_mach`` (P,) or None (DC is then NaN)."""
    n = len(group.point_index)
    fm = np.full(n, np.nan) if face_mach is None else np.asarray(face_mach, float)
    parts = [_reduce_arrays(group.angle_deg[a:a + MAX_POINTS_PER_PASS], group.pressure_pa[a:a + MAX_POINTS_PER_PASS],
                            fm[a:a + MAX_POINTS_PER_PASS], sector_deg) for a in range(0, n, MAX_POINTS_PER_PASS)]
    return GroupDescriptors(group=group, **_join(parts))


def reduce_rakes(rakes: RakeSet, sector_deg: float = DEFAULT_SECTOR_DEG) -> RakeDescriptors:
    """Every descriptor of every point of ``rakes``; DC(θ) with θ = ``sector_deg`` (0 < θ < 360)."""
    if not 0.0 < sector_deg < 360.0:
        raise ValueError(f"sector width {sector_deg!r} deg: must be between 0 and 360 deg")
    face_mach = rakes.point_columns.get("face_mach")
    groups = tuple(reduce_group(g, None if face_mach is None else face_mach[g.point_index], float(sector_deg))
                   for g in rakes.groups)
    return RakeDescriptors(rakes, float(sector_deg), groups)
