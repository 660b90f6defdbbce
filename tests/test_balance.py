"""The independent energy-balance check: re-summed with the second IF97 implementation, it passes
on a correct result and fails on a wrong flow (a check that can fail)."""

import pytest

from steamcalc.calcs.balance import RELATIVE_TOLERANCE, Stream, energy_balance_residual
from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.properties.steam import SteamState

DESUPERHEATED = dict(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15,
                     target_superheat=10.0, water_temperature=378.15, water_pressure=21e5)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def test_letdown_balances_pass():
    r = calculate(Inputs(**DESUPERHEATED), Site())
    for name in ("Desuperheater energy balance (independent)", "Throttling energy balance (independent)"):
        assert _check(r, name).status == "pass", _check(r, name).detail


@pytest.mark.parametrize("error", [0.002, -0.005, 0.05])
def test_a_wrong_spray_flow_fails(error):
    # The streams of a desuperheater with the spray flow off by `error` (mass balance kept):
    # the residual is the flow error, over the 1e-3 tolerance.
    r = calculate(Inputs(**DESUPERHEATED), Site())
    steam, water, outlet = r.states["throttled"], SteamState.from_pT(21e5, 378.15), r.states["outlet"]
    spray = r.value("spray_water_flow") / 3600 * (1 + error)
    residual = energy_balance_residual(
        [Stream.of("steam", 1.25, steam), Stream.of("water", spray, water)],
        [Stream.of("outlet", 1.25 + spray, outlet)], spray * (outlet.enthalpy - water.enthalpy))
    assert residual == pytest.approx(abs(error) / (1 + error), rel=1e-3)
    assert residual > RELATIVE_TOLERANCE


def test_wet_streams_use_their_dryness():
    # Lever rule, IAPWS R7-97 region 4: 1 kg/s at x = 0.9 is 0.9 kg/s of saturated vapour and
    # 0.1 kg/s of saturated liquid at the same pressure.
    wet, vapour, liquid = (SteamState.from_p_dryness(3e5, x) for x in (0.9, 1.0, 0.0))
    residual = energy_balance_residual([Stream.of("wet", 1.0, wet)],
                                       [Stream.of("vapour", 0.9, vapour), Stream.of("liquid", 0.1, liquid)],
                                       0.9 * (vapour.enthalpy - liquid.enthalpy))
    assert residual < 1e-9


def test_a_balance_that_closes_is_a_notice_and_one_that_does_not_fails():
    # It closes by construction on a correct result, so it is shown as a notice, never as a pass; fed a
    # spray flow 0.5 % off, the same call makes a failing check of the residual against its tolerance.
    from steamcalc.calcs.balance import check_energy_balance
    from steamcalc.calcs.base import Result

    r = calculate(Inputs(**DESUPERHEATED), Site())
    assert _check(r, "Desuperheater energy balance (independent)").kind == "notice"
    steam, water, outlet = r.states["throttled"], SteamState.from_pT(21e5, 378.15), r.states["outlet"]
    spray = r.value("spray_water_flow") / 3600 * 1.005
    wrong = Result()
    check_energy_balance(wrong, "Desuperheater energy balance (independent)",
                         [Stream.of("steam", 1.25, steam), Stream.of("water", spray, water)],
                         [Stream.of("outlet", 1.25 + spray, outlet)], spray * (outlet.enthalpy - water.enthalpy))
    (check,) = wrong.checks
    assert check.kind == "limit" and check.status == "fail" and wrong.status == "fail"


def test_the_entropy_rise_and_the_relief_load_are_notices_not_passes():
    # A throttle always raises entropy; the relief design flow is what the relief designer needs: neither can
    # warn or fail, so both are notices (the relief load stays among the warnings, to be acted on).
    r = calculate(Inputs(**DESUPERHEATED, rated_kv=63.0, max_inlet_pressure=19e5, relief_set_pressure=5.5e5), Site())
    assert _check(r, "Second-law check").kind == "notice"
    assert _check(r, "Relief design flow for the relief designer").kind == "notice"
    assert any(w.startswith("Relief design flow for the relief designer:") for w in r.warnings)
