"""Rich renderables shared by the CLI and the TUI (no textual here).

from picker.report import schematic, DesignReport
"""

from picker.report.design import DesignReport
from picker.report.schematic import schematic

__all__ = ["DesignReport", "schematic"]
