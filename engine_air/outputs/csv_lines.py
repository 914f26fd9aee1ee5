"""CSV lines from columns, batch by batch, with no Python code per row or per cell.

A column is prepared once as one of three kinds, each giving a batch's texts with ``text(a, b)``; every text
carries the separator before it (a line feed in the first column, a comma in the others), so a batch's lines are
the columns' texts joined with nothing between (one Arrow kernel) and written as one buffer (the header goes
without its line feed, and one line feed ends the file):

- ``Coded``: few distinct values (a text column, a grid axis, a quantity of the Mach number or the altitude
  only, a constant): their texts once and each row's code into them; neighbouring coded columns are merged into
  one (their texts joined once) when they share their codes or their combinations stay few;
- ``FloatBlock``: neighbouring float columns with many values, written together by orjson, one ``,a,b,c`` text per
  row, each a slice of orjson's own output (no copy). orjson writes every double in its shortest text that reads
  back to the same double (the Ryu algorithm), about 45 ns a number against about 90 for Arrow's cast; NaN and
  infinities become empty cells;
- ``Plain``: anything else (integers, Arrow arrays), cast to text by Arrow.

``write_lines`` writes batch after batch: each batch's float blocks by orjson on the calling thread; every coded
text of the batch in one ``take``, the lines in one join and one write on a second thread
(``engine_air.outputs.batch_writer``), beside the next batch's floats; the text in memory is two batches'.

Floats read ``2.0``, ``1e-7``, ``1e21`` (the shortest round trip, as Python's ``repr`` writes it but for the
exponent's sign and padding); integer columns read ``2``.
"""

from __future__ import annotations

from typing import Iterable, Sequence

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

BATCH_ROWS = 2_048
"""Rows turned into CSV text at a time (a few MB of text), where the rows are made part by part to keep the
memory low (``engine-air map --csv``)."""

TABLE_BATCH_ROWS = 4_096
"""Rows turned into text at a time from a table held whole in memory, of which a few MB more are a small part:
some 8 % faster than ``BATCH_ROWS`` on a 241 000-row map (fewer calls a row)."""

MERGED_CODES = 4_096
"""Most combinations two neighbouring coded columns may have to be merged into one."""


def pool() -> pa.MemoryPool:
    """The C allocator's pool for the CSV text: it gives freed batches back, where Arrow's default pool keeps them
    (a written map would otherwise hold some 100 MB more at its peak)."""
    return pa.system_memory_pool()


# Arrow's default pool too, for what its kernels allocate beside the texts: with Arrow's own default (mimalloc)
# a ``map --csv`` that joins its lines on a second thread peaked some 9 MB higher, past 1.5 x ``check``'s memory.
pa.set_memory_pool(pool())


def numbers(v: np.ndarray) -> pa.Array:
    """A numpy array of numbers as an Arrow array on the same memory (floats not finite as nulls). Built from its
    buffers: ``pa.array`` would import pandas (some 40 MB) to ask whether the input is one of its types."""
    if v.dtype.kind == "b":
        v = v.astype(np.int8)
    v = np.ascontiguousarray(v)
    validity = None
    if v.dtype.kind == "f":
        v = v.astype(np.float64, copy=False)
        finite = np.isfinite(v)
        if not finite.all():
            validity = pa.py_buffer(np.packbits(finite, bitorder="little"))
    return pa.Array.from_buffers(pa.from_numpy_dtype(v.dtype), v.size, [validity, pa.py_buffer(v)])


def strings(texts: Sequence[str | bytes | None]) -> pa.Array:
    """Texts as an Arrow string array (None: null), from buffers (see ``numbers``)."""
    data = [b"" if t is None else t if isinstance(t, bytes) else t.encode("utf-8") for t in texts]
    offsets = np.zeros(len(data) + 1, dtype=np.int32)
    np.cumsum([len(d) for d in data], out=offsets[1:])
    valid = np.array([t is not None for t in texts], dtype=bool)
    validity = None if valid.all() else pa.py_buffer(np.packbits(valid, bitorder="little"))
    buffers = [validity, pa.py_buffer(offsets), pa.py_buffer(b"".join(data))]
    return pa.Array.from_buffers(pa.string(), len(data), buffers)


def float_texts(values: np.ndarray) -> pa.Array:
    """Floats as their shortest round-trip texts (orjson), a value not finite as a null."""
    import orjson

    v = np.ascontiguousarray(np.asarray(values, dtype=np.float64).ravel())
    if v.size == 0:
        return strings([])
    cells = orjson.dumps(v, option=orjson.OPT_SERIALIZE_NUMPY)[1:-1].split(b",")
    return strings([None if c == b"null" else c for c in cells])


def number_texts(arr: pa.Array) -> pa.Array:
    """An Arrow array of numbers as texts: floats as ``float_texts``, integers by Arrow's cast; nulls stay null."""
    if pa.types.is_floating(arr.type):
        return float_texts(arr.to_numpy(zero_copy_only=False))
    return pc.cast(arr, pa.string(), memory_pool=pool())


def _with(texts: pa.Array, sep: bytes) -> pa.Array:
    """Each text (a null as empty) after ``sep``."""
    return pc.binary_join_element_wise(strings([sep])[0], texts, strings([b""])[0], null_handling="replace",
                                       null_replacement="", memory_pool=pool())


class Coded:
    """A column of few distinct values: their texts once (``texts``), and each row's code into them."""

    def __init__(self, texts: pa.Array, codes: np.ndarray):
        self.texts, self.codes = texts, np.ascontiguousarray(codes, dtype=np.int32)
        self.ended: pa.Array | None = None

    def end(self, sep: bytes) -> None:
        self.ended = _with(self.texts, sep)

    def text(self, a: int, b: int) -> pa.Array:
        texts = self.texts if self.ended is None else self.ended
        return pc.take(texts, numbers(self.codes[a:b]), memory_pool=pool())


class Plain:
    """A column turned into text batch by batch: numbers (floats not finite empty) or an Arrow array."""

    def __init__(self, values):
        self.values = values
        self.sep: bytes | None = None

    def end(self, sep: bytes) -> None:
        self.sep = sep

    def text(self, a: int, b: int) -> pa.Array:
        v = self.values
        texts = number_texts(numbers(v[a:b]) if isinstance(v, np.ndarray) else v.slice(a, b - a))
        return texts if self.sep is None else _with(texts, self.sep)


class FloatBlock:
    """Neighbouring float columns written together by orjson: one ``,a,b,c`` text per row."""

    def __init__(self, columns: list[np.ndarray]):
        self.columns = columns

    def text(self, a: int, b: int, flat: np.ndarray | None = None) -> pa.Array:
        """Rows a..b as slices of one orjson text (no copy): ``[0.0,a,b,c,d]`` (a leading 0 for the first row's
        comma) gives ``,a,b`` and ``,c,d`` at every ``w``-th comma, ``w`` the number of columns. NaN and
        infinities become empty cells. ``flat``: a float array to fill, reused from batch to batch (a fresh one
        costs its page faults)."""
        import orjson

        w, rows = len(self.columns), b - a
        flat = np.empty(1 + rows * w) if flat is None or flat.size < 1 + rows * w else flat
        values = flat[:1 + rows * w]
        values[0] = 0.0
        cells = values[1:].reshape(rows, w)
        for k, c in enumerate(self.columns):
            cells[:, k] = c[a:b]
        raw = orjson.dumps(values, option=orjson.OPT_SERIALIZE_NUMPY)
        if b"n" in raw:  # orjson's "null" for NaN and infinities (a number's text has no n): empty cells
            raw = raw.replace(b"null", b"")
        commas = (np.frombuffer(raw, dtype=np.uint8) == ord(",")).nonzero()[0]
        offsets = np.empty(rows + 1, dtype=np.int32)
        offsets[:-1], offsets[-1] = commas[::w], len(raw) - 1  # the last row ends before "]"
        return pa.Array.from_buffers(pa.string(), rows, [None, pa.py_buffer(offsets), pa.py_buffer(raw)])


def is_float(c) -> bool:
    return isinstance(c, Plain) and isinstance(c.values, np.ndarray) and c.values.dtype.kind == "f"


def _merged(a: Coded, b: Coded) -> Coded | None:
    """One coded column for two neighbours (texts already ended), or None when their combinations are many."""
    if a.codes is b.codes or np.array_equal(a.codes, b.codes):
        n = min(len(a.ended), len(b.ended))
        merged = Coded(strings([]), a.codes)
        merged.ended = pc.binary_join_element_wise(a.ended.slice(0, n), b.ended.slice(0, n), strings([b""])[0],
                                                   memory_pool=pool())
        return merged
    na, nb = len(a.ended), len(b.ended)
    if na * nb > MERGED_CODES or na * nb * 4 > a.codes.size:
        return None
    merged = Coded(strings([]), a.codes * nb + b.codes)
    first = pc.take(a.ended, numbers(np.repeat(np.arange(na, dtype=np.int32), nb)))
    second = pc.take(b.ended, numbers(np.tile(np.arange(nb, dtype=np.int32), na)))
    merged.ended = pc.binary_join_element_wise(first, second, strings([b""])[0], memory_pool=pool())
    return merged


def prepared(cols: list) -> list:
    """``cols`` ready for ``lines``: every text after its separator, neighbouring float columns (after the first)
    as one ``FloatBlock``, neighbouring coded columns merged where that keeps them few."""
    out: list = []
    for k, c in enumerate(cols):
        c.end(b"\n" if k == 0 else b",")
        if k and is_float(c):
            if out and isinstance(out[-1], FloatBlock):
                out[-1].columns.append(c.values)
            else:
                out.append(FloatBlock([c.values]))
            continue
        merged = _merged(out[-1], c) if isinstance(c, Coded) and out and isinstance(out[-1], Coded) else None
        if merged is not None:
            out[-1] = merged
        else:
            out.append(c)
    return out


class Part:
    """The prepared columns of one part (``prepared``) with every coded column's texts in one array, so that a
    batch takes them all in one call (one ``take`` of 2 048 x 11 texts costs less than eleven of 2 048)."""

    def __init__(self, cols: list):
        self.cols = cols
        self.blocks = [k for k, c in enumerate(cols) if isinstance(c, FloatBlock)]
        coded = [c for c in cols if isinstance(c, Coded)]
        self.texts = pa.concat_arrays([c.ended for c in coded]) if coded else None
        first = np.cumsum([0] + [len(c.ended) for c in coded[:-1]]).astype(np.int32)
        self.codes = list(zip([c.codes for c in coded], first.tolist()))  # each column's codes, their start
        self._flat = np.empty(0)

    def made(self, a: int, b: int) -> dict:
        """The float blocks' texts of rows a..b (by column index): the part of a batch that holds the
        interpreter's lock (orjson), one short call a block."""
        size = 1 + (b - a) * max((len(self.cols[k].columns) for k in self.blocks), default=0)
        if self._flat.size < size:
            self._flat = np.empty(size)
        return {k: self.cols[k].text(a, b, self._flat) for k in self.blocks}

    def lines(self, a: int, b: int, made: dict | None = None) -> pa.Array:
        """Rows a..b as CSV lines; ``made``: the float blocks' texts made already (``made``)."""
        made = self.made(a, b) if made is None else made
        taken = None
        if self.texts is not None:
            codes = np.concatenate([c[a:b] + f for c, f in self.codes])
            taken = pc.take(self.texts, numbers(codes), memory_pool=pool())
        texts, j = [], 0
        for k, c in enumerate(self.cols):
            if k in made:
                texts.append(made[k])
            elif isinstance(c, Coded):
                texts.append(taken.slice(j * (b - a), b - a))
                j += 1
            else:
                texts.append(c.text(a, b))
        if len(texts) == 1:
            return texts[0]
        joined = pc.binary_join_element_wise(*texts, strings([b""])[0], memory_pool=pool())
        return joined.combine_chunks() if isinstance(joined, pa.ChunkedArray) else joined


def lines(cols: list, a: int, b: int) -> pa.Array:
    """Rows a..b of the prepared columns (``prepared``) as CSV lines."""
    return Part(cols).lines(a, b)


def write_lines(fh, parts: Iterable[tuple[int, list]], batch_rows: int | None = None) -> int:
    """Every part's rows (rows, columns ready for ``text(a, b)``) as CSV lines to the binary file ``fh``,
    ``batch_rows`` at a time (``BATCH_ROWS`` when None); returns the rows written.

    Two threads share the work: this one writes each batch's floats (orjson, which holds the interpreter's lock);
    a second one (``engine_air.outputs.batch_writer``) takes the coded texts, joins the lines and writes them
    (Arrow and the system, both without the lock) while this one formats the next batch. A batch is handed over
    only when the one before is written, and a part's batches are all written before the next part is built, so
    the text in memory is two batches'."""
    from functools import partial

    from engine_air.outputs.batch_writer import BatchWriter

    rows, batch_rows = 0, batch_rows or BATCH_ROWS
    with BatchWriter(fh) as writer:
        for n, cols in parts:
            part = Part(prepared(cols)) if n and cols else None
            for a in range(0, n if part else 0, batch_rows):
                b = min(n, a + batch_rows)
                writer.put(partial(part.lines, a, b, part.made(a, b)))
            writer.drain()
            rows += n if part else 0
            del cols, part  # before the next part is built
    return rows
