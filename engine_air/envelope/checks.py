"""The limits a point is judged against, their margins and the limiting check (method §8).

Each check has a margin in the quantity's own units, positive where the limit
holds, and a *relative* margin (margin over the limit's magnitude) so that
checks in different units can be ranked. The limiting check at a point is the
failing check with the least relative margin or, where every check holds, the
check closest to failing.

Checks, in order:
- ``face-mach``: face Mach limit - M2 (a choked face, M2 = 1, always fails).
- ``throat-mach``: throat Mach limit - M_th; without a given limit only choking
  (M_th = 1) fails it, with the limit taken as 1. A started mixed-compression inlet has a supersonic throat
  with the terminal shock just behind it: there the judged value is the Mach number behind that shock
  (the subsonic side of the throat, NACA Report 1135 eq. 96), not the supersonic M_th reported.
- ``recovery``: a number: pi - pi_min. The name "mil-e-5008b": the recovery of
  the shock system and its regime corrections (pi / pi_duct: everything except the
  subsonic duct's own friction loss, which the reference does not contain) less
  the MIL-E-5008B reference, applied where M0 > 1 only (below it the reference is
  the ideal 1).
- ``stability``: MFR/MFR_max - stable flow fraction, supersonic subcritical only.
- ``relative-tip-mach``: limit - blade relative tip Mach, where a tip speed is given.
- ``spillage``: spillage limit - spillage fraction (an extension of the file format).
- ``started``: mixed-compression inlets (``limits.started_required``, default true for them), supersonic
  points only: fails where the inlet is ``unstarted`` or, started, at ``unstart-risk`` (method §11).
  Margin +1 where it holds, -1 where it fails (a yes/no check).
- ``installation-loss``: limit - installation loss 1 - F_inst/F_n (method section 13), where thrust data give it.
- ``dc60``: ``limits.dc60_max`` - DC(60) (method section 18), where ``points.dc60`` is finite.
- ``surge-margin``: remaining surge margin - ``limits.surge_margin_min``, the remaining margin being the rating's
  available margin - ``points.surge_margin_loss`` - its other stack-up items (``[engine.rating.stability]``,
  passed as ``stability``), where the loss is finite.
  Both are added only when the points carry the data (``points.dc60`` / ``points.surge_margin_loss`` not None:
  a characteristics table with distortion columns, method sections 17-18); until data back them the limits are
  judged by ``engine-air distortion`` on rake files only.

No check applies outside the atmosphere model or outside the case's region (``outside-case-region``, method
section 14): such points are computed but judged by no limit. A check with a region of its own
(``[limits.region.NAME]``, method section 15: ``mach_range``, ``altitude_range_m``, bounds included) applies
only inside it: outside, it has no verdict and no margin (``applies`` false), so it is in no least margin and
no failing share.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.envelope import flags as F
from engine_air.envelope.check_names import CHECK_NAMES
from engine_air.physics.shocks import normal_shock
from engine_air.project.model import REFERENCE_RECOVERY_NAME, LimitRegion, Limits


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


MAX_RELATIVE_MARGIN = 1e12
"""Relative margins are held within +-1e12 (a limit near zero would otherwise give an infinite one)."""


def _check(name, label, limit_text, value, margin, scale, applies, forced_fail=None) -> Check:
    if name not in CHECK_NAMES:  # a [limits.region.NAME] table must be able to name every check
        raise AssertionError(f"check {name!r} is not listed in engine_air.envelope.check_names.CHECK_NAMES")
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        applies = np.asarray(applies, bool) & np.isfinite(margin)
        fails = applies & (margin < 0.0)
        if forced_fail is not None:
            fails = fails | (applies & forced_fail)
        # a limit as small as the file allows (e.g. 5e-324) must not overflow the ranking: keep it finite
        relative = np.where(applies, np.minimum(np.maximum(margin / abs(scale), -MAX_RELATIVE_MARGIN),
                                                MAX_RELATIVE_MARGIN), np.nan)  # np.clip's values, fewer passes
        if forced_fail is not None:
            relative = np.where(forced_fail & applies, np.minimum(relative, -1.0), relative)
    return Check(name, label, limit_text, value, margin, relative, applies, fails)


def in_region(region: LimitRegion | None, mach, altitude_m) -> np.ndarray:
    """Bool: inside ``region`` (bounds included; everywhere when ``region`` is None), at the broadcast shape of
    ``mach`` and ``altitude_m``."""
    mach, altitude_m = np.asarray(mach, float), np.asarray(altitude_m, float)
    inside = np.ones(np.broadcast_shapes(mach.shape, altitude_m.shape), bool)
    if region is not None and region.mach_range is not None:
        lo, hi = region.mach_range
        inside &= (mach >= lo) & (mach <= hi)
    if region is not None and region.altitude_range_m is not None:
        lo, hi = region.altitude_range_m
        inside &= (altitude_m >= lo) & (altitude_m <= hi)
    return inside


def _restrict(check: Check, region: LimitRegion | None, points) -> Check:
    """``check`` judged only inside its region (method section 15): no verdict and no margin outside."""
    if region is None:
        return check
    inside = in_region(region, points.mach, points.altitude_m)
    check.applies = check.applies & inside
    check.fails = check.fails & inside
    check.relative_margin = np.where(inside, check.relative_margin, np.nan)
    return check


def build_checks(limits: Limits, points, stability=None) -> list[Check]:
    """Every check that ``limits`` asks for, evaluated on ``points`` (an OperatingPoints), each judged only
    inside its region when ``limits`` gives one; ``stability`` the case's rating's ``Stability`` (the
    surge-margin stack-up), or None."""
    return [_restrict(c, limits.region(c.name), points) for c in _every_check(limits, points, stability)]


def _every_check(limits: Limits, points, stability=None) -> list[Check]:
    inside = (points.flags & (F.OUTSIDE_ATMOSPHERE | F.OUTSIDE_CASE_REGION)) == 0
    bits = points.flags
    checks = [
        _check(
            "face-mach", "Face Mach number", f"M2 <= {limits.face_mach_max:g}",
            points.face_mach, limits.face_mach_max - points.face_mach, limits.face_mach_max, inside,
            forced_fail=F.has(bits, F.FACE_CHOKED),
        )
    ]
    throat_limit = limits.throat_mach_max if limits.throat_mach_max is not None else 1.0
    throat_judged = points.throat_mach
    if points.started is not None:  # started: the subsonic side of the throat, behind the terminal shock
        throat_judged = np.where(points.started, normal_shock(points.throat_mach).downstream_mach, throat_judged)
    checks.append(
        _check(
            "throat-mach", "Throat Mach number",
            f"M_th <= {throat_limit:g}" if limits.throat_mach_max is not None else "throat not choked",
            throat_judged, throat_limit - throat_judged, throat_limit, inside,
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
        checks.append(_stability_check(limits, points, inside))
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
        spill = points.spillage_fraction  # computed when read: once
        checks.append(
            _check(
                "spillage", "Spillage fraction", f"spillage <= {cap:g}",
                spill, cap - spill, max(cap, 0.01), inside & np.isfinite(spill),
            )
        )
    started = getattr(points, "started", None)
    if started is not None and (limits.started_required is None or limits.started_required):
        bad = F.has(bits, F.UNSTARTED) | F.has(bits, F.UNSTART_RISK)
        checks.append(
            _check(
                "started", "Inlet started (mixed compression)", "started, no unstart risk",
                np.where(bad, 0.0, 1.0), np.where(bad, -1.0, 1.0), 1.0, inside & (points.mach > 1.0),
            )
        )
    if limits.installation_loss_max is not None:
        cap = limits.installation_loss_max
        loss = points.installation_loss_fraction
        checks.append(
            _check(
                "installation-loss", "Installation loss", f"1 - F_inst/F_n <= {cap:g}",
                loss, cap - loss, max(cap, 0.01), inside & np.isfinite(loss),
            )
        )
    checks.extend(distortion_checks(limits, points, inside, stability))
    return checks


def _stability_check(limits: Limits, points, inside) -> Check:
    """``stability``: MFR/MFR_max - the stable fraction, subcritical where an oblique or conical shock stands ahead
    of the cowl (§10); where measured characteristics decide (§17) their own stability limit is the threshold and
    is judged wherever they give one."""
    with np.errstate(invalid="ignore", divide="ignore"):
        fraction = points.mass_flow_ratio / points.max_mass_flow_ratio
    subcritical = points.regime == 1
    applies = subcritical
    if getattr(points, "oblique_ahead_of_cowl", None) is not None:  # buzz needs an oblique shock (§10)
        applies = applies & points.oblique_ahead_of_cowl
    threshold = limits.stable_flow_fraction
    text = f"MFR/MFR_max >= {threshold:g}"
    used = getattr(points, "from_data", None)
    if used is not None:
        measured = np.asarray(points.data_stable_flow_fraction, float)
        applies = np.where(used, subcritical & np.isfinite(measured), applies)
        threshold = np.where(used, measured, threshold)
        text += "/data"  # the measured limit where data decide
    return _check("stability", "Stable capture (buzz)", text, fraction, fraction - threshold,
                  limits.stable_flow_fraction, inside & applies)


def distortion_checks(limits: Limits, points, inside, stability=None) -> list[Check]:
    """``dc60`` and ``surge-margin`` (method §18) where the points carry distortion data (finite values)."""
    out = []
    dc60 = getattr(points, "dc60", None)
    if limits.dc60_max is not None and dc60 is not None:
        cap = limits.dc60_max
        dc60 = np.asarray(dc60, float)
        out.append(_check("dc60", "Distortion DC(60)", f"DC(60) <= {cap:g}", dc60, cap - dc60, max(cap, 0.01),
                          inside & np.isfinite(dc60)))
    loss = getattr(points, "surge_margin_loss", None)
    if limits.surge_margin_min is not None and loss is not None:
        floor = limits.surge_margin_min
        loss = np.asarray(loss, float)
        if stability is None:
            remaining = np.full(np.shape(loss), np.nan)
        else:
            other = sum(v for _n, v in stability.other_losses)
            remaining = stability.available_surge_margin - loss - other
        out.append(_check("surge-margin", "Remaining surge margin", f"remaining surge margin >= {floor:g}",
                          remaining, remaining - floor, max(abs(floor), 0.01), inside & np.isfinite(remaining)))
    return out


def limiting_index(checks: list[Check], bits) -> np.ndarray:
    """Index into ``checks`` of the limiting check at each point; -1 where no check applies
    (the ranking of ``engine_air.envelope.ranking``)."""
    from engine_air.envelope.ranking import limiting_index as _limiting

    return _limiting(checks, np.shape(bits))
