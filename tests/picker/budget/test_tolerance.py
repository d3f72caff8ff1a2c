"""Tolerance corners, the Q range inside the box, and sensitivities."""

from __future__ import annotations

import math
from itertools import product

import numpy as np
import pytest

from picker.budget import budget
from picker.budget.pieces import stage_pieces
from picker.budget.tolerance import tolerance
from picker.filters import get_topology
from picker.parts import StageTarget, combine
from tests.picker.budget.helpers import candidate, stage


def sk_gain_by_hand(r1, r2, c1, c2, ra, rb):
    """Sallen-Key low-pass with gain K = 1 + RB/RA (standard result, from memory):
    f0 = 1/(2 pi sqrt(R1 R2 C1 C2)), Q = sqrt(R1 R2 C1 C2) / (C2 (R1 + R2) + R1 C1 (1 - K))."""
    k = 1.0 + rb / ra
    root = math.sqrt(r1 * r2 * c1 * c2)
    return 1.0 / (2 * math.pi * root), root / (c2 * (r1 + r2) + r1 * c1 * (1 - k)), k


def enumerate_corners(choice):
    """Every corner of every piece, plain Python, one corner at a time."""
    pieces = [(name, arr, p) for name, arr in choice.positions for p in arr.parts]
    out = []
    for signs in product((-1.0, 1.0), repeat=len(pieces)):
        vals = {}
        k = 0
        for name, arr in choice.positions:
            got = []
            for p in arr.parts:
                got.append(p.value * (1 + signs[k] * p.tolerance))
                k += 1
            vals[name] = combine(arr.kind, arr.arrangement, got)
        out.append(
            sk_gain_by_hand(vals["R1"], vals["R2"], vals["C1"], vals["C2"], vals["RA"], vals["RB"])
        )
    return out


def sk_gain_stage():
    # R1 a series pair, C1 a parallel pair, RB a series pair: 9 pieces, 512 corners
    return stage(
        "sallen-key-lowpass-gain",
        {"R2": 10e3, "C2": 10e-9, "RA": 10e3},
        tol=0.01,
        ctol=0.05,
        pairs={
            "R1": ("series", (8.2e3, 1.8e3)),
            "C1": ("parallel", (10e-9, 4.7e-9)),
            "RB": ("series", (3.3e3, 2.2e3)),
        },
    )


def test_corner_extremes_match_an_independent_enumeration():
    choice = sk_gain_stage()
    topo = get_topology(choice.topology)
    res = tolerance(topo, stage_pieces(choice), sets_gain=True)
    corners = enumerate_corners(choice)
    assert res.corners == 2**9 and res.exhaustive
    f0s, qs, gains = zip(*corners, strict=False)
    assert res.f0 == pytest.approx((min(f0s), max(f0s)), rel=1e-12)
    assert res.gain == pytest.approx((min(gains), max(gains)), rel=1e-12)
    # the Q range contains every corner
    assert res.q[0] <= min(qs) * (1 + 1e-12) and res.q[1] >= max(qs) * (1 - 1e-12)


def test_q_peak_inside_the_box_is_found():
    """Unity Sallen-Key: Q = sqrt(C1/C2) sqrt(R1 R2)/(R1 + R2) (standard result, from memory)
    peaks at R1 = R2. R1 = 10k +/-10 % spans R2 = 10.5k +/-1 % but no corner has R1 = R2,
    so the true largest Q, 0.5 sqrt(C1max / C2min), lies inside the box."""
    choice = stage(
        "sallen-key-lowpass",
        {"R1": 10e3, "R2": 10.5e3, "C1": 20e-9, "C2": 10e-9},
        tol=0.01,
        ctol=0.02,
        tols={"R1": 0.10},
    )
    res = tolerance(get_topology(choice.topology), stage_pieces(choice), sets_gain=False)
    true_max = 0.5 * math.sqrt(20e-9 * 1.02 / (10e-9 * 0.98))
    corner_max = max(
        math.sqrt(c1 / c2) * math.sqrt(r1 * r2) / (r1 + r2)
        for r1 in (9e3, 11e3)
        for r2 in (10.5e3 * 0.99, 10.5e3 * 1.01)
        for c1 in (20e-9 * 0.98, 20e-9 * 1.02)
        for c2 in (10e-9 * 0.98, 10e-9 * 1.02)
    )
    assert corner_max < true_max * (1 - 5e-5)  # the corners really miss it
    assert true_max * (1 - 1e-5) <= res.q[1] <= true_max * (1 + 1e-12)


@pytest.mark.parametrize(
    "key, values",
    [
        ("sallen-key-lowpass", {"R1": 10e3, "R2": 22e3, "C1": 22e-9, "C2": 4.7e-9}),
        ("sallen-key-highpass", {"R1": 10e3, "R2": 22e3, "C1": 22e-9, "C2": 4.7e-9}),
        ("mfb-lowpass", {"R1": 10e3, "R2": 10e3, "R3": 4.7e3, "C1": 47e-9, "C2": 2.2e-9}),
        ("mfb-bandpass", {"R1": 10e3, "R2": 1e3, "R3": 47e3, "C1": 10e-9, "C2": 10e-9}),
    ],
)
def test_f0_sensitivity_is_minus_half_for_the_rc_of_a_second_order_stage(key, values):
    """S(f0, R) = S(f0, C) = -1/2 for the R and C that set w0^2 = 1/(R R C C) (handbook
    fact, from memory). For the MFB stages f0 depends on each R and C of its w0^2 term."""
    choice = stage(key, values)
    sens = {
        n: sf
        for n, sf, _, _ in tolerance(
            get_topology(key), stage_pieces(choice), sets_gain=True
        ).sensitivities
    }
    if key == "mfb-bandpass":
        # w0^2 = (1/R1 + 1/R2)/(R3 C1 C2): S_R1 + S_R2 = -1/2, S_R3 = S_C = -1/2
        assert sens["R1"] + sens["R2"] == pytest.approx(-0.5, abs=1e-6)
        assert [sens[n] for n in ("R3", "C1", "C2")] == pytest.approx([-0.5] * 3, abs=1e-6)
        return
    expect = {"R1": -0.5, "R2": -0.5, "C1": -0.5, "C2": -0.5, "R3": -0.5}
    if key == "mfb-lowpass":
        expect["R1"] = 0.0  # w0^2 = 1/(R2 R3 C1 C2); R1 sets the gain only
    assert sens == pytest.approx({n: expect[n] for n in sens}, abs=1e-6)


def test_q_and_gain_sensitivities_of_sallen_key():
    """Unity SK, equal R: S(Q,R1) = S(Q,R2) = 0, S(Q,C1) = +1/2, S(Q,C2) = -1/2; a
    non-inverting gain K = 1 + RB/RA has S(K,RB) = -S(K,RA) = (K-1)/K (from memory)."""
    choice = stage("sallen-key-lowpass", {"R1": 10e3, "R2": 10e3, "C1": 22e-9, "C2": 10e-9})
    s = {
        n: (sf, sq)
        for n, sf, sq, _ in tolerance(
            get_topology("sallen-key-lowpass"), stage_pieces(choice), sets_gain=False
        ).sensitivities
    }
    assert [s[n][1] for n in ("R1", "R2", "C1", "C2")] == pytest.approx([0, 0, 0.5, -0.5], abs=1e-6)
    choice = stage("non-inverting-lowpass-gain", {"R1": 10e3, "C1": 10e-9, "RA": 10e3, "RB": 30e3})
    g = {
        n: sg
        for n, _, _, sg in tolerance(
            get_topology(choice.topology), stage_pieces(choice), sets_gain=True
        ).sensitivities
    }
    assert g["RB"] == pytest.approx(0.75, abs=1e-6) and g["RA"] == pytest.approx(-0.75, abs=1e-6)
    assert g["R1"] == pytest.approx(0.0, abs=1e-9)


def test_first_order_f0_sensitivity_is_minus_one():
    """f0 = 1/(2 pi R C): S(f0,R) = S(f0,C) = -1 (from memory)."""
    choice = stage("non-inverting-lowpass", {"R1": 10e3, "C1": 10e-9})
    res = tolerance(get_topology(choice.topology), stage_pieces(choice), sets_gain=False)
    assert [(n, round(sf, 6), sq) for n, sf, sq, _ in res.sensitivities] == [
        ("R1", -1.0, None),
        ("C1", -1.0, None),
    ]
    assert res.q is None and res.gain is None


def test_budget_json_carries_corner_ranges_and_value_error():
    choice = sk_gain_stage()
    target = StageTarget(choice.achieved.f0_hz * 1.01, choice.achieved.q, choice.achieved.gain)
    choice = type(choice)(choice.topology, target, choice.achieved, choice.positions)
    b = budget(candidate(choice), trials=200)
    js = b.stage_json(0)
    tol = js["tolerance"]
    f0s = [c[0] for c in enumerate_corners(choice)]
    assert tol["f0"] == pytest.approx([min(f0s), max(f0s)], rel=1e-12)
    assert js["value_error"]["f0"] == pytest.approx(1 / 1.01 - 1, rel=1e-9)
    assert js["value_error"]["q"] == pytest.approx(0.0, abs=1e-12)
    assert js["sensitivity"]["R2"]["f0"] == pytest.approx(-0.5, abs=1e-6)
    assert np.isfinite(tol["q"]).all()


def test_stage_pushed_past_its_stability_limit_is_reported():
    """Sallen-Key with K = 1 + RB/RA: Q's denominator C2 (R1 + R2) + R1 C1 (1 - K) is zero
    at K = 3 for equal parts (standard result, from memory); K = 2.95 with 5 % parts can
    cross it."""
    choice = stage(
        "sallen-key-lowpass-gain",
        {"R1": 10e3, "R2": 10e3, "C1": 10e-9, "C2": 10e-9, "RA": 10e3, "RB": 19.5e3},
        tol=0.05,
    )
    b = budget(candidate(choice, choice), trials=500)
    assert any("can become unstable" in w for w in b.warnings)
    assert b.stage_json(0)["tolerance"]["q"][1] is None  # unbounded: null in JSON
    safe = stage(
        "sallen-key-lowpass-gain",
        {"R1": 10e3, "R2": 10e3, "C1": 10e-9, "C2": 10e-9, "RA": 10e3, "RB": 10e3},
        tol=0.01,
    )
    assert not any("unstable" in w for w in budget(candidate(safe), trials=50).warnings)


def test_too_many_pieces_fall_back_to_sampled_corners(monkeypatch):
    from picker.budget import tolerance as tol_mod

    monkeypatch.setattr(tol_mod, "MAX_CORNER_PIECES", 3)
    choice = sk_gain_stage()
    res = tol_mod.tolerance(get_topology(choice.topology), stage_pieces(choice), sets_gain=True)
    assert not res.exhaustive and res.corners == 8 and "seeded random corners" in res.method
    f0s = [c[0] for c in enumerate_corners(choice)]
    assert min(f0s) <= res.f0[0] <= res.f0[1] <= max(f0s)
    b = budget(candidate(choice), trials=50)
    assert any("too many for every corner" in w for w in b.warnings)
