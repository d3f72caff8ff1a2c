"""Practical warnings triggered by crafted candidates (docs/budget.md, docs/safety.md)."""

from __future__ import annotations

import json

import pytest

from picker.budget import budget
from picker.errors import DesignError
from tests.picker.budget.helpers import candidate, opamp, stage


def rc(r=10e3, c=10e-9, **kw):
    return stage("non-inverting-lowpass", {"R1": r, "C1": c}, **kw)


def warnings_of(choice, **kw):
    return budget(candidate(choice, opamp=kw.pop("oa", None)), trials=50, **kw).warnings


def has(ws, text):
    return any(text in w for w in ws)


def test_low_and_high_resistors():
    """Below 1 k loads the output, above 1 M adds noise and ib x R offset (common practice)."""
    assert has(warnings_of(rc(r=470.0, c=1e-6)), "Below 1 kohm")
    assert not has(warnings_of(rc(r=1e3, c=1e-6)), "Below 1 kohm")
    ws = warnings_of(rc(r=2.2e6, c=100e-12), oa=opamp(ib=1e-9))
    high = [w for w in ws if "Above 1 Mohm" in w]
    assert high and "2.2 mV" in high[0]  # 1 nA x 2.2 Mohm = 2.2 mV
    ws = warnings_of(rc(r=2.2e6, c=100e-12), oa=opamp(ib=None))
    assert has(ws, "bias current is not known")


@pytest.mark.parametrize(
    "dielectric, warns",
    [("X7R", True), ("X5R", True), ("Y5V", True), ("C0G", False), ("polypropylene", False)],
)
def test_class_2_ceramics(dielectric, warns):
    assert has(warnings_of(rc(c_line={"dielectric": dielectric})), "Class-2 ceramic") is warns


@pytest.mark.parametrize(
    "rating, warns", [(16.0, True), (22.0, True), (25.0, False), (50.0, False)]
)
def test_voltage_rating_against_supply_with_margin(rating, warns):
    """Rating >= 1.5 x supply (common practice): 15 V needs 22.5 V or more."""
    ws = warnings_of(rc(c_line={"dielectric": "C0G", "voltage": rating}), supply=15.0)
    assert has(ws, "Voltage rating below 1.5 x") is warns


def test_rating_unknown_and_op_amp_supply():
    ws = warnings_of(rc(c_line={"dielectric": "C0G"}), supply=15.0)
    assert has(ws, "Voltage rating not in the stock file")
    assert not has(warnings_of(rc(c_line={"dielectric": "C0G"})), "Voltage rating")
    ws = warnings_of(
        rc(c_line={"dielectric": "C0G", "voltage": 100.0}), supply=40.0, oa=opamp(supply=36.0)
    )
    assert has(ws, "above the op amp's 36 V maximum")


def test_polarized_parts_get_the_warning_and_the_safety_caution():
    ws = warnings_of(
        rc(c=10e-6, c_line={"dielectric": "electrolytic", "polarized": True, "voltage": 50.0}),
        supply=12.0,
    )
    assert has(ws, "Polarized capacitor in a filter position")
    caution = [w for w in ws if w.startswith("Caution")]
    assert caution and "local codes and licensed practice" in caution[0]
    assert "polarity" in caution[0] and "Discharge" in caution[0]


def test_high_supply_gets_the_caution():
    """Above about 50 V: discharge, isolation, rated parts (docs/safety.md)."""
    ws = warnings_of(rc(c_line={"dielectric": "C0G", "voltage": 250.0}), supply=60.0)
    assert has(ws, "Caution: the 60 V supply is above 50 V")
    ws = warnings_of(rc(c_line={"dielectric": "C0G", "voltage": 250.0}), supply=24.0)
    assert not has(ws, "Caution")


def test_input_impedance_is_stated():
    ws = warnings_of(stage("inverting-lowpass", {"R1": 4.7e3, "R2": 10e3, "C1": 10e-9}))
    note = [w for w in ws if w.startswith("Input impedance")]
    assert note and "4.7 kohm" in note[0] and "470 ohm" in note[0]


def test_assumed_tolerance_is_named():
    from picker.parts import Arrangement, Piece, StageChoice
    from stock.model import Resistor

    choice = rc()
    r = Resistor(value=10e3, qty=3)  # tolerance not given in the file
    positions = (("R1", Arrangement("single", (Piece(r, 10e3, r.tolerance),))), choice.positions[1])
    choice = StageChoice(choice.topology, choice.target, choice.achieved, positions)
    assert has(warnings_of(choice), "Tolerance assumed (the stock file gives none): stage 1 R1")


def test_json_is_plain_and_finite():
    b = budget(
        candidate(rc(c_line={"dielectric": "X7R"}), opamp=opamp()),
        trials=100,
        supply=12.0,
        vout_peak=3.0,
    )
    text = json.dumps(b.to_json(), allow_nan=False)
    back = json.loads(text)
    st = back["stages"][0]
    assert set(st) >= {"tolerance", "temperature", "opamp"}
    assert set(st["tolerance"]) >= {"f0", "gain", "q"}
    assert st["tolerance"]["gain"] is None and st["tolerance"]["q"] is None
    mc = back["monte_carlo"]
    assert mc["trials"] == 100 and 0 <= mc["yield"] <= 1 and mc["distribution"] == "uniform"
    assert mc["window"] == {"f0": 0.05, "gain": 0.05, "q": 0.05}
    assert sum(mc["histogram"]["counts"]) == 100
    assert b.candidate_json() == {"monte_carlo": b.to_json()["monte_carlo"]}


@pytest.mark.parametrize(
    "kw, text",
    [
        ({"trials": 0}, "trials 0"),
        ({"distribution": "triangular"}, "distribution 'triangular'"),
        ({"window": -0.1}, "window f0=-0.1"),
        ({"window": {"f": 0.1}}, "unknown key"),
        ({"temp": (70.0, 0.0)}, "temp (70.0, 0.0)"),
        ({"supply": -5.0}, "supply -5.0"),
    ],
)
def test_bad_options_raise_design_error_quoting_the_input(kw, text):
    with pytest.raises(DesignError) as err:
        budget(candidate(rc()), **kw)
    assert text in str(err.value)


@pytest.mark.parametrize(
    "pair, low",
    [
        # hand calculation: series adds, 100 + 47k = 47.1 kohm, well above 1 kohm
        (("series", (100.0, 47e3)), False),
        # hand calculation: parallel, 1k5 || 1k5 = 750 ohm, below 1 kohm though each is not
        (("parallel", (1.5e3, 1.5e3)), True),
        # hand calculation: 470 + 470 = 940 ohm, still below 1 kohm
        (("series", (470.0, 470.0)), True),
    ],
)
def test_resistor_range_is_judged_on_the_position(pair, low):
    """The 1 kohm and 1 Mohm limits (common practice) apply to what the circuit sees: the
    combined value of a position, not one piece of a pair."""
    choice = stage("non-inverting-lowpass", {"C1": 1e-6}, pairs={"R1": pair})
    ws = warnings_of(choice)
    assert has(ws, "Below 1 kohm") is low
    if low:
        w = next(w for w in ws if "Below 1 kohm" in w)
        assert "stage 1 R1" in w and f"({pair[0]} pair)" in w


def test_high_resistor_judged_on_the_position():
    # hand calculation: 2M2 || 2M2 = 1.1 Mohm is above 1 Mohm; 2M2 || 1M = 687.5 kohm is not
    above = stage("non-inverting-lowpass", {"C1": 1e-9}, pairs={"R1": ("parallel", (2.2e6, 2.2e6))})
    below = stage("non-inverting-lowpass", {"C1": 1e-9}, pairs={"R1": ("parallel", (2.2e6, 1e6))})
    assert has(warnings_of(above), "Above 1 Mohm")
    assert not has(warnings_of(below), "Above 1 Mohm")
