"""The installed-thrust ledger (method section 13) on a worked case with invented thrust data.

Free-stream values from the U.S. Standard Atmosphere 1976 at 11 000 m: T = 216.65 K, p = 22 632.06 Pa,
a = 295.070 m/s, rho = 0.36392 kg/m^3. Isentropic relations and the face-Mach inversion from NACA Report 1135
(inverted with pygasflow). Each term of F_inst = F_n (1 - X (1 - pi/pi_ref)) - D_spill - D_bleed - D_bypass
is worked by hand below.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from pygasflow import isentropic_solver

from engine_air.envelope import flags as F
from engine_air.flow.ledger import bilinear_held
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.outputs.point_record import point_record
from engine_air.project.model import Case, Envelope, Inlet, Limits, Project, Rating

G = 1.4
R = 8314.32 / 28.9644
T_REF, P_REF = 288.15, 101325.0
T11, P11, A11, RHO11 = 216.65, 22632.06, 295.070, 0.36392  # 1976 standard, 11 000 m

THRUST = dict(thrust_mach=(0.0, 1.0), thrust_altitude_m=(0.0, 20000.0),
              net_thrust_n=((100000.0, 120000.0), (20000.0, 30000.0)),  # invented engine data
              thrust_reference_recovery=0.97, recovery_thrust_exchange=1.3)


def project(capture: float, thrust: bool = True, loss_max: float | None = 0.05) -> Project:
    inlet = Inlet(type="pitot", capture_area_m2=capture, throat_area_m2=0.27, face_area_m2=0.5,
                  duct_loss_coefficient=0.1, lip_suction_factor=0.5, bleed_fraction=0.03,
                  bleed_exit_velocity_ratio=0.2)
    rating = Rating("r", theta=(0.5, 2.5), corrected_flow_kg_s=(60.0, 60.0), **(THRUST if thrust else {}))
    return Project(limits=Limits(face_mach_max=0.7, installation_loss_max=loss_max), inlet=inlet,
                   ratings=(rating,), envelope=Envelope((0.0, 3.0, 3.0, 0.0), (0.0, 0.0, 20000.0, 20000.0)),
                   cases=(Case("c", "r"),))


def at(p, mach, altitude):
    return evaluate_conditions(p, p.cases[0], np.array([mach]), np.array([altitude]))


def by_hand_at_mach_05():
    """Recovery, engine flow and velocity at M0 = 0.5, 11 000 m (method sections 1, 3-5)."""
    base = 1.0 + 0.2 * 0.25
    tt0, pt0 = T11 * base, P11 * base ** 3.5
    mfp_star = math.sqrt(G / R) * (2.0 / (G + 1.0)) ** 3.0
    face = 60.0 * math.sqrt(T_REF) / (P_REF * 0.5) / mfp_star  # A*/A at the face
    m2 = float(isentropic_solver("crit_area_sub", 1.0 / face, to_dict=True)["m"])
    q_pt = 0.5 * G * m2 * m2 * (1.0 + 0.2 * m2 * m2) ** -3.5
    pi = 1.0 - 0.1 * q_pt
    w = 60.0 * (pi * pt0 / P_REF) / math.sqrt(tt0 / T_REF)
    v0 = 0.5 * A11
    return pi, w, v0


def test_thrust_table_is_bilinear_with_ends_held():
    table = THRUST["net_thrust_n"]
    x, y = THRUST["thrust_mach"], THRUST["thrust_altitude_m"]
    # by hand: 116 000 at 0 m and 28 000 at 20 km for M 0.8; 11 000 m is 0.55 of the way
    assert float(bilinear_held(x, y, table, 0.8, 11000.0)) == pytest.approx(116000 * 0.45 + 28000 * 0.55, rel=1e-14)
    assert float(bilinear_held(x, y, table, 1.7, -500.0)) == 120000.0  # both ends held
    assert float(bilinear_held(x, y, table, -0.1, 30000.0)) == 20000.0


def test_worked_ledger_with_the_stream_tube_wider_than_the_capture():
    # A_c = 0.28 m^2: MFR > 1, so the spillage drag is 0 (method section 12 decisions).
    pi, w, v0 = by_hand_at_mach_05()
    pts = at(project(0.28), 0.5, 11000.0)
    assert float(pts.mass_flow_ratio[0]) > 1.0
    assert float(pts.recovery[0]) == pytest.approx(pi, rel=1e-9)
    assert float(pts.mass_flow_kg_s[0]) == pytest.approx(w, rel=1e-6)  # p at 11 km to 7 digits
    # ram drag W V0 against the 1976 free stream (speed of sound 295.070 m/s at 11 km, to 6 digits)
    assert float(pts.ram_drag_n[0]) == pytest.approx(w * v0, rel=2e-6)
    # bleed: 3 % of the captured flow W/(1 - b), leaving at 0.2 V0
    w_b = 0.03 * w / 0.97
    assert float(pts.bleed_drag_n[0]) == pytest.approx(w_b * v0 * 0.8, rel=2e-6)
    assert float(pts.spillage_drag_n[0]) == 0.0
    assert float(pts.bypass_drag_n[0]) == 0.0
    f_n = 110000 * 0.45 + 25000 * 0.55  # by hand: M 0.5 gives 110 000 at 0 m, 25 000 at 20 km
    assert float(pts.net_thrust_n[0]) == pytest.approx(f_n, rel=1e-14)
    f_inst = f_n * (1.0 - 1.3 * (1.0 - pi / 0.97)) - 0.0 - w_b * v0 * 0.8 - 0.0
    assert float(pts.installed_thrust_n[0]) == pytest.approx(f_inst, rel=1e-6)
    loss = 1.0 - f_inst / f_n
    assert float(pts.installation_loss_fraction[0]) == pytest.approx(loss, rel=1e-6)
    chk = pts.check("installation-loss")
    assert bool(chk.applies[0])
    assert float(chk.margin[0]) == pytest.approx(0.05 - loss, rel=1e-6)
    assert not F.has(pts.flags, F.NO_THRUST_DATA)[0]


def test_worked_ledger_with_spillage():
    # A_c = 0.5 m^2: MFR < 1; spillage drag = (1 - lip suction) D_add (method section 7), subtracted in full.
    pi, w, v0 = by_hand_at_mach_05()
    pts = at(project(0.5), 0.5, 11000.0)
    mfr = w / 0.97 / (RHO11 * v0 * 0.5)
    assert float(pts.mass_flow_ratio[0]) == pytest.approx(mfr, rel=1e-5)
    assert mfr < 1.0
    d_spill = 0.5 * float(pts.additive_drag_n[0])
    assert d_spill > 0.0
    assert float(pts.spillage_drag_n[0]) == pytest.approx(d_spill, rel=1e-14)
    f_n = 110000 * 0.45 + 25000 * 0.55
    d_bleed = 0.03 * w / 0.97 * v0 * 0.8
    f_inst = f_n * (1.0 - 1.3 * (1.0 - pi / 0.97)) - d_spill - d_bleed
    assert float(pts.installed_thrust_n[0]) == pytest.approx(f_inst, rel=1e-6)
    # the items sum to the installed thrust
    items = (float(pts.net_thrust_n[0]) * (1.0 - 1.3 * (1.0 - float(pts.recovery[0]) / 0.97))
             - float(pts.spillage_drag_n[0]) - float(pts.bleed_drag_n[0]) - float(pts.bypass_drag_n[0]))
    assert float(pts.installed_thrust_n[0]) == pytest.approx(items, rel=1e-14)


def test_mil_e_5008b_reference_for_the_thrust_table():
    # MIL-E-5008B at M0 = 2: 1 - 0.075 (2 - 1)^1.35 = 0.925
    p = project(0.28)
    rating = p.ratings[0]
    from dataclasses import replace
    p = replace(p, ratings=(replace(rating, thrust_reference_recovery="mil-e-5008b"),))
    pts = at(p, 2.0, 11000.0)
    assert float(pts.thrust_reference_recovery[0]) == pytest.approx(0.925, abs=1e-12)
    f_n = 120000 * 0.45 + 30000 * 0.55  # M0 = 2 beyond the table: the M = 1 column is held
    assert float(pts.net_thrust_n[0]) == pytest.approx(f_n, rel=1e-14)


def test_without_thrust_data_the_ledger_is_null_and_flagged():
    pts = at(project(0.28, thrust=False), 0.5, 11000.0)
    assert F.has(pts.flags, F.NO_THRUST_DATA)[0]
    record = json.loads(json.dumps(point_record(pts, 0, "c")))
    for key in ("net_thrust_n", "installed_thrust_n", "installation_loss_fraction"):
        assert record[key] is None
    assert "no-thrust-data" in record["flags"]
    assert record["ram_drag_n"] == pytest.approx(by_hand_at_mach_05()[1] * 0.5 * A11, rel=2e-6)
    for key in ("additive_drag_n", "spillage_drag_n", "bleed_fraction", "bleed_drag_n", "bypass_fraction",
                "bypass_drag_n", "judged"):
        assert key in record
    assert not pts.check("installation-loss").applies[0]  # no thrust data: the check judges nothing
