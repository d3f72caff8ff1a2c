"""The functional core imports neither textual nor rich (docs/architecture.md)."""

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
CORE = [
    "stock",
    "picker/filters",
    "picker/analysis",
    "picker/search",
    "picker/budget.py",
    "picker/budget",
    "picker/parts.py",
    "picker/errors.py",
]
FORBIDDEN = {"textual", "rich"}


def core_files():
    for entry in CORE:
        path = ROOT / entry
        if path.is_file():
            yield path
        elif path.is_dir():
            yield from sorted(path.rglob("*.py"))


@pytest.mark.parametrize("path", list(core_files()), ids=lambda p: str(p.relative_to(ROOT)))
def test_core_module_has_no_ui_imports(path):
    tree = ast.parse(path.read_text(encoding="utf-8"))
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names = [a.name for a in node.names]
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            names = [node.module]
        else:
            continue
        for name in names:
            assert name.split(".")[0] not in FORBIDDEN, f"{path}: imports {name}"
