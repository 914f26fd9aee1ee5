"""Bad project files: every kind gives exactly ``ProjectError`` naming the file, the key path, the value and
what is allowed (interfaces document, "Project file"); an unknown key is an error with a "did you mean"
suggestion (issue 9).

Also a property-based test that mutates the sample files at random, byte by byte and structure by structure:
the loader either gives a valid Project, which then evaluates on a small grid without any exception or
RuntimeWarning, or raises ProjectError; never anything else. And the command line on mutated files: exit
code 0, 1 or 2, never a traceback.
"""

from __future__ import annotations

import copy
import datetime as dt
import math
import os
import random
from engine_air.project.load import tomllib  # tomli on Python 3.10
import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from engine_air import project as pf
from engine_air.cli import main as cli_main
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import evaluate_project
from engine_air.project.model import Grid, Project

SAMPLE_DIR = Path(__file__).resolve().parent.parent / "sample_projects"
SAMPLES = sorted(SAMPLE_DIR.glob("*.toml"))
PITOT = SAMPLE_DIR / "subsonic_transport_nacelle.toml"
RAMP = SAMPLE_DIR / "supersonic_two_ramp.toml"
SMALL_GRID = Grid(mach_points=7, altitude_points=5)


# -- helpers ---------------------------------------------------------------------------------------------------

def sample_data(path: Path = PITOT) -> dict:
    with open(path, "rb") as f:
        return tomllib.load(f)


def write_text(tmp_path: Path, text: str, name: str = "bad.toml") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def write_bytes(tmp_path: Path, raw: bytes, name: str = "bad.toml") -> Path:
    path = tmp_path / name
    path.write_bytes(raw)
    return path


def write_data(tmp_path: Path, data: dict, name: str = "bad.toml") -> Path:
    return write_text(tmp_path, tomli_w.dumps(data), name)


def set_at(data: dict, dotted: str, value) -> dict:
    """Set ``value`` at ``engine.rating.0.theta``-style paths; ``DELETE`` removes the entry."""
    parts = dotted.split(".")
    node = data
    for p in parts[:-1]:
        node = node[int(p)] if isinstance(node, list) else node[p]
    last = parts[-1]
    key = int(last) if isinstance(node, list) else last
    if value is DELETE:
        del node[key]
    else:
        node[key] = value
    return data


DELETE = object()


def assert_project_error(path: Path, key: str | None = None, allowed: str | None = None,
                         value: object = None, show_value: bool = True) -> ProjectError:
    """Load ``path``; it must raise exactly ProjectError with a one-line message naming file, key, value, rule."""
    with pytest.raises(ProjectError) as info:
        pf.load_project(path)
    err = info.value
    assert type(err) is ProjectError, type(err)
    text = str(err)
    assert "\n" not in text and "\r" not in text, text
    assert err.path == str(path) and text.startswith(str(path) + ": "), text
    assert err.key, text
    assert err.allowed, text
    assert err.key in text and err.allowed in text, text
    if key is not None:
        assert err.key == key, text
    if allowed is not None:
        assert allowed in err.allowed, text
    if value is not None:
        assert err.value == value or (isinstance(value, float) and math.isnan(value) and math.isnan(err.value)), text
    if show_value and err.value is not None:
        assert f"{err.key} = " in text, text  # the value is shown after the key
    return err


def evaluate_quietly(project: Project, grid: Grid = SMALL_GRID):
    """Evaluate on a small grid with every warning an error (no RuntimeWarning may escape)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        return evaluate_project(replace(project, grid=grid))


# -- truncated, not TOML, binary ----------------------------------------------------------------------------------

@pytest.mark.parametrize("sample", SAMPLES, ids=[p.name for p in SAMPLES])
def test_truncated_files(sample, tmp_path):
    raw = sample.read_bytes()
    # every offset in the first and last 200 bytes, then about 150 offsets spread over the rest
    offsets = sorted(set(range(0, min(200, len(raw)))) | set(range(max(0, len(raw) - 200), len(raw)))
                     | set(range(0, len(raw), max(1, len(raw) // 150))))
    loaded = errors = 0
    for cut in offsets:
        path = write_bytes(tmp_path, raw[:cut])
        try:
            project = pf.load_project(path)
        except ProjectError as err:
            assert type(err) is ProjectError
            assert str(err).startswith(str(path) + ": ") and "\n" not in str(err)
            assert err.key and err.allowed
            errors += 1
        else:
            # a cut after a complete [[case]] table or in a trailing comment leaves a valid file
            evaluate_quietly(project)
            loaded += 1
    assert errors > 0.8 * len(offsets)
    assert loaded >= 1  # the cut inside the last line's comment or after the last complete table


@pytest.mark.parametrize("text", [
    "",
    "\ufeff",
    "hello world",
    "[project\nformat = 1\n",
    "a = = 1",
    "a = 1\na = 2\n",                               # duplicate key
    "[inlet]\n[inlet]\n",                           # duplicate table
    '{"project": {"format": 1}}',                   # JSON
    "project:\n  format: 1\n",                       # YAML
    "__import__('os').system('echo pwned')",        # Python is not data
    "x = '''unterminated",
    "x = 1979-05-32T07:32:00",                      # invalid date
    "x = 0x",                                        # bad integer
    "x = [1, 2",                                     # unterminated array
])
def test_not_toml_or_not_a_project(text, tmp_path):
    path = write_text(tmp_path, text)
    err = assert_project_error(path)
    if err.key == "(file)":
        assert "TOML" in err.allowed or "UTF-8" in err.allowed
    else:  # valid TOML that is not a project: the first missing table is named
        assert err.key == "project"


@pytest.mark.parametrize("raw", [
    b"\x00" * 64,
    bytes(range(256)),
    b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR",
    b"\xff\xfe" + "[project]\nformat = 1\n".encode("utf-16-le"),  # UTF-16 with BOM
    "[project]\ntitle = \"caf\xe9\"\n".encode("latin-1"),            # not UTF-8
    b"PK\x03\x04" + bytes(random.Random(1).randrange(256) for _ in range(500)),
    bytes(random.Random(2).randrange(256) for _ in range(4096)),
], ids=["nul", "all-bytes", "png", "utf16", "latin1", "zip", "random"])
def test_binary_garbage(raw, tmp_path):
    err = assert_project_error(write_bytes(tmp_path, raw), key="(file)")
    assert "UTF-8" in err.allowed or "TOML" in err.allowed


def test_nul_byte_inside_valid_sample(tmp_path):
    raw = PITOT.read_bytes()
    at = raw.index(b"capture_area_m2")
    assert_project_error(write_bytes(tmp_path, raw[:at] + b"\x00" + raw[at:]), key="(file)", allowed="TOML")


def test_utf8_bom_sample_loads(tmp_path):
    path = write_bytes(tmp_path, b"\xef\xbb\xbf" + PITOT.read_bytes())
    assert pf.load_project(path) == pf.load_project(PITOT)


def test_missing_file_folder_and_special_file(tmp_path):
    assert_project_error(tmp_path / "nowhere.toml", key="(file)", allowed="cannot be read")
    assert_project_error(tmp_path, key="(file)", allowed="folder")
    if os.path.exists("/dev/null"):
        assert_project_error(Path("/dev/null"), key="(file)", allowed="not a regular file")


# -- wrong types, NaN and infinity ---------------------------------------------------------------------------------

WRONG_TYPES = [
    ("inlet.capture_area_m2", "1.2", "inlet.capture_area_m2", "not text"),
    ("inlet.capture_area_m2", True, "inlet.capture_area_m2", "not true/false"),
    ("inlet.capture_area_m2", [1.2], "inlet.capture_area_m2", "not a list"),
    ("inlet.capture_area_m2", {"value": 1.2}, "inlet.capture_area_m2", "not a table"),
    ("inlet.capture_area_m2", dt.date(2024, 1, 1), "inlet.capture_area_m2", "not a date/time"),
    ("inlet.type", 1, "inlet.type", "must be text"),
    ("inlet.type", "ramjet", "inlet.type", '"pitot"'),
    ("limits.face_mach_max", "0.5", "limits.face_mach_max", "must be a number"),
    ("limits.recovery_min", "mil-std-fantasy", "limits.recovery_min", "mil-e-5008b"),
    ("limits.recovery_min", [0.9], "limits.recovery_min", "not a list"),
    ("engine.rating.0.theta", "0.8, 1.0", "engine.rating[0].theta", "not text"),
    ("engine.rating.0.theta", [0.8, "1.0"], "engine.rating[0].theta[1]", "not text"),
    ("engine.rating.0.theta", [[0.8], [1.0]], "engine.rating[0].theta[0]", "not a list"),
    ("engine.rating.0.name", 7, "engine.rating[0].name", "must be text"),
    ("engine.rating.0.name", "  ", "engine.rating[0].name", "non-empty"),
    ("engine.rating", {"name": "x"}, "engine.rating", "list of tables"),
    ("engine.rating", [], "engine.rating", "at least one"),
    ("engine.rating", [1, 2], "engine.rating[0]", "must be a table"),
    ("engine", [1], "engine", "must be a table"),
    ("limits", "strict", "limits", "must be a table"),
    ("project", [], "project", "must be a table"),
    ("envelope.mach", 0.5, "envelope.mach", "list of numbers"),
    ("case", {"name": "x", "rating": "takeoff"}, "case", "list of tables"),
    ("case.0.rating", "no-such-rating", "case[0].rating", "must name one of the engine ratings"),
    ("case.0.isa_offset_K", "+20", "case[0].isa_offset_K", "must be a number"),
    ("case.1.name", "ISA, take-off", "case[1].name", "must be unique"),
    ("engine.rating.1.name", "takeoff", "engine.rating[1].name", "must be unique"),
    ("grid", 121, "grid", "must be a table"),
    ("inlet.capture_area_m2", DELETE, "inlet.capture_area_m2", "missing"),
    ("inlet", DELETE, "inlet", "missing"),
    ("case", DELETE, "case", "missing"),
    ("project.format", DELETE, "project.format", "missing"),
]


@pytest.mark.parametrize("where, value, key, allowed", WRONG_TYPES, ids=[f"{w}={v!r}"[:60] for w, v, *_ in WRONG_TYPES])
def test_wrong_types_and_missing_keys(where, value, key, allowed, tmp_path):
    data = set_at(sample_data(), where, value)
    err = assert_project_error(write_data(tmp_path, data), key=key, allowed=allowed)
    if value is not DELETE and not isinstance(value, (dict, list)):
        assert repr(err.value) in str(err) or repr(value) in str(err)


NON_FINITE_KEYS = [
    ("inlet", "capture_area_m2", "inlet.capture_area_m2"),
    ("inlet", "throat_area_m2", "inlet.throat_area_m2"),
    ("inlet", "face_area_m2", "inlet.face_area_m2"),
    ("inlet", "duct_loss_coefficient", "inlet.duct_loss_coefficient"),
    ("limits", "face_mach_max", "limits.face_mach_max"),
    ("limits", "recovery_min", "limits.recovery_min"),
]


@pytest.mark.parametrize("literal", ["nan", "+nan", "-nan", "inf", "+inf", "-inf"])
@pytest.mark.parametrize("table, name, key", NON_FINITE_KEYS, ids=[k for *_, k in NON_FINITE_KEYS])
def test_nan_and_inf_values(table, name, key, literal, tmp_path):
    text = PITOT.read_text(encoding="utf-8")
    lines = text.splitlines()
    start = lines.index(f"[{table}]")
    for i in range(start + 1, len(lines)):
        if lines[i].startswith(f"{name} ="):
            lines[i] = f"{name} = {literal}"
            break
    else:
        lines.insert(start + 1, f"{name} = {literal}")
    err = assert_project_error(write_text(tmp_path, "\n".join(lines) + "\n"), key=key, allowed="finite")
    assert literal.lstrip("+-") in str(err)


@pytest.mark.parametrize("literal", ["nan", "inf", "-inf"])
def test_nan_in_lists(literal, tmp_path):
    text = PITOT.read_text(encoding="utf-8")
    text = text.replace("theta = [0.75, 0.90,", f"theta = [0.75, {literal},", 1)
    assert_project_error(write_text(tmp_path, text), key="engine.rating[0].theta[1]", allowed="finite")
    text = PITOT.read_text(encoding="utf-8").replace("mach = [0.15, 0.60,", f"mach = [0.15, {literal},", 1)
    assert_project_error(write_text(tmp_path, text), key="envelope.mach[1]", allowed="finite")
    text = PITOT.read_text(encoding="utf-8").replace("isa_offset_K = 20.0", f"isa_offset_K = {literal}", 1)
    assert_project_error(write_text(tmp_path, text), key="case[1].isa_offset_K", allowed="finite")


# -- geometry and tables -------------------------------------------------------------------------------------------

@pytest.mark.parametrize("name", ["capture_area_m2", "throat_area_m2", "face_area_m2"])
@pytest.mark.parametrize("value", [0, 0.0, -0.0, -1.2, -1e-300, 100.5, 1e308, 10**30])
def test_zero_negative_and_absurd_areas(name, value, tmp_path):
    data = set_at(sample_data(), f"inlet.{name}", value)
    if name == "capture_area_m2" and value == 100.5:
        data["inlet"]["throat_area_m2"] = 2.0
    err = assert_project_error(write_data(tmp_path, data), key=f"inlet.{name}")
    assert "0 < " in err.allowed and "<= 100" in err.allowed and "m^2" in err.allowed


def test_throat_larger_than_capture(tmp_path):
    data = set_at(sample_data(), "inlet.throat_area_m2", 2.31)
    err = assert_project_error(write_data(tmp_path, data), key="inlet.throat_area_m2", value=2.31,
                               allowed="must not exceed capture_area_m2 = 2.3")
    assert "2.31" in str(err)
    # equal is allowed
    data = set_at(sample_data(), "inlet.throat_area_m2", 2.30)
    assert pf.load_project(write_data(tmp_path, data)).inlet.throat_area_m2 == 2.30


@pytest.mark.parametrize("theta, bad_index", [
    ([0.8, 0.8], 1),
    ([1.0, 0.9], 1),
    ([0.8, 1.0, 0.95, 1.2], 2),
    ([0.75, 0.90, 1.00, 1.10, 1.20, 1.20], 5),
])
def test_non_monotonic_theta(theta, bad_index, tmp_path):
    data = sample_data()
    data["engine"]["rating"][0]["theta"] = theta
    data["engine"]["rating"][0]["corrected_flow_kg_s"] = [300.0] * len(theta)
    err = assert_project_error(write_data(tmp_path, data), key=f"engine.rating[0].theta[{bad_index}]",
                               value=theta[bad_index], allowed="must increase strictly")
    assert f"theta[{bad_index - 1}]" in err.allowed


@pytest.mark.parametrize("theta, flow, key, allowed", [
    ([], [], "engine.rating[0].theta", "at least 1 entry"),
    ([0.2, 1.0], [1.0, 1.0], "engine.rating[0].theta[0]", "0.3 < theta < 3"),
    ([1.0, 3.0], [1.0, 1.0], "engine.rating[0].theta[1]", "0.3 < theta < 3"),
    ([0.8, 1.0], [100.0], "engine.rating[0].corrected_flow_kg_s", "one entry per theta"),
    ([0.8, 1.0], [100.0, 0.0], "engine.rating[0].corrected_flow_kg_s[1]", "0 < corrected_flow_kg_s"),
    ([0.8, 1.0], [100.0, -5.0], "engine.rating[0].corrected_flow_kg_s[1]", "0 < corrected_flow_kg_s"),
    ([0.8, 1.0], [100.0, 1e6], "engine.rating[0].corrected_flow_kg_s[1]", "<= 5000"),
])
def test_bad_rating_tables(theta, flow, key, allowed, tmp_path):
    data = sample_data()
    data["engine"]["rating"][0]["theta"] = theta
    data["engine"]["rating"][0]["corrected_flow_kg_s"] = flow
    err = assert_project_error(write_data(tmp_path, data), key=key)
    assert allowed in err.allowed or allowed in str(err)


@pytest.mark.parametrize("mach, alt, key, allowed", [
    ([], [], "envelope.mach", "3 to 1000"),
    ([0.2, 0.8], [0.0, 1000.0], "envelope.mach", "3 to 1000"),
    ([0.2, 0.5, 0.8], [0.0, 1000.0, 2000.0], "envelope", "one line"),            # collinear
    ([0.2, 0.2, 0.2, 0.2], [0.0, 1.0, 2.0, 3.0], "envelope", "one line"),       # all on Mach 0.2
    ([0.2, 0.8, 0.2, 0.8], [0.0, 10000.0, 10000.0, 0.0], "envelope", "crosses itself"),  # bow tie
    ([0.2, 0.8, 0.8, 0.5, 0.5, 0.2], [0.0, 0.0, 9000.0, -1000.0, 12000.0, 9000.0], "envelope", "crosses itself"),
    ([0.2, 0.8, 0.8, 0.2, 0.2], [0.0, 0.0, 9000.0, 9000.0, 0.0], "envelope", "vertex 0 repeats vertex 4"),  # closed by hand
    ([0.2, 0.8, 0.8, 0.8, 0.2], [0.0, 0.0, 9000.0, 9000.0, 9000.0], "envelope", "vertex 3 repeats vertex 2"),
    ([0.2, 0.8, 0.8], [0.0, 0.0], "envelope.altitude_m", "3 to 1000"),
    ([0.2, 0.8, 0.8, 0.2], [0.0, 0.0, 9000.0], "envelope.altitude_m", "one entry per envelope.mach value (4)"),
    ([0.2, 0.8, 0.8], [0.0, 0.0, 9000.0, 9000.0], "envelope.altitude_m", "one entry per envelope.mach"),
    ([-0.1, 0.8, 0.8], [0.0, 0.0, 9000.0], "envelope.mach[0]", "0 <= mach <= 6"),
    ([0.2, 6.5, 0.8], [0.0, 0.0, 9000.0], "envelope.mach[1]", "0 <= mach <= 6"),
    ([0.2, 0.8, 0.8], [0.0, 0.0, 90000.0], "envelope.altitude_m[2]", "-5000 <= altitude_m <= 84000"),
    ([0.2, 0.8, 0.8], [-6000.0, 0.0, 9000.0], "envelope.altitude_m[0]", "-5000 <= altitude_m <= 84000"),
    ([0.5] * 1001, [0.0] * 1001, "envelope.mach", "3 to 1000"),
])
def test_bad_envelopes(mach, alt, key, allowed, tmp_path):
    data = sample_data()
    data["envelope"] = {"mach": mach, "altitude_m": alt}
    err = assert_project_error(write_data(tmp_path, data), key=key)
    assert allowed in err.allowed, str(err)


def test_largest_envelope_loads_quickly(tmp_path):
    # 1000 vertices on a circle: the quadratic self-crossing test still runs in well under a second.
    n = pf.MAX_ENVELOPE_VERTICES
    a = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    data = sample_data()
    data["envelope"] = {"mach": list(0.5 + 0.3 * np.cos(a)), "altitude_m": list(6000.0 + 5000.0 * np.sin(a))}
    project = pf.load_project(write_data(tmp_path, data))
    assert len(project.envelope.mach) == n
    evaluate_quietly(project)


# -- format version, grid sizes, case counts ------------------------------------------------------------------------

@pytest.mark.parametrize("value, allowed", [
    (2, "newer version"),
    (99, "newer version"),
    (2**62, "newer version"),
    (0, "not a valid format number"),
    (-1, "not a valid format number"),
    (1.0, "whole number"),
    ("1", "whole number"),
    (True, "whole number"),
    ([1], "whole number"),
])
def test_unknown_format_version(value, allowed, tmp_path):
    data = set_at(sample_data(), "project.format", value)
    err = assert_project_error(write_data(tmp_path, data), key="project.format", allowed=allowed)
    assert "reads format 1" in err.allowed


@pytest.mark.parametrize("name", ["mach_points", "altitude_points"])
@pytest.mark.parametrize("value, allowed", [
    (10**9, "from 2 to 1001"),
    (2**63 - 1, "from 2 to 1001"),
    (1002, "from 2 to 1001"),
    (1, "from 2 to 1001"),
    (0, "from 2 to 1001"),
    (-1, "from 2 to 1001"),
    (-(10**9), "from 2 to 1001"),
    (True, "not true/false"),
    (False, "not true/false"),
    (100.0, "not a number"),
    (120.5, "not a number"),
    ("121", "not text"),
    ([121], "not a list"),
])
def test_absurd_grid_sizes(name, value, allowed, tmp_path):
    data = set_at(sample_data(), f"grid.{name}", value)
    err = assert_project_error(write_data(tmp_path, data), key=f"grid.{name}")
    assert allowed in err.allowed


def test_grid_integer_beyond_64_bits(tmp_path):
    text = PITOT.read_text(encoding="utf-8").replace("mach_points = 121", "mach_points = " + "9" * 40)
    assert_project_error(write_text(tmp_path, text), key="grid.mach_points", allowed="from 2 to 1001")


@pytest.mark.parametrize("nx, ny, ok", [(500, 500, True), (1001, 249, True), (501, 500, False), (1001, 1001, False)])
def test_grid_product_limit(nx, ny, ok, tmp_path):
    data = sample_data()
    data["grid"] = {"mach_points": nx, "altitude_points": ny}
    data["case"] = data["case"][:1]
    path = write_data(tmp_path, data)
    if ok:
        assert pf.load_project(path).grid == Grid(nx, ny)
    else:
        err = assert_project_error(path, key="grid", value=nx * ny, allowed=str(pf.MAX_GRID_POINTS))
        assert f"{nx} x {ny}" in err.allowed


def test_case_count_and_case_point_limits(tmp_path):
    data = sample_data()
    template = data["case"][0]
    data["grid"] = {"mach_points": 11, "altitude_points": 11}
    data["case"] = [dict(template, name=f"case {i}") for i in range(pf.MAX_CASES)]
    assert len(pf.load_project(write_data(tmp_path, data)).cases) == pf.MAX_CASES
    data["case"].append(dict(template, name="one too many"))
    err = assert_project_error(write_data(tmp_path, data), key="case", value=pf.MAX_CASES + 1)
    assert f"at most {pf.MAX_CASES}" in err.allowed
    # the largest grid: 8 cases make 2 000 000 case-points (allowed), 9 do not
    data["grid"] = {"mach_points": 500, "altitude_points": 500}
    data["case"] = [dict(template, name=f"case {i}") for i in range(8)]
    assert len(pf.load_project(write_data(tmp_path, data)).cases) == 8
    data["case"].append(dict(template, name="ninth"))
    err = assert_project_error(write_data(tmp_path, data), key="case", value=9)
    assert "2250000 case-points" in err.allowed and str(pf.MAX_CASE_POINTS) in err.allowed


def test_isa_offset_range(tmp_path):
    for value in (-100.01, 100.5, -300, 1e9):
        data = set_at(sample_data(), "case.0.isa_offset_K", value)
        assert_project_error(write_data(tmp_path, data), key="case[0].isa_offset_K", allowed="-100 <= isa_offset_K <= 100")


# -- huge files ---------------------------------------------------------------------------------------------------

def test_file_over_one_mib(tmp_path):
    text = PITOT.read_text(encoding="utf-8")
    padding = "# " + "x" * 1000 + "\n"
    big = text + padding * (pf.MAX_FILE_BYTES // len(padding) + 1)
    path = write_text(tmp_path, big)
    err = assert_project_error(path, key="(file)", allowed="at most 1048576 bytes")
    assert err.value == os.path.getsize(path)


def test_file_size_boundary(tmp_path):
    raw = PITOT.read_bytes()
    fill = pf.MAX_FILE_BYTES - len(raw) - 3
    exact = raw + b"#" + b"y" * fill + b"\n\n"
    assert len(exact) == pf.MAX_FILE_BYTES
    assert pf.load_project(write_bytes(tmp_path, exact, "exact.toml")) == pf.load_project(PITOT)
    assert_project_error(write_bytes(tmp_path, exact + b"\n", "over.toml"), key="(file)", allowed="1 MiB")


def test_file_growing_after_stat_is_still_capped(tmp_path, monkeypatch):
    # A file that grows between the size check and the read (or lies about its size) is cut at the limit.
    path = write_bytes(tmp_path, PITOT.read_bytes() + b"#" * (2 * pf.MAX_FILE_BYTES) + b"\n")
    real_stat = os.stat

    class SmallStat:
        def __init__(self, st):
            self._st = st

        def __getattr__(self, name):
            return 100 if name == "st_size" else getattr(self._st, name)

    monkeypatch.setattr(os, "stat", lambda p, *a, **k: SmallStat(real_stat(p, *a, **k)))
    assert_project_error(path, key="(file)", allowed="more than 1048576 bytes")


def test_huge_values_inside_the_size_limit(tmp_path):
    # A long theta table and a long title, all under 1 MiB: loads.
    data = sample_data()
    n = 20000
    theta = list(np.linspace(0.31, 2.99, n))
    data["engine"]["rating"][0]["theta"] = theta
    data["engine"]["rating"][0]["corrected_flow_kg_s"] = [300.0] * n
    data["project"]["title"] = "T" * 100_000
    path = write_data(tmp_path, data)
    assert os.path.getsize(path) < pf.MAX_FILE_BYTES
    project = pf.load_project(path)
    assert len(project.rating("takeoff").theta) == n
    evaluate_quietly(project)


def test_many_unknown_keys_give_one_error(tmp_path):
    data = sample_data()
    data["inlet"].update({f"k{i}": i for i in range(5000)})
    err = assert_project_error(write_data(tmp_path, data), key="inlet.k0", allowed="unknown key")
    assert "capture_area_m2" in err.allowed  # the keys of [inlet] are listed


# -- unknown keys (errors, issue 9) and deep nesting -----------------------------------------------------------------

@pytest.mark.parametrize("where, name, key", [
    ("", "extra_table", "extra_table"),
    ("engine.rating.0", "spool", "engine.rating[0].spool"),
    ("engine", "other", "engine.other"),
    ("case.1", "humidity", "case[1].humidity"),
    ("grid", "refine", "grid.refine"),
    ("project", "author", "project.author"),
])
def test_unknown_keys_are_errors(where, name, key, tmp_path, capsys):
    data = sample_data()
    node = data
    for part in where.split(".") if where else []:
        node = node[int(part)] if isinstance(node, list) else node[part]
    node[name] = {"x": 1} if name == "extra_table" else 3
    path = write_data(tmp_path, data)
    assert_project_error(path, key=key, allowed="unknown")
    assert cli_main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert key in err and "Traceback" not in err and len(err.strip().splitlines()) == 1


def test_new_keys_of_every_type_load_on_a_pitot(tmp_path):
    data = sample_data()
    data["inlet"]["bleed_fraction"] = 0.02  # a key of every type since the airflow-management additions
    assert pf.load_project(write_data(tmp_path, data)).inlet.bleed_fraction == 0.02


def test_ramp_keys_on_pitot_are_errors(tmp_path):
    data = sample_data()
    data["inlet"]["ramp_angles_deg"] = [5.0]
    assert_project_error(write_data(tmp_path, data), key="inlet.ramp_angles_deg", allowed="'external-ramp'")


@pytest.mark.parametrize("depth", [10, 100, 300, 1000, 5000, 100_000])
@pytest.mark.parametrize("kind", ["array", "inline-table", "header", "dotted-key"])
def test_deeply_nested(kind, depth, tmp_path):
    text = PITOT.read_text(encoding="utf-8")
    if kind == "array":
        text = text.replace("theta = [0.75,", "theta = [" + "[" * depth + "1" + "]" * depth + ", 0.75,", 1)
    elif kind == "inline-table":
        text = text.replace("theta = [0.75,", "theta = [" + "{a=" * depth + "1" + "}" * depth + ", 0.75,", 1)
    elif kind == "header":
        text += "\n[" + ".".join(["deep"] * depth) + "]\nx = 1\n"
    else:
        text = ".".join(["deep"] * depth) + " = 1\n" + text
    path = write_text(tmp_path, text)
    if os.path.getsize(path) > pf.MAX_FILE_BYTES:
        assert_project_error(path, key="(file)", allowed="1 MiB")
    elif kind in ("header", "dotted-key"):
        if depth <= pf.MAX_KEY_PARTS:  # a nested unknown table is one unknown top-level key
            assert_project_error(path, key="deep", allowed="unknown")
        else:  # refused before tomllib, whose cost is quadratic in the number of key parts
            assert_project_error(path, key="(file)", allowed=f"nested at most {pf.MAX_KEY_PARTS} deep")
    else:
        err = assert_project_error(path)
        assert err.key == "engine.rating[0].theta[0]" or (err.key == "(file)" and "nested too deeply" in err.allowed)


@pytest.mark.parametrize("make", [
    lambda n: ".".join(["deep"] * n) + " = 1\n",
    lambda n: "[" + ".".join(['"quoted part"'] * n) + "]\nx = 1\n",
    lambda n: "[[" + " . ".join(["'literal'"] * n) + "]]\nx = 1\n",
    lambda n: "x = {" + ".".join(["k"] * n) + " = 1}\n",
], ids=["bare", "quoted-header", "literal-array-header", "inline-table"])
def test_dotted_key_part_limit(make, tmp_path):
    text = PITOT.read_text(encoding="utf-8")
    ok = write_text(tmp_path, make(pf.MAX_KEY_PARTS) + text, "ok.toml")
    err = assert_project_error(ok, allowed="unknown")  # parsed: the key is then unknown
    assert err.key != "(file)"
    bad = write_text(tmp_path, "# comment\n" + make(pf.MAX_KEY_PARTS + 1) + text, "bad.toml")
    err = assert_project_error(bad, key="(file)", allowed="line 2")
    assert f"more than {pf.MAX_KEY_PARTS} parts" in err.allowed


def test_worst_file_of_dotted_keys_is_parsed_then_refused(tmp_path):
    # 1 MiB of 64-part keys (the most allowed) parses in about a second (tomllib, 2 cores); 100 000 parts
    # in one key, before the limit, took more than 4 GB of memory.
    key = ".".join(["d"] * (pf.MAX_KEY_PARTS - 1))
    lines = [f"{key}.k{i} = 1" for i in range((pf.MAX_FILE_BYTES - 4096) // (2 * pf.MAX_KEY_PARTS + 12))]
    path = write_text(tmp_path, "\n".join(lines) + "\n" + PITOT.read_text(encoding="utf-8"))
    assert os.path.getsize(path) <= pf.MAX_FILE_BYTES
    assert_project_error(path, key="d", allowed="unknown")  # parsed (speed: bench/), then refused


def test_error_for_recursive_value_is_one_line():
    # project_from_dict on data built in code: a self-containing list is reported, not recursed into forever.
    data = sample_data()
    loop: list = [0.8]
    loop.append(loop)
    data["engine"]["rating"][0]["theta"] = loop
    with pytest.raises(ProjectError) as info:
        pf.project_from_dict(data, "in-memory.toml")
    assert info.value.key == "engine.rating[0].theta[1]" and "\n" not in str(info.value)


# -- random mutation: byte level --------------------------------------------------------------------------------------

SAMPLE_BYTES = [p.read_bytes() for p in SAMPLES]


def check_loaded_or_error(path: Path) -> Project | None:
    """The property: ProjectError, or a Project that evaluates quietly. Anything else fails the test."""
    try:
        project = pf.load_project(path)
    except ProjectError as err:
        assert type(err) is ProjectError
        text = str(err)
        assert text.startswith(str(path) + ": ") and "\n" not in text and err.key and err.allowed
        return None
    result = evaluate_quietly(project)
    assert len(result.cases) == len(project.cases)
    for cm in result.cases:
        assert cm.points.face_mach.shape == (SMALL_GRID.altitude_points, SMALL_GRID.mach_points)
    return project


@st.composite
def byte_mutations(draw):
    raw = bytearray(draw(st.sampled_from(SAMPLE_BYTES)))
    for _ in range(draw(st.integers(1, 6))):
        op = draw(st.sampled_from(["delete", "insert", "flip", "truncate", "replace", "duplicate"]))
        if not raw:
            break
        at = draw(st.integers(0, len(raw) - 1))
        if op == "delete":
            del raw[at:at + draw(st.integers(1, 40))]
        elif op == "insert":
            raw[at:at] = draw(st.binary(min_size=1, max_size=20) | st.sampled_from(
                [b"[", b"]", b"=", b'"', b"\n", b"nan", b"inf", b"-", b"1e999", b"[[case]]\n", b"\x00", b"\xff"]))
        elif op == "flip":
            raw[at] ^= 1 << draw(st.integers(0, 7))
        elif op == "truncate":
            del raw[at:]
        elif op == "replace":
            raw[at] = draw(st.sampled_from(list(b"0123456789.-+e[]{}=,\"'#\n \t")))
        else:
            end = min(len(raw), at + draw(st.integers(1, 200)))
            raw[at:at] = raw[at:end]
    return bytes(raw)


@pytest.fixture(scope="module")
def mutation_dir(tmp_path_factory):
    return tmp_path_factory.mktemp("mutations")


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(raw=byte_mutations())
def test_random_byte_mutations(raw, mutation_dir):
    path = mutation_dir / "mutated.toml"
    path.write_bytes(raw)
    check_loaded_or_error(path)


# -- random mutation: structure level -------------------------------------------------------------------------------

SAMPLE_DATA = [sample_data(p) for p in SAMPLES]

leaf_values = st.one_of(
    st.none(),  # None: remove the key
    st.booleans(),
    st.integers(min_value=-(2**63), max_value=2**63 - 1),
    st.sampled_from([0, 1, -1, 2, 3, 1001, 1002, 10**9, 2**64, 10**400]),
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0.0, -0.0, 1e-300, 5e-324, 1.0, 0.05, 0.999, 1.0000001, 2.0, 5.0, 6.0, 84852.0, -5000.0,
                     1e308, -1e308, float("nan"), float("inf"), float("-inf")]),
    st.text(max_size=20),
    st.sampled_from(["pitot", "external-ramp", "mil-e-5008b", "takeoff", "max-reheat-airflow", "take-off", ""]),
    st.datetimes(),
    st.dates(),
    st.lists(st.floats(allow_nan=True), max_size=6),
    st.lists(st.integers(-5, 5000), min_size=0, max_size=6),
    st.lists(st.text(max_size=3), max_size=3),
    st.dictionaries(st.text(max_size=5), st.integers() | st.text(max_size=5), max_size=3),
    st.recursive(st.integers(0, 3), lambda inner: st.lists(inner, max_size=3) | st.dictionaries(
        st.sampled_from(["a", "name", "theta", "mach"]), inner, max_size=3), max_leaves=10),
)


def leaf_paths(node, prefix=()):
    """Every path (tuple of keys/indices) in parsed TOML data, tables and lists included."""
    paths = []
    if isinstance(node, dict):
        for k, v in node.items():
            paths.append(prefix + (k,))
            paths.extend(leaf_paths(v, prefix + (k,)))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            paths.append(prefix + (i,))
            paths.extend(leaf_paths(v, prefix + (i,)))
    return paths


@st.composite
def structure_mutations(draw):
    data = copy.deepcopy(draw(st.sampled_from(SAMPLE_DATA)))
    for _ in range(draw(st.integers(1, 4))):
        paths = leaf_paths(data)
        if not paths:
            break
        path = draw(st.sampled_from(paths))
        parent = data
        for p in path[:-1]:
            parent = parent[p]
        last = path[-1]
        op = draw(st.sampled_from(["replace", "replace", "replace", "drop", "scale", "append"]))
        if op == "drop" or (op == "replace" and (value := draw(leaf_values)) is None):
            del parent[last]
        elif op == "replace":
            parent[last] = value
        elif op == "scale":
            old = parent[last]
            if isinstance(old, (int, float)) and not isinstance(old, bool):
                factor = draw(st.sampled_from([-1, 0, 0.5, 0.999, 1.001, 2, 10, 1e6, 1e-6]))
                try:
                    parent[last] = old * factor
                except OverflowError:  # an integer too large for a float (10**400 * 0.5): keep it as it is
                    parent[last] = old * int(factor) if float(factor).is_integer() else old
            else:
                parent[last] = draw(leaf_values)
        else:
            old = parent[last]
            if isinstance(old, list):
                old.append(copy.deepcopy(old[-1]) if old and draw(st.booleans()) else draw(leaf_values))
            else:
                parent[last] = draw(leaf_values)
    return data


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=structure_mutations())
def test_random_structure_mutations(data, mutation_dir):
    name = "mutated-structure.toml"
    try:
        project = pf.project_from_dict(data, name)
    except ProjectError as err:
        assert type(err) is ProjectError
        text = str(err)
        assert text.startswith(name + ": ") and "\n" not in text and err.key and err.allowed
    else:
        evaluate_quietly(project)
    # the same data through a file, where TOML can hold it (it has no None, no naive times in lists...)
    try:
        text = tomli_w.dumps(data)
    except (TypeError, ValueError):
        return
    path = mutation_dir / name
    path.write_text(text, encoding="utf-8")
    check_loaded_or_error(path)


# -- the command line on mutated files --------------------------------------------------------------------------------

def _mutated_files(tmp_path: Path) -> list[Path]:
    rng = random.Random(20240611)
    raw = RAMP.read_bytes()
    files = []

    def add(name: str, content: bytes):
        path = tmp_path / name
        path.write_bytes(content)
        files.append(path)

    add("truncated.toml", raw[: len(raw) // 2])
    add("garbage.toml", bytes(rng.randrange(256) for _ in range(300)))
    add("flipped.toml", bytes(b ^ (1 << rng.randrange(8)) if rng.random() < 0.01 else b for b in raw))
    add("nan-area.toml", raw.replace(b"capture_area_m2 = 0.55", b"capture_area_m2 = nan"))
    add("unknown-key.toml", raw.replace(b"[grid]", b"[grid]\nsmoothing = 3"))
    add("huge-grid.toml", raw.replace(b"mach_points = 121", b"mach_points = 1000000000"))
    add("bool-grid.toml", raw.replace(b"mach_points = 121", b"mach_points = true"))
    add("format-2.toml", raw.replace(b"format = 1", b"format = 2"))
    add("coarse.toml", raw.replace(b"mach_points = 121", b"mach_points = 9").replace(b"altitude_points = 101",
                                                                                        b"altitude_points = 7"))
    data = tomllib.loads(raw.decode())
    data["inlet"]["shock_on_lip_mach"] = 1.05  # ramps detached at the design Mach
    add("detached-design.toml", tomli_w.dumps(data).encode())
    return files


def test_cli_check_on_mutated_files(tmp_path, capsys):
    codes = {}
    for path in _mutated_files(tmp_path):
        code = cli_main(["check", str(path)])
        out, err = capsys.readouterr()
        codes[path.name] = code
        assert code in (0, 1, 2), (path.name, code)
        assert "Traceback" not in err and "internal error" not in err, (path.name, err)
        if code == 2:
            lines = [x for x in err.splitlines() if not x.startswith("warning:")]
            assert len(lines) == 1 and lines[0].startswith("engine-air: ") and str(path) in lines[0], err
    assert codes["truncated.toml"] == 2 and codes["garbage.toml"] == 2 and codes["nan-area.toml"] == 2
    assert codes["huge-grid.toml"] == 2 and codes["bool-grid.toml"] == 2 and codes["format-2.toml"] == 2
    assert codes["detached-design.toml"] == 2
    assert codes["unknown-key.toml"] == 2 and codes["coarse.toml"] in (0, 1)
