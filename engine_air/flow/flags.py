"""Status flags carried by every evaluated point (method §8).

Flags are bits in an integer array (``FLAG_DTYPE``, 32 bits: every bit below fits, and a grid's flags cost
4 bytes a point) so that a whole grid carries them without Python objects. ``names_of(bits)`` turns one point's bits into the names used
in files and JSON; ``DESCRIPTIONS`` gives the plain-words meaning shown to users.
A point with no bit set is ``ok``.

The module lives with the match (``engine_air.flow``), which sets the flags; ``engine_air.envelope.flags``
re-exports it for the code that judges and reads them.

>>> names_of(FACE_CHOKED | LOW_SPEED)
['face-choked', 'low-speed']
>>> flag_where(np.array([True, False]), SUPERCRITICAL).tolist()
[8, 0]
"""

from __future__ import annotations

import numpy as np

# name -> bit value. Order is the order in which names are listed.
FLAG_BITS: dict[str, int] = {
    "outside-envelope": 1 << 0,
    "face-choked": 1 << 1,
    "throat-choked": 1 << 2,
    "supercritical": 1 << 3,
    "buzz-risk": 1 << 4,
    "shock-detached": 1 << 5,
    "shock-inside-cowl": 1 << 6,
    "demand-extrapolated": 1 << 7,
    "low-speed": 1 << 8,
    "outside-atmosphere": 1 << 9,
    "additive-drag-not-modelled": 1 << 10,
    "no-tip-speed": 1 << 11,
    "unstarted": 1 << 20,
    "unstart-risk": 1 << 21,
    # airflow management and the installation ledger (method section 12-14)
    "no-thrust-data": 1 << 22,
    "outside-case-region": 1 << 23,
    "bypass-insufficient": 1 << 24,
    # measured characteristics over the model (method section 17)
    "from-data": 1 << 25,
    "outside-data": 1 << 26,
    "incidence-not-modelled": 1 << 27,
}

FLAG_DTYPE = np.int32
"""The integer type of a flags array: holds every bit of ``FLAG_BITS`` (bits 0 to 30 fit)."""
assert max(FLAG_BITS.values()) < 2**31, "a flag bit beyond int32: widen FLAG_DTYPE"

OUTSIDE_ENVELOPE = FLAG_BITS["outside-envelope"]
FACE_CHOKED = FLAG_BITS["face-choked"]
THROAT_CHOKED = FLAG_BITS["throat-choked"]
SUPERCRITICAL = FLAG_BITS["supercritical"]
BUZZ_RISK = FLAG_BITS["buzz-risk"]
SHOCK_DETACHED = FLAG_BITS["shock-detached"]
SHOCK_INSIDE_COWL = FLAG_BITS["shock-inside-cowl"]
DEMAND_EXTRAPOLATED = FLAG_BITS["demand-extrapolated"]
LOW_SPEED = FLAG_BITS["low-speed"]
OUTSIDE_ATMOSPHERE = FLAG_BITS["outside-atmosphere"]
ADDITIVE_DRAG_NOT_MODELLED = FLAG_BITS["additive-drag-not-modelled"]
NO_TIP_SPEED = FLAG_BITS["no-tip-speed"]
UNSTARTED = FLAG_BITS["unstarted"]
UNSTART_RISK = FLAG_BITS["unstart-risk"]
NO_THRUST_DATA = FLAG_BITS["no-thrust-data"]
OUTSIDE_CASE_REGION = FLAG_BITS["outside-case-region"]
BYPASS_INSUFFICIENT = FLAG_BITS["bypass-insufficient"]
FROM_DATA = FLAG_BITS["from-data"]
OUTSIDE_DATA = FLAG_BITS["outside-data"]
INCIDENCE_NOT_MODELLED = FLAG_BITS["incidence-not-modelled"]

DESCRIPTIONS: dict[str, str] = {
    "ok": "No flag: every modelled quantity is defined and no special regime applies.",
    "outside-envelope": "The condition lies outside the flight-envelope polygon; it is computed but not judged.",
    "face-choked": "The engine's corrected-flow demand reaches the choking flow of the face area: no subsonic face "
    "Mach exists. The face is taken as sonic and the point fails.",
    "throat-choked": "The throat would need Mach 1 or more to pass the demand: flow is held at the throat's choked "
    "value and recovery falls in proportion.",
    "supercritical": "The engine asks for more air than the shock system can capture: the terminal shock is swallowed "
    "into the duct and recovery falls below the critical value.",
    "buzz-risk": "Subcritical operation with an oblique or conical shock ahead of the cowl and captured flow below "
    "the stable fraction of the maximum: shock oscillation (buzz) is possible.",
    "shock-detached": "A ramp or cone turns the flow more than an attached shock can at the local Mach number: a "
    "bow shock stands ahead of it and the rest of the compression is taken as one normal shock.",
    "shock-inside-cowl": "Flight Mach above the shock-on-lip design: the ramp or cone shocks fall inside the cowl lip.",
    "demand-extrapolated": "The face temperature ratio theta2 lies outside the rating's table: the end value of "
    "corrected flow is held.",
    "low-speed": "Flight Mach below 0.05: the captured stream tube, mass-flow ratio, spillage and drag coefficients "
    "are not defined (static suction); face and throat Mach use p_t0 = p0.",
    "outside-atmosphere": "Altitude outside the standard atmosphere model (-5 km to 84.852 km geopotential), or an "
    "ISA offset that leaves no positive temperature: nothing can be computed or judged.",
    "additive-drag-not-modelled": "The inlet type gives no supersonic pre-entry drag here, so additive drag and the "
    "thrust items that need it are not computed.",
    "no-tip-speed": "The rating gives no fan tip speed: blade relative tip Mach is not computed.",
    "unstarted": "Mixed-compression inlet not started: accelerating from Mach 1 it has not yet swallowed its "
    "starting shock (throat too small for the Kantrowitz self-start limit) or it cannot run started here; a "
    "normal shock stands ahead of the cowl, recovery is low and the excess air spills.",
    "unstart-risk": "Mixed-compression inlet started, but the engine takes less air than the inlet captures: "
    "without bleed or bypass to take the excess the terminal shock would be expelled and the inlet unstart.",
    "no-thrust-data": "The rating gives no thrust table and recovery exchange rate: net and installed thrust and "
    "the installation loss are not computed.",
    "outside-case-region": "The condition lies outside the region (Mach range, altitude range) where this case "
    "applies: it is computed but judged by no limit.",
    "bypass-insufficient": "The bypass doors cannot pass all the air the inlet captures at critical and the engine "
    "and bleed do not take: the rest spills ahead of the cowl (external compression) or would unstart a "
    "mixed-compression inlet.",
    "from-data": "Recovery, maximum mass-flow ratio and the stability limit come from the project's measured or "
    "computed characteristics (interpolated in Mach and incidence), not from the shock model.",
    "outside-data": "The project has a characteristics table, but it does not cover this condition (Mach number or "
    "incidence outside the tested ones, or less flow than tested): the shock model is used here.",
    "incidence-not-modelled": "The case gives an angle of attack or sideslip here, but no characteristics cover it: "
    "the shock model is at zero incidence, so incidence effects are not included.",
}


def names_of(bits: int) -> list[str]:
    """Flag names set in one point's integer ``bits``; ``["ok"]`` when none is set."""
    bits = int(bits)
    names = [name for name, bit in FLAG_BITS.items() if bits & bit]
    return names or ["ok"]


def has(bits: np.ndarray | int, flag: int) -> np.ndarray:
    """Boolean array: which points carry ``flag``."""
    return (np.asarray(bits) & flag) != 0


def flag_where(condition, flag: int) -> np.ndarray:
    """``flag`` where ``condition`` holds, else 0, as a ``FLAG_DTYPE`` array of the condition's shape."""
    return np.where(condition, FLAG_DTYPE(flag), FLAG_DTYPE(0))
