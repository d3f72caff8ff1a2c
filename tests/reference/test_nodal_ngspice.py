"""Nodal analysis (picker.analysis) against ngspice's AC analysis of the same netlists.

ngspice (Debian's package) solves each stage netlist on its own. The op amp is written
for it either as a voltage-controlled voltage source of gain 1e9 (against our ideal
nullor) or as a single-pole subcircuit A(s) = A0 / (1 + s / wp), A0 = 2e5, A0 wp = 2 pi
GBW (against our finite-GBW model). Magnitudes must agree within 0.1 dB and phases within
0.5 degrees wherever the response is above -100 dB.
"""

from __future__ import annotations

import math
import shutil
import subprocess

import numpy as np
import pytest

from picker.analysis import A0_DEFAULT, cascade_response, magnitude_db, nodal_response
from picker.filters import REGISTRY, plan_stages
from picker.parts import StageTarget

pytestmark = pytest.mark.ngspice

GBW = 1e6


def _need_ngspice():
    if shutil.which("ngspice") is None:
        pytest.skip("ngspice not installed: apt-get install ngspice (Debian package)")


def deck(stages, gbw_hz):
    """SPICE text for a cascade of stage netlists; stage k runs from node s{k} to s{k+1}."""
    lines = ["* picker nodal cross-check", "V1 s0 0 DC 0 AC 1"]
    if gbw_hz is None:
        lines += [".subckt amp p n o", "E1 o 0 p n 1e9", ".ends amp"]
    else:
        wp = 2 * math.pi * gbw_hz / A0_DEFAULT
        lines += [
            ".subckt amp p n o",
            f"E1 x 0 p n {A0_DEFAULT:.17g}",
            "R1 x y 1",
            f"C1 y 0 {1.0 / wp:.17g}",
            "E2 o 0 y 0 1",
            ".ends amp",
        ]
    last = len(stages) - 1
    for k, elements in enumerate(stages):

        def node(n, k=k):
            return {"0": "0", "in": f"s{k}", "out": f"s{k + 1}"}.get(n, f"k{k}_{n}")

        for el in elements:
            nodes = " ".join(node(n) for n in el.nodes)
            if el.kind == "OA":
                lines.append(f"X{el.name}_{k} {nodes} amp")
            else:
                lines.append(f"{el.kind}{el.name}_{k} {nodes} {el.value:.17g}")
    lines.append(f"Rload s{last + 1} 0 1e12")
    return lines


def ngspice_ac(stages, gbw_hz, tmp_path, f_lo=1.0, f_hi=1e6):
    """(f_hz, complex V(out)) from ``ngspice -b``, 20 points per decade."""
    out_node = f"s{len(stages)}"
    data = tmp_path / "ac.txt"
    text = "\n".join(
        deck(stages, gbw_hz)
        + [
            ".control",
            f"ac dec 20 {f_lo:g} {f_hi:g}",
            f"wrdata {data} vr({out_node}) vi({out_node})",
            ".endc",
            ".end",
            "",
        ]
    )
    cir = tmp_path / "check.cir"
    cir.write_text(text, encoding="ascii")
    proc = subprocess.run(
        ["ngspice", "-b", str(cir)], capture_output=True, text=True, timeout=60, check=False
    )
    # with only a .control block, batch mode ends with status 1 and the note "no
    # simulations run" (ngspice 39 as packaged by Debian); judge by the data written
    log = proc.stdout + proc.stderr
    assert data.exists() and "error" not in log.lower(), log
    table = np.loadtxt(data)  # wrdata: freq, re, freq, im per row
    return table[:, 0], table[:, 1] + 1j * table[:, 3]


def compare(h_ours, h_spice):
    keep = magnitude_db(h_spice) > -100.0
    assert keep.sum() > 20
    d_mag = np.abs(magnitude_db(h_ours) - magnitude_db(h_spice))[keep]
    d_ph = np.abs(np.degrees(np.angle(h_ours / h_spice)))[keep]
    assert d_mag.max() < 0.1, f"magnitude differs by {d_mag.max():.3g} dB"
    assert d_ph.max() < 0.5, f"phase differs by {d_ph.max():.3g} degrees"
    return d_mag.max()


@pytest.mark.parametrize("gbw", [None, GBW], ids=["ideal", "gbw-1MHz"])
@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_each_topology_against_ngspice(key, gbw, tmp_path):
    _need_ngspice()
    topo = REGISTRY[key]
    values = topo.synthesize(
        StageTarget(1500.0, None if topo.order == 1 else 1.8, 2.0 if topo.sets_gain else None)
    )
    elements = topo.netlist(values)
    f, h_spice = ngspice_ac([elements], gbw, tmp_path)
    compare(nodal_response(elements, f, gbw_hz=gbw), h_spice)


@pytest.mark.parametrize(
    "response, btype",
    [("butterworth", "lowpass"), ("chebyshev", "highpass"), ("bessel", "lowpass")],
)
def test_cascade_against_ngspice(response, btype, tmp_path):
    _need_ngspice()
    stages = [
        t.netlist(t.synthesize(s))
        for t, s in plan_stages(btype, response=response, order=7, fc_hz=2000.0, gain=3.0)
    ]
    f, h_spice = ngspice_ac(stages, GBW, tmp_path)
    compare(cascade_response(stages, f, gbw_hz=GBW), h_spice)
