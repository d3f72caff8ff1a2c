"""The parts on hand: values, preferred-number series, the stock file and its safe edit.

Knows nothing of filters or screens.

    stock.values    parse_value / format_rkm / format_si (and, re-exported, the two below)
    stock.units     the %, ppm, V, Hz, A, W, V/us readers
    stock.text      owner text in messages: printable, shown, toml_text, type_word
    stock.eseries   series, nearest, series_of (IEC 60063 tables)
    stock.file      load, loads, file_sha256; QtyChange, EditResult, apply_changes,
                    add_line, replace_bytes (work done in stock.load, stock.fields, stock.edit)
"""

from typing import TYPE_CHECKING

from stock.errors import PickerError, StockEditError, StockError, StockFileError, ValueParseError
from stock.lazy import lazy_exports

if TYPE_CHECKING:
    from stock.model import Capacitor, OpAmp, Resistor, Stock

# the records load on first use: `from stock.errors import ...` (every command) stays light
__getattr__ = lazy_exports(
    __name__, dict.fromkeys(("Capacitor", "OpAmp", "Resistor", "Stock"), "stock.model")
)

__all__ = [
    "Capacitor",
    "OpAmp",
    "PickerError",
    "Resistor",
    "Stock",
    "StockEditError",
    "StockError",
    "StockFileError",
    "ValueParseError",
]
