"""Reading a stage as marked: topology key, positions, values, tolerances, and refusals."""

from __future__ import annotations

import pytest

from picker.errors import DesignError
from picker.filters import REGISTRY
from picker.repair.marked import listing, parse_stage, parse_stage_text

SK = ["R1=10k", "R2=10k", "C1=22n", "C2=10n"]


def test_values_rkm_and_si_and_tolerance():
    st = parse_stage("sallen-key-lowpass", ["r1=4k7/1%", "R2=4.7k", "C1=2n2", "c2=1e-9/2%"])
    assert [p.name for p in st.parts] == ["R1", "R2", "C1", "C2"]  # topology order
    # RKM 4k7 = 4.7 kohm, 2n2 = 2.2 nF (IEC 60062 RKM code)
    assert st.values() == pytest.approx({"R1": 4700.0, "R2": 4700.0, "C1": 2.2e-9, "C2": 1e-9})
    r1, r2, c1, c2 = st.parts
    assert (r1.tolerance, r1.assumed) == (pytest.approx(0.01), False)
    assert (c2.tolerance, c2.assumed) == (pytest.approx(0.02), False)
    # no tolerance given: the stock file's defaults, 5 % resistors and 10 % capacitors
    # (the stock file format's documented defaults), marked assumed
    assert (r2.tolerance, r2.assumed) == (0.05, True)
    assert (c1.tolerance, c1.assumed) == (0.10, True)


def test_stage_text_form():
    st = parse_stage_text("non-inverting-lowpass R1=10k C1=15n")
    assert st.topology == "non-inverting-lowpass" and st.values()["C1"] == pytest.approx(15e-9)


@pytest.mark.parametrize(
    "key, texts, words",
    [
        ("sallen-key-bandstop", SK, ["unknown topology", "sallen-key-lowpass", "--list"]),
        ("sallen-key-lowpass", SK + ["R3=1k"], ["no position 'R3'", "R1 (input resistor)"]),
        ("sallen-key-lowpass", SK[:3], ["no value for C2", "C2 (capacitor to ground)"]),
        ("sallen-key-lowpass", SK + ["r1=1k"], ["R1 is given twice"]),
        ("sallen-key-lowpass", ["R1=10q"] + SK[1:], ["R1=10q", "unknown unit"]),
        (
            "sallen-key-lowpass",
            ["R1=10n"] + SK[1:],
            ["R1=10n", "10 nΩ is not a plausible resistor"],
        ),
        ("sallen-key-lowpass", ["R1=0"] + SK[1:], ["not a plausible resistor"]),
        ("sallen-key-lowpass", ["R1=-5k"] + SK[1:], ["not a plausible resistor"]),
        ("sallen-key-lowpass", SK[:3] + ["C2=10"], ["not a plausible capacitor"]),
        ("sallen-key-lowpass", SK[:3] + ["C2=10n/5"], ["tolerance", "percentage"]),
        ("sallen-key-lowpass", SK[:3] + ["C2=10n/150%"], ["0% .. 100%"]),
        ("sallen-key-lowpass", SK[:3] + ["C2"], ["write NAME=VALUE"]),
        ("sallen-key-lowpass", SK[:3] + ["C2="], ["write NAME=VALUE"]),
    ],
)
def test_refusals_name_the_reason(key, texts, words):
    with pytest.raises(DesignError) as info:
        parse_stage(key, texts)
    for w in words:
        assert w in str(info.value)


def test_listing_names_every_topology_and_position():
    rows = {key: positions for key, _, positions in listing()}
    assert set(rows) == set(REGISTRY)
    for key, positions in rows.items():
        assert [name for name, _, _ in positions] == list(REGISTRY[key].position_names())
