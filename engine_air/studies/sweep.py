"""Trade sweeps: a full factorial grid of 1 to 4 design variables, every variant over the whole envelope.

``sweep(project, {"capture_area_m2": [...], "face_area_m2": [...]})`` builds every
combination of the given values (the last variable varies fastest), sets them
with ``engine_air.studies.sizing.with_design_values``, evaluates each variant with
``engine_air.envelope.evaluate.evaluate_project`` over the envelope grid for every case,
and keeps one ``SweepRow`` per variant:

- the values, the verdict (``"holds"``, ``"fails"``, or ``"invalid"`` when the
  combination breaks a project-file rule, e.g. a throat larger than the capture
  area: ``message`` says which),
- the worst relative margin over every check, envelope point and case (as in
  ``engine_air.studies.sizing.worst_point``; >= 0 exactly when every limit holds), its
  check and its point,
- the worst face Mach margin (limit - M2, least over the envelope and cases),
- the limits that fail somewhere,
- the spillage fraction at a named cruise point ``cruise = (mach, altitude_m,
  case)`` when one is given (NaN otherwise, or where it is not defined).

Execution
---------
- Locally (default) on all cores: ``concurrent.futures.ProcessPoolExecutor``
  (``forkserver`` start method where available, else ``spawn``, so a GUI's
  threads are never forked). Each task receives the project as its TOML text
  (``dumps_project``) and a chunk of variants, and the characteristics read with it
  (method §17; plain arrays) when it has a table: nothing is read from files and no
  project object is pickled. ``workers=1`` runs in this process.
- On a dask.distributed cluster when ``scheduler`` is given: an address such as
  ``"tcp://127.0.0.1:8786"`` (a ``distributed.Client`` is opened and closed) or an
  existing ``Client``. The same chunks go through ``Client.map`` (the characteristics
  scattered to the workers once). Every worker must be able to import ``engine_air``.

Both paths run ``run_chunk``, so a variant's row equals ``variant_row`` of the
single-map evaluation of the same inputs exactly, whichever path ran it.

``progress(fraction)`` is called as chunks finish; ``cancelled()`` is polled
between them (every 0.1 s locally) and ``engine_air.envelope.evaluate.Cancelled`` raised.

Size limit
----------
The sweep size is checked before anything is allocated or started:
variants <= ``MAX_VARIANTS`` (20 000) and variants x grid points per case x cases
<= ``MAX_POINT_EVALUATIONS`` (1e8, about a minute on one core). A larger sweep
raises ``ProjectError`` (a ``ValueError``) saying by how much; coarsen the
variable steps or the project's grid.

Example::

    r = sweep(p, {"capture_area_m2": np.linspace(0.4, 0.8, 5), "throat_area_m2": [0.3, 0.35, 0.4]},
              cruise=(0.8, 11000.0, None))
    for row in r.rows: print(row.values, row.verdict, row.worst_relative_margin)
"""

from __future__ import annotations

import asyncio
import dataclasses
import functools
import math
import multiprocessing
import os
import time
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from dataclasses import dataclass, field
from typing import Callable, Mapping, Sequence

import numpy as np

from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import Cancelled, MapResult, evaluate_project
from engine_air.envelope.conditions import evaluate_conditions
from engine_air.project.model import Project
from engine_air.project import dumps_project, project_from_dict
from engine_air.studies.sizing import parse_variable, resolve_point, variable_unit, with_design_values, worst_point

MAX_VARIABLES = 4
MAX_VALUES_PER_VARIABLE = 1001
MAX_VARIANTS = 20_000
"""Most variants in one sweep."""
MAX_POINT_EVALUATIONS = 100_000_000
"""Most variants x grid points per case x cases in one sweep."""
MAX_CHUNK = 32
VERDICTS = ("holds", "fails", "invalid")


@dataclass(frozen=True)
class SweepRow:
    """One variant's summary (see the module text); SI units, margins dimensionless."""

    index: tuple[int, ...]
    values: tuple[float, ...]
    verdict: str
    worst_relative_margin: float
    worst_check: str | None
    worst_label: str
    worst_mach: float
    worst_altitude_m: float
    worst_case: str
    worst_face_mach_margin: float
    failing_limits: tuple[str, ...]
    cruise_spillage_fraction: float
    message: str = ""

    @property
    def holds(self) -> bool:
        return self.verdict == "holds"


@dataclass
class SweepResult:
    variables: tuple[str, ...]
    axes: tuple[tuple[float, ...], ...]
    rows: list[SweepRow]
    cruise: tuple | None
    mode: str  # "in-process" | "local" | "dask"
    workers: int
    seconds: float
    grid_points: int
    cases: int
    notes: list[str] = field(default_factory=list)

    @property
    def shape(self) -> tuple[int, ...]:
        return tuple(len(a) for a in self.axes)

    @property
    def holds(self) -> bool:
        """True when every variant holds every limit."""
        return all(r.holds for r in self.rows)

    def count(self, verdict: str) -> int:
        return sum(1 for r in self.rows if r.verdict == verdict)

    def grid(self, name: str = "worst_relative_margin") -> np.ndarray:
        """A numeric field of every row as an array of the sweep's shape (NaN for invalid variants)."""
        values = np.array([np.nan if r.verdict == "invalid" else float(getattr(r, name)) for r in self.rows])
        return values.reshape(self.shape)

    def best(self) -> SweepRow | None:
        """The valid variant with the largest worst relative margin."""
        valid = [r for r in self.rows if r.verdict != "invalid"]
        return max(valid, key=lambda r: r.worst_relative_margin) if valid else None


# -- inputs ------------------------------------------------------------------------

def parse_vary(text: str) -> tuple[str, tuple[float, ...]]:
    """``"V=lo:hi:n"`` -> (V, n evenly spaced values from lo to hi inclusive); ``"V=x"`` -> (V, (x,)).

    Also ``"V=a,b,c"`` for explicit values. Raises ProjectError for anything else.
    """
    name, sep, spec = str(text).partition("=")
    name, spec = name.strip(), spec.strip()
    if not sep or not name or not spec:
        raise ProjectError(None, "--vary", text, "must be written VARIABLE=lo:hi:n, e.g. capture_area_m2=0.4:0.8:5")
    try:
        if ":" in spec:
            parts = spec.split(":")
            if len(parts) != 3:
                raise ValueError
            lo, hi, n = float(parts[0]), float(parts[1]), int(parts[2])
            if not (math.isfinite(lo) and math.isfinite(hi)) or not 1 <= n <= MAX_VALUES_PER_VARIABLE:
                raise ValueError
            if n == 1 and lo != hi:
                raise ValueError
            values = tuple(float(v) for v in np.linspace(lo, hi, n))
        else:
            values = tuple(float(v) for v in spec.split(","))
            if not all(math.isfinite(v) for v in values):
                raise ValueError
    except ValueError:
        raise ProjectError(None, "--vary", text,
                           f"must be VARIABLE=lo:hi:n with finite lo, hi and a whole n from 1 to "
                           f"{MAX_VALUES_PER_VARIABLE} (n = 1 needs lo = hi), or VARIABLE=a,b,c") from None
    return name, values


def _axes(project: Project, variables) -> tuple[tuple[str, ...], tuple[tuple[float, ...], ...]]:
    items = list(variables.items()) if isinstance(variables, Mapping) else list(variables)
    if not 1 <= len(items) <= MAX_VARIABLES:
        raise ProjectError(None, "variables", [n for n, _ in items], f"a sweep varies 1 to {MAX_VARIABLES} design variables")
    names, axes = [], []
    for name, values in items:
        parse_variable(project, name)
        if name in names:
            raise ProjectError(None, "variables", name, "each design variable may be varied once")
        vals = np.asarray(values, dtype=float).ravel()
        if not 1 <= vals.size <= MAX_VALUES_PER_VARIABLE:
            raise ProjectError(None, name, vals.size, f"must have 1 to {MAX_VALUES_PER_VARIABLE} values")
        if not np.all(np.isfinite(vals)):
            raise ProjectError(None, name, vals.tolist(), "values must be finite numbers")
        names.append(name)
        axes.append(tuple(float(v) for v in vals))
    return tuple(names), tuple(axes)


def check_size(n_variants: int, grid_points: int, cases: int) -> None:
    """Raise ProjectError when a sweep is larger than the documented limits."""
    total = n_variants * grid_points * cases
    if n_variants > MAX_VARIANTS:
        raise ProjectError(None, "sweep", n_variants,
                           f"{n_variants} variants; at most {MAX_VARIANTS} are allowed in one sweep: use fewer values "
                           "per variable")
    if total > MAX_POINT_EVALUATIONS:
        raise ProjectError(None, "sweep", total,
                           f"{n_variants} variants x {grid_points} grid points x {cases} cases = {total} point "
                           f"evaluations; at most {MAX_POINT_EVALUATIONS:.0e} are allowed: use fewer values or a "
                           "coarser grid")


# -- one variant ---------------------------------------------------------------------

def cruise_spillage(project: Project, cruise) -> float:
    """Spillage fraction (-) at ``cruise = (mach, altitude_m, case)``; NaN without a point or where undefined."""
    if cruise is None:
        return math.nan
    mach, alt, case = resolve_point(project, cruise)
    pts = evaluate_conditions(project, project.case(case), np.array([mach]), np.array([alt]))
    return float(pts.spillage_fraction[0])


def variant_row(result: MapResult, index: tuple[int, ...], values: tuple[float, ...], cruise=None) -> SweepRow:
    """The sweep row of one evaluated variant (``result`` from ``evaluate_project``)."""
    w = worst_point(result)
    face = math.inf
    for cm in result.cases:
        chk = cm.points.check("face-mach")
        judged = chk.applies & result.inside
        if judged.any():
            face = min(face, float(np.min(chk.margin[judged])))
    failing = tuple(s.name for s in result.summary if s.fails)
    return SweepRow(
        index=tuple(int(i) for i in index), values=tuple(float(v) for v in values),
        verdict="holds" if result.holds else "fails", worst_relative_margin=w.relative_margin,
        worst_check=w.check, worst_label=w.label, worst_mach=w.mach, worst_altitude_m=w.altitude_m,
        worst_case=w.case, worst_face_mach_margin=face if math.isfinite(face) else math.nan,
        failing_limits=failing, cruise_spillage_fraction=cruise_spillage(result.project, cruise),
    )


def _invalid_row(index, values, message: str) -> SweepRow:
    nan = math.nan
    return SweepRow(tuple(int(i) for i in index), tuple(float(v) for v in values), "invalid", nan, None, "", nan, nan,
                    "", nan, (), nan, message)


@functools.lru_cache(maxsize=1)  # a worker reads each sweep's project once
def _base_project(project_toml: str) -> Project:
    from engine_air.project.load import tomllib  # tomli on Python 3.10

    return project_from_dict(tomllib.loads(project_toml))


def run_chunk(project_toml: str, variables: tuple[str, ...], chunk: Sequence[tuple[tuple[int, ...], tuple[float, ...]]],
              cruise=None, case_names=None, characteristics=None) -> list[SweepRow]:
    """Evaluate a chunk of variants of the project given as TOML text (the task both paths run);
    ``characteristics``: the curves its table holds (``Project.characteristics``; the text only names the file)."""
    base = _base_project(project_toml)
    if characteristics is not None:
        base = dataclasses.replace(base, characteristics=characteristics)
    rows = []
    for index, values in chunk:
        try:
            variant = with_design_values(base, dict(zip(variables, values)))
        except ProjectError as exc:
            rows.append(_invalid_row(index, values, str(exc)))
            continue
        rows.append(variant_row(evaluate_project(variant, case_names), index, values, cruise))
    return rows


# -- execution -------------------------------------------------------------------

def _context():
    methods = multiprocessing.get_all_start_methods()
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(["engine_air.studies.sweep"])
        return ctx
    return multiprocessing.get_context("spawn")


def _run_local(text, variables, chunks, cruise, case_names, workers, on_chunk, cancelled, data=None) -> None:
    ex = ProcessPoolExecutor(max_workers=workers, mp_context=_context())
    stop = False
    try:
        futures = {ex.submit(run_chunk, text, variables, chunk, cruise, case_names, data): i
                   for i, chunk in enumerate(chunks)}
        pending = set(futures)
        while pending:
            done, pending = wait(pending, timeout=0.1, return_when=FIRST_COMPLETED)
            for f in done:
                on_chunk(futures[f], f.result())
            if pending and cancelled is not None and cancelled():
                stop = True
                for f in pending:
                    f.cancel()
                raise Cancelled()
    finally:
        ex.shutdown(wait=not stop, cancel_futures=True)


class SchedulerError(RuntimeError):
    """The dask.distributed scheduler cannot be used: unreachable, silent, not speaking the protocol, too slow.

    The message is one line naming the address and what went wrong."""


SCHEDULER_SCHEMES = ("tcp", "tls")
MAX_HANDSHAKE_BYTES = 16 * 1024 * 1024


def parse_scheduler(address: str) -> tuple[str, str, int]:
    """``"tcp://HOST:PORT"`` (or ``tls://``, or ``HOST:PORT`` meaning tcp) -> (scheme, host, port).

    Raises ``ProjectError`` for anything else, before any work is started.

    >>> parse_scheduler("tcp://127.0.0.1:8786")
    ('tcp', '127.0.0.1', 8786)
    >>> parse_scheduler("[::1]:8786")
    ('tcp', '::1', 8786)
    """
    allowed = "must be tcp://HOST:PORT (or tls://HOST:PORT, or HOST:PORT) with a port from 1 to 65535"
    text = str(address).strip()
    scheme, sep, rest = text.partition("://")
    if not sep:
        scheme, rest = "tcp", text
    scheme = scheme.lower()
    if scheme not in SCHEDULER_SCHEMES or not rest or any(ch.isspace() or not ch.isprintable() for ch in rest):
        raise ProjectError(None, "--scheduler", address, allowed)
    rest = rest.rstrip("/")
    if rest.startswith("["):
        host, bracket, port_text = rest[1:].partition("]")
        if not bracket or not port_text.startswith(":"):
            raise ProjectError(None, "--scheduler", address, allowed)
        port_text = port_text[1:]
    else:
        host, colon, port_text = rest.rpartition(":")
        if not colon or ":" in host or "/" in host or "/" in port_text:
            raise ProjectError(None, "--scheduler", address, allowed)
    if not host or not port_text.isdigit() or not 1 <= int(port_text) <= 65535:
        raise ProjectError(None, "--scheduler", address, allowed)
    return scheme, host, int(port_text)


def _recv_exactly(sock, n: int, received: list) -> bytes:
    """``n`` bytes from ``sock``; ``received[0]`` counts every byte received so far (kept on a timeout)."""
    if not received:
        received.append(0)
    chunks, got = [], 0
    while got < n:
        part = sock.recv(min(n - got, 1 << 20))
        if not part:
            raise ConnectionError("closed the connection")
        chunks.append(part)
        got += len(part)
        received[0] += len(part)
    return b"".join(chunks)


def probe_scheduler(address: str, timeout: float) -> None:
    """Connect to a tcp:// scheduler and read its first message within ``timeout`` seconds each.

    A dask.distributed server greets every new connection with a framed message
    (8-byte little-endian length, then a frame count and frame lengths). Raises
    ``SchedulerError`` when the connection is refused or times out, when nothing
    arrives in time, or when what arrives is not such a message.
    """
    import socket
    import struct

    scheme, host, port = parse_scheduler(address)
    if scheme != "tcp":
        return
    try:
        sock = socket.create_connection((host, port), timeout=timeout)
    except socket.timeout:
        raise SchedulerError(f"scheduler {address}: no connection within {timeout:g} s") from None
    except OSError as exc:
        raise SchedulerError(f"scheduler {address}: cannot connect ({exc.strerror or exc})") from None
    received = []
    try:
        sock.settimeout(timeout)
        try:
            head = _recv_exactly(sock, 8, received)
            (size,) = struct.unpack("<Q", head)
            if not 16 <= size <= MAX_HANDSHAKE_BYTES:
                raise ValueError
            body = _recv_exactly(sock, size, received)
            (frames,) = struct.unpack("<Q", body[:8])
            if not 1 <= frames <= 1000 or 8 * (frames + 1) > size:
                raise ValueError
        except socket.timeout:
            if received and received[0]:
                raise SchedulerError(f"scheduler {address}: answered with something that is not the dask.distributed "
                                     f"protocol (an incomplete message, then nothing for {timeout:g} s)") from None
            raise SchedulerError(f"scheduler {address}: connected, but no answer within {timeout:g} s "
                                 "(is it a dask.distributed scheduler?)") from None
        except (ValueError, struct.error):
            raise SchedulerError(f"scheduler {address}: answered with something that is not the dask.distributed "
                                 "protocol (garbage); check the address and port") from None
        except OSError as exc:
            what = "closed the connection" if isinstance(exc, ConnectionError) and not exc.errno else \
                (exc.strerror or str(exc))
            raise SchedulerError(f"scheduler {address}: the connection failed while waiting for its answer "
                                 f"({what})") from None
    finally:
        sock.close()


def _run_dask(text, variables, chunks, cruise, case_names, scheduler, on_chunk, cancelled, timeout, data=None) -> None:
    from distributed import Client, wait as dask_wait

    own = isinstance(scheduler, str)
    if own:
        probe_scheduler(scheduler, timeout)
        try:
            client = Client(scheduler, timeout=f"{timeout}s", set_as_default=False)
        except (OSError, TimeoutError) as exc:
            raise SchedulerError(f"scheduler {scheduler}: cannot open a client within {timeout:g} s "
                                 f"({type(exc).__name__})") from None
        except (MemoryError, ValueError, TypeError) as exc:
            raise SchedulerError(f"scheduler {scheduler}: answered with something that is not the dask.distributed "
                                 f"protocol ({type(exc).__name__})") from None
    else:
        client = scheduler
    try:
        if data is not None:  # sent once to every worker, not with each task
            data = client.scatter(data, broadcast=True)
        futures = client.map(run_chunk, [text] * len(chunks), [variables] * len(chunks), list(chunks),
                             [cruise] * len(chunks), [case_names] * len(chunks), [data] * len(chunks), pure=False)
        order = {f.key: i for i, f in enumerate(futures)}
        pending = set(futures)
        while pending:
            try:
                with client.as_current():
                    done, pending = dask_wait(list(pending), timeout=timeout, return_when="FIRST_COMPLETED")
            except (TimeoutError, asyncio.TimeoutError):
                client.cancel(list(pending))
                raise SchedulerError(f"scheduler {getattr(client, 'scheduler', None) and client.scheduler.address}: "
                                     f"no result within {timeout:g} s ({len(pending)} of {len(futures)} tasks "
                                     "outstanding); raise --timeout or check the workers") from None
            pending = set(pending)
            for fut in done:
                if cancelled is not None and cancelled():
                    client.cancel(futures)
                    raise Cancelled()
                on_chunk(order[fut.key], fut.result())
    finally:
        if own:
            client.close()


def sweep(
    project: Project,
    variables: Mapping[str, Sequence[float]] | Sequence[tuple[str, Sequence[float]]],
    *,
    cruise: tuple | None = None,
    case_names: list[str] | None = None,
    workers: int | None = None,
    scheduler=None,
    chunk_size: int | None = None,
    progress: Callable[[float], None] | None = None,
    cancelled: Callable[[], bool] | None = None,
    timeout: float = 30.0,
) -> SweepResult:
    """Evaluate every combination of ``variables``' values over the envelope (see the module text).

    Parameters
    ----------
    variables : mapping or sequence of (name, values)
        1 to 4 design variables of ``engine_air.studies.sizing`` and their values (SI).
    cruise : (mach, altitude_m, case) or None
        Named point for the spillage column (case None: the first case).
    case_names : list of str, optional
        Judge only these cases (default every case).
    workers : int, optional
        Local processes (default: every core, at most one per chunk); 1 runs here.
    scheduler : str or distributed.Client, optional
        Run on this dask.distributed cluster instead.
    chunk_size : int, optional
        Variants per task (default: about four tasks per worker, at most 32).
    timeout : float
        Seconds allowed (cluster only) for connecting, for the scheduler's first
        answer and for each result; past it ``SchedulerError`` says which.
        A scheduler address is parsed before any work (``ProjectError``).
    """
    t0 = time.perf_counter()
    if isinstance(scheduler, str):
        parse_scheduler(scheduler)
    if isinstance(timeout, bool) or not isinstance(timeout, (int, float)) or not (0 < timeout < math.inf):
        raise ProjectError(None, "timeout", timeout, "must be a number of seconds above 0")
    timeout = float(timeout)
    names, axes = _axes(project, variables)
    shape = tuple(len(a) for a in axes)
    n = math.prod(shape)
    n_cases = len(project.cases) if case_names is None else len(case_names)
    if case_names is not None:
        unknown = set(case_names) - {c.name for c in project.cases}
        if unknown:
            raise ProjectError(None, "case_names", sorted(unknown), "must name cases of the project")
    grid_points = project.grid.mach_points * project.grid.altitude_points
    check_size(n, grid_points, n_cases)
    if cruise is not None:
        cruise = resolve_point(project, cruise)
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, int) or workers < 1):
        raise ProjectError(None, "workers", workers, "must be a whole number of 1 or more")
    cpu = os.cpu_count() or 1
    want = workers or cpu
    if chunk_size is None:
        chunk_size = max(1, min(MAX_CHUNK, math.ceil(n / (4 * want))))
    elif isinstance(chunk_size, bool) or not isinstance(chunk_size, int) or chunk_size < 1:
        raise ProjectError(None, "chunk_size", chunk_size, "must be a whole number of 1 or more")
    variants = [(idx, tuple(axes[k][i] for k, i in enumerate(idx))) for idx in np.ndindex(*shape)]
    chunks = [variants[i:i + chunk_size] for i in range(0, n, chunk_size)]
    text, data = dumps_project(project), project.characteristics
    results: list[list[SweepRow] | None] = [None] * len(chunks)
    done = [0]

    def on_chunk(i, rows):
        results[i] = rows
        done[0] += len(rows)
        if progress is not None:
            progress(done[0] / n)

    if scheduler is not None:
        mode, used = "dask", 0
        _run_dask(text, names, chunks, cruise, case_names, scheduler, on_chunk, cancelled, timeout, data)
    else:
        used = max(1, min(want, len(chunks)))
        if used == 1:
            mode = "in-process"
            for i, chunk in enumerate(chunks):
                if cancelled is not None and cancelled():
                    raise Cancelled()
                on_chunk(i, run_chunk(text, names, chunk, cruise, case_names, data))
        else:
            mode = "local"
            _run_local(text, names, chunks, cruise, case_names, used, on_chunk, cancelled, data)
    rows = [row for part in results for row in part]
    return SweepResult(names, axes, rows, cruise, mode, used, time.perf_counter() - t0, grid_points, n_cases)


CSV_FIELDS = ("verdict", "worst_relative_margin", "worst_check", "worst_mach", "worst_altitude_m", "worst_case",
              "worst_face_mach_margin", "cruise_spillage_fraction")


def sweep_columns(result: SweepResult) -> dict:
    """The sweep table's columns: the variables' values, then ``CSV_FIELDS``, ``failing_limits`` (;-separated)
    and ``message`` (why an invalid variant is invalid; empty otherwise)."""
    rows = result.rows
    cols: dict = {}
    for k, v in enumerate(result.variables):
        cols[v] = np.array([r.values[k] for r in rows], dtype=float)
    for f in CSV_FIELDS:
        values = [getattr(r, f) for r in rows]
        if f in ("verdict", "worst_check", "worst_case"):
            cols[f] = ["" if x is None else str(x) for x in values]
        else:
            cols[f] = np.array(values, dtype=float)
    cols["failing_limits"] = [";".join(r.failing_limits) for r in rows]
    cols["message"] = [r.message for r in rows]
    return cols


def write_sweep_csv(result: SweepResult, path, inputs=()) -> int:
    """One row per variant (``sweep_columns``), written by ``engine_air.outputs.table`` (whole or not at all;
    never over one of ``inputs``). Undefined numbers are empty fields. Returns the number of rows."""
    from engine_air.outputs.table import write_table

    write_table(sweep_columns(result), path, "csv", inputs)
    return len(result.rows)


def format_rows(result: SweepResult, limit: int | None = None) -> list[str]:
    """The sweep as a plain-text table (header first); at most ``limit`` rows."""
    heads = [f"{v} [{variable_unit(v)}]" if variable_unit(v) else v for v in result.variables]
    widths = [max(12, len(h)) for h in heads]
    head = "  ".join(h.rjust(w) for h, w in zip(heads, widths))
    head += (f"  {'verdict':<7}  {'worst rel':>9}  {'worst check':<18}  {'face M marg':>11}  {'cruise spill':>12}"
             f"  reason (invalid variants)")
    lines = [head, "-" * len(head)]

    def num(x, fmt):
        width = int("".join(ch for ch in fmt.split(".")[0] if ch.isdigit()) or 0)
        return "-".rjust(width) if not math.isfinite(x) else format(x, fmt)

    for r in result.rows[:limit]:
        vals = "  ".join(f"{v:.6g}".rjust(w) for v, w in zip(r.values, widths))
        lines.append(f"{vals}  {r.verdict:<7}  {num(r.worst_relative_margin, '+9.4f')}  {(r.worst_check or '-'):<18}  "
                     f"{num(r.worst_face_mach_margin, '+11.4f')}  {num(r.cruise_spillage_fraction, '12.4f')}"
                     + (f"  {r.message}" if r.verdict == "invalid" else ""))
    return lines


__all__ = [
    "MAX_POINT_EVALUATIONS", "MAX_VARIABLES", "MAX_VARIANTS", "SchedulerError", "SweepResult", "SweepRow", "check_size",
    "parse_scheduler", "probe_scheduler", "cruise_spillage", "format_rows", "parse_vary", "run_chunk", "sweep",
    "sweep_columns", "variant_row", "write_sweep_csv",
]
