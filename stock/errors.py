"""The one exception tree of the project.

    PickerError
     +-- StockError
     |    +-- ValueParseError     a value, tolerance, ppm ... text that cannot be read
     |    +-- StockFileError      a stock file that cannot be loaded (carries every problem)
     |    +-- StockEditError      a safe edit that was refused (file changed, below zero ...)
     |         +-- PartlyDoneError  the stock file was written, then the command failed (exit 3)
     +-- DesignError              (picker.errors) targets that cannot be designed

The root lives here because ``stock`` knows nothing of filters; ``picker.errors``
re-exports it and adds the design branch.
"""

from __future__ import annotations


class PickerError(Exception):
    """Root of every error the project raises on purpose; the CLI turns it into exit 2."""

    exit_code = 2


class StockError(PickerError):
    """Something about the parts on hand."""


class ValueParseError(StockError, ValueError):
    """A value text (RKM, SI, %, ppm, V, Hz, V/us) that cannot be read."""


class StockFileError(StockError):
    """A stock file that cannot be loaded. ``problems`` holds one line per error."""

    def __init__(self, problems: list[str] | str):
        if isinstance(problems, str):
            problems = [problems]
        self.problems: list[str] = list(problems)
        super().__init__("\n".join(self.problems))


class StockEditError(StockError):
    """A safe edit of the stock file that was refused; the file is unchanged."""


class PartlyDoneError(StockEditError):
    """The stock file was changed, then the command could not finish (a build record not
    marked done, a folder not synced). The message says what was done and how to undo
    it; the CLI exits 3 (docs/reliability.md)."""

    exit_code = 3
