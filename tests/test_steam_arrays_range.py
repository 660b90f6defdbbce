"""The array API's range refusal and its shortcuts: the same answers as evaluating everything.

``states_ph``/``states_ps`` evaluate the IF97 range bounds (h or s at 0 degC and at 800 degC, IAPWS R7-97 regions 1-3)
only where a value is not already known inside them, take a caller's saturation temperatures, and can skip the entropy;
these tests hold each shortcut to the full evaluation. Reference: the bounds evaluated at every row through seuif97
(the engine the arrays use), as the array API did before the shortcut.
"""

import numpy as np
import pytest
import seuif97

from steamcalc.errors import OutOfRangeError
from steamcalc.properties.steam_arrays import saturation_temperatures, states_ph, states_ps

#: Pressures (Pa) from the triple-point neighbourhood through the saturation line to region 3 and above critical.
PRESSURES = [611.213, 700.0, 999.0, 1000.0, 0.02e5, 1e5, 3.5e5, 17e5, 60e5, 150e5, 170e5, 250e5, 600e5]
BOUND = {"h": 4, "s": 5}   # seuif97 property ids


def _bounds(p, key):
    """h (kJ/kg) or s (kJ/(kg K)) at 0 degC and at 800 degC: IF97's range at that pressure."""
    return (seuif97.pt(p / 1e6, 0.0, BOUND[key]), seuif97.pt(p / 1e6, 800.0, BOUND[key]))


def _values(key):
    """Values at, just inside and just outside each bound, and across the saturation line, per pressure."""
    rows = []
    for p in PRESSURES:
        low, high = _bounds(p, key)
        for v in (low * (1 - 1e-9) - 1e-9, low, low + abs(low) * 1e-9 + 1e-9, 0.5 * (low + high),
                  high * (1 - 1e-9), high, high * (1 + 1e-9)):
            rows.append((p, v))
        if p < 220.64e5:   # across the saturation line: liquid, saturated ends, wet
            for x in (0.0, 0.3, 1.0):
                rows.append((p, seuif97.px(p / 1e6, x, BOUND[key])))
    return rows


@pytest.mark.parametrize("key,solve", [("h", states_ph), ("s", states_ps)])
def test_refused_exactly_where_the_bounds_say(key, solve):
    for p, v in _values(key):
        low, high = _bounds(p, key)
        inside = low <= v <= high
        if inside:
            try:
                solve([p], [v * 1e3])
            except OutOfRangeError as exc:   # a state the scalar path cannot refine: never the range refusal
                assert "outside IF97 regions 1-4" not in str(exc), (p, v)
        else:
            with pytest.raises(OutOfRangeError) as info:
                solve([p], [v * 1e3])
            assert info.value.limits[:2] == (pytest.approx(low, rel=1e-12), pytest.approx(high, rel=1e-12)), (p, v)


def test_refusal_names_the_first_row_outside_with_both_its_limits():
    # Row 2 is superheated and beyond 800 degC (only its upper bound is evaluated on the way): the refusal still
    # quotes both bounds of that row.
    p = np.array([3.5e5, 3.5e5, 17e5, 17e5])
    h = np.array([2800e3, 2900e3, 5000e3, 9000e3])
    with pytest.raises(OutOfRangeError) as info:
        states_ph(p, h)
    low, high = _bounds(17e5, "h")
    assert "enthalpy[2]" in str(info.value)
    assert info.value.limits[:2] == (pytest.approx(low, rel=1e-12), pytest.approx(high, rel=1e-12))


def test_given_saturation_temperatures_and_no_entropy_change_nothing_else():
    p = np.repeat([0.02e5, 1e5, 3.5e5, 17e5, 60e5, 150e5], 12)
    h = np.tile(np.linspace(200e3, 3600e3, 12), 6)
    full = states_ph(p, h)
    quick = states_ph(p, h, saturation_temperature=saturation_temperatures(p), with_entropy=False)
    for name in ("temperature", "enthalpy", "dryness", "phase"):
        assert np.array_equal(getattr(full, name), getattr(quick, name)), name
    s = states_ps(p, full.entropy)
    s_given = states_ps(p, full.entropy, saturation_temperature=saturation_temperatures(p))
    for name in ("temperature", "enthalpy", "entropy", "dryness", "phase"):
        assert np.array_equal(getattr(s, name), getattr(s_given, name)), name
