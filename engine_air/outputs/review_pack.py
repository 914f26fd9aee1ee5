"""A review pack: one folder with everything a reviewer needs to judge (and re-run) a design.

``write_review_pack(project_or_path, folder)`` evaluates the project over its
envelope for every case and writes into ``folder``:

- ``index.html``: one self-contained page (pictures embedded as base64 PNG, no
  scripts, no external files) with these sections (element ids in brackets):
  the verdict per limit (``verdict``), the findings with the worst point of each
  limit and its mechanism (``findings``), the maps per case and quantity
  (``maps``: face Mach margin, recovery, spillage fraction and throat Mach by
  default, each case and the worst of all cases), the station table
  (``stations``), the shock table (``shocks``) and the installation ledger
  (``ledger``: ram, pre-entry, spillage, bleed and bypass drag, net and installed
  thrust, rows adding up to the installed thrust) at the worst point, the inputs
  as loaded (``inputs``: the project file's TOML text), the tool version
  (``version``), the method's sources (``sources``) and the caution
  (``caution``);
- ``project.toml``: the same TOML text, so ``engine-air check project.toml``
  reproduces the verdict;
- ``maps/<stem>__<quantity>.png``: the map pictures as files too; ``<stem>`` is
  ``c<k>-<slug>`` for the k-th case (the slug cut to 24 characters) and
  ``all-worst`` for the worst of all cases, so every name is unique and short
  whatever the case names;
- ``sections/<quantity>__along-mach.png`` and ``..__along-altitude.png``: section
  plots (every case) through the overall worst point, of the limiting check's own
  quantity and of every mapped quantity;
- ``engine-air-pack.json``: the manifest, naming every file the pack wrote.

Safe output: the pack writes only into a new or empty folder, or into one that
holds its own manifest and nothing it does not list (a pack written before); a
folder that holds an input of the run (the project file) is refused before any
work. The pack is assembled in a temporary folder beside the target and moved
into place whole (``engine_air.outputs.writer.staged_folder``), so a failure
(a full disk, a cancelled run) leaves no partial pack and the previous one as it
was. Inside, every file is written under a fresh temporary name (created
exclusively, links not followed) and renamed, so no link is ever written
through; a link in place of the folder itself is refused. Before it returns it
checks that every picture it reports is a regular, non-empty file
(``engine_air.outputs.pack_folder``).
``PackFolderError`` (an ``OSError``) says why a folder is refused.

The pictures come from ``engine_air.outputs.pictures`` (matplotlib, no Qt). Every text
taken from the project (title, notes, case names) is HTML-escaped.

Example::

    pack = write_review_pack("sample_projects/supersonic_two_ramp.toml", "out/review")
    print(pack.index_path, pack.holds)
"""

from __future__ import annotations

import base64
import datetime as _dt
import errno
import html
import math
import os
import platform
import re
import sys
from engine_air.project.load import tomllib  # tomli on Python 3.10
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from engine_air import CAUTION, __version__
from engine_air.envelope import flags as F
from engine_air.envelope import ranking
from engine_air.envelope.explain import finding_mechanism
from engine_air.envelope.evaluate import WORST, Cancelled, MapResult, evaluate_project, verdict_text
from engine_air.flow.match import REGIMES
from engine_air.project.model import Project
from engine_air.outputs.pack_folder import MANIFEST, PackFolderError, StagingFolder, check_pack_target
from engine_air.outputs.pictures import figure_png, render_map, section_figure, short
from engine_air.outputs.sections import check_of, cut
from engine_air.project import dumps_project, load_project, project_from_dict
from engine_air.outputs.quantities import QUANTITIES
from engine_air.outputs.ledger_table import NO_THRUST_DATA, ledger_rows
from engine_air.outputs.writer import check_not_input, staged_folder
from engine_air.outputs.point_record import point_record, shock_table, station_table
from engine_air.studies.sizing import worst_point

PACK_QUANTITIES = ("face_mach_margin", "recovery", "spillage_fraction", "throat_mach")
"""Quantities mapped in a pack by default."""
SECTION_IDS = ("verdict", "findings", "maps", "sections", "stations", "shocks", "ledger", "inputs", "version", "sources", "caution")
"""Element ids of the pack's sections, in page order."""
SOURCES = (
    "U.S. Standard Atmosphere, 1976 (NOAA/NASA/USAF); ISO 2533:1975 — free-stream conditions.",
    "NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953) — isentropic flow, "
    "normal and oblique shocks.",
    "MIL-E-5008B (1959) — reference ram recovery.",
    "SAE AS755 — station designation (0 free stream, 1 capture, th throat, 2 engine face).",
    "Seddon, J. and Goldsmith, E. L., Intake Aerodynamics, 2nd ed. (1999) — additive drag, subcritical "
    "spillage, buzz, shock-on-lip layout.",
    "Mattingly, J. D., Heiser, W. H. and Pratt, D. T., Aircraft Engine Design, 2nd ed. (2002) — inlet sizing "
    "and the capture-area trade.",
)


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

    @property
    def all_pictures(self) -> list[str]:
        return self.pictures + self.section_pictures



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



def _num(x, digits: int = 4) -> str:
    try:
        x = float(x)
    except (TypeError, ValueError):
        return "–"
    if not math.isfinite(x):
        return "–"
    return f"{x:.{digits}f}"


def _g(x, digits: int = 5) -> str:
    if x is None:
        return "–"
    x = float(x)
    return f"{x:.{digits}g}" if math.isfinite(x) else "–"


e = html.escape

_CSS = """
body { font-family: "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; color: #1d1d1d; margin: 24px 32px;
       max-width: 1140px; line-height: 1.4; font-size: 14px; }
h1 { font-size: 22px; margin-bottom: 4px; } h2 { font-size: 18px; border-bottom: 1px solid #bbb; margin-top: 30px; }
h3 { font-size: 15px; margin: 18px 0 6px; }
table { border-collapse: collapse; margin: 8px 0; } th, td { border: 1px solid #c8c8c8; padding: 3px 7px; }
th { background: #efefef; text-align: left; } td.n { text-align: right; font-variant-numeric: tabular-nums; }
.holds { color: #0b4f8a; font-weight: bold; } .fails { color: #8a3b00; font-weight: bold; } .unjudged { color: #555; font-style: italic; }
.banner { padding: 8px 12px; border: 2px solid; display: inline-block; margin: 8px 0; font-weight: bold; }
.banner.holds { border-color: #0b4f8a; background: #eaf2fa; } .banner.fails { border-color: #b35806; background: #fdf0e3; }
.meta { color: #555; } .maps { display: flex; flex-wrap: wrap; gap: 18px; }
figure { margin: 0; width: 540px; } figure img { display: block; width: 100%; height: auto; }
figcaption { font-size: 12px; color: #333; }
pre { background: #f6f6f6; border: 1px solid #ddd; padding: 10px; white-space: pre-wrap; overflow-wrap: anywhere;
      font-size: 12px; }
.caution { border-left: 4px solid #b35806; padding: 6px 12px; background: #fdf6ee; }
"""


def _table(headers, rows, numeric=()) -> str:
    out = ["<table><thead><tr>" + "".join(f"<th>{e(h)}</th>" for h in headers) + "</tr></thead><tbody>"]
    for row in rows:
        cells = []
        for k, cell in enumerate(row):
            cls = ' class="n"' if k in numeric else ""
            cells.append(f"<td{cls}>{cell}</td>")
        out.append("<tr>" + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    return "\n".join(out)


def _ledger_html(project, result, worst) -> str:
    """The ledger table (``engine_air.outputs.ledger_table``) at the worst point: + and − rows adding up to the
    installed thrust, memo rows (ram drag, pre-entry drag, lip suction) apart; "no thrust data" without a table."""
    pts = result.case_map(worst.case).points
    record = point_record(pts, worst.index, worst.case)
    rating = project.rating(project.case(worst.case).rating)
    rows = ledger_rows(record, rating.recovery_thrust_exchange)
    body = []
    for r in rows:
        v = r["value"]
        sign = "=" if r["role"] == "total" else ""
        if r["role"] == "share":
            shown = _num(v, 4)
        elif v is None:
            shown = e(r["note"]) if r["note"] == NO_THRUST_DATA else "–"
        else:
            v = float(v) + 0.0  # no "-0.0"
            if r["role"] == "term":  # the sign in its own column, the amount beside it: the column adds up
                sign, v = ("+" if v >= 0.0 else "\u2212"), abs(v)
            shown = f"{v:,.1f}".replace(",", "\u2009").replace("-", "\u2212")
        label = f"<b>{e(r['label'])}</b>" if r["role"] == "total" else e(r["label"])
        note = "" if r["note"] == NO_THRUST_DATA else e(r["note"])
        body.append([label, sign, shown, note])
    none = record.get("net_thrust_n") is None
    head = (f"<p>Case <b>{e(worst.case)}</b>, rating <b>{e(rating.name)}</b>, Mach {worst.mach:.3f}, "
            f"{worst.altitude_m:.0f} m. F_inst = F_n·(1 − X·(1 − π/π_ref)) − D_spill − D_bleed − D_bypass: the rows "
            "marked + and − add up to the installed thrust (row =); the ram drag, pre-entry drag and lip suction are "
            "shown for information (the ram drag is inside the net thrust).</p>")
    if none:
        head += f"<p>The rating gives {e(NO_THRUST_DATA)}: no net or installed thrust (drags only).</p>"
    return head + _table(["item", "", "value (N)", "how"], body, numeric=(2,))


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
    quantities: tuple[str, ...] = PACK_QUANTITIES,
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
    quantities : tuple of str
        Keys of ``engine_air.outputs.quantities.QUANTITIES`` to map.
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
    for q in quantities:
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
    written: list[str] = []
    out.manifest(sorted(set(out.previous) | {MANIFEST}), complete=False)  # ours from the first byte on
    out.subfolder("maps")
    out.subfolder("sections")
    cases = [c.name for c in result.cases] + ([WORST] if len(result.cases) > 1 else [])
    stems = picture_stems(cases)
    worst = worst_point(result)
    total = len(cases) * len(quantities) + 2 * (len(quantities) + 1) + 1
    done = 0

    def tick():
        if progress is not None:
            progress(min(1.0, done / total))

    def check_cancel():
        if cancelled is not None and cancelled():
            raise Cancelled()

    # -- maps
    figures: dict[str, list[str]] = {}
    pictures = []
    for q in quantities:
        quantity = QUANTITIES[q]
        figures[q] = []
        for case in cases:
            check_cancel()
            pic = render_map(result, q, None if case == WORST else case, units=units)
            name = f"{stems[case]}__{q}.png"
            pictures.append(out.write(f"maps/{name}", pic.png))
            written.append(f"maps/{name}")
            scale = ("diverging, centred on zero: orange where the limit fails, blue where it holds"
                     if pic.kind == "margin" else "sequential")
            data = base64.b64encode(pic.png).decode("ascii")
            fail_text = (f"{pic.failing_points} failing points (x marks)" if pic.failing_points
                         else "no failing point")
            figures[q].append(
                f'<figure id="map-{e(stems[case])}-{e(q)}"><img alt="{e(quantity.label)}, {e(short(case))}" '
                f'width="{pic.width}" height="{pic.height}" src="data:image/png;base64,{data}">'
                f"<figcaption><b>{e(quantity.label)}</b> ({e(quantity.description)}), "
                f"case <b>{e(case)}</b>. Colour scale {e(scale)}, from {e(_g(pic.vmin, 4))} to "
                f"{e(_g(pic.vmax, 4))}; neutral grey where not judged, light grey outside the envelope; "
                f"{fail_text}. "
                f'File: <code>maps/{e(name)}</code>.</figcaption></figure>'
            )
            done += 1
            tick()

    # -- sections through the overall worst point (the middle of the grid when nothing is judged)
    if worst.check is not None:
        at_alt, at_mach = float(worst.altitude_m), float(worst.mach)
        where = f"through the worst point ({e(worst.where())})"
    else:
        at_alt = float(result.altitude_m[len(result.altitude_m) // 2])
        at_mach = float(result.mach[len(result.mach) // 2])
        where = "through the middle of the grid (no check applies anywhere)"
    section_pictures = []
    section_html = []
    section_quantities = list(quantities)
    if worst.check is not None:  # the limiting check's own quantity first, mapped or not
        own = next((k for k in QUANTITIES if check_of(result, k) == worst.check), None)
        if own is not None:
            section_quantities = [own] + [k for k in section_quantities if k != own]
    for q in section_quantities:
        quantity = QUANTITIES[q]
        row = []
        for tag, kw in (("along-mach", {"altitude_m": at_alt}), ("along-altitude", {"mach": at_mach})):
            check_cancel()
            sec = cut(result, q, cases=cases, **kw)
            png = figure_png(section_figure(sec, units=units, project_title=project.title).figure)
            name = f"{q}__{tag}.png"
            section_pictures.append(out.write(f"sections/{name}", png))
            written.append(f"sections/{name}")
            data = base64.b64encode(png).decode("ascii")
            cut_text = (f"against flight Mach number at {sec.at:.0f} m" if tag == "along-mach"
                        else f"against altitude at Mach {sec.at:.3f}")
            row.append(
                f'<figure id="section-{e(q)}-{tag}"><img alt="{e(quantity.label)} {e(cut_text)}" '
                f'src="data:image/png;base64,{data}"><figcaption><b>{e(quantity.label)}</b> {e(cut_text)}, '
                f"every case; the limit as a dash-dot line, failing stretches under a broad orange band. "
                f"File: <code>sections/{e(name)}</code>.</figcaption></figure>")
            done += 1
            tick()
        section_html.append(f"<h3>{e(quantity.label)}</h3><div class=\"maps\">{''.join(row)}</div>")
    sections_html = f"<p>Cuts {where}.</p>" + "".join(section_html)

    # -- verdict and findings
    holds = result.holds
    verdict_rows = []
    finding_rows = []
    for s in result.summary:
        cls = "fails" if s.fails else "holds" if s.judged else "unjudged"
        verdict_rows.append([
            e(s.label), e(s.limit_text), f'<span class="{cls}">{e(s.verdict)}</span>',
            _num(s.worst_value), _num(s.worst_margin), f"{100 * s.failing_share:.1f} %", str(s.judged_points),
        ])
        regime, flags, why = finding_mechanism(project, result, s)
        finding_rows.append([
            e(s.label), f'<span class="{cls}">{e(s.verdict)}</span>', _num(s.worst_value),
            _num(s.worst_margin), _num(s.worst_mach, 3), _num(s.worst_altitude_m, 0), e(s.worst_case or "–"),
            e(regime), e(flags), e(why),
        ])

    # -- station and shock tables at the worst point
    station_html = "<p>No check applies at any envelope point.</p>"
    shock_html = station_html
    if worst.check is not None:
        pts = result.case_map(worst.case).points
        j = worst.index
        rows = station_table(project, pts, j)
        station_html = (
            f"<p>At the worst point: Mach {worst.mach:.3f}, {worst.altitude_m:.0f} m, case <b>{e(worst.case)}</b>; "
            f"limiting check {e(worst.label)} ({e(worst.limit_text)}), relative margin "
            f"{worst.relative_margin:+.4f}; regime {e(REGIMES[int(pts.regime[j])])}; flags "
            f"{e(', '.join(F.names_of(int(pts.flags[j]))))}.</p>"
            + _table(["station", "name", "Mach", "p (Pa)", "T (K)", "p_t (Pa)", "T_t (K)", "V (m/s)", "area (m²)"],
                     [[e(r["station"]), e(r["name"]), _g(r["mach"]), _g(r["p_pa"], 6), _g(r["t_k"]),
                       _g(r["pt_pa"], 6), _g(r["tt_k"]), _g(r["v_m_s"]), _g(r["area_m2"])] for r in rows],
                     numeric=range(2, 9))
            + f"<p>Recovery {_g(pts.recovery[j])} (external {_g(pts.external_recovery[j])}, duct "
              f"{_g(pts.duct_recovery[j])}); mass-flow ratio {_g(pts.mass_flow_ratio[j])}, maximum "
              f"{_g(pts.max_mass_flow_ratio[j])}; spillage fraction {_g(pts.spillage_fraction[j])}.</p>"
        )
        shock_parts = []
        targets = [("the worst point", worst.case, j, worst.mach)]
        if worst.mach <= 1.0:
            # the worst supersonic point, if the envelope has one
            supersonic = result.inside & (np.asarray(result.mach)[None, :] > 1.0)
            best = ranking.worst_point([cm.points for cm in result.cases], supersonic)
            if best is not None:
                k = best.index
                targets.append(("the worst supersonic point", result.cases[best.case].name, k,
                                float(result.mach[k[1]])))
        for title, case, idx, m0 in targets:
            cpts = result.case_map(case).points
            rows = shock_table(project, cpts, idx)
            head = (f"<h3>At {e(title)}: Mach {m0:.3f}, {result.altitude_m[idx[0]]:.0f} m, case "
                    f"{e(case)}</h3>")
            if not rows:
                shock_parts.append(head + "<p>No external shock: the flight Mach number is 1 or less.</p>")
                continue
            shock_parts.append(head + _table(
                ["shock", "Mach ahead", "Mach behind", "wave angle (deg)", "p_t ratio"],
                [[e(r["kind"]), _g(r["mach_ahead"]), _g(r["mach_behind"]), _g(r["wave_angle_deg"]),
                  _g(r["total_pressure_ratio"])] for r in rows], numeric=range(1, 5)))
        shock_html = "\n".join(shock_parts)

    # -- installation ledger at the worst point
    ledger_html = "<p>No check applies at any envelope point.</p>"
    if worst.check is not None:
        ledger_html = _ledger_html(project, result, worst)

    # -- inputs
    project_path = out.write("project.toml", text.encode("utf-8"))
    written.append("project.toml")
    warnings = "".join(f"<li>{e(w)}</li>" for w in project.warnings)
    notes_html = "".join(f"<li>{e(n)}</li>" for n in notes)

    now = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    title = project.title or os.path.basename(source_name)
    banner_cls = "holds" if holds else "fails"
    banner = "VERDICT: " + verdict_text(result)
    inside = int(result.inside.sum())
    maps_html = "".join(
        f"<h3>{e(QUANTITIES[q].label)}</h3><div class=\"maps\">{''.join(figures[q])}</div>" for q in quantities)
    import numpy
    import scipy

    page = f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta name="generator" content="engine-air {e(__version__)}">
<title>Review pack: {e(title)}</title><style>{_CSS}</style></head>
<body>
<header id="summary"><h1>Inlet–engine airflow review: {e(title)}</h1>
<p class="meta">Source: <code>{e(source_name)}</code> · generated {e(now)} by engine-air {e(__version__)}</p>
{f'<p>{e(project.notes)}</p>' if project.notes else ''}
<p>Inlet: {e(project.inlet.type)}, capture {project.inlet.capture_area_m2:g} m², throat
{project.inlet.throat_area_m2:g} m², face {project.inlet.face_area_m2:g} m², duct loss K
{project.inlet.duct_loss_coefficient:g}{(', ramps ' + ', '.join(f'{a:g}' for a in project.inlet.ramp_angles_deg) + ' deg, shock on lip at Mach ' + f'{project.inlet.shock_on_lip_mach:g}') if project.inlet.type == 'external-ramp' else ''}.
Cases: {e(', '.join(c.name for c in result.cases))}. Grid {len(result.mach)} Mach × {len(result.altitude_m)} altitude,
{inside} points inside the envelope per case.</p>
<div class="banner {banner_cls}">{e(banner)}</div>
</header>

<section id="verdict"><h2>Verdict per limit</h2>
{_table(["limit", "rule", "verdict", "worst value", "worst margin", "envelope failing", "points judged"],
        verdict_rows, numeric=(3, 4, 5, 6))}
<p>Margins are limit minus value in the quantity's own units (positive: the limit holds). The failing share counts
envelope points over all cases.</p>
</section>

<section id="findings"><h2>Findings: worst point of each limit</h2>
{_table(["limit", "verdict", "worst value", "margin", "Mach", "altitude (m)", "case", "regime", "flags", "mechanism"],
        finding_rows, numeric=(2, 3, 4, 5))}
<p>Overall limiting point: {e(worst.label or '–')} {('(' + e(worst.limit_text) + ')') if worst.check else ''}
{('at ' + e(worst.where()) + f', relative margin {worst.relative_margin:+.4f}') if worst.check else ''}.</p>
</section>

<section id="maps"><h2>Maps per case and quantity</h2>
<p>Each picture shows one grid point per cell, flight Mach number across and pressure altitude up. An x (a second
cue besides colour) marks points where a limit fails. Margin maps use an orange–white–blue scale symmetric about
zero (orange: the limit fails); level maps a sequential scale from the lowest to the highest value inside the
envelope. Each map carries the envelope outline, the zero-margin line and the face static = ambient line.</p>
{maps_html}
</section>

<section id="sections"><h2>Sections</h2>
<p>The quantity against flight Mach number at one altitude and against altitude at one Mach number, one line per
case (and the worst of all cases); thin dotted where the quantity is not judged.</p>
{sections_html}
</section>

<section id="stations"><h2>Station table at the worst point</h2>
<p>Stations after SAE AS755: 0 free stream, 1 capture plane, th throat, 2 engine face.</p>
{station_html}
</section>

<section id="shocks"><h2>Shock table</h2>
{shock_html}
</section>

<section id="ledger"><h2>Installation ledger at the worst point</h2>
{ledger_html}
</section>

<section id="inputs"><h2>Inputs as loaded</h2>
<p>The project file exactly as evaluated; it is also saved beside this page as <code>project.toml</code>, so
<code>engine-air check project.toml</code> reproduces the verdict and <code>engine-air pack project.toml --out
FOLDER</code> this pack.</p>
{f'<p>Loading warnings:</p><ul>{warnings}</ul>' if warnings else ''}
{f'<ul>{notes_html}</ul>' if notes_html else ''}
<pre>{e(text)}</pre>
</section>

<section id="version"><h2>Tool version</h2>
<table><tbody>
<tr><th>engine-air</th><td>{e(__version__)}</td></tr>
<tr><th>Python</th><td>{e(platform.python_version())}</td></tr>
<tr><th>numpy / scipy</th><td>{e(numpy.__version__)} / {e(scipy.__version__)}</td></tr>
<tr><th>platform</th><td>{e(sys.platform)}</td></tr>
</tbody></table>
</section>

<section id="sources"><h2>Sources of the method</h2>
<ul>{''.join(f'<li>{e(s)}</li>' for s in SOURCES)}</ul>
</section>

<section id="caution"><h2>Caution</h2>
<p class="caution">{e(CAUTION)}</p>
</section>
</body></html>
"""
    index_path = out.write("index.html", page.encode("utf-8"))
    written.append("index.html")
    missing = [r for r in written if r.endswith(".png") and not out.is_picture(r)]
    if missing:
        raise OSError(errno.EIO, f"pictures reported but not written: {', '.join(missing[:5])}", folder)
    keep = set(written) | {MANIFEST}
    for old in out.previous:
        if old not in keep and _PREVIOUS.match(old) and ".." not in old:
            out.remove(old)
    out.manifest(sorted(keep), complete=True)
    done = total
    tick()
    return ReviewPack(folder, index_path, project_path, pictures, holds, result, notes, section_pictures,
                      os.path.join(folder, MANIFEST))


__all__ = ["MANIFEST", "PACK_QUANTITIES", "SECTION_IDS", "SOURCES", "PackFolderError", "ReviewPack", "picture_stems",
           "write_review_pack"]
