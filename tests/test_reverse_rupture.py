"""Tube rupture with the process side at the higher design pressure: the steam side's relief case by the API 521
rule, the liquid flow through two open tube ends by the orifice equation worked by hand (iapws density), and the
steam side's relief valve for it."""

import math

import pytest
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs, calculate
from steamcalc.cases.site import Site

ATM = 101325.0
BAR = 1e5


def g(bar_gauge):
    return ATM + bar_gauge * BAR


HEATER = dict(steam_pressure=g(3.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(4.0), tube_inside_diameter=0.0157)


@pytest.mark.parametrize("basis, steam_design, process_design, needed, source", [
    ("test pressure", 5.0, 16.0, "yes", "API 521 with ASME VIII-1 UG-99(b): 1.3 × 5 = 6.5 < 16 bar(g)"),
    ("test pressure", 5.0, 6.0, "no", "API 521 with ASME VIII-1 UG-99(b): 1.3 × 5 = 6.5 ≥ 6 bar(g)"),
    ("10/13", 10.0, 13.0, "no", "API 521 10/13 rule: 10 bar(g) = 10/13 of 13 bar(g)"),
    ("10/13", 9.9, 13.0, "yes", "API 521 10/13 rule: 9.9 bar(g) < 10 bar(g)"),
])
def test_steam_side_relief_rule(basis, steam_design, process_design, needed, source):
    result = calculate(Inputs(**HEATER, steam_side_design_pressure=g(steam_design),
                              process_side_design_pressure=g(process_design), rupture_basis=basis), Site())
    assert result.value("tube_rupture_reverse_relief_needed") == needed, source
    assert result.value("tube_rupture_relief_needed") == "no"   # the process side holds the steam's pressure


def test_liquid_through_two_tube_ends_by_hand():
    """Source: the orifice equation W = Cd·A·√(2ρΔp) for each open end (Crane TP-410, chapter 2), Cd 0.61 of a
    sharp-edged break (common practice), worked by hand with iapws (IF97) water at 16 bar(g) and 85 °C into the
    steam side relieving at 5.5 bar(g): 38.4 t/h."""
    result = calculate(Inputs(**HEATER, steam_side_design_pressure=g(5.0), process_side_design_pressure=g(16.0)),
                       Site())
    rho = IAPWS97(P=g(16.0) / 1e6, T=358.15).rho
    area = math.pi * 0.0157 ** 2 / 4
    hand = 2 * 0.61 * area * math.sqrt(2 * rho * (g(16.0) - g(5.5))) * 3600
    assert result.value("tube_rupture_reverse_relieving_pressure") == pytest.approx(g(5.5) / BAR, rel=1e-12)
    assert result.value("tube_rupture_reverse_flow") == pytest.approx(hand, rel=1e-4)
    assert round(hand / 1000, 1) == 38.4
    assert result.value("tube_rupture_reverse_governing_case").startswith("process liquid")
    assert result.value("tube_rupture_reverse_orifice") == "H"
