"""The editors of the keys issue 11 added: the [inlet.schedule] table, a rating's thrust table, the corrected tip
speed and a case's region. Each edit reaches the project (and the document's project in the main window), the
saved file reads back to the same project, and a refused edit keeps the project and shows the schema's message
in the red bar."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

pytest.importorskip("PySide6")

from app.editors import ProjectEditors  # noqa: E402
from app.units import US, Units  # noqa: E402
from engine_air.project import load_project, save_project  # noqa: E402

SAMPLES = Path(__file__).resolve().parent.parent / "sample_projects"
FIGHTER = SAMPLES / "variable_geometry_fighter.toml"
RAMP = SAMPLES / "supersonic_two_ramp.toml"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"


@pytest.fixture
def make(qtbot):
    def make(path):
        e = ProjectEditors()
        qtbot.addWidget(e)
        e.resize(900, 800)
        e.set_project(load_project(path))
        e.show()
        return e
    return make


def round_trip(project, tmp_path):
    path = tmp_path / "edited.toml"
    save_project(project, path)
    return load_project(path)


def refused(editors, before, *needles):
    assert editors.project is before
    text = editors.error.text()
    assert editors.error.isVisible() and text.startswith("Edit not applied")
    for n in needles:
        assert n in text, (n, text)


# -- [inlet.schedule] ---------------------------------------------------------------------------------------------

def test_schedule_table_edits_and_round_trips(make, tmp_path):
    e = make(FIGHTER)
    t = e.schedule_table
    assert t.rowCount() == 6 and t.columnCount() == 1 + 1 + 3 + 1  # M0, throat, 3 ramps, bleed
    t.item(2, 1).setText("0.475")  # throat area at M0 1.3 (m^2: SI display)
    assert e.project.inlet.schedule.throat_area_m2[2] == 0.475
    assert e.project.inlet.schedule.throat_area_m2[:2] == (0.46, 0.46)  # untouched cells exact
    t.item(3, 3).setText("6.5")  # ramp 2 at M0 1.6
    assert e.project.inlet.schedule.ramp_angles_deg[3] == (6.0, 6.5, 6.0)
    back = round_trip(e.project, tmp_path)
    assert back == e.project and back.inlet.schedule.throat_area_m2[2] == 0.475


def test_schedule_refused_edit_keeps_the_project(make):
    e = make(FIGHTER)
    before = e.project
    e.schedule_table.item(3, 0).setText("1.2")  # M0 1.6 -> 1.2, below the row before: not increasing
    refused(e, before, "inlet.schedule.mach")
    e2 = make(FIGHTER)
    before = e2.project
    e2.schedule_table.item(0, 5).setText("0.7")  # bleed fraction beyond its bound (< 0.5)
    refused(e2, before, "bleed_fraction")


def test_schedule_columns_switch_on_and_off(make, tmp_path):
    e = make(RAMP)
    assert e.project.inlet.schedule is None and e.schedule_table.rowCount() == 0
    e.schedule_boxes["throat_area_m2"].setChecked(True)  # start a schedule: the fixed value at each row
    sch = e.project.inlet.schedule
    assert sch is not None and sch.throat_area_m2 == (e.project.inlet.throat_area_m2,) * len(sch.mach)
    assert e.schedule_table.rowCount() == len(sch.mach) and e.schedule_table.columnCount() == 2
    e.schedule_table.setCurrentCell(0, 0)
    e.schedule_add_row.click()
    assert len(e.project.inlet.schedule.mach) == len(sch.mach) + 1
    e.schedule_boxes["ramp_angles_deg"].setChecked(True)
    assert e.project.inlet.schedule.ramp_angles_deg[0] == e.project.inlet.ramp_angles_deg
    assert round_trip(e.project, tmp_path) == e.project
    e.schedule_boxes["ramp_angles_deg"].setChecked(False)
    e.schedule_boxes["throat_area_m2"].setChecked(False)  # nothing scheduled any more: no schedule
    assert e.project.inlet.schedule is None
    assert not e.schedule_boxes["bleed_fraction"].isChecked()


def test_schedule_follows_the_inlet_type(make):
    e = make(FIGHTER)
    e.inlet_type.setCurrentText("pitot")  # the type change drops the schedule (as before)
    assert e.project.inlet.type == "pitot" and e.project.inlet.schedule is None
    assert e.schedule_boxes["shock_on_lip_mach"].isHidden()  # a pitot inlet has no shock-on-lip Mach
    assert not e.schedule_boxes["throat_area_m2"].isHidden() and e.schedule_table.rowCount() == 0


def test_schedule_in_the_main_window_reaches_the_document(qtbot, tmp_path):
    from gui_support import window_factory

    with window_factory(qtbot, tmp_path, FIGHTER) as make_window:
        w = make_window(FIGHTER, wait=False)
        w.editors.schedule_table.item(5, 1).setText("0.49")
        assert w.document.project.inlet.schedule.throat_area_m2[5] == 0.49
        assert w.document.dirty


# -- thrust table -------------------------------------------------------------------------------------------------

def test_thrust_table_edits_and_round_trips(make, tmp_path):
    e = make(FIGHTER)
    t = e.thrust_table
    assert (t.rowCount(), t.columnCount()) == (1 + 4, 1 + 6)
    t.item(2, 3).setText("85000")  # 6000 m, M0 0.9
    r = e.project.ratings[0]
    assert r.net_thrust_n[1][2] == 85000.0 and r.net_thrust_n[0] == (105000.0, 100000.0, 118000.0, 140000.0,
                                                                       150000.0, 150000.0)
    e.thrust_ref_mode.setCurrentIndex(1)
    e.thrust_ref.setValue(0.97)
    e.flush()
    assert e.project.ratings[0].thrust_reference_recovery == pytest.approx(0.97)
    e.thrust_exchange.setValue(1.5)
    e.flush()
    assert e.project.ratings[0].recovery_thrust_exchange == pytest.approx(1.5)
    t.setCurrentCell(0, 2)
    e.thrust_buttons[0].click()  # add a Mach column after M0 0.4
    assert e.project.ratings[0].thrust_mach[:3] == (0.0, 0.4, 0.65)
    assert len(e.project.ratings[0].net_thrust_n[0]) == 7
    assert round_trip(e.project, tmp_path) == e.project


def test_thrust_refused_edit(make):
    e = make(FIGHTER)
    before = e.project
    e.thrust_table.item(1, 1).setText("-5")  # net thrust must be > 0
    refused(e, before, "net_thrust_n")
    e.thrust_table.item(0, 2).setText("0.0")  # Mach 0.4 -> 0.0: not increasing
    refused(e, before, "thrust_mach")


def test_thrust_data_switched_on_and_off(make, tmp_path):
    e = make(PITOT)
    assert e.project.ratings[0].net_thrust_n is None and not e.thrust_box.isChecked()
    e.thrust_box.setChecked(True)
    r = e.project.ratings[0]
    assert r.net_thrust_n is not None and r.thrust_reference_recovery == "mil-e-5008b"
    assert r.recovery_thrust_exchange == 1.0 and e.thrust_table.rowCount() == 1 + len(r.thrust_altitude_m)
    assert round_trip(e.project, tmp_path) == e.project
    e.thrust_box.setChecked(False)
    r = e.project.ratings[0]
    assert (r.thrust_mach, r.thrust_altitude_m, r.net_thrust_n, r.recovery_thrust_exchange) == (None,) * 4


def test_thrust_in_us_units(make):
    e = make(FIGHTER)
    e.set_units(Units(US))
    cell = e.thrust_table.item(1, 1)
    assert float(cell.text()) == pytest.approx(105000.0 / 4.4482216152605, rel=1e-5)
    cell.setText("20000")  # lbf
    assert e.project.ratings[0].net_thrust_n[0][0] == pytest.approx(20000 * 4.4482216152605)


# -- corrected tip speed ------------------------------------------------------------------------------------------

def test_tip_speed_modes(make, tmp_path):
    e = make(FIGHTER)
    e.rating_pick.setCurrentIndex(1)  # take-off: physical 430 m/s
    assert e.tip_mode.currentIndex() == 1 and e.rating_table.columnCount() == 2
    e.tip_mode.setCurrentIndex(2)
    r = e.project.ratings[1]
    assert r.fan_tip_speed_m_s is None
    assert r.corrected_tip_speed_m_s == pytest.approx([430.0 / th ** 0.5 for th in r.theta], rel=1e-12)
    assert e.rating_table.columnCount() == 3
    e.rating_table.item(1, 2).setText("420")
    assert e.project.ratings[1].corrected_tip_speed_m_s[1] == 420.0
    assert round_trip(e.project, tmp_path) == e.project
    before = e.project
    e.rating_table.item(0, 2).setText("0")  # must be > 0
    refused(e, before, "corrected_tip_speed_m_s")
    e.tip_mode.setCurrentIndex(0)
    r = e.project.ratings[1]
    assert r.fan_tip_speed_m_s is None and r.corrected_tip_speed_m_s is None


# -- case regions -------------------------------------------------------------------------------------------------

def test_case_region_edits(make, tmp_path):
    e = make(FIGHTER)
    t = e.case_table
    assert e.project.cases[1].mach_range == (0.0, 0.4) and t.item(1, 4).text() == "0.4"
    t.item(1, 4).setText("0.5")
    assert e.project.cases[1].mach_range == (0.0, 0.5)
    assert e.project.cases[1].altitude_range_m == (0.0, 3000.0)  # kept
    t.item(0, 5).setText("0")
    t.item(0, 6).setText("12000")
    assert e.project.cases[0].altitude_range_m == (0.0, 12000.0) and e.project.cases[0].mach_range is None
    assert round_trip(e.project, tmp_path) == e.project
    t.item(1, 3).setText("")
    t.item(1, 4).setText("")
    assert e.project.cases[1].mach_range is None


def test_case_region_refused(make):
    e = make(FIGHTER)
    before = e.project
    e.case_table.item(1, 3).setText("0.6")  # from 0.6 to 0.4
    refused(e, before, "mach_range")
    e2 = make(FIGHTER)
    before = e2.project
    e2.case_table.item(0, 3).setText("0.3")  # one bound only
    assert e2.project is before and "give both bounds" in e2.error.text()


def test_screenshots_of_the_new_editors(make):
    e = make(FIGHTER)
    for index, tag in ((2, "schedule"), (4, "engine"), (6, "cases")):
        e.tabs.setCurrentIndex(index)
        e.grab().save(f"/tmp/editors_test_{tag}.png")
    e.rating_parts.setCurrentIndex(1)
    e.tabs.setCurrentIndex(4)
    e.grab().save("/tmp/editors_test_thrust.png")
