"""Step response of a netlist by integrating its MNA descriptor system in time.

``G x + C dx/dt = b u(t)`` with u the unit step applied at ``t_s[0]`` and the circuit at
rest before it. Integration: one backward-Euler step, then BDF2 (second-order backward
differentiation), which is stable for the algebraic rows an ideal op amp adds (the
trapezoidal rule rings on them). The returned value at ``t_s[0]`` is the output just
before the step (0).

References
----------
.. [1] Brayton, Gustavson and Hachtel, "A new efficient algorithm for solving
       differential-algebraic systems using implicit backward differentiation formulas",
       Proc. IEEE, 1972 (BDF for circuit equations; from memory).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from picker.errors import DesignError
from picker.filters.base import Element


def step_response(elements: Sequence[Element], t_s, *, gbw_hz: float | None = None) -> np.ndarray:
    """Output voltage for a 1 V input step, on a uniform time grid ``t_s`` (seconds)."""
    from scipy.linalg import lu_factor, lu_solve

    from picker.analysis.nodal import build_system

    t = np.asarray(t_s, dtype=float)
    if t.ndim != 1 or len(t) < 3:
        raise DesignError("the time grid needs at least 3 points")
    steps = np.diff(t)
    h = float(steps[0])
    if h <= 0 or not np.allclose(steps, h, rtol=1e-6, atol=0.0):
        raise DesignError("the time grid must be uniform and increasing")
    system = build_system(elements, gbw_hz=gbw_hz)
    G, C, b = system.G, system.C, system.b
    y = np.zeros(len(t))
    x_prev2 = np.zeros(len(b))
    x_prev = lu_solve(lu_factor(G + C / h), C @ x_prev2 / h + b)     # backward Euler
    y[1] = x_prev[system.out]
    lu = lu_factor(G + 1.5 * C / h)
    for n in range(2, len(t)):
        x = lu_solve(lu, C @ (2.0 * x_prev - 0.5 * x_prev2) / h + b)
        x_prev2, x_prev = x_prev, x
        y[n] = x[system.out]
    return y
