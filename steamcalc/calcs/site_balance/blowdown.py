"""Blowdown heat recovery of a site balance: a flash vessel at a header's pressure and a make-up water cooler.

The boiler's blowdown leaves as saturated water at the boiler pressure. Flashed to a header at a lower
pressure :math:`p_f`, a fraction

.. math:: x = \\frac{h_{bd} - h_f(p_f)}{h_g(p_f) - h_f(p_f)}

leaves as saturated steam and joins the header; the residual :math:`(1 - x)\\,\\dot m_{bd}` leaves as
saturated water at :math:`p_f` (without a flash vessel, the blowdown itself is the residual). The residual
may heat the make-up water in a counter-flow cooler before it goes to drain; the heat it gives is, with an
approach temperature :math:`\\Delta T_a` at whichever end pinches,

.. math:: Q = \\min\\left[\\dot m_r (h_r - h(p_r, T_{mu} + \\Delta T_a)),\\;
          \\dot m_{mu} (h(p_{da}, T_r - \\Delta T_a) - h_{mu})\\right]

or, with an effectiveness :math:`\\varepsilon`, :math:`Q = \\varepsilon\\, Q_{max}` with :math:`Q_{max}` the same
minimum at :math:`\\Delta T_a = 0`. The make-up water is heated at the deaerator's pressure and never above its
saturation temperature there (hotter, it would flash in the deaerator).
"""

from __future__ import annotations

from dataclasses import replace

from ...properties.steam import SteamState, saturation_temperature

#: The name that takes the blowdown recovery (its flash vessel and its make-up water cooler) out of service in a
#: what-if: ``[inputs.what_if] without = ["blowdown recovery"]``.
RECOVERY = "blowdown recovery"


def has_recovery(boiler):
    """Whether the boiler's blowdown is recovered: flashed to a header, or cooled by the make-up water, or both."""
    return boiler.blowdown_flash_header is not None or boiler.blowdown_cooled


def without_recovery(boiler, headers, p_deaerator, states):
    """The boiler with its blowdown recovery out of service, and the states that go with it.

    The blowdown then leaves as saturated water at the boiler pressure straight to drain: no flash steam
    joins a header and no heat goes to the make-up water.

    Returns
    -------
    (Boiler, dict)
        The boiler without flash vessel or cooler; ``states`` (a new dict) with the blowdown's residual the
        blowdown itself.
    """
    bare = replace(boiler, blowdown_flash_header=None, blowdown_cooler_approach=None,
                   blowdown_cooler_effectiveness=None)
    kept = {key: state for key, state in states.items() if key not in ("blowdown_flash_steam", "blowdown_residual")}
    return bare, recovery_states(bare, headers, p_deaerator, kept)


def recovery_states(boiler, headers, p_deaerator, states):
    """States of the blowdown's flash steam and residual water (``blowdown_flash_steam``, ``blowdown_residual``)."""
    if boiler.blowdown_flash_header is not None:
        p_f = headers[boiler.blowdown_flash_header]
        states["blowdown_flash_steam"] = SteamState.from_p_dryness(p_f, 1.0)
        states["blowdown_residual"] = SteamState.from_p_dryness(p_f, 0.0)
    else:
        states["blowdown_residual"] = states["blowdown"]
    states["makeup_cooler_pressure"] = p_deaerator
    return states


def flash_fraction(h_in, pressure):
    """Mass fraction of saturated water of enthalpy ``h_in`` (J/kg) that flashes at ``pressure`` (Pa).

    .. math:: x = (h_{in} - h_f) / (h_g - h_f), \\text{ zero when } h_{in} \\le h_f

    References
    ----------
    Steady-flow energy balance of an adiabatic flash vessel; IAPWS R7-97(2012) for :math:`h_f, h_g`.

    Examples
    --------
    >>> round(flash_fraction(SteamState.from_p_dryness(17.5e5, 0.0).enthalpy, 3.5e5), 4)
    0.1369
    """
    low = SteamState.from_p_dryness(pressure, 0.0).enthalpy
    high = SteamState.from_p_dryness(pressure, 1.0).enthalpy
    return max(0.0, (h_in - low) / (high - low))


def cooler_heat(boiler, residual, residual_state, makeup, makeup_state, p_cold):
    """Heat (W) the blowdown residual gives the make-up water in the cooler; zero without a cooler.

    Parameters
    ----------
    boiler : Boiler
        Its ``blowdown_cooler_approach`` (K) or ``blowdown_cooler_effectiveness`` (-).
    residual, makeup : float
        Mass flows of the residual blowdown and of the make-up water, kg/s.
    residual_state, makeup_state : SteamState
        The residual blowdown entering, the cold make-up water entering.
    p_cold : float
        Pressure of the make-up water in the cooler (the deaerator's), Pa.

    References
    ----------
    Counter-flow heat exchanger with an approach temperature or an effectiveness, Q = ε·Q_max with Q_max
    from the smaller heat capacity rate over the inlet temperature difference (any heat-transfer text;
    here in enthalpies, IAPWS R7-97(2012)).
    """
    if not boiler.blowdown_cooled or residual <= 0.0 or makeup <= 0.0:
        return 0.0
    approach = boiler.blowdown_cooler_approach if boiler.blowdown_cooler_approach is not None else 0.0
    t_hot, t_cold = residual_state.temperature, makeup_state.temperature
    if t_hot - approach <= t_cold:
        return 0.0
    hot_out = SteamState.from_pT(residual_state.pressure, t_cold + approach).enthalpy
    if t_hot - approach < saturation_temperature(p_cold) - 0.01:
        cold_out = SteamState.from_pT(p_cold, t_hot - approach).enthalpy
    else:
        cold_out = SteamState.from_p_dryness(p_cold, 0.0).enthalpy
    heat = max(0.0, min(residual * (residual_state.enthalpy - hot_out), makeup * (cold_out - makeup_state.enthalpy)))
    if boiler.blowdown_cooler_effectiveness is not None:
        heat *= boiler.blowdown_cooler_effectiveness
    return heat
