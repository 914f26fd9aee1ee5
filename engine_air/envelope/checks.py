"""The limits a point is judged against, their margins and the limiting check (method §8).

Each check has a margin in the quantity's own units, positive where the limit
holds, and a *relative* margin (margin over the limit's magnitude) so that
checks in different units can be ranked. The limiting check at a point is the
failing check with the least relative margin or, where every check holds, the
check closest to failing.

Checks, in order:
- ``face-mach``: face Mach limit - M2 (a choked face, M2 = 1, always fails).
- ``throat-mach``: throat Mach limit - M_th; without a given limit only choking
  (M_th = 1) fails it, with the limit taken as 1.
- ``recovery``: a number: pi - pi_min. The name "mil-e-5008b": the recovery of
  the shock system and its regime corrections (pi / pi_duct: everything except the
  subsonic duct's own friction loss, which the reference does not contain) less
  the MIL-E-5008B reference, applied where M0 > 1 only (below it the reference is
  the ideal 1).
- ``stability``: MFR/MFR_max - stable flow fraction, supersonic subcritical only.
- ``relative-tip-mach``: limit - blade relative tip Mach, where a tip speed is given.
- ``spillage``: spillage limit - spillage fraction (an extension of the file format).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.envelope import flags as F
from engine_air.project.model import REFERENCE_RECOVERY_NAME, Limits


@dataclass
class Check:
    """One limit evaluated at every point (arrays of the points' shape)."""

    name: str
    label: str
    limit_text: str  # e.g. "M2 <= 0.55"
    value: np.ndarray  # the judged quantity
    margin: np.ndarray  # positive where the limit holds, in the quantity's units
    relative_margin: np.ndarray
    applies: np.ndarray  # bool: the check is meaningful here
    fails: np.ndarray  # bool: applies and does not hold

    def margin_or_nan(self) -> np.ndarray:
        return np.where(self.applies, self.margin, np.nan)


def _check(name, label, limit_text, value, margin, scale, applies, forced_fail=None) -> Check:
    with np.errstate(invalid="ignore"):
        applies = np.asarray(applies, bool) & np.isfinite(margin)
        fails = applies & (margin < 0.0)
        if forced_fail is not None:
            fails = fails | (applies & forced_fail)
        relative = np.where(applies, margin / abs(scale), np.nan)
        if forced_fail is not None:
            relative = np.where(forced_fail & applies, np.minimum(relative, -1.0), relative)
    return Check(name, label, limit_text, value, margin, relative, applies, fails)


def build_checks(limits: Limits, points) -> list[Check]:
    """Every check that ``limits`` asks for, evaluated on ``points`` (an OperatingPoints)."""
    inside = (points.flags & F.OUTSIDE_ATMOSPHERE) == 0
    bits = points.flags
    checks = [
        _check(
            "face-mach", "Face Mach number", f"M2 <= {limits.face_mach_max:g}",
            points.face_mach, limits.face_mach_max - points.face_mach, limits.face_mach_max, inside,
            forced_fail=F.has(bits, F.FACE_CHOKED),
        )
    ]
    throat_limit = limits.throat_mach_max if limits.throat_mach_max is not None else 1.0
    checks.append(
        _check(
            "throat-mach", "Throat Mach number",
            f"M_th <= {throat_limit:g}" if limits.throat_mach_max is not None else "throat not choked",
            points.throat_mach, throat_limit - points.throat_mach, throat_limit, inside,
            forced_fail=F.has(bits, F.THROAT_CHOKED),
        )
    )
    if limits.recovery_min is not None:
        if limits.recovery_min == REFERENCE_RECOVERY_NAME:
            with np.errstate(invalid="ignore", divide="ignore"):
                shock_recovery = points.recovery / points.duct_recovery
            checks.append(
                _check(
                    "recovery", "Recovery (shock system) vs MIL-E-5008B", "pi / pi_duct >= MIL-E-5008B",
                    shock_recovery, shock_recovery - points.reference_recovery, 1.0,
                    inside & (points.mach > 1.0),
                )
            )
        else:
            floor = float(limits.recovery_min)
            checks.append(
                _check(
                    "recovery", "Total-pressure recovery", f"pi >= {floor:g}",
                    points.recovery, points.recovery - floor, floor, inside,
                )
            )
    if limits.stable_flow_fraction is not None:
        with np.errstate(invalid="ignore", divide="ignore"):
            fraction = points.mass_flow_ratio / points.max_mass_flow_ratio
        subcritical = points.regime == 1
        if getattr(points, "oblique_ahead_of_cowl", None) is not None:  # buzz needs an oblique shock (§10)
            subcritical = subcritical & points.oblique_ahead_of_cowl
        checks.append(
            _check(
                "stability", "Stable capture (buzz)", f"MFR/MFR_max >= {limits.stable_flow_fraction:g}",
                fraction, fraction - limits.stable_flow_fraction, limits.stable_flow_fraction,
                inside & subcritical,
            )
        )
    if limits.relative_tip_mach_max is not None:
        checks.append(
            _check(
                "relative-tip-mach", "Blade relative tip Mach", f"M_rel <= {limits.relative_tip_mach_max:g}",
                points.relative_tip_mach, limits.relative_tip_mach_max - points.relative_tip_mach,
                limits.relative_tip_mach_max, inside & np.isfinite(points.relative_tip_mach),
            )
        )
    if limits.spillage_fraction_max is not None:
        cap = limits.spillage_fraction_max
        checks.append(
            _check(
                "spillage", "Spillage fraction", f"spillage <= {cap:g}",
                points.spillage_fraction, cap - points.spillage_fraction, max(cap, 0.01),
                inside & np.isfinite(points.spillage_fraction),
            )
        )
    return checks


def limiting_index(checks: list[Check], bits) -> np.ndarray:
    """Index into ``checks`` of the limiting check at each point; -1 where no check applies."""
    if not checks:
        return np.full(np.shape(bits), -1, dtype=np.int16)
    rel = np.stack([np.where(c.applies, c.relative_margin, np.inf) for c in checks])
    # A failing check outranks every holding one.
    failing = np.stack([c.fails for c in checks])
    rank = np.where(failing, rel - 1e6, rel)
    index = np.argmin(rank, axis=0).astype(np.int16)
    none = ~np.stack([c.applies for c in checks]).any(axis=0)
    return np.where(none, -1, index).astype(np.int16)
