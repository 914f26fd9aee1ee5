"""Pictures of inlet characteristics (method §16, §17) with matplotlib (Agg, imported on use).

One axes: recovery p_t2/p_t0 against captured mass-flow ratio, one colour per flight Mach number; the critical
point as a filled circle, the stability (buzz) boundary as a dashed vertical line where it is judged, each case's
operating point as a labelled diamond, the model's curve dotted beside a data curve, and the measured rows at
that Mach as open circles.
"""

from __future__ import annotations

import numpy as np

FIGURE_SIZE_IN = (10.0, 6.5)
DPI = 110


def draw_characteristics(ax, curves, measured=None) -> None:
    """Draw ``curves`` (a list of ``Curve``) on a matplotlib axes; ``measured``: per curve a dict of rows or None."""
    colours = ["#1f5fa8", "#c8501e", "#2e8b57", "#7a3fa0", "#b8860b", "#444444"]
    for k, curve in enumerate(curves):
        colour = colours[k % len(colours)]
        label = f"M {curve.mach:g} ({curve.source})"
        ax.plot(curve.mass_flow_ratio, curve.recovery, "-", color=colour, lw=2.0, label=label)
        if curve.model_mass_flow_ratio is not None:
            ax.plot(curve.model_mass_flow_ratio, curve.model_recovery, ":", color=colour, lw=1.5,
                    label=f"M {curve.mach:g} model")
        if np.isfinite(curve.critical_mass_flow_ratio) and np.isfinite(curve.critical_recovery):
            ax.plot([curve.critical_mass_flow_ratio], [curve.critical_recovery], "o", color=colour, ms=7)
        if curve.stability_limit_mass_flow_ratio is not None:
            ax.axvline(curve.stability_limit_mass_flow_ratio, color=colour, ls="--", lw=1.2)
            ax.annotate("buzz limit", (curve.stability_limit_mass_flow_ratio, ax.get_ylim()[0]), rotation=90,
                        va="bottom", ha="right", fontsize=9, color=colour, xycoords=("data", "axes fraction"))
        rows = measured[k] if measured else None
        if rows is not None:
            ax.plot(rows["mass_flow_ratio"], rows["recovery"], "o", mfc="none", color=colour, ms=6,
                    label=f"M {curve.mach:g} measured")
        right = max(np.nanmax(np.asarray(curve.mass_flow_ratio, float)), 1e-9)
        for (x, y), names in _coincident(curve.operating_points).items():
            ax.plot([x], [y], "D", color=colour, mec="black", ms=8)
            left = x > 0.75 * right  # near the right edge: the label goes to the left of the marker
            ax.annotate(" / ".join(names), (x, y), xytext=(-8 if left else 8, 6), textcoords="offset points",
                        fontsize=9, ha="right" if left else "left")
    ax.set_xlabel("captured mass-flow ratio A0/Ac")
    ax.set_ylabel("total-pressure recovery p_t2/p_t0")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="lower left", fontsize=9)


def _coincident(points) -> dict:
    """Operating points at the same place (to 1e-6) share one marker and one label."""
    places: dict = {}
    for point in points:
        if point["mass_flow_ratio"] is None or point["recovery"] is None:
            continue
        key = (round(point["mass_flow_ratio"], 6), round(point["recovery"], 6))
        places.setdefault(key, []).append(point["case"])
    return places


def characteristic_figure(curves, measured=None, title: str = ""):
    from matplotlib.figure import Figure

    fig = Figure(figsize=FIGURE_SIZE_IN, dpi=DPI)
    ax = fig.add_subplot(1, 1, 1)
    draw_characteristics(ax, curves, measured)
    if title:
        import textwrap

        ax.set_title("\n".join(textwrap.wrap(title, 90)), fontsize=12)
    fig.tight_layout()
    return fig


def calibration_figure(calibration, title: str = ""):
    """Measured recovery against the fitted model's, per zero-incidence curve."""
    from matplotlib.figure import Figure

    fig = Figure(figsize=(12.0, 6.0), dpi=DPI)
    ax = fig.add_subplot(1, 1, 1)
    colours = ["#1f5fa8", "#c8501e", "#2e8b57", "#7a3fa0", "#b8860b", "#444444", "#008b8b", "#8b0000"]
    for k, ((mach, mfr, rec), (x, y), info) in enumerate(zip(calibration.measured, calibration.fitted_model,
                                                               calibration.curves)):
        colour = colours[k % len(colours)]
        ax.plot(mfr, rec, "o", mfc="none", color=colour, label=f"M {info['mach']:g} measured")
        ax.plot(x, y, "-", color=colour, label=f"M {info['mach']:g} fitted (rms {info['rms_residual']:.4f})")
    ax.set_xlabel("captured mass-flow ratio A0/Ac")
    ax.set_ylabel("total-pressure recovery p_t2/p_t0")
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=8, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0)  # beside the data
    fitted = ", ".join(f"{k} = {v:.4g} ± {e:.2g}" for k, (v, e) in calibration.fitted.items())
    ax.set_title((title + "\n" if title else "") + fitted, fontsize=11)
    fig.tight_layout()
    return fig
