"""Small helpers shared by the subcommands. Imports nothing heavy."""

from __future__ import annotations

import os
from pathlib import Path

ENV_VAR = "PICKER_STOCK"
DEFAULT_NAME = "inventory.toml"


def bundled_sample_path() -> Path:
    """The sample stock file shipped inside the package (picker/data/sample_inventory.toml).

    Beside this module in an installed or source tree; importlib.resources (3 ms of
    start-up) only where it is not there."""
    beside = Path(__file__).resolve().parent.parent / "data" / "sample_inventory.toml"
    if beside.is_file():
        return beside
    try:
        from importlib.resources import files

        path = Path(str(files("picker") / "data" / "sample_inventory.toml"))
        if path.is_file():
            return path
    except (ModuleNotFoundError, TypeError, ValueError):
        pass
    return beside


def is_bundled_sample(path) -> bool:
    """The sample stock shipped with picker (one rule: ``stock.edit.is_sample``)."""
    from stock.edit import is_sample

    return is_sample(path)


def resolve_stock_path(arg: str | None) -> tuple[Path, str | None]:
    """Which stock file to use (docs/cli.md).

    ``arg`` if given; else ``$PICKER_STOCK``; else ``./inventory.toml`` if it exists;
    else the bundled sample. The note is None for an explicit ``arg`` and otherwise
    says where the file came from (for the sample: that it is one).
    """
    if arg:
        return Path(arg), None
    env = os.environ.get(ENV_VAR, "").strip()
    if env:
        return Path(env), f"stock file from ${ENV_VAR}: {env}"
    local = Path(DEFAULT_NAME)
    if local.is_file():
        return local, f"stock file ./{DEFAULT_NAME}"
    sample = bundled_sample_path()
    return sample, (
        f"no stock file given (--stock, ${ENV_VAR} or ./{DEFAULT_NAME}): using "
        f"the bundled sample {sample}"
    )


def load_stock(arg: str | None):
    """The stock a command works on: resolved as ``resolve_stock_path``, loaded, with the
    note on where it came from and every load warning printed to stderr."""
    import sys

    from picker.report.owner import visible
    from stock.file import load

    path, note = resolve_stock_path(arg)
    if note:
        print(f"picker: {visible(note)}", file=sys.stderr)
    stock = load(path)
    for w in stock.warnings:  # they quote the file's own text: no raw control characters
        print(f"picker: warning: {visible(w)}", file=sys.stderr)
    return stock


__all__ = [
    "DEFAULT_NAME",
    "ENV_VAR",
    "bundled_sample_path",
    "is_bundled_sample",
    "load_stock",
    "resolve_stock_path",
]
