"""Case texts shared by the site-balance tests: a small site and a balance on it (invented figures); and the
small two-header site the hand-worked balances use, with the IAPWS-95 enthalpy they are worked with."""

from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.site_balance.items import LoadCase
from steamcalc.cases.site import Site

ATM = 1.01325e5
#: HP 11 bar(a), LP 2.5 bar(a): the site of the balances worked by hand.
HAND_SITE = Site(atmospheric_pressure=ATM, makeup_water_temperature=288.15, boiler_efficiency=0.86,
                 headers={"HP": 11e5, "LP": 2.5e5})
YEAR = (LoadCase("all year", 8000 * 3600.0),)


def coolprop_enthalpy(p, **state):
    """Specific enthalpy, J/kg, from IAPWS-95 through CoolProp: at pressure ``p`` (Pa) and ``Q`` or ``T`` (K)."""
    if "Q" in state:
        return PropsSI("H", "P", p, "Q", state["Q"], "Water")
    return PropsSI("H", "P", p, "T", state["T"], "Water")


SITE = """
[site]
name = "Test site"
atmospheric_pressure = "1.01325 bar(a)"
operating_hours = "6000 h"
fuel_price = "40 EUR/MWh"
boiler_efficiency = 0.86
makeup_water_temperature = "15 degC"
fuel_emission_factor = "0.182 kg/kWh"
water_cost = "2.5 EUR/m3"

[headers]
HP = "16 bar(g)"
MP = "8 bar(g)"
LP = "2.5 bar(g)"
"""

HEAD = """
[case]
kind = "balance"
id = "SB-T"
title = "test balance"
revision = "A"
prepared_by = "T. Tester"
site = "site.toml"
"""

BOILER = """
[inputs.boiler]
header = "HP"
pressure = "16.5 bar(g)"
temperature = "232 degC"
capacity = "12 t/h"
feedwater_tds = 150
boiler_water_tds = 3000

[inputs.deaerator]
pressure = "0.2 bar(g)"
steam_header = "LP"
vent_fraction = 0.02

[[inputs.load_case]]
name = "winter"
hours = "3500 h"

[[inputs.load_case]]
name = "summer"
hours = "2500 h"
"""

NETWORK = """
[[inputs.letdown]]
name = "HP-MP"
from = "HP"
to = "MP"
max_flow = "2.6 t/h"
min_flow = "0.5 t/h"

[[inputs.letdown]]
name = "HP-LP"
from = "HP"
to = "LP"
target_superheat = "10 K"
water_temperature = "105 degC"
water_pressure = "20 bar(g)"
max_flow = "5.5 t/h"
min_flow = "1.0 t/h"

[[inputs.user]]
name = "Preheater"
header = "MP"
load = "1.5 t/h"
condensate_return = 1.0
return_temperature = "98 degC"

[[inputs.user]]
name = "Heater"
header = "MP"
load = "420 kW"
condensate_return = 1.0
return_temperature = "110 degC"
condensate_to = "deaerator"

[[inputs.user]]
name = "Evaporator"
header = "LP"
load = "2.5 t/h"
condensate_return = 0.9
return_temperature = "95 degC"

[[inputs.user]]
name = "Space heating"
header = "LP"
load = { winter = "700 kW", summer = "100 kW" }
condensate_return = 0.9
return_temperature = "80 degC"

[[inputs.flash]]
name = "Flash"
condensate_of = "Preheater"
to = "LP"

[inputs.what_if]
without = ["Flash"]
"""

CASE = HEAD + BOILER + NETWORK


def write_site(folder):
    (folder / "site.toml").write_text(SITE)
    return folder / "site.toml"
