"""The installation ledger of one point as table rows (method §13), for the review pack and the program.

``ledger_rows(record, exchange=None)`` reads a point record (``engine_air.outputs.point_record.point_record``)
and returns rows whose "term" entries add up to the installed thrust:

    F_inst = F_n - F_n X (1 - pi/pi_ref) - D_spill - D_bleed - D_bypass

- ``net_thrust_n``          + F_n, the engine maker's net thrust at the reference recovery pi_ref
- ``recovery_term_n``       - F_n X (1 - pi/pi_ref), the thrust lost (or gained) by the recovery
- ``spillage_drag_n``       - D_spill, pre-entry drag less lip suction
- ``bleed_drag_n``          - D_bleed
- ``bypass_drag_n``         - D_bypass
- ``installed_thrust_n``    = F_inst (role "total")

and, before them, rows for information only (role "memo", not summed): the ram drag W V0 (already inside
F_n = F_g - W V0), the pre-entry (additive) drag and the lip suction that makes it the spillage drag; after
them the installation loss 1 - F_inst/F_n (role "share"). Each row is a dict with ``key``, ``label``,
``value`` (signed as summed, N; None where undefined), ``role`` and ``note``.

With the rating's exchange rate X given, the recovery term is computed from the record's recovery and
reference recovery; without it, it is the remainder F_n - F_inst - drags (the two agree to rounding, see
tests/test_ledger_table.py). A point without thrust data gives the memo and drag rows and ``no_thrust_data``
is true: the table says "no thrust data" instead of F_n and F_inst.

No Qt here: the program's detail panel and the review pack both show these rows.
"""

from __future__ import annotations

import math

NO_THRUST_DATA = "no thrust data"


def _value(record: dict, key: str) -> float | None:
    v = record.get(key)
    if v is None:
        return None
    v = float(v)
    return v if math.isfinite(v) else None


def has_thrust(record: dict) -> bool:
    """True when the record carries a net and an installed thrust."""
    return _value(record, "net_thrust_n") is not None and _value(record, "installed_thrust_n") is not None


def ledger_rows(record: dict, exchange: float | None = None) -> list[dict]:
    """The ledger rows of one point record; see the module text. ``exchange``: the rating's X, optional."""
    ram = _value(record, "ram_drag_n")
    additive = _value(record, "additive_drag_n")
    spill = _value(record, "spillage_drag_n")
    bleed = _value(record, "bleed_drag_n")
    bypass = _value(record, "bypass_drag_n")
    f_n = _value(record, "net_thrust_n")
    f_inst = _value(record, "installed_thrust_n")
    recovery = _value(record, "recovery")
    reference = _value(record, "thrust_reference_recovery")
    suction = None if additive is None or spill is None else additive - spill

    def row(key, label, value, role, note=""):
        return {"key": key, "label": label, "value": value, "role": role, "note": note}

    def neg(x):
        return None if x is None else -x

    rows = [
        row("ram_drag_n", "Ram drag W·V0", ram, "memo", "inside the net thrust (F_n = F_g − W·V0); not subtracted again"),
        row("additive_drag_n", "Pre-entry (additive) drag", additive, "memo", "before lip suction"),
        row("lip_suction_n", "Lip suction", neg(suction), "memo", "recovered on the cowl lip"),
    ]
    if not has_thrust(record):
        rows += [
            row("spillage_drag_n", "Spillage drag", neg(spill), "drag", "pre-entry drag less lip suction"),
            row("bleed_drag_n", "Bleed drag", neg(bleed), "drag"),
            row("bypass_drag_n", "Bypass drag", neg(bypass), "drag"),
            row("net_thrust_n", "Net thrust F_n", None, "term", NO_THRUST_DATA),
            row("installed_thrust_n", "Installed thrust F_inst", None, "total", NO_THRUST_DATA),
        ]
        return rows
    drags = sum(x for x in (spill, bleed, bypass) if x is not None)
    if exchange is not None and recovery is not None and reference is not None:
        term = -f_n * float(exchange) * (1.0 - recovery / reference)
        how = f"F_n·X·(1 − π/π_ref), X = {float(exchange):g}, π = {recovery:.4f}, π_ref = {reference:.4f}"
    else:
        term = f_inst - f_n + drags
        how = "F_n·X·(1 − π/π_ref)" + (f", π = {recovery:.4f}, π_ref = {reference:.4f}"
                                       if recovery is not None and reference is not None else "")
    rows += [
        row("net_thrust_n", "Net thrust F_n", f_n, "term", "engine maker's table, at the reference recovery"),
        row("recovery_term_n", "Recovery exchange", term, "term", how),
        row("spillage_drag_n", "Spillage drag", neg(spill), "term", "pre-entry drag less lip suction"),
        row("bleed_drag_n", "Bleed drag", neg(bleed), "term"),
        row("bypass_drag_n", "Bypass drag", neg(bypass), "term"),
        row("installed_thrust_n", "Installed thrust F_inst", f_inst, "total", "sum of the rows above marked + and −"),
        row("installation_loss_fraction", "Installation loss 1 − F_inst/F_n",
            _value(record, "installation_loss_fraction"), "share"),
    ]
    return rows


def rows_sum(rows: list[dict]) -> float:
    """The sum of the "term" rows (the installed thrust when the ledger is complete)."""
    return sum(r["value"] for r in rows if r["role"] == "term" and r["value"] is not None)


__all__ = ["NO_THRUST_DATA", "has_thrust", "ledger_rows", "rows_sum"]
