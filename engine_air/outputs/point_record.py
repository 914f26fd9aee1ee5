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


def _num(x) -> float | None:
    v = float(x)
    return v if math.isfinite(v) else None


def _at(array, index):
    return np.asarray(array)[index]


def point_record(points: OperatingPoints, index, case_name: str) -> dict:
    """The JSON-ready record of the point at ``index`` (a tuple or int into the points' arrays)."""
    g = lambda name: _num(_at(getattr(points, name), index))  # noqa: E731
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
    return {
        "mach": g("mach"),
        "altitude_m": g("altitude_m"),
        "case": case_name,
        "freestream": {
            "static_pressure_pa": g("static_pressure_pa"),
            "static_temperature_k": g("static_temperature_k"),
            "total_pressure_pa": g("total_pressure_pa"),
            "total_temperature_k": g("total_temperature_k"),
            "velocity_m_s": g("velocity_m_s"),
            "density_kg_m3": g("density_kg_m3"),
            "speed_of_sound_m_s": g("speed_of_sound_m_s"),
        },
        "theta2": g("theta2"),
        "corrected_flow_kg_s": g("corrected_flow_kg_s"),
        "mass_flow_kg_s": g("mass_flow_kg_s"),
        "recovery": g("recovery"),
        "external_recovery": g("external_recovery"),
        "duct_recovery": g("duct_recovery"),
        "reference_recovery": g("reference_recovery"),
        "face_mach": g("face_mach"),
        "face_mach_margin": _num(_at(points.face_mach_margin, index)),
        "throat_mach": g("throat_mach"),
        "capture_mach": g("capture_mach"),
        "mass_flow_ratio": g("mass_flow_ratio"),
        "max_mass_flow_ratio": g("max_mass_flow_ratio"),
        "spillage_fraction": g("spillage_fraction"),
        "additive_drag_n": g("additive_drag_n"),
        "additive_drag_coefficient": g("additive_drag_coefficient"),
        "spillage_drag_coefficient": g("spillage_drag_coefficient"),
        "face_static_to_ambient": g("face_static_to_ambient"),
        "relative_tip_mach": g("relative_tip_mach"),
        # airflow management and the installation ledger (method sections 12-13), SI units
        "captured_flow_kg_s": g("captured_flow_kg_s"),
        "bleed_fraction": g("bleed_fraction"),
        "bleed_flow_kg_s": g("bleed_flow_kg_s"),
        "bypass_fraction": g("bypass_fraction"),
        "bypass_flow_kg_s": g("bypass_flow_kg_s"),
        "auxiliary_flow_kg_s": g("auxiliary_flow_kg_s"),
        "bypass_shortfall_kg_s": g("bypass_shortfall_kg_s"),
        "tip_speed_m_s": g("tip_speed_m_s"),
        "ram_drag_n": g("ram_drag_n"),
        "spillage_drag_n": g("spillage_drag_n"),
        "bleed_drag_n": g("bleed_drag_n"),
        "bypass_drag_n": g("bypass_drag_n"),
        "net_thrust_n": g("net_thrust_n"),
        "installed_thrust_n": g("installed_thrust_n"),
        "installation_loss_fraction": g("installation_loss_fraction"),
        "thrust_reference_recovery": g("thrust_reference_recovery"),
        "judged": not (bits & (F.OUTSIDE_ENVELOPE | F.OUTSIDE_CASE_REGION)),
        "regime": REGIMES[int(_at(points.regime, index))],
        # mixed compression only (method §11); null for the other types
        "started": None if points.started is None else bool(_at(points.started, index)),
        "self_start_contraction": None if points.self_start_contraction is None
        else _num(_at(points.self_start_contraction, index)),
        "flags": names,
        "flag_descriptions": {n: F.DESCRIPTIONS[n] for n in names},
        "limiting": points.checks[limiting].name if limiting >= 0 else None,
        "checks": checks,
        # None where no limit could be judged (e.g. outside the atmosphere model)
        "holds": (not any(c["holds"] is False for c in checks)) if any(c["holds"] is not None for c in checks) else None,
    }


def station_table(project: Project, points: OperatingPoints, index) -> list[dict]:
    """Stations 0, 1, th, 2 at one point: dicts with station, name, mach, p_pa, t_k, pt_pa, tt_k, v_m_s, area_m2."""
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
        row("th", "throat", at("throat_mach"), pi_ext * pt_inlet, inlet.throat_area_m2),
        row("2", "engine face", at("face_mach"), pi * pt_inlet, inlet.face_area_m2),
    ]


def shock_table(project: Project, points: OperatingPoints, index) -> list[dict]:
    """The external shocks at one point: kind, Mach ahead and behind, wave angle (deg), total-pressure ratio."""
    m0 = float(_at(points.mach, index))
    rows = []
    if m0 <= 1.0:
        return rows
    m = m0
    n = 0 if points.ramp_wave_angle_rad is None else points.ramp_wave_angle_rad.shape[0]
    for k in range(n):
        beta = float(points.ramp_wave_angle_rad[k][index])
        if not math.isfinite(beta):
            break
        m_after = float(points.ramp_downstream_mach[k][index])
        s = oblique_shock(m, math.radians(project.inlet.ramp_angles_deg[k]))
        rows.append({"kind": f"ramp {k + 1} oblique", "mach_ahead": m, "mach_behind": m_after,
                     "wave_angle_deg": math.degrees(beta), "total_pressure_ratio": float(s.total_pressure_ratio)})
        m = m_after
    if m > 1.0:
        ns = normal_shock(m)
        rows.append({"kind": "terminal normal", "mach_ahead": m, "mach_behind": float(ns.downstream_mach),
                     "wave_angle_deg": 90.0, "total_pressure_ratio": float(ns.total_pressure_ratio)})
    return rows
