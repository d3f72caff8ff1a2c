"""Check the keys of one ``[[resistor]]``, ``[[capacitor]]`` or ``[[opamp]]`` entry.

Every problem becomes one message ``file:line: kind key: 'bad text' ...; what is
accepted``, located at the key's own line when the line scan found it, else at the
entry's header. Plausible ranges are those of docs/stock-file.md.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from typing import Any

from stock import values as V
from stock.errors import ValueParseError
from stock.model import (
    DEFAULT_CAPACITOR_TOLERANCE,
    DEFAULT_METER_ACCURACY,
    DEFAULT_RESISTOR_TOLERANCE,
    DIELECTRICS,
    POLARIZED_BY_DEFAULT,
    Capacitor,
    OpAmp,
    Resistor,
)

# plausible nominal ranges (docs/stock-file.md): resistor 1 mOhm .. 1 TOhm, capacitor 0.1 pF .. 1 F
RANGES = {"resistor": (1e-3, 1e12, "1 mΩ .. 1 TΩ"), "capacitor": (1e-13, 1.0, "0.1 pF .. 1 F")}
GBW_RANGE = (1e3, 1e11)
# Largest qty (and channels) a line may hold: a million pieces is far beyond any drawer
# or reel set, and it keeps every sum of counts well inside 64-bit integers (TOML's
# integer range) for the search.
MAX_COUNT = 1_000_000

KEYS = {
    "resistor": (
        "value",
        "qty",
        "tolerance",
        "tempco",
        "power",
        "location",
        "note",
        "measured",
        "meter",
    ),
    "capacitor": (
        "value",
        "qty",
        "tolerance",
        "tempco",
        "dielectric",
        "polarized",
        "voltage",
        "location",
        "note",
        "measured",
        "meter",
    ),
    "opamp": ("name", "gbw", "slew", "channels", "supply", "ib", "qty", "location", "note"),
}

# case-insensitive spelling -> canonical (the letter O for the digit 0 is a common slip)
_DIELECTRIC_SPELLINGS = {d.lower(): d for d in DIELECTRICS}
_DIELECTRIC_SPELLINGS.update({"cog": "C0G", "npo": "NP0"})


def quote(value) -> str:
    """A parsed value in single quotes, as TOML spells it (``EntryChecker.q`` prefers
    the text as written in the file)."""
    return V.shown(value)


def canonical_dielectric(text: str) -> str | None:
    """``"c0g"`` -> ``"C0G"``, ``"Film"`` -> ``"film"``; None if unknown."""
    return _DIELECTRIC_SPELLINGS.get(text.strip().lower())


class EntryChecker:
    """Validate one entry; ``build()`` returns the model object or None, filling errors/warnings."""

    def __init__(
        self,
        kind: str,
        index: int,
        entry: dict,
        src: str,
        header: int,
        keylines,
        written: Callable[[int], str | None] | None = None,
    ):
        self.kind, self.index, self.entry = kind, index, entry
        self.src, self.header, self.keylines = src, header, keylines
        self.written = written
        self.errors: list[str] = []
        self.warnings: list[str] = []

    def q(self, key: str, raw) -> str:
        """``raw``, the value of ``key``, quoted as written in the file where known."""
        if not isinstance(raw, str) and self.written is not None:
            line = self.keylines.get(key)
            text = self.written(line) if line else None
            if text is not None:
                return V.shown(text)
        return V.shown(raw)

    def _as_written(self, key: str, raw, msg: str) -> str:
        """``msg`` of a value parser, with its quote of ``raw`` replaced by the file's text."""
        if isinstance(raw, str):
            return msg
        return msg.replace(V.shown(raw), self.q(key, raw), 1)

    # -- messages -----------------------------------------------------------------------
    def _where(self, key: str | None) -> str:
        line = self.keylines.get(key, self.header) if key else self.header
        return f"{self.src}:{line}: {self.kind} {key}" if key else f"{self.src}:{line}: {self.kind}"

    def error(self, key: str | None, msg: str) -> None:
        self.errors.append(f"{self._where(key)}: {msg}")

    def warn(self, key: str | None, msg: str) -> None:
        self.warnings.append(f"{self._where(key)}: {msg}")

    # -- field readers ------------------------------------------------------------------
    def _parsed(self, key, parser, *, required=False, lo=None, hi=None, span="", positive=True):
        if key not in self.entry:
            if required:
                self.error(key, f"missing; every [[{self.kind}]] needs {key} = ...")
            return None
        raw = self.entry[key]
        try:
            x = parser(raw)
        except ValueParseError as exc:
            self.error(key, self._as_written(key, raw, str(exc)))
            return None
        if positive and x <= 0:
            self.error(key, f"{self.q(key, raw)} must be above zero")
            return None
        if (lo is not None and x < lo) or (hi is not None and x > hi):
            self.error(key, f"{self.q(key, raw)} is outside the plausible range {span}")
            return None
        return x

    def _fraction(self, key, default):
        x = self._parsed(key, V.parse_percent, lo=0, hi=0.999999, span="0% .. 100%")
        return (default, True) if x is None else (x, False)

    def _text(self, key):
        raw = self.entry.get(key)
        if raw is None:
            return None
        if not isinstance(raw, str):
            self.error(
                key,
                f"{self.q(key, raw)} is {V.type_word(raw)}; write text in quotes, "
                f'e.g. {key} = "A3"',
            )
            return None
        return raw.strip() or None

    def _int(
        self, key, *, required, minimum, default=None, what="a whole number", maximum=MAX_COUNT
    ):
        if key not in self.entry:
            if required:
                self.error(key, f"missing; every [[{self.kind}]] needs {key} = <{what}>")
            return default
        raw = self.entry[key]
        shown = self.q(key, raw)
        if isinstance(raw, str):
            digits = raw.strip().replace("_", "")
            hint = (
                f"write the number without quotes, {key} = {digits}"
                if digits.isdigit() and len(digits) < 20
                else f"write {key} = <{what}>, a number without quotes"
            )
            self.error(key, f"{shown} is text; {hint}")
            return None
        if isinstance(raw, float):
            if math.isfinite(raw) and raw.is_integer() and abs(raw) <= maximum:
                self.error(
                    key,
                    f"{shown} is {V.type_word(raw)}; {key} must be {what}, written "
                    f"without a point or exponent: {key} = {int(raw)}",
                )
            else:
                self.error(key, f"{shown} is {V.type_word(raw)}; {key} must be {what}")
            return None
        if isinstance(raw, bool) or not isinstance(raw, int):
            self.error(key, f"{shown} is {V.type_word(raw)}, not a number; write {key} = <{what}>")
            return None
        if raw < minimum:
            self.error(key, f"{shown} is below {minimum}; {key} must be {what}")
            return None
        if raw > maximum:
            self.error(
                key,
                f"{shown} is not a plausible count (at most {maximum:,}); {key} must be {what}",
            )
            return None
        return raw

    def _value(self):
        kind = self.kind
        if "value" not in self.entry:
            self.error(
                "value",
                f'missing; every [[{kind}]] needs value = "..." (e.g. '
                f"{'4k7' if kind == 'resistor' else '10n'})",
            )
            return None
        raw = self.entry["value"]
        try:
            x = V.parse_value(raw, kind=kind)
        except ValueParseError as exc:
            self.error("value", self._as_written("value", raw, str(exc)))
            return None
        lo, hi, span = RANGES[kind]
        unit = "Ω" if kind == "resistor" else "F"
        q = self.q("value", raw)
        if x < 0:
            self.error("value", f"{q} is negative; values are positive ({span})")
        elif x == 0:
            self.error("value", f"{q} is zero; a {kind} value lies in {span}")
        elif not lo <= x <= hi:
            hint = "; write 10p, 10n or 10u" if kind == "capacitor" and x > hi else ""
            self.error(
                "value",
                f"{q} is {V.format_si(x, unit)}, not a plausible {kind} ({span}){hint}",
            )
        else:
            if (
                kind == "resistor"
                and isinstance(raw, str)
                and re.search(r"[0-9.]\s*m(?![eE][gG])", raw)
            ):
                # SI prefixes are case-sensitive; 1m is a milliohm, a likely slip for 1M
                self.warn(
                    "value",
                    f"{q} is {V.format_si(x, 'Ω')} (m is milli); "
                    f"write M for mega, e.g. {raw.replace('m', 'M', 1)}",
                )
            return x
        return None

    def _measured(self, qty, nominal, tolerance, meter):
        raw = self.entry.get("measured")
        if raw is None:
            return ()
        if not isinstance(raw, list):
            self.error(
                "measured",
                f"{self.q('measured', raw)} is {V.type_word(raw)}; write a list, "
                'e.g. measured = ["4.693k"]',
            )
            return ()
        lo, hi, span = RANGES[self.kind]
        out = []
        for item in raw:
            try:
                x = V.parse_value(item, kind=self.kind)
            except ValueParseError as exc:
                self.error("measured", str(exc))
                continue
            if not lo <= x <= hi:
                self.error("measured", f"{V.shown(item)} is outside the plausible range {span}")
                continue
            out.append(x)
            if nominal and tolerance is not None:
                off = abs(x / nominal - 1)
                if off > 3 * tolerance + meter:
                    self.warn(
                        "measured",
                        f"{V.shown(item)} is {off:.1%} from the nominal "
                        f"{V.format_rkm(nominal, self.kind)} (tolerance "
                        f"{tolerance:.1%}): check the reading",
                    )
        if qty is not None and len(raw) > qty:
            self.error(
                "measured", f"{len(raw)} measured pieces but qty = {qty}; list at most qty pieces"
            )
        return tuple(out)

    def _unknown_keys(self):
        for key in self.entry:
            if key not in KEYS[self.kind]:
                self.warn(
                    key, f"unknown key ignored; [[{self.kind}]] knows {', '.join(KEYS[self.kind])}"
                )

    # -- the entry ------------------------------------------------------------------------
    def build(self):
        self._unknown_keys()
        return getattr(self, f"_build_{self.kind}")()

    def _common(self, default_tol) -> dict[str, Any]:
        """The keys resistors and capacitors share, as keyword arguments of their records."""
        value = self._value()
        qty = self._int("qty", required=True, minimum=0, what="a whole number of pieces >= 0")
        tol, assumed = self._fraction("tolerance", default_tol)
        meter_x = self._parsed("meter", V.parse_percent, lo=0, hi=0.5, span="0% .. 50%")
        meter = DEFAULT_METER_ACCURACY if meter_x is None else meter_x
        tempco = self._parsed(
            "tempco", V.parse_ppm, lo=-0.1, hi=0.1, span="-1e5 .. 1e5 ppm", positive=False
        )
        measured = self._measured(qty, value, tol, meter)
        return {
            "value": value,
            "qty": qty,
            "tolerance": tol,
            "tolerance_assumed": assumed,
            "tempco": tempco,
            "measured": measured,
            "meter": meter,
        }

    def _placed(self) -> dict[str, Any]:
        """Drawer, note and where the entry stands: the last keys of every record."""
        location, note = self._text("location"), self._text("note")
        return {"location": location, "note": note, "line": self.header, "index": self.index}

    def _build_resistor(self):
        common = self._common(DEFAULT_RESISTOR_TOLERANCE)
        power = self._parsed("power", V.parse_power, hi=1e4, span="up to 10 kW")
        placed = self._placed()
        if common["value"] is None or common["qty"] is None or self.errors:
            return None
        return Resistor(**common, power=power, **placed)

    def _build_capacitor(self):
        common = self._common(DEFAULT_CAPACITOR_TOLERANCE)
        dielectric = None
        raw = self.entry.get("dielectric")
        if raw is not None:
            dielectric = canonical_dielectric(raw) if isinstance(raw, str) else None
            if dielectric is None:
                self.error(
                    "dielectric",
                    f"{self.q('dielectric', raw)} is not a dielectric this format knows; "
                    f"use one of {'|'.join(DIELECTRICS)}",
                )
        polarized = dielectric in POLARIZED_BY_DEFAULT
        if "polarized" in self.entry:
            raw = self.entry["polarized"]
            if isinstance(raw, bool):
                polarized = raw
            else:
                self.error(
                    "polarized", f"{self.q('polarized', raw)} must be true or false (no quotes)"
                )
        voltage = self._parsed("voltage", V.parse_voltage, hi=1e5, span="up to 100 kV")
        placed = self._placed()
        if common["value"] is None or common["qty"] is None or self.errors:
            return None
        return Capacitor(
            **common, dielectric=dielectric, polarized=polarized, voltage=voltage, **placed
        )

    def _build_opamp(self):
        name = self._text("name") or f"op amp {self.index + 1}"
        lo, hi = GBW_RANGE
        gbw = self._parsed(
            "gbw", V.parse_frequency, required=True, lo=lo, hi=hi, span="1 kHz .. 100 GHz"
        )
        slew = self._parsed("slew", V.parse_slew, hi=1e12, span="up to 1e6 V/us")
        channels = self._int(
            "channels", required=False, minimum=1, default=1, what="op amps per package, 1 or more"
        )
        supply = self._parsed("supply", V.parse_voltage, hi=1e4, span="up to 10 kV")
        ib = self._parsed("ib", V.parse_current, lo=0, hi=1.0, span="0 .. 1 A", positive=False)
        qty = self._int("qty", required=True, minimum=0, what="a whole number of packages >= 0")
        placed = self._placed()
        if gbw is None or qty is None or self.errors:
            return None
        return OpAmp(
            name=name,
            gbw=gbw,
            qty=qty,
            slew=slew,
            channels=channels,
            supply=supply,
            ib=ib,
            **placed,
        )
