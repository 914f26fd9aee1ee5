"""Design answers for one design variable: the feasible range and an optimum inside it.

A *design variable* is one number of the inlet that the designer chooses:

==========================  =====  ==============================================
name                        unit   meaning
==========================  =====  ==============================================
``capture_area_m2``         m^2    capture (highlight) area A_c, station 1
``throat_area_m2``          m^2    inlet throat area A_th
``face_area_m2``            m^2    engine-face flow area A_2 (hub removed)
``duct_loss_coefficient``   -      K of the duct loss pi_duct = 1 - K q2/p_t2
``ramp_angles_deg[k]``      deg    deflection of ramp k (k = 1..n), ramp inlets
``shock_on_lip_mach``       -      shock-on-lip design Mach number, ramp inlets
``bleed_fraction``          -      bleed b, fraction of the captured flow
``bypass_area_m2``          m^2    bypass door area (supersonic flight)
``auxiliary_inlet_area_m2`` m^2    auxiliary take-off door area
``schedule.KEY[i]``         (KEY)  row i (1..n) of ``[inlet.schedule]`` KEY: ``throat_area_m2``,
                                   ``shock_on_lip_mach``, ``bleed_fraction``
``schedule.ramp_angles_deg[i][k]`` deg  ramp k of schedule row i
==========================  =====  ==============================================

``with_design_value(project, variable, value)`` makes the edited project and
validates it with the project-file rules (``ProjectError`` for a value out of
rule, e.g. a throat larger than the capture area).

``feasible_range(project, variable, lower, upper)`` answers "for which values
does every limit hold at every envelope point of every case?". It uses the
*worst relative margin*

    g(v) = min over cases c, envelope points (M0, H), checks k of  m_k / |L_k|

(``m_k`` the check's margin in its own units, ``L_k`` its limit; a choked face or
throat counts as -1 or less), so that g(v) >= 0 exactly when every limit holds.
g is scanned at ``scan_points`` evenly spaced values (each one full vectorised
envelope evaluation), and every change between feasible and infeasible
neighbours is refined by ``scipy.optimize.brentq`` on g, then closed by
bisection, to a bracket narrower than ``rtol`` (1e-6) times the value. Each end of
a feasible interval names the limit and the point (Mach, altitude, case) that
fails just beyond it. A feasible interval narrower than the scan spacing can be
missed: raise ``scan_points`` when that matters.

``feasible_range(..., limits=[...])`` judges only the named checks (``point --json``
``checks[].name``), e.g. ``["face-mach"]`` for a capture area that no other limit
should empty; every check is judged only inside its region (method section 15).
The answer names, per judged limit, the end of the feasible range it bounds
(``SizingResult.limit_ends``).

``optimise(project, variable, objective, at, within)`` minimises a figure inside
the feasible range with ``scipy.optimize.minimize_scalar(method="bounded")``,
and also tries the interval's ends (a monotone figure is best at an end).
Objectives: ``"spillage_fraction"``, ``"additive_drag_coefficient"``,
``"spillage_drag_coefficient"`` at a named point ``at = (mach, altitude_m, case)``,
or ``"-worst_margin"`` (maximise g over the whole envelope).

Worked example (checked in the tests): a pitot inlet with generous capture and
throat areas whose engine demands at most W_c2 = 100 kg/s, and a face Mach limit
of 0.4. The face Mach follows from the corrected flow per unit face area alone
(method section 3): MFP(0.4) p_ref / sqrt(T_ref) = 151.708920543 kg/(s m^2), so the
smallest face area is A_2 = 100 / 151.708920543 = 0.65916 m^2::

    >>> from engine_air.project import project_from_dict
    >>> project = project_from_dict({
    ...     "project": {"format": 1, "title": "worked example"},
    ...     "limits": {"face_mach_max": 0.4},
    ...     "inlet": {"type": "pitot", "capture_area_m2": 5.0, "throat_area_m2": 4.5,
    ...               "face_area_m2": 1.0, "duct_loss_coefficient": 0.0},
    ...     "engine": {"rating": [{"name": "max", "theta": [0.8, 1.2],
    ...                            "corrected_flow_kg_s": [100.0, 100.0]}]},
    ...     "envelope": {"mach": [0.2, 0.8, 0.8, 0.2],
    ...                  "altitude_m": [0.0, 0.0, 10000.0, 10000.0]},
    ...     "grid": {"mach_points": 9, "altitude_points": 7},
    ...     "case": [{"name": "std", "rating": "max"}]})
    >>> r = feasible_range(project, "face_area_m2", 0.3, 1.5)
    >>> low = r.intervals[0].lower
    >>> print(f"{low.value:.5f} m^2, bounded by {low.check}")
    0.65916 m^2, bounded by face-mach
"""


from engine_air.studies.sizing.feasible import (
    DEFAULT_SCAN_POINTS,
    MAX_SCAN_POINTS,
    MIN_SCAN_POINTS,
    RTOL,
    Bound,
    Interval,
    SizingResult,
    WorstPoint,
    feasible_range,
    worst_margin,
    worst_point,
)
from engine_air.studies.sizing.limit_choice import chosen_limits, judged_by, project_check_names
from engine_air.studies.sizing.optimum import (
    OBJECTIVES,
    POINT_OBJECTIVES,
    OptimumResult,
    optimise,
    point_objective,
    resolve_point,
)
from engine_air.studies.sizing.variables import (
    AIRFLOW_VARIABLES,
    AREA_VARIABLES,
    COMMON_VARIABLES,
    AllowedRange,
    allowed_range,
    default_search_range,
    design_value,
    design_variables,
    finite_number,
    is_valid,
    parse_variable,
    variable_label,
    variable_unit,
    with_design_value,
    with_design_values,
)

__all__ = [
    "AIRFLOW_VARIABLES", "AREA_VARIABLES", "COMMON_VARIABLES", "DEFAULT_SCAN_POINTS", "MAX_SCAN_POINTS", "MIN_SCAN_POINTS", "OBJECTIVES",
    "POINT_OBJECTIVES", "RTOL", "AllowedRange", "Bound", "Interval", "OptimumResult", "SizingResult", "WorstPoint",
    "allowed_range", "chosen_limits", "default_search_range", "judged_by", "project_check_names", "design_value", "design_variables", "feasible_range", "finite_number",
    "is_valid", "optimise", "parse_variable", "point_objective", "resolve_point", "variable_label", "variable_unit",
    "with_design_value", "with_design_values", "worst_margin", "worst_point",
]
