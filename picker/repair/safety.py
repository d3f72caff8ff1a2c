"""The cautions every repair report, help text and screen carries (docs/safety.md).

Repairs happen on equipment that has been powered, often from the mains or at high
voltage. These are the usual cautions of the trade (common practice); they do not
replace training, local codes or licensed practice.
"""

from __future__ import annotations

CAUTIONS = (
    "Unplug the equipment and isolate it from the mains (and any other source) "
    "before you open it or touch the board.",
    "Discharge capacitors through a suitable resistor and verify with a meter that "
    "they read near zero volts; large ones can hold a charge long after power-off.",
    "Fit parts rated for the circuit: a capacitor's voltage rating with margin over "
    "the working voltage (common practice: at least 1.5 x), a resistor's power and "
    "voltage rating, and the temperature range.",
    "Electrolytic and tantalum capacitors are polarized: fit them the right way round; "
    "reversed or over-voltage they can vent or burst.",
    "Local codes and licensed practice come first; mains and high-voltage work is for "
    "people qualified to do it.",
)

HEADLINE = "Safety: this is repair work on equipment that may have been powered."


def caution_lines() -> list[str]:
    """The headline and each caution on its own line, for reports and screens."""
    return [HEADLINE] + [f"- {c}" for c in CAUTIONS]


def help_epilog() -> str:
    """The cautions as a help-text paragraph (plain text, argparse keeps the layout)."""
    return "\n".join(["safety:"] + [f"  {c}" for c in CAUTIONS])
