"""The review pack's page: one self-contained HTML text (pictures embedded, no scripts, no external files).

Each section of the page is built by its own function from the evaluation and the
pictures already written; ``page(...)`` puts them together in the order of
``SECTION_IDS``. Every text taken from the project (title, notes, case names) is
HTML-escaped; every number is the point's own (the throat area is the one its
schedule gives there, method §12).
"""

from __future__ import annotations

import datetime as _dt
import html
import math
import os
import platform
import sys

import numpy as np

from engine_air import CAUTION, __version__
from engine_air.envelope import flags as F
from engine_air.envelope import ranking
from engine_air.envelope.explain import finding_mechanism
from engine_air.flow.match import REGIMES
from engine_air.outputs.ledger_table import NO_THRUST_DATA, ledger_rows
from engine_air.outputs.point_record import point_record, shock_table, station_table

SECTION_IDS = ("verdict", "findings", "maps", "sections", "characteristics", "stations", "shocks", "ledger", "inputs", "version", "sources",
               "caution")
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

e = html.escape

CSS = """
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


def num(x, digits: int = 4) -> str:
    """``x`` with ``digits`` decimals; "–" when not a finite number."""
    try:
        x = float(x)
    except (TypeError, ValueError):
        return "–"
    if not math.isfinite(x):
        return "–"
    return f"{x:.{digits}f}"


def g(x, digits: int = 5) -> str:
    """``x`` with ``digits`` significant digits; "–" when None or not finite."""
    if x is None:
        return "–"
    x = float(x)
    return f"{x:.{digits}g}" if math.isfinite(x) else "–"


def table(headers, rows, numeric=()) -> str:
    """An HTML table; ``rows`` hold HTML cells (escaped by the caller), ``numeric`` the right-aligned columns."""
    out = ["<table><thead><tr>" + "".join(f"<th>{e(h)}</th>" for h in headers) + "</tr></thead><tbody>"]
    for row in rows:
        cells = []
        for k, cell in enumerate(row):
            cls = ' class="n"' if k in numeric else ""
            cells.append(f"<td{cls}>{cell}</td>")
        out.append("<tr>" + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    return "\n".join(out)


def geometry_text(inlet, key: str, unit: str) -> str:
    """The value of a geometry key as the analysis uses it: the fixed value, or, when ``[inlet.schedule]`` gives
    it (method §12: linear in flight Mach, ends held, the fixed key then used nowhere), the schedule in words.

    e.g. "0.46 m²" or "scheduled in flight Mach from 0.784 m² at Mach 1.6 to 0.6 m² at Mach 2.5"."""
    from engine_air.inlets.schedule import is_scheduled

    def shown(v):
        return (", ".join(f"{x:g}" for x in v) if isinstance(v, (tuple, list)) else f"{v:g}") + unit

    if not is_scheduled(inlet, key):
        return shown(getattr(inlet, key))
    mach, values = inlet.schedule.mach, getattr(inlet.schedule, key)
    return f"scheduled in flight Mach from {shown(values[0])} at Mach {mach[0]:g} to {shown(values[-1])} at Mach {mach[-1]:g}"


def inlet_text(project, escape=e) -> str:
    """The inlet in one sentence, scheduled keys by their schedule (method §12); HTML (``escape=html.escape``, the
    default) or plain text (``escape=str``)."""
    inlet = project.inlet
    text = (f"Inlet: {escape(inlet.type)}, capture {inlet.capture_area_m2:g} m², throat "
            f"{escape(geometry_text(inlet, 'throat_area_m2', ' m²'))}, face {inlet.face_area_m2:g} m², duct loss K "
            f"{inlet.duct_loss_coefficient:g}")
    if inlet.type in ("external-ramp", "mixed-compression") and inlet.ramp_angles_deg:
        text += f", ramps {escape(geometry_text(inlet, 'ramp_angles_deg', ' deg'))}"
    if inlet.type in ("external-ramp", "mixed-compression", "axisymmetric-spike"):
        text += f", shock on lip at Mach {escape(geometry_text(inlet, 'shock_on_lip_mach', ''))}"
    if getattr(inlet, "bypass_area_m2", 0.0):
        text += f", bypass doors {inlet.bypass_area_m2:g} m²"
    return text + "."


def ledger_html(project, result, worst) -> str:
    """The ledger table (``engine_air.outputs.ledger_table``) at the worst point: + and − rows adding up to the
    installed thrust, memo rows (ram drag, pre-entry drag, lip suction) apart; "no thrust data" without a table."""
    pts = result.case_map(worst.case).points
    record = point_record(pts, worst.index, worst.case)
    rating = project.rating(project.case(worst.case).rating)
    body = []
    for r in ledger_rows(record, rating.recovery_thrust_exchange):
        v = r["value"]
        sign = "=" if r["role"] == "total" else ""
        if r["role"] == "share":
            shown = num(v, 4)
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
    head = (f"<p>Case <b>{e(worst.case)}</b>, rating <b>{e(rating.name)}</b>, Mach {worst.mach:.3f}, "
            f"{worst.altitude_m:.0f} m. F_inst = F_n·(1 − X·(1 − π/π_ref)) − D_spill − D_bleed − D_bypass: the rows "
            "marked + and − add up to the installed thrust (row =); the ram drag, pre-entry drag and lip suction are "
            "shown for information (the ram drag is inside the net thrust).</p>")
    if record.get("net_thrust_n") is None:
        head += f"<p>The rating gives {e(NO_THRUST_DATA)}: no net or installed thrust (drags only).</p>"
    return head + table(["item", "", "value (N)", "how"], body, numeric=(2,))


def station_html(project, result, worst) -> str:
    """The station table at the worst point, with its regime, flags and flows."""
    pts = result.case_map(worst.case).points
    j = worst.index
    rows = station_table(project, pts, j)
    through = float(pts.mass_flow_kg_s[j]) + float(np.broadcast_to(pts.bypass_flow_kg_s, pts.mach.shape)[j])
    return (
        f"<p>At the worst point: Mach {worst.mach:.3f}, {worst.altitude_m:.0f} m, case <b>{e(worst.case)}</b>; "
        f"limiting check {e(worst.label)} ({e(worst.limit_text)}), relative margin "
        f"{worst.relative_margin:+.4f}; regime {e(REGIMES[int(pts.regime[j])])}; flags "
        f"{e(', '.join(F.names_of(int(pts.flags[j]))))}.</p>"
        + table(["station", "name", "Mach", "p (Pa)", "T (K)", "p_t (Pa)", "T_t (K)", "V (m/s)", "area (m²)"],
                [[e(r["station"]), e(r["name"]), g(r["mach"]), g(r["p_pa"], 6), g(r["t_k"]),
                  g(r["pt_pa"], 6), g(r["tt_k"]), g(r["v_m_s"]), g(r["area_m2"])] for r in rows],
                numeric=range(2, 9))
        + f"<p>Recovery {g(pts.recovery[j])} (external {g(pts.external_recovery[j])}, duct "
          f"{g(pts.duct_recovery[j])}); mass-flow ratio {g(pts.mass_flow_ratio[j])}, maximum "
          f"{g(pts.max_mass_flow_ratio[j])}; spillage fraction {g(pts.spillage_fraction[j])}; engine flow "
          f"{g(pts.mass_flow_kg_s[j])} kg/s, through the throat (engine + bypass) {g(through)} kg/s.</p>"
    )


def shock_html(project, result, worst) -> str:
    """The shock tables at the worst point and, when that is subsonic, at the worst supersonic point."""
    parts = []
    targets = [("the worst point", worst.case, worst.index, worst.mach)]
    if worst.mach <= 1.0:
        supersonic = result.inside & (np.asarray(result.mach)[None, :] > 1.0)
        best = ranking.worst_point([cm.points for cm in result.cases], supersonic)
        if best is not None:
            k = best.index
            targets.append(("the worst supersonic point", result.cases[best.case].name, k, float(result.mach[k[1]])))
    for title, case, idx, m0 in targets:
        rows = shock_table(project, result.case_map(case).points, idx)
        head = f"<h3>At {e(title)}: Mach {m0:.3f}, {result.altitude_m[idx[0]]:.0f} m, case {e(case)}</h3>"
        if not rows:
            parts.append(head + "<p>No external shock: the flight Mach number is 1 or less.</p>")
            continue
        parts.append(head + table(
            ["shock", "Mach ahead", "Mach behind", "wave angle (deg)", "p_t ratio"],
            [[e(r["kind"]), g(r["mach_ahead"]), g(r["mach_behind"]), g(r["wave_angle_deg"]),
              g(r["total_pressure_ratio"])] for r in rows], numeric=range(1, 5)))
    return "\n".join(parts)


def verdict_and_findings(project, result, units: str = "si") -> tuple[str, str]:
    """The verdict table and the findings table (each limit at its own worst point, with its mechanism)."""
    verdict_rows, finding_rows = [], []
    for s in result.summary:
        cls = "fails" if s.fails else "holds" if s.judged else "unjudged"
        word = f'<span class="{cls}">{e(s.verdict)}</span>'
        verdict_rows.append([e(s.label), e(s.limit_text), word, num(s.worst_value), num(s.worst_margin),
                             f"{100 * s.failing_share:.1f} %", str(s.judged_points)])
        regime, flags, why = finding_mechanism(project, result, s, units)
        finding_rows.append([e(s.label), word, num(s.worst_value), num(s.worst_margin), num(s.worst_mach, 3),
                             num(s.worst_altitude_m, 0), e(s.worst_case or "–"), e(regime), e(flags), e(why)])
    verdict = table(["limit", "rule", "verdict", "worst value", "worst margin", "envelope failing", "points judged"],
                    verdict_rows, numeric=(3, 4, 5, 6))
    findings = table(["limit", "verdict", "worst value", "margin", "Mach", "altitude (m)", "case", "regime", "flags",
                      "mechanism"], finding_rows, numeric=(2, 3, 4, 5))
    return verdict, findings


def banner_text(result) -> str:
    """The overall verdict (``engine_air.envelope.evaluate.verdict_text``): limits judged nowhere named apart."""
    from engine_air.envelope.evaluate import verdict_text

    return "VERDICT: " + verdict_text(result)


def _header(project, result, source_name) -> str:
    now = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    title = project.title or os.path.basename(source_name)
    cls = "holds" if result.holds else "fails"
    return f"""<header id="summary"><h1>Inlet–engine airflow review: {e(title)}</h1>
<p class="meta">Source: <code>{e(source_name)}</code> · generated {e(now)} by engine-air {e(__version__)} · the same
review as one PDF: <code>review.pdf</code></p>
{f'<p>{e(project.notes)}</p>' if project.notes else ''}
<p>{inlet_text(project)}
Cases: {e(', '.join(c.name for c in result.cases))}. Grid {len(result.mach)} Mach × {len(result.altitude_m)} altitude,
{int(result.inside.sum())} points inside the envelope per case.</p>
<div class="banner {cls}">{e(banner_text(result))}</div>
</header>"""


def _tail(project, text, notes) -> str:
    import scipy

    warnings = "".join(f"<li>{e(w)}</li>" for w in project.warnings)
    notes_html = "".join(f"<li>{e(n)}</li>" for n in notes)
    return f"""<section id="inputs"><h2>Inputs as loaded</h2>
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
<tr><th>numpy / scipy</th><td>{e(np.__version__)} / {e(scipy.__version__)}</td></tr>
<tr><th>platform</th><td>{e(sys.platform)}</td></tr>
</tbody></table>
</section>

<section id="sources"><h2>Sources of the method</h2>
<ul>{''.join(f'<li>{e(s)}</li>' for s in SOURCES)}</ul>
</section>

<section id="caution"><h2>Caution</h2>
<p class="caution">{e(CAUTION)}</p>
</section>"""


def page(project, result, worst, *, text, source_name, notes, maps_html, sections_html, units="si",
         characteristics_html: str = "") -> str:
    """The whole page (see the module text); ``worst`` is the overall worst point (``studies.sizing.worst_point``)."""
    verdict, findings = verdict_and_findings(project, result, units)
    none = "<p>No check applies at any envelope point.</p>"
    judged = worst.check is not None
    overall = (f"{e(worst.label)} ({e(worst.limit_text)}) at {e(worst.where())}, relative margin "
               f"{worst.relative_margin:+.4f}" if judged else "–")
    title = project.title or os.path.basename(source_name)
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta name="generator" content="engine-air {e(__version__)}">
<title>Review pack: {e(title)}</title><style>{CSS}</style></head>
<body>
{_header(project, result, source_name)}

<section id="verdict"><h2>Verdict per limit</h2>
{verdict}
<p>Margins are limit minus value in the quantity's own units (positive: the limit holds). The failing share counts
envelope points over all cases.</p>
</section>

<section id="findings"><h2>Findings: worst point of each limit</h2>
{findings}
<p>Overall limiting point: {overall}.</p>
</section>

<section id="maps"><h2>Maps per case and quantity</h2>
<p>Each picture shows one grid point per cell, flight Mach number across and pressure altitude up. An x (a second
cue besides colour) marks the points where the limit of the quantity shown fails (any limit, on the least-margin map
and on a quantity no limit judges). Margin maps use an orange–white–blue scale symmetric about zero (orange: the
limit fails); level maps a sequential scale from the lowest to the highest value inside the envelope. Each map
carries the envelope outline, the zero-margin line and the face static = ambient line.</p>
{maps_html}
</section>

<section id="sections"><h2>Sections</h2>
<p>Each limit's own quantity against flight Mach number and against altitude through that limit's own worst point,
one line per case (and the worst of all cases); thin dotted where the quantity is not judged.</p>
{sections_html}
</section>

<section id="characteristics"><h2>Inlet characteristics</h2>
<p>Total-pressure recovery against captured mass-flow ratio at the supersonic Mach numbers of interest (method
sections 16 and 17): from measured characteristics where the project's table covers the condition, else from the
model.</p>
{characteristics_html or "<p>No characteristic drawn.</p>"}
</section>

<section id="stations"><h2>Station table at the worst point</h2>
<p>Stations after SAE AS755: 0 free stream, 1 capture plane, th throat, 2 engine face.</p>
{station_html(project, result, worst) if judged else none}
</section>

<section id="shocks"><h2>Shock table</h2>
{shock_html(project, result, worst) if judged else none}
</section>

<section id="ledger"><h2>Installation ledger at the worst point</h2>
{ledger_html(project, result, worst) if judged else none}
</section>

{_tail(project, text, notes)}
</body></html>
"""


__all__ = ["CSS", "SECTION_IDS", "SOURCES", "banner_text", "g", "geometry_text", "inlet_text", "ledger_html", "num", "page",
           "shock_html", "station_html", "table", "verdict_and_findings"]
