"""Each topology: analytic f0/Q/gain against nodal analysis of its own netlist, synthesis
round trips, netlist and position consistency.

The nodal check reads f0, Q and gain off H(j 2 pi f) by properties of the standard
second-order sections (from memory): at f0 a low-/high-pass section's response is purely
imaginary with |H(f0)| = Q |gain|, a band-pass section's is purely real with |H(f0)| =
|gain| and -3 dB bandwidth f0/Q; a first-order section is 3 dB down at f0.
"""

import math
import zlib

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from picker.analysis import nodal_response
from picker.errors import DesignError
from picker.filters import REGISTRY, get_topology
from picker.parts import StageTarget

KEYS = sorted(REGISTRY)
EXPECTED_KEYS = {
    "inverting-lowpass",
    "inverting-highpass",
    "non-inverting-lowpass",
    "non-inverting-lowpass-gain",
    "non-inverting-highpass",
    "non-inverting-highpass-gain",
    "sallen-key-lowpass",
    "sallen-key-lowpass-gain",
    "sallen-key-highpass",
    "sallen-key-highpass-gain",
    "mfb-lowpass",
    "mfb-highpass",
    "mfb-bandpass",
}


def test_registry_has_the_agreed_keys():
    # the keys agreed in the common brief
    assert set(REGISTRY) == EXPECTED_KEYS
    with pytest.raises(DesignError, match="unknown topology 'twin-t'; known: inverting-hi"):
        get_topology("twin-t")


def _h(topo, values, f):
    return nodal_response(topo.netlist(values), [f])[0]


def measured(topo, values, f_guess):
    """(f0, q, gain) read off the nodal response (see module docstring)."""
    lo, hi = f_guess / 300.0, f_guess * 300.0
    if topo.order == 1:
        far = _h(topo, values, lo / 1e5 if topo.response_type == "lowpass" else hi * 1e5)
        k = abs(far)
        f0 = brentq(
            lambda f: abs(_h(topo, values, f)) - k / math.sqrt(2.0),
            lo,
            hi,
            xtol=1e-12 * f_guess,
            rtol=1e-13,
        )
        return f0, None, k
    if topo.response_type == "bandpass":
        f0 = brentq(lambda f: _h(topo, values, f).imag, lo, hi, xtol=1e-12 * f_guess, rtol=1e-13)
        k = abs(_h(topo, values, f0))
        edge = lambda f: abs(_h(topo, values, f)) - k / math.sqrt(2.0)  # noqa: E731
        f1 = brentq(edge, lo, f0, xtol=1e-12 * f_guess, rtol=1e-13)
        f2 = brentq(edge, f0, hi, xtol=1e-12 * f_guess, rtol=1e-13)
        return f0, f0 / (f2 - f1), k
    f0 = brentq(lambda f: _h(topo, values, f).real, lo, hi, xtol=1e-12 * f_guess, rtol=1e-13)
    far = _h(topo, values, lo / 1e5 if topo.response_type == "lowpass" else hi * 1e5)
    k = abs(far)
    return f0, abs(_h(topo, values, f0)) / k, k


def random_values(topo, rng, n):
    """Component values, log-uniform: resistors 1 k..1 M, capacitors 100 p..1 u."""
    out = {}
    for p in topo.positions:
        lo, hi = (1e3, 1e6) if p.kind == "resistor" else (1e-10, 1e-6)
        out[p.name] = np.exp(rng.uniform(math.log(lo), math.log(hi), n))
    if "RB" in out:  # keep gain networks to 1 + RB/RA between 1.1 and 5
        out["RB"] = out["RA"] * rng.uniform(0.1, 4.0, n)
    return out


@pytest.mark.parametrize("key", KEYS)
def test_analytic_matches_nodal_at_random_values(key):
    topo = REGISTRY[key]
    rng = np.random.default_rng(zlib.crc32(key.encode()))
    values = random_values(topo, rng, 200)
    f0s, qs, gains = topo.characteristics(values)  # vectorised over all draws
    checked = 0
    for i in range(200):
        one = {name: float(v[i]) for name, v in values.items()}
        f0, q, gain = topo.characteristics(one)
        assert float(f0) == pytest.approx(f0s[i], rel=1e-12)
        if q is not None and not (0.05 < q < 30.0):
            continue  # unstable or extreme draws (possible with gain > 1)
        mf0, mq, mgain = measured(topo, one, float(f0))
        assert mf0 == pytest.approx(float(f0), rel=1e-7)
        assert mgain == pytest.approx(float(gain), rel=1e-7)
        if q is None:
            assert mq is None
        else:
            assert mq == pytest.approx(float(q), rel=1e-6)
        checked += 1
        if checked == 20:
            break
    assert checked >= 10


def _target_strategy(topo):
    f0 = st.floats(1.0, 1e5)
    q = st.floats(0.5, 10.0) if topo.order == 2 else st.none()
    if "-gain" in topo.key:
        gain = st.floats(1.05, 20.0)
    elif not topo.sets_gain:
        gain = st.none()
    else:
        gain = st.floats(0.1, 20.0)
    return st.builds(StageTarget, f0, q, gain)


@pytest.mark.parametrize("key", KEYS)
def test_synthesize_round_trip(key):
    topo = REGISTRY[key]

    @settings(max_examples=60, deadline=None)
    @given(target=_target_strategy(topo), c=st.floats(1e-10, 1e-6))
    def check(target, c):
        if topo.key == "mfb-bandpass" and target.gain >= 2 * target.q**2:
            with pytest.raises(DesignError, match="must be below 2 Q"):
                topo.synthesize(target, c=c)
            return
        values = topo.synthesize(target, c=c)
        assert set(values) == set(topo.position_names())
        assert all(v > 0 and math.isfinite(v) for v in values.values())
        f0, q, gain = topo.characteristics(values)
        assert f0 == pytest.approx(target.f0_hz, rel=1e-9)
        if target.q is None:
            assert q is None
        else:
            assert q == pytest.approx(target.q, rel=1e-9)
        assert gain == pytest.approx(1.0 if target.gain is None else target.gain, rel=1e-9)

    check()


@pytest.mark.parametrize("key", KEYS)
def test_netlist_names_positions_and_one_op_amp(key):
    topo = REGISTRY[key]
    target = StageTarget(1000.0, None if topo.order == 1 else 1.0, 1.5 if topo.sets_gain else None)
    elements = topo.netlist(topo.synthesize(target))
    amps = [e for e in elements if e.kind == "OA"]
    assert len(amps) == 1 and amps[0].nodes[2] == "out"
    passives = {e.name: e.kind for e in elements if e.kind != "OA"}
    assert passives == {p.name: {"resistor": "R", "capacitor": "C"}[p.kind] for p in topo.positions}
    nodes = {n for e in elements for n in e.nodes}
    assert {"in", "out", "0"} <= nodes
    assert all(p.role for p in topo.positions)
    assert topo.family in ("inverting", "non-inverting", "sallen-key", "mfb")


@pytest.mark.parametrize("key", ["sallen-key-lowpass", "sallen-key-lowpass-gain", "mfb-lowpass"])
def test_capacitor_ratio_below_minimum_is_refused(key):
    topo = REGISTRY[key]
    target = StageTarget(1000.0, 2.0, 1.5 if topo.sets_gain else None)
    with pytest.raises(DesignError, match="capacitor ratio .* is below"):
        topo.synthesize(target, ratio=1.01)
    values = topo.synthesize(target, ratio=40.0)  # a larger ratio is fine
    assert topo.characteristics(values)[1] == pytest.approx(2.0, rel=1e-9)


def test_sallen_key_default_is_equal_resistors():
    # unity-gain Sallen-Key with C1/C2 = 4 Q^2 gives R1 = R2 (common practice)
    values = get_topology("sallen-key-lowpass").synthesize(StageTarget(1000.0, 1.3066))
    assert values["R1"] == pytest.approx(values["R2"], rel=1e-6)
    assert values["C1"] / values["C2"] == pytest.approx(4 * 1.3066**2, rel=1e-12)


@pytest.mark.parametrize(
    "key, target, match",
    [
        ("sallen-key-lowpass-gain", StageTarget(1000.0, 0.7, 1.0), "needs a gain above 1"),
        ("non-inverting-highpass-gain", StageTarget(1000.0, None, 0.5), "got 0.5"),
        ("mfb-lowpass", StageTarget(1000.0, None, 1.0), "positive finite Q, got None"),
        ("inverting-lowpass", StageTarget(-3.0, None, 1.0), "f0 must be a positive .* got -3.0"),
        ("mfb-bandpass", StageTarget(1000.0, 0.5, 1.0), "centre gain 1 must be below 2 Q"),
    ],
)
def test_bad_targets(key, target, match):
    with pytest.raises(DesignError, match=match):
        get_topology(key).synthesize(target)


def test_missing_value_is_named():
    with pytest.raises(DesignError, match="position 'C2' is missing"):
        get_topology("sallen-key-lowpass").characteristics({"R1": 1e3, "R2": 1e3, "C1": 1e-9})


@pytest.mark.parametrize("key", KEYS)
def test_scalar_values_give_plain_floats(key):
    # scalars in, floats out (np.float64 is a float: JSON and formatting take it as is)
    topo = REGISTRY[key]
    values = topo.synthesize(
        StageTarget(1000.0, None if topo.order == 1 else 1.0, 1.5 if topo.sets_gain else None)
    )
    for x in topo.characteristics(values):
        assert x is None or isinstance(x, float)


@pytest.mark.parametrize(
    "key",
    [
        "sallen-key-lowpass",
        "sallen-key-lowpass-gain",
        "sallen-key-highpass",
        "sallen-key-highpass-gain",
        "mfb-lowpass",
    ],
)
def test_round_trip_with_a_chosen_capacitor_ratio(key):
    topo = REGISTRY[key]

    @settings(max_examples=60, deadline=None)
    @given(target=_target_strategy(topo), spread=st.floats(1.0, 50.0))
    def check(target, spread):
        k = 1.0 if target.gain is None else target.gain
        if key.startswith("sallen-key-lowpass") or key == "mfb-lowpass":
            ratio = spread * topo.min_ratio(target.q, k)  # at or above the minimum
        else:
            ratio = spread / 7.0  # any positive ratio works for the high-pass
        values = topo.synthesize(target, ratio=ratio)
        assert all(v > 0 for v in values.values())
        f0, q, gain = topo.characteristics(values)
        assert (f0, q, gain) == (
            pytest.approx(target.f0_hz, rel=1e-9),
            pytest.approx(target.q, rel=1e-9),
            pytest.approx(k, rel=1e-9),
        )

    check()
