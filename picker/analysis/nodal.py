"""Modified nodal analysis (MNA) of a netlist of ``Element``s.

The input is an ideal voltage source of 1 V on node "in"; the output is node "out";
"0" is ground. Unknowns: the node voltages, one current per op amp output and the
current of the input source. The system is ``(G + s C) x = b``.

Op amp models (element kind "OA", nodes (+, -, out)):

* ideal (``gbw_hz=None``): a nullor, V+ = V- and the output current is free;
* single pole (``gbw_hz`` given): V_out = A(s) (V+ - V-), A(s) = A0 / (1 + s / wp),
  A0 * wp = 2 pi gbw_hz, with A0 = 2e5 (an assumed typical open-loop gain, 106 dB).

References
----------
.. [1] Ho, Ruehli and Brennan, "The modified nodal approach to network analysis", IEEE
       Trans. Circuits and Systems, 1975 (the stamps used here; from memory).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from picker.errors import DesignError
from picker.filters.base import Element

A0_DEFAULT = 2e5  # assumed typical open-loop DC gain of a general-purpose op amp


@dataclass(frozen=True)
class System:
    """``(G + s C) x = b u``; ``out`` is the index of the output node voltage in ``x``."""

    G: np.ndarray
    C: np.ndarray
    b: np.ndarray
    out: int
    nodes: tuple[str, ...]


def build_system(
    elements: Sequence[Element], *, gbw_hz: float | None = None, a0: float = A0_DEFAULT
) -> System:
    """Stamp the elements into the MNA matrices."""
    nodes: list[str] = []
    for el in elements:
        for n in el.nodes:
            if n != "0" and n not in nodes:
                nodes.append(n)
    for must in ("in", "out"):
        if must not in nodes:
            raise DesignError(f"netlist has no node {must!r} (nodes: {', '.join(nodes)})")
    amps = [el for el in elements if el.kind == "OA"]
    size = len(nodes) + len(amps) + 1
    G, C = np.zeros((size, size)), np.zeros((size, size))
    idx = {n: i for i, n in enumerate(nodes)}

    def stamp(mat, a, b, y):
        ia, ib = idx.get(a), idx.get(b)
        if ia is not None:
            mat[ia, ia] += y
        if ib is not None:
            mat[ib, ib] += y
        if ia is not None and ib is not None:
            mat[ia, ib] -= y
            mat[ib, ia] -= y

    if gbw_hz is not None and not (np.isfinite(gbw_hz) and gbw_hz > 0):
        raise DesignError(f"op amp gain-bandwidth must be a positive frequency, got {gbw_hz!r}")
    row = len(nodes)
    for el in elements:
        if el.kind in ("R", "C"):
            if not (np.isfinite(el.value) and el.value > 0):
                raise DesignError(
                    f"netlist element {el.name} has value {el.value!r}; "
                    f"it must be positive and finite"
                )
            na, nb = el.nodes
            if el.kind == "R":
                stamp(G, na, nb, 1.0 / el.value)
            else:
                stamp(C, na, nb, el.value)
        elif el.kind == "OA":
            plus, minus, out = el.nodes
            G[idx[out], row] -= 1.0  # the op amp drives current into its output
            if plus != "0":
                G[row, idx[plus]] += 1.0
            if minus != "0":
                G[row, idx[minus]] -= 1.0
            if gbw_hz is not None:  # (V+ - V-) - V_out (1 + s/wp) / A0 = 0
                G[row, idx[out]] -= 1.0 / a0
                C[row, idx[out]] -= 1.0 / (2.0 * np.pi * gbw_hz)
            row += 1
        else:
            raise DesignError(f"netlist element {el.name} has unknown kind {el.kind!r}")
    G[idx["in"], row] -= 1.0  # input source: V_in = u
    G[row, idx["in"]] = 1.0
    b = np.zeros(size)
    b[row] = 1.0
    return System(G, C, b, idx["out"], tuple(nodes))


def _solve(system: System, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    Y = system.G[None, :, :] + s[:, None, None] * system.C[None, :, :]
    rhs = np.broadcast_to(system.b[:, None], (len(s), len(system.b), 1)).astype(complex)
    try:
        return Y, np.linalg.solve(Y, rhs)[..., 0]
    except np.linalg.LinAlgError:
        raise DesignError(
            "the netlist cannot be solved (a floating node or a loop of ideal op amps)"
        ) from None


def _freqs(freqs_hz) -> np.ndarray:
    f = np.atleast_1d(np.asarray(freqs_hz, dtype=float))
    if f.ndim != 1 or not np.all(np.isfinite(f)) or np.any(f < 0):
        raise DesignError("frequencies must be a 1-D array of finite values >= 0 Hz")
    return f


def nodal_response(
    elements: Sequence[Element], freqs_hz, *, gbw_hz: float | None = None, a0: float = A0_DEFAULT
) -> np.ndarray:
    """Complex H(j 2 pi f) = V(out) / V(in) at each frequency (vectorised: one batched solve)."""
    system = build_system(elements, gbw_hz=gbw_hz, a0=a0)
    _, x = _solve(system, 2j * np.pi * _freqs(freqs_hz))
    return x[:, system.out]


def group_delay_s(
    elements: Sequence[Element], freqs_hz, *, gbw_hz: float | None = None, a0: float = A0_DEFAULT
) -> np.ndarray:
    """Group delay -d(arg H)/dw in seconds, exact from the MNA: dx/ds = -Y^-1 C x, so
    tau = -Re((dH/ds) / H) (derived here)."""
    system = build_system(elements, gbw_hz=gbw_hz, a0=a0)
    Y, x = _solve(system, 2j * np.pi * _freqs(freqs_hz))
    dx = -np.linalg.solve(Y, (x @ system.C.T)[..., None])[..., 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        return -np.real(dx[:, system.out] / x[:, system.out])


def cascade_response(
    stages: Sequence[Sequence[Element]],
    freqs_hz,
    gbw_hz: float | None = None,
    *,
    a0: float = A0_DEFAULT,
) -> np.ndarray:
    """Product of the stage responses: each stage is driven by the previous op amp output,
    so the stages do not load each other."""
    f = _freqs(freqs_hz)
    h = np.ones(len(f), dtype=complex)
    for elements in stages:
        h = h * nodal_response(elements, f, gbw_hz=gbw_hz, a0=a0)
    return h


def cascade_group_delay_s(
    stages: Sequence[Sequence[Element]],
    freqs_hz,
    gbw_hz: float | None = None,
    *,
    a0: float = A0_DEFAULT,
) -> np.ndarray:
    """Group delay of a cascade: the sum of the stages' group delays (phases add)."""
    f = _freqs(freqs_hz)
    return sum((group_delay_s(el, f, gbw_hz=gbw_hz, a0=a0) for el in stages), np.zeros(len(f)))


def chain(stages: Sequence[Sequence[Element]]) -> list[Element]:
    """One netlist for a cascade: stage k runs from node "s{k}" to "s{k+1}" (the first
    from "in", the last to "out"); inner nodes become "k{k}.{name}" and element names
    "{name}.{k}". Each stage is driven by an op amp output, so this is exactly the
    cascade (use it for the step response of a whole filter)."""
    last = len(stages) - 1
    out: list[Element] = []
    for k, elements in enumerate(stages):
        ends = {
            "0": "0",
            "in": "in" if k == 0 else f"s{k}",
            "out": "out" if k == last else f"s{k + 1}",
        }
        for el in elements:
            nodes = tuple(ends.get(n, f"k{k}.{n}") for n in el.nodes)
            out.append(Element(el.kind, f"{el.name}.{k + 1}", nodes, el.value))
    return out


def poles(
    elements: Sequence[Element], *, gbw_hz: float | None = None, a0: float = A0_DEFAULT
) -> np.ndarray:
    """Finite natural frequencies (rad/s) of the netlist: generalized eigenvalues of
    G x = -s C x, sorted by magnitude."""
    system = build_system(elements, gbw_hz=gbw_hz, a0=a0)
    lam = _finite_poles(system.G, system.C)
    return lam[np.argsort(np.abs(lam))]


def _finite_poles(g: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Finite s with G x = -s C x. When G is well conditioned this is an ordinary
    eigenproblem, mu = 1/s of -G^-1 C (numpy.linalg; importing scipy.linalg costs
    about 0.3 s of start-up); zero mu are the infinite s. Otherwise fall back to
    scipy's generalized solver."""
    if np.linalg.cond(g) < 1e12:
        mu = np.linalg.eigvals(-np.linalg.solve(g, c))
        scale = np.max(np.abs(mu)) if mu.size else 0.0
        mu = mu[np.abs(mu) > scale * 1e-12]
        return 1.0 / mu
    from scipy.linalg import eigvals

    with np.errstate(divide="ignore", invalid="ignore"):
        lam = eigvals(g, -c)
    return lam[np.isfinite(lam)]
