"""The matches pane's values column: rows of equal score must be told apart by eye."""

from picker.parts import Arrangement, Candidate, Piece, StageChoice, StageTarget
from picker.ui.widgets.matches import parts_text
from stock.model import Capacitor, Resistor


def test_values_column_lists_each_position_rkm_style_and_splits_stages():
    r = Resistor(4.7e3, 5, 0.01, location="A1")
    r2 = Resistor(2.2e3, 5, 0.01, location="A2")
    c = Capacitor(2.2e-9, 5, 0.05, location="C1")

    def one(line):
        return Arrangement("single", (Piece(line, line.value, line.tolerance),))

    pair = Arrangement("series", (Piece(r, r.value, 0.01), Piece(r2, r2.value, 0.01)))
    t = StageTarget(1e3, None, 1.0)
    s1 = StageChoice("inverting-lowpass", t, t, (("R1", one(r)), ("R2", pair), ("C1", one(c))))
    s2 = StageChoice("inverting-lowpass", t, t, (("R1", one(r2)), ("R2", one(r)), ("C1", one(c))))
    cand = Candidate(0.0, 7, (s1, s2))
    # RKM codes as IEC 60062 writes them: 4k7, 6k9 (4k7 + 2k2 in series), 2n2
    assert parts_text(cand) == "R1 4k7 R2 6k9 C1 2n2 | R1 2k2 R2 4k7 C1 2n2"
