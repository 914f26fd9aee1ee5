"""The review pack's inlet characteristics (method §16, §17): one figure per supersonic Mach number of interest.

Mach numbers of interest, supersonic only, at most ``MOST``: the worst point of each failing limit, the inlet's
shock-on-lip (design) Mach number, and the envelope's highest Mach number. Each figure shows recovery against
mass-flow ratio from the data where a characteristics table covers the condition (the model dotted beside), else
from the model, with the critical point, the stability (buzz) boundary and every case's operating point, at the
altitude of the point that made the Mach number interesting (the curve itself does not depend on altitude,
§16; the operating points do).
"""

from __future__ import annotations

import html

import numpy as np

MOST = 4
e = html.escape


def machs_of_interest(project, result) -> list[tuple[float, float, str]]:
    """(Mach, altitude m, why) of each figure, supersonic only, by Mach number, duplicates (to 0.01) dropped."""
    from engine_air.envelope.polygon import polygon_contains

    picks = []
    for s in result.summary:
        if s.fails and s.worst_case and np.isfinite(s.worst_mach) and s.worst_mach > 1.0:
            picks.append((float(s.worst_mach), float(s.worst_altitude_m), f"worst point of “{s.label}”"))
    env = project.envelope
    heights = np.asarray(result.altitude_m, float)

    def middle_altitude(mach):
        inside = polygon_contains(env.mach, env.altitude_m, np.full(heights.shape, mach), heights)
        return float(np.median(heights[inside])) if inside.any() else float(np.median(heights))

    design = project.inlet.shock_on_lip_mach
    if design is not None and design > 1.0 and design <= max(env.mach):
        picks.append((float(design), middle_altitude(design), "the design (shock-on-lip) Mach number"))
    top = float(max(env.mach))
    if top > 1.0:
        picks.append((top, middle_altitude(top * (1.0 - 1e-9)), "the envelope's highest Mach number"))
    chosen: list[tuple[float, float, str]] = []
    for mach, altitude, why in picks:
        if all(abs(mach - m) >= 0.01 for m, _, _ in chosen):
            chosen.append((mach, altitude, why))
    return sorted(chosen[:MOST])


def write_characteristics(out, project, result, book, steps):
    """The characteristic figures; returns (paths, relative names written, HTML)."""
    from engine_air.envelope.characteristic import characteristic_at, measured_rows
    from engine_air.outputs.characteristic_picture import characteristic_figure
    from engine_air.outputs.pictures import figure_png

    picks = machs_of_interest(project, result)
    if not picks:
        return [], [], "<p>The envelope has no supersonic point: no characteristic is drawn.</p>"
    out.subfolder("characteristics")
    case = project.cases[0]
    paths, written, parts = [], [], []
    for mach, altitude, why in picks:
        steps.check()
        curve = characteristic_at(project, case, mach, altitude)
        title = f"Characteristic at Mach {mach:.2f}, {altitude:.0f} m ({why}); source: {curve.source}"
        png = figure_png(characteristic_figure([curve], [measured_rows(project, mach, case)], title))
        book.picture(png)
        name = f"mach_{mach:.2f}.png".replace(".", "_", 1)
        paths.append(out.write(f"characteristics/{name}", png))
        written.append(f"characteristics/{name}")
        import base64

        data = base64.b64encode(png).decode("ascii")
        source = ("measured characteristics (the model dotted beside)" if curve.source == "data"
                  else "the model (no characteristics table covers this condition)")
        parts.append(
            f'<figure id="characteristic-{e(name)}"><img alt="{e(title)}" src="data:image/png;base64,{data}">'
            f"<figcaption>Recovery against captured mass-flow ratio at Mach {mach:.2f}, {altitude:.0f} m, "
            f"{e(why)}: from {e(source)}; filled circle the critical point, dashed line the stability (buzz) "
            f"boundary where it is judged, diamonds the operating point of each case. File: "
            f"<code>characteristics/{e(name)}</code>.</figcaption></figure>")
        steps.tick()
    return paths, written, f"<div class=\"maps\">{''.join(parts)}</div>"


__all__ = ["MOST", "machs_of_interest", "write_characteristics"]
