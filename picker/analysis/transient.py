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
    try:
        first = np.linalg.solve(G + C / h, b)  # backward Euler from rest
        step = np.linalg.inv(G + 1.5 * C / h)
    except np.linalg.LinAlgError:
        raise DesignError(
            "the netlist cannot be solved (a floating node or a loop of ideal op amps)"
        ) from None
    # BDF2: (G + 3C/2h) x[n] = C (2 x[n-1] - x[n-2] / 2) / h + b, as fixed matrices
    p, q, r = step @ C * (2.0 / h), step @ C * (-0.5 / h), step @ b
    y = np.zeros(len(t))
    x_prev2, x_prev = np.zeros(len(b)), first
    y[1] = first[system.out]
    for n in range(2, len(t)):
        x = p @ x_prev + q @ x_prev2 + r
        x_prev2, x_prev = x_prev, x
        y[n] = x[system.out]
    return y
