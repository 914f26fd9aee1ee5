"""Low-pressure arcs of each ring and the ring's circumferential descriptors (method §18, after SAE ARP1420).

The descriptors follow SAE ARP1420 (Gas Turbine Engine Inlet Flow Distortion Guidelines) as recalled in
method §18, not copied from the document: check them against ARP1420 before relying on a value.

A low arc of ring i is where the linear profile P_i(θ) is below the ring average PAV_i; its ends are the
crossings of the linear profile with PAV_i. Two arcs separated by a high arc shorter than ``MERGE_GAP_DEG``
(25°) are one arc spanning both, the gap included. If every gap of a ring is shorter, the ring is one low
arc of 360° (its mean is PAV_i, so its intensity is zero). A merged arc's mean includes its high gaps, so
its intensity can come out negative (and the ring's MPR below 1): the definitions are applied as written.

Arcs are kept in arrays of the probes' shape (P, R, N), indexed by the probe interval in which the arc
starts (at most one arc starts in an interval), NaN where no arc starts: no Python loop over points,
rings, probes or arcs.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.distortion.profile import RingProfiles

MERGE_GAP_DEG = 25.0
"""Two low arcs closer than this (deg) are one arc (method §18)."""

_FLAT = 1e-12
"""|P - PAV| at or below this share of PAV counts as equal to the average (not low): round-off only."""


@dataclass(frozen=True)
class Arcs:
    """Low arcs, arrays (P, R, N) indexed by start interval; NaN where no arc starts there."""

    start_deg: np.ndarray  # unwrapped: may exceed 360 for an arc starting in the last interval
    end_deg: np.ndarray  # start + extent
    extent_deg: np.ndarray
    low_average: np.ndarray  # PAVLOW, Pa
    intensity: np.ndarray  # (PAV - PAVLOW)/PAV


@dataclass(frozen=True)
class RingCircumferential:
    """A ring's circumferential descriptors (P, R)."""

    intensity: np.ndarray  # (ΔPC/P)_i = Σ I_k θ_k / Σ θ_k
    extent_deg: np.ndarray  # θ⁻_i = Σ θ_k / Q_i
    multiple_per_rev: np.ndarray  # MPR_i = Σ I_k θ_k / max_k I_k θ_k
    arc_count: np.ndarray  # Q_i


def _next_index(mask: np.ndarray) -> np.ndarray:
    """For each position of the last axis, the index of the first True at or after it (size of the axis if
    none)."""
    n = mask.shape[-1]
    idx = np.where(mask, np.arange(n), n)
    return np.minimum.accumulate(idx[..., ::-1], axis=-1)[..., ::-1]


def _crossings(prof: RingProfiles):
    """Start and end masks of the low arcs by interval and each interval's crossing angle (unwrapped)."""
    pav = prof.average[..., None]
    d = prof.pressure - pav
    d = np.where(np.abs(d) <= _FLAT * np.abs(pav), 0.0, d)
    d_next = np.roll(d, -1, axis=-1)
    low, low_next = d < 0.0, d_next < 0.0
    starts, ends = ~low & low_next, low & ~low_next
    with np.errstate(invalid="ignore", divide="ignore"):
        fraction = np.where(starts | ends, d / (d - d_next), np.nan)
    crossing = prof.angle_deg + prof.spacing_deg * fraction
    return starts, ends, crossing


def _merge(starts, ends, crossing):
    """Remove each high gap shorter than MERGE_GAP_DEG: its end event and the start event after it."""
    n = starts.shape[-1]
    starts2 = np.concatenate([starts, starts], -1)
    crossing2 = np.concatenate([crossing, crossing + 360.0], -1)
    next_start = _next_index(starts2)  # (P, R, 2N)
    pp, rr, jj = np.nonzero(ends)
    k = next_start[pp, rr, jj + 1]  # the first start after the end (one exists: a ring with an end has a start)
    gap = crossing2[pp, rr, k] - crossing[pp, rr, jj]
    short = gap < MERGE_GAP_DEG
    kept_starts, kept_ends = starts.copy(), ends.copy()
    kept_ends[pp[short], rr[short], jj[short]] = False
    kept_starts[pp[short], rr[short], k[short] % n] = False
    return kept_starts, kept_ends


def low_arcs(prof: RingProfiles) -> Arcs:
    """The merged low arcs of every ring, with extent, PAVLOW (exact mean of the linear profile over the arc)
    and intensity (PAV - PAVLOW)/PAV."""
    starts, ends, crossing = _crossings(prof)
    kept_starts, kept_ends = _merge(starts, ends, crossing)
    n = starts.shape[-1]
    ends2 = np.concatenate([kept_ends, kept_ends], -1)
    crossing2 = np.concatenate([crossing, crossing + 360.0], -1)
    next_end = np.minimum(_next_index(ends2)[..., 1:n + 1], 2 * n - 1)  # first kept end after each interval
    end = np.take_along_axis(crossing2, next_end, -1)
    start = np.where(kept_starts, crossing, np.nan)
    end = np.where(kept_starts, end, np.nan)
    # a ring whose every gap merged: one arc of 360° from its first original start
    whole = starts.any(-1) & ~kept_starts.any(-1)
    first = np.argmax(starts, -1)
    whole_mask = whole[..., None] & (np.arange(n) == first[..., None])
    start = np.where(whole_mask, crossing, start)
    end = np.where(whole_mask, crossing + 360.0, end)
    extent = end - start
    low_average = prof.mean_over(np.where(np.isnan(start), 0.0, start), np.where(np.isnan(end), 1.0, end))
    low_average = np.where(np.isnan(start), np.nan, low_average)
    intensity = (prof.average[..., None] - low_average) / prof.average[..., None]
    return Arcs(start, end, extent, low_average, intensity)


def ring_circumferential(arcs: Arcs) -> RingCircumferential:
    """Ring intensity, extent and multiple-per-rev from the arcs; zero for a ring without a low arc."""
    present = ~np.isnan(arcs.start_deg)
    theta = np.where(present, arcs.extent_deg, 0.0)
    weighted = np.where(present, arcs.intensity * arcs.extent_deg, 0.0)
    count = present.sum(-1)
    total_theta = theta.sum(-1)
    total_weighted = weighted.sum(-1)
    largest = np.where(present, weighted, -np.inf).max(-1, initial=-np.inf)
    with np.errstate(invalid="ignore", divide="ignore"):
        intensity = np.where(total_theta > 0.0, total_weighted / total_theta, 0.0)
        extent = np.where(count > 0, total_theta / np.maximum(count, 1), 0.0)
        mpr = np.where((count > 0) & (largest > 0.0), total_weighted / largest, 0.0)
    return RingCircumferential(intensity, extent, mpr, count)
