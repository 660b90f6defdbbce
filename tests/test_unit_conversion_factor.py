"""Unit conversions by a factor found once per pair give pint's own numbers, to the last bit."""

import random

import pytest

from steamcalc.units.quantities import Q_, RECORD_UNITS, SI_UNITS, _unit, convert

PAIRS = sorted({(SI_UNITS[k], RECORD_UNITS[k]) for k in SI_UNITS if k in RECORD_UNITS}
               | {(RECORD_UNITS[k], SI_UNITS[k]) for k in SI_UNITS if k in RECORD_UNITS}
               | {("bar", "Pa"), ("psi", "Pa"), ("t/h", "kg/s"), ("lb/h", "kg/s"), ("degF", "K"), ("mm", "m"),
                  ("inch", "m"), ("Btu/lb", "J/kg"), ("degC", "degF")})


@pytest.mark.parametrize("unit, target", PAIRS)
def test_the_same_double_as_pint(unit, target):
    rng = random.Random(f"{unit}->{target}")
    values = [rng.uniform(-1e3, 1e3) for _ in range(300)] + [10 ** rng.uniform(-8, 9) for _ in range(300)] + \
        [rng.randint(0, 10 ** 6) for _ in range(100)] + [0.0, -0.0, 1.0, 273.15]
    for value in values:
        assert convert(value, unit, target) == Q_(value, _unit(unit)).to(_unit(target)).magnitude, value
