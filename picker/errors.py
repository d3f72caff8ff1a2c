"""Errors of the design side; the tree is drawn in ``stock.errors``."""

from stock.errors import PickerError, StockError, StockFileError, ValueParseError


class DesignError(PickerError):
    """Targets that cannot be designed (bad combination, out of range). CLI exit 2."""


class NoDesignError(PickerError):
    """The targets are fine but this stock cannot realise them. CLI exit 1.

    The message says what is missing.
    """

    exit_code = 1


__all__ = [
    "DesignError",
    "NoDesignError",
    "PickerError",
    "StockError",
    "StockFileError",
    "ValueParseError",
]
