"""The op amp's effect on f0 and Q against ngspice's pole-zero analysis (.pz).

The same netlist and the same single-pole op amp (a VCVS of gain A0 = 2e5 into an RC of
corner GBW / A0, buffered) go to ngspice; its poles nearest f0 give f0 and Q with
w0^2 = p1 p2, w0 / Q = -(p1 + p2).
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess

import pytest

from picker.budget import budget
from picker.filters import get_topology
from picker.parts import StageTarget
from tests.picker.budget.helpers import candidate, opamp, stage

NGSPICE = shutil.which("ngspice")
A0 = 2e5
pytestmark = [
    pytest.mark.ngspice,
    pytest.mark.skipif(NGSPICE is None, reason="ngspice is not installed"),
]


def spice_deck(elements, gbw_hz: float) -> str:
    lines = ["budget pole check", "V1 in 0 DC 0 AC 1"]
    for k, e in enumerate(elements):
        if e.kind in ("R", "C"):
            lines.append(f"{e.kind}{k}_{e.name} {e.nodes[0]} {e.nodes[1]} {e.value!r}")
        else:
            plus, minus, out = e.nodes
            cp = 1.0 / (2 * math.pi * 1e3 * gbw_hz / A0)
            lines += [
                f"E{k}a x{k} 0 {plus} {minus} {A0!r}",
                f"R{k}p x{k} y{k} 1k",
                f"C{k}p y{k} 0 {cp!r}",
                f"E{k}b {out} 0 y{k} 0 1",
            ]
    lines += [".control", "pz in 0 out 0 vol pol", "print all", ".endc", ".end"]
    return "\n".join(lines) + "\n"


def ngspice_poles(deck: str, tmp_path) -> list[complex]:
    path = tmp_path / "pz.cir"
    path.write_text(deck)
    out = subprocess.run(
        [NGSPICE, "-b", str(path)], capture_output=True, text=True, timeout=60
    ).stdout
    poles = [
        complex(float(a), float(b))
        for a, b in re.findall(r"pole\(\d+\)\s*=\s*([-+0-9.eE]+),\s*([-+0-9.eE]+)", out)
    ]
    assert poles, out
    return poles


@pytest.mark.parametrize(
    "key, target",
    [
        ("sallen-key-lowpass", StageTarget(1000.0, 0.7071)),
        ("mfb-lowpass", StageTarget(5000.0, 1.3, 2.0)),
        ("sallen-key-highpass-gain", StageTarget(2000.0, 0.9, 2.0)),
        ("mfb-bandpass", StageTarget(3000.0, 4.0, 1.0)),
    ],
)
def test_finite_gbw_poles_match_ngspice(key, target, tmp_path):
    topo = get_topology(key)
    choice = stage(key, topo.synthesize(target))
    gbw = 300e3
    o = budget(candidate(choice, opamp=opamp(gbw=gbw)), trials=10).stages[0].opamp
    poles = ngspice_poles(spice_deck(topo.netlist(choice.values()), gbw), tmp_path)
    w0 = 2 * math.pi * choice.achieved.f0_hz
    p1, p2 = sorted(poles, key=lambda p: abs(math.log(abs(p) / w0)))[:2]
    w = math.sqrt((p1 * p2).real)
    assert o.real[0] == pytest.approx(w / (2 * math.pi), rel=1e-4)
    assert o.real[1] == pytest.approx(w / -(p1 + p2).real, rel=1e-4)
    assert abs(o.shift[0]) > 1e-4  # the op amp really moved it


def test_mfb_stage_shift_matches_ngspice(tmp_path):
    """Stage 3 of the 5 kHz, 6th-order MFB design (tests/picker/budget/test_opamp.py,
    MFB3): its f0 and Q with a 3 MHz op amp, from ngspice's .pz, against the budget."""
    from tests.picker.budget.test_opamp import MFB3

    topo = get_topology("mfb-lowpass")
    f0, q, _ = (float(x) for x in topo.characteristics(MFB3))
    b = budget(candidate(stage(topo.key, MFB3), opamp=opamp(gbw=3e6)), trials=10)
    o = b.stages[0].opamp
    poles = ngspice_poles(spice_deck(topo.netlist(MFB3), 3e6), tmp_path)
    w = 2 * math.pi * f0
    near = sorted(poles, key=lambda p: abs(math.log(abs(p) / w)))[:2]
    w0 = math.sqrt((near[0] * near[1]).real)
    q_sp = w0 / -(near[0] + near[1]).real
    assert w0 / (2 * math.pi) / f0 - 1 == pytest.approx(o.shift[0], abs=2e-4)  # ngspice
    assert q_sp / q - 1 == pytest.approx(o.shift[1], abs=2e-4)  # ngspice
    assert o.shift[0] < -0.03  # the -3.5 % of the report
