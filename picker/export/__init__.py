"""Outputs of a chosen design: saved design file, BOM, pick list, SPICE netlist.

Shells (CLI, TUI) call these; nothing here draws on a screen. Each name is imported
from its module on first use, so ``picker netlist`` does not load the pick list.
"""

from typing import TYPE_CHECKING

from stock.lazy import lazy_exports

if TYPE_CHECKING:
    from picker.export.bom import BomRow, bom_csv, bom_rows, designator, opamp_packages
    from picker.export.design_file import (
        SavedDesign,
        SavedOpAmp,
        SavedPart,
        SavedPosition,
        SavedStage,
        design_from_candidate,
        load_design,
        save_design,
    )
    from picker.export.netlist import spice_netlist
    from picker.export.picklist import PickGroup, pick_count, pick_list, pick_list_lines

_WHERE = {
    "picker.export.bom": "BomRow bom_csv bom_rows designator opamp_packages",
    "picker.export.design_file": "SavedDesign SavedOpAmp SavedPart SavedPosition SavedStage "
    "design_from_candidate load_design save_design",
    "picker.export.netlist": "spice_netlist",
    "picker.export.picklist": "PickGroup pick_count pick_list pick_list_lines",
}
__getattr__ = lazy_exports(
    __name__, {name: module for module, names in _WHERE.items() for name in names.split()}
)

__all__ = [
    "BomRow",
    "PickGroup",
    "SavedDesign",
    "SavedOpAmp",
    "SavedPart",
    "SavedPosition",
    "SavedStage",
    "bom_csv",
    "bom_rows",
    "design_from_candidate",
    "designator",
    "load_design",
    "opamp_packages",
    "pick_count",
    "pick_list",
    "pick_list_lines",
    "save_design",
    "spice_netlist",
]
