"""The lowest mean total pressure of any sector of the face, and DC(θ) (method §18).

The mean total pressure of a θ-wide sector starting at angle φ, over all rings (equal areas, so the plain
mean of the rings):

    G(φ) = (1/R) Σ_i [F_i(φ + θ) − F_i(φ)] / θ

with F_i the exact primitive of ring i's linear profile (``engine_air.distortion.profile``). G' is
continuous and linear between the angles where φ or φ + θ meets a probe of any ring, so G is piecewise
quadratic: its least value is at one of those breakpoints or where G' crosses zero upwards inside a
segment. Both are evaluated exactly (G at one breakpoint by the primitives, then segment by segment from
the slopes): no grid.

DC(θ) = (PFAV − min G)/q2, q2 = (γ/2)·p2·M2² the face mean dynamic pressure at the point's face Mach number
M2, p2 = PFAV·(p/p_t)(M2) (isentropic, NACA Report 1135 eq. 44). The descriptor follows SAE ARP1420 as
recalled in method §18 (the dynamic-pressure reference is common practice, from memory): check it against the
document before relying on a value.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.distortion.profile import RingProfiles
from engine_air.physics.constants import GAMMA
from engine_air.physics.isentropic import pressure_ratio

DEFAULT_SECTOR_DEG = 60.0


@dataclass(frozen=True)
class WorstSector:
    """(P,) the lowest sector mean (Pa) and the start angle of that sector (deg, in [0, 360))."""

    mean_pa: np.ndarray
    start_deg: np.ndarray


def _sector_mean(prof: RingProfiles, phi: np.ndarray, width: float) -> np.ndarray:
    """G(φ) for φ of shape (P, K): the mean over every ring of the sector [φ, φ + width]."""
    phi3 = phi[:, None, :]
    integral = prof.primitive(phi3 + width) - prof.primitive(phi3)
    return integral.mean(axis=1) / width


def _sector_slope(prof: RingProfiles, phi: np.ndarray, width: float) -> np.ndarray:
    """G'(φ) = (1/R) Σ_i [P_i(φ + θ) − P_i(φ)] / θ, shape (P, K)."""
    phi3 = phi[:, None, :]
    return (prof.value(phi3 + width) - prof.value(phi3)).mean(axis=1) / width


def worst_sector(prof: RingProfiles, width_deg: float = DEFAULT_SECTOR_DEG) -> WorstSector:
    """The exact least mean total pressure of any ``width_deg`` sector of each point, and where it starts.

    G is evaluated exactly at the first breakpoint; across each segment of length L between breakpoints, where
    G' runs linearly from g_k to g_k+1, G grows by L (g_k + g_k+1)/2 and, where G' crosses zero upwards, its
    least value inside is G_k − g_k² L / (2 (g_k+1 − g_k)) (the vertex of the parabola).

    >>> import numpy as np
    >>> p = np.ones((1, 2, 8)); p[:, :, 0:3] = 0.8          # 90° low on both rings, probes 0°, 45°, 90°
    >>> w = worst_sector(RingProfiles(p, np.arange(8.0) * 45.0), 60.0)
    >>> round(float(w.mean_pa[0]), 6), round(float(w.start_deg[0]), 3)
    (0.8, 0.0)
    """
    points, rings, n = prof.pressure.shape
    if np.all(prof.angle_deg == prof.angle_deg[:, :1, :]):  # rings not clocked apart: one ring's angles do
        angles = prof.angle_deg[:, 0, :]
    else:
        angles = prof.angle_deg.reshape(points, rings * n)
    breaks = np.sort(np.concatenate([angles, angles - width_deg], -1) % 360.0, -1)  # (P, K)
    length = np.diff(breaks, axis=-1, append=breaks[:, :1] + 360.0)
    g = _sector_slope(prof, breaks, width_deg)
    g_next = np.roll(g, -1, axis=-1)
    first = _sector_mean(prof, breaks[:, :1], width_deg)  # (P, 1)
    rise = 0.5 * length * (g + g_next)
    at_breaks = first + np.concatenate([np.zeros((points, 1)), np.cumsum(rise[:, :-1], -1)], -1)
    upward = (g < 0.0) & (g_next > 0.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        curvature = np.where(upward, g_next - g, 1.0)
        inside = np.where(upward, at_breaks - 0.5 * g * g * length / curvature, np.inf)
        offset = np.where(upward, -g * length / curvature, 0.0)
    means = np.concatenate([at_breaks, inside], -1)
    starts = np.concatenate([breaks, breaks + offset], -1)
    best = np.argmin(means, -1)
    rows = np.arange(points)
    return WorstSector(means[rows, best], starts[rows, best] % 360.0)


def face_dynamic_pressure(face_average_pa, face_mach, gamma: float = GAMMA) -> np.ndarray:
    """q2 = (γ/2)·p2·M2² with p2 = PFAV·(p/p_t)(M2), Pa; NaN where the face Mach number is not given.

    >>> round(float(face_dynamic_pressure(100000.0, 0.5)), 1)
    14752.8
    """
    m = np.asarray(face_mach, float)
    return 0.5 * gamma * np.asarray(face_average_pa, float) * pressure_ratio(m, gamma) * m * m


def distortion_coefficient(face_average_pa, worst_mean_pa, face_mach) -> np.ndarray:
    """DC(θ) = (PFAV − lowest θ-sector mean)/q2; NaN without a face Mach number (or at M2 = 0)."""
    q2 = face_dynamic_pressure(face_average_pa, face_mach)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(q2 > 0.0, (np.asarray(face_average_pa) - worst_mean_pa) / q2, np.nan)
