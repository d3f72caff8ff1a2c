"""Rich renderables shared by the CLI and the TUI (no textual here).

from picker.report import schematic, DesignReport
from picker.report.owner import owner_text, visible    (owner text, shown as written)

``DesignReport`` loads on first use (it brings rich's console), so a shell that only
needs ``visible`` or ``owner_text`` does not pay for it.
"""

from __future__ import annotations

from typing import Any

from picker.report.owner import owner_text, visible
from picker.report.schematic import schematic

__all__ = ["DesignReport", "owner_text", "schematic", "visible"]


def __getattr__(name: str) -> Any:
    if name == "DesignReport":
        from picker.report.design import DesignReport

        return DesignReport
    raise AttributeError(f"module 'picker.report' has no attribute {name!r}")
