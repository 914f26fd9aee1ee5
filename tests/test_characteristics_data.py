"""Measured characteristics (method §17): reading the table, the curves, interpolation, the match root.

References: the §17 definitions (critical point, branch, stability limit, interpolation at equal MFR fraction)
applied by hand to small tables built in the tests; continuity MFR = W/(rho0 V0 A_c) with W = W_c2 pi p_t0 /
(p_ref sqrt(theta2)) (method §5) for the root.
"""

from __future__ import annotations

import os

import numpy as np
import pytest

from engine_air.characteristics.curves import find_curves
from engine_air.characteristics.interpolate import column_at, locate, recovery_at
from engine_air.characteristics.root import match_on_data
from engine_air.characteristics.table import CharacteristicsTable, read_characteristics
from engine_air.project.errors import ProjectError


def _write(tmp_path, text, name="t.csv", mode="w"):
    path = tmp_path / name
    if mode == "wb":
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    return path


GOOD = """mach,mass_flow_ratio,recovery,stable
2.0,0.50,0.880,0
2.0,0.70,0.900,1
2.0,0.90,0.920,1
2.0,0.90,0.880,1
3.0,0.40,0.700,1
3.0,0.80,0.740,1
"""


def test_curves_by_hand(tmp_path):
    """Critical MFR = largest MFR, critical recovery = highest within 0.5 %, stability limit = smallest stable MFR
    where some row is unstable (§17), by hand from the table above."""
    curves = find_curves(read_characteristics(_write(tmp_path, GOOD)))
    assert curves.mach.tolist() == [2.0, 3.0]
    assert curves.critical_mass_flow_ratio.tolist() == [0.9, 0.8]
    assert curves.critical_recovery.tolist() == [0.92, 0.74]
    assert curves.stability_limit[0] == 0.7 and np.isnan(curves.stability_limit[1])
    assert curves.min_fraction == pytest.approx([0.5 / 0.9, 0.5])


def test_interpolation_against_a_table_built_by_hand(tmp_path):
    """At Mach 2.5, half-way: MFR_crit (0.9 + 0.8)/2, pi_crit (0.92 + 0.74)/2, and the recovery at fraction 0.8 the
    mean of each curve's linear branch there: Mach 2 at MFR 0.72 -> 0.88 + (0.72-0.5)/(0.7-0.5)*0.02 ... by hand."""
    curves = find_curves(read_characteristics(_write(tmp_path, GOOD)))
    at = locate(curves, np.array([2.5]))
    assert at.critical_mass_flow_ratio[0] == pytest.approx(0.85)
    assert at.critical_recovery[0] == pytest.approx(0.83)
    # Mach 2 at fraction 0.8 (MFR 0.72): between (0.70, 0.900) and (0.90, 0.920): 0.900 + 0.02 * 0.1 = 0.902
    # Mach 3 at fraction 0.8 (MFR 0.64): between (0.40, 0.700) and (0.80, 0.740): 0.700 + 0.04 * 0.6 = 0.724
    assert recovery_at(at, np.array([0.8]))[0] == pytest.approx(0.5 * (0.902 + 0.724), abs=1e-12)
    # below the smallest tested fraction of a neighbour (Mach 2: 0.556): not covered
    assert np.isnan(recovery_at(at, np.array([0.52]))[0])
    # outside the tested Mach range: not covered
    assert not locate(curves, np.array([3.2])).covered[0]
    # a query at incidence the table never varied: not covered
    assert not locate(curves, np.array([2.5]), alpha_deg=2.0).covered[0]


def test_interpolation_in_mach_and_alpha():
    """Barycentric interpolation on the Delaunay triangles of (Mach, alpha): a quantity linear in both is
    reproduced exactly (the defining property of linear interpolation on a triangulation)."""
    rows = {"mach": [], "alpha_deg": [], "mass_flow_ratio": [], "recovery": []}
    for m in (1.5, 2.0, 2.5):
        for a in (0.0, 4.0, 8.0):
            crit = 0.9 - 0.05 * (m - 1.5) - 0.01 * a
            for f in (0.5, 1.0):
                rows["mach"].append(m)
                rows["alpha_deg"].append(a)
                rows["mass_flow_ratio"].append(f * crit)
                rows["recovery"].append(0.95 - 0.04 * m - 0.003 * a + 0.02 * f)
    table = CharacteristicsTable("t", {k: np.array(v) for k, v in rows.items()})
    at = locate(find_curves(table), np.array([1.7, 2.3]), np.array([1.0, 6.5]))
    m, a = np.array([1.7, 2.3]), np.array([1.0, 6.5])
    assert at.covered.all()
    assert at.critical_mass_flow_ratio == pytest.approx(0.9 - 0.05 * (m - 1.5) - 0.01 * a, abs=1e-12)
    assert recovery_at(at, np.array([0.75, 0.75])) == pytest.approx(0.95 - 0.04 * m - 0.003 * a + 0.015, abs=1e-12)


def test_match_root_satisfies_continuity(tmp_path):
    """The root gives MFR = c pi(MFR) (continuity, §5 and §17); above the critical point the captured flow is
    held at MFR_crit and pi = MFR_crit / c (§6)."""
    curves = find_curves(read_characteristics(_write(tmp_path, GOOD)))
    at = locate(curves, np.full(5, 2.0))
    c = np.array([0.6, 0.8, 0.9, 1.2, 0.3])
    op = match_on_data(at, c)
    sub = ~op.supercritical & op.covered
    assert sub[:3].all()
    assert op.mass_flow_ratio[sub] == pytest.approx(c[sub] * op.recovery[sub], abs=1e-12)
    assert op.recovery[sub] == pytest.approx(recovery_at(at, op.fraction)[sub], abs=1e-12)
    assert op.supercritical[3] and op.mass_flow_ratio[3] == pytest.approx(0.9)
    assert op.recovery[3] == pytest.approx(0.9 / 1.2)
    # c = 0.3 asks for MFR about 0.27: below the smallest tested flow (0.5): not covered (falls back to the model)
    assert op.below_tested[4] and not op.covered[4]


def test_extra_columns_interpolated(tmp_path):
    text = "mach,mass_flow_ratio,recovery,dc60\n2.0,0.5,0.9,0.10\n2.0,1.0,0.92,0.30\n"
    at = locate(find_curves(read_characteristics(_write(tmp_path, text))), np.array([2.0]))
    assert column_at(at, "dc60", np.array([0.75]))[0] == pytest.approx(0.20)
    assert column_at(at, "surge_margin_loss", np.array([0.75])) is None


BAD = [
    ("mach,recovery\n2.0,0.9\n2.0,0.8\n", "missing column mass_flow_ratio"),
    ("mach,mass_flow_ratio,recovery,colour\n2,0.5,0.9,1\n2,1,0.9,1\n", "column colour"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,nan\n2.0,1.0,0.9\n", "row 1, column recovery"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,\n2.0,1.0,0.9\n", "row 1, column recovery"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,-0.2\n2.0,1.0,0.9\n", "above 0 and at most 1"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,1.02\n2.0,1.0,0.9\n", "above 0 and at most 1"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,0.9\n2.0,1.0,0.9\n2.5,0.5,0.8\n", "a curve needs at least two points"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,0.9\n2.0,0.5,0.9\n", "repeats row 1"),
    ("mach,mass_flow_ratio,recovery\n2.0,0.5,high\n2.0,1.0,0.9\n", "must be a number"),
    ("mach,mass_flow_ratio,recovery,stable\n2.0,0.5,0.9,2\n2.0,1.0,0.9,1\n", "0 (buzz or unstable) or 1"),
    ("", "is empty"),
]


@pytest.mark.parametrize("text, words", BAD)
def test_bad_tables_refused_with_a_clear_message(tmp_path, text, words):
    path = _write(tmp_path, text)
    with pytest.raises(ProjectError) as info:
        read_characteristics(path)
    message = str(info.value)
    assert str(path) in message and words in message


def test_non_utf8_csv_refused(tmp_path):
    path = _write(tmp_path, "mach,mass_flow_ratio,recovery\n2.0,0.5,0.9\n2.0,1.0,0.9 \xe9\n".encode("latin-1"),
                  mode="wb")
    with pytest.raises(ProjectError, match="UTF-8"):
        read_characteristics(path)


def test_huge_file_refused_unread(tmp_path):
    """A 2 GB file (sparse: no disk used) is refused from its size, before any read."""
    path = tmp_path / "huge.csv"
    with open(path, "wb") as handle:
        handle.truncate(2 * 1024 ** 3)
    with pytest.raises(ProjectError, match="at most 64 MiB"):
        read_characteristics(path)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs FIFOs")
def test_fifo_refused_without_hanging(tmp_path):
    path = tmp_path / "pipe.csv"
    os.mkfifo(path)
    with pytest.raises(ProjectError, match="regular file"):
        read_characteristics(path)


def test_parquet_with_wrong_types_refused(tmp_path):
    import pyarrow as pa
    import pyarrow.parquet as pq

    path = tmp_path / "t.parquet"
    pq.write_table(pa.table({"mach": ["2.0", "2.0"], "mass_flow_ratio": [0.5, 1.0], "recovery": [0.9, 0.9]}), path)
    # text cells in Parquet are converted like CSV text; a column of dates is refused by type
    assert read_characteristics(path).column("mach").tolist() == [2.0, 2.0]
    pq.write_table(pa.table({"mach": pa.array([1, 2], pa.timestamp("s")), "mass_flow_ratio": [0.5, 1.0],
                             "recovery": [0.9, 0.9]}), path)
    with pytest.raises(ProjectError, match="column mach.*must hold numbers"):
        read_characteristics(path)


def test_parquet_reads_like_csv(tmp_path):
    import pyarrow as pa
    import pyarrow.parquet as pq

    csv = read_characteristics(_write(tmp_path, GOOD))
    path = tmp_path / "t.parquet"
    pq.write_table(pa.table({k: v for k, v in csv.columns.items()}), path)
    parquet = read_characteristics(path)
    for name, values in csv.columns.items():
        assert parquet.column(name).tolist() == values.tolist()
