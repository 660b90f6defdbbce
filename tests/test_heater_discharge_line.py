"""The heater's relief discharge lines: the thermal relief's liquid line by Darcy-Weisbach worked by hand (iapws,
fluids), the valve's liquid capacity against fluids' API 520 liquid equation, the tube-rupture relief's steam line
against fluids' isothermal gas equation, a flashing thermal relief, the notices when no pipe is given, a pipe too
small for a T-orifice valve, and the outlet-pipe inputs refused by field."""

import math

import pytest
from fluids.compressible import isothermal_gas
from fluids.friction import friction_factor
from fluids.safety_valve import API520_A_l
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.errors import InputError

ATM = 101325.0
BAR = 1e5
ROUGHNESS = 4.5e-5             # m, commercial steel (Crane TP-410; common practice)
R_UNIVERSAL = 8314.462618      # J/(kmol K), CODATA 2018
MOLAR_MASS_WATER = 18.015268   # kg/kmol, IAPWS
D_ORIFICE = 0.110 * 645.16     # mm², API 526 D orifice
DN25 = (33.4 - 2 * 3.38) / 1e3  # m, schedule 40 (ASME B36.10M)


def g(bar_gauge):
    return ATM + bar_gauge * BAR


HEATER = dict(steam_pressure=g(8.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(2.0), steam_side_design_pressure=g(10.0),
              process_side_design_pressure=g(3.0), tube_inside_diameter=0.0157)
THERMAL_PIPE = dict(thermal_discharge_size="DN25", thermal_discharge_length=3.0, thermal_discharge_fittings_k=1.5)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def _step(result, label):
    return next(s for s in result.steps if s.label == label)


def test_thermal_relief_line_by_hand():
    """Source: the D orifice's liquid capacity W = Kd·A·√(2ρΔp) (API 520 Part I liquid equation) found again by
    fluids.safety_valve.API520_A_l (its area for that flow is the D orifice's, within 0.2 %: the standard's
    11.78 and its water density differ from the exact form); Darcy-Weisbach with iapws (IF97) water at 85 °C and
    fluids' Colebrook; the reaction force G²·A/ρ by hand. The process side is designed for 10 bar(g), so its water
    does not boil under the 8 bar(g) steam (188 °C against 175 °C, IF97) and the valve relieves liquid."""
    result = calculate(Inputs(**{**HEATER, "process_side_design_pressure": g(10.0)}, **THERMAL_PIPE), Site())
    p_r = g(10.0) + 1.0 * BAR
    relieving = IAPWS97(P=p_r / 1e6, T=358.15)
    flow = 0.65 * D_ORIFICE * 1e-6 * math.sqrt(2 * relieving.rho * (p_r - ATM))
    assert _step(result, "Thermal relief: liquid capacity of the valve (D orifice)").value == pytest.approx(
        flow * 3600, rel=1e-4)
    area = API520_A_l(flow, relieving.rho, p_r, ATM, overpressure=0.1, Kd=0.65, Kw=1.0, Kv=1.0)
    assert area * 1e6 == pytest.approx(D_ORIFICE, rel=2e-3)
    water = IAPWS97(P=ATM / 1e6, T=358.15)
    pipe_area = math.pi * DN25 ** 2 / 4
    velocity = flow / water.rho / pipe_area
    f = friction_factor(Re=water.rho * velocity * DN25 / water.mu, eD=ROUGHNESS / DN25, Method="Colebrook")
    drop = (f * 3.0 / DN25 + 1.5) * water.rho * velocity ** 2 / 2
    assert result.value("thermal_relief_built_up_back_pressure") * BAR == pytest.approx(ATM + drop, rel=2e-3)
    assert result.value("thermal_relief_reaction_force") == pytest.approx(flow * velocity, rel=2e-3)
    assert _check(result, "Thermal relief: built-up back pressure").status == "pass"


def test_tube_rupture_steam_line_against_fluids_isothermal_gas():
    """Source: fluids.compressible.isothermal_gas (the complete isothermal equation): from the record's outlet and
    exit pressures, temperature, bore and friction it gives the rated steam flow of the selected orifice,
    load × A_orifice / A_required, worked by hand."""
    result = calculate(Inputs(**HEATER, discharge_size="DN250", discharge_length=5.0, discharge_fittings_k=1.0),
                       Site())
    # The steam's required area: the larger of direct integration and the API 520 steam equation (as sized).
    steam_area = max(s.value for s in result.steps if s.label.startswith("Tube rupture, steam: required area"))
    rated = result.value("tube_rupture_flow") * result.value("tube_rupture_orifice_area") / steam_area / 3600
    ops = dict(_step(result, "Tube rupture, steam: built-up back pressure").operands)
    temperature = ops["T"].value + 273.15
    diameter = ops["D"].value / 1e3
    p1 = result.value("tube_rupture_steam_built_up_back_pressure") * BAR
    rho1 = p1 * MOLAR_MASS_WATER / (R_UNIVERSAL * temperature)
    fd = ops["f"].value + 1.0 * diameter / 5.0
    flow = isothermal_gas(rho1, fd, P1=p1, P2=ops["p2"].value * BAR, L=5.0, D=diameter)
    assert flow == pytest.approx(rated, rel=1e-4)
    assert "tube_rupture_liquid_built_up_back_pressure" in result.values


def test_pipe_too_small_for_a_t_orifice_fails():
    """Source: by definition, a built-up back pressure at the set pressure stops the valve passing its flow; a T
    orifice (API 526) needs a far larger outlet than DN100."""
    result = calculate(Inputs(**HEATER, discharge_size="DN100", discharge_length=6.0), Site())
    assert result.value("tube_rupture_orifice") == "T"
    assert _check(result, "Tube rupture, steam: built-up back pressure").status == "fail"
    assert result.status == "fail"


def test_flashing_thermal_relief_goes_two_phase():
    """Source: IF97 saturation at the atmosphere (99.97 °C): water at 130 °C flashes in the valve and the pipe,
    its capacity by direct integration (API 520 Part I annex B) and its line by the omega method (process side
    designed for 10 bar(g): the water does not boil under the 8 bar(g) steam; a DN50 pipe, as water at 130 °C
    relieved from 11 bar(g) flashes to far more volume than from the 3.3 bar(g) of a lower design)."""
    result = calculate(Inputs(**{**HEATER, "process_outlet_temperature": 403.15, "process_pressure": g(2.5),
                                 "process_side_design_pressure": g(10.0)},
                              **{**THERMAL_PIPE, "thermal_discharge_size": "DN50"}), Site())
    assert _step(result, "Thermal relief: flashing-liquid capacity of the valve (D orifice)").value > 0
    assert _step(result, "Thermal relief: built-up back pressure (two-phase)").value > ATM / BAR
    assert result.value("thermal_relief_reaction_force") > 0


def test_boiling_process_water_relieves_vapour_through_its_thermal_pipe():
    """Source: IF97 saturation (water at 4.31 bar(a) boils at 146 °C, 8 bar(g) steam condenses at 175 °C): the
    thermal relief is vapour generation φ/h_fg, sized as steam (API 520 Part I), its pipe by isothermal flow; a
    D orifice cannot pass it (the check warns)."""
    result = calculate(Inputs(**HEATER, **THERMAL_PIPE), Site())
    latent = IAPWS97(P=(g(3.0) + 0.3 * BAR) / 1e6, x=1).h - IAPWS97(P=(g(3.0) + 0.3 * BAR) / 1e6, x=0).h
    assert result.value("thermal_relief_vapour_load") == pytest.approx(
        result.value("steam_side_heat") / latent * 3600, rel=1e-6)
    assert _check(result, "Thermal relief: minimum size").status == "warn"
    assert result.value("thermal_relief_built_up_back_pressure") > ATM / BAR


def test_no_pipes_are_notices():
    result = calculate(Inputs(**HEATER), Site())
    for name in ("Tube rupture: discharge line", "Thermal relief: discharge line"):
        said = _check(result, name)
        assert said.notice and "not assessed" in said.detail


@pytest.mark.parametrize("pipe, field", [
    (dict(thermal_discharge_size="DN25"), "overpressure.thermal_discharge_length"),
    (dict(discharge_length=6.0), "overpressure.discharge_size"),
    (dict(discharge_size="DN100", discharge_length=6.0, discharge_fittings_k=-1.0),
     "overpressure.discharge_fittings_k"),
    (dict(relief_valve_type="spring"), "overpressure.valve_type"),
    (dict(**THERMAL_PIPE, process_cp=2100.0, process_density=850.0, process_expansion_coefficient=0.0007),
     "overpressure.thermal_discharge_size"),
])
def test_outlet_pipe_inputs_refused_by_field(pipe, field):
    with pytest.raises(InputError) as caught:
        Inputs(**{**HEATER, **pipe})
    assert caught.value.field == field and caught.value.fix
