"""Reading a saved design back (the format: picker/export/design_file.py).

Kept apart from the writer so that each stays small; ``picker.export.design_file``
re-exports these names.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

from picker.errors import DesignError
from stock import tomlread
from stock.durable import read_bounded, why_not_read
from stock.errors import StockFileError
from stock.load import decode

if TYPE_CHECKING:
    from picker.export.design_file import SavedDesign
    from picker.parts import Candidate


def load_design(path) -> SavedDesign:
    """Read and check a saved design; raise DesignError naming the file, line and key.

    A path that is a folder, a FIFO, a device or a file over 50 MB is refused at once
    (``stock.durable.read_bounded``); TOML that is hostile (nesting thousands deep,
    numbers past Python's digit limit, bare CR line ends) is a located DesignError
    (``stock.tomlread``).
    """
    path = Path(path)
    try:
        raw = read_bounded(path)
    except OSError as exc:
        raise DesignError(f"{path}: {why_not_read(exc, 'design file')}") from None
    try:
        text = decode(raw, str(path))
    except StockFileError as exc:
        raise DesignError(str(exc)) from None
    try:
        doc = tomlread.parse(text)
    except tomlread.TomlProblem as exc:
        where = f"{path}:{exc.line}" if exc.line else str(path)
        raise DesignError(f"{where}: {exc.message}") from None
    return design_from_document(doc, source=str(path), path=path, text=text)


def design_from_document(
    doc: dict, *, source: str = "<design>", path=None, text: str | None = None
) -> SavedDesign:
    """Check a parsed design document and build the frozen SavedDesign.

    Raises DesignError naming ``source``, the line (when ``text``, the file's text, is
    given) and the dotted key (``picker.export.design_check``).
    """
    from picker.export.design_check import check_document

    lines = None if text is None else tomlread.KeyLines(text)
    return check_document(doc, source=source, path=path, lines=lines)


def design_from_candidate(*, candidate: Candidate, request: dict, stock) -> SavedDesign:
    """The SavedDesign ``save_design`` would write, without a file (for the terminal UI)."""
    from picker.export.design_file import design_document

    doc = design_document(candidate=candidate, request=request, stock=stock)
    return design_from_document(doc, source="the chosen candidate")
