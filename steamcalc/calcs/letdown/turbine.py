"""What the let-down valve throws away: a back-pressure turbine in its place, valued net of the
boiler fuel that makes up the shaft work, and the exergy the valve destroys.

Called by :func:`steamcalc.calcs.letdown.calculation.calculate` with the states it has found; adds its
values, steps and checks to the same Result.
"""

from __future__ import annotations

from ...errors import OutOfRangeError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..balance import Stream, check_energy_balance
from ..economics import annual_energy, annual_fuel_energy, annual_value, fuel_basis_assumption, missing_site_data

#: Isentropic efficiency of a small single-stage back-pressure turbine (common practice).
DEFAULT_TURBINE_EFFICIENCY = 0.55
#: Generator (and gearbox) efficiency of a small turbine-generator set (common practice).
DEFAULT_GENERATOR_EFFICIENCY = 0.95
#: Dead state for exergy when the site gives no ambient temperature, K.
DEFAULT_AMBIENT = 288.15


def turbine_exhaust_enthalpy(inlet_enthalpy, isentropic_enthalpy, isentropic_efficiency):
    """Exhaust enthalpy of a turbine from its isentropic efficiency, J/kg.

    Parameters
    ----------
    inlet_enthalpy : float
        h1, J/kg.
    isentropic_enthalpy : float
        h2s = h(p2, s1), J/kg.
    isentropic_efficiency : float
        η_s, 0 to 1.

    Notes
    -----
    .. math:: h_{2} = h_1 - \\eta_s (h_1 - h_{2s})

    References
    ----------
    Definition of the isentropic efficiency of a turbine (any engineering-thermodynamics text).

    Examples
    --------
    >>> turbine_exhaust_enthalpy(2870e3, 2620e3, 0.55)
    2732500.0
    """
    return inlet_enthalpy - isentropic_efficiency * (inlet_enthalpy - isentropic_enthalpy)


def net_turbine_value(shaft_power, generator_efficiency, boiler_efficiency, operating_hours,
                      power_price, fuel_price):
    """Yearly value of a back-pressure turbine net of the fuel that makes up its shaft work.

    Parameters
    ----------
    shaft_power : float
        P, W.
    generator_efficiency : float
        η_g, electrical output over shaft power, 0 to 1.
    boiler_efficiency : float
        η_b, on the site's fuel basis, 0 to 1.
    operating_hours : float
        t, h a year.
    power_price, fuel_price : steamcalc.cases.site.Price
        Per MWh of electricity and of fuel, in one currency.

    Returns
    -------
    tuple of float
        (electrical energy MWh, electricity value, make-up fuel energy MWh, make-up fuel cost,
        net value) a year.

    Notes
    -----
    The steam leaves the turbine with P/ṁ less enthalpy than it leaves the valve, so the boiler
    must supply P more heat for the same heat to the low-pressure users:

    .. math:: V_{net} = P \\eta_g t c_e - \\frac{P}{\\eta_b} t c_f

    References
    ----------
    First-law balance of a steam system with a back-pressure turbine in place of a let-down
    valve (common practice for combined heat and power screening).

    Examples
    --------
    >>> from steamcalc.cases.site import Price
    >>> [round(v, 1) for v in net_turbine_value(100e3, 0.95, 0.86, 6000.0, Price(120.0, "EUR"),
    ...                                          Price(40.0, "EUR"))]
    [570.0, 68400.0, 697.7, 27907.0, 40493.0]
    """
    electrical = annual_energy(shaft_power * generator_efficiency, operating_hours)
    electricity_value = annual_value(electrical, power_price)
    fuel = annual_fuel_energy(shaft_power, operating_hours, boiler_efficiency)
    fuel_cost = annual_value(fuel, fuel_price)
    return electrical, electricity_value, fuel, fuel_cost, electricity_value - fuel_cost


def power_section(inputs, inlet, throttled, site, result):
    """Isentropic drop, turbine shaft and electrical power, exhaust state, net yearly value, exergy."""
    try:
        isentropic = SteamState.from_ps(inputs.outlet_pressure, inlet.entropy)
    except OutOfRangeError as exc:
        raise exc.for_field("outlet_pressure") from None
    drop = inlet.enthalpy - isentropic.enthalpy
    efficiency = inputs.isentropic_efficiency
    if efficiency is None:
        efficiency = DEFAULT_TURBINE_EFFICIENCY
        result.assumptions.append(f"Back-pressure turbine isentropic efficiency {DEFAULT_TURBINE_EFFICIENCY} "
                                  "(small single-stage machine, common practice; not given)")
    generator = inputs.generator_efficiency
    if generator is None:
        generator = DEFAULT_GENERATOR_EFFICIENCY
        result.assumptions.append(f"Turbine generator efficiency {DEFAULT_GENERATOR_EFFICIENCY} (generator and "
                                  "gearbox of a small set, common practice; not given)")
    power = inputs.mass_flow * efficiency * drop
    result.work("Isentropic enthalpy drop", "Δh_s = h1 − h_2s,  h_2s = h(p2, s1)  [IF97]", "h1 - h_2s", drop / 1e3,
                "kJ/kg", h1=(inlet.enthalpy / 1e3, "kJ/kg"), h_2s=(isentropic.enthalpy / 1e3, "kJ/kg"))
    result.work("Recoverable shaft power", "P = m·η_s·Δh_s", "m*eta_s*dh_s", power / 1e3, "kW",
                m=(inputs.mass_flow * 3600, "kg/h"), eta_s=(efficiency, ""), dh_s=(drop / 1e3, "kJ/kg"))
    result.work("Electrical power", "P_e = η_g·P", "eta_g*P", generator * power / 1e3, "kW",
                eta_g=(generator, ""), P=(power / 1e3, "kW"))
    result.add("isentropic_enthalpy_drop", "Isentropic enthalpy drop, inlet to outlet pressure", drop / 1e3, "kJ/kg")
    result.add("recoverable_power", "Shaft power a back-pressure turbine would recover", power / 1e3, "kW")
    result.add("recoverable_electrical_power", "Electrical power a turbine-generator would recover",
               generator * power / 1e3, "kW")
    _exhaust(inputs, inlet, isentropic, efficiency, result)
    # The valve's own balance, h2 = h1, re-worked from the two recorded states with the other engine.
    check_energy_balance(result, "Throttling energy balance (independent)",
                         [Stream.of("inlet steam", inputs.mass_flow, inlet)],
                         [Stream.of("steam after the valve", inputs.mass_flow, throttled)], inputs.mass_flow * drop)
    result.assumptions.append("Turbine figures at the normal flow. The turbine exhaust carries less heat per kg "
                              "than the valve's outlet, so the boiler makes up the shaft work: the yearly value "
                              "is net of that make-up fuel (first-law balance, common practice)")
    if not missing_site_data(site, ("operating_hours", "power_price")):
        _yearly_value(power, generator, site, result)

    ambient = site.ambient_temperature
    if ambient is None:
        ambient = DEFAULT_AMBIENT
        result.assumptions.append(f"Dead state for exergy {DEFAULT_AMBIENT - 273.15:g} °C (site gives no ambient)")
    destroyed = ambient * inputs.mass_flow * (throttled.entropy - inlet.entropy)
    # The dead state enters as an absolute temperature: T0 = t0 + 273.15 holds with t0 in °C only.
    result.work("Exergy destroyed in the valve", "Ẋ_d = T0·m·(s2 − s1),  T0 = t0 + 273.15  (Gouy–Stodola; kW, °C, "
                "kg/s, kJ/(kg·K))", "(t0 + 273.15)*m*(s2 - s1)", destroyed / 1e3, "kW", units_fixed=True,
                t0=(ambient - 273.15, "degC"), m=(inputs.mass_flow, "kg/s"), s2=(throttled.entropy / 1e3, "kJ/(kg*K)"),
                s1=(inlet.entropy / 1e3, "kJ/(kg*K)"))
    result.add("exergy_destroyed", "Exergy destroyed in the valve", destroyed / 1e3, "kW")
    entropy_rise = ((throttled.entropy - inlet.entropy) / 1e3, "kJ/(kg*K)")
    # A throttle always raises entropy (second law): a statement of the states, not a check that could fail.
    result.notice("Second-law check", Phrase.of(
        "entropy rises across the valve by {rise:.5f}, as across any throttle (second law)", rise=entropy_rise))


def _exhaust(inputs, inlet, isentropic, efficiency, result):
    h_exhaust = turbine_exhaust_enthalpy(inlet.enthalpy, isentropic.enthalpy, efficiency)
    exhaust = SteamState.from_ph(inputs.outlet_pressure, h_exhaust)
    result.work("Turbine exhaust enthalpy", "h_e = h1 − η_s·Δh_s", "h1 - eta_s*dh_s", h_exhaust / 1e3, "kJ/kg",
                h1=(inlet.enthalpy / 1e3, "kJ/kg"), eta_s=(efficiency, ""),
                dh_s=((inlet.enthalpy - isentropic.enthalpy) / 1e3, "kJ/kg"))
    result.add("turbine_exhaust_temperature", "Turbine exhaust temperature", exhaust.temperature - 273.15, "degC")
    dryness = 1.0 if exhaust.dryness is None else exhaust.dryness
    result.add("turbine_exhaust_dryness", "Turbine exhaust dryness fraction", dryness)
    result.states["turbine_exhaust"] = exhaust
    if exhaust.phase == "wet":
        result.check("Turbine exhaust state", "warn",
                     Phrase.of("a turbine in place of the valve would exhaust wet steam (dryness {dryness:.3f}): "
                               "blade erosion, and the low-pressure users would get wet steam; a turbine needs more "
                               "inlet superheat or a separator after it (common practice)", dryness=(dryness, "")))
    else:
        result.check("Turbine exhaust state", "pass",
                     Phrase.of("turbine exhaust {temperature:.1f}, {superheat:.1f} superheat",
                               temperature=(exhaust.temperature - 273.15, "degC"),
                               superheat=(exhaust.superheat, "K")))


def _yearly_value(power, generator, site, result):
    hours = site.operating_hours
    electrical_kw = generator * power / 1e3
    energy = annual_energy(generator * power, hours)
    result.add("annual_recoverable_energy", "Electrical energy a year a turbine-generator would recover",
               energy, "MWh")
    value = annual_value(energy, site.power_price)
    # Money is no unit the record's unit registry converts, so a step whose value is money is written as a
    # lookup of its operands ("at_price"), with the energy arithmetic inside it, not as arithmetic to re-evaluate;
    # in the units of the price (kW and h against a price per MWh) in every view, so it can be followed by hand.
    result.work("Electricity value a year", "V_e = P_e·t·power price", "at_price(P_e*t, c_e)", value,
                site.power_price.currency, units_fixed=True, P_e=(electrical_kw, "kW"), t=(hours, "h"),
                c_e=_price(site.power_price))
    result.add("annual_electricity_value", "Electricity value a year at the site's power price", value,
               site.power_price.currency)
    missing = missing_site_data(site, ("fuel_price", "boiler_efficiency"))
    if missing:
        result.check("Net turbine value", "warn",
                     f"the site gives no {' and no '.join(missing)}: the make-up fuel for the shaft work is not "
                     "costed, so only the gross electricity value is shown; add them to the site file")
        return
    if site.fuel_price.currency != site.power_price.currency:
        result.check("Net turbine value", "warn",
                     f"fuel is priced in {site.fuel_price.currency} and power in {site.power_price.currency}: the "
                     "net value is not computed; give both prices in one currency")
        return
    result.assumptions.append(fuel_basis_assumption(site))
    _, _, fuel, fuel_cost, net = net_turbine_value(power, generator, site.boiler_efficiency, hours,
                                                   site.power_price, site.fuel_price)
    result.work("Make-up fuel cost a year", "C_f = P·t / η_b · fuel price", "at_price(P*t/eta_b, c_f)", fuel_cost,
                site.fuel_price.currency, units_fixed=True, P=(power / 1e3, "kW"), t=(hours, "h"),
                eta_b=(site.boiler_efficiency, ""), c_f=_price(site.fuel_price))
    currency = site.power_price.currency
    result.work("Net value a year", "V = V_e − C_f", "net_of(V_e, C_f)", net, currency,
                V_e=(value, currency), C_f=(fuel_cost, currency))
    result.add("annual_makeup_fuel_energy", "Boiler fuel a year to make up the shaft work", fuel, "MWh")
    result.add("annual_makeup_fuel_cost", "Cost a year of the make-up fuel", fuel_cost, site.fuel_price.currency)
    result.add("annual_recoverable_value", "Net value a year of a turbine in place of the valve "
               "(electricity less make-up fuel)", net, site.power_price.currency)
    amounts = dict(electricity=(value, currency), fuel=(fuel_cost, currency))
    does_not_pay = Phrase.of("the make-up fuel ({fuel:,.0f}) costs at least the electricity ({electricity:,.0f}) a "
                             "year: a turbine in place of the valve does not pay at these prices", **amounts)
    if value <= 0.0:   # no electricity value (a zero power price): nothing to set the fuel against
        result.check("Net turbine value", "warn", does_not_pay)
        return
    # The verdict is the fuel cost against the electricity value, a ratio: the registry holds no currency.
    cost_ratio = (fuel_cost / value, "")
    result.check_limit(
        "Net turbine value", cost_ratio, [("<", (1.0, ""), "warn")],
        lambda status: does_not_pay if status != "pass" else
        Phrase.of("electricity {electricity:,.0f} less make-up fuel {fuel:,.0f} = {net:,.0f} a year",
                  net=(net, currency), **amounts))


def _price(price):
    """A site price as an amount: per MWh in its currency (a label the unit registry does not convert)."""
    return (price.per_mwh, f"{price.currency}/MWh")
