"""The numpy path for poles agrees with scipy.linalg's generalized solver (the reference)."""

import numpy as np
from scipy.linalg import eigvals

from picker.analysis.nodal import _finite_poles


def test_numpy_path_matches_scipy_generalized_eigvals() -> None:
    rng = np.random.default_rng(7)
    g = rng.normal(size=(5, 5)) + 5 * np.eye(5)
    c = rng.normal(size=(5, 5))
    c[3:, :] = 0.0  # two algebraic rows: two infinite s
    ref = eigvals(g, -c)
    ref = np.sort_complex(ref[np.isfinite(ref)])
    got = np.sort_complex(_finite_poles(g, c))
    assert got.shape == ref.shape == (3,)
    assert np.allclose(got, ref, rtol=1e-9)


def test_singular_g_falls_back_to_scipy() -> None:
    g = np.array([[1.0, 0.0], [0.0, 0.0]])
    c = np.array([[0.0, 0.0], [0.0, 1.0]])
    # G is singular (cond = inf): the scipy fallback runs; the pencil has s = 0 from row 2
    got = _finite_poles(g, c)
    ref = eigvals(g, -c)
    assert np.allclose(np.sort_complex(got), np.sort_complex(ref[np.isfinite(ref)]))
