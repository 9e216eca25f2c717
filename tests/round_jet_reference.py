"""Independent mpmath reference for the linear theory of a round jet (used by
tests/test_jet_cells.py).

The slope of the linearised round jet's boundary is proportional to
S(ξ) = Σ_k sin(j_k ξ)/j_k, j_k the zeros of J0, ξ = x/(R√(Mj² - 1)) (Prandtl 1904; Pack
1950: the Fourier–Bessel solution of the linearised potential with ambient pressure on the
boundary). The series converges slowly; here, without the Lanczos factors the library's
table was first computed with: j_k = a_k + d_k, a_k = (k - 1/4)π, d_k from
``mpmath.besseljzero``; the leading terms of the expansion of sin(j ξ)/j in 1/a (McMahon's
expansion of the zeros) are summed over all k in closed form by Clausen functions
(``mpmath.clsin``, ``mpmath.clcos``, picked out for m = 4k - 1 by a roots-of-unity filter),
and the remainder, O(a^-4) per term, is summed directly to K terms (the roots move by
1.1e-10 from K = 250 to 16000).
"""

import math

import mpmath as mp
import numpy as np

_K = 250


def _zeros():
    with mp.workdps(30):
        d = [float(mp.besseljzero(0, k) - (k - mp.mpf(1) / 4) * mp.pi) for k in range(1, _K + 1)]
    a = (np.arange(1, _K + 1) - 0.25) * np.pi
    return a, np.array(d)


_A, _D = _zeros()


def _filtered(s, phi):
    """Σ over m ≡ 3 (mod 4), m >= 1, of e^{i m φ}/m^s."""
    total = mp.mpc(0)
    for r in range(4):
        theta = phi + r * mp.pi / 2
        total += (1j) ** r * mp.mpc(mp.clcos(s, theta), mp.clsin(s, theta))
    return total / 4


def boundary_slope_sum(xi):
    """S(ξ) = Σ sin(j_k ξ)/j_k (to about 1e-10)."""
    with mp.workdps(30):
        x = mp.mpf(xi)
        phi = mp.pi * x / 4
        s1 = (4 / mp.pi) * _filtered(1, phi).imag
        s3 = (4 / mp.pi) ** 3 * _filtered(3, phi).imag
        c2 = (4 / mp.pi) ** 2 * _filtered(2, phi).real
        model = float(s1 - (x**2 / 128 + mp.mpf(1) / 8) * s3 + x * c2 / 8)
    a, d, j = _A, _D, _A + _D
    b1 = np.cos(d * xi) / j - 1 / a + (xi**2 / 128 + 1 / 8) / a**3
    b2 = np.sin(d * xi) / j - xi / (8 * a**2)
    return model + math.fsum(np.sin(a * xi) * b1 + np.cos(a * xi) * b2)
