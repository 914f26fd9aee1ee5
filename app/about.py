"""Text of Help > About: version, the method's sources, and the caution."""

from __future__ import annotations

import html

import engine_air

from . import APPLICATION

SOURCES = [
    "U.S. Standard Atmosphere, 1976 (NOAA/NASA/USAF)",
    "NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953)",
    "MIL-E-5008B (1959), reference ram recovery",
    "SAE AS755, aircraft propulsion system performance station designation",
    "Seddon & Goldsmith, Intake Aerodynamics, 2nd ed. (1999)",
    "Mattingly, Heiser & Pratt, Aircraft Engine Design, 2nd ed. (2002)",
]


def about_html() -> str:
    items = "".join(f"<li>{html.escape(s)}</li>" for s in SOURCES)
    return (
        f"<h3>{html.escape(APPLICATION)} {html.escape(engine_air.__version__)}</h3>"
        "<p>Inlet–engine airflow match across the flight envelope: engine-face Mach number, "
        "total-pressure recovery, mass-flow ratio and spillage, throat choking, stability.</p>"
        f"<p><b>Method sources</b></p><ul>{items}</ul>"
        f"<p><b>Caution.</b> {html.escape(engine_air.CAUTION)}</p>"
    )
