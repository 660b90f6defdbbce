"""The let-down relief valve's discharge line: the built-up back pressure in its outlet pipe against the limit of
the valve type, or a notice that it was not assessed.

Called by :func:`steamcalc.calcs.letdown.relief.relief_section` once the orifice and its rated flow are known. The
pipe carries the selected orifice's rated flow (not the relief load): a spring-loaded valve, once open, passes
its capacity, and the built-up back pressure is set by that flow (API 520 Part II, 5.3.1; common practice). The
steam in the pipe is the relieving steam throttled to the atmosphere at constant enthalpy, its temperature held
along the pipe (isothermal flow, the conservative basis of :mod:`steamcalc.equipment.discharge_line`).
"""

from __future__ import annotations

from ...equipment.discharge_line import built_up_back_pressure
from ...equipment.piping import flow_area
from ...errors import InputError, OutOfRangeError
from ...properties.steam import SteamState, dynamic_viscosity
from ..overpressure import back_pressure_check

#: What this module adds to a record, for the kind's BASIS_CHANGES (a record of an earlier release lacks it).
DISCHARGE_PATTERNS = ("Relief discharge line*", "Relief built-up back pressure*", "relief_built_up_back_pressure",
                      "relief_built_up_back_pressure_fraction", "relief_discharge_*")
#: The inputs that describe the outlet pipe, besides its size (which also sets the reaction force).
DISCHARGE_DETAIL = ("relief_discharge_fittings_k", "relief_discharge_equivalent_length")


def check_discharge_inputs(inputs):
    """Refusals of the outlet-pipe inputs that need no calculation (called from ``Inputs.__post_init__``)."""
    if inputs.relief_discharge_equivalent_length is not None and inputs.relief_discharge_equivalent_length < 0.0:
        raise InputError("an equivalent length cannot be negative", field="relief.discharge_equivalent_length",
                         value=inputs.relief_discharge_equivalent_length,
                         fix="give the fittings' equivalent length of straight pipe in m, zero or more")
    if inputs.relief_discharge_length is None:
        for name in DISCHARGE_DETAIL:
            if getattr(inputs, name) is not None:
                key = name[len("relief_"):]
                raise InputError("the discharge pipe's fittings are given without its length",
                                 field=f"relief.{key}", value=getattr(inputs, name),
                                 fix="add discharge_length (the straight length to the open end) to [inputs.relief], "
                                     f"or remove {key}")


def discharge_line_section(inputs, *, relieving_enthalpy, rated_flow_kg_h, set_pressure, atm, valve_type, diameter,
                           result, relieving_pressure=None):
    """Built-up back pressure in the relief valve's outlet pipe as a step, a result and a check against the limit.

    Parameters
    ----------
    relieving_enthalpy : float
        J/kg of the relieving steam (throttled through the valve at constant enthalpy).
    rated_flow_kg_h : float
        kg/h, the selected orifice's rated flow.
    set_pressure, atm : float
        Pa (absolute): the valve's set pressure and the atmosphere the pipe discharges to.
    relieving_pressure : float, optional
        Pa (absolute): a pipe choking at its exit at or above it is refused (a failed check).
    valve_type : str
        conventional, balanced-bellows or pilot: sets the limit.
    diameter : float
        m, inner diameter of the outlet pipe (the size given, or the valve's outlet size).

    References
    ----------
    API Standard 520 Part I (10th ed., 2020), 5.3.3 (back pressure of conventional and balanced valves); API 520
    Part II (7th ed., 2020), 5.3.1 (discharge piping sized for the rated capacity); isothermal pipe flow as in
    Crane TP-410, chapter 1.
    """
    if inputs.relief_discharge_length is None:
        # A notice, not a warning: a record of an earlier release, which lacked it, keeps its verdict.
        result.notice("Relief discharge line",
                      "not assessed: the relief valve's outlet pipe is not given (its length, with its size and "
                      "fittings, among the relief inputs); the built-up back pressure at the valve outlet must stay within the "
                      f"limit of a {valve_type} valve, for the relief system's designer to check")
        return
    fittings_k = inputs.relief_discharge_fittings_k or 0.0
    equivalent = inputs.relief_discharge_equivalent_length or 0.0
    length = inputs.relief_discharge_length + equivalent
    flow = rated_flow_kg_h / 3600.0
    pipe = SteamState.from_ph(atm, relieving_enthalpy)
    viscosity = dynamic_viscosity(pipe.temperature, pipe.density)
    try:
        line = built_up_back_pressure(flow, pipe.temperature, diameter, length, fittings_k, atm, viscosity,
                                      relieving_pressure=relieving_pressure)
    except OutOfRangeError as exc:
        result.check("Relief built-up back pressure", "fail", f"{exc.message} ({length:g} m); fix: {exc.fix}")
        return
    result.assumptions.append(
        f"Relief discharge line: {inputs.relief_discharge_size or 'at the valve outlet size'}, "
        f"{inputs.relief_discharge_length:g} m straight"
        + (f" plus {equivalent:g} m equivalent length of fittings" if equivalent else "")
        + f", ΣK = {fittings_k:g}, open to the atmosphere; it carries the orifice's rated flow, the steam at "
        f"{pipe.temperature - 273.15:.1f} °C (throttled at constant enthalpy) held along it (isothermal flow, "
        "conservative: common practice). The sizing above takes the back pressure given, not the built-up back "
        "pressure found here")
    result.work("Relief discharge line: built-up back pressure",
                "p1 = root of p1² − p2² − G²·(R·T/M)·(f·L/D + ΣK + 2·ln(p1/p2)), isothermal flow, with "
                "p2 = max(p_atm, G·√(RT/M))  [Crane TP-410, chapter 1]",
                "isothermal_line(G, T, f, L, D, K, p2)", line.outlet_pressure / 1e5, "bar",
                G=(flow / flow_area(diameter), "kg/(m**2*s)"), T=(pipe.temperature - 273.15, "degC"),
                f=(line.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k, ""),
                p2=(line.exit_pressure / 1e5, "bar"))
    result.add("relief_built_up_back_pressure", "Built-up back pressure at the relief valve outlet",
               line.outlet_pressure / 1e5, "bar")
    share = 100.0 * (line.outlet_pressure - atm) / (set_pressure - atm)
    result.work("Relief built-up back pressure, of the gauge set pressure", "share = (p1 − p_atm) / (p_set − p_atm)",
                "(p1 - p_atm)/(p_set - p_atm)", share, "percent", p1=(line.outlet_pressure / 1e5, "bar"),
                p_atm=(atm / 1e5, "bar"), p_set=(set_pressure / 1e5, "bar"))
    result.add("relief_built_up_back_pressure_fraction", "Built-up back pressure, of the gauge set pressure", share,
               "percent")
    result.add("relief_discharge_exit_velocity", "Steam velocity at the discharge pipe's exit", line.exit_velocity,
               "m/s")
    choked = " (the exit choked at the isothermal limit)" if line.exit_choked else ""
    # The rule the flash and heater valves keep: a warning above the valve type's limit, a failure at the gauge set
    # pressure, where the valve cannot pass its flow.
    back_pressure_check(result, "Relief", valve_type, line.outlet_pressure, set_pressure, atm, choked,
                        label="Relief built-up back pressure")
