"""The through-view clear opening (shapely) against the virtual condition and an independent
dense-sampling computation."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom import Characteristic, Feature, Kind, Material, Tolerance, tolerance_allowed, virtual_condition
from geom.throughview import clear_opening, exact_opening_diameter, swept_envelope


def _independent_inscribed_diameter(d, t, L, n=200_000):
    """Independent check (no shapely): sample the two end ellipses densely and take the
    smallest distance from the opening's centre (by symmetry the inscribed circle's centre)."""
    th = math.atan2(t, L)
    a, b = d / (2 * math.cos(th)), d / 2
    s = np.linspace(0, 2 * np.pi, n, endpoint=False)
    x, y = a * np.cos(s), b * np.sin(s)
    r = min(np.hypot(x + t / 2, y).min(), np.hypot(x - t / 2, y).min())
    return 2 * r


def bore(t=0.020):
    """A bore invented for these tests: 10.000-10.015, perpendicularity t at MMC, length 15."""
    tol = Tolerance(Characteristic.PERPENDICULARITY, t, material=Material.MMC, datums=("A",))
    return Feature("bore", Kind.HOLE, (10.000, 10.015), 15.0, tolerance=tol)


def test_opening_at_mmc_equals_virtual_condition():
    # ASME Y14.5-2018 virtual condition (from memory): a hole at MMC with its axis across the
    # whole zone leaves a clear opening of MMC - t, to within the second-order term
    # d (sec(theta) - 1) of the elliptical sections (geometry, documented in geom.throughview).
    f = bore()
    t = tolerance_allowed(f, f.mmc)
    tv = clear_opening(f.mmc, t, f.length, direction_deg=37.0, segments=4096)
    second_order = f.mmc * (1 / math.cos(math.atan2(t, f.length)) - 1)
    assert tv.inscribed_diameter == pytest.approx(virtual_condition(f), abs=second_order + 2e-6)
    assert tv.inscribed_diameter >= virtual_condition(f) - 2e-6


@settings(max_examples=25, deadline=None)
@given(frac=st.floats(0.0, 1.0), direction=st.floats(0.0, 360.0))
def test_opening_with_full_bonus_stays_at_virtual_condition(frac, direction):
    # Same source: at every produced size, with the full bonus used, the opening stays at VC.
    f = bore()
    d = f.limits[0] + frac * f.size_tolerance
    t = tolerance_allowed(f, d)
    tv = clear_opening(d, t, f.length, direction_deg=direction)
    second_order = d * (1 / math.cos(math.atan2(t, f.length)) - 1)
    assert tv.inscribed_diameter == pytest.approx(virtual_condition(f), abs=second_order + 5e-5)


@pytest.mark.parametrize("d, t, L", [(10.0, 0.02, 15.0), (10.0, 0.5, 2.0), (0.3125, 0.005, 0.75), (40.0, 0.2, 1.0)])
def test_closed_form_and_shapely_against_dense_sampling(d, t, L):
    # Independent computation: dense sampling of the section ellipses (numpy only).
    ref = _independent_inscribed_diameter(d, t, L)
    assert exact_opening_diameter(d, t, L) == pytest.approx(ref, abs=1e-7 * d + 1e-9)
    assert clear_opening(d, t, L, segments=4096).inscribed_diameter == pytest.approx(ref, abs=2e-6 * d)


def test_pin_envelope_equals_pin_virtual_condition():
    # ASME Y14.5-2018 (from memory): a pin at MMC tilted across its zone sweeps MMC + t
    # = 9.995 + 0.010 = 10.005, plus the same second-order term.
    tv = swept_envelope(9.995, 0.01, 15.0, segments=4096)
    so = 9.995 * (1 / math.cos(math.atan2(0.01, 15.0)) - 1)
    assert tv.diameter == pytest.approx(9.995 + 0.010, abs=so + 2e-6)


def test_bowed_axis_opening():
    # Straightness (ASME Y14.5-2018, from memory): a bowed hole at MMC leaves MMC - t
    # = 10.000 - 0.020 = 9.980 (a bow has no tilt, so no second-order term).
    tv = clear_opening(10.0, 0.02, 15.0, bowed=True, segments=4096)
    assert tv.inscribed_diameter == pytest.approx(10.0 - 0.02, abs=2e-6)
