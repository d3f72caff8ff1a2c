"""Designs built directly from stock records, for the export, build and netlist tests."""

from __future__ import annotations

from picker.export import load_design, save_design
from picker.parts import Arrangement, Candidate, Piece, StageChoice, StageTarget
from stock.file import load
from stock.model import Capacitor, OpAmp, Resistor, Stock

STOCK_TEXT = """\
# bench drawers (invented sample)
[stock]
name = "test bench"

[[resistor]]
value = "15k"
qty = 4
tolerance = "1%"
location = "A1, left"

[[resistor]]
value = "910R"
qty = 2
tolerance = "1%"
location = "A2"
measured = ["908.5"]   # one piece read on the meter

[[resistor]]
value = "7k5"
qty = 3
tolerance = "1%"
location = "A10"

[[resistor]]
value = "470R"
qty = 5
location = "A2"

[[capacitor]]
value = "10n"
qty = 3
tolerance = "5%"
dielectric = "C0G"
location = "C1"

[[capacitor]]
value = "100u"
qty = 1
dielectric = "electrolytic"
voltage = "16V"
location = "C9"

[[opamp]]
name = "dual JFET-input"
gbw = "3MHz"
channels = 2
supply = "30V"
qty = 2
location = "IC tray"
"""


def stock_records(path=None, sha=None) -> Stock:
    """The records ``STOCK_TEXT`` stands for, written out by hand (header lines counted)."""
    return Stock(
        resistors=(
            Resistor(15e3, 4, 0.01, False, location="A1, left", line=5, index=0),
            Resistor(910.0, 2, 0.01, False, location="A2", measured=(908.5,), line=11, index=1),
            Resistor(7.5e3, 3, 0.01, False, location="A10", line=18, index=2),
            Resistor(470.0, 5, location="A2", line=24, index=3),
        ),
        capacitors=(
            Capacitor(10e-9, 3, 0.05, False, dielectric="C0G", location="C1", line=29, index=0),
            Capacitor(
                100e-6,
                1,
                dielectric="electrolytic",
                polarized=True,
                voltage=16.0,
                location="C9",
                line=36,
                index=1,
            ),
        ),
        opamps=(
            OpAmp(
                "dual JFET-input",
                3e6,
                2,
                channels=2,
                supply=30.0,
                location="IC tray",
                line=43,
                index=0,
            ),
        ),
        name="test bench",
        path=path,
        sha256=sha,
    )


def lowpass_candidate(stock: Stock) -> Candidate:
    """First-order inverting low-pass, gain about 2, corner about 1 kHz.

    R1 = 7k5 + 470R in series (7970 ohm), R2 = 15k + 910R (the measured 908.5 ohm piece)
    in series, C1 = 10n. Gain R2/R1 and corner 1/(2 pi R2 C1) (inverting integrator with
    resistive feedback, common practice).
    """
    r15k, r910, r7k5, r470 = stock.resistors
    c10n = stock.capacitors[0]
    r1 = Arrangement("series", (Piece(r7k5, 7.5e3, 0.01), Piece(r470, 470.0, 0.05)))
    r2 = Arrangement("series", (Piece(r15k, 15e3, 0.01), Piece(r910, 908.5, 0.01, 0)))
    c1 = Arrangement("single", (Piece(c10n, 10e-9, 0.05),))
    import math

    gain = r2.value / r1.value
    f0 = 1 / (2 * math.pi * r2.value * c1.value)
    stage = StageChoice(
        "inverting-lowpass",
        StageTarget(1000.0, None, 2.0),
        StageTarget(f0, None, gain),
        (("R1", r1), ("R2", r2), ("C1", c1)),
    )
    score = max(abs(f0 / 1000 - 1), abs(gain / 2 - 1))
    return Candidate(score=score, pieces=5, stages=(stage,), opamp=stock.opamps[0])


def two_stage_candidate(stock: Stock) -> Candidate:
    """The low-pass above, then a follower low-pass (R1 = 15k, C1 = 10n) as stage 2."""
    import math

    first = lowpass_candidate(stock)
    r = Arrangement("single", (Piece(stock.resistors[0], 15e3, 0.01),))
    c = Arrangement("single", (Piece(stock.capacitors[0], 10e-9, 0.05),))
    f0 = 1 / (2 * math.pi * 15e3 * 10e-9)
    stage = StageChoice(
        "non-inverting-lowpass", StageTarget(1000.0), StageTarget(f0), (("R1", r), ("C1", c))
    )
    return Candidate(score=first.score, pieces=7, stages=first.stages + (stage,), opamp=first.opamp)


REQUEST = {
    "type": "lowpass",
    "response": "butterworth",
    "order": 1,
    "fc_hz": 1000.0,
    "gain": 2.0,
    "ripple_db": None,
    "q": None,
    "topology": "inverting",
    "singles": False,
    "bounds": {"r_min": 1e3, "r_max": 1e6},
}


def saved_design(tmp_path, stock_file, make=lowpass_candidate):
    """The design ``make`` picks from ``stock_file``, saved as tmp_path/design.toml and read back."""
    stock = load(stock_file)
    path = tmp_path / "design.toml"
    save_design(path, candidate=make(stock), request=REQUEST, stock=stock)
    return load_design(path)
