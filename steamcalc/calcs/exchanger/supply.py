"""The steam a heater takes: its state at the supply, and as it enters the steam space.

Without a control valve the steam's state is given at the heater (saturated, or a temperature, a
superheat or a dryness at the steam pressure). With a control valve the heater's steam comes from a
supply (a header) upstream of it, and its state is given there, once: superheated at a temperature or
at a superheat above saturation, or dry saturated when neither is given. Throttled at constant
enthalpy, it reaches the steam space with the same enthalpy, so the steam flow is the heat divided by
``h_supply − h_condensate``, and a superheated supply gives the heater a desuperheating zone
(:mod:`.zones`). The site file holds header pressures only: a header's temperature is an input of the
case.

References
----------
IAPWS R7-97(2012), IAPWS-IF97; the throttle at constant enthalpy is the steady-flow energy balance of
an adiabatic valve (any thermodynamics text).
"""

from __future__ import annotations

import math

from ...errors import InputError, OutOfRangeError
from ...properties.steam import SteamState, saturation_temperature
from ..base import bar_a, deg_c

#: The steam state given at the heater: with a control valve the steam reaching the heater is its supply throttled.
_HEATER_STEAM_FIELDS = ("steam_temperature", "steam_superheat", "steam_dryness")


def check_supply_inputs(inputs):
    """The supply state: once, at the valve; the heater's steam then follows from it."""
    temperature, superheat = inputs.control_valve_supply_temperature, inputs.control_valve_supply_superheat
    if temperature is not None and superheat is not None:
        raise InputError("the supply state is given twice, as supply_temperature and as supply_superheat",
                         field="control_valve.supply_superheat", value=f"{superheat:g} K",
                         fix="keep one: supply_temperature (the header's temperature at the valve) or "
                             "supply_superheat (kelvin above saturation at supply_pressure)")
    if superheat is not None and not (math.isfinite(superheat) and superheat > 0.0):
        raise InputError("a supply superheat must be above 0 K", field="control_valve.supply_superheat",
                         value=f"{superheat:g} K", fix="leave supply_superheat out for dry saturated steam")
    supply = inputs.control_valve_supply_pressure
    if supply is None:
        return
    for name in _HEATER_STEAM_FIELDS:
        if getattr(inputs, name) is None:
            continue
        if name == "steam_dryness":
            raise InputError(
                "with a control valve the steam reaching the heater is its supply throttled; a wet supply is not "
                "sized here (IEC 60534-2-1 compressible sizing is for dry or superheated steam)", field=name,
                fix="remove steam_dryness (the supply is then dry saturated, or give its superheat), or remove the "
                    "[inputs.control_valve] section to work the heater on wet steam")
        raise InputError(
            f"{name} sets the steam at the heater, but with a control valve that steam is the supply throttled at "
            "constant enthalpy: the state is given where the steam comes from", field=name,
            fix="move it to [inputs.control_valve] as supply_temperature or supply_superheat (the header's state at "
                "the valve inlet); the record works the steam entering the heater from it")
    if inputs.steam_pressure > supply * (1.0 + 1e-12):
        raise InputError(
            f"the supply {bar_a(supply)} is below the heater's design steam pressure {bar_a(inputs.steam_pressure)}: a "
            "control valve only lowers the pressure", field="control_valve.supply_pressure",
            value=f"{supply / 1e5:.4g} bar(a)",
            fix="give the steam pressure upstream of the control valve (check its basis, bar(g) or bar(a)), at or "
                "above steam_pressure; or give as steam_pressure the steam-space pressure at design load")


def supply_state(inputs):
    """Steam at the control valve inlet, or None without a supply pressure.

    Superheated at ``supply_temperature``, or ``supply_superheat`` above saturation at the supply pressure;
    dry saturated when neither is given (IAPWS-IF97).

    Examples
    --------
    >>> from steamcalc.calcs.exchanger.calculation import Inputs
    >>> s = supply_state(Inputs(steam_pressure=9e5, process_flow=1.0, process_inlet_temperature=328.15,
    ...                         process_outlet_temperature=358.15, control_valve_supply_pressure=9e5,
    ...                         control_valve_supply_superheat=38.0))
    >>> round(s.temperature - 273.15, 2), round(s.enthalpy / 1e3, 1)
    (213.36, 2865.2)
    """
    supply = inputs.control_valve_supply_pressure
    if supply is None:
        return None
    given = "control_valve.supply_temperature" if inputs.control_valve_supply_temperature is not None else \
        "control_valve.supply_superheat"
    try:
        t_sat = saturation_temperature(supply)
        if inputs.control_valve_supply_temperature is not None:
            temperature = inputs.control_valve_supply_temperature
            if temperature <= t_sat:
                raise InputError(f"supply steam at {deg_c(temperature)} is not superheated at {bar_a(supply)} "
                                 f"(saturation {deg_c(t_sat)})", field="control_valve.supply_temperature",
                                 value=deg_c(temperature),
                                 fix="leave supply_temperature out for dry saturated steam, or check the supply "
                                     "pressure's basis (bar(g) or bar(a))")
            return SteamState.from_pT(supply, temperature)
        if inputs.control_valve_supply_superheat is not None:
            return SteamState.from_pT(supply, t_sat + inputs.control_valve_supply_superheat)
        return SteamState.from_p_dryness(supply, 1.0)
    except OutOfRangeError as exc:
        raise exc.for_field("control_valve.supply_pressure" if exc.field == "pressure" else given) from None


def add_supply(inputs, state, result):
    """Steps and results of the supply steam at the control valve inlet (IF97)."""
    supply = inputs.control_valve_supply_pressure
    t_sat = saturation_temperature(supply)
    superheated = state.phase == "superheated vapour"
    if inputs.control_valve_supply_superheat is not None:
        result.work("Supply steam temperature", "T1 = T_sat(p1) + ΔT_sh,1", "T_sat1 + dT_sh1",
                    state.temperature - 273.15, "degC", T_sat1=(t_sat - 273.15, "degC"),
                    dT_sh1=(inputs.control_valve_supply_superheat, "K"))
    if superheated:
        result.work("Supply steam enthalpy", "h1 = h(p1, T1)  [IF97]", "h(p1, T1)", state.enthalpy / 1e3, "kJ/kg",
                    p1=(supply / 1e5, "bar"), T1=(state.temperature - 273.15, "degC"))
    else:
        result.work("Supply steam enthalpy (dry saturated)", "h1 = h_g(p1)  [IF97]", "h_g(p1)", state.enthalpy / 1e3,
                    "kJ/kg", p1=(supply / 1e5, "bar"))
    result.add("supply_temperature", "Steam temperature at the control valve inlet", state.temperature - 273.15,
               "degC")
    result.add("supply_superheat", "Steam superheat at the control valve inlet", state.temperature - t_sat, "K")
    result.add("supply_enthalpy", "Steam enthalpy at the control valve inlet", state.enthalpy / 1e3, "kJ/kg")
    if superheated:
        result.assumptions.append(
            f"Supply steam superheated {state.temperature - t_sat:.1f} K at {bar_a(supply)} (given at the valve "
            "inlet: the site file holds header pressures only, so a header's temperature is an input of the case)")
    else:
        result.assumptions.append(
            f"Supply steam dry saturated at {bar_a(supply)} (no supply temperature or superheat given; a header fed "
            "by a let-down without desuperheating carries superheat: give it, as it lowers the steam flow and raises "
            "the valve's Kv)")


def steam_states(inputs, supply):
    """Steam entering the heater, condensate, saturated liquid and vapour at the steam pressure, and T_sat.

    With a control valve (``supply`` given) the steam is the supply throttled at constant enthalpy to the
    steam pressure.
    """
    p = inputs.steam_pressure
    try:
        t_sat = saturation_temperature(p)
        saturated_liquid = SteamState.from_p_dryness(p, 0.0)
        saturated_vapour = SteamState.from_p_dryness(p, 1.0)
    except OutOfRangeError as exc:
        raise exc.for_field("steam_pressure") from None
    given = next((name for name in ("steam_temperature", "steam_superheat", "steam_dryness")
                  if getattr(inputs, name) is not None), None)
    try:
        if supply is not None:
            same = p == inputs.control_valve_supply_pressure
            steam = supply if same else SteamState.from_ph(p, supply.enthalpy)
        elif inputs.steam_temperature is not None:
            if inputs.steam_temperature <= t_sat:
                raise InputError(f"steam at {inputs.steam_temperature - 273.15:.2f} °C is not superheated at "
                                 f"{p / 1e5:.4g} bar(a) (saturation {t_sat - 273.15:.2f} °C)",
                                 field="steam_temperature", fix="leave it empty for saturated steam")
            steam = SteamState.from_pT(p, inputs.steam_temperature)
        elif inputs.steam_superheat is not None:
            steam = SteamState.from_pT(p, t_sat + inputs.steam_superheat)
        elif inputs.steam_dryness is not None:
            steam = SteamState.from_p_dryness(p, inputs.steam_dryness)
        else:
            steam = saturated_vapour
    except OutOfRangeError as exc:
        raise exc.for_field("steam_pressure" if exc.field == "pressure" or given is None else given) from None
    subcooling = inputs.condensate_subcooling or 0.0
    try:
        if subcooling >= 0.01:  # below 0.01 K the condensate is saturated for every practical purpose
            condensate = SteamState.from_pT(p, t_sat - subcooling)
        else:
            condensate = saturated_liquid
    except OutOfRangeError as exc:
        raise exc.for_field("condensate_subcooling") from None
    return steam, condensate, saturated_liquid, saturated_vapour, t_sat


def steam_steps(inputs, supply, steam, t_sat, result):
    """How the steam entering the heater was found: from its supply, or from its own superheat."""
    p = inputs.steam_pressure
    if supply is not None:
        add_supply(inputs, supply, result)
        if p != inputs.control_valve_supply_pressure:
            result.work("Steam entering the heater (the supply throttled at constant enthalpy)",
                        "T_s = T(p_s, h1)  [IF97]", "T(p_s, h1)", steam.temperature - 273.15, "degC",
                        p_s=(p / 1e5, "bar"), h1=(supply.enthalpy / 1e3, "kJ/kg"))
    elif inputs.steam_superheat is not None:
        result.work("Steam temperature", "T_s = T_sat(p_s) + ΔT_sh", "T_sat + dT_sh", steam.temperature - 273.15,
                    "degC", T_sat=(t_sat - 273.15, "degC"), dT_sh=(inputs.steam_superheat, "K"))
    if steam.phase == "superheated vapour":
        result.add("steam_inlet_temperature", "Steam temperature entering the heater", steam.temperature - 273.15,
                   "degC")
        result.add("steam_inlet_superheat", "Steam superheat entering the heater", steam.temperature - t_sat, "K")
