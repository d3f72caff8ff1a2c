"""The parts on hand: values, preferred-number series, the stock file and its safe edit.

Knows nothing of filters or screens.
"""

from stock.errors import PickerError, StockEditError, StockError, StockFileError, ValueParseError
from stock.model import Capacitor, OpAmp, Resistor, Stock

__all__ = [
    "Capacitor", "OpAmp", "PickerError", "Resistor", "Stock", "StockEditError",
    "StockError", "StockFileError", "ValueParseError",
]
