"""Frozen records of the parts on hand.

All quantities are floats in SI base units: ohm, farad, hertz, volt, watt, ampere,
volt per second; tolerances, tempcos and meter accuracies are fractions
(1 % -> 0.01, 100 ppm/K -> 100e-6).

A stock line is identified by ``(kind, index)``: ``index`` is its position in the
file's array of tables of that kind (``[[resistor]]`` number 0, 1, ...). ``line`` is
the 1-based line of its header in the file, for messages.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import ClassVar

DIELECTRICS = (
    "C0G",
    "NP0",
    "X7R",
    "X5R",
    "Y5V",
    "film",
    "polypropylene",
    "polyester",
    "mica",
    "electrolytic",
    "tantalum",
)
POLARIZED_BY_DEFAULT = ("electrolytic", "tantalum")
DEFAULT_RESISTOR_TOLERANCE = 0.05
DEFAULT_CAPACITOR_TOLERANCE = 0.10
DEFAULT_METER_ACCURACY = 0.01


@dataclass(frozen=True)
class Resistor:
    value: float  # ohm, nominal
    qty: int
    tolerance: float = DEFAULT_RESISTOR_TOLERANCE
    tolerance_assumed: bool = True  # True when the file did not say
    tempco: float | None = None  # per kelvin, fraction
    power: float | None = None  # watt
    location: str | None = None
    note: str | None = None
    measured: tuple[float, ...] = ()  # individually measured pieces, ohm
    meter: float = DEFAULT_METER_ACCURACY
    line: int = 0
    index: int = 0
    kind: ClassVar[str] = "resistor"

    @property
    def nominal_qty(self) -> int:
        """Pieces that keep the nominal value (qty less the measured ones)."""
        return self.qty - len(self.measured)


@dataclass(frozen=True)
class Capacitor:
    value: float  # farad, nominal
    qty: int
    tolerance: float = DEFAULT_CAPACITOR_TOLERANCE
    tolerance_assumed: bool = True
    dielectric: str | None = None  # one of DIELECTRICS, canonical spelling
    polarized: bool = False
    voltage: float | None = None  # volt, rating
    location: str | None = None
    note: str | None = None
    measured: tuple[float, ...] = ()
    meter: float = DEFAULT_METER_ACCURACY
    line: int = 0
    index: int = 0
    tempco: float | None = None  # per kelvin, fraction; None: from the dielectric class
    kind: ClassVar[str] = "capacitor"

    @property
    def nominal_qty(self) -> int:
        return self.qty - len(self.measured)


@dataclass(frozen=True)
class OpAmp:
    name: str
    gbw: float  # hertz
    qty: int
    slew: float | None = None  # volt per second
    channels: int = 1
    supply: float | None = None  # volt, maximum total supply
    ib: float | None = None  # ampere, input bias current
    location: str | None = None
    note: str | None = None
    line: int = 0
    index: int = 0
    kind: ClassVar[str] = "opamp"


@dataclass(frozen=True)
class Stock:
    resistors: tuple[Resistor, ...] = ()
    capacitors: tuple[Capacitor, ...] = ()
    opamps: tuple[OpAmp, ...] = ()
    name: str | None = None
    path: Path | None = None
    sha256: str | None = None  # of the file's bytes as read
    warnings: tuple[str, ...] = field(default=())

    def lines(self, kind: str) -> tuple:
        return {"resistor": self.resistors, "capacitor": self.capacitors, "opamp": self.opamps}[
            kind
        ]
