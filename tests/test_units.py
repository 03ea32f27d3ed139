"""Units: API gravity, density at 15 °C (against the `chemicals` library and API MPMS Ch. 11)."""

from __future__ import annotations

import pytest

from assaycut import units

chemicals = pytest.importorskip("chemicals")


def test_api_of_water_is_10():
    # API MPMS Ch. 11 / ASTM D287 definition: water (SG 1.000) is 10 °API.
    assert units.sg_to_api(1.0) == pytest.approx(10.0)


@pytest.mark.parametrize("sg", [0.55, 0.7365, 0.85, 0.93, 1.02])
def test_api_matches_chemicals(sg):
    # Reference library: chemicals.utils.SG_to_API (API MPMS Ch. 11 definition).
    assert units.sg_to_api(sg) == pytest.approx(chemicals.utils.SG_to_API(sg), rel=1e-12)
    assert units.api_to_sg(units.sg_to_api(sg)) == pytest.approx(sg, rel=1e-12)


def test_api_published_check():
    # Reference library value: chemicals.utils.SG_to_API(0.7365) = 60.62491513917175.
    assert units.sg_to_api(0.7365) == pytest.approx(60.62491513917175, abs=1e-12)


def test_density15_round_trip_and_size():
    # Round trip (identity), and the size of the 60 °F -> 15 °C correction: a medium crude (SG 0.85) expands
    # by about 0.08-0.10 % per °C near ambient (recalled from memory; ASTM D1250 / API MPMS 11.1 tables give
    # alpha60 of about 4.7e-4 per °F there), and 15 °C lies 0.556 °C below 60 °F, so its density is 0.04-0.06 %
    # higher.  A K0 off by 2x would fall outside.  Water at 60 °F is 999.016 kg/m3 (from memory).
    for sg in (0.7, 0.85, 1.0):
        rho = units.sg_to_density15(sg)
        assert units.density15_to_sg(rho) == pytest.approx(sg, rel=1e-10)
    rise = units.sg_to_density15(0.85) / (0.85 * 999.016) - 1.0
    assert 0.08e-2 * 0.5556 <= rise <= 0.10e-2 * 0.5556
