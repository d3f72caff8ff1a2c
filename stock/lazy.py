"""Names a package re-exports, imported on first use (PEP 562), so that importing the
package for one light name (``stock.errors``, ``stock.file.load``) does not import the
modules behind the others. One helper for every such package of picker.

    __getattr__ = lazy_exports(__name__, {"Stock": "stock.model", ...})
"""

from __future__ import annotations

import importlib
import sys
from collections.abc import Callable, Mapping
from typing import Any


def lazy_exports(package: str, where: Mapping[str, str]) -> Callable[[str], Any]:
    """A module ``__getattr__`` that imports ``where[name]`` and returns its ``name``;
    the value is kept in the package so that it is looked up once."""

    def __getattr__(name: str) -> Any:
        module = where.get(name)
        if module is None:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        value = getattr(importlib.import_module(module), name)
        setattr(sys.modules[package], name, value)
        return value

    return __getattr__
