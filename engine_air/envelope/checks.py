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

import numpy as np

from engine_air.envelope import flags as F
from engine_air.envelope.check_names import CHECK_NAMES
from engine_air.physics.shocks import normal_shock
from engine_air.project.model import REFERENCE_RECOVERY_NAME, LimitRegion, Limits


AT_MOST, AT_LEAST, YES_NO = "at-most", "at-least", "yes-no"
"""The senses of a limit: margin = limit - value, value - limit, or +1 where the value is 1 and -1 where it is 0."""

_QUIET = dict(invalid="ignore", over="ignore", divide="ignore")


class Check:
    """One limit evaluated at every point (arrays of the points' shape, or read-only views that broadcast to it).

    A check keeps what it is judged on: the judged ``value``, where it ``applies`` (bool), the rule of its limit
    (``limit``, a number or an array, its ``sense`` and the ``scale`` of the relative margin) and where it is
    ``forced`` to fail whatever its margin (a choked face or throat; None: nowhere). Its ``margin`` (in the
    quantity's units, positive where the limit holds), ``relative_margin`` (the margin over the limit's magnitude,
    held within +-``MAX_RELATIVE_MARGIN``; -1 at most where forced; NaN where the check does not apply) and
    ``fails`` (bool: applies and does not hold) are computed from these when read, by the same expressions, to
    the same bits, so that a map keeps one array per check instead of four (``check_rank`` computes the margin
    once for both).

    ``Check(name, label, limit_text, value, margin, relative_margin, applies, fails)`` with the arrays given keeps
    and returns them as given (a check built by hand, e.g. in a test).
    """

    __slots__ = ("name", "label", "limit_text", "value", "applies", "limit", "sense", "scale", "forced",
                 "_margin", "_relative", "_fails")

    def __init__(self, name, label, limit_text, value, margin=None, relative_margin=None, applies=None, fails=None,
                 *, limit=None, sense=AT_MOST, scale=1.0, forced=None):
        self.name, self.label, self.limit_text = name, label, limit_text
        self.value, self.applies = value, applies
        self.limit, self.sense, self.scale, self.forced = limit, sense, scale, forced
        self._margin, self._relative, self._fails = margin, relative_margin, fails

    def __repr__(self) -> str:
        return f"Check({self.name!r}, {self.limit_text!r}, shape {np.shape(self.applies)})"

    @property
    def margin(self) -> np.ndarray:
        """Positive where the limit holds, in the quantity's units (where the check applies; anything elsewhere)."""
        if self._margin is not None:
            return self._margin
        with np.errstate(**_QUIET):
            if self.sense == AT_MOST:
                return self.limit - self.value
            if self.sense == AT_LEAST:
                return self.value - self.limit
            return np.where(self.value == 0.0, -1.0, 1.0)  # YES_NO: the value is 1 (holds) or 0

    @margin.setter
    def margin(self, value) -> None:
        self._margin = value

    def _relative_of(self, margin) -> np.ndarray:
        with np.errstate(**_QUIET):
            # a limit as small as the file allows (e.g. 5e-324) must not overflow the ranking: keep it finite
            relative = np.where(self.applies, np.minimum(np.maximum(margin / abs(self.scale), -MAX_RELATIVE_MARGIN),
                                                         MAX_RELATIVE_MARGIN), np.nan)  # np.clip's values, fewer passes
            if self.forced is not None:
                relative = np.where(self.forced & self.applies, np.minimum(relative, -1.0), relative)
        return relative

    def _fails_of(self, margin) -> np.ndarray:
        with np.errstate(**_QUIET):
            fails = self.applies & (margin < 0.0)
        if self.forced is not None:
            fails = fails | (self.applies & self.forced)
        return fails

    @property
    def relative_margin(self) -> np.ndarray:
        """The margin over the limit's magnitude (see the class text); NaN where the check does not apply."""
        return self._relative if self._relative is not None else self._relative_of(self.margin)

    @relative_margin.setter
    def relative_margin(self, value) -> None:
        self._relative = value

    @property
    def fails(self) -> np.ndarray:
        """Bool: the check applies and does not hold."""
        return self._fails if self._fails is not None else self._fails_of(self.margin)

    @fails.setter
    def fails(self, value) -> None:
        self._fails = value

    def relative_and_fails(self) -> tuple[np.ndarray, np.ndarray]:
        """``(relative_margin, fails)``, the margin computed once for both (what the ranking reads)."""
        if self._margin is None and self._relative is None and self._fails is None:
            margin = self.margin  # a new array of its own: the relative margin is made in it, in place
            applies = np.asarray(self.applies)
            if isinstance(margin, np.ndarray) and margin.ndim and margin.dtype == float and applies.shape == margin.shape:
                return self._relative_and_fails_in(margin, applies)
        margin = self.margin if self._relative is None or self._fails is None else None
        return (self._relative if self._relative is not None else self._relative_of(margin),
                self._fails if self._fails is not None else self._fails_of(margin))

    def _relative_and_fails_in(self, margin: np.ndarray, applies: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``_relative_of`` and ``_fails_of`` in fewer passes, the relative margin written over ``margin``: the
        same operations on the same values (x / 1 is x), so the same bits."""
        with np.errstate(**_QUIET):
            fails = np.less(margin, 0.0)
            fails &= applies
            if self.forced is not None:
                fails |= self.forced & applies
            scale = abs(self.scale)
            if scale != 1.0:
                np.divide(margin, scale, out=margin)
            np.maximum(margin, -MAX_RELATIVE_MARGIN, out=margin)
            np.minimum(margin, MAX_RELATIVE_MARGIN, out=margin)
            np.copyto(margin, np.nan, where=~applies)
            if self.forced is not None:
                forced = self.forced & applies
                np.copyto(margin, np.minimum(margin, -1.0), where=forced)
        return margin, fails

    def arrays(self) -> dict[str, object]:
        """What the check keeps (the arrays and numbers it is made of), by attribute name."""
        return {k: getattr(self, k) for k in ("value", "applies", "limit", "forced", "_margin", "_relative", "_fails")}

    def at(self, index: tuple) -> "Check":
        """The check at ``index`` (a tuple into the points' shape) alone."""
        shape = np.shape(self.applies)

        def one(a):
            return a if a is None or np.ndim(a) == 0 else np.broadcast_to(a, shape)[index]
        return Check(self.name, self.label, self.limit_text, one(self.value), one(self._margin),
                     one(self._relative), one(self.applies), one(self._fails), limit=one(self.limit),
                     sense=self.sense, scale=self.scale, forced=one(self.forced))

    def restricted(self, inside) -> "Check":
        """The check judged only where ``inside`` (bool): no verdict and no margin elsewhere."""
        self.applies = self.applies & inside
        if self._fails is not None:
            self._fails = self._fails & inside
        if self._relative is not None:
            self._relative = np.where(inside, self._relative, np.nan)
        return self

    def margin_or_nan(self) -> np.ndarray:
        return np.where(self.applies, self.margin, np.nan)


MAX_RELATIVE_MARGIN = 1e12
"""Relative margins are held within +-1e12 (a limit near zero would otherwise give an infinite one)."""


def _check(name, label, limit_text, value, limit, sense, scale, applies, forced_fail=None) -> Check:
    """The check of ``value`` against ``limit`` in ``sense``, judged where ``applies`` and its margin is finite."""
    if name not in CHECK_NAMES:  # a [limits.region.NAME] table must be able to name every check
        raise AssertionError(f"check {name!r} is not listed in engine_air.envelope.check_names.CHECK_NAMES")
    check = Check(name, label, limit_text, value, limit=limit, sense=sense, scale=scale)
    with np.errstate(**_QUIET):
        check.applies = np.asarray(applies, bool) & np.isfinite(check.margin)
    if forced_fail is not None:
        forced = np.asarray(forced_fail, bool)
        check.forced = forced if forced.any() else None  # choked nowhere: nothing to keep
    return check


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
    return check.restricted(in_region(region, points.mach, points.altitude_m))


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
            points.face_mach, limits.face_mach_max, AT_MOST, limits.face_mach_max, inside,
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
            throat_judged, throat_limit, AT_MOST, throat_limit, inside,
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
                    shock_recovery, points.reference_recovery, AT_LEAST, 1.0,
                    inside & (points.mach > 1.0),
                )
            )
        else:
            floor = float(limits.recovery_min)
            checks.append(
                _check(
                    "recovery", "Total-pressure recovery", f"pi >= {floor:g}",
                    points.recovery, floor, AT_LEAST, floor, inside,
                )
            )
    if limits.stable_flow_fraction is not None:
        checks.append(_stability_check(limits, points, inside))
    if limits.relative_tip_mach_max is not None:
        checks.append(
            _check(
                "relative-tip-mach", "Blade relative tip Mach", f"M_rel <= {limits.relative_tip_mach_max:g}",
                points.relative_tip_mach, limits.relative_tip_mach_max, AT_MOST,
                limits.relative_tip_mach_max, inside & np.isfinite(points.relative_tip_mach),
            )
        )
    if limits.spillage_fraction_max is not None:
        cap = limits.spillage_fraction_max
        spill = points.spillage_fraction  # computed when read: once
        checks.append(
            _check(
                "spillage", "Spillage fraction", f"spillage <= {cap:g}",
                spill, cap, AT_MOST, max(cap, 0.01), inside & np.isfinite(spill),
            )
        )
    started = getattr(points, "started", None)
    if started is not None and (limits.started_required is None or limits.started_required):
        bad = F.has(bits, F.UNSTARTED) | F.has(bits, F.UNSTART_RISK)
        checks.append(
            _check(
                "started", "Inlet started (mixed compression)", "started, no unstart risk",
                np.where(bad, 0.0, 1.0), None, YES_NO, 1.0, inside & (points.mach > 1.0),
            )
        )
    if limits.installation_loss_max is not None:
        cap = limits.installation_loss_max
        loss = points.installation_loss_fraction
        checks.append(
            _check(
                "installation-loss", "Installation loss", f"1 - F_inst/F_n <= {cap:g}",
                loss, cap, AT_MOST, max(cap, 0.01), inside & np.isfinite(loss),
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
    return _check("stability", "Stable capture (buzz)", text, fraction, threshold, AT_LEAST,
                  limits.stable_flow_fraction, inside & applies)


def distortion_checks(limits: Limits, points, inside, stability=None) -> list[Check]:
    """``dc60`` and ``surge-margin`` (method §18) where the points carry distortion data (finite values)."""
    out = []
    dc60 = getattr(points, "dc60", None)
    if limits.dc60_max is not None and dc60 is not None:
        cap = limits.dc60_max
        dc60 = np.asarray(dc60, float)
        out.append(_check("dc60", "Distortion DC(60)", f"DC(60) <= {cap:g}", dc60, cap, AT_MOST, max(cap, 0.01),
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
                          remaining, floor, AT_LEAST, max(abs(floor), 0.01), inside & np.isfinite(remaining)))
    return out


def limiting_index(checks: list[Check], bits) -> np.ndarray:
    """Index into ``checks`` of the limiting check at each point; -1 where no check applies
    (the ranking of ``engine_air.envelope.ranking``)."""
    from engine_air.envelope.ranking import limiting_index as _limiting

    return _limiting(checks, np.shape(bits))
