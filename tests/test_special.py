"""The special functions written out in casedepth.numerics.special against SciPy's (Cephes-based
scipy.special; the tables of Abramowitz & Stegun 1964, ch. 7 and 9, are what both reproduce)."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.special as sp

from casedepth.numerics import special


@pytest.mark.parametrize("order, reference", [(0, sp.j0), (1, sp.j1)])
def test_bessel_j_to_round_off(order, reference):
    x = np.concatenate((np.linspace(-10.0, 10.0, 2001), np.linspace(10.0, 200.0, 4001)))
    assert np.max(np.abs(special.bessel_j(order, x) - reference(x))) < 1e-14


def test_bessel_j_tabulated():
    # Abramowitz & Stegun (1964), Table 9.1: J0(1) = 0.765197686558, J1(1) = 0.440050585745
    assert float(special.bessel_j(0, 1.0)) == pytest.approx(0.765197686558, abs=1e-12)
    assert float(special.bessel_j(1, 1.0)) == pytest.approx(0.440050585745, abs=1e-12)


@pytest.mark.parametrize("order", [0, 1])
def test_bessel_zeros(order):
    assert special.bessel_zeros(order, 80) == pytest.approx(sp.jn_zeros(order, 80), rel=1e-14)


def test_erfcx_and_erfc():
    x = np.concatenate((np.linspace(-3.0, 40.0, 4001), np.logspace(1, 9, 100)))
    assert special.erfcx(x) == pytest.approx(sp.erfcx(x), rel=1e-12)
    assert special.erfc(x) == pytest.approx(sp.erfc(x), rel=1e-12, abs=1e-300)
    assert special.erfcx(1.0) == pytest.approx(0.4275835761558070, rel=1e-14)  # A&S 7.1: e·erfc(1)
