"""Mixed-compression inlet (method §11): started recovery, starting history and hysteresis, flags, the
started check, the file keys and the sample.

Outside references, named beside each check: NACA Report 1135 (1953) oblique-shock, normal-shock and
area relations through the ``pygasflow`` library (its oblique, normal-shock and isentropic solvers), and the
Kantrowitz-Donaldson starting rule (NACA ACR L5D20, 1945) written out in the test from those relations.
"""

from __future__ import annotations

import copy
import dataclasses
import pathlib

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from pygasflow import isentropic_solver, normal_shockwave_solver, oblique_shockwave_solver

from engine_air.envelope import flags as F
from engine_air.envelope.evaluate import evaluate_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.inlets.mixed_compression import INLET, started_accelerating, started_along, starting_machs
from engine_air.inlets.registry import inlet_type
from engine_air.outputs.point_record import point_record
from engine_air.project.errors import ProjectError
from engine_air.project.model import Schedule
from engine_air.project.toml_file import dumps_project, load_project, project_from_dict

ROOT = pathlib.Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_projects" / "mixed_compression_throat_schedule.toml"

BASE = {
    "project": {"format": 1, "title": "test mixed inlet"},
    "limits": {"face_mach_max": 0.7},
    "inlet": {
        "type": "mixed-compression", "capture_area_m2": 1.0, "throat_area_m2": 0.85, "face_area_m2": 0.9,
        "ramp_angles_deg": [5.0, 5.0], "shock_on_lip_mach": 2.5, "internal_recovery_factor": 0.97,
    },
    "engine": {"rating": [{"name": "r", "theta": [0.8, 2.2], "corrected_flow_kg_s": [100.0, 100.0]}]},
    "envelope": {"mach": [0.5, 3.0, 3.0, 0.5], "altitude_m": [10000.0, 10000.0, 18000.0, 18000.0]},
    "grid": {"mach_points": 21, "altitude_points": 5},
    "case": [{"name": "c", "rating": "r"}],
}


def project(**inlet_changes):
    data = copy.deepcopy(BASE)
    limits = inlet_changes.pop("limits", None)
    if limits:
        data["limits"].update(limits)
    data["inlet"].update(inlet_changes)
    return project_from_dict(data)


def oblique(m, deg):
    """pygasflow weak oblique shock (NACA Report 1135 relations): downstream Mach and total-pressure ratio."""
    r = oblique_shockwave_solver("mu", m, "theta", deg, to_dict=True)
    return r["md"], r["tpr"]


def ars(m):
    return isentropic_solver("m", m, to_dict=True)["ars"]  # A/A*, NACA Report 1135 eq. 80


def tpr_normal(m):
    return normal_shockwave_solver("mu", m, to_dict=True)["tpr"]  # NACA Report 1135 eq. 99


# -- started recovery worked by hand ------------------------------------------------------------------

def test_started_recovery_is_ramps_times_cowl_times_normal_shock_at_the_throat():
    # Two 5 deg ramps, cowl turning back 10 deg, A_th/A_c = 0.85, eta_int = 0.97, M0 = 2.5 (started: it
    # self-starts lower, see below). Shock by shock with pygasflow (NACA Report 1135 relations):
    m_a, t1 = oblique(2.5, 5.0)
    m_e, t2 = oblique(m_a, 5.0)
    m_1, tc = oblique(m_e, 10.0)
    m_th = isentropic_solver("crit_area_super", 0.85 * ars(m_1), to_dict=True)["m"]  # A(M_th)/A* = c A(M1)/A*
    expected = t1 * t2 * tc * tpr_normal(m_th) * 0.97
    p = project()
    shocks = INLET.shock_system(p.inlet, np.array([2.5]))
    assert bool(shocks.started[0])
    assert float(shocks.external_recovery[0]) == pytest.approx(float(expected), rel=1e-7)
    assert float(shocks.terminal_upstream_mach[0]) == pytest.approx(float(m_th), rel=1e-7)
    # the self-start contraction reported is Kantrowitz's at the post-ramp Mach M_e
    kantrowitz = 1.0 / ars(m_e) / tpr_normal(m_e)
    assert float(shocks.self_start_contraction[0]) == pytest.approx(float(kantrowitz), rel=1e-9)
    # through the whole match: same recovery of the shock system, the supersonic throat Mach reported
    pts = evaluate_conditions(p, p.cases[0], np.array([2.5]), np.array([15000.0]))
    assert float(pts.external_recovery[0]) == pytest.approx(float(expected), rel=1e-7)
    assert float(pts.throat_mach[0]) == pytest.approx(float(m_th), rel=1e-7)
    assert bool(pts.started[0]) and not F.has(pts.flags[0], F.UNSTARTED)


def test_unstarted_recovery_is_ramps_times_normal_shock_at_the_post_ramp_mach():
    # A_th/A_c = 0.80 fixed: Kantrowitz at M_e(M0 = 2.3) is above 0.80, so accelerating to 2.3 it is unstarted
    m_a, t1 = oblique(2.3, 5.0)
    m_e, t2 = oblique(m_a, 5.0)
    kantrowitz = 1.0 / ars(m_e) / tpr_normal(m_e)
    assert kantrowitz > 0.80  # worked here: the inlet cannot swallow its shock at this Mach number
    p = project(throat_area_m2=0.80)
    pts = evaluate_conditions(p, p.cases[0], np.array([2.3]), np.array([15000.0]))
    assert not bool(pts.started[0]) and F.has(pts.flags[0], F.UNSTARTED)
    assert float(pts.external_recovery[0]) == pytest.approx(float(t1 * t2 * tpr_normal(m_e)), rel=1e-7)
    assert float(pts.self_start_contraction[0]) == pytest.approx(float(kantrowitz), rel=1e-9)


# -- history and hysteresis ---------------------------------------------------------------------------

SCHEDULED = dict(throat_area_m2=0.80, schedule={"mach": [2.3, 2.6], "throat_area_m2": [0.80, 0.85]})


def expected_starting_machs(contraction_of):
    """Self-start and unstart Mach worked on a fine grid from pygasflow shock and area relations:
    started running needs c >= A*/A(M1) (isentropic contraction, NACA 1135 eq. 80); self-starting needs also
    c >= (A*/A)(M_e)/pi_ns(M_e) (Kantrowitz-Donaldson)."""
    m0 = np.arange(2.2, 2.7, 1e-4)
    m_a, _ = oblique(m0, 5.0)
    m_e, _ = oblique(m_a, 5.0)
    m_1, _ = oblique(m_e, 10.0)
    c = contraction_of(m0)
    can_run = c >= 1.0 / ars(m_1)
    starts = can_run & (c >= 1.0 / ars(m_e) / tpr_normal(m_e))
    i = int(np.argmax(starts))
    j = i
    while j > 0 and can_run[j - 1]:
        j -= 1
    return m0[i], m0[j]


def test_self_start_and_unstart_mach_of_a_throat_schedule_that_opens():
    p = project(**SCHEDULED)
    start, unstart = starting_machs(p.inlet)
    exp_start, exp_unstart = expected_starting_machs(lambda m: np.interp(m, [2.3, 2.6], [0.80, 0.85]))
    assert start == pytest.approx(exp_start, abs=2e-4)
    assert unstart == pytest.approx(exp_unstart, abs=2e-4)
    assert unstart < start - 0.05  # a real hysteresis band
    # the same inlet with its throat held at 0.80 starts only much later: it starts because the throat opens
    fixed_start, _ = starting_machs(dataclasses.replace(p.inlet, schedule=None))
    exp_fixed, _ = expected_starting_machs(lambda m: np.full_like(m, 0.80))
    assert fixed_start == pytest.approx(exp_fixed, abs=2e-4)
    assert fixed_start > start + 0.1


def test_hysteresis_along_a_row():
    p = project(**SCHEDULED)
    start, unstart = starting_machs(p.inlet)
    band = np.linspace(unstart + 0.01, start - 0.01, 5)
    below = np.linspace(2.0, unstart - 0.01, 5)
    above = np.linspace(start + 0.001, 3.0, 7)
    # accelerating (the map's history): unstarted below the self-start Mach, started above, on every row
    m = np.concatenate([below, band, above])
    pts = evaluate_conditions(p, p.cases[0], m[None, :], np.array([[11000.0], [15000.0], [18000.0]]))
    expect = np.concatenate([np.zeros(10, bool), np.ones(7, bool)])
    for row in range(3):
        np.testing.assert_array_equal(pts.started[row], expect)
        np.testing.assert_array_equal(F.has(pts.flags[row], F.UNSTARTED), ~expect)
    # reached from above (accelerate past the self-start Mach, then slow down): started through the band,
    # unstarted once below the unstart Mach
    history = np.concatenate([[start + 0.2], band[::-1], [unstart - 0.01, start + 0.05]])
    got = started_along(p.inlet, history)
    np.testing.assert_array_equal(got, [True] * 6 + [False, True])
    # reached from below: unstarted in the band
    assert not started_along(p.inlet, np.concatenate([[2.0], band])).any()


def test_started_state_per_mach_is_independent_of_the_asked_set():
    p = project(**SCHEDULED)
    m = np.linspace(1.5, 3.0, 301)
    full = started_accelerating(p.inlet, m)
    for k in (0, 100, 250, 300):
        assert started_accelerating(p.inlet, m[k:k + 1])[0] == full[k]


# -- flags and the started check ------------------------------------------------------------------------

def test_unstart_risk_where_started_and_the_engine_takes_less_than_captured():
    p = project()  # fixed 0.85: started at M0 2.5
    low = project(limits={})
    low = dataclasses.replace(low, ratings=(dataclasses.replace(low.ratings[0], corrected_flow_kg_s=(40.0, 40.0)),))
    for proj, risk in ((p, None), (low, True)):
        pts = evaluate_conditions(proj, proj.cases[0], np.array([2.5]), np.array([15000.0]))
        ratio = float(pts.mass_flow_ratio[0] / pts.max_mass_flow_ratio[0])
        assert bool(pts.started[0])
        has_risk = bool(F.has(pts.flags[0], F.UNSTART_RISK))
        assert has_risk == (ratio < 1.0 - 0.005)
        if risk:
            assert has_risk
            assert bool(pts.check("started").fails[0])
    # an unstarted point fails the check; the check is absent when not required
    q = project(throat_area_m2=0.80)
    pts = evaluate_conditions(q, q.cases[0], np.array([1.5, 2.3]), np.array([15000.0]))
    assert pts.check("started").fails.all()
    off = project(throat_area_m2=0.80, limits={"started_required": False})
    pts = evaluate_conditions(off, off.cases[0], np.array([2.3]), np.array([15000.0]))
    assert "started" not in [c.name for c in pts.checks]
    assert F.has(pts.flags[0], F.UNSTARTED)  # the flag stays


def test_point_json_keys():
    p = project()
    pts = evaluate_conditions(p, p.cases[0], np.array([0.8, 2.5]), np.array([15000.0]))
    rec = point_record(pts, 1, "c")
    assert rec["started"] is True and 0.5 < rec["self_start_contraction"] < 1.0
    assert point_record(pts, 0, "c")["started"] is False
    other = load_project(ROOT / "sample_projects" / "supersonic_two_ramp.toml")
    pts = evaluate_conditions(other, other.cases[0], np.array([1.8]), np.array([11000.0]))
    rec = point_record(pts, 0, other.cases[0].name)
    assert rec["started"] is None and rec["self_start_contraction"] is None
    for name in ("unstarted", "unstart-risk"):
        assert name in F.DESCRIPTIONS and name in F.FLAG_BITS


# -- file ---------------------------------------------------------------------------------------------

def test_file_keys_and_round_trip():
    p = project(**SCHEDULED)
    assert p.inlet.type == "mixed-compression" and p.inlet.internal_recovery_factor == 0.97
    assert p.inlet.schedule == Schedule(mach=(2.3, 2.6), throat_area_m2=(0.80, 0.85))
    from engine_air.project.load import tomllib  # tomli on Python 3.10

    again = project_from_dict(tomllib.loads(dumps_project(p)))
    assert again == p
    for bad in ({"internal_recovery_factor": 0.0}, {"internal_recovery_factor": 1.2},
                {"schedule": {"mach": [2.0, 1.9], "throat_area_m2": [0.8, 0.8]}},
                {"schedule": {"mach": [2.0, 2.5], "throat_area_m2": [0.8, 1.1]}},
                {"schedule": {"mach": [2.0, 2.5], "throat_area_m2": [0.8]}},
                {"throat_area_m2": 1.0}, {"ramp_angles_deg": [20.0, 20.0]}):
        with pytest.raises(ProjectError):
            project(**bad)
    with pytest.raises(ProjectError):
        project(limits={"started_required": "yes"})
    assert "mixed-compression" in inlet_type("mixed-compression").name


def test_sample_has_an_unstarted_corner_and_starts_because_the_throat_opens():
    p = load_project(SAMPLE)
    assert not p.warnings
    start, unstart = starting_machs(p.inlet)
    fixed_start, _ = starting_machs(dataclasses.replace(p.inlet, schedule=None))
    assert start is not None and start < 2.2
    assert fixed_start is None or fixed_start > max(p.envelope.mach)  # never starts in its envelope otherwise
    result = evaluate_project(p)
    pts = result.cases[0].points
    inside = result.inside
    sup = inside & (result.mach[None, :] > 1.0)
    unstarted = F.has(pts.flags, F.UNSTARTED) & inside
    assert unstarted.any() and (unstarted == (sup & (result.mach[None, :] < start))).all()
    assert (pts.started[sup & (result.mach[None, :] > start)]).all()


# -- properties ---------------------------------------------------------------------------------------

@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    r1=st.floats(2.0, 9.0), r2=st.floats(0.0, 8.0), md=st.floats(2.0, 3.5), c=st.floats(0.55, 0.99),
    c_open=st.floats(0.0, 0.3), eta=st.floats(0.8, 1.0), m0=st.floats(0.0, 4.0), h=st.floats(0.0, 20000.0),
    flow=st.floats(20.0, 200.0),
)
def test_properties(r1, r2, md, c, c_open, eta, m0, h, flow):
    ramps = [r1] if r2 < 1.0 else [r1, r2]
    opened = min(c + c_open, 1.0)
    try:
        p = project(ramp_angles_deg=ramps, shock_on_lip_mach=md, throat_area_m2=c, internal_recovery_factor=eta,
                    schedule={"mach": [1.5, md], "throat_area_m2": [opened, c]})
    except ProjectError:
        return  # a ramp shock detached at the design Mach number: refused by the loader
    p = dataclasses.replace(p, ratings=(dataclasses.replace(p.ratings[0], corrected_flow_kg_s=(flow, flow)),))
    m = np.array([m0, 1.0005, 1.7, md, 4.0])
    pts = evaluate_conditions(p, p.cases[0], m, np.array(h))
    assert np.all(pts.recovery <= 1.0 + 1e-12) and np.all(pts.external_recovery <= 1.0 + 1e-12)
    mfr_max = pts.max_mass_flow_ratio[m > 1.0]  # subsonic: the throat's choking flow, may exceed 1
    assert np.all(np.isfinite(mfr_max)) and np.all(mfr_max <= 1.0 + 1e-12)
    assert np.all((pts.self_start_contraction > 0.59) & (pts.self_start_contraction <= 1.0))
    undefined_ok = F.has(pts.flags, F.LOW_SPEED)
    for key in ("recovery", "external_recovery", "face_mach", "throat_mach", "mass_flow_kg_s"):
        assert np.all(np.isfinite(pts.value(key))), key
    for key in ("mass_flow_ratio", "max_mass_flow_ratio"):
        v = pts.value(key)
        assert np.all(np.isfinite(v) | undefined_ok), key
    drag = pts.additive_drag_n
    assert np.all(np.isfinite(drag) | undefined_ok | F.has(pts.flags, F.ADDITIVE_DRAG_NOT_MODELLED))
    assert not np.any(pts.started & F.has(pts.flags, F.UNSTARTED))
    assert np.all(pts.started[m <= 1.0] == False)  # noqa: E712
