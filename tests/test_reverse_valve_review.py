"""An independent checker's review of the reverse tube-rupture relief valve (commit 275f43b): the process side has the
higher design pressure, process liquid enters the steam side through a broken tube, and the steam side's valve passes
the displaced steam and then the liquid.

Each test is a finding that a checker would send back, worked by hand with iapws (IF97) and fluids, not with
steamcalc's own functions; each says what was found and what is expected.
"""

import math

import pytest
from fluids.friction import friction_factor
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.errors import SteamcalcError

ATM = 101325.0
BAR = 1e5
NAME = "Tube rupture, process side the higher"
#: Schedule 40 bores, m: outside diameter less two walls (ASME B36.10M, metric columns).
DN80 = (88.9 - 2 * 5.49) / 1e3
ROUGHNESS = 4.5e-5               # m, commercial steel (common practice)
KD_LIQUID = 0.65                 # API 520 Part I, liquid and subcooled flashing liquid, preliminary sizing
CD_BREAK = 0.61                  # sharp-edged orifice (common practice), the record's basis for the break
API526_J_MM2 = 1.287 * 645.16    # API 526 effective area of the J orifice, in² → mm²


def g(bar_gauge):
    return ATM + bar_gauge * BAR


def _text(detail):
    return detail if isinstance(detail, str) else detail.text("SI")


#: 5 bar(g) steam side, 16 bar(g) process side: a relief case for the steam side (1.3 × 5 < 16, ASME VIII-1 UG-99(b)).
HEATER = dict(steam_pressure=g(3.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(4.0), steam_side_design_pressure=g(5.0),
              process_side_design_pressure=g(16.0), tube_inside_diameter=0.0157)


def test_a_liquid_hotter_than_its_boiling_point_at_the_outlet_is_sized_as_a_flashing_liquid():
    """Found: process liquid at 160 °C relieved at 12.56 bar(a) to the atmosphere is sized by API 520 Part I's
    (non-flashing) liquid equation over P1 − p_atm: 750 mm², a J orifice. Its saturation pressure is 6.18 bar(a):
    it flashes in the nozzle, and its flux is that of a subcooled liquid choking at its saturation pressure,
    G = √(2ρ(P1 − p_sat)) (API 520 Part I annex C, high-subcooling region; the direct integration of the isentrope
    on IF97, annex B, gives the same within 0.1 %): 1009 mm², a K orifice; the J passes 82 % of the load. The
    record's own thermal relief sizes the same liquid as flashing; its discharge pipe takes it as flashing once below
    p_sat. Expected: the valve sized for a flashing liquid when the liquid boils at the back pressure."""
    hot = dict(HEATER, steam_pressure=g(9.0), process_flow=25 / 3.6, process_inlet_temperature=353.15,
               process_outlet_temperature=433.15, process_pressure=g(25.0), steam_side_design_pressure=g(10.5),
               process_side_design_pressure=g(40.0), tube_inside_diameter=0.018)
    result = calculate(Inputs(**hot), Site())
    p_set = g(10.5)
    p1 = p_set + 0.1 * (p_set - ATM)
    rho_break = IAPWS97(P=g(40.0) / 1e6, T=433.15).rho
    load = 2 * CD_BREAK * math.pi * 0.018 ** 2 / 4 * math.sqrt(2 * rho_break * (g(40.0) - p1))   # kg/s
    assert result.value("tube_rupture_reverse_flow") == pytest.approx(load * 3600, rel=1e-6)
    liquid = IAPWS97(P=p1 / 1e6, T=433.15)
    p_sat = IAPWS97(T=433.15, x=0).P * 1e6
    assert p_sat > ATM   # it boils at the atmosphere
    flashing = load / (KD_LIQUID * math.sqrt(2 * liquid.rho * (p1 - p_sat))) * 1e6
    assert flashing > API526_J_MM2
    assert result.value("tube_rupture_reverse_required_area") >= flashing * (1 - 1e-3)
    assert result.value("tube_rupture_reverse_orifice") == "K"


def test_the_inlet_loss_of_the_displaced_steam_is_checked_too():
    """Found: the inlet pipe is assessed for the governing fluid only (here the liquid, 2.8 % of the gauge set
    pressure: pass), but the valve passes the displaced steam first, through the same pipe, at its own rated flow:
    at a 0.5 bar(g) set pressure that steam loses 3.5 % (Darcy-Weisbach, Colebrook; its rated flow the
    L orifice's steam capacity by API 520 Part I's steam equation; 3.6 % as the record sizes it), above the 3 % of API
    520 Part II (inlet piping), so the valve may chatter while it passes the steam. The discharge pipe is assessed
    for both fluids; the inlet pipe should be too. Expected: the inlet loss of each fluid the valve passes, the
    larger held against 3 %."""
    low = dict(HEATER, steam_pressure=g(0.3), process_inlet_temperature=313.15, process_outlet_temperature=353.15,
               steam_side_design_pressure=g(0.5), process_side_design_pressure=g(10.0))
    result = calculate(Inputs(**low, discharge_size="DN100", discharge_length=3.0, relief_inlet_size="DN80",
                              relief_inlet_length=0.3, relief_inlet_fittings_k=0.36), Site())
    assert result.value("tube_rupture_reverse_orifice") == "L"
    assert result.value("tube_rupture_reverse_governing_case").startswith("process liquid")
    p_set = g(0.5)
    p1 = p_set + 0.1 * (p_set - ATM)
    steam = IAPWS97(P=p1 / 1e6, x=1)
    area = 2.853 * 645.16                                  # API 526 L orifice, mm²
    rated = area * (p1 / 1e3) * 0.975 / 190.5              # kg/h, API 520 Part I steam equation, Kd 0.975
    velocity = rated / 3600 / steam.rho / (math.pi * DN80 ** 2 / 4)
    f = friction_factor(Re=steam.rho * velocity * DN80 / steam.mu, eD=ROUGHNESS / DN80, Method="Colebrook")
    share = (f * 0.3 / DN80 + 0.36) * steam.rho * velocity ** 2 / 2 / (p_set - ATM) * 100
    assert share > 3.3
    inlet = [c for c in result.checks if c.name.startswith(NAME) and "inlet pressure loss" in c.name]
    assert inlet and any(c.status != "pass" for c in inlet), [(c.name, c.status, _text(c.detail)) for c in inlet]


@pytest.mark.parametrize("design", [0.0, -0.2], ids=["atmospheric", "vacuum"])
def test_a_steam_side_designed_for_atmospheric_pressure_is_refused_by_name(design):
    """Found: a steam side designed for 0 bar(g) (or for vacuum), with the process side at 16 bar(g), makes the
    reverse case a relief case at a set pressure of the atmosphere; sizing it divides by zero: 'unexpected error
    ZeroDivisionError' through `steamcalc run`. Expected: a SteamcalcError naming
    overpressure.steam_side_design_pressure, its value and a fix (or a record that says the relief case is not
    assessed at that set pressure)."""
    case = dict(HEATER, steam_pressure=g(-0.5), process_inlet_temperature=313.15, process_outlet_temperature=333.15,
                steam_side_design_pressure=g(design))
    try:
        calculate(Inputs(**case), Site())
    except Exception as exc:  # noqa: BLE001 - the defect is the kind of exception
        assert isinstance(exc, SteamcalcError), repr(exc)
        assert exc.field == "overpressure.steam_side_design_pressure" and exc.fix


def test_a_discharge_pipe_narrower_than_the_valve_outlet_is_flagged():
    """Found: a DN65 discharge pipe on the J-orifice valve (API 526's smallest J valve, 2J3, has an NPS 3 outlet)
    passes without a word; the let-down's relief valve warns of an outlet pipe narrower than the valve's outlet
    (common practice: it raises the built-up back pressure and the reaction force). Expected: the same warning for
    the heater's tube-rupture valve."""
    result = calculate(Inputs(**HEATER, relief_valve_type="balanced-bellows", discharge_size="DN65",
                              discharge_length=15.0, discharge_fittings_k=2.0), Site())
    assert result.value("tube_rupture_reverse_orifice") == "J"
    said = [_text(c.detail) for c in result.checks if c.name.startswith(NAME) and c.status in ("warn", "fail")]
    assert any("narrower than the valve's outlet" in s for s in said), said


def test_a_process_side_design_pressure_near_the_critical_point_is_refused_by_its_key():
    """Found: process side designed for 205 bar(g) (its relieving pressure 226.5 bar(a), above water's critical
    pressure) is refused as "field 'pressure'": no case-file key, no fix (raised by the thermal relief's saturation
    state). Expected: the error names overpressure.process_side_design_pressure and says what to do."""
    case = dict(HEATER, process_side_design_pressure=g(205.0), tube_inside_diameter=0.005)
    with pytest.raises(SteamcalcError) as caught:
        calculate(Inputs(**case), Site())
    assert caught.value.field == "overpressure.process_side_design_pressure" and caught.value.fix
