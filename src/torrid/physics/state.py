"""The prognostic state: one complex array (3, ncoeff) of spectral coefficients.

Row :data:`VORTICITY` holds the relative vorticity zeta (s^-1), :data:`DIVERGENCE` the
divergence delta (s^-1) and :data:`GEOPOTENTIAL` the geopotential-thickness deviation
phi' = g (h - h_s) - Phi_mean (m^2 s^-2), in ducc0's coefficient order.
"""

VORTICITY, DIVERGENCE, GEOPOTENTIAL = 0, 1, 2
