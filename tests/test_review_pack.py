"""Review pack: every section present, valid PNGs, reproducible inputs, escaped text, safe output.

The safe-output tests are built from the reproductions in issue 9: case names whose slugs collide, a symbolic
link planted at ``out/maps/<name>.png`` and ``out/project.toml``, a non-empty folder that is not a pack, and a
10 000-character case name.
"""

from __future__ import annotations

import base64
import html.parser
from dataclasses import replace
from pathlib import Path

import pytest

import engine_air
from engine_air.outputs import pictures as P
from engine_air.cli import main
from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.project import load_project
from engine_air.outputs.review_pack import PACK_QUANTITIES, SECTION_IDS, SOURCES, write_review_pack

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
RAMP = SAMPLES / "supersonic_two_ramp.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"


class _Page(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.ids, self.images, self.text = [], [], []
        self.sections = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if "id" in a:
            self.ids.append(a["id"])
        if tag == "section":
            self.sections.append(a.get("id"))
        if tag == "img":
            self.images.append(a)

    def handle_data(self, data):
        self.text.append(data)


def parse(path) -> _Page:
    page = _Page()
    page.feed(Path(path).read_text(encoding="utf-8"))
    page.all_text = "".join(page.text)
    return page


@pytest.fixture(scope="module")
def ramp_pack(tmp_path_factory):
    folder = tmp_path_factory.mktemp("pack")
    return write_review_pack(RAMP, folder)


def test_pack_has_every_section(ramp_pack):
    page = parse(ramp_pack.index_path)
    assert page.sections == list(SECTION_IDS)
    text = page.all_text
    assert engine_air.__version__ in text
    assert engine_air.CAUTION in " ".join(text.split())
    for source in SOURCES:
        assert source in text
    for needle in ("U.S. Standard Atmosphere, 1976", "NACA Report 1135", "MIL-E-5008B", "SAE AS755",
                   "Intake Aerodynamics, 2nd ed.", "Aircraft Engine Design, 2nd ed."):
        assert needle in text
    assert "FAILS" in text and not ramp_pack.holds
    result = ramp_pack.result
    for s in result.summary:
        assert s.label in text
    # station and shock tables at the worst point (supersonic here: ramp shocks and the terminal shock)
    assert "engine face" in text and "capture plane" in text
    assert "ramp 1 oblique" in text and "terminal normal" in text


PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


def png_shape(data: bytes) -> tuple[int, int, int]:
    """Decode with matplotlib's reader (an independent PNG decoder: Pillow underneath)."""
    import io

    from matplotlib import image

    assert data[:8] == PNG_SIGNATURE
    return image.imread(io.BytesIO(data), format="png").shape


def test_pack_pictures_are_valid_pngs(ramp_pack):
    page = parse(ramp_pack.index_path)
    result = ramp_pack.result
    n_cases = len(result.cases) + 1  # each case and the worst of all
    # recovery against MIL-E-5008B fails here: the least margin and that limit's own quantity come first
    assert ramp_pack.quantities == ("worst_relative_margin", "recovery_minus_reference") + PACK_QUANTITIES
    assert len(ramp_pack.pictures) == n_cases * len(ramp_pack.quantities)
    # sections: each limit judged somewhere, its own quantity through its own worst point
    judged = [s for s in result.summary if s.worst_case]
    assert len(ramp_pack.section_pictures) == 2 * len(judged)
    assert Path(ramp_pack.section_pictures[0]).name == f"{judged[0].name}__along-mach.png"
    # the characteristics (method 16) at the supersonic Mach numbers of interest: the failing recovery limit's worst
    # point (Mach 2.1, the top of the envelope) and the design Mach 2.0, one figure each
    assert [Path(p).name for p in ramp_pack.characteristic_pictures] == ["mach_2_00.png", "mach_2_10.png"]
    assert len(page.images) == (len(ramp_pack.pictures) + len(ramp_pack.section_pictures)
                                + len(ramp_pack.characteristic_pictures))
    for img in page.images:
        prefix = "data:image/png;base64,"
        assert img["src"].startswith(prefix)
        data = base64.b64decode(img["src"][len(prefix):])
        shape = png_shape(data)
        if "height" in img:
            assert shape[:2] == (int(img["height"]), int(img["width"]))
    for path in ramp_pack.all_pictures:
        assert len(png_shape(Path(path).read_bytes())) == 3
    ids = set(page.ids)
    for q in ramp_pack.quantities:
        assert f"map-c1-isa-max-{q}" in ids and f"map-all-worst-{q}" in ids
    for s in judged:
        assert f"section-{s.name}-along-mach" in ids and f"section-{s.name}-along-altitude" in ids


def test_pack_inputs_reproduce_the_project(ramp_pack):
    saved = Path(ramp_pack.project_path)
    assert saved.read_text(encoding="utf-8") == RAMP.read_text(encoding="utf-8")
    assert load_project(saved) == load_project(RAMP)
    page = parse(ramp_pack.index_path)
    assert "shock_on_lip_mach = 2.0" in page.all_text


def test_pack_from_a_project_escapes_text(tmp_path):
    p = load_project(PITOT)
    p = replace(p, title="<script>alert(1)</script> & co", notes="<b>bold</b>")
    pack = write_review_pack(p, tmp_path / "esc", quantities=("face_mach_margin",))
    raw = Path(pack.index_path).read_text(encoding="utf-8")
    assert "<script>" not in raw and "&lt;script&gt;" in raw and "<b>bold</b>" not in raw
    assert pack.holds and "every envelope point of every case" in raw
    assert load_project(pack.project_path) == p  # written by dumps_project: reproduces the project
    with pytest.raises(KeyError):
        write_review_pack(p, tmp_path / "bad", quantities=("no_such_quantity",))


def test_write_map_png_signature_used_by_the_cli(tmp_path, capsys):
    result = evaluate_project(load_project(PITOT))
    out = tmp_path / "m.png"
    pic = P.write_map_png(result, out, "recovery")
    assert png_shape(out.read_bytes())[:2] == (pic.height, pic.width)
    P.write_map_png(result, tmp_path / "c.png", "spillage_fraction", case="ISA, take-off")
    with pytest.raises(KeyError):
        P.write_map_png(result, tmp_path / "x.png", "no_such_quantity")
    png = tmp_path / "cli.png"
    assert main(["map", str(PITOT), "--case", "ISA, take-off", "--csv", str(tmp_path / "m.csv"), "--png", str(png)]) == 0
    assert len(png_shape(png.read_bytes())) == 3


def test_cli_pack_exit_codes(tmp_path, capsys):
    assert main(["pack", str(PITOT), "--out", str(tmp_path / "a"), "--quantity", "face_mach_margin"]) == 0
    assert (tmp_path / "a" / "index.html").exists()
    assert main(["pack", str(FAILING), "--out", str(tmp_path / "b"), "--quantity", "recovery"]) == 1
    capsys.readouterr()
    assert main(["pack", str(tmp_path / "missing.toml"), "--out", str(tmp_path / "c")]) == 2
    assert main(["pack", str(PITOT), "--out", str(tmp_path / "d"), "--quantity", "nonsense"]) == 2
    err = capsys.readouterr().err
    assert "missing.toml" in err and "nonsense" in err


def test_analysis_modules_never_import_qt():
    import subprocess
    import sys

    code = ("import sys, engine_air.studies.sizing, engine_air.studies.compare, engine_air.studies.sweep, engine_air.outputs.review_pack, "
            "engine_air.outputs.pictures, engine_air.cli; "
            "print(any(m.split('.')[0] in ('PySide6', 'pyqtgraph', 'PyQt5', 'PyQt6') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"


# -- safe output (issue 9) -------------------------------------------------------------------------------

from engine_air.outputs.review_pack import MANIFEST, PackFolderError  # noqa: E402
from engine_air.project.model import Grid  # noqa: E402


def small(project, names):
    """The project on a coarse grid with cases of the given names (each a copy of the first case)."""
    base = project.cases[0]
    return replace(project, grid=Grid(9, 7), cases=tuple(replace(base, name=n) for n in names))


COLLIDING = ["ISA+15, max", "ISA-15, max", "ISA!", "ISA?", "Worst of all cases!"]


def test_colliding_case_names_write_every_reported_picture(tmp_path):
    import hashlib

    project = small(load_project(RAMP), COLLIDING)
    pack = write_review_pack(project, tmp_path / "out", quantities=("face_mach_margin", "recovery"))
    expected = (len(COLLIDING) + 1) * 2  # every case and the worst of all, two quantities
    assert len(pack.pictures) == len(set(pack.pictures)) == expected
    on_disk = sorted(p.name for p in (tmp_path / "out" / "maps").iterdir())
    assert on_disk == sorted(Path(p).name for p in pack.pictures)
    # every picture is its own: the case name is in the title, so no two files are the same bytes
    digests = {hashlib.sha256(Path(p).read_bytes()).hexdigest() for p in pack.pictures}
    assert len(digests) == expected
    page = parse(pack.index_path)
    ids = [i for i in page.ids if i.startswith("map-")]
    assert len(ids) == len(set(ids)) == expected
    for path in pack.all_pictures:
        assert f"{Path(path).parent.name}/{Path(path).name}" in Path(pack.index_path).read_text(encoding="utf-8")


def test_a_ten_thousand_character_case_name_works(tmp_path):
    long_name = "ISA " + "x" * 9996
    project = small(load_project(PITOT), [long_name, "short"])
    pack = write_review_pack(project, tmp_path / "out", quantities=("face_mach_margin",))
    assert len(pack.pictures) == 3
    for path in pack.all_pictures:
        assert Path(path).is_file() and len(Path(path).name) <= 80
    assert long_name in Path(pack.index_path).read_text(encoding="utf-8")  # the name itself is kept in the page


def _victim(tmp_path, name):
    victim = tmp_path / name
    victim.write_bytes(b"precious, not the pack's")
    return victim


def test_links_planted_in_a_pack_folder_are_never_written_through(tmp_path):
    project = small(load_project(PITOT), ["ISA, take-off"])
    out = tmp_path / "out"
    first = write_review_pack(project, out, quantities=("face_mach_margin",))
    picture = Path(first.pictures[0])
    v_png, v_toml, v_dir = _victim(tmp_path, "v.png"), _victim(tmp_path, "v.toml"), tmp_path / "elsewhere"
    v_dir.mkdir()
    picture.unlink()
    picture.symlink_to(v_png)
    (out / "project.toml").unlink()
    (out / "project.toml").symlink_to(v_toml)
    sections = out / "sections"
    for f in sections.iterdir():
        f.unlink()
    sections.rmdir()
    sections.symlink_to(v_dir, target_is_directory=True)

    again = write_review_pack(project, out, quantities=("face_mach_margin",))
    assert v_png.read_bytes() == b"precious, not the pack's"
    assert v_toml.read_bytes() == b"precious, not the pack's"
    assert list(v_dir.iterdir()) == []
    assert not picture.is_symlink() and picture.read_bytes()[:8] == PNG_SIGNATURE
    assert not (out / "project.toml").is_symlink() and load_project(out / "project.toml") == project
    assert not sections.is_symlink() and all(Path(p).is_file() for p in again.section_pictures)


def test_a_link_in_a_fresh_folder_or_as_the_folder_is_refused(tmp_path):
    victim = _victim(tmp_path, "v.toml")
    out = tmp_path / "out"
    out.mkdir()
    (out / "project.toml").symlink_to(victim)
    with pytest.raises(PackFolderError, match="not empty"):
        write_review_pack(PITOT, out, quantities=("face_mach_margin",))
    assert victim.read_bytes() == b"precious, not the pack's"
    real = tmp_path / "real"
    real.mkdir()
    (tmp_path / "link").symlink_to(real, target_is_directory=True)
    with pytest.raises(PackFolderError, match="symbolic link"):
        write_review_pack(PITOT, tmp_path / "link", quantities=("face_mach_margin",))
    assert list(real.iterdir()) == []


def test_a_foreign_non_empty_folder_is_refused(tmp_path, capsys):
    out = tmp_path / "mine"
    out.mkdir()
    (out / "thesis.txt").write_text("do not touch")
    with pytest.raises(PackFolderError, match="not empty"):
        write_review_pack(PITOT, out, quantities=("face_mach_margin",))
    (out / MANIFEST).write_text('{"written_by": "someone else"}')  # a file of that name is not enough
    with pytest.raises(PackFolderError):
        write_review_pack(PITOT, out, quantities=("face_mach_margin",))
    assert sorted(p.name for p in out.iterdir()) == sorted(["thesis.txt", MANIFEST])
    assert (out / "thesis.txt").read_text() == "do not touch"
    assert main(["pack", str(PITOT), "--out", str(out), "--quantity", "face_mach_margin"]) == 2
    err = capsys.readouterr().err
    assert "not empty" in err and len(err.strip().splitlines()) == 1
    # an empty folder, and a folder the pack wrote before, are taken
    empty = tmp_path / "empty"
    empty.mkdir()
    project = small(load_project(PITOT), ["ISA, take-off"])
    write_review_pack(project, empty, quantities=("face_mach_margin",))
    write_review_pack(project, empty, quantities=("recovery",))
    assert sorted(p.name for p in (empty / "maps").iterdir()) == ["c1-isa-take-off__recovery.png"]  # stale removed


def test_picture_stems_are_unique_and_short():
    from engine_air.outputs.review_pack import picture_stems

    names = COLLIDING + ["x" * 10_000, WORST]
    stems = picture_stems(names)
    assert len(set(stems.values())) == len(names)
    assert all(len(s) <= 30 for s in stems.values())


# -- issue 14: a review output that tells the truth ---------------------------------------------------------------

MIXED = SAMPLES / "mixed_compression_throat_schedule.toml"


@pytest.fixture(scope="module")
def mixed_pack(tmp_path_factory):
    project = replace(load_project(MIXED), grid=Grid(25, 21))
    return write_review_pack(project, tmp_path_factory.mktemp("mixed"))


def _captions(path) -> dict[str, str]:
    import re

    raw = Path(path).read_text(encoding="utf-8")
    return {m.group(1): html.unescape(re.sub(r"<[^>]+>", "", m.group(2)))
            for m in re.finditer(r'<figure id="([^"]+)">.*?<figcaption>(.*?)</figcaption>', raw, re.S)}


def test_pack_maps_every_failing_limit(mixed_pack):
    result = mixed_pack.result
    failing = {s.name for s in result.summary if not s.holds}
    assert {"started", "recovery"} <= failing
    # the least margin, then each failing limit's own quantity, then the usual four
    assert mixed_pack.quantities[:3] == ("worst_relative_margin", "recovery_minus_reference", "started")
    names = {Path(p).name for p in mixed_pack.pictures}
    assert "c1-isa-max__started.png" in names and "c1-isa-max__worst_relative_margin.png" in names


def test_sections_cut_each_limit_through_its_own_worst_point(mixed_pack):
    from engine_air.outputs.pack_pictures import section_targets
    from engine_air.outputs.sections import cut

    result = mixed_pack.result
    targets = section_targets(result, mixed_pack.quantities)
    judged = [s for s in result.summary if s.worst_case]
    assert [t.tag for t in targets] == [s.name for s in judged]
    points = {(t.mach, t.altitude_m) for t in targets}
    assert len(points) > 1  # not one point for every limit
    for t, s in zip(targets, judged):
        assert (t.mach, t.altitude_m) == (s.worst_mach, s.worst_altitude_m)
        assert cut(result, t.quantity, altitude_m=t.altitude_m).at == s.worst_altitude_m
        assert cut(result, t.quantity, mach=t.mach).at == s.worst_mach
    page = Path(mixed_pack.index_path).read_text(encoding="utf-8")
    for s in judged:
        assert f"{html.escape(s.label)}: through its worst point, Mach {s.worst_mach:.3f}" in page


def test_captions_count_the_failures_of_the_quantity_shown(mixed_pack):
    result = mixed_pack.result
    case = result.cases[0].name
    caps = _captions(mixed_pack.index_path)
    # face Mach holds everywhere here while other limits fail: its map says no face-Mach failure
    assert not result.failing(case, "face-mach").any()
    assert "no point where the limit “Face Mach number” fails" in caps["map-c1-isa-max-face_mach_margin"]
    started = int((result.failing(case, "started")).sum())
    assert started > 0 and f"{started} points where the limit" in caps["map-c1-isa-max-started"]
    anywhere = int(result.failing(case).sum())
    assert f"{anywhere} points where some limit fails" in caps["map-c1-isa-max-worst_relative_margin"]


def test_pack_header_and_findings_quote_the_scheduled_throat(mixed_pack):
    page = parse(mixed_pack.index_path)
    text = " ".join(page.all_text.split())
    sched = load_project(MIXED).inlet.schedule  # the header gives the schedule, not the fixed key it overrides
    first, last = sched.throat_area_m2[0], sched.throat_area_m2[-1]
    assert (f"throat scheduled in flight Mach from {first:g} m² at Mach {sched.mach[0]:g} to {last:g} m² at Mach "
            f"{sched.mach[-1]:g}") in text
    assert f"throat {load_project(MIXED).inlet.throat_area_m2:g} m²" not in text


def test_pack_is_also_one_pdf(mixed_pack):
    import json
    import re

    pdf = Path(mixed_pack.pdf_path)
    assert pdf.name == "review.pdf" and pdf.parent == Path(mixed_pack.folder)
    data = pdf.read_bytes()
    assert data[:5] == b"%PDF-" and data.rstrip().endswith(b"%%EOF")
    pages = len(re.findall(rb"/Type\s*/Page\b(?!s)", data))
    pictures = len(mixed_pack.pictures) + len(mixed_pack.section_pictures)
    assert pictures < pages <= pictures + 4  # text pages (verdict, findings, tables), then every picture
    manifest = json.loads((Path(mixed_pack.folder) / MANIFEST).read_text(encoding="utf-8"))
    assert "review.pdf" in manifest["files"] and manifest["complete"]


def test_default_pack_quantities_follow_the_failing_limits():
    from engine_air.outputs.pack_pictures import PACK_QUANTITIES as FOUR, pack_quantities

    holding = evaluate_project(small(load_project(PITOT), ["ISA, take-off"]))
    assert holding.holds and pack_quantities(holding) == FOUR
    text = (SAMPLES / "variable_geometry_fighter.toml").read_text(encoding="utf-8")
    project = load_project(SAMPLES / "variable_geometry_fighter.toml")
    tight = replace(project, limits=replace(project.limits, installation_loss_max=0.10), grid=Grid(31, 21))
    result = evaluate_project(tight)
    assert "installation_loss_max" in text and not result.holds
    assert pack_quantities(result)[:2] == ("worst_relative_margin", "installation_loss_fraction")


def test_review_output_modules_keep_the_shape_rule():
    # Issue 15's shape rule for these modules: no module over 600 lines, no function over 100.
    import ast

    root = Path(__file__).resolve().parents[1] / "engine_air"
    for rel in ("outputs/review_pack.py", "outputs/pack_folder.py", "outputs/pack_html.py", "outputs/pack_pictures.py",
                "outputs/pictures.py", "envelope/explain.py", "studies/compare.py"):
        text = (root / rel).read_text(encoding="utf-8")
        assert text.count("\n") <= 600, rel
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                assert node.end_lineno - node.lineno + 1 <= 100, f"{rel}: {node.name}"
