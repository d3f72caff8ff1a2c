"""The repair screen's door to the core: reading the form, the jobs, the build plan.

The jobs run in a child process (``picker.ui.offload``): plain arguments in, plain
data out. Reading a field and planning a build run on the UI thread; they are quick.
Every heavy import happens inside the functions, so opening the screen loads nothing.
See docs/repair.md ("Terminal UI").
"""

from __future__ import annotations

import re

from stock.errors import PickerError

SEPARATORS = re.compile(r"[\s,;]+")


def topology_keys() -> list[str]:
    """The registry keys, sorted (as ``picker analyse --list``)."""
    from picker.filters import REGISTRY

    return sorted(REGISTRY)


def positions(key: str) -> list[tuple[str, str, str]]:
    """(designator, kind, role) of each position of topology ``key``."""
    from picker.repair.marked import topology_of

    return [(p.name, p.kind, p.role) for p in topology_of(key).positions]


def read_part(key: str, name: str, text: str):
    """The ``MarkedPart`` of one field; a PickerError naming the field when it is bad."""
    from picker.repair.marked import parse_part, topology_of

    if not text.strip():
        raise PickerError(f"{name}: no value yet (RKM or SI, e.g. 10k or 22n/5%)")
    return parse_part(topology_of(key), f"{name}={text.strip()}")


def read_free(key: str, text: str, failed: str | None) -> tuple[str, ...]:
    """The designators of the free-to-change field, checked against the topology."""
    from picker.repair.marked import position_name, topology_of

    topo = topology_of(key)
    names: list[str] = []
    for word in SEPARATORS.split(text.strip()):
        if not word:
            continue
        name = position_name(topo, word, option="free")
        if name == failed:
            raise PickerError(f"free: {name} is the failed part already")
        if name in names:
            raise PickerError(f"free: {name} is named twice")
        names.append(name)
    if names and failed is None:
        raise PickerError("free: choose the failed part first")
    return tuple(names)


def read_gbw(text: str) -> float | None:
    """The op amp's gain-bandwidth in hertz, or None for a blank field."""
    if not text.strip():
        return None
    from stock.values import parse_frequency

    try:
        gbw = parse_frequency(text.strip())
    except PickerError as exc:
        raise PickerError(f"GBW: {exc}") from None
    if not gbw > 0:
        raise PickerError(f"GBW: must be a positive frequency, got {text.strip()!r}")
    return gbw


def analyse_job(stage, gbw_hz: float | None) -> dict:
    """What the stage does as marked: text lines, the corner and the response curve."""
    from picker.repair.analyse import analyse_marked
    from picker.repair.report import corner_text, stage_lines

    a = analyse_marked([stage], gbw_hz=gbw_hz)
    (s,) = a.stages
    r = a.response
    return {
        "f0_hz": s.f0_hz,
        "q": s.q,
        "gain": s.gain,
        "lines": stage_lines(1, s)[1:],  # the screen names the topology itself
        "corner": corner_text(r),
        "curve": (r.freqs_hz.tolist(), r.magnitude_db.tolist(), r.phase_deg.tolist()),
    }


def substitute_job(stage, stock, part: str, free, singles: bool, allow_polarized: bool):
    """``picker.repair.substitute.substitute`` with the screen's choices (a Substitution)."""
    from picker.repair.substitute import substitute

    return substitute(
        stage,
        stock,
        part=part,
        free=free,
        singles=singles,
        allow_polarized=allow_polarized,
        top=TOP,
    )


TOP = 8  # options shown


def option_cells(option, rank: int) -> tuple[str, ...]:
    """One row of the options table: rank, worst, f0, Q, gain error, pieces, parts."""
    from picker.report.design import pct
    from picker.report.schematic import arrangement_text

    def signed(x: float | None) -> str:
        if x is None:
            return "-"
        return "0 %" if x == 0 else f"{x * 100:+.3g} %"

    f0_err, q_err, gain_err = option.errors
    parts = []
    for name, arr in option.refilled:
        value, drawer = arrangement_text(arr)
        polar = any(getattr(p.line, "polarized", False) for p in arr.parts)
        parts.append(f"{name} {value} [{drawer}]" + (" POLARIZED" if polar else ""))
    return (
        str(rank),
        pct(option.score),
        signed(f0_err),
        signed(q_err),
        signed(gain_err),
        str(option.pieces),
        "; ".join(parts),
    )


def plan_repair_build(sub, pick: int, stock):
    """The checked build plan of option ``pick`` (from 1): the saved design of
    ``picker substitute --save`` checked against ``stock`` (nothing is written yet)."""
    from picker.building import plan_build
    from picker.export import design_from_candidate
    from picker.repair.substitute import request_table
    from picker.ui import backend

    backend.refuse_sample(stock.path)
    option = sub.options[pick - 1]
    design = design_from_candidate(
        candidate=option.candidate, request=request_table(sub, pick=pick), stock=stock
    )
    return plan_build(design, stock)
