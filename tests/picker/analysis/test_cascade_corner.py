"""The spec on the computed response: -3 dB at fc (Butterworth, Bessel), the ripple band
edge and ripple height (Chebyshev), and the overall gain, on the nodal analysis of the
synthesised stage netlists (the check scipy.signal's own tests make; see its test suite)."""

import math

import numpy as np
import pytest

from picker.analysis import cascade_response, corner_hz, magnitude_db, passband_ripple_db
from picker.errors import DesignError
from picker.filters import plan_stages

FC = 1000.0


def cascade(btype, response, order, *, gain=1.0, family=None, ripple_db=1.0):
    stages = plan_stages(
        btype,
        response=response,
        order=order,
        fc_hz=FC,
        gain=gain,
        family=family,
        ripple_db=ripple_db,
    )
    return [topo.netlist(topo.synthesize(target)) for topo, target in stages]


def around(fc=FC, decades=3, n=6001):
    return np.logspace(math.log10(fc) - decades, math.log10(fc) + decades, n)


@pytest.mark.parametrize("response", ["butterworth", "bessel"])
@pytest.mark.parametrize("btype", ["lowpass", "highpass"])
@pytest.mark.parametrize("order", range(1, 9))
def test_minus_3db_at_fc(response, btype, order):
    family = "mfb" if order % 3 == 0 else None  # both families get exercised
    nets = cascade(btype, response, order, family=family, gain=2.0)
    f = around()
    h = cascade_response(nets, f)
    # exactly at fc: -10 log10(2) dB below the passband gain (definition of fc)
    h_fc = cascade_response(nets, [FC])[0]
    ref = cascade_response(nets, [FC * (1e-5 if btype == "lowpass" else 1e5)])[0]
    assert abs(ref) == pytest.approx(2.0, rel=1e-6)
    assert magnitude_db(h_fc / ref) == pytest.approx(-10 * math.log10(2), abs=1e-6)
    assert corner_hz(f, h) == pytest.approx(FC, rel=2e-4)


@pytest.mark.parametrize("btype", ["lowpass", "highpass"])
@pytest.mark.parametrize("order", range(1, 9))
@pytest.mark.parametrize("rp", [0.5, 1.0, 3.0])
def test_chebyshev_ripple_edge_and_height(btype, order, rp):
    nets = cascade(btype, "chebyshev", order, ripple_db=rp)
    f = around(decades=2, n=8001)
    h = cascade_response(nets, f)
    mag = magnitude_db(h)
    peak = mag.max()
    # at the ripple band edge the response is rp below the passband peak (definition)
    assert magnitude_db(cascade_response(nets, [FC]))[0] - peak == pytest.approx(-rp, abs=1e-3)
    band = (f <= FC) if btype == "lowpass" else (f >= FC)
    lo, hi = (f[0], FC) if btype == "lowpass" else (FC, f[-1])
    # peak-to-peak over the band is rp (a first-order stage falls monotonically to -rp)
    assert passband_ripple_db(f, h, lo, hi) == pytest.approx(rp, abs=2e-3)
    assert np.all(mag[~band] - peak < -rp + 1e-9)  # beyond the edge it only falls
    # gain reference: DC (low-pass) / high-frequency (high-pass) gain is the product of
    # the stage gains, 1 here; an even order's peak is rp above it
    ref = cascade_response(nets, [FC * (1e-6 if btype == "lowpass" else 1e6)])[0]
    assert abs(ref) == pytest.approx(1.0, rel=1e-6)
    assert peak == pytest.approx(rp if order % 2 == 0 else 0.0, abs=1e-3)


def test_corner_reference_options_and_errors():
    nets = cascade("lowpass", "butterworth", 2)
    f = around()
    h = cascade_response(nets, f)
    assert corner_hz(f, h, reference="peak") == pytest.approx(FC, rel=2e-4)
    assert corner_hz(f, h, reference=1.0) == pytest.approx(FC, rel=2e-4)
    # second-order Butterworth: -40 dB at 10 fc (40 dB/decade; from memory)
    assert corner_hz(f, h, level_db=-40.0) == pytest.approx(10 * FC, rel=1e-3)
    with pytest.raises(DesignError, match="no -3.0103 dB crossing between 0.1 and 10 Hz"):
        corner_hz(np.logspace(-1, 1, 50), cascade_response(nets, np.logspace(-1, 1, 50)))
    with pytest.raises(DesignError, match="no grid frequency between"):
        passband_ripple_db(f, h, 1e7, 1e8)
