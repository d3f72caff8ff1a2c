"""Practical checks on a candidate, as plain-language warnings (docs/budget.md, docs/safety.md).

Thresholds, all common practice:

* resistors below 1 kohm load the op amp output (and the source); above 1 Mohm they add
  thermal noise and turn the op amp's input bias current into an offset of about ib x R.
  Both are judged on a position's combined value (a 100 ohm piece in series with 47 k is
  a 47.1 k position; two 1k5 in parallel are a 750 ohm one), which is what the circuit sees;
* class-2 ceramics (X7R, X5R, Y5V) drift with temperature and lose capacitance under DC
  bias: C0G/NP0 or film belong in filter positions;
* a capacitor's voltage rating should be at least ``VOLTAGE_MARGIN`` = 1.5 x the supply
  (the whole supply may appear across it);
* polarized capacitors in a filter position see a signal that swings both ways;
* the filter's input impedance: a source should be at least 10 x lower than it.

Where the work can hurt (supply above ``HIGH_VOLTAGE`` = 50 V, electrolytic or tantalum
parts) a caution is added and the user is referred to local codes and licensed practice.
"""

from __future__ import annotations

from stock.values import format_si

LOW_R = 1e3
HIGH_R = 1e6
VOLTAGE_MARGIN = 1.5
HIGH_VOLTAGE = 50.0
SOURCE_RATIO = 10.0
CLASS_2 = ("X7R", "X5R", "Y5V")


def _where(stage_no: int, label: str) -> str:
    return f"stage {stage_no} {label}"


def _pieces(stage_pieces):
    for i, sp in enumerate(stage_pieces, start=1):
        for label, piece in zip(sp.labels, sp.pieces, strict=False):
            yield i, label, piece


def _resistor_positions(stage_pieces):
    """(stage number, position label, combined value, arrangement) of every resistor position."""
    for i, sp in enumerate(stage_pieces, start=1):
        values = sp.positions(sp.nominal)
        for slot in sp.slots:
            if slot.kind == "resistor":
                yield i, slot.name, float(values[slot.name]), slot.arrangement


def part_checks(stage_pieces, *, opamp=None, supply=None) -> list[str]:
    """Warnings about the parts themselves (resistor range, dielectrics, ratings, polarity)."""
    low, high, class2, polar, no_rating, under = [], [], [], [], [], []
    for i, label, value, arrangement in _resistor_positions(stage_pieces):
        where = _where(i, label)
        pair = "" if arrangement == "single" else f" ({arrangement} pair)"
        if value < LOW_R:
            low.append(f"{where} {format_si(value, 'ohm')}{pair}")
        elif value > HIGH_R:
            high.append((f"{where}{pair}", value))
    for i, label, p in _pieces(stage_pieces):
        where = _where(i, label)
        line = p.line
        if line.kind == "resistor":
            continue
        if line.dielectric in CLASS_2:
            class2.append(f"{where} ({line.dielectric})")
        if line.polarized or line.dielectric in ("electrolytic", "tantalum"):
            polar.append(f"{where} ({line.dielectric or 'polarized'})")
        if supply is not None:
            if line.voltage is None:
                no_rating.append(where)
            elif line.voltage < VOLTAGE_MARGIN * supply:
                under.append(f"{where} rated {format_si(line.voltage, 'V')}")
    out = []
    if low:
        out.append(
            "Below 1 kohm, loads the op amp output and the source: "
            + ", ".join(low)
            + " (common practice: keep filter resistors from 1 k to 1 M)."
        )
    if high:
        names = ", ".join(f"{w} {format_si(v, 'ohm')}" for w, v in high)
        if opamp is not None and opamp.ib is not None:
            worst = max(v for _, v in high) * float(opamp.ib)
            tail = (
                f"; with the op amp's {format_si(float(opamp.ib), 'A')} input bias current "
                f"the offset is up to about {format_si(worst, 'V')} (ib x R)"
            )
        else:
            tail = "; the op amp's input bias current is not known, so its offset (ib x R) is not"
        out.append(f"Above 1 Mohm, adds thermal noise and bias-current offset: {names}{tail}.")
    if class2:
        out.append(
            "Class-2 ceramic in a filter position, drifts with temperature and loses "
            "capacitance with DC bias: "
            + ", ".join(class2)
            + " (common practice: use C0G/NP0 or film)."
        )
    if polar:
        out.append(
            "Polarized capacitor in a filter position: "
            + ", ".join(polar)
            + "; the signal swings both ways across it, and reverse voltage damages it: "
            "it needs a steady DC bias of the right polarity, and it drifts widely."
        )
    if under:
        out.append(
            f"Voltage rating below {VOLTAGE_MARGIN:g} x the {format_si(supply, 'V')} "
            "supply (common-practice margin): " + ", ".join(under) + "."
        )
    if no_rating:
        out.append(
            "Voltage rating not in the stock file: "
            + ", ".join(no_rating)
            + f"; check each is rated at least {VOLTAGE_MARGIN:g} x the "
            f"{format_si(supply, 'V')} supply."
        )
    if (
        opamp is not None
        and supply is not None
        and opamp.supply is not None
        and supply > opamp.supply
    ):
        out.append(
            f"The supply {format_si(supply, 'V')} is above the op amp's "
            f"{format_si(float(opamp.supply), 'V')} maximum ({opamp.name})."
        )
    assumed = [
        f"{_where(i, lbl)}"
        for i, lbl, p in _pieces(stage_pieces)
        if getattr(p.line, "tolerance_assumed", False) and p.measured is None
    ]
    if assumed:
        out.append("Tolerance assumed (the stock file gives none): " + ", ".join(assumed) + ".")
    return out


def caution(stage_pieces, *, supply=None) -> str | None:
    """The safety caution of docs/safety.md, when high voltage or polarized parts are involved."""
    polar = any(
        p.line.kind == "capacitor"
        and (p.line.polarized or p.line.dielectric in ("electrolytic", "tantalum"))
        for _, _, p in _pieces(stage_pieces)
    )
    high = supply is not None and supply > HIGH_VOLTAGE
    if not (polar or high):
        return None
    why = []
    if high:
        why.append(f"the {format_si(supply, 'V')} supply is above {HIGH_VOLTAGE:g} V")
    if polar:
        why.append("the design uses polarized capacitors")
    return (
        "Caution: " + " and ".join(why) + ". Discharge capacitors before touching the "
        "board, observe polarity, use parts rated for the voltage with margin, keep "
        "isolation, and follow local codes and licensed practice."
    )


def input_note(zin_ohm: float, at_hz: float) -> str:
    """The first stage's lowest input impedance, against the source."""
    if zin_ohm == float("inf"):
        return "Input impedance: no finite value found at the filter input over 0.01..100 f0."
    return (
        f"Input impedance: lowest about {format_si(zin_ohm, 'ohm')} (at "
        f"{format_si(at_hz, 'Hz')}, stage 1, over 0.01..100 f0); drive the filter from "
        f"a source below {format_si(zin_ohm / SOURCE_RATIO, 'ohm')} (10 x lower, common "
        f"practice)."
    )
