"""The response ``picker plot --csv`` writes, against ngspice (Debian's package) running
the design's own SPICE netlist: an outside solver of the same circuit."""

from __future__ import annotations

import shutil

import numpy as np
import pytest

from picker.export import load_design, save_design, spice_netlist
from picker.export.response_data import response_data
from tests.picker.export.helpers import REQUEST, stock_records, two_stage_candidate
from tests.reference.test_netlist_ngspice import run_ngspice

pytestmark = [
    pytest.mark.ngspice,
    pytest.mark.skipif(
        shutil.which("ngspice") is None,
        reason="ngspice is not installed (Debian package 'ngspice')",
    ),
]


def test_plot_magnitude_matches_ngspice(tmp_path):
    stock = stock_records(path=tmp_path / "inventory.toml", sha="00" * 32)
    path = tmp_path / "d.toml"
    save_design(path, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    design = load_design(path)
    data = response_data(design)
    f_sp, mag_sp = run_ngspice(spice_netlist(design), tmp_path)
    # ngspice's .ac dec 50 grid differs from ours: compare at our points inside its range,
    # interpolating its |V(out)| in log-log (50 points a decade: smooth here)
    inside = (data.f_hz >= f_sp[0]) & (data.f_hz <= f_sp[-1])
    ref_db = 20 * np.interp(np.log(data.f_hz[inside]), np.log(f_sp), np.log10(mag_sp))
    assert inside.sum() > 300
    assert np.max(np.abs(data.magnitude_db[inside] - ref_db)) < 0.02
