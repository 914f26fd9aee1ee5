"""One point's state as plain data: the point JSON of the interfaces document and a station table.

``point_record(points, index, case_name)`` gives the dict written by
``engine-air point --json`` (undefined values are None, with a flag saying why);
``station_table(project, points, index)`` gives the free-stream, capture,
throat and face stations (M, p, T, p_t, T_t, V, area) for the detail view.
"""

from __future__ import annotations

import math

import numpy as np

from engine_air.envelope import flags as F
from engine_air.physics.constants import GAMMA, R_AIR
from engine_air.physics.isentropic import pressure_ratio, temperature_ratio
from engine_air.physics.shocks import normal_shock, oblique_shock
from engine_air.flow.match import REGIMES, OperatingPoints
from engine_air.project.model import Project
from engine_air.outputs.quantities import JSON_KEYS, REGISTRY


def _num(x) -> float | None:
    v = float(x)
    return v if math.isfinite(v) else None


def _at(array, index):
    return np.asarray(array)[index]


def point_record(points: OperatingPoints, index, case_name: str) -> dict:
    """The JSON-ready record of the point at ``index`` (a tuple or int into the points' arrays).

    Keys come from ``engine_air.outputs.quantities`` (``JSON_KEYS``; those of group
    "freestream" nested under ``"freestream"``), then ``regime``, ``flags``,
    ``flag_descriptions``, ``limiting``, ``checks``, ``judged`` and ``holds``.
    ``judged`` is false where no limit is judged: outside the envelope polygon
    (flag ``outside-envelope``: the point is computed but never judged), outside
    the case's region (``outside-case-region``) or where no check applies (e.g.
    outside the atmosphere model). ``holds`` and
    ``worst_relative_margin`` are null where the point is not judged (the flags
    ``outside-envelope`` / ``outside-atmosphere`` say why); else whether every
    judged check holds, and the least relative margin over them.
    """
    if hasattr(points, "at"):  # the one point only: quantities computed when read then cost one point
        points, index = points.at(index), ()
    bits = int(_at(points.flags, index))
    limiting = int(_at(points.limiting, index)) if points.limiting is not None else -1
    checks = []
    for c in points.checks:
        applies = bool(_at(c.applies, index))
        checks.append(
            {
                "name": c.name,
                "label": c.label,
                "limit": c.limit_text,
                "value": _num(_at(c.value, index)) if applies else None,
                "margin": _num(_at(c.margin, index)) if applies else None,
                "holds": (not bool(_at(c.fails, index))) if applies else None,
            }
        )
    names = F.names_of(bits)
    record: dict = {}
    groups: dict[str, dict] = {}
    for key in JSON_KEYS:
        q = REGISTRY[key]
        value = _num(_at(q.values(points), index))
        if q.group:
            if q.group not in groups:
                groups[q.group] = record[q.group] = {}
            groups[q.group][key] = value
        else:
            record[key] = value
        if key == "altitude_m":
            record["case"] = case_name
    outside = bool(bits & (F.OUTSIDE_ENVELOPE | F.OUTSIDE_CASE_REGION))
    judged = (not outside) and any(c["holds"] is not None for c in checks)
    if not judged:
        record["worst_relative_margin"] = None  # nothing is judged here; the flags say why
    record.update({
        "regime": REGIMES[int(_at(points.regime, index))],
        # where measured characteristics decide the point (method §17): "data"; elsewhere "model"
        "data_source": "data" if bits & F.FROM_DATA else "model",
        # mixed compression only (method §11); null for the other types (self_start_contraction,
        # entrance_area_m2 and internal_contraction_ratio likewise)
        "started": None if points.started is None else bool(_at(points.started, index)),
        "flags": names,
        "flag_descriptions": {n: F.DESCRIPTIONS[n] for n in names},
        "limiting": points.checks[limiting].name if limiting >= 0 else None,
        "checks": checks,
        "judged": judged,
        # None where the point is not judged (outside the envelope, or no limit applies)
        "holds": (not any(c["holds"] is False for c in checks)) if judged else None,
    })
    return record


def record_in_us_units(record: dict) -> dict:
    """A copy of a point record for ``--units us``: the SI keys and values are unchanged; ``"units": "us"`` and a
    ``"us"`` block are added with every dimensional quantity of the registry in US customary units, as
    ``{"altitude_m": {"value": 30000.0, "unit": "ft"}, ...}`` (keyed by the SI key it converts)."""
    us = {}
    for key in JSON_KEYS:
        q = REGISTRY[key]
        if not q.us_unit:
            continue
        value = record[q.group][key] if q.group else record.get(key)
        us[key] = {"value": q.to_us(value), "unit": q.us_unit}
    out = dict(record)
    out["units"] = "us"
    out["us"] = us
    return out


def station_table(project: Project, points: OperatingPoints, index) -> list[dict]:
    """Stations 0, 1, th, 2 at one point: dicts with station, name, mach, p_pa, t_k, pt_pa, tt_k, v_m_s, area_m2
    (the throat area scheduled at the point's Mach number where ``[inlet.schedule]`` gives it)."""
    from engine_air.inlets.schedule import scheduled

    inlet = project.inlet
    at = lambda name: float(_at(getattr(points, name), index))  # noqa: E731
    m0, tt, pt0 = at("mach"), at("total_temperature_k"), at("total_pressure_pa")
    pt_inlet = at("static_pressure_pa") if m0 < 0.05 else pt0
    pi_ext, pi = at("external_recovery"), at("recovery")

    def row(station, name, mach, pt, area):
        t = tt * float(temperature_ratio(mach)) if math.isfinite(mach) else math.nan
        p = pt * float(pressure_ratio(mach)) if math.isfinite(mach) else math.nan
        v = mach * math.sqrt(GAMMA * R_AIR * t) if math.isfinite(t) else math.nan
        return {
            "station": station, "name": name, "mach": _num(mach), "p_pa": _num(p), "t_k": _num(t),
            "pt_pa": _num(pt), "tt_k": _num(tt), "v_m_s": _num(v), "area_m2": _num(area),
        }

    return [
        row("0", "free stream", m0, pt0, at("stream_tube_area_m2")),
        row("1", "capture plane", at("capture_mach"), pi_ext * pt_inlet, inlet.capture_area_m2),
        row("th", "throat", at("throat_mach"), pi_ext * pt_inlet, float(scheduled(inlet, "throat_area_m2", m0))),
        row("2", "engine face", at("face_mach"), pi * pt_inlet, inlet.face_area_m2),
    ]


def shock_table(project: Project, points: OperatingPoints, index) -> list[dict]:
    """The shocks at one point: kind, Mach ahead and behind, wave angle (deg), total-pressure ratio.

    Ramp (or cone) shocks first, then for a mixed-compression inlet the cowl shock and the terminal normal shock
    at the throat Mach when started (method §11), or the normal shock ahead of the cowl when unstarted; for the
    other types the terminal normal shock at the Mach behind the last oblique (or conical) shock. A cone shock's
    total-pressure ratio is the normal-shock one at its normal Mach number M sin(beta) [NACA Report 1135,
    eqs. 99 and 142: the same relation as for a plane oblique shock].
    """
    m0 = float(_at(points.mach, index))
    rows = []
    if m0 <= 1.0:
        return rows
    from engine_air.inlets.schedule import inlet_at

    inlet = inlet_at(project.inlet, m0)
    ramp_angles = tuple(getattr(inlet, "ramp_angles_deg", ()) or ())
    cones = inlet.type == "axisymmetric-spike"
    m = m0
    n = 0 if points.ramp_wave_angle_rad is None else points.ramp_wave_angle_rad.shape[0]
    for k in range(n):
        beta = float(points.ramp_wave_angle_rad[k][index])
        if not math.isfinite(beta):
            break
        m_after = float(points.ramp_downstream_mach[k][index])
        if not cones and k < len(ramp_angles):
            pt = float(oblique_shock(m, math.radians(ramp_angles[k])).total_pressure_ratio)
        else:
            pt = float(normal_shock(m * math.sin(beta)).total_pressure_ratio)
        rows.append({"kind": f"{'cone' if cones else 'ramp'} {k + 1} {'conical' if cones else 'oblique'}",
                     "mach_ahead": m, "mach_behind": m_after, "wave_angle_deg": math.degrees(beta),
                     "total_pressure_ratio": pt})
        m = m_after
    if inlet.type == "mixed-compression" and points.started is not None:
        from engine_air.inlets.mixed_compression import mixed_state

        state = mixed_state(project.inlet, np.array([m0]))
        if bool(_at(points.started, index)) and bool(state.can_run[0]):
            cowl = state.cowl
            m_cowl = float(np.asarray(cowl.downstream_mach)[0])
            rows.append({"kind": "cowl oblique", "mach_ahead": m, "mach_behind": m_cowl,
                         "wave_angle_deg": math.degrees(float(np.asarray(cowl.wave_angle_rad)[0])),
                         "total_pressure_ratio": float(np.asarray(cowl.total_pressure_ratio)[0])})
            m_th = float(state.throat_mach[0])
            ns = normal_shock(m_th)
            rows.append({"kind": "terminal normal at the throat", "mach_ahead": m_th,
                         "mach_behind": float(ns.downstream_mach), "wave_angle_deg": 90.0,
                         "total_pressure_ratio": float(ns.total_pressure_ratio)})
            return rows
        if m > 1.0:  # unstarted: the normal shock stands ahead of the cowl
            ns = normal_shock(m)
            rows.append({"kind": "normal ahead of the cowl (unstarted)", "mach_ahead": m,
                         "mach_behind": float(ns.downstream_mach), "wave_angle_deg": 90.0,
                         "total_pressure_ratio": float(ns.total_pressure_ratio)})
        return rows
    if m > 1.0:
        ns = normal_shock(m)
        rows.append({"kind": "terminal normal", "mach_ahead": m, "mach_behind": float(ns.downstream_mach),
                     "wave_angle_deg": 90.0, "total_pressure_ratio": float(ns.total_pressure_ratio)})
    return rows
