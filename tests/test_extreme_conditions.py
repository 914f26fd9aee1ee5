"""Extreme flight conditions: no exception, no warning, and never a silent NaN (method §8, DEVELOPERS.md).

Every value that is not defined (NaN in the arrays, None in the point record) must be explained by a flag:
``outside-atmosphere`` explains anything; ``low-speed`` the stream tube, MFR, MFR_max, spillage and the drag
quantities; ``additive-drag-not-modelled`` the drag quantities of a ramp inlet in supersonic flight;
``no-tip-speed`` the blade relative tip Mach. The face and throat checks must be judged at every point inside
the atmosphere (a NaN margin there would silently drop the check).

Every test runs with every warning turned into an error (numpy RuntimeWarnings must not escape).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import fields, replace
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from pygasflow.shockwave import max_theta_from_mach
from pygasflow.solvers import oblique_shockwave_solver
from scipy.optimize import brentq

from engine_air.envelope import flags as F
from engine_air.physics.atmosphere import MAX_ALTITUDE_M, MIN_ALTITUDE_M
from engine_air.physics.constants import GAMMA, LOW_SPEED_MACH, P_REF, R_AIR, T_REF
from engine_air.envelope.evaluate import evaluate_project
from engine_air.physics.isentropic import choked_corrected_flow_per_area
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.flow.match import REGIMES, SUBSONIC
from engine_air.project.model import Case, Grid, Inlet, Project, Rating
from engine_air.project import ProjectError, load_project, project_from_dict, project_to_dict
from engine_air.physics.reference_recovery import mil_e_5008b_recovery
from engine_air.outputs.point_record import point_record

SAMPLES = Path(__file__).resolve().parent.parent / "sample_projects"
PITOT = load_project(SAMPLES / "subsonic_transport_nacelle.toml")      # pitot, tip speed on two ratings
RAMP = load_project(SAMPLES / "supersonic_two_ramp.toml")              # 8 + 7 deg ramps, shock on lip at M 2
SMALL = load_project(SAMPLES / "undersized_business_jet.toml")         # pitot with a small throat
MIXED = load_project(SAMPLES / "mixed_compression_throat_schedule.toml")  # mixed compression, throat schedule
PROJECTS = {"pitot": PITOT, "ramp": RAMP, "small-throat": SMALL, "mixed": MIXED}
NULL_UNLESS_MIXED = ("started", "self_start_contraction", "entrance_area_m2",  # interfaces: null unless
                     "internal_contraction_ratio")  # mixed-compression (method §11)
NULL_WITHOUT_DATA = ("dc60", "surge_margin_loss", "remaining_surge_margin",  # null without measured data
                     "angle_of_attack_deg", "sideslip_deg")  # or a case incidence (interfaces, Additions 2)

MACHS = np.array([0.0, 1e-9, 0.049, 0.05, 0.3, 0.8, 0.999999, 1.0, 1.0 + 1e-12, 1.0001, 1.01, 1.2, 1.35, 1.6,
                  2.0, 2.0 + 1e-9, 2.5, 3.0, 4.0, 5.0, 6.0])
ALTITUDES = np.array([MIN_ALTITUDE_M, 0.0, 11000.0, 20000.0, 32000.0, 47000.0, 71000.0, MAX_ALTITUDE_M])
OUTSIDE_ALTITUDES = np.array([-6000.0, MIN_ALTITUDE_M - 1e-6, MAX_ALTITUDE_M + 1e-6, 90000.0, np.nan, np.inf,
                              -np.inf])

# Expected values worked here, not taken from engine_air's own gas-dynamics functions (method §3, §4).
MFP_STAR = math.sqrt(1.4 / (8314.32 / 28.9644)) * 1.2**-3  # kg K^0.5/(N s): sqrt(g/R) (1.2)^-3, R of the 1976 standard
WC_PER_A_CHOKE = MFP_STAR * 101325.0 / math.sqrt(288.15)  # 241.24 kg/(s m^2), derived from method §3


def ns_pt(m):
    """Normal-shock total-pressure ratio (NACA Report 1135 normal-shock relation, gamma = 1.4); 1 for M <= 1."""
    s = np.maximum(np.asarray(m, dtype=float), 1.0) ** 2
    return (2.4 * s / (0.4 * s + 2.0)) ** 3.5 * (2.4 / (2.8 * s - 0.4)) ** 2.5


def oblique(m, ramp_deg):
    """Weak oblique shock from pygasflow: (downstream Mach, total-pressure ratio)."""
    r = oblique_shockwave_solver("mu", m, "theta", ramp_deg, flag="weak", to_dict=True)
    return r["md"], r["tpr"]


# which flag may explain a NaN in each OperatingPoints array (outside-atmosphere explains every one)
_DRAG = F.LOW_SPEED | F.ADDITIVE_DRAG_NOT_MODELLED
EXPLAINED_BY = {
    "stream_tube_area_m2": F.LOW_SPEED,
    "mass_flow_ratio": F.LOW_SPEED,
    "max_mass_flow_ratio": F.LOW_SPEED,
    "spillage_fraction": F.LOW_SPEED,
    "additive_drag_n": _DRAG,
    "additive_drag_coefficient": _DRAG,
    "spillage_drag_coefficient": _DRAG,
    "relative_tip_mach": F.NO_TIP_SPEED,
    "tip_speed_m_s": F.NO_TIP_SPEED,
    # the installation ledger (method section 13)
    "spillage_drag_n": F.ADDITIVE_DRAG_NOT_MODELLED,
    "net_thrust_n": F.NO_THRUST_DATA,
    "installed_thrust_n": F.NO_THRUST_DATA | F.ADDITIVE_DRAG_NOT_MODELLED,
    "installation_loss_fraction": F.NO_THRUST_DATA | F.ADDITIVE_DRAG_NOT_MODELLED,
}
# the same for the keys of the point record
RECORD_EXPLAINED_BY = dict(EXPLAINED_BY)


@pytest.fixture(autouse=True)
def warnings_are_errors():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield


def unexplained_nans(points) -> list[str]:
    """Names of arrays holding a NaN that no flag at that point explains (empty when all is explained)."""
    bits = np.asarray(points.flags)
    problems = []
    for f in fields(points):
        a = getattr(points, f.name)
        if not isinstance(a, np.ndarray) or a.dtype.kind != "f" or f.name.startswith("ramp_"):
            continue
        if f.name == "terminal_shock_mach":
            continue  # documented NaN wherever no terminal normal shock stands (subsonic flow ahead of it)
        allowed = F.OUTSIDE_ATMOSPHERE | EXPLAINED_BY.get(f.name, 0)
        bad = np.isnan(a) & ((bits & allowed) == 0)
        if bad.any():
            problems.append(f"{f.name} at {int(bad.sum())} points")
    # per-ramp arrays: NaN only for subsonic flight, a detached shock, or outside the atmosphere
    for name in ("ramp_wave_angle_rad", "ramp_downstream_mach"):
        a = getattr(points, name)
        if a is not None and a.size:
            ok = (np.asarray(points.mach) <= 1.0) | F.has(bits, F.SHOCK_DETACHED)
            if (np.isnan(a) & ~ok).any():
                problems.append(name)
    # infinities are never acceptable inside the atmosphere
    inside = ~F.has(bits, F.OUTSIDE_ATMOSPHERE)
    for f in fields(points):
        a = getattr(points, f.name)
        if isinstance(a, np.ndarray) and a.dtype.kind == "f" and a.shape == bits.shape and f.name != "altitude_m":
            if (np.isinf(a) & inside).any():
                problems.append(f"{f.name} is infinite")
    # the face and throat checks are judged wherever the atmosphere is defined
    inside = ~F.has(bits, F.OUTSIDE_ATMOSPHERE)
    for name in ("face-mach", "throat-mach"):
        chk = points.check(name)
        if (inside & ~chk.applies).any():
            problems.append(f"check {name} silently not judged at {int((inside & ~chk.applies).sum())} points")
        if (~inside & chk.applies).any():
            problems.append(f"check {name} judged outside the atmosphere")
    for chk in points.checks:
        if (chk.applies & ~np.isfinite(chk.margin)).any():
            problems.append(f"check {chk.name} applies with a non-finite margin")
    return problems


def record_problems(record: dict) -> list[str]:
    """Keys of a point record that are None without a flag saying why."""
    flags = set(record["flags"])
    bits = sum(F.FLAG_BITS[n] for n in flags if n in F.FLAG_BITS)
    out = []
    values = {k: v for k, v in record.items() if k not in ("freestream", "flags", "flag_descriptions", "checks")}
    values.update({f"freestream.{k}": v for k, v in record["freestream"].items()})
    for key, value in values.items():
        if value is not None or key in NULL_UNLESS_MIXED + NULL_WITHOUT_DATA:
            continue
        allowed = F.OUTSIDE_ATMOSPHERE | RECORD_EXPLAINED_BY.get(key, 0)
        if not bits & allowed:
            out.append(key)
    assert set(record["flag_descriptions"]) == flags
    return out


def assert_all_explained(project: Project, case: Case, mach, altitude):
    points = evaluate_conditions(project, case, mach, altitude)
    assert unexplained_nans(points) == []
    for index in np.ndindex(points.flags.shape):
        record = point_record(points, index, case.name)
        assert record_problems(record) == [], (index, record["mach"], record["altitude_m"], record["flags"])
        assert record["regime"] in REGIMES
        mixed = project.inlet.type == "mixed-compression"
        assert all((record[k] is not None) == mixed for k in NULL_UNLESS_MIXED), (index, record["started"])
    return points


# -- the whole table of extreme conditions, every sample, every case -------------------------------------------------

@pytest.mark.parametrize("name", PROJECTS)
def test_every_extreme_condition_is_explained(name):
    project = PROJECTS[name]
    for case in project.cases:
        assert_all_explained(project, case, MACHS[None, :], ALTITUDES[:, None])
        points = assert_all_explained(project, case, MACHS[None, :], OUTSIDE_ALTITUDES[:, None])
        assert F.has(points.flags, F.OUTSIDE_ATMOSPHERE).all()
        assert all(not c.applies.any() for c in points.checks)
        assert (points.limiting == -1).all()


def test_one_dimensional_and_scalar_inputs_broadcast():
    # a 1-D row of Mach numbers against a 2-D column of altitudes (fewer Mach dimensions than the result)
    for project in PROJECTS.values():
        case = project.cases[0]
        points = evaluate_conditions(project, case, MACHS, ALTITUDES[:, None])
        assert points.face_mach.shape == (ALTITUDES.size, MACHS.size)
        assert points.ramp_wave_angle_rad.shape == (len(project.inlet.ramp_angles_deg), ALTITUDES.size, MACHS.size)
        j = list(MACHS).index(1.6)
        np.testing.assert_array_equal(points.recovery[2], evaluate_conditions(project, case, MACHS, 11000.0).recovery)
        scalar = evaluate_conditions(project, case, 1.6, 11000.0)
        assert scalar.face_mach.shape == ()
        assert float(scalar.recovery) == points.recovery[2, j]


def test_evaluate_project_emits_no_warning_on_any_sample():
    for project in PROJECTS.values():
        result = evaluate_project(replace(project, grid=Grid(41, 31)))
        for cm in result.cases:
            assert unexplained_nans(cm.points) == []


# -- M0 -> 0 -------------------------------------------------------------------------------------------------------

@pytest.mark.parametrize("mach", [0.0, 1e-9, 0.049, np.nextafter(LOW_SPEED_MACH, 0.0)])
def test_low_speed_points(mach):
    points = assert_all_explained(SMALL, SMALL.cases[0], np.array([mach]), np.array([0.0, 11000.0]))
    assert F.has(points.flags, F.LOW_SPEED).all()
    for key in ("mass_flow_ratio", "max_mass_flow_ratio", "spillage_fraction", "additive_drag_coefficient",
                "spillage_drag_coefficient", "stream_tube_area_m2"):
        assert np.isnan(getattr(points, key)).all(), key
    # face and throat Mach still computed, with p_t0 = p0 (method §5)
    assert np.isfinite(points.face_mach).all() and np.isfinite(points.throat_mach).all()
    assert points.check("face-mach").applies.all() and points.check("throat-mach").applies.all()
    assert (points.regime == SUBSONIC).all()


def test_low_speed_threshold_and_continuity():
    m = np.array([0.049, np.nextafter(LOW_SPEED_MACH, 0.0), LOW_SPEED_MACH, 0.051])
    points = assert_all_explained(SMALL, SMALL.cases[0], m, 0.0)
    assert F.has(points.flags, F.LOW_SPEED).tolist() == [True, True, False, False]
    assert np.isfinite(points.mass_flow_ratio[2:]).all()
    # Face and throat Mach cross the threshold continuously: the switch from p_t0 = p0 to the isentropic p_t0
    # changes both W and the throat's p_t in the same ratio. Tolerance 1e-6 relative across the switch
    # (the change over dM = 1e-17 itself is nil).
    for key in ("face_mach", "throat_mach", "recovery"):
        a = getattr(points, key)
        assert a[2] == pytest.approx(a[1], rel=1e-6), key


def test_negative_mach_is_taken_as_zero():
    points = assert_all_explained(PITOT, PITOT.cases[0], np.array([-0.5, 0.0]), 0.0)
    assert points.mach.tolist() == [0.0, 0.0]
    assert F.has(points.flags, F.LOW_SPEED).all()
    assert points.face_mach[0] == points.face_mach[1]


@pytest.mark.parametrize("bad", [np.nan, np.inf, -np.inf])
def test_non_finite_mach_is_refused_with_a_clear_message(bad):
    with pytest.raises(ValueError, match="flight Mach number must be a finite number"):
        evaluate_conditions(PITOT, PITOT.cases[0], np.array([0.5, bad]), 0.0)


# -- M0 at and just above 1 -----------------------------------------------------------------------------------------

@pytest.mark.parametrize("name", PROJECTS)
def test_sonic_flight(name):
    project = PROJECTS[name]
    m = np.array([1.0, 1.0 + 1e-12, 1.0001, 1.01])
    points = assert_all_explained(project, project.cases[0], m, 11000.0)
    assert points.regime[0] == SUBSONIC and (points.regime[1:] != SUBSONIC).all()
    assert points.reference_recovery[0] == 1.0
    if project.inlet.type == "external-ramp":
        # every ramp shock is detached just above Mach 1: one normal shock at M0 (method §4)
        assert F.has(points.flags[1:], F.SHOCK_DETACHED).all()
        # pre-entry drag computed (method §13): finite and not negative, no not-modelled flag
        assert not F.has(points.flags[1:], F.ADDITIVE_DRAG_NOT_MODELLED).any()
        assert (points.additive_drag_coefficient[1:] >= 0.0).all()
        np.testing.assert_allclose(points.external_recovery, ns_pt(m), rtol=1e-14)  # NACA 1135 relation, here


def test_pitot_continuous_across_mach_one():
    # A pitot inlet has no physical jump at M0 = 1: the normal-shock loss starts as (M0 - 1)^3, so recovery,
    # face Mach and MFR change by O(dM) across the switch of regime. Tolerance: 1e-6 relative between
    # 1 - 1e-9 and 1 + 1e-9 (found: about 1e-9). MFR < 1 at M0 = 1 here, as it must be (A0 <= A_th at M0 = 1).
    m = np.array([1.0 - 1e-9, 1.0, 1.0 + 1e-12, 1.0 + 1e-9])
    for project in (PITOT, SMALL):
        for h in (0.0, 5000.0, 11000.0, 20000.0):
            for case in project.cases:
                points = assert_all_explained(project, case, m, h)
                for key in ("recovery", "face_mach", "mass_flow_ratio", "throat_mach", "mass_flow_kg_s",
                            "spillage_fraction", "face_static_to_ambient"):
                    a = getattr(points, key)
                    assert np.ptp(a) <= 1e-6 * np.max(np.abs(a)) + 1e-15, (key, a)
                assert (points.mass_flow_ratio < 1.0).all()
                assert not F.has(points.flags, F.SUPERCRITICAL).any()
                # The one quantity that changes its definition at M0 = 1: MFR_max is the throat-choking limit in
                # subsonic flight and the shock-geometry limit (1 for a pitot) above (README "Maximum MFR").
                assert points.max_mass_flow_ratio[-1] == 1.0
                assert points.max_mass_flow_ratio[0] < 1.0


def test_reference_recovery_switches():
    # MIL-E-5008B: 1 at M0 <= 1, the (M0 - 1)^1.35 law to Mach 5, 800/(M0^4 + 935) above; the two laws differ by
    # 1.2e-4 at Mach 5 (a jump in the specification itself, stated tolerance 2e-4).
    m = np.array([1.0, 1.0 + 1e-9, 2.0, 5.0 - 1e-9, 5.0, 6.0])
    ref = mil_e_5008b_recovery(m)
    assert ref[0] == 1.0 and ref[1] == pytest.approx(1.0, abs=1e-9)
    assert ref[2] == pytest.approx(0.925)
    assert abs(ref[4] - ref[3]) < 2e-4
    assert ref[5] == pytest.approx(800.0 / (6.0**4 + 935.0))


# -- ramp shocks: detachment and shock on lip ------------------------------------------------------------------------

def _attachment_machs(ramps_deg):
    """Flight Mach at which each ramp's shock attaches: the local Mach at which the ramp angle equals the maximum
    deflection (pygasflow's maximum deflection and weak oblique shocks, not engine_air's)."""
    out = []
    for k in range(len(ramps_deg)):
        def local_margin(m0, k=k):
            m = m0
            for angle in ramps_deg[:k]:
                if m <= 1.0 or float(max_theta_from_mach(m)) <= angle:
                    return -1.0
                m = float(oblique(m, angle)[0])
            return float(max_theta_from_mach(m)) - ramps_deg[k] if m > 1.0 else -1.0
        lo = out[-1] + 1e-9 if out else 1.0 + 1e-9
        out.append(brentq(local_margin, lo, 6.0, xtol=1e-13))
    return out


def test_detachment_of_each_ramp_and_shock_on_lip():
    ramps = RAMP.inlet.ramp_angles_deg
    attach = _attachment_machs(ramps)
    assert attach == pytest.approx([1.34825, 1.59313], abs=1e-5)  # derived here (pygasflow maximum deflection)
    d = 1e-7
    m = np.array([1.0 + 1e-9, attach[0] - d, attach[0] + d, attach[1] - d, attach[1] + d,
                  RAMP.inlet.shock_on_lip_mach, RAMP.inlet.shock_on_lip_mach + 1e-6, 5.0, 6.0])
    points = assert_all_explained(RAMP, RAMP.cases[0], m, 11000.0)
    detached = F.has(points.flags, F.SHOCK_DETACHED)
    assert detached.tolist() == [True, True, True, True, False, False, False, False, False]
    inside_cowl = F.has(points.flags, F.SHOCK_INSIDE_COWL)
    assert inside_cowl.tolist() == [False] * 6 + [True] * 3
    # beyond the detachment of every ramp: one normal shock at M0
    np.testing.assert_allclose(points.external_recovery[:2], ns_pt(m[:2]), rtol=1e-13)
    # ramp 1 attached, ramp 2 detached: oblique shock 1 (pygasflow), then one normal shock at the Mach behind it;
    # pygasflow's weak solution agrees with the package to about 1e-10 in Mach (test_gasdynamics), hence 1e-9
    md1, tpr1 = oblique(m[2:4], ramps[0])
    np.testing.assert_allclose(points.external_recovery[2:4], tpr1 * ns_pt(md1), rtol=1e-9)
    assert np.isnan(points.ramp_wave_angle_rad[1, 2:4]).all() and np.isfinite(points.ramp_wave_angle_rad[0, 2:4]).all()
    # MFR_max: 1 at M0 -> 1 (the bow shock is normal and turns nothing), below 1 below the design Mach, and
    # continuous through each attachment (method §10: the detached ramp's bow shock at maximum deflection)
    mfr_max = points.max_mass_flow_ratio
    assert mfr_max[0] == pytest.approx(1.0, abs=1e-9)
    assert (mfr_max[1:5] < 1.0).all()
    assert mfr_max[2] == pytest.approx(mfr_max[1], abs=1e-3) and mfr_max[4] == pytest.approx(mfr_max[3], abs=1e-3)
    assert (mfr_max[5:] == 1.0).all()
    # Recovery jumps where a ramp attaches: a physical jump of the model (a detached ramp is one normal shock);
    # it must be an improvement, and it is flagged on the detached side.
    assert points.external_recovery[2] > points.external_recovery[1]
    assert points.external_recovery[4] > points.external_recovery[3]


def test_three_ramps_beyond_every_detachment():
    data = project_to_dict(RAMP)
    data["inlet"]["ramp_angles_deg"] = [6.0, 6.0, 6.0]
    data["inlet"]["shock_on_lip_mach"] = 2.2
    project = project_from_dict(data)
    attach = _attachment_machs([6.0, 6.0, 6.0])
    assert attach[0] < attach[1] < attach[2] < 2.2
    m = np.array([1.0001, 0.5 * (1 + attach[0]), 0.5 * (attach[0] + attach[1]), 0.5 * (attach[1] + attach[2]),
                  0.5 * (attach[2] + 2.2), 2.2, 5.0, 6.0])
    for case in project.cases:
        points = assert_all_explained(project, case, m, np.array([[0.0], [16000.0]]))
        assert F.has(points.flags[:, :4], F.SHOCK_DETACHED).all()
        assert not F.has(points.flags[:, 4:], F.SHOCK_DETACHED).any()
        attached = np.isfinite(points.ramp_wave_angle_rad[:, 0, :]).sum(axis=0)
        assert attached.tolist() == [0, 0, 1, 2, 3, 3, 3, 3]
        np.testing.assert_allclose(points.external_recovery[:, :2], ns_pt(m[:2])[None, :] * np.ones((2, 1)),
                                   rtol=1e-13)


def test_very_high_mach():
    m = np.array([5.0, 6.0])
    # NACA Report 1135 normal-shock table: p_t2/p_t1 = 0.06172 at M1 = 5, 0.02965 at M1 = 6
    for project in (PITOT, SMALL):
        points = assert_all_explained(project, project.cases[0], m, np.array([[0.0], [20000.0], [47000.0]]))
        np.testing.assert_allclose(points.external_recovery[0], [0.06172, 0.02965], atol=5e-6)
        assert (points.recovery > 0).all() and (points.recovery < points.reference_recovery).all()
        assert (points.regime != SUBSONIC).all()
    points = assert_all_explained(RAMP, RAMP.cases[1], m, np.array([[0.0], [20000.0], [47000.0]]))
    assert F.has(points.flags, F.SHOCK_INSIDE_COWL).all() and not F.has(points.flags, F.SHOCK_DETACHED).any()
    assert (points.max_mass_flow_ratio == 1.0).all()
    # shock system: oblique 8 deg, oblique 7 deg (pygasflow weak solutions), normal (NACA Report 1135 normal-shock
    # relation, worked here); pygasflow's downstream Mach agrees with the package's to about 1e-10, hence 1e-9
    for j, m0 in enumerate(m):
        md1, tpr1 = oblique(float(m0), 8.0)
        md2, tpr2 = oblique(float(md1), 7.0)
        expected = float(tpr1 * tpr2 * ns_pt(md2))
        assert points.external_recovery[0, j] == pytest.approx(expected, rel=1e-9)


# -- demand past face and throat choking -----------------------------------------------------------------------------

def _flat_demand(project: Project, flow_kg_s: float, **inlet_changes) -> tuple[Project, Case]:
    rating = Rating("flat", (0.3001, 2.999), (flow_kg_s, flow_kg_s), fan_tip_speed_m_s=400.0)
    inlet = replace(project.inlet, **inlet_changes)
    case = Case("flat day", "flat", 0.0)
    return replace(project, inlet=inlet, ratings=(rating,), cases=(case,)), case


@pytest.mark.parametrize("factor", [1.0 - 1e-12, 1.0, 1.0 + 1e-12, 1.01, 2.0, 100.0])
def test_demand_at_and_past_face_choking(factor):
    # W_c2/A2 at and beyond the choking value 241.24 kg/(s m^2) (method §3)
    face_area = 1.0
    flow = factor * choked_corrected_flow_per_area() * face_area
    project, case = _flat_demand(PITOT, flow, face_area_m2=face_area, capture_area_m2=50.0, throat_area_m2=40.0)
    m = np.array([0.0, 0.3, 0.9, 1.5, 3.0])
    points = assert_all_explained(project, case, m, np.array([[0.0], [11000.0]]))
    choked = F.has(points.flags, F.FACE_CHOKED)
    if factor >= 1.0 + 1e-12 or (factor == 1.0 and choked.any()):
        assert choked.all()
        assert (points.face_mach == 1.0).all()
        face = points.check("face-mach")
        assert face.fails.all() and (face.relative_margin <= -1.0).all()
        assert (points.limiting == 0).all()
        # the engine gets the choking flow: W_c2 at the face = 241.24 A2 (derived from method §3)
        wc_face = points.mass_flow_kg_s * np.sqrt(points.theta2) / (points.recovery * points.total_pressure_pa / P_REF)
        lowspeed = F.has(points.flags, F.LOW_SPEED)
        wc_face = np.where(lowspeed, points.mass_flow_kg_s * np.sqrt(points.theta2)
                           / (points.recovery * points.static_pressure_pa / P_REF), wc_face)
        thr = F.has(points.flags, F.THROAT_CHOKED) | F.has(points.flags, F.SUPERCRITICAL)
        np.testing.assert_allclose(wc_face[~thr], WC_PER_A_CHOKE * face_area, rtol=1e-9)
    else:
        assert not choked.any()
        assert (points.face_mach < 1.0).all() and (points.face_mach > 0.99).all()


def test_demand_past_throat_choking():
    # A throat far too small: the throat chokes, the flow is held at the sonic throat flow and recovery falls in
    # proportion (method §6): W = A_th pi_ext p_t0 MFP* / sqrt(T_t0).
    project, case = _flat_demand(PITOT, 300.0, throat_area_m2=0.5)
    m = np.array([0.0, 0.2, 0.5, 0.8, 0.95, 1.0, 1.2, 2.0])
    points = assert_all_explained(project, case, m, np.array([[0.0], [11000.0]]))
    assert F.has(points.flags, F.THROAT_CHOKED).all()
    assert (points.throat_mach == 1.0).all()
    throat = points.check("throat-mach")
    assert throat.fails.all()
    low = F.has(points.flags, F.LOW_SPEED)
    pt_inlet = np.where(low, points.static_pressure_pa, points.total_pressure_pa)
    w_choke = 0.5 * points.external_recovery * pt_inlet * MFP_STAR / np.sqrt(points.total_temperature_k)
    np.testing.assert_allclose(points.mass_flow_kg_s, w_choke, rtol=1e-12)
    assert (points.recovery < points.external_recovery * points.duct_recovery).all()
    assert (points.recovery > 0).all()


def test_face_and_throat_choked_together():
    project, case = _flat_demand(PITOT, 1000.0, throat_area_m2=0.3, face_area_m2=0.5)
    points = assert_all_explained(project, case, np.array([0.0, 0.01, 0.5, 1.0, 1.5, 6.0]),
                                  np.array([[MIN_ALTITUDE_M], [0.0], [MAX_ALTITUDE_M]]))
    assert F.has(points.flags, F.FACE_CHOKED).all() and F.has(points.flags, F.THROAT_CHOKED).all()
    assert points.check("face-mach").fails.all() and points.check("throat-mach").fails.all()


# -- outside the atmosphere, impossible temperatures ---------------------------------------------------------------

@pytest.mark.parametrize("name", PROJECTS)
def test_outside_the_atmosphere(name):
    project = PROJECTS[name]
    for case in project.cases:
        points = assert_all_explained(project, case, MACHS, OUTSIDE_ALTITUDES[:, None])
        assert F.has(points.flags, F.OUTSIDE_ATMOSPHERE).all()
        record = point_record(points, (0, 5), case.name)
        assert record["freestream"]["static_pressure_pa"] is None and record["limiting"] is None
        assert all(c["holds"] is None for c in record["checks"])
        # the model's own ends are inside it
        edge = assert_all_explained(project, case, MACHS, np.array([[MIN_ALTITUDE_M], [MAX_ALTITUDE_M]]))
        assert not F.has(edge.flags, F.OUTSIDE_ATMOSPHERE).any()


@pytest.mark.parametrize("offset, altitude, outside", [
    (-300.0, 20000.0, True),      # T = 216.65 - 300 < 0
    (-216.65, 11000.0, True),     # T = 0 K exactly
    (-216.6, 11000.0, False),     # T = 0.05 K: absurd, but a positive temperature
    (-100.0, MAX_ALTITUDE_M, False),
    (500.0, 0.0, False),
    (np.nan, 0.0, True),
    (np.inf, 0.0, True),
    (-np.inf, 0.0, True),
])
def test_isa_offset_extremes(offset, altitude, outside):
    # Outside the loader's -100..100 K, reachable only by building a Case in code.
    for project in PROJECTS.values():
        case = Case("odd day", project.ratings[0].name, offset)
        points = assert_all_explained(project, case, MACHS, np.array([altitude]))
        assert F.has(points.flags, F.OUTSIDE_ATMOSPHERE).all() == outside
        assert F.has(points.flags, F.OUTSIDE_ATMOSPHERE).any() == outside


def test_evaluate_project_over_the_whole_model_range():
    # An envelope spanning every Mach and altitude the loader allows, on every sample inlet, every case.
    for project in PROJECTS.values():
        data = project_to_dict(project)
        data["envelope"] = {"mach": [0.0, 6.0, 6.0, 0.0], "altitude_m": [-5000.0, -5000.0, 84000.0, 84000.0]}
        data["grid"] = {"mach_points": 61, "altitude_points": 45}
        wide = project_from_dict(data)
        result = evaluate_project(wide)
        for cm in result.cases:
            assert unexplained_nans(cm.points) == []
        assert all(np.isfinite(s.worst_value) for s in result.summary if s.judged_points)


# -- random projects inside the loader's rules, random conditions --------------------------------------------------

@st.composite
def valid_projects(draw):
    capture = draw(st.floats(0.01, 100.0))
    throat = capture * draw(st.floats(0.01, 1.0))
    face = draw(st.floats(0.01, 100.0))
    inlet = {"type": draw(st.sampled_from(["pitot", "external-ramp"])), "capture_area_m2": capture,
             "throat_area_m2": throat, "face_area_m2": face,
             "duct_loss_coefficient": draw(st.floats(0.0, 2.0)), "lip_suction_factor": draw(st.floats(0.0, 1.0))}
    if inlet["type"] == "external-ramp":
        n = draw(st.integers(1, 3))
        inlet["ramp_angles_deg"] = [draw(st.floats(1e-9, 12.0)) for _ in range(n)]
        inlet["shock_on_lip_mach"] = draw(st.floats(1.0 + 1e-6, 5.0))
    k = draw(st.integers(1, 6))
    theta = sorted(set(draw(st.lists(st.floats(0.3001, 2.999), min_size=k, max_size=k))))
    rating = {"name": "r", "theta": theta,
              "corrected_flow_kg_s": [draw(st.floats(1e-3, 5000.0)) for _ in theta]}
    if draw(st.booleans()):
        rating["fan_tip_speed_m_s"] = draw(st.floats(1e-3, 1000.0))
    limits = {"face_mach_max": draw(st.floats(1e-3, 0.999))}
    for key, lo, hi in (("throat_mach_max", 1e-3, 1.0), ("stable_flow_fraction", 1e-3, 0.999),
                        ("relative_tip_mach_max", 1e-3, 2.99), ("spillage_fraction_max", 0.0, 0.999)):
        if draw(st.booleans()):
            limits[key] = draw(st.floats(lo, hi))
    if draw(st.booleans()):
        limits["recovery_min"] = draw(st.sampled_from(["mil-e-5008b", 0.5, 0.95, 1.0]))
    m_lo, m_hi = sorted(draw(st.lists(st.floats(0.0, 6.0), min_size=2, max_size=2, unique=True)))
    h_lo, h_hi = sorted(draw(st.lists(st.floats(-5000.0, 84000.0), min_size=2, max_size=2, unique=True)))
    data = {
        "project": {"format": 1},
        "limits": limits,
        "inlet": inlet,
        "engine": {"rating": [rating]},
        "envelope": {"mach": [m_lo, m_hi, m_hi, m_lo], "altitude_m": [h_lo, h_lo, h_hi, h_hi]},
        "grid": {"mach_points": 9, "altitude_points": 7},
        "case": [{"name": "c", "rating": "r", "isa_offset_K": draw(st.floats(-100.0, 100.0))}],
    }
    return data


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=valid_projects(), mach=st.lists(st.floats(0.0, 10.0), min_size=1, max_size=8),
       altitude=st.lists(st.floats(-1e5, 2e5) | st.sampled_from([np.nan, np.inf, -np.inf]), min_size=1, max_size=4))
def test_random_projects_and_conditions_never_give_a_silent_nan(data, mach, altitude):
    try:
        project = project_from_dict(data, "random.toml")
    except ProjectError as err:  # e.g. a ramp shock detached at the design Mach, or a degenerate envelope
        assert err.key and err.allowed
        return
    result = evaluate_project(project)
    for cm in result.cases:
        assert unexplained_nans(cm.points) == []
    points = evaluate_conditions(project, project.cases[0], np.array(mach)[None, :], np.array(altitude)[:, None])
    assert unexplained_nans(points) == []
    record = point_record(points, (0, 0), "c")
    assert record_problems(record) == []


def test_tiny_legal_limits_and_areas_give_flags_and_no_warnings(tmp_path):
    """Issue reproduction: face_mach_max = 5e-324 printed a numpy overflow warning; areas of 5e-324 gave nulls.
    A tiny limit fails everywhere with a finite relative margin; tiny areas choke the face (flag face-choked)."""
    import re
    import warnings

    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.outputs.point import evaluate_point
    from engine_air.project import load_project

    text = (SAMPLES / "subsonic_transport_nacelle.toml").read_text(encoding="utf-8")
    tiny_limit = tmp_path / "tiny_limit.toml"
    tiny_limit.write_text(re.sub(r"(?m)^face_mach_max = .*$", "face_mach_max = 5e-324", text), encoding="utf-8")
    tiny_areas = tmp_path / "tiny_areas.toml"
    tiny_areas.write_text(re.sub(r"(?m)^(capture_area_m2|throat_area_m2|face_area_m2) = .*$", r"\1 = 5e-324", text),
                          encoding="utf-8")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        result = evaluate_project(load_project(tiny_limit))
        face = [s for s in result.summary if s.name == "face-mach"][0]
        assert not face.holds and np.isfinite(face.worst_margin)
        for cm in result.cases:
            rel = cm.points.check("face-mach").relative_margin
            assert np.all(np.isfinite(rel[cm.points.check("face-mach").applies]))
        record = evaluate_point(load_project(tiny_areas), 0.5, 3000.0)
        assert "face-choked" in record["flags"]
        for key, value in record.items():
            if value is None:
                assert key in ("net_thrust_n", "installed_thrust_n", "installation_loss_fraction",
                               "relative_tip_mach") + NULL_UNLESS_MIXED + NULL_WITHOUT_DATA, key
