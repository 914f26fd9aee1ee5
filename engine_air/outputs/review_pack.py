"""A review pack: one folder with everything a reviewer needs to judge (and re-run) a design.

``write_review_pack(project_or_path, folder)`` evaluates the project over its
envelope for every case and writes into ``folder``:

- ``index.html``: one self-contained page (pictures embedded as base64 PNG, no
  scripts, no external files; ``engine_air.outputs.pack_html``) with these
  sections (element ids in brackets): the verdict per limit (``verdict``), the
  findings with the worst point of each limit and its mechanism, told with that
  point's own values (``findings``), the maps per case and quantity (``maps``: by
  default the least margin over every limit and each failing limit's own quantity
  when some limit fails, then face Mach margin, recovery, spillage fraction and
  throat Mach; each case and the worst of all cases), the sections of each limit
  through its own worst point (``sections``), the station table (``stations``), the
  shock table (``shocks``) and the installation ledger (``ledger``) at the overall
  worst point, the inputs as loaded (``inputs``: the project file's TOML text), the
  tool version (``version``), the method's sources (``sources``) and the caution
  (``caution``);
- ``review.pdf``: the same review as one PDF (matplotlib's multi-page backend):
  text pages with the verdict, the findings and the tables at the worst point, then
  every map and section;
- ``project.toml``: the same TOML text, so ``engine-air check project.toml``
  reproduces the verdict;
- ``maps/<stem>__<quantity>.png``: the map pictures as files too; ``<stem>`` is
  ``c<k>-<slug>`` for the k-th case (the slug cut to 24 characters) and
  ``all-worst`` for the worst of all cases, so every name is unique and short
  whatever the case names;
- ``sections/<check>__along-mach.png`` and ``..__along-altitude.png``: for each
  limit judged somewhere, its own quantity (the least margin for a limit without
  one) through that limit's own worst point (``engine_air.outputs.pack_pictures``);
- ``engine-air-pack.json``: the manifest, naming every file the pack wrote.

Safe output (``engine_air.outputs.pack_folder``): the pack writes only into a new
or empty folder, or into one that holds its own manifest (a pack written before;
files listed there and not written again are removed), never through a symbolic
link. Before it returns it checks that every picture it reports is a regular,
non-empty file. ``PackFolderError`` (an ``OSError``) says why a folder is refused.

Example::

    pack = write_review_pack("sample_projects/supersonic_two_ramp.toml", "out/review")
    print(pack.index_path, pack.pdf_path, pack.holds)
"""

from __future__ import annotations

import errno
import os
import re
from dataclasses import dataclass, field
from typing import Callable

from engine_air import CAUTION, __version__
from engine_air.envelope.evaluate import WORST, MapResult, evaluate_project
from engine_air.envelope.explain import finding_mechanism
from engine_air.outputs.ledger_table import ledger_rows
from engine_air.outputs.pack_characteristics import write_characteristics
from engine_air.outputs.pack_folder import MANIFEST, PackFolderError, StagingFolder, check_pack_target
from engine_air.outputs.pack_html import SECTION_IDS, SOURCES, banner_text, inlet_text, page
from engine_air.outputs.pack_pictures import (PACK_QUANTITIES, Book, Steps, pack_quantities, section_targets,
                                              write_maps, write_sections)
from engine_air.outputs.point_record import point_record, station_table
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.writer import check_not_input, staged_folder
from engine_air.project import dumps_project, load_project, project_from_dict
from engine_air.project.load import tomllib  # tomli on Python 3.10
from engine_air.project.model import Project
from engine_air.envelope.worst import worst_point

PDF_NAME = "review.pdf"
SLUG_CHARS = 24


@dataclass
class ReviewPack:
    folder: str
    index_path: str
    project_path: str
    pictures: list[str]  # the map pictures
    holds: bool
    result: MapResult
    notes: list[str] = field(default_factory=list)
    section_pictures: list[str] = field(default_factory=list)
    manifest_path: str = ""
    pdf_path: str = ""
    quantities: tuple[str, ...] = ()  # the quantities mapped
    characteristic_pictures: list[str] = field(default_factory=list)  # one per supersonic Mach of interest

    @property
    def all_pictures(self) -> list[str]:
        return self.pictures + self.section_pictures + self.characteristic_pictures


def _slug(text: str, limit: int = SLUG_CHARS) -> str:
    s = re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower()[:limit].strip("-")
    return s or "case"


def picture_stems(case_names: list[str]) -> dict[str, str]:
    """A short file-name stem per case, unique whatever the names: ``c<k>-<slug>``; ``all-worst`` for WORST.

    >>> picture_stems(["ISA+15, max", "ISA-15, max", WORST])
    {'ISA+15, max': 'c1-isa-15-max', 'ISA-15, max': 'c2-isa-15-max', 'worst of all cases': 'all-worst'}
    """
    out = {}
    k = 0
    for name in case_names:
        if name == WORST and name not in out:
            out[name] = "all-worst"
        elif name not in out:
            k += 1
            out[name] = f"c{k}-{_slug(name)}"
    return out


def summary_lines(project, result, worst, source_name: str, units: str = "si") -> list[str]:
    """The PDF's text pages: title, inlet, verdict, findings with their mechanisms, the tables at the worst point."""
    lines = [f"Inlet-engine airflow review: {project.title or os.path.basename(source_name)}",
             f"Source: {source_name} - engine-air {__version__}", "", inlet_text(project, str),
             f"Cases: {', '.join(c.name for c in result.cases)}. Grid {len(result.mach)} Mach x "
             f"{len(result.altitude_m)} altitude, {int(result.inside.sum())} points inside the envelope per case.",
             "", banner_text(result), "", f"{'limit':<40} {'rule':<30} {'verdict':<7} {'worst':>9} {'margin':>9} "
             f"{'Mach':>6} {'alt m':>7} {'failing':>8}  case"]
    for s in result.summary:
        if not s.judged:
            lines.append(f"{s.label[:40]:<40} {s.limit_text[:30]:<30} {s.verdict}")
            continue
        lines.append(f"{s.label[:40]:<40} {s.limit_text[:30]:<30} {s.verdict:<7} "
                     f"{s.worst_value:>9.4f} {s.worst_margin:>9.4f} {s.worst_mach:>6.3f} {s.worst_altitude_m:>7.0f} "
                     f"{100 * s.failing_share:>7.1f}%  {s.worst_case or '-'}")
    lines += ["", "Findings: what drives each limit at its own worst point"]
    for s in result.summary:
        regime, flags, why = finding_mechanism(project, result, s, units)
        lines.append(f"- {s.label} ({s.verdict}; {regime}; flags {flags}): {why}.")
    if worst.check is not None:
        pts = result.case_map(worst.case).points
        lines += ["", f"Overall worst point: {worst.label} at {worst.where()}, relative margin "
                      f"{worst.relative_margin:+.4f}", "",
                  f"{'station':<8} {'name':<14} {'Mach':>8} {'p (Pa)':>11} {'T (K)':>8} {'p_t (Pa)':>11} "
                  f"{'area (m2)':>10}"]
        for r in station_table(project, pts, worst.index):
            lines.append(f"{r['station']:<8} {r['name']:<14} {r['mach']:>8.4f} {r['p_pa']:>11.1f} {r['t_k']:>8.2f} "
                         f"{r['pt_pa']:>11.1f} {r['area_m2']:>10.4f}")
        rating = project.rating(project.case(worst.case).rating)
        lines += ["", "Installation ledger (N): + and - rows add up to the installed thrust (=)"]
        for r in ledger_rows(point_record(pts, worst.index, worst.case), rating.recovery_thrust_exchange):
            value = "-" if r["value"] is None else (f"{float(r['value']):.4f}" if r["role"] == "share"
                                                    else f"{float(r['value']) + 0.0:,.1f}")
            lines.append(f"  {r['role']:<6} {r['label']:<40} {value:>14}  {r['note']}")
    return lines + ["", CAUTION]


def _read_source(project_or_path, source_text):
    """(project, toml text, source name, notes)."""
    notes = []
    if isinstance(project_or_path, Project):
        project = project_or_path
        text = source_text
        if text is not None:
            try:
                same = project_from_dict(tomllib.loads(text)) == project
            except Exception:  # noqa: BLE001 - any failure means the text does not reproduce the project
                same = False
            if not same:
                notes.append("The given source text does not load to the evaluated project; the pack shows the "
                             "project as written by engine-air instead.")
                text = None
        if text is None:
            text = dumps_project(project)
        return project, text, "(project in memory)", notes
    path = os.fspath(project_or_path)
    project = load_project(path)
    with open(path, "rb") as fh:
        text = fh.read().decode("utf-8-sig")
    return project, text, path, notes


def write_review_pack(
    project_or_path,
    folder,
    *,
    source_text: str | None = None,
    quantities: tuple[str, ...] | None = None,
    case_names: list[str] | None = None,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
    units: str = "si",
    inputs: tuple = (),
) -> ReviewPack:
    """Evaluate a project and write its review pack into ``folder`` (created if needed).

    Parameters
    ----------
    project_or_path : Project or path
        A project file (its text goes into the pack as read) or a ``Project``
        (its text is ``source_text`` when that loads back to the same project,
        else ``dumps_project(project)``).
    folder : path
        Output folder: new, empty, or holding a pack's manifest (a pack written before, replaced whole);
        anything else raises ``PackFolderError``, a folder holding an input ``OutputIsInputError``, both
        before any work. The pack is assembled beside it and moved into place whole
        (``engine_air.outputs.writer.staged_folder``): a failure leaves the previous folder as it was.
    quantities : tuple of str, optional
        Keys of ``engine_air.outputs.quantities.QUANTITIES`` to map; default ``pack_quantities(result)``: the
        least margin and each failing limit's own quantity when some limit fails, then ``PACK_QUANTITIES``.
    case_names : list of str, optional
        Evaluate only these cases (default every case).
    units : "si" or "us"
        Axes of the pictures: altitude in km ("si") or ft ("us").
    inputs : paths
        Further files the run reads (the project file is one already); none may lie in ``folder``.

    Returns a ``ReviewPack`` (paths, verdict, the evaluation). Raises
    ``ProjectError`` for an unusable project, KeyError for an unknown quantity,
    OSError when the folder cannot be written.
    """
    for q in quantities or ():
        if q not in QUANTITIES:
            raise KeyError(q)
    if str(units).lower() not in ("si", "us"):
        raise ValueError(f"units must be 'si' or 'us', got {units!r}")
    folder = os.fspath(folder)
    sources = [*inputs] + ([] if isinstance(project_or_path, Project) else [project_or_path])
    check_not_input(folder, sources, folder=True)
    check_pack_target(folder)
    project, text, source_name, notes = _read_source(project_or_path, source_text)
    result = evaluate_project(project, case_names, cancelled=cancelled)
    quantities = tuple(quantities) if quantities else pack_quantities(result)
    with staged_folder(folder, sources) as staging:
        out = StagingFolder(staging, final=folder)
        try:
            return _write(out, project, text, source_name, notes, result, quantities, progress, cancelled, units)
        finally:
            out.close()



_PREVIOUS = re.compile(r"^(maps|sections)/[^/\\]+$")


def _write(out: StagingFolder, project, text, source_name, notes, result, quantities, progress, cancelled,
           units) -> ReviewPack:
    folder = out.final
    out.manifest(sorted(set(out.previous) | {MANIFEST}), complete=False)  # ours from the first byte on
    out.subfolder("maps")
    out.subfolder("sections")
    cases = [c.name for c in result.cases] + ([WORST] if len(result.cases) > 1 else [])
    worst = worst_point(result)
    targets = section_targets(result, quantities)
    steps = Steps(len(cases) * len(quantities) + 2 * len(targets) + 1, progress, cancelled)
    book = Book(project.title or os.path.basename(source_name))
    book.text(summary_lines(project, result, worst, source_name, units))
    pictures, written, maps_html = write_maps(out, result, quantities, cases, picture_stems(cases), units, book,
                                              steps)
    section_pictures, names, sections_html = write_sections(out, project, result, targets, cases, units, book, steps)
    written += names
    characteristic_pictures, names, characteristics_html = write_characteristics(out, project, result, book, steps)
    written += names
    steps.check()
    project_path = out.write("project.toml", text.encode("utf-8"))
    written += _copy_table(out, project, notes)
    pdf_path = out.write(PDF_NAME, book.close())
    index_path = out.write("index.html", page(project, result, worst, text=text, source_name=source_name,
                                              notes=notes, maps_html=maps_html, sections_html=sections_html,
                                              characteristics_html=characteristics_html,
                                              units=units).encode("utf-8"))
    written += ["project.toml", PDF_NAME, "index.html"]
    missing = [r for r in written if r.endswith(".png") and not out.is_picture(r)]
    if missing:
        raise OSError(errno.EIO, f"pictures reported but not written: {', '.join(missing[:5])}", folder)
    keep = set(written) | {MANIFEST}
    for old in out.previous:
        if old not in keep and _PREVIOUS.match(old) and ".." not in old:
            out.remove(old)
    out.manifest(sorted(keep), complete=True)
    steps.tick(finished=True)
    return ReviewPack(folder, index_path, project_path, pictures, result.holds, result, notes, section_pictures,
                      os.path.join(folder, MANIFEST), pdf_path, tuple(quantities), characteristic_pictures)


def _copy_table(out, project, notes: list[str]) -> list[str]:
    """The characteristics table beside the pack's project.toml, under the name the project gives it (a file name,
    or one folder and a file name), so that the pack's project loads with its data; another name (one that climbs
    out of the project's folder, or deeper) is said in the notes."""
    table = getattr(project.characteristics, "table", None)
    name = project.characteristics_file
    if table is None or name is None:
        return []
    parts = name.split("/")
    if len(parts) > 2 or any(not p or p.startswith(".") or "\\" in p or ":" in p for p in parts):
        notes.append(f"The characteristics table is named {name!r} relative to the project file; the pack holds no "
                     "copy of it, so the pack's project.toml loads only beside a table at that path.")
        return []
    if len(parts) == 2:
        out.subfolder(parts[0])
    with open(table.path, "rb") as handle:
        out.write(name, handle.read())
    return [name]


__all__ = ["MANIFEST", "PACK_QUANTITIES", "PDF_NAME", "SECTION_IDS", "SOURCES", "PackFolderError", "ReviewPack",
           "pack_quantities", "picture_stems", "write_review_pack"]
