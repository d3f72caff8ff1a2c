"""What a pick answers, in words, and how that differs from the targets now (no textual).

A candidate is chosen for the targets of the search that found it; the form may have
changed since. The chosen pane and the build dialog name the targets the pick answers
and, when they are not the current ones, every field that differs, by the form's own
labels ("fc 1 kHz -> 2 kHz", "R min 1k -> 2k2").
"""

from __future__ import annotations

from collections.abc import Callable

from picker.ui.targets_form import TEXT_FIELDS, Targets
from stock.values import format_rkm


def _hz(value: float) -> str:
    return f"{value:g} Hz"


def _plain(value) -> str:
    return "blank" if value is None else f"{value:g}"


def _ohm(value: float) -> str:
    return format_rkm(value, kind="resistor")


def _farad(value: float) -> str:
    return format_rkm(value, kind="capacitor")


def _hz_or_blank(value: float | None) -> str:
    return "blank" if value is None else _hz(value)


def _percent(value: float) -> str:
    return f"{value * 100:g}%"


def _span(value: tuple[float, float]) -> str:
    return f"{value[0]:g}..{value[1]:g}"


def _tick(value: bool) -> str:
    return "ticked" if value else "not ticked"


# attribute -> (label as in the form, how the value reads)
FIELDS: dict[str, tuple[str, Callable]] = {
    "response_type": ("type", str),
    "response": ("response", str),
    "order": (TEXT_FIELDS["order"][0], str),
    "fc_hz": (TEXT_FIELDS["fc"][0], _hz),
    "gain": (TEXT_FIELDS["gain"][0], _plain),
    "q": (TEXT_FIELDS["q"][0], _plain),
    "ripple_db": (TEXT_FIELDS["ripple"][0], _plain),
    "family": ("circuit", lambda v: v or "any"),
    "r_min": (TEXT_FIELDS["r_min"][0], _ohm),
    "r_max": (TEXT_FIELDS["r_max"][0], _ohm),
    "c_min": (TEXT_FIELDS["c_min"][0], _farad),
    "c_max": (TEXT_FIELDS["c_max"][0], _farad),
    "singles": ("single pieces only", _tick),
    "allow_polarized": ("allow polarized", _tick),
    # the order from a specification, and the error budget's inputs (its budget was
    # computed with those of the pick)
    "stopband_hz": (TEXT_FIELDS["stopband"][0], _hz_or_blank),
    "attenuation_db": (TEXT_FIELDS["attenuation"][0], _plain),
    "window": (TEXT_FIELDS["window"][0], _percent),
    "temp": (TEXT_FIELDS["temp"][0], _span),
    "supply": (TEXT_FIELDS["supply"][0], _plain),
    "vout_peak": (TEXT_FIELDS["vout"][0], _plain),
}


def answers(targets: Targets) -> str:
    """The main targets of a pick: type, response, order, fc, gain."""
    return (
        f"{targets.response_type} {targets.response}, order {targets.order}, "
        f"fc {_hz(targets.fc_hz)}, gain {_plain(targets.gain)}"
    )


def differences(pick: Targets | None, now: Targets | None) -> list[str]:
    """Each field where the pick's targets and the current ones differ, in words.

    ``now`` None: the form has a field marked error, so nothing can be compared.
    """
    if pick is None:
        return []
    if now is None:
        return ["the targets form has a field marked error (pane 2)"]
    out = []
    for attr, (label, shown) in FIELDS.items():
        was, is_now = getattr(pick, attr), getattr(now, attr)
        if was != is_now:
            out.append(f"{label} {shown(was)} -> {shown(is_now)}")
    return out
