"""Temperature drift figures against the EIA-198 class limits, and the stage drift."""

from __future__ import annotations

import math

import pytest

from picker.budget import budget
from picker.budget.temperature import piece_drift
from tests.picker.budget.helpers import candidate, piece, stage

SPAN = (0.0, 70.0)


@pytest.mark.parametrize(
    "dielectric, lo, hi, rated",
    [
        # EIA-198 class 2 letter codes: X = -55 C, Y = -30 C; 5 = +85 C, 7 = +125 C;
        # R = +/-15 %, V = +22 / -82 %
        ("X7R", -0.15, 0.15, (-55, 125)),
        ("X5R", -0.15, 0.15, (-55, 85)),
        ("Y5V", -0.82, 0.22, (-30, 85)),
    ],
)
def test_class_2_ceramics_take_the_whole_eia_198_band(dielectric, lo, hi, rated):
    d = piece_drift("C1", piece("capacitor", 10e-9, 0.1, dielectric=dielectric), SPAN)
    assert (d.lo, d.hi) == pytest.approx((lo, hi))
    assert not d.outside_rated
    assert piece_drift(
        "C1", piece("capacitor", 10e-9, 0.1, dielectric=dielectric), (rated[0] - 1, 25.0)
    ).outside_rated
    assert piece_drift(
        "C1", piece("capacitor", 10e-9, 0.1, dielectric=dielectric), (25.0, rated[1] + 1)
    ).outside_rated


@pytest.mark.parametrize("dielectric", ["C0G", "NP0"])
def test_class_1_is_0_plus_minus_30_ppm_per_kelvin(dielectric):
    """EIA-198 class 1 C0G: 0 +/- 30 ppm/K; over 0..70 C the largest |T - 25| is 45 K."""
    d = piece_drift("C1", piece("capacitor", 1e-9, 0.05, dielectric=dielectric), SPAN)
    assert (d.lo, d.hi) == pytest.approx((-30e-6 * 45, 30e-6 * 45))


@pytest.mark.parametrize(
    "dielectric, per_k",
    [
        ("polyester", 400e-6),  # about +400 ppm/K, common practice
        ("polypropylene", -200e-6),  # about -200 ppm/K, common practice
    ],
)
def test_film_figures_are_signed_typical_values(dielectric, per_k):
    d = piece_drift("C1", piece("capacitor", 1e-9, 0.05, dielectric=dielectric), SPAN)
    assert sorted((d.lo, d.hi)) == pytest.approx(sorted((per_k * -25, per_k * 45)))
    assert "common practice" in d.figure


def test_resistor_tempco_from_the_line_or_assumed():
    given = piece_drift("R1", piece("resistor", 10e3, 0.01, tempco=50e-6), SPAN)
    assert (given.lo, given.hi) == pytest.approx((-50e-6 * 45, 50e-6 * 45))
    assert not given.assumed
    assumed = piece_drift("R1", piece("resistor", 10e3, 0.01), SPAN)
    assert (assumed.lo, assumed.hi) == pytest.approx((-100e-6 * 45, 100e-6 * 45))
    assert assumed.assumed and "assumed" in assumed.figure
    unknown = piece_drift("C1", piece("capacitor", 10e-9, 0.1), SPAN)
    assert unknown.assumed and (unknown.lo, unknown.hi) == (-0.15, 0.15)


def test_rc_stage_drift_is_the_corner_product_of_the_piece_bands():
    """f0 = 1/(2 pi R C): the extremes are at R and C both low or both high (from memory)."""
    choice = stage(
        "non-inverting-lowpass",
        {"R1": 10e3, "C1": 10e-9},
        tol=0.01,
        r_line={"tempco": 50e-6},
        c_line={"dielectric": "C0G"},
    )
    f0 = choice.achieved.f0_hz
    t = budget(candidate(choice), trials=100).stage_json(0)["temperature"]
    r, c = 50e-6 * 45, 30e-6 * 45
    assert t["f0"] == pytest.approx([f0 / ((1 + r) * (1 + c)), f0 / ((1 - r) * (1 - c))])
    assert t["span_c"] == [0.0, 70.0] and t["q"] is None


def test_x7r_sallen_key_drifts_by_the_class_band():
    """Both capacitors +/-15 %: f0 from 1/sqrt(1.15^2) to 1/sqrt(0.85^2) of nominal, with the
    resistors' assumed 100 ppm/K on top (corner product)."""
    choice = stage(
        "sallen-key-lowpass",
        {"R1": 10e3, "R2": 10e3, "C1": 22e-9, "C2": 10e-9},
        c_line={"dielectric": "X7R"},
    )
    f0 = choice.achieved.f0_hz
    t = budget(candidate(choice), trials=100, temp=(-20.0, 85.0)).stage_json(0)["temperature"]
    r = 100e-6 * 60  # largest |T - 25| is 60 K
    assert t["f0"] == pytest.approx([f0 / (1.15 * (1 + r)), f0 / (0.85 * (1 - r))])
    q = choice.achieved.q  # Q ~ sqrt(C1 / C2): extremes 0.85/1.15
    assert t["q"][0] == pytest.approx(q * math.sqrt(0.85 / 1.15), rel=1e-3)
    assert t["q"][1] == pytest.approx(q * math.sqrt(1.15 / 0.85), rel=1e-3)


def test_span_outside_the_rating_warns():
    choice = stage("non-inverting-lowpass", {"R1": 10e3, "C1": 10e-9}, c_line={"dielectric": "X5R"})
    b = budget(candidate(choice), trials=100, temp=(0.0, 100.0))
    assert any("rated temperature range of C1" in w for w in b.warnings)
    b = budget(candidate(choice), trials=100, temp=(0.0, 70.0))
    assert not any("rated temperature range" in w for w in b.warnings)
