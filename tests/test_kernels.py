"""The numba grid kernel equals its numpy twin (the readable reference)."""

import numpy as np

from torrid.physics import kernels


def test_numba_kernel_matches_numpy():
    rng = np.random.default_rng(1)
    shape = (12, 24)
    args = [rng.standard_normal(shape) for _ in range(3)]
    winds = rng.standard_normal((2, *shape))
    weights = rng.random(shape)
    forcing = [rng.standard_normal(shape) for _ in range(2)]
    outs = []
    for fn in (kernels.grid_products, kernels.grid_products_numpy):
        out = [np.zeros((2, *shape)), np.zeros((2, *shape)), np.zeros(shape)]
        fn(*args, winds, weights, *forcing, *out)
        outs.append(out)
    for a, b in zip(*outs):
        np.testing.assert_allclose(a, b, rtol=1e-14, atol=1e-14)
    assert np.abs(outs[0][0]).max() > 0
