"""Writing the chosen design from the TUI: saved design, BOM CSV, netlist (no textual here).

The writers are the CLI's (``picker.export``: ``save_design``, ``bom_csv``,
``spice_netlist``), and so are the refusals (``check_save_target`` and
``check_output_target``): never over a folder, a FIFO, a device or the stock file; a
saved design only over an older saved design. An existing file is replaced only after
an explicit yes naming it: ``check`` says which files exist, ``write`` refuses any that
appeared since the yes. Relative names are taken in the current folder, as the CLI
does. See docs/outputs.md ("From the terminal UI").
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from picker.errors import DesignError

# kind -> (what it is, in words; the end of its default name)
KINDS = {
    "design": ("saved design", ".toml"),
    "bom": ("BOM CSV", "-bom.csv"),
    "netlist": ("netlist", ".cir"),
}
HINT = "pick another name, or leave the field blank; nothing was written"


@dataclass(frozen=True)
class Output:
    kind: str  # a key of KINDS
    path: Path  # as given, relative names in the current folder
    exists: bool  # a regular file is there already: replacing it needs a yes


def default_stem(targets) -> str:
    """A file name stem that says what the design is: "lowpass-butterworth-o2-1kHz"."""
    from stock.values import format_si

    if targets is None:
        return "design"
    fc = format_si(targets.fc_hz, "Hz").replace(" ", "")
    return f"{targets.response_type}-{targets.response}-o{targets.order}-{fc}"


def default_names(targets) -> dict[str, str]:
    stem = default_stem(targets)
    return {kind: stem + end for kind, (_what, end) in KINDS.items()}


def cli_request(targets) -> dict:
    """The form's targets as the request ``picker design`` records (same keys)."""
    if targets is None:
        return {}
    return {
        "type": targets.response_type,
        "response": targets.response,
        "order": targets.order,
        "fc_hz": targets.fc_hz,
        "gain": targets.gain,
        "ripple_db": targets.ripple_db,
        "q": targets.q,
        "topology": targets.family,
        "singles": targets.singles,
        "allow_polarized": targets.allow_polarized,
        "bounds": {
            "r_min": targets.r_min,
            "r_max": targets.r_max,
            "c_min": targets.c_min,
            "c_max": targets.c_max,
        },
        "rank": targets.rank,
        "max_error": targets.max_error,
        "time_limit_s": targets.time_limit,
    }


def check(names: dict[str, str], stock) -> list[Output]:
    """The files asked for (a blank name: not written), each checked; DesignError naming
    the file and the reason for the first that cannot be written."""
    from picker.export.design_file import check_output_target, check_save_target

    outputs: list[Output] = []
    seen: dict[Path, str] = {}
    for kind, text in names.items():
        name = text.strip()
        if not name:
            continue
        what = KINDS[kind][0]
        if "\x00" in name:
            raise DesignError(f"{what}: the name holds a NUL character; {HINT}")
        try:
            path = Path(name).expanduser()
        except RuntimeError:  # "~someone" with no such user
            raise DesignError(f"{name}: no such home folder; {HINT}") from None
        key = Path(path).absolute()
        if key in seen:
            raise DesignError(f"{path}: named for the {seen[key]} and the {what}; {HINT}")
        seen[key] = what
        exists = check_output_target(path, stock, what=f"the {what}", hint=HINT)
        if kind == "design" and exists:
            check_save_target(path, stock)  # only an older saved design is replaced
        outputs.append(Output(kind, path, exists))
    if not outputs:
        raise DesignError("every name is blank: give at least one file to write")
    return outputs


def write(outputs: list[Output], *, candidate, targets, stock) -> list[str]:
    """Write each output whole (temporary file, then rename). A file that exists now but
    did not when ``check`` ran is refused, not replaced. One line of words per file."""
    from picker.export import bom_csv, design_from_candidate, save_design, spice_netlist
    from picker.export.design_file import check_output_target, write_atomic

    request = cli_request(targets)
    design = design_from_candidate(candidate=candidate, request=request, stock=stock)
    done: list[str] = []
    for out in outputs:
        what = KINDS[out.kind][0]
        if check_output_target(out.path, stock, what=f"the {what}", hint=HINT) > out.exists:
            raise DesignError(
                f"{out.path}: appeared after the check; it is not replaced without a yes; "
                + ("written so far: " + "; ".join(done) if done else "nothing was written")
            )
        if out.kind == "design":
            save_design(out.path, candidate=candidate, request=request, stock=stock)
        else:
            text = bom_csv(design) if out.kind == "bom" else spice_netlist(design)
            write_atomic(out.path, text.encode("utf-8"), f"the {what}")
        done.append(f"{what} {out.path}" + (" (replaced)" if out.exists else ""))
    return done
