"""What a heater can take: its capacity at the supply pressure, and the outlet temperature it reaches.

An undersized heater is not refused: its record fails, and says what the installed area does take. The
capacity is the largest process flow (at the design inlet and outlet temperatures) the installed area passes
at the supply pressure, on the service (fouled) U; when the design flow is beyond it, the process outlet
temperature the heater reaches at the design flow is given too. Three bases, each that of the check it
answers:

- no control valve: at the design steam pressure, on the zones' areas (the basis of "Installed area
  sufficient"). At fixed temperatures each zone's LMTD does not change with the flow, so the area needed is
  proportional to it: :math:`\\dot m_{max} = \\dot m \\, A_{installed}/A_{required}`;
- a control valve without a rated Kv: at the supply pressure with nothing dropped across the valve, the hot
  side at :math:`T_{sat}(p_{supply})` over the installed area (the turndown's basis, :mod:`.turndown`);
- a rated Kv: with the valve fully open, the flow at which the steam the valve passes from the supply
  (IEC 60534-2-1) to the steam-side pressure that flow needs equals the steam the heater needs there.

The roots are found by bisection to a stated tolerance; one that is not met raises
:class:`~steamcalc.errors.NotConvergedError` by name, and no figure is given.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from ...equipment.valve import size_steam_valve
from ...errors import NotConvergedError, OutOfRangeError
from ...properties.steam import CRITICAL_TEMPERATURE, SteamState, saturation_pressure, saturation_temperature
from ..letdown.equipment import DEFAULT_XT, sizing_kappa
from .turndown import required_saturation_temperature
from .zones import zones_area

#: Bisection stops when the bracket of the largest process flow is this fraction of the flow the area takes
#: with no drop across the control valve.
FLOW_TOLERANCE = 1e-10
#: Bisection stops when the bracket of the process outlet temperature is this narrow, K.
TEMPERATURE_TOLERANCE = 1e-6
#: Most halvings of a bracket before the root is refused as not converged.
MAX_HALVINGS = 200


@dataclass(frozen=True)
class Capacity:
    """A heater's capacity at its supply pressure (SI: kg/s, W, Pa, K).

    ``basis`` is ``"area"`` (no control valve: the zones at the design steam pressure), ``"supply"`` (at the
    supply pressure, no drop across the valve) or ``"valve"`` (the rated valve fully open).
    """

    basis: str
    pressure: float                  # the supply (or, without a valve, the design steam) pressure
    design_flow: float
    process_flow: float              # the largest process flow
    duty: float                      # at that flow
    steam_side_pressure: float       # at that flow
    steam_flow: float                # at that flow
    outlet_temperature: float | None = None   # reached at the design flow, when it is beyond the capacity
    outlet_steam_side_pressure: float | None = None   # the steam side then (valve basis)
    outlet_steam_flow: float | None = None             # the steam then (valve basis)


def transferred_heat(ua, process_in, process_out, hot_temperature):
    """Heat a fixed UA passes to a process liquid from a hot side at one temperature, W.

    Parameters
    ----------
    ua : float
        U times area, W/K.
    process_in, process_out : float
        Process temperatures, K.
    hot_temperature : float
        Temperature of the hot side (condensing steam), K; above ``process_out``.

    Notes
    -----
    .. math:: Q = UA\\,(T_o - T_i)/\\ln\\frac{T_s - T_i}{T_s - T_o}

    the LMTD equation with an isothermal hot side; :func:`.turndown.required_saturation_temperature`
    is its inverse.

    References
    ----------
    Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 11.15 (LMTD).

    Examples
    --------
    >>> round(transferred_heat(4680.0, 328.15, 358.15, 433.52))
    419019
    """
    return ua * (process_out - process_in) / math.log((hot_temperature - process_in) / (hot_temperature - process_out))


def valve_flow(kv, p1, p2, density1, kappa, xt):
    """Steam flow a valve at a given Kv passes, kg/s (IEC 60534-2-1 compressible, Fp = 1).

    Parameters
    ----------
    kv : float
        The valve's Kv, m³/h (fully open: its Kvs).
    p1, p2 : float
        Inlet and outlet pressure, Pa (absolute); none passes when ``p2 >= p1``.
    density1, kappa, xt : float
        Inlet density (kg/m³), isentropic exponent and xT.

    Notes
    -----
    :math:`W = N_6 K_v Y \\sqrt{x_{siz} p_1 \\rho_1}`: the sizing equation of
    :func:`steamcalc.equipment.valve.size_steam_valve` solved for W, which it is proportional to.

    References
    ----------
    IEC 60534-2-1:2011, equations (8), (12)-(15).

    Examples
    --------
    The sizing example of :func:`~steamcalc.equipment.valve.size_steam_valve` (4500 kg/h need Kv 23.46)
    run back, from its Kv as printed:

    >>> round(valve_flow(23.46, 1700e3, 350e3, 7.5, 1.30, 0.70) * 3600)
    4499
    """
    if p2 >= p1:
        return 0.0
    return kv / size_steam_valve(1.0, p1 / 1e3, p2 / 1e3, density1, kappa, xt).kv / 3600.0


def bisect(function, low, high, tolerance, what, unit, steps=MAX_HALVINGS):
    """Root of an increasing ``function`` between ``low`` (below zero) and ``high`` (above zero).

    Stops when the bracket is at most ``tolerance`` wide and returns its middle; raises
    :class:`~steamcalc.errors.NotConvergedError` naming ``what`` when ``steps`` halvings do not get there,
    or when the bracket does not hold the root.

    Examples
    --------
    >>> round(bisect(lambda x: x * x - 2.0, 0.0, 2.0, 1e-12, "root of 2", ""), 9)
    1.414213562
    """
    if not function(low) < 0.0 < function(high):
        raise NotConvergedError(f"the {what} is not between {low:.6g} and {high:.6g} {unit}", field=what,
                                fix="check the heater's inputs; this capacity cannot be found for them")
    halvings = 0
    while high - low > tolerance:
        if halvings == steps:
            raise NotConvergedError(
                f"the {what} did not converge in {steps} halvings: the bracket is {high - low:.3g} {unit} wide, the "
                f"tolerance {tolerance:.3g} {unit}", field=what, value=high - low,
                fix="check the heater's inputs; no figure is given for a root that did not converge")
        middle = 0.5 * (low + high)
        if function(middle) < 0.0:
            low = middle
        else:
            high = middle
        halvings += 1
    return 0.5 * (low + high)


def _lower_end(function, low, high, what):
    """A point above ``low`` where ``function`` is below zero, halving the span towards ``low``."""
    for k in range(1, 60):
        point = low + (high - low) / 2.0 ** k
        try:
            if function(point) < 0.0:
                return point
        except OutOfRangeError:   # the steam side would be below the triple point: the heater passes nothing
            break
    raise NotConvergedError(f"no lower end of the bracket of the {what} was found", field=what,
                            fix="the heater passes almost nothing at these inputs: check them")


def find_capacity(inputs, flow, duty, steam_side, water, steam_states, t_sat, required_area, ua_fouled,
                  arrangement, supply, steps=MAX_HALVINGS):
    """The heater's :class:`Capacity` at its supply pressure, or None without a U and an installed area.

    Parameters
    ----------
    inputs : steamcalc.calcs.exchanger.calculation.Inputs
        The case.
    flow, duty, steam_side : float
        Design process flow (kg/s), duty and heat from the steam (W).
    water : tuple or None
        Process water in and out (SteamState), or None for a liquid given by its cp.
    steam_states : tuple
        Steam, condensate, saturated liquid and vapour at the design steam pressure.
    t_sat : float
        Saturation temperature at the design steam pressure, K.
    required_area : float
        The zones' area at design, m².
    ua_fouled : float
        Service U times the installed area, W/K.
    arrangement : str
        The exchanger arrangement.
    supply : SteamState or None
        Steam at the control valve inlet (with a supply pressure).
    steps : int
        Most halvings of each bisection.
    """
    if inputs.overall_u is None or inputs.installed_area is None:
        return None
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    loss = 1.0 + (inputs.heat_loss or 0.0)

    def process_heat(outlet):
        """Heat the design flow takes from the inlet to ``outlet``, W."""
        if water is None:
            return duty * (outlet - t_in) / (t_out - t_in)
        water_in = water[0]
        return flow * (SteamState.from_pT(water_in.pressure, outlet).enthalpy - water_in.enthalpy)

    if supply is None:
        return _area_capacity(inputs, flow, duty, steam_side, water, steam_states, t_sat, required_area, arrangement,
                              process_heat, steps)
    p1 = inputs.control_valve_supply_pressure
    if inputs.control_valve_rated_kv is None:
        t_supply = saturation_temperature(p1)
        heat = transferred_heat(ua_fouled, t_in, t_out, t_supply)
        capacity = Capacity("supply", p1, flow, flow * heat / duty, heat, p1,
                            heat * loss / (supply.enthalpy - SteamState.from_p_dryness(p1, 0.0).enthalpy))
        if capacity.process_flow >= flow:
            return capacity
        reached = bisect(lambda outlet: process_heat(outlet) - transferred_heat(ua_fouled, t_in, outlet, t_supply),
                         _lower_end(lambda outlet: process_heat(outlet) - transferred_heat(ua_fouled, t_in, outlet,
                                                                                            t_supply),
                                    t_in, t_out, "outlet temperature reached"),
                         t_out, TEMPERATURE_TOLERANCE, "outlet temperature reached", "K", steps)
        return dataclasses.replace(capacity, outlet_temperature=reached)
    return _valve_capacity(inputs, flow, duty, ua_fouled, supply, loss, process_heat, steps)


def _area_capacity(inputs, flow, duty, steam_side, water, steam_states, t_sat, required_area, arrangement,
                   process_heat, steps):
    ratio = inputs.installed_area / required_area
    steam, condensate = steam_states[0], steam_states[1]
    specific = steam.enthalpy - condensate.enthalpy
    capacity = Capacity("area", inputs.steam_pressure, flow, flow * ratio, duty * ratio, inputs.steam_pressure,
                        steam_side * ratio / specific)
    if ratio >= 1.0:
        return capacity
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    loss = steam_side / duty

    def surplus(outlet):
        """Area the zones need to reach ``outlet`` at the design flow, less the installed area, m²."""
        heat = process_heat(outlet)
        at = dataclasses.replace(inputs, process_outlet_temperature=outlet)
        water_at = None if water is None else (water[0], SteamState.from_pT(water[0].pressure, outlet))
        return zones_area(at, steam_states, t_sat, flow, heat, heat * loss, heat * loss / specific, water_at,
                          arrangement) - inputs.installed_area
    low = _lower_end(surplus, t_in, t_out, "outlet temperature reached")
    reached = bisect(surplus, low, t_out, TEMPERATURE_TOLERANCE, "outlet temperature reached", "K", steps)
    return dataclasses.replace(capacity, outlet_temperature=reached)


def _valve_capacity(inputs, flow, duty, ua_fouled, supply, loss, process_heat, steps):
    p1 = inputs.control_valve_supply_pressure
    xt = inputs.control_valve_xt if inputs.control_valve_xt is not None else DEFAULT_XT
    kappa, kvs = sizing_kappa(supply), inputs.control_valve_rated_kv
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature

    def steam_needed(heat, pressure):
        return heat * loss / (supply.enthalpy - SteamState.from_p_dryness(pressure, 0.0).enthalpy)

    def side_pressure(heat, outlet):
        """Steam-side pressure the heat needs at this outlet, Pa; infinite above the critical point."""
        t_needed = required_saturation_temperature(heat, ua_fouled, t_in, outlet)
        return saturation_pressure(t_needed) if t_needed < CRITICAL_TEMPERATURE else math.inf

    def shortfall(heat, outlet):
        """Steam the heater needs for this heat less what the open valve passes, kg/s."""
        side = side_pressure(heat, outlet)
        if side >= p1:
            return math.inf   # no drop left across the valve: it passes nothing
        return steam_needed(heat, side) - valve_flow(kvs, p1, side, supply.density, kappa, xt)

    # Bisection on the process flow, up to the flow the area takes with no drop across the valve: the steam side
    # then runs from the process outlet's saturation (a vanishing flow) to the supply pressure.
    open_flow = flow * transferred_heat(ua_fouled, t_in, t_out, saturation_temperature(p1)) / duty
    what = "largest process flow with the control valve fully open"

    def flow_shortfall(process_flow):
        return shortfall(duty * process_flow / flow, t_out)
    largest = bisect(flow_shortfall, _lower_end(flow_shortfall, 0.0, open_flow, what), open_flow,
                     FLOW_TOLERANCE * open_flow, what, "kg/s", steps)
    heat = duty * largest / flow
    pressure = side_pressure(heat, t_out)
    capacity = Capacity("valve", p1, flow, largest, heat, pressure, steam_needed(heat, pressure))
    if capacity.process_flow >= flow:
        return capacity

    def outlet_shortfall(outlet):
        return shortfall(process_heat(outlet), outlet)
    what = "outlet temperature reached with the control valve fully open"
    reached = bisect(outlet_shortfall, _lower_end(outlet_shortfall, t_in, t_out, what), t_out, TEMPERATURE_TOLERANCE,
                     what, "K", steps)
    heat = process_heat(reached)
    side = side_pressure(heat, reached)
    return dataclasses.replace(capacity, outlet_temperature=reached, outlet_steam_side_pressure=side,
                               outlet_steam_flow=steam_needed(heat, side))


#: What each basis is, in the results' labels.
_WHERE = {"area": "at the design steam pressure", "supply": "at the supply pressure",
          "valve": "at the supply pressure, control valve fully open"}


def add_capacity(inputs, capacity, duty, required_area, water, ua_fouled, supply, result):
    """Steps, results and the stated basis of the heater's capacity (:func:`find_capacity`).

    ``duty`` (W) and ``required_area`` (m²) are the design's; ``ua_fouled`` (W/K) the service U times the
    installed area; ``supply`` the steam at the control valve inlet, or None.
    """
    if capacity is None:
        return
    flow, where = capacity.design_flow, _WHERE[capacity.basis]
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    temperatures = {"T_o": (t_out - 273.15, "degC"), "T_i": (t_in - 273.15, "degC")}
    ua = (ua_fouled / 1e3, "kW/K")
    result.assumptions.append(_basis_words(capacity.basis))
    if capacity.basis == "area":
        result.work("Largest process flow at the design steam pressure (installed area)",
                    "m_max = m·A_installed/A_required", "m*A_inst/A_req", capacity.process_flow * 3600, "kg/h",
                    m=(flow * 3600, "kg/h"), A_inst=(inputs.installed_area, "m**2"),
                    A_req=(required_area, "m**2"))
    else:
        if capacity.basis == "valve":
            _valve_balance_steps("the capacity (design outlet)", inputs, capacity.steam_side_pressure,
                                 capacity.duty, supply, result)
        t_hot = saturation_temperature(capacity.steam_side_pressure)
        hot_words = "the supply" if capacity.basis == "supply" else "the steam side with the valve fully open"
        result.work(f"Heat the installed area passes from {hot_words} (service U)",
                    "Q_max = UA_s·(T_o − T_i)/ln((T_s − T_i)/(T_s − T_o)), T_s = T_sat(p_s)",
                    "UA_s*(T_o - T_i)/ln((T_s - T_i)/(T_s - T_o))", capacity.duty / 1e3, "kW", UA_s=ua,
                    T_s=(t_hot - 273.15, "degC"), **temperatures)
        result.work(f"Largest process flow {where}", "m_max = m·Q_max/Q (the duty is proportional to the flow)",
                    "m*Q_max/Q", capacity.process_flow * 3600, "kg/h", m=(flow * 3600, "kg/h"),
                    Q_max=(capacity.duty / 1e3, "kW"), Q=(duty / 1e3, "kW"))
    result.add("capacity_process_flow", f"Largest process flow {where} (installed area, service U)",
               capacity.process_flow * 3600, "kg/h")
    result.add("capacity_margin", "Largest process flow over the design flow, minus 1",
               100.0 * (capacity.process_flow / flow - 1.0), "percent")
    result.add("capacity_duty", "Duty at the largest process flow", capacity.duty / 1e3, "kW")
    result.add("capacity_steam_flow", "Steam flow at the largest process flow", capacity.steam_flow * 3600, "kg/h")
    if capacity.basis != "area":
        result.add("capacity_steam_side_pressure", "Steam-side pressure at the largest process flow",
                   capacity.steam_side_pressure / 1e5, "bar")
    if capacity.outlet_temperature is not None:
        _outlet_steps(inputs, capacity, water, ua_fouled, supply, result)


def _basis_words(basis):
    if basis == "area":
        return ("Capacity at the design steam pressure (no control valve): on the zones' areas, the basis of the "
                "installed-area check; at fixed process temperatures each zone's LMTD does not change with the flow, "
                "so the area needed is proportional to it. The outlet temperature reached at the design flow, when "
                f"the design flow is beyond the capacity, is found by bisection to {TEMPERATURE_TOLERANCE:g} K")
    words = ("Capacity at the supply pressure: the hot side at the saturation temperature over the installed area "
             "at the service U (the turndown's basis: condensing, and a superheated supply's desuperheating on the wet "
             "wall)")
    if basis == "valve":
        words += ("; with the rated control valve fully open, the largest process flow is found by bisection where the "
                  "steam the valve passes from the supply (IEC 60534-2-1) equals the steam the heater needs at the "
                  f"steam-side pressure that flow needs, to {FLOW_TOLERANCE:g} of the flow with no drop across the "
                  "valve")
    else:
        words += "; no pressure drop across the control valve (no rated Kv given)"
    return words + (f"; the outlet temperature reached at the design flow, when the design flow is beyond the "
                    f"capacity, by bisection to {TEMPERATURE_TOLERANCE:g} K (at most {MAX_HALVINGS} halvings; "
                    "otherwise refused as not converged)")


def _process_heat_step(label, inputs, water, flow, outlet, heat, result):
    t_i = (inputs.process_inlet_temperature - 273.15, "degC")
    if water is None:
        result.work(label, "Q_r = m·cp·(T_r − T_i)", "m*cp*(T_r - T_i)", heat / 1e3, "kW", m=(flow * 3600, "kg/h"),
                    cp=(inputs.process_cp / 1e3, "kJ/(kg*K)"), T_r=(outlet - 273.15, "degC"), T_i=t_i)
        return
    water_in = water[0]
    h_r = SteamState.from_pT(water_in.pressure, outlet).enthalpy
    result.work(label, "Q_r = m·(h(p, T_r) − h(p, T_i))  [IF97]", "m*(h_r - h_in)", heat / 1e3, "kW",
                m=(flow * 3600, "kg/h"), h_r=(h_r / 1e3, "kJ/kg"), h_in=(water_in.enthalpy / 1e3, "kJ/kg"))


def _outlet_steps(inputs, capacity, water, ua_fouled, supply, result):
    flow, reached, ua = capacity.design_flow, capacity.outlet_temperature, (ua_fouled / 1e3, "kW/K")
    t_in = inputs.process_inlet_temperature
    if water is None:
        heat = flow * inputs.process_cp * (reached - t_in)
    else:
        heat = flow * (SteamState.from_pT(water[0].pressure, reached).enthalpy - water[0].enthalpy)
    _process_heat_step("Heat the design flow takes to the outlet temperature reached", inputs, water, flow, reached,
                       heat, result)
    temperatures = {"T_r": (reached - 273.15, "degC"), "T_i": (t_in - 273.15, "degC")}
    if capacity.basis == "area":
        # The zones' own sum (each zone's LMTD, F and U) at the outlet reached: the installed area, to the tolerance.
        result.work("Area the zones need at the outlet temperature reached", "A = Σ A_i(T_r, Q_r)", "A_zones(T_r, Q_r)",
                    inputs.installed_area, "m**2", T_r=temperatures["T_r"], Q_r=(heat / 1e3, "kW"))
    elif capacity.basis == "supply":
        t_s = saturation_temperature(capacity.pressure)
        result.work("Heat the installed area passes at the outlet temperature reached (supply pressure)",
                    "Q_r = UA_s·(T_r − T_i)/ln((T_s − T_i)/(T_s − T_r)), T_s = T_sat(p1)",
                    "UA_s*(T_r - T_i)/ln((T_s - T_i)/(T_s - T_r))", heat / 1e3, "kW", UA_s=ua,
                    T_s=(t_s - 273.15, "degC"), **temperatures)
    else:
        side = capacity.outlet_steam_side_pressure
        result.work("Saturation temperature the heater needs at the outlet temperature reached",
                    "T_s = (k·T_r − T_i)/(k − 1), k = exp(UA_s·(T_r − T_i)/Q_r)",
                    "(exp(UA_s*(T_r - T_i)/Q_r)*T_r - T_i)/(exp(UA_s*(T_r - T_i)/Q_r) - 1)",
                    required_saturation_temperature(heat, ua_fouled, t_in, reached) - 273.15, "degC",
                    UA_s=ua, Q_r=(heat / 1e3, "kW"), **temperatures)
        _valve_balance_steps("the outlet temperature reached", inputs, side, heat, supply, result)
        result.add("outlet_steam_side_pressure_reached", "Steam-side pressure at the outlet temperature reached "
                   "(control valve fully open)", side / 1e5, "bar")
    result.add("outlet_temperature_reached", f"Process outlet temperature reached at the design flow "
               f"{_WHERE[capacity.basis]}", reached - 273.15, "degC")


def _valve_balance_steps(at, inputs, side, heat, supply, result):
    """The steam the heater needs and the steam the open valve passes, at one steam-side pressure: equal."""
    p1, kvs = inputs.control_valve_supply_pressure, inputs.control_valve_rated_kv
    xt = inputs.control_valve_xt if inputs.control_valve_xt is not None else DEFAULT_XT
    kappa = sizing_kappa(supply)
    h_f = SteamState.from_p_dryness(side, 0.0).enthalpy
    loss = inputs.heat_loss or 0.0
    result.work(f"Steam the heater needs at {at}", "W = Q·(1 + f_loss)/(h1 − h_f(p_s))", "Q*(1 + f_loss)/(h1 - h_f)",
                heat * (1.0 + loss) / (supply.enthalpy - h_f) * 3600, "kg/h", Q=(heat / 1e3, "kW"), f_loss=(loss, ""),
                h1=(supply.enthalpy / 1e3, "kJ/kg"), h_f=(h_f / 1e3, "kJ/kg"))
    result.work(f"Steam the control valve passes fully open at {at}",
                "W = N6·Kvs·Y·√(min(x, x_choked)·p1·ρ1), N6 = 3.16; x = (p1 − p_s)/p1; x_choked = (κ/1.40)·xT; "
                "Y = 1 − min(x, x_choked)/(3·x_choked)",
                "3.16*Kvs*(1 - min((p1 - p_s)/p1, kappa/1.4*x_T)/(3*(kappa/1.4*x_T)))"
                "*sqrt(min((p1 - p_s)/p1, kappa/1.4*x_T)*p1*rho1)",
                valve_flow(kvs, p1, side, supply.density, kappa, xt) * 3600, "kg/h", units_fixed=True,
                Kvs=(kvs, "m**3/h", "absolute", "flow_coefficient"), p1=(p1 / 1e3, "kPa"), p_s=(side / 1e3, "kPa"),
                kappa=(kappa, ""), x_T=(xt, ""), rho1=(supply.density, "kg/m**3"))
