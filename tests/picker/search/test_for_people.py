"""The shells' search policy: far-off targets refused at once, look-alikes shown once."""

from __future__ import annotations

import math

import pytest

from picker.errors import NoDesignError
from picker.filters import get_topology
from picker.parts import StageTarget
from picker.search import search
from stock.model import Capacitor, Resistor, Stock

# A small invented bench: two lines of 10k in one drawer (interchangeable pieces).
STOCK = Stock(
    resistors=(
        Resistor(10e3, 4, 0.01, location="A1", index=0, line=1),
        Resistor(10e3, 4, 0.01, location="A1", index=1, line=5),
        Resistor(22e3, 4, 0.01, location="A2", index=2, line=9),
    ),
    capacitors=(Capacitor(10e-9, 4, 0.05, dielectric="C0G", location="C1", index=0, line=13),),
)


def first_order(f0_hz):
    return [(get_topology("inverting-lowpass"), StageTarget(f0_hz, None, 1.0))]


def test_far_off_corner_is_refused_naming_the_reach():
    # f0 = 1/(2 pi R C): the slowest corner here is 1/(2 pi * 44k * 10n) = 361.7 Hz
    # (22k + 22k in series with the one capacitor value; common practice formula).
    with pytest.raises(NoDesignError, match=r"needs f0 1 Hz, lower than the parts on hand"):
        search(STOCK, first_order(1.0), for_people=True)


def test_without_the_policy_the_exact_far_off_best_is_still_found():
    result = search(STOCK, first_order(1.0))
    best = result.candidates[0]
    # the largest R (22k + 22k) with the only C gives the nearest corner
    r2 = dict(best.stages[0].values())["R2"]
    assert math.isclose(r2, 44e3, rel_tol=1e-12)


def test_look_alike_candidates_are_shown_once():
    # 1/(2 pi 10k 10n) = 1591.55 Hz: the two 10k lines in drawer A1 are interchangeable.
    target = 1 / (2 * math.pi * 10e3 * 10e-9)
    plain = search(STOCK, first_order(target), top=5)
    people = search(STOCK, first_order(target), top=5, for_people=True)
    assert plain.candidates[0].score == people.candidates[0].score

    def look(c):
        return tuple(
            (n, a.arrangement, tuple(sorted((p.value, p.location) for p in a.parts)))
            for n, a in c.stages[0].positions
        )

    plain_looks = [look(c) for c in plain.candidates]
    people_looks = [look(c) for c in people.candidates]
    assert len(set(plain_looks)) < len(plain_looks)  # the plain list repeats
    assert len(set(people_looks)) == len(people_looks)  # the shown list does not
