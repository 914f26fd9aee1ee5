"""Each stage of the match alone against the published relation it implements, and the chain's own promises:
the demand as an input (the characteristic, method §16), a pluggable compression source (§17), memory.

Sources beside each check: U.S. Standard Atmosphere 1976 (USSA76), NACA Report 1135 (NACA 1135), the method's
check values (method.md "Check values for tests"), and hand derivations in the test from the relations.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from engine_air.flow import flags as F
from engine_air.flow.chain import characteristic, lean, run_chain
from engine_air.flow.drag import pre_entry_drag
from engine_air.flow.ledger import ledger
from engine_air.flow.stages import (
    Compression,
    capture,
    compression,
    demand,
    face,
    free_stream,
    model_compression,
    swept_demand,
)
from engine_air.flow.throat import SUBCRITICAL, SUPERCRITICAL, throat_and_doors
from engine_air.inlets.registry import inlet_type
from engine_air.project import load_project
from engine_air.project.model import Case

ROOT = Path(__file__).resolve().parents[1]
PITOT = load_project(ROOT / "sample_projects" / "undersized_business_jet.toml")
RAMP = load_project(ROOT / "sample_projects" / "supersonic_two_ramp.toml")
ISA = Case("ISA", PITOT.cases[0].rating)
GAMMA = 1.4
R_AIR = 8314.32 / 28.9644  # J/(kg K), USSA76 gas constant over molar mass
# the pitot inlet without its auxiliary doors, so that the hand relations below hold on their own
BARE = dataclasses.replace(PITOT.inlet, auxiliary_inlet_area_m2=0.0)


def test_free_stream_against_ussa76_and_naca1135_totals():
    fs = free_stream(ISA, np.array([0.0, 2.0]), np.array([[0.0], [5000.0], [11000.0]]))
    # USSA76: T, p at 11 000 m 216.65 K, 22 632.06 Pa; at 5 000 m 255.65 K, 54 019.9 Pa; sea level a, rho
    np.testing.assert_allclose(fs.static_temperature_k.ravel(), [288.15, 255.65, 216.65], rtol=1e-6)
    np.testing.assert_allclose(fs.static_pressure_pa.ravel(), [101325.0, 54019.9, 22632.06], rtol=2e-6)
    assert fs.speed_of_sound_m_s.ravel()[0] == pytest.approx(340.294, rel=1e-5)
    assert fs.density_kg_m3.ravel()[0] == pytest.approx(1.2250, rel=1e-4)
    # NACA 1135 isentropic table at M = 2: p/p_t = 0.12780, T/T_t = 0.55556
    np.testing.assert_array_equal(fs.total_pressure_pa[:, 0], fs.static_pressure_pa.ravel())  # M0 = 0: p_t0 = p0
    np.testing.assert_allclose(fs.static_pressure_pa[:, 0] / fs.total_pressure_pa[:, 1], 0.12780, rtol=5e-5)
    np.testing.assert_allclose(fs.static_temperature_k[:, 0] / fs.total_temperature_k[:, 1], 0.55556, rtol=1e-5)
    # each quantity keeps its own axis: the atmosphere the altitude's, the totals the broadcast shape
    assert fs.static_pressure_pa.shape == (3, 1) and fs.total_pressure_pa.shape == (3, 2) and fs.shape == (3, 2)
    # V0 = M0 a0; low speed (M0 < 0.05) uses p0 as the inlet's total pressure and is flagged
    np.testing.assert_allclose(fs.velocity_m_s[:, 1], 2.0 * fs.speed_of_sound_m_s.ravel())
    assert np.all(fs.inlet_total_pressure_pa[:, 0] == fs.static_pressure_pa.ravel())
    assert np.all(F.has(np.broadcast_to(fs.flags, fs.shape)[:, 0], F.LOW_SPEED))


def test_free_stream_flags_and_bad_mach():
    fs = free_stream(Case("hot", "r", isa_offset_K=0.0, mach_range=(0.5, 1.0)), np.array([0.3, 0.8]),
                     np.array([0.0, 90000.0]))
    # 90 km is above the model's 84.852 km (USSA76 geopotential range of the model)
    assert F.has(fs.flags, F.OUTSIDE_ATMOSPHERE).tolist() == [False, True]
    assert F.has(fs.flags, F.OUTSIDE_CASE_REGION).tolist() == [True, False]
    with pytest.raises(ValueError, match="finite"):
        free_stream(ISA, np.array([np.nan]), 0.0)


@pytest.mark.parametrize("m2, per_area", [(0.4, 151.71), (0.5, 180.05), (0.6, 203.03)])
def test_face_against_mfp_check_values(m2, per_area):
    # method.md check values: corrected flow per unit face area 151.71 / 180.05 / 203.03 kg/(s m^2) at
    # M2 = 0.4 / 0.5 / 0.6 (derived from the mass-flow function, method §3)
    inlet, rating = PITOT.inlet, PITOT.rating(ISA.rating)
    fs = free_stream(ISA, 0.8, 10000.0)
    fc = face(inlet, rating, fs, swept_demand(fs, per_area * inlet.face_area_m2))
    assert float(fc.mach) == pytest.approx(m2, abs=1e-4)
    assert not fc.choked


def test_face_chokes_at_241_24():
    # method.md: choking corrected flow per unit area 241.24 kg/(s m^2); at or above it M2 is taken as 1
    inlet, rating = PITOT.inlet, PITOT.rating(ISA.rating)
    fs = free_stream(ISA, 0.8, 10000.0)
    fc = face(inlet, rating, fs, swept_demand(fs, np.array([241.0, 241.5, 300.0]) * inlet.face_area_m2))
    assert fc.choked.tolist() == [False, True, True]
    assert fc.mach[1:].tolist() == [1.0, 1.0]
    assert F.has(fc.flags, F.FACE_CHOKED).tolist() == [False, True, True]
    # a choked face passes its choked flow: 241.24 kg/(s m^2) x A2 (to the 5 figures of the check value)
    assert fc.corrected_flow_kg_s[2] == pytest.approx(241.24 * inlet.face_area_m2, rel=2e-5)


def test_face_relative_tip_mach_by_hand():
    # method §3: M_rel = sqrt(M2^2 + (U/a2)^2), a2 = sqrt(g R T2), T2 = T_t0/(1 + (g-1)/2 M2^2)
    rating = dataclasses.replace(PITOT.rating(ISA.rating), fan_tip_speed_m_s=400.0, corrected_tip_speed_m_s=None)
    fs = free_stream(ISA, 0.6, 0.0)
    fc = face(PITOT.inlet, rating, fs, swept_demand(fs, 180.05 * PITOT.inlet.face_area_m2))
    t2 = 288.15 * (1 + 0.2 * 0.36) / (1 + 0.2 * 0.25)
    a2 = np.sqrt(GAMMA * R_AIR * t2)
    assert float(fc.relative_tip_mach) == pytest.approx(np.hypot(0.5, 400.0 / a2), rel=1e-4)


def test_demand_is_the_rating_table_against_theta2():
    rating = PITOT.rating(ISA.rating)
    fs = free_stream(ISA, np.array([0.3, 0.8]), 0.0)
    dem = demand(rating, fs)
    np.testing.assert_array_equal(dem.theta2, fs.total_temperature_k / 288.15)  # theta2 = T_t0/T_ref
    expected = np.interp(dem.theta2, rating.theta, rating.corrected_flow_kg_s)  # linear (method §2)
    np.testing.assert_allclose(dem.corrected_flow_kg_s, expected, rtol=1e-12)


def _supersonic_stages(wc2_per_area):
    """Free stream at M0 = 2, 11 km for the pitot inlet, with the demand given per unit face area."""
    fs = free_stream(ISA, 2.0, 11000.0)
    dem = swept_demand(fs, np.asarray(wc2_per_area) * PITOT.inlet.face_area_m2)
    fc = face(PITOT.inlet, PITOT.rating(ISA.rating), fs, dem)
    return fs, dem, fc, compression(PITOT, fs)


def test_compression_of_a_pitot_is_one_normal_shock():
    fs, dem, fc, comp = _supersonic_stages(100.0)
    # NACA 1135 normal shock at M1 = 2: p_t2/p_t1 = 0.72087; a pitot inlet captures at most MFR 1 (method §6)
    assert float(comp.shocks.external_recovery) == pytest.approx(0.72087, abs=1e-5)
    assert float(comp.shocks.max_mass_flow_ratio) == 1.0
    assert comp.started is None


def test_capture_supercritical_rule():
    # method §6: above MFR_max the captured flow is held at MFR_max and recovery falls to pi MFR_max/MFR
    fs, dem, fc, comp = _supersonic_stages(np.array([60.0, 200.0]))
    cap = capture(PITOT.inlet, fs, dem, fc, comp)
    pi_duct = 1.0 - PITOT.inlet.duct_loss_coefficient * (GAMMA / 2 * fc.mach**2 * (1 + 0.2 * fc.mach**2) ** -3.5)
    pi = 0.72087 * pi_duct
    w = fc.corrected_flow_kg_s * pi * fs.inlet_total_pressure_pa / 101325.0 / np.sqrt(dem.theta2)
    mfr = w / (1.0 - comp.bleed_fraction) / cap.capture_flow_kg_s
    assert mfr[0] < 1.0 < mfr[1]  # one subcritical, one supercritical demand
    assert cap.supercritical.tolist() == [False, True]
    np.testing.assert_allclose(cap.recovery, [pi[0], pi[1] / mfr[1]], rtol=2e-5)
    held = cap.engine_flow_kg_s / (1.0 - comp.bleed_fraction) / cap.capture_flow_kg_s
    assert held[1] == pytest.approx(1.0, rel=1e-12)  # captured at MFR_max = 1
    thr = throat_and_doors(PITOT.inlet, PITOT.limits, fs, comp, cap)
    assert thr.regime.tolist() == [SUBCRITICAL, SUPERCRITICAL]


def test_capture_takes_a_pluggable_recovery_law():
    fs, dem, fc, comp = _supersonic_stages(60.0)
    cap = capture(PITOT.inlet, fs, dem, fc, comp, recovery_law=lambda inlet, f, d, fc, c: (1.0, 0.5))
    assert float(cap.recovery) == 0.5 and cap.duct_recovery == 1.0


def test_throat_choke_holds_the_flow_at_the_choked_value():
    # method §6: MFP_th = W sqrt(T_t0)/(A_th pi_ext p_t0); at or above choking W and pi fall in proportion
    inlet = dataclasses.replace(BARE, throat_area_m2=0.5 * PITOT.inlet.face_area_m2)
    project = dataclasses.replace(PITOT, inlet=inlet)
    fs = free_stream(ISA, 0.6, 0.0)
    dem = swept_demand(fs, 200.0 * inlet.face_area_m2)  # M2 about 0.59: the half-size throat cannot pass it
    fc = face(inlet, project.rating(ISA.rating), fs, dem)
    comp = compression(project, fs)
    cap = capture(inlet, fs, dem, fc, comp)
    thr = throat_and_doors(inlet, project.limits, fs, comp, cap)
    assert F.has(thr.flags, F.THROAT_CHOKED) and float(thr.throat_mach) == 1.0
    mfp_star = np.sqrt(GAMMA / R_AIR) * (1.2) ** -3.0  # MFP(1), method §3
    choked = inlet.throat_area_m2 * fs.total_pressure_pa * mfp_star / np.sqrt(fs.total_temperature_k)
    assert float(thr.engine_flow_kg_s) == pytest.approx(float(choked), rel=1e-12)
    assert float(thr.recovery / cap.recovery) == pytest.approx(float(choked / cap.engine_flow_kg_s), rel=1e-12)


def test_additive_drag_is_zero_at_full_capture():
    # method §7 (NACA 1135 momentum relations): D_add = 0 when A0 = A_c (and pi_ext = 1, subsonic)
    inlet = BARE
    fs = free_stream(ISA, 0.7, 9000.0)
    rho_v_ac = fs.density_kg_m3 * fs.velocity_m_s * inlet.capture_area_m2
    # the demand that makes MFR = 1 exactly without duct loss (pi = 1): W = rho0 V0 A_c
    project = dataclasses.replace(PITOT, inlet=dataclasses.replace(inlet, duct_loss_coefficient=0.0,
                                                                   throat_area_m2=inlet.capture_area_m2))
    theta2 = fs.total_temperature_k / 288.15
    wc2 = rho_v_ac * np.sqrt(theta2) * 101325.0 / fs.total_pressure_pa  # W_c2 = W sqrt(theta2)/(p_t0/p_ref)
    pts = run_chain(project, ISA, 0.7, 9000.0, demand=wc2)
    assert float(pts.mass_flow_ratio) == pytest.approx(1.0, rel=1e-12)
    assert abs(float(pts.additive_drag_n)) < 1e-6 * float(fs.static_pressure_pa * inlet.capture_area_m2)
    assert float(pts.capture_mach) == pytest.approx(0.7, rel=1e-9)  # M1 = M0 when A0 = A1, no loss


def test_drag_and_ledger_stages_by_hand():
    # method §7: C_add = D_add/(q0 A_c), spillage drag (1 - K_lip) D_add below MFR 1; method §13: D_bleed = 0
    project = PITOT
    fs = free_stream(ISA, 0.5, 3000.0)
    dem = demand(project.rating(ISA.rating), fs)
    fc = face(project.inlet, project.rating(ISA.rating), fs, dem)
    comp = compression(project, fs)
    cap = capture(project.inlet, fs, dem, fc, comp)
    thr = throat_and_doors(project.inlet, project.limits, fs, comp, cap)
    drag = pre_entry_drag(inlet_type(project.inlet.type), project.inlet, fs, comp, thr)
    q0 = 0.5 * GAMMA * fs.static_pressure_pa * 0.25
    assert float(drag.additive_drag_coefficient) == pytest.approx(
        float(drag.additive_drag_n / (q0 * project.inlet.capture_area_m2)), rel=1e-12)
    if float(thr.mass_flow_ratio) < 1.0:
        assert float(drag.spillage_drag_n) == pytest.approx(
            float((1.0 - project.inlet.lip_suction_factor) * drag.additive_drag_n), rel=1e-12)
    led = ledger(project.rating(ISA.rating), project.inlet, fs, thr, drag)
    assert float(led.ram_drag_n) == pytest.approx(float(thr.engine_flow_kg_s * fs.velocity_m_s), rel=1e-12)
    assert np.all(np.asarray(led.bleed_drag_n) == 0.0)  # no bleed on this inlet


def test_characteristic_does_not_depend_on_altitude():
    # method §16: at fixed M0 and MFR the characteristic does not depend on altitude (every term scales with p0
    # and T0): the same W_c2 sweep at 5, 11 and 16 km gives the same MFR and recovery
    sweep = np.linspace(0.2, 1.2, 41) * 241.24 * RAMP.inlet.face_area_m2
    ch = characteristic(RAMP, RAMP.cases[0], 1.8, np.array([5000.0, 11000.0, 16000.0]), sweep)
    assert ch.recovery.shape == (41, 3)
    for k in (1, 2):
        np.testing.assert_allclose(ch.mass_flow_ratio[:, k], ch.mass_flow_ratio[:, 0], rtol=1e-12)
        np.testing.assert_allclose(ch.recovery[:, k], ch.recovery[:, 0], rtol=1e-12)
    # supersonic: MFR never exceeds MFR_max (the supercritical branch is a vertical line), pi falls beyond it
    mfr, mfr_max = ch.mass_flow_ratio[:, 0], ch.max_mass_flow_ratio[:, 0]
    assert np.all(mfr <= mfr_max * (1 + 1e-12))
    sup = (ch.regime[:, 0] == SUPERCRITICAL) & ~F.has(ch.flags[:, 0], F.FACE_CHOKED)  # a choked face holds W_c2
    assert sup.any() and np.all(np.diff(ch.recovery[sup, 0]) < 0)


def test_characteristic_is_the_map_chain_at_the_rating_demand():
    # the same chain: a characteristic through the rating's own W_c2 gives the map point's values
    case = RAMP.cases[0]
    point = run_chain(RAMP, case, 1.6, 12000.0)
    ch = characteristic(RAMP, case, 1.6, 12000.0, np.array([float(point.corrected_flow_kg_s)]))
    assert float(ch.recovery[0]) == float(point.recovery)
    assert float(ch.mass_flow_ratio[0]) == float(point.mass_flow_ratio)


def test_compression_source_is_pluggable():
    # a measured-characteristic source (method §17) replaces the model's compression stage only
    def measured(project, fs):
        base = model_compression(project, fs)
        shocks = dataclasses.replace(base.shocks, external_recovery=np.full(np.shape(fs.mach), 0.9),
                                     max_mass_flow_ratio=np.full(np.shape(fs.mach), 0.95))
        return Compression(shocks, base.throat_area_m2, base.bleed_fraction, base.started, base.flags)

    pts = run_chain(PITOT, ISA, np.array([1.5]), np.array([11000.0]), compression_source=measured)
    assert pts.external_recovery.tolist() == [0.9]
    assert pts.mass_flow_ratio[0] <= 0.95 * (1 + 1e-12)


def test_lean_keeps_one_value_for_a_constant_array():
    a = lean(np.full((400, 300), np.nan), (400, 300))
    assert a.shape == (400, 300) and np.isnan(a).all() and a.base.nbytes == 8
    b = lean(np.array([0.0, -0.0]), (2,))  # bits differ (-0.0): kept whole
    assert b.base is None or b.base.nbytes == 16
    c = lean(np.arange(6.0).reshape(2, 3), (2, 3))
    np.testing.assert_array_equal(c, np.arange(6.0).reshape(2, 3))


def _retained_bytes(points) -> int:
    seen, total = set(), 0
    for f in dataclasses.fields(points):
        a = getattr(points, f.name)
        if isinstance(a, np.ndarray):
            while isinstance(a.base, np.ndarray):
                a = a.base
            if id(a) not in seen:
                seen.add(id(a))
                total += a.nbytes
    return total


def test_memory_per_point_of_a_pitot_map():
    # quantities a pitot inlet does not have (bypass, bleed, auxiliary doors, tip speed, ...) are one value,
    # not arrays: the operating points of a 120 x 100 map keep at most 150 bytes a point (38 float64 arrays
    # were 304 bytes before the chain)
    mach, alt = np.linspace(0.1, 0.9, 120), np.linspace(0.0, 12000.0, 100)
    pts = run_chain(PITOT, PITOT.cases[0], mach[None, :], alt[:, None])
    assert _retained_bytes(pts) / pts.flags.size <= 150
    assert pts.flags.dtype == F.FLAG_DTYPE and np.asarray(pts.bypass_flow_kg_s).base.nbytes <= 8


def test_flag_dtype_holds_every_bit():
    bits = np.zeros(3, F.FLAG_DTYPE)
    for value in F.FLAG_BITS.values():
        bits |= F.flag_where(np.array([True, False, True]), value)
    assert int(bits[0]) == sum(F.FLAG_BITS.values()) and int(bits[1]) == 0
    assert F.names_of(int(bits[0])) == list(F.FLAG_BITS)


def test_each_stage_is_short():
    # the design: each stage a plain function under about 80 lines, testable alone
    import ast

    for module in ("stages", "throat", "drag", "ledger", "chain"):
        path = ROOT / "engine_air" / "flow" / f"{module}.py"
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.FunctionDef):
                assert node.end_lineno - node.lineno + 1 <= 80, f"{module}.{node.name}"


def test_one_point_is_the_map_at_that_point():
    # OperatingPoints.at (what the point record reads) gives every quantity, kept or computed when read, and
    # every check exactly as the whole map has it at that point
    from engine_air.envelope.evaluate import evaluate_project

    result = evaluate_project(dataclasses.replace(RAMP, grid=dataclasses.replace(RAMP.grid, mach_points=9,
                                                                                 altitude_points=7)))
    pts = result.cases[0].points
    one = pts.at((3, 5))
    names = [f.name for f in dataclasses.fields(pts) if isinstance(getattr(pts, f.name), np.ndarray)]
    names += [n for n in dir(type(pts)) if isinstance(getattr(type(pts), n), property) and not n.startswith("_")]
    for name in set(names) - {"shape", "ramp_wave_angle_rad", "ramp_downstream_mach"}:
        np.testing.assert_array_equal(np.asarray(getattr(one, name)), np.asarray(getattr(pts, name))[3, 5], name)
    np.testing.assert_array_equal(one.ramp_wave_angle_rad, pts.ramp_wave_angle_rad[:, 3, 5])
    for a, b in zip(one.checks, pts.checks):
        assert (a.name, float(a.margin), bool(a.fails)) == (b.name, float(b.margin[3, 5]), bool(b.fails[3, 5]))
