"""The one schema of the project file: every table and every key once, as ``Field`` objects.

The keys every inlet type reads are listed here; the keys of one or a few inlet types are declared by the
type modules (``engine_air.inlets.*``, attribute ``fields``) and collected from the registry
(``engine_air.inlets.registry.INLET_TYPES``), so adding an inlet type adds its keys without editing this
module. The keys of ``[inlet.schedule]`` are made from the fixed ``[inlet]`` keys they schedule
(``engine_air.inlets.schedule.SCHEDULED_KEYS``): same unit and bounds, one value per schedule Mach number.

Readers: the loader and ``validate_project`` (``engine_air.project.load``), the saver (defaults are left
out), the program's editors (ranges, decimals, tooltips) and the generated file reference
(``engine_air.project.reference_doc`` → ``docs/project-file.md``).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from engine_air.spec.check_names import CHECK_NAMES
from engine_air.project.inlet_keys import DECLARED
from engine_air.project.model import REFERENCE_RECOVERY_NAME
from engine_air.project.schema_field import REQUIRED, Field

# -- limits on the size of the input (resource limits, not physics) ---------------------------------------------
MAX_FILE_BYTES = 1_048_576
"""Largest project file accepted, bytes (1 MiB)."""
MAX_AXIS_POINTS = 1001
"""Most grid points along one axis (Mach or altitude)."""
MIN_AXIS_POINTS = 2
"""Fewest grid points along one axis."""
MAX_GRID_POINTS = 250_000
"""Most grid points per case (mach_points x altitude_points)."""
MAX_CASES = 100
"""Most [[case]] tables in one file."""
MAX_CASE_POINTS = 2_000_000
"""Most grid points per case x cases evaluated together (each case-point keeps about 260 bytes:
8 cases of the largest grid, about 520 MB)."""
MAX_ENVELOPE_VERTICES = 1000
"""Most envelope polygon vertices (the crossing test is quadratic in this)."""
SUPPORTED_FORMATS = (1,)
"""Project-file format numbers this version reads and writes."""
MAX_KEY_PARTS = 64
"""Most parts of one dotted key or table name (``a.b.c`` has 3). ``tomllib`` spends time and memory
quadratic in this number: a 500 kB key of 100 000 parts would take gigabytes."""

MAX_AREA_M2 = 100.0
MAX_CORRECTED_FLOW_KG_S = 5000.0
MAX_TIP_SPEED_M_S = 1000.0
MAX_THRUST_N = 1.0e7
MAX_MACH = 6.0
MAX_RINGS = 20
"""Most equal-area rings of a rake (and entries of a stability sensitivity list)."""
MAX_STACK_UP_ITEMS = 50
"""Most named items in ``other_losses``."""
MIN_ALTITUDE_M = -5000.0
MAX_ALTITUDE_M = 84000.0


def _ramp_constants():
    from engine_air.inlets import external_ramp

    return external_ramp.MAX_RAMPS, external_ramp.MAX_RAMP_DEG, external_ramp.MAX_TOTAL_RAMP_DEG


def __getattr__(name: str):  # the ramp limits live with the ramp type; kept importable from here
    if name in ("MAX_RAMPS", "MAX_RAMP_DEG", "MAX_TOTAL_RAMP_DEG"):
        return dict(zip(("MAX_RAMPS", "MAX_RAMP_DEG", "MAX_TOTAL_RAMP_DEG"), _ramp_constants()))[name]
    raise AttributeError(name)


# -- tables --------------------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Table:
    name: str  # dotted, e.g. "engine.rating"
    array: bool  # written [[name]], one or more
    required: bool
    description: str


TABLES: tuple[Table, ...] = (
    Table("project", False, True, "the file itself: format number, title and notes"),
    Table("limits", False, True, "the limits every point of the envelope is judged against"),
    Table("limits.region.<check>", False, False,
          "where one check is judged (method section 15): one table per check that has a region, the last part of "
          "its name the check's name, one of " + ", ".join(CHECK_NAMES) + " (the names of `engine-air point --json` "
          "checks[].name). Outside the region the check is not judged at that point: no verdict, no margin, "
          "not in the least margin and not in the failing share; give mach_range, altitude_range_m or both"),
    Table("inlet", False, True, "inlet geometry and airflow management; which keys apply depends on inlet.type"),
    Table("inlet.schedule", False, False,
          "geometry scheduled against flight Mach number M0: linear between the listed Mach numbers, end values "
          "held outside them; each scheduled list has one value per schedule Mach number, and the fixed [inlet] "
          "key stays required"),
    Table("engine.rating", True, True,
          "engine ratings: corrected airflow demand against theta2 = T_t2/T_ref, optional fan tip speed and "
          "thrust table; one table per rating"),
    Table("engine.rating.stability", False, False,
          "the engine maker's surge-margin stack-up for the rating above it (method section 18, after SAE AIR1419, "
          "recalled, not copied): available margin, loss sensitivities per equal-area ring (innermost first) and "
          "the other named stack-up items; the distortion command and the surge-margin check use it"),
    Table("envelope", False, True,
          "the flight envelope as a polygon in (Mach, geopotential altitude), vertices in order, closed "
          "automatically"),
    Table("grid", False, False, "the evaluation grid over the envelope's bounding box"),
    Table("case", True, True, "the cases evaluated: an engine rating at an ISA temperature offset"),
    Table("characteristics", False, False,
          "measured or computed inlet characteristics (wind tunnel, CFD) used over the model wherever they cover "
          "a flight condition (method section 17)"),
)
TABLE_NAMES = tuple(t.name for t in TABLES)


def table(name: str) -> Table:
    for t in TABLES:
        if t.name == name:
            return t
    raise KeyError(name)


# -- the keys every inlet type (or no inlet at all) reads ------------------------------------------------------------

def _num(key, table_name, description, unit="", lo=None, hi=None, lo_open=False, hi_open=False, default=None,
         decimals=None, step=None, **kw):
    return Field(key, table_name, "number", description, unit=unit, lo=lo, hi=hi, lo_open=lo_open,
                 hi_open=hi_open, default=default, decimals=decimals, step=step, **kw)


_AREA = dict(unit="m^2", lo=0.0, hi=MAX_AREA_M2, decimals=4, step=0.01)

PROJECT_FIELDS = (
    Field("format", "project", "integer",
          "file-format number; a program refuses formats it does not know",
          lo=1, hi=max(SUPPORTED_FORMATS), default=REQUIRED, names=tuple(str(f) for f in SUPPORTED_FORMATS)),
    Field("title", "project", "text", "title of the study, shown on every output", default=""),
    Field("notes", "project", "text", "free text kept with the project", default=""),
)

LIMIT_FIELDS = (
    _num("face_mach_max", "limits", "largest engine-face Mach number M2 allowed", lo=0.0, hi=1.0, lo_open=True,
         hi_open=True, default=REQUIRED, decimals=3, step=0.01),
    _num("throat_mach_max", "limits", "largest one-dimensional throat Mach number allowed", lo=0.0, hi=1.0,
         lo_open=True, decimals=3, step=0.01),
    Field("recovery_min", "limits", "number or name",
          "least total-pressure recovery p_t2/p_t0 allowed, or the MIL-E-5008B reference recovery by name",
          lo=0.0, hi=1.0, lo_open=True, names=(REFERENCE_RECOVERY_NAME,), decimals=3, step=0.01),
    _num("stable_flow_fraction", "limits",
         "least MFR/MFR_max in subcritical supersonic operation where an oblique or conical shock stands ahead "
         "of the cowl (buzz threshold)", lo=0.0, hi=1.0, lo_open=True, hi_open=True, decimals=3, step=0.01),
    _num("relative_tip_mach_max", "limits",
         "largest fan blade relative tip Mach number allowed; needs a tip speed in the ratings",
         lo=0.0, hi=3.0, lo_open=True, hi_open=True, decimals=3, step=0.01),
    _num("spillage_fraction_max", "limits", "largest share of the capture-area flow spilled", lo=0.0, hi=1.0,
         hi_open=True, decimals=3, step=0.01),
    Field("started_required", "limits", "boolean",
          "mixed-compression inlets: every judged point must run started; absent means true for those inlets "
          "(other types always run started)"),
    _num("installation_loss_max", "limits",
         "largest installation loss (1 - installed thrust / net thrust) allowed; needs thrust data in the ratings",
         lo=0.0, hi=1.0, lo_open=True, hi_open=True, decimals=3, step=0.01),
    _num("dc60_max", "limits",
         "largest distortion descriptor DC(60) allowed (method section 18); judged where rake or characteristics "
         "data give DC(60)", lo=0.0, hi=10.0, lo_open=True, decimals=3, step=0.01),
    _num("surge_margin_min", "limits",
         "least remaining surge margin (fraction of the surge pressure ratio) after the stack-up of "
         "[engine.rating.stability]; judged where distortion data give the loss", lo=-1.0, hi=1.0, hi_open=True,
         decimals=3, step=0.01),
)

REGION_TABLE = "limits.region.<check>"
"""The schema's name of a ``[limits.region.NAME]`` table (``NAME`` a check name)."""

LIMIT_REGION_FIELDS = (
    Field("mach_range", REGION_TABLE, "number list",
          "[lowest, highest] flight Mach number where the check is judged (bounds included); absent: every Mach",
          lo=0.0, hi=MAX_MACH, length=(2, 2), order="non-decreasing", decimals=3),
    Field("altitude_range_m", REGION_TABLE, "number list",
          "[lowest, highest] geopotential altitude where the check is judged (bounds included); absent: every "
          "altitude", unit="m", lo=MIN_ALTITUDE_M, hi=MAX_ALTITUDE_M, length=(2, 2), order="non-decreasing",
          decimals=0),
)

INLET_COMMON_FIELDS = (
    Field("type", "inlet", "choice", "the inlet type; it decides which other [inlet] keys apply",
          default=REQUIRED),  # names filled from the registry by fields()
    _num("capture_area_m2", "inlet", "capture (cowl lip) area A_c, station 1", lo_open=True, default=REQUIRED,
         **_AREA),
    _num("throat_area_m2", "inlet", "geometric throat area A_th; not larger than the capture area",
         lo_open=True, default=REQUIRED, **_AREA),
    _num("face_area_m2", "inlet", "flow area at the engine face A2, hub removed", lo_open=True, default=REQUIRED,
         **_AREA),
    _num("duct_loss_coefficient", "inlet", "subsonic duct loss coefficient K on the throat dynamic pressure",
         lo=0.0, hi=2.0, default=0.0, decimals=3, step=0.005),
    _num("lip_suction_factor", "inlet", "share of the subsonic additive drag recovered as lip suction",
         lo=0.0, hi=1.0, default=0.0, decimals=3, step=0.05),
    _num("supersonic_lip_suction_factor", "inlet",
         "share of the supersonic pre-entry drag recovered as lip suction", lo=0.0, hi=1.0, default=0.0,
         decimals=3, step=0.05),
    _num("bleed_fraction", "inlet", "boundary-layer bleed flow as a share of the captured flow", lo=0.0, hi=0.5,
         hi_open=True, default=0.0, decimals=4, step=0.005),
    _num("bleed_exit_velocity_ratio", "inlet", "bleed exit velocity over the free-stream velocity", lo=0.0,
         hi=1.0, default=0.0, decimals=3, step=0.05),
    _num("bypass_area_m2", "inlet", "bypass door flow area (0: no bypass doors)", default=0.0,
         **{**_AREA, "lo": 0.0}),
    _num("bypass_discharge_coefficient", "inlet", "discharge coefficient of the bypass doors", lo=0.0, hi=1.0,
         lo_open=True, default=0.9, decimals=3, step=0.01),
    _num("bypass_exit_velocity_ratio", "inlet", "bypass exit velocity over the free-stream velocity", lo=0.0,
         hi=1.0, default=0.0, decimals=3, step=0.05),
    _num("auxiliary_inlet_area_m2", "inlet",
         "auxiliary (take-off) door flow area, open in parallel with the throat below auxiliary_door_mach_max "
         "(0: no doors)", default=0.0, **{**_AREA, "lo": 0.0}),
    _num("auxiliary_door_mach_max", "inlet", "flight Mach number above which the auxiliary doors are closed; "
         "required when auxiliary_inlet_area_m2 > 0", lo=0.0, hi=1.0, lo_open=True, decimals=3, step=0.01),
    _num("auxiliary_loss_coefficient", "inlet",
         "loss coefficient of the auxiliary door flow on its dynamic pressure", lo=0.0, hi=2.0, default=0.0,
         decimals=3, step=0.05),
)

SCHEDULE_MACH = Field(
    "mach", "inlet.schedule", "number list", "flight Mach numbers M0 of the schedule", lo=0.0, hi=MAX_MACH,
    length=(1, None), order="increasing", default=REQUIRED, decimals=3, step=0.05)

RATING_FIELDS = (
    Field("name", "engine.rating", "text", "name of the rating, unique; cases refer to it", length=(1, None),
          default=REQUIRED),
    Field("theta", "engine.rating", "number list", "engine-face total-temperature ratio theta2 = T_t2/T_ref",
          lo=0.3, hi=3.0, lo_open=True, hi_open=True, length=(1, None), order="increasing", default=REQUIRED,
          decimals=4, step=0.05),
    Field("corrected_flow_kg_s", "engine.rating", "number list", "corrected airflow demand W_c2 at each theta",
          unit="kg/s", lo=0.0, hi=MAX_CORRECTED_FLOW_KG_S, lo_open=True, length=(1, None), default=REQUIRED,
          same_length_as="theta", decimals=3, step=1.0),
    _num("fan_tip_speed_m_s", "engine.rating", "physical fan tip speed U_tip", unit="m/s", lo=0.0,
         hi=MAX_TIP_SPEED_M_S, lo_open=True, excludes=("corrected_tip_speed_m_s",), decimals=1, step=5.0),
    Field("corrected_tip_speed_m_s", "engine.rating", "number list",
          "corrected fan tip speed U_tip/sqrt(theta2) at each theta, instead of fan_tip_speed_m_s",
          unit="m/s", lo=0.0, hi=MAX_TIP_SPEED_M_S, lo_open=True, length=(1, None), same_length_as="theta",
          excludes=("fan_tip_speed_m_s",), decimals=1, step=5.0),
    Field("thrust_mach", "engine.rating", "number list", "flight Mach numbers of the net-thrust table",
          lo=0.0, hi=MAX_MACH, length=(1, None), order="increasing", requires=("thrust_altitude_m", "net_thrust_n"),
          decimals=3, step=0.05),
    Field("thrust_altitude_m", "engine.rating", "number list", "geopotential altitudes of the net-thrust table",
          unit="m", lo=MIN_ALTITUDE_M, hi=MAX_ALTITUDE_M, length=(1, None), order="increasing",
          requires=("thrust_mach", "net_thrust_n"), decimals=0, step=500.0),
    Field("net_thrust_n", "engine.rating", "number table",
          "uninstalled net thrust at the reference recovery: one row per thrust_altitude_m, one value per "
          "thrust_mach", unit="N", lo=0.0, hi=MAX_THRUST_N, lo_open=True, length=(1, None),
          same_length_as="thrust_altitude_m", row_length_as="thrust_mach", requires=("thrust_mach", "thrust_altitude_m"),
          decimals=0, step=1000.0),
    Field("thrust_reference_recovery", "engine.rating", "number or name",
          "the recovery at which net_thrust_n is quoted: a number or the MIL-E-5008B reference by name",
          lo=0.0, hi=1.0, lo_open=True, names=(REFERENCE_RECOVERY_NAME,), requires=("net_thrust_n",),
          decimals=3, step=0.01),
    _num("recovery_thrust_exchange", "engine.rating",
         "thrust exchange rate X = (dF/F)/(dp_t/p_t) from the engine maker; no default", lo=0.0, hi=10.0,
         requires=("net_thrust_n",), decimals=3, step=0.05),
)

_FRACTION = dict(lo=0.0, hi=1.0, hi_open=True, decimals=4, step=0.01)

STABILITY_FIELDS = (
    _num("available_surge_margin", "engine.rating.stability",
         "surge margin available before distortion and the other stack-up items, a fraction of the surge pressure "
         "ratio", default=REQUIRED, **_FRACTION),
    Field("circumferential_sensitivity", "engine.rating.stability", "number list",
          "KC per equal-area ring, innermost first: loss of surge pressure ratio per unit ring circumferential "
          "intensity (delta PC/P)_i", lo=0.0, hi=100.0, length=(1, MAX_RINGS), default=REQUIRED, decimals=3,
          step=0.05),
    Field("radial_sensitivity", "engine.rating.stability", "number list",
          "KR per equal-area ring, innermost first: loss of surge pressure ratio per unit ring radial intensity "
          "(delta PR/P)_i", lo=0.0, hi=100.0, length=(1, MAX_RINGS), default=REQUIRED,
          same_length_as="circumferential_sensitivity", decimals=3, step=0.05),
    Field("other_losses", "engine.rating.stability", "named numbers",
          "the other stack-up items the engine maker lists, each a fraction of the surge pressure ratio, e.g. "
          "{ tolerances = 0.04, deterioration = 0.03 }", length=(0, MAX_STACK_UP_ITEMS), default=None,
          **_FRACTION),
)

ENVELOPE_FIELDS = (
    Field("mach", "envelope", "number list", "flight Mach number of each polygon vertex", lo=0.0, hi=MAX_MACH,
          length=(3, MAX_ENVELOPE_VERTICES), default=REQUIRED, decimals=3),
    Field("altitude_m", "envelope", "number list", "geopotential altitude of each polygon vertex", unit="m",
          lo=MIN_ALTITUDE_M, hi=MAX_ALTITUDE_M, length=(3, MAX_ENVELOPE_VERTICES), same_length_as="mach",
          default=REQUIRED, decimals=0),
)

GRID_FIELDS = (
    Field("mach_points", "grid", "integer",
          f"grid points along Mach; mach_points x altitude_points at most {MAX_GRID_POINTS}",
          lo=MIN_AXIS_POINTS, hi=MAX_AXIS_POINTS, default=121),
    Field("altitude_points", "grid", "integer",
          f"grid points along altitude; mach_points x altitude_points at most {MAX_GRID_POINTS}",
          lo=MIN_AXIS_POINTS, hi=MAX_AXIS_POINTS, default=101),
)

CASE_FIELDS = (
    Field("name", "case", "text", "name of the case, unique", length=(1, None), default=REQUIRED),
    Field("rating", "case", "text", "name of the engine rating of this case (an engine.rating name)",
          length=(1, None), default=REQUIRED),
    _num("isa_offset_K", "case", "temperature offset from the standard atmosphere", unit="K", lo=-100.0,
         hi=100.0, default=0.0, decimals=1, step=1.0),
    Field("mach_range", "case", "number list",
          "[lowest, highest] flight Mach number where the case is judged (bounds included); absent: everywhere",
          lo=0.0, hi=MAX_MACH, length=(2, 2), order="non-decreasing", decimals=3),
    Field("altitude_range_m", "case", "number list",
          "[lowest, highest] geopotential altitude where the case is judged (bounds included); absent: everywhere",
          unit="m", lo=MIN_ALTITUDE_M, hi=MAX_ALTITUDE_M, length=(2, 2), order="non-decreasing", decimals=0),
    Field("angle_of_attack_deg", "case", "number or Mach table",
          "angle of attack of the inlet: a number, or { mach = [...], deg = [...] } linear in flight Mach (ends "
          "held); picks the characteristics-table curves; the model itself is at zero incidence",
          unit="deg", lo=-90.0, hi=90.0, decimals=1, step=1.0),
    Field("sideslip_deg", "case", "number or Mach table",
          "sideslip angle of the inlet: a number, or { mach = [...], deg = [...] } as angle_of_attack_deg",
          unit="deg", lo=-90.0, hi=90.0, decimals=1, step=1.0),
)

CHARACTERISTICS_FIELDS = (
    Field("file", "characteristics", "text",
          "CSV or Parquet table of characteristics (columns mach, mass_flow_ratio, recovery; optional alpha_deg, "
          "beta_deg, stable, additive_drag_coefficient, dc60, surge_margin_loss), relative to the project file",
          length=(1, None), default=REQUIRED),
)


# -- collecting the inlet types' keys ---------------------------------------------------------------------------------

def inlet_types() -> dict:
    """The registry of inlet types (``engine_air.inlets.registry.INLET_TYPES``), read at call time."""
    from engine_air.inlets.registry import INLET_TYPES

    return INLET_TYPES


def _scheduled_keys() -> tuple[str, ...]:
    from engine_air.inlets.schedule import SCHEDULED_KEYS

    return SCHEDULED_KEYS


def type_fields() -> dict[str, Field]:
    """Each type-specific ``[inlet]`` key once, with ``inlet_types`` the registered types that list it.

    A key listed by no registered type keeps the types its declaration names (``engine_air.project.inlet_keys``).
    """
    found: dict[str, Field] = {}
    owners: dict[str, list[str]] = {}
    for name, kind in inlet_types().items():
        for f in getattr(kind, "fields", ()):
            if f.key not in found:
                found[f.key] = f
            owners.setdefault(f.key, []).append(name)
    out = {key: replace(f, table="inlet", inlet_types=tuple(owners[key])) for key, f in found.items()}
    for f in DECLARED:
        out.setdefault(f.key, f)
    return out


def inlet_fields(inlet_type: str | None = None) -> tuple[Field, ...]:
    """The ``[inlet]`` keys: every key (``inlet_type=None``) or those the given type reads, in schema order."""
    types = tuple(inlet_types())
    common = tuple(replace(f, names=types) if f.key == "type" else f for f in INLET_COMMON_FIELDS)
    specific = tuple(type_fields().values())
    if inlet_type is not None:
        specific = tuple(f for f in specific if inlet_type in f.inlet_types)
    return common[:4] + specific + common[4:]


def schedule_fields(inlet_type: str | None = None) -> tuple[Field, ...]:
    """The ``[inlet.schedule]`` keys, made from the fixed keys they schedule (same bounds and unit)."""
    fixed = {f.key: f for f in inlet_fields(inlet_type)}
    out = [SCHEDULE_MACH]
    for key in _scheduled_keys():
        f = fixed.get(key)
        if f is None:
            continue
        if f.kind == "number":
            out.append(replace(f, table="inlet.schedule", kind="number list", default=None, length=(1, None),
                               description=f"{f.description}; one value per schedule Mach number",
                               same_length_as="mach", excludes=(), requires=()))
        else:
            out.append(replace(f, table="inlet.schedule", kind="number table", default=None, length=(1, None),
                               description=f"{f.description}; one row per schedule Mach number, each row as "
                                           f"long as inlet.{key}",
                               same_length_as="mach", row_length_as=f"inlet.{key}", excludes=(), requires=()))
    return tuple(out)


def fields(table_name: str, inlet_type: str | None = None) -> tuple[Field, ...]:
    """The keys of one table; for ``inlet`` and ``inlet.schedule`` those of ``inlet_type`` (all when None)."""
    if table_name == "inlet":
        return inlet_fields(inlet_type)
    if table_name == "inlet.schedule":
        return schedule_fields(inlet_type)
    return {
        "project": PROJECT_FIELDS,
        "limits": LIMIT_FIELDS,
        REGION_TABLE: LIMIT_REGION_FIELDS,
        "engine.rating": RATING_FIELDS,
        "engine.rating.stability": STABILITY_FIELDS,
        "envelope": ENVELOPE_FIELDS,
        "grid": GRID_FIELDS,
        "case": CASE_FIELDS,
        "characteristics": CHARACTERISTICS_FIELDS,
    }[table_name]


def all_fields() -> tuple[Field, ...]:
    """Every key of the project file once, table by table in file order."""
    return tuple(f for t in TABLES for f in fields(t.name))


def field(path: str, inlet_type: str | None = None) -> Field:
    """The key at ``path`` (e.g. ``inlet.throat_area_m2``, ``engine.rating.theta``); ``KeyError`` otherwise."""
    table_name, _, key = path.rpartition(".")
    for f in fields(table_name, inlet_type):
        if f.key == key:
            return f
    raise KeyError(path)


def subtables(table_name: str) -> tuple[str, ...]:
    """Names of the tables directly below ``table_name`` (``inlet`` → ``schedule``, ``limits`` → ``region``)."""
    prefix = table_name + "."
    below = (t.name[len(prefix):].partition(".")[0] for t in TABLES if t.name.startswith(prefix))
    return tuple(dict.fromkeys(below))


def suggestion(name: str, candidates) -> str | None:
    """The closest known name to a mistyped one (``difflib``), or None."""
    candidates = list(candidates)
    lowered = {c.lower(): c for c in candidates}
    if str(name).lower() in lowered:
        return lowered[str(name).lower()]
    import difflib  # only when a name is wrong (start-up time)

    close = difflib.get_close_matches(str(name), candidates, n=1, cutoff=0.6)
    return close[0] if close else None
