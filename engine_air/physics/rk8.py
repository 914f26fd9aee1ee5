"""Fixed-step explicit Runge-Kutta of order 8 for many independent members of one ODE at once, in numpy.

The stages are those of Dormand and Prince's DOP853 [1, section II.10; 2] (twelve stages, order 8), taken with
a fixed number of equal steps per member: member ``i`` runs from ``w0[i]`` to ``w1[i]`` (either direction) in
``steps`` steps of its own length. The right-hand side is called once per stage on every member together, so
the cost is a few dozen numpy operations per step whatever the number of members. With no step-size control
the caller chooses ``steps`` from the smoothness of its problem (the global error falls as h^8).

[1] Hairer, E., Norsett, S. P., Wanner, G., Solving Ordinary Differential Equations I, 2nd ed., Springer (1993).
[2] Dormand, J. R., Prince, P. J., "A family of embedded Runge-Kutta formulae", J. Comp. Appl. Math. 6 (1980);
    the DOP853 coefficients as published with Hairer's code (the same numbers as ``scipy.integrate.DOP853``).

>>> import numpy as np
>>> y = integrate(lambda w, y: -y, np.zeros(2), np.array([1.0, 2.0]), np.ones((1, 2)), steps=8)
>>> bool(np.allclose(y[0], np.exp([-1.0, -2.0]), rtol=1e-10, atol=0.0))
True
"""

from __future__ import annotations

import numpy as np

_STAGES = 12
_C = np.array([
    0.0, 0.05260015195876773, 0.0789002279381516, 0.1183503419072274, 0.2816496580927726, 0.3333333333333333,
    0.25, 0.3076923076923077, 0.6512820512820513, 0.6, 0.8571428571428571, 1.0,
])
_ROWS = (
    (1, {0: 0.05260015195876773}),
    (2, {0: 0.0197250569845379, 1: 0.0591751709536137}),
    (3, {0: 0.02958758547680685, 2: 0.08876275643042054}),
    (4, {0: 0.2413651341592667, 2: -0.8845494793282861, 3: 0.924834003261792}),
    (5, {0: 0.037037037037037035, 3: 0.17082860872947386, 4: 0.12546768756682242}),
    (6, {0: 0.037109375, 3: 0.17025221101954405, 4: 0.06021653898045596, 5: -0.017578125}),
    (7, {0: 0.03709200011850479, 3: 0.17038392571223998, 4: 0.10726203044637328, 5: -0.015319437748624402, 6:
         0.008273789163814023}),
    (8, {0: 0.6241109587160757, 3: -3.3608926294469414, 4: -0.868219346841726, 5: 27.59209969944671, 6:
         20.154067550477894, 7: -43.48988418106996}),
    (9, {0: 0.47766253643826434, 3: -2.4881146199716677, 4: -0.590290826836843, 5: 21.230051448181193, 6:
         15.279233632882423, 7: -33.28821096898486, 8: -0.020331201708508627}),
    (10, {0: -0.9371424300859873, 3: 5.186372428844064, 4: 1.0914373489967295, 5: -8.149787010746927, 6:
         -18.52006565999696, 7: 22.739487099350505, 8: 2.4936055526796523, 9: -3.0467644718982196}),
    (11, {0: 2.273310147516538, 3: -10.53449546673725, 4: -2.0008720582248625, 5: -17.9589318631188, 6:
         27.94888452941996, 7: -2.8589982771350235, 8: -8.87285693353063, 9: 12.360567175794303, 10:
         0.6433927460157636}),
)
_A = np.zeros((_STAGES, _STAGES))
for _s, _row in _ROWS:
    for _j, _v in _row.items():
        _A[_s, _j] = _v
_B = np.zeros(_STAGES)
_B_ENTRIES = {
    0: 0.054293734116568765, 5: 4.450312892752409, 6: 1.8915178993145003, 7: -5.801203960010585, 8:
    0.3111643669578199, 9: -0.1521609496625161, 10: 0.20136540080403034, 11: 0.04471061572777259,
}
for _j, _v in _B_ENTRIES.items():
    _B[_j] = _v

_A_ROWS = [_A[_s, :_s].copy() for _s in range(_STAGES)]  # each stage's row, sliced once


def integrate(rhs, w0, w1, y0, steps: int, nodes: bool = False, at=None) -> np.ndarray:
    """Integrate dy/dw = rhs(w, y) for every member from ``w0`` to ``w1`` in ``steps`` equal steps.

    Parameters
    ----------
    rhs : callable
        ``rhs(w, y)`` with ``w`` of shape (n,) and ``y`` of shape (k, n); returns dy/dw of shape (k, n).
    w0, w1 : array_like
        Start and end of each member's interval, shape (n,) (``w1 < w0`` integrates backwards).
    y0 : array_like
        States at ``w0``, shape (k, n).
    steps : int
        Number of equal steps per member.
    nodes : bool
        Return the states at every step's end as well.
    at : callable, optional
        ``at(w)`` applied once to the abscissae of every stage of every step together (an array of shape
        (steps, 12, n) made for it, which ``at`` may overwrite); ``rhs`` then gets ``at(w)`` in place of ``w``
        (e.g. a cotangent computed once).

    Returns
    -------
    numpy.ndarray
        The states at ``w1``, shape (k, n); with ``nodes``, shape (steps + 1, k, n) from ``w0`` to ``w1``.
    """
    w0 = np.asarray(w0, dtype=float)
    h = (np.asarray(w1, dtype=float) - w0) / steps
    w = h * (np.arange(steps)[:, None, None] + _C[None, :, None])  # every stage of every step
    w += w0  # in place: a large array's fresh pages cost more than the arithmetic
    w = at(w) if at is not None else w
    y = np.array(y0, dtype=float)
    stages = np.empty((_STAGES,) + y.shape)
    flat = stages.reshape(_STAGES, -1)
    kept = [y] if nodes else None
    if getattr(rhs, "writes_out", False):  # the same values written straight into each stage's slot
        slots = list(stages)
        rows = [flat[:s] for s in range(_STAGES)]
        buf = np.empty(flat.shape[1])
        x = buf.reshape(y.shape)  # each stage's state, y + (A_s . k) h, in place
        for i in range(steps):
            wi = w[i]
            rhs(wi[0], y, slots[0])
            for s in range(1, _STAGES):
                np.matmul(_A_ROWS[s], rows[s], out=buf)
                x *= h
                x += y
                rhs(wi[s], x, slots[s])
            y = y + (_B @ flat).reshape(y.shape) * h
            if nodes:
                kept.append(y)
        return np.stack(kept) if nodes else y
    for i in range(steps):
        stages[0] = rhs(w[i, 0], y)
        for s in range(1, _STAGES):
            stages[s] = rhs(w[i, s], y + (_A_ROWS[s] @ flat[:s]).reshape(y.shape) * h)
        y = y + (_B @ flat).reshape(y.shape) * h
        if nodes:
            kept.append(y)
    return np.stack(kept) if nodes else y
