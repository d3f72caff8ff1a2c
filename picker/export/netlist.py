"""SPICE netlist of a saved design, runnable as is with ``ngspice -b`` (docs/outputs.md).

Conventions of the text written here:

* the first line is the title (SPICE reads line one as the title, never as an element);
* the source is ``V1 in 0 DC 0 AC 1`` on node ``in``; the filter's output is node ``out``;
* stages are cascaded: stage k drives node ``s<k>_out`` (the last one drives ``out``);
  a stage's own inner nodes are ``s<k>_<node>``;
* every piece is named by its reference designator and its stage: ``R1_S2`` is R1 of
  stage 2; the pieces of a series or parallel pair are ``R1_S2a`` and ``R1_S2b`` (a series
  pair meets at node ``s2_R1_mid``); op amps are ``XU1_S2``. A comment line beside each
  name maps it back to the position, the value, the tolerance, the drawer and the stock line;
* each op amp is the subcircuit ``picker_opamp``: a single-pole macro-model with an
  open-loop gain A0 = 2e5 and a unity-gain frequency equal to the stock op amp's GBW,
  an ideal output stage and no input current. Without an op amp in the design a
  near-ideal amplifier (gain 1e6, no pole) stands in, and a comment says so;
* an ``.ac dec`` sweep from a hundredth of the lowest stage frequency to a hundred times
  the highest, and ``.print ac vdb(out) vp(out)`` so that batch mode prints the response.

Pieces are written with the values they have: the reading of a measured piece, else the
nominal value.
"""

from __future__ import annotations

import math

from picker.errors import DesignError
from picker.export.bom import designator, reference_name
from picker.export.design_file import SavedDesign
from stock.units import format_percent

# the open-loop gain of picker.analysis.A0_DEFAULT (2e5, common practice), written out
# here so that `picker netlist` does not import numpy; a test keeps the two equal
OPEN_LOOP_GAIN = 2e5
GM = 1e-3  # transconductance of the macro-model's input stage, siemens
POINTS_PER_DECADE = 50


def opamp_subcircuit(gbw_hz: float | None) -> list[str]:
    """Lines of the op-amp macro-model.

    One pole: ``A(s) = A0 / (1 + s / wp)`` with ``wp = 2 pi GBW / A0``, made of a
    transconductance ``GM`` into ``Rp = A0 / GM`` parallel ``Cp = GM / (2 pi GBW)``, so that
    ``A0 * fp = GBW`` [1]_, then a unity-gain voltage follower as the output stage.

    References
    ----------
    .. [1] Single-pole open-loop model of a voltage-feedback op amp, gain-bandwidth
       product = A0 * fp (common practice).
    """
    lines = [".subckt picker_opamp inp inn out"]
    if gbw_hz is None:
        lines += [
            "* near-ideal amplifier: no op amp was chosen in the design",
            "E1 out 0 inp inn 1e6",
        ]
    else:
        rp = OPEN_LOOP_GAIN / GM
        cp = GM / (2 * math.pi * gbw_hz)
        lines += [
            f"* single pole: A0 = {OPEN_LOOP_GAIN:g}, unity-gain frequency = GBW = {gbw_hz:.6g} Hz",
            f"G1 0 pole inp inn {GM:g}",
            f"Rp pole 0 {_num(rp)}",
            f"Cp pole 0 {_num(cp)}",
            "E1 out 0 pole 0 1",
        ]
    lines.append(".ends picker_opamp")
    return lines


def spice_netlist(design: SavedDesign) -> str:
    """SPICE text of ``design`` that ``ngspice -b`` runs as is (see the module docstring)."""
    from picker.filters import get_topology
    from picker.report.owner import visible
    from stock.values import format_rkm, format_si

    def hz(value: float) -> str:
        return format_si(value, "Hz", digits=6, ascii_micro=True)

    req = design.request
    # text from the design file stays inside its comment line: a newline in a drawer name
    # must not start a SPICE line of its own (picker.report.owner)
    words = " ".join(visible(req[k]) for k in ("type", "response") if k in req)
    title = f"picker filter: {words}" if words else "picker filter"
    if "order" in req:
        title += f", order {visible(req['order'])}"
    lines = [
        title,
        "* written by picker; run with: ngspice -b <this file>",
        "* names: <designator>_S<stage>; pair pieces end in a and b; op amps XU<n>_S<stage>",
        "V1 in 0 DC 0 AC 1",
    ]
    n = len(design.stages)
    for s, stage in enumerate(design.stages, start=1):
        try:
            topology = get_topology(stage.topology)
        except (KeyError, LookupError, DesignError) as exc:
            raise DesignError(f"stage {s}: unknown topology {stage.topology!r}") from exc
        t = stage.target
        what = (
            f"f0 {hz(t.f0_hz)}"
            + (f", Q {t.q:.4g}" if t.q is not None else "")
            + (f", gain {t.gain:.4g}" if t.gain is not None else "")
        )
        lines.append(f"* stage {s}: {stage.topology}, target {what}")
        nodes = {
            "in": "in" if s == 1 else f"s{s - 1}_out",
            "out": "out" if s == n else f"s{s}_out",
            "0": "0",
        }

        def node(name: str, nodes: dict[str, str] = nodes, s: int = s) -> str:
            return nodes.get(name, f"s{s}_{name}")

        positions = {p.name: p for p in stage.positions}
        for e in topology.netlist(stage.values()):
            if e.kind == "OA":
                inp, inn, out = (node(x) for x in e.nodes)
                lines.append(f"X{e.name}_S{s} {inp} {inn} {out} picker_opamp")
                continue
            if e.kind not in ("R", "C"):
                raise DesignError(
                    f"stage {s} ({stage.topology}): element {e.name!r} of kind "
                    f"{e.kind!r} has no SPICE form here"
                )
            a, b = (node(x) for x in e.nodes)
            pos = positions.get(e.name)
            if pos is not None and not pos.parts:  # kept: the part in the circuit stays
                name = reference_name(e.kind, pos.name, s, "")
                lines.append(
                    f"* {name} = stage {s} {pos.name}: "
                    f"{format_rkm(pos.value, pos.kind)}, stays in the circuit"
                )
                lines.append(f"{name} {a} {b} {_num(pos.value)}")
                continue
            if pos is None:  # a fixed element of the topology
                lines.append(f"{reference_name(e.kind, e.name, s, '')} {a} {b} {_num(e.value)}")
                continue
            ends = [(a, b)] * len(pos.parts)
            if pos.arrangement == "series":
                mid = f"s{s}_{pos.name}_mid"
                ends = [(a, mid), (mid, b)]
            for k, part in enumerate(pos.parts):
                suffix = "" if pos.arrangement == "single" else "ab"[k]
                name = reference_name(e.kind, pos.name, s, suffix)
                where = f"drawer {visible(part.location)}" if part.location else "no location"
                reading = f" (measured piece {part.measured})" if part.measured is not None else ""
                lines.append(
                    f"* {name} = stage {s} {designator(pos.name, pos.arrangement, k)}: "
                    f"{format_rkm(part.value, part.kind)}{reading}, "
                    f"{format_percent(part.tolerance)}, {where}, stock {part.kind} "
                    f"{part.index} (line {part.line})"
                )
                lines.append(f"{name} {ends[k][0]} {ends[k][1]} {_num(part.value)}")
    lines += opamp_subcircuit(None if design.opamp is None else design.opamp.gbw_hz)
    if design.opamp is not None:
        lines.insert(
            4,
            f"* op amp: {visible(design.opamp.name)}, GBW {hz(design.opamp.gbw_hz)}"
            + (f", drawer {visible(design.opamp.location)}" if design.opamp.location else ""),
        )
    f_lo, f_hi = sweep_range(design)
    lines += [
        f".ac dec {POINTS_PER_DECADE} {_num(f_lo)} {_num(f_hi)}",
        ".print ac vdb(out) vp(out)",
        ".end",
    ]
    return "\n".join(lines) + "\n"


def sweep_range(design: SavedDesign) -> tuple[float, float]:
    """Whole decades from a hundredth of the lowest stage f0 to a hundred times the highest."""
    f0s = [st.target.f0_hz for st in design.stages] + [st.achieved.f0_hz for st in design.stages]
    lo = 10.0 ** math.floor(math.log10(min(f0s) / 100.0))
    hi = 10.0 ** math.ceil(math.log10(max(f0s) * 100.0))
    return lo, hi


def _num(value: float) -> str:
    return f"{value:.9g}"
