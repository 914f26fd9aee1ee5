"""The project editors read the schema: spin-box ranges, decimals and tooltips, and the keys of the inlet type
chosen (from the registry of inlet types)."""

from __future__ import annotations

import os
from dataclasses import replace

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

pytest.importorskip("PySide6")

from app.editors import ProjectEditors  # noqa: E402
from engine_air.project import load_project, schema  # noqa: E402

RAMP = Path(__file__).resolve().parent.parent / "sample_projects" / "supersonic_two_ramp.toml"


@pytest.fixture
def editors(qtbot):
    e = ProjectEditors()
    qtbot.addWidget(e)
    e.set_project(load_project(RAMP))
    e.show()
    return e


def test_spin_ranges_decimals_and_tooltips_come_from_the_schema(editors):
    for key, spin in editors.inlet_spins.items():
        f = schema.field(f"inlet.{key}")
        tiny = 10.0 ** -spin.decimals()
        assert spin.decimals() == f.decimals, key
        assert spin.minimum() == pytest.approx(f.lo + (tiny if f.lo_open else 0.0)), key
        assert spin.maximum() == pytest.approx(f.hi - (tiny if f.hi_open else 0.0)), key
        assert f.description in spin.toolTip() and f.allowed_text() in spin.toolTip(), key
    lip = schema.field("inlet.shock_on_lip_mach", "external-ramp")
    assert editors.lip_mach.minimum() > lip.lo and editors.lip_mach.maximum() == pytest.approx(lip.hi)
    ramp = schema.field("inlet.ramp_angles_deg", "external-ramp")
    assert editors.ramp_spins[0].minimum() == ramp.lo == 0.0  # a 0 deg ramp may be entered
    assert editors.ramp_count.maximum() == ramp.length[1]
    grid = schema.field("grid.mach_points")
    assert (editors.mach_points.minimum(), editors.mach_points.maximum()) == (grid.lo, grid.hi)


def test_rows_of_the_chosen_inlet_type_only(editors, qtbot):
    form = editors.inlet_form
    assert form.isRowVisible(editors.lip_mach) and form.isRowVisible(editors.ramp_count)
    editors.inlet_type.setCurrentText("pitot")
    assert editors.project.inlet.type == "pitot" and editors.project.inlet.ramp_angles_deg == ()
    assert not form.isRowVisible(editors.lip_mach) and not form.isRowVisible(editors.ramp_count)
    assert not form.isRowVisible(editors.type_widgets["cone_half_angles_deg"][0])  # a type not chosen
    editors.inlet_type.setCurrentText("external-ramp")
    assert editors.project.inlet.ramp_angles_deg == (8.0, 7.0) and editors.project.inlet.shock_on_lip_mach == 2.0
    assert form.isRowVisible(editors.lip_mach)
    assert [editors.inlet_type.itemText(k) for k in range(editors.inlet_type.count())] == list(schema.inlet_types())


def test_an_edit_outside_the_schema_is_refused_with_the_key(editors):
    before = editors.project
    assert editors.apply_now(lambda p: replace(p, inlet=replace(p.inlet, bleed_fraction=0.7))) is False
    assert "inlet.bleed_fraction" in editors.last_error() and "< 0.5" in editors.last_error()
    assert editors.project is before
