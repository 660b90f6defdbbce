"""The steam_main kind: heat loss, two-phase drop, flash fraction and warm-up load against independent
references (each named beside its check), its refusals, and its rows of segments read back from a record."""

import math

import pytest

from steamcalc.calcs.steam_main.calculation import SEGMENT_COLUMNS, Inputs, calculate
from steamcalc.calcs.steam_main.heat_loss import Insulation, surface_loss
from steamcalc.calcs.steam_main.loads import STEEL_DENSITY, segment_loads, warmup_mass
from steamcalc.calcs.steam_main.main import Segment, segment_flows
from steamcalc.calcs.steam_main.return_line import return_flow
from steamcalc.cases.site import Site
from steamcalc.properties.steam import SteamState, dynamic_viscosity
from steamcalc.units.rows import parse_rows, rows_text
from tests.case_helpers import assert_refused

ATM = 101325.0


def _hand_loss(d_pipe, t_steam, t_air, wind, thickness, k50, k150, eps):
    """The heat balance written out again from the named correlations (ht, iapws air), solved by scipy."""
    from ht.conv_external import Nu_cylinder_Churchill_Bernstein
    from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
    from iapws.humidAir import Air
    from scipy.optimize import brentq

    def outside(d, ts):
        film = (ts + t_air) / 2
        air = Air(T=film, P=ATM / 1e6)
        nu = air.mu / air.rho
        gr = 9.80665 / film * (ts - t_air) * d ** 3 / nu ** 2
        nusselt = Nu_horizontal_cylinder_Churchill_Chu(air.Prandt, gr)
        if wind > 0:
            nusselt = max(nusselt, Nu_cylinder_Churchill_Bernstein(wind * d / nu, air.Prandt))
        h_rad = eps * 5.670374419e-8 * (ts ** 4 - t_air ** 4) / (ts - t_air)
        return math.pi * d * (nusselt * air.k / d + h_rad) * (ts - t_air)

    if thickness == 0:
        return outside(d_pipe, t_steam), t_steam
    d_out = d_pipe + 2 * thickness

    def k(tm):
        return k50 + (k150 - k50) / 100 * (tm - 323.15)
    ts = brentq(lambda ts: 2 * math.pi * k((t_steam + ts) / 2) * (t_steam - ts) / math.log(d_out / d_pipe)
                - outside(d_out, ts), t_air + 1e-6, t_steam - 1e-6, xtol=1e-10)
    return outside(d_out, ts), ts


# Hand calculations with the named correlations: Churchill-Chu (still air), Churchill-Bernstein (wind),
# Stefan-Boltzmann radiation, Fourier conduction through the shell; air from Lemmon et al. (2000, 2004).
HEAT_LOSS_CASES = [
    # (pipe OD m, steam K, air K, wind m/s, thickness m, emissivity, source)
    (0.0889, 448.45, 288.15, 0.0, 0.05, 0.1, "hand calculation, Churchill-Chu + radiation, insulated DN80"),
    (0.0889, 448.45, 288.15, 0.0, 0.0, 0.8, "hand calculation, Churchill-Chu + radiation, bare DN80"),
    (0.1683, 473.15, 263.15, 5.0, 0.08, 0.9, "hand calculation, Churchill-Bernstein + radiation, insulated DN150"),
    (0.1683, 473.15, 263.15, 5.0, 0.0, 0.8, "hand calculation, Churchill-Bernstein + radiation, bare DN150"),
]


@pytest.mark.parametrize("d, t_steam, t_air, wind, thickness, eps, source", HEAT_LOSS_CASES)
def test_heat_loss_against_hand_calculation(d, t_steam, t_air, wind, thickness, eps, source):
    insulation = Insulation(thickness, 0.040, 0.056, eps) if thickness or eps != 0.8 else None
    got = surface_loss(d, t_steam, t_air, wind, ATM, insulation)
    want, surface = _hand_loss(d, t_steam, t_air, wind, thickness, 0.040, 0.056, eps)
    assert got.heat_loss == pytest.approx(want, rel=1e-6), source
    assert got.surface_temperature == pytest.approx(surface, abs=1e-5), source


def test_air_properties_against_coolprop():
    """Air conductivity and viscosity (iapws, Lemmon 2004) against CoolProp's air at 40 °C, 1 atm, to 1 %."""
    from CoolProp.CoolProp import PropsSI

    from steamcalc.calcs.steam_main.heat_loss import air_properties
    k, nu, pr = air_properties(313.15, ATM)
    assert k == pytest.approx(PropsSI("L", "T", 313.15, "P", ATM, "Air"), rel=0.01)
    mu, rho = PropsSI("V", "T", 313.15, "P", ATM, "Air"), PropsSI("D", "T", 313.15, "P", ATM, "Air")
    assert nu == pytest.approx(mu / rho, rel=0.01)


# Two-phase friction drop against fluids.two_phase.Muller_Steinhagen_Heck called directly on the same IF97 states.
TWO_PHASE_CASES = [
    # (flow kg/s, trap inlet Pa(a), receiver Pa(a), size, length m, source)
    (0.2125, 5.0e5, 3.5e5, "DN50", 160.0, "fluids.two_phase.Muller_Steinhagen_Heck, direct"),
    (0.5, 9.0e5, 1.2e5, "DN80", 60.0, "fluids.two_phase.Muller_Steinhagen_Heck, direct"),
]


@pytest.mark.parametrize("m, p_trap, p_recv, size, length, source", TWO_PHASE_CASES)
def test_two_phase_drop_against_fluids(m, p_trap, p_recv, size, length, source):
    from fluids.two_phase import Muller_Steinhagen_Heck

    from steamcalc.equipment.piping import pipe_dimensions
    flow = return_flow([(m, p_trap)], p_recv, size, "80", length, 0.0)
    f, g = SteamState.from_p_dryness(p_recv, 0.0), SteamState.from_p_dryness(p_recv, 1.0)
    x = (SteamState.from_p_dryness(p_trap, 0.0).enthalpy - f.enthalpy) / (g.enthalpy - f.enthalpy)
    d = pipe_dimensions(size, "80")[0]
    want = Muller_Steinhagen_Heck(m, x, f.density, g.density, dynamic_viscosity(f.temperature, f.density),
                                  dynamic_viscosity(g.temperature, g.density), d, roughness=4.5e-5, L=length)
    assert flow.friction_drop == pytest.approx(want, rel=1e-9), source


# Flash fraction of trap discharge against IAPWS-95 (CoolProp's water, a reference implementation).
FLASH_CASES = [
    (9.0e5, 3.5e5, "IAPWS-95 through CoolProp"),
    (5.0e5, 1.2e5, "IAPWS-95 through CoolProp"),
    (17.0e5, 1.01325e5, "IAPWS-95 through CoolProp"),
]


@pytest.mark.parametrize("p_trap, p_recv, source", FLASH_CASES)
def test_flash_fraction_against_iapws95(p_trap, p_recv, source):
    from CoolProp.CoolProp import PropsSI

    flow = return_flow([(0.1, p_trap)], p_recv, "DN50", "80", 10.0, 0.0)
    h_in = PropsSI("H", "P", p_trap, "Q", 0, "Water")
    h_f, h_g = PropsSI("H", "P", p_recv, "Q", 0, "Water"), PropsSI("H", "P", p_recv, "Q", 1, "Water")
    assert flow.dryness == pytest.approx((h_in - h_f) / (h_g - h_f), abs=2e-4), source


def test_steel_mass_against_asme_b36_10m():
    """DN80 (NPS 3) schedule 40 plain-end mass: 11.29 kg/m in ASME B36.10M's table."""
    flows = segment_flows([Segment(1.0, "DN80")], SteamState.from_p_dryness(9e5, 1.0), 0.2, 288.15, 0.0, ATM,
                          Insulation(0.05, 0.04, 0.056, 0.1))
    steel, _ = warmup_mass(flows[0])
    assert STEEL_DENSITY == 7850.0
    assert steel == pytest.approx(11.29, abs=0.01)


def test_warmup_load_by_hand():
    """Warm-up load of 72 m of DN80 sch 40 with 50 mm insulation, worked by hand from the module's equation."""
    sat = SteamState.from_p_dryness(9e5, 1.0)
    latent = sat.enthalpy - SteamState.from_p_dryness(9e5, 0.0).enthalpy
    flows = segment_flows([Segment(72.0, "DN80")], sat, 0.2, 288.15, 0.0, ATM, Insulation(0.05, 0.04, 0.056, 0.1))
    running, warm = segment_loads(flows[0], sat.temperature, 288.15, latent, 1200.0)
    d_o, d_i = 0.0889, 0.0889 - 2 * 0.00549            # ASME B36.10M NPS 3 sch 40: 88.9 mm OD, 5.49 mm wall
    steel = 7850 * math.pi / 4 * (d_o ** 2 - d_i ** 2) * 72
    wool = 100 * math.pi / 4 * ((d_o + 0.1) ** 2 - d_o ** 2) * 72
    rise = sat.temperature - 288.15
    hand = (steel * 490 * rise + wool * 840 * rise / 2) / (latent * 1200) + flows[0].heat_loss / latent / 2
    assert warm == pytest.approx(hand, rel=2e-3)
    assert running == pytest.approx(flows[0].heat_loss / latent, rel=1e-12)


def test_demo_main_balances_and_drips():
    site = Site()
    inputs = Inputs(supply_pressure=9e5, steam_flow=750 / 3600, insulation_thickness=0.05,
                    segments=((72.0, "DN80", None, 2.1, None), (3.0, "DN80", None, 0.6, 3.0), (75.0, "DN80", None, 1.8, None)),
                    drip_spacing=75.0)
    r = calculate(inputs, site)
    assert r.value("drip_points") == 2
    assert [r.value("drip_1_position"), r.value("drip_2_position")] == [72.0, 150.0]
    # The drips take what the segments make: loads close.
    assert r.value("drip_1_running_load") + r.value("drip_2_running_load") == pytest.approx(r.value("running_load_total"))
    assert r.value("drip_1_warmup_load") + r.value("drip_2_warmup_load") == pytest.approx(r.value("warmup_load_total"))


def test_return_line_sized_as_water_alone_is_flagged():
    inputs = Inputs(supply_pressure=9e5, steam_flow=0.2, insulation_thickness=0.05,
                    segments=((150.0, "DN80", None, None, None),), receiver_pressure=3.5e5, return_size="DN15",
                    return_length=100.0, heater_condensate_flow=0.2, heater_trap_pressure=5e5)
    r = calculate(inputs, Site())
    assert r.value("return_water_alone_size") == "DN15"   # the line as water alone would size it
    check = next(c for c in r.checks if c.name == "Return line area against the area the flash needs")
    assert check.status == "fail" and "times the volume of water alone" in str(check.detail)


def test_rows_read_back_from_the_record_text():
    rows = parse_rows([{"length": "72 m", "size": "DN80", "fittings_k": 2.1}, {"length": "3 m", "size": "DN80",
                                                                              "rise": "-1.5 m"}], "segments", SEGMENT_COLUMNS)
    assert parse_rows(rows_text(rows, SEGMENT_COLUMNS), "segments", SEGMENT_COLUMNS) == rows
    assert rows[1][4] == -1.5


CASE = """[case]
kind = "steam_main"
id = "SM-T"
[inputs]
supply_pressure = "8 bar(g)"
steam_flow = "750 kg/h"
{segments}
[inputs.insulation]
thickness = "{thickness}"
{return_line}
"""
SEGMENT = '[[inputs.segments]]\nlength = "150 m"\nsize = "DN80"\n'
RETURN = '[inputs.return_line]\nreceiver_pressure = "{receiver}"\nsize = "DN50"\nlength = "100 m"\n'


@pytest.mark.parametrize("segments, thickness, return_line, field", [
    ('[[inputs.segments]]\nsize = "DN80"\n', "50 mm", "", "segments[0].length"),
    (SEGMENT, "-10 mm", "", "insulation.thickness"),
    (SEGMENT, "50 mm", RETURN.format(receiver="10 bar(g)"), "return_line.receiver_pressure"),
    (SEGMENT, "50 mm", '[inputs.return_line]\nlift = "3 m"\n', "return_line.lift"),
    (SEGMENT, "50 mm", RETURN.format(receiver="2.5 bar(g)").replace('size = "DN50"\n', ""), "return_line.size"),
])
def test_bad_input_refused_by_name(tmp_path, capsys, segments, thickness, return_line, field):
    """A segment with no length, insulation thinner than zero, a receiver above the traps, a lift without a
    back pressure, a return line with no size: refused with the file and the field named (exit 2, no record)."""
    assert_refused(tmp_path, capsys, CASE.format(segments=segments, thickness=thickness, return_line=return_line),
                   field)
