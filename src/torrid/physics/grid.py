"""The spectral grid: triangular truncation T_N on an alias-free Gauss-Legendre grid.

Spectral coefficients follow ducc0's layout: complex, orthonormal spherical harmonics with the
Condon-Shortley phase, m >= 0 only, ordered by m then l (index m (2 N + 1 - m) / 2 + l).
Grid-point arrays are indexed [latitude ring, longitude] with rings from north to south (ducc0's
order) and longitudes lon_j = 2 pi j / nlon starting at 0 (the substellar meridian).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import ducc0
import numpy as np


def _is_fft_friendly(n: int) -> bool:
    """True if n has no prime factor above 5 (fast FFT lengths)."""
    for p in (2, 3, 5):
        while n % p == 0:
            n //= p
    return n == 1


def alias_free_nlat(truncation: int) -> int:
    """Smallest even, FFT-friendly number of Gauss latitudes with nlat >= (3 N + 1) / 2.

    With nlat >= (3N + 1)/2 the Gauss-Legendre quadrature integrates products of three degree-N
    fields exactly, so quadratic terms are computed without aliasing (Orszag 1970's 3/2 rule).
    """
    if truncation < 1:
        raise ValueError(f"truncation must be >= 1, got {truncation}")
    nlat = int(np.ceil((3 * truncation + 1) / 2))
    nlat += nlat % 2
    while not _is_fft_friendly(2 * nlat):
        nlat += 2
    return nlat


@dataclass(frozen=True, eq=False)
class SpectralGrid:
    """Truncation, grid geometry and per-coefficient wavenumbers of one model resolution.

    Parameters
    ----------
    truncation : int
        Triangular truncation N (largest total wavenumber l kept).
    nlat : int, optional
        Number of Gauss latitudes; the alias-free FFT-friendly minimum if omitted.
    """

    truncation: int
    nlat: int = 0
    nlon: int = field(init=False)
    colatitude: np.ndarray = field(init=False, repr=False)  # rad, north to south
    latitude: np.ndarray = field(init=False, repr=False)  # rad, north to south
    longitude: np.ndarray = field(init=False, repr=False)  # rad, [0, 2 pi)
    quadrature_weights: np.ndarray = field(init=False, repr=False)  # per point, sum 4 pi
    degree: np.ndarray = field(init=False, repr=False)  # l of each coefficient
    order: np.ndarray = field(init=False, repr=False)  # m of each coefficient

    def __post_init__(self):
        n = self.truncation
        nlat = self.nlat or alias_free_nlat(n)
        if nlat < (3 * n + 1) / 2:
            raise ValueError(
                f"nlat = {nlat} is too few Gauss latitudes for T{n}: need at least {(3 * n + 1) / 2}"
            )
        nlon = 2 * nlat
        set_ = object.__setattr__
        set_(self, "nlat", nlat)
        set_(self, "nlon", nlon)
        theta = ducc0.misc.GL_thetas(nlat)
        set_(self, "colatitude", theta)
        set_(self, "latitude", np.pi / 2 - theta)
        set_(self, "longitude", 2 * np.pi * np.arange(nlon) / nlon)
        set_(self, "quadrature_weights", ducc0.sht.get_gridweights("GL", nlat) / nlon)
        m = np.concatenate([np.full(n + 1 - mm, mm) for mm in range(n + 1)])
        l = np.concatenate([np.arange(mm, n + 1) for mm in range(n + 1)])
        set_(self, "degree", l)
        set_(self, "order", m)

    @property
    def ncoeff(self) -> int:
        """Number of complex coefficients (l, m >= 0) kept by the truncation."""
        return (self.truncation + 1) * (self.truncation + 2) // 2

    @property
    def shape(self) -> tuple[int, int]:
        """Grid-point array shape (nlat, nlon)."""
        return (self.nlat, self.nlon)

    def index(self, l: int, m: int) -> int:
        """Position of coefficient (l, m) in a spectral array."""
        if not 0 <= m <= l <= self.truncation:
            raise IndexError(f"(l, m) = ({l}, {m}) outside T{self.truncation}")
        n = self.truncation
        return m * (2 * n + 1 - m) // 2 + l

    def mesh(self) -> tuple[np.ndarray, np.ndarray]:
        """Latitude and longitude of every grid point (rad), each of shape (nlat, nlon)."""
        return np.meshgrid(self.latitude, self.longitude, indexing="ij")

    def global_mean(self, field_: np.ndarray) -> float:
        """Area-weighted global mean of a grid-point field (exact for degree <= 2 nlat - 1)."""
        return float(np.einsum("i,ij->", self.quadrature_weights, field_) / (4 * np.pi))
