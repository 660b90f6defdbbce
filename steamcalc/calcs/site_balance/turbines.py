"""Back-pressure turbines between the headers of a balance: the expansion, the power, and what the record says.

A turbine takes steam at its inlet header's state and exhausts it into a lower header. Its exhaust is found
from the isentropic efficiency (:func:`expansion`); its shaft power is the enthalpy the steam gives up and
its electric power that times the mechanical and generator efficiency. The exhaust joins the lower header
like a let-down's outlet, so the boiler makes up the shaft work through the fuel it burns: the balance's
fuel already holds it. Per load case the record gives the flow, the exhaust state and the powers, the
worked steps and a check of the exhaust's dryness; the year, the electricity and its value at the site's
power price (:func:`add_turbine_year`).
"""

from __future__ import annotations

from dataclasses import dataclass

from ...errors import OutOfRangeError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..letdown.turbine import DEFAULT_GENERATOR_EFFICIENCY, turbine_exhaust_enthalpy

#: Below this exhaust dryness a turbine's last blades erode and its users get wet steam (common practice:
#: back-pressure machines are laid out for at most about 10 % moisture at the exhaust).
MIN_EXHAUST_DRYNESS = 0.90
#: Isentropic efficiencies back-pressure turbines reach: about 0.3 for a small single-stage machine to about 0.85
#: for a multistage one (common practice); outside it the figure is more likely a slip than a machine.
ISENTROPIC_EFFICIENCY_RANGE = (0.30, 0.90)
#: Mechanical (gearbox) and generator efficiency together of a turbine set (common practice).
GENERATOR_EFFICIENCY_RANGE = (0.85, 0.99)
SOURCE = "Isentropic efficiency of a turbine, h2 = h1 − η_s·(h1 − h2s), h2s = h(p2, s1) (any " \
         "engineering-thermodynamics text); states by IAPWS-IF97"


@dataclass(frozen=True)
class Expansion:
    """A turbine's expansion: the inlet state, the isentropic end state at the exhaust pressure, the exhaust."""

    inlet: SteamState
    isentropic: SteamState
    exhaust: SteamState

    @property
    def enthalpy_drop(self):
        """h1 − h2, J/kg: the shaft work per kg of steam."""
        return self.inlet.enthalpy - self.exhaust.enthalpy

    @property
    def exhaust_dryness(self):
        """Dryness of the exhaust, 1.0 when it is dry or superheated."""
        return 1.0 if self.exhaust.dryness is None else self.exhaust.dryness


def expansion(turbine, inlet_pressure, inlet_enthalpy, exhaust_pressure):
    """The expansion of steam through a back-pressure turbine.

    Parameters
    ----------
    turbine : steamcalc.calcs.site_balance.items.Turbine
        Its name and isentropic efficiency η_s (0 to 1).
    inlet_pressure : float
        p1, the inlet header's pressure, Pa (absolute).
    inlet_enthalpy : float
        h1, the inlet header's specific enthalpy, J/kg.
    exhaust_pressure : float
        p2, the exhaust header's pressure, Pa (absolute).

    Returns
    -------
    Expansion

    Notes
    -----
    .. math:: s_1 = s(p_1, h_1), \\quad h_{2s} = h(p_2, s_1), \\quad h_2 = h_1 - \\eta_s (h_1 - h_{2s})

    References
    ----------
    IAPWS R7-97(2012), IAPWS-IF97, for the states; the isentropic efficiency of a turbine as defined in any
    engineering-thermodynamics text.

    Examples
    --------
    >>> from steamcalc.calcs.site_balance.items import Turbine
    >>> t = Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.7)
    >>> x = expansion(t, 41e5, SteamState.from_pT(41e5, 673.15).enthalpy, 5e5)   # 41 bar(a), 400 °C to 5 bar(a)
    >>> round(x.enthalpy_drop / 1e3, 1), x.exhaust.phase, round(x.exhaust.temperature - 273.15, 1)
    (343.8, 'superheated vapour', 206.0)
    """
    address = f"turbine.{turbine.name}.to"
    try:
        inlet = SteamState.from_ph(inlet_pressure, inlet_enthalpy)
        isentropic = SteamState.from_ps(exhaust_pressure, inlet.entropy)
        h_2 = turbine_exhaust_enthalpy(inlet.enthalpy, isentropic.enthalpy, turbine.isentropic_efficiency)
        return Expansion(inlet, isentropic, SteamState.from_ph(exhaust_pressure, h_2))
    except OutOfRangeError as exc:
        raise exc.for_field(address) from None


def generator_efficiency(turbine):
    """The turbine's mechanical and generator efficiency, the stated default when not given."""
    return turbine.generator_efficiency if turbine.generator_efficiency is not None else DEFAULT_GENERATOR_EFFICIENCY


def turbine_power(b, turbine):
    """(shaft power, electric power) of ``turbine`` in the solved load case ``b``, W."""
    shaft = b.turbine_flow[turbine.name] * b.turbine_expansion[turbine.name].enthalpy_drop
    return shaft, shaft * generator_efficiency(turbine)


def add_turbine_notes(result, inputs):
    """The references and assumptions a balance with turbines adds (once)."""
    if not inputs.turbines:
        return
    result.references.append(SOURCE)
    result.assumptions.append("Each turbine adiabatic, its inlet steam at its inlet header's state and its exhaust "
                              "at the exhaust header's pressure; shaft power = steam flow × (h1 − h2); the boiler "
                              "makes up the shaft work, so the fuel stated includes the turbines' share")
    for t in inputs.turbines:
        _efficiency_check(result, f"Turbine {t.name}: isentropic efficiency", t.isentropic_efficiency,
                          ISENTROPIC_EFFICIENCY_RANGE)
        _efficiency_check(result, f"Turbine {t.name}: mechanical and generator efficiency", generator_efficiency(t),
                          GENERATOR_EFFICIENCY_RANGE)
        if t.generator_efficiency is None:
            result.assumptions.append(f"Turbine {t.name}: mechanical and generator efficiency "
                                      f"{DEFAULT_GENERATOR_EFFICIENCY} (gearbox and generator of a small set, "
                                      "common practice; not given)")
        if t.flow is None:
            limit = f", up to its maximum of {t.max_flow * 3600:.0f} kg/h" if t.max_flow is not None else ""
            result.assumptions.append(f"Turbine {t.name} passes the steam the {t.target} header needs{limit}, "
                                      "ahead of any let-down into that header (its governor holds the exhaust "
                                      "pressure)")


def _efficiency_check(result, name, efficiency, bounds):
    """An efficiency against the range such machines reach: outside it, a warning that it is likely a slip."""
    low, high = bounds
    result.check_limit(name, (efficiency, ""), [(">=", (low, ""), "warn"), ("<=", (high, ""), "warn")],
                       lambda status: Phrase.of(
                           "{eta:.3g}, within {low:g} to {high:g}, the range such machines reach" if status == "pass"
                           else "{eta:.3g} is outside {low:g} to {high:g}, the range such machines reach: check the "
                                "figure (a fraction, not a percentage) against the maker's data",
                           eta=(efficiency, ""), low=(low, ""), high=(high, "")),
                       source="common practice")


def turbine_case_results(result, inputs, b, c, what):
    """Per turbine in the solved load case ``b``: flow, exhaust state, shaft and electric power."""
    for t in inputs.turbines:
        if t.name not in b.turbine_flow:
            continue
        x = b.turbine_expansion[t.name]
        shaft, electric = turbine_power(b, t)
        result.add(f"{c}.{t.name}.steam_flow", f"{what}: turbine {t.name} steam", b.turbine_flow[t.name] * 3600, "kg/h")
        result.add(f"{c}.{t.name}.exhaust_temperature", f"{what}: turbine {t.name} exhaust temperature",
                   x.exhaust.temperature - 273.15, "degC")
        result.add(f"{c}.{t.name}.exhaust_enthalpy", f"{what}: turbine {t.name} exhaust specific enthalpy",
                   x.exhaust.enthalpy / 1e3, "kJ/kg")
        result.add(f"{c}.{t.name}.exhaust_dryness", f"{what}: turbine {t.name} exhaust dryness fraction",
                   x.exhaust_dryness)
        result.add(f"{c}.{t.name}.shaft_power", f"{what}: turbine {t.name} shaft power", shaft / 1e3, "kW")
        result.add(f"{c}.{t.name}.electric_power", f"{what}: turbine {t.name} electric power", electric / 1e3, "kW")


def _kj(value):
    return (value / 1e3, "kJ/kg")


def turbine_steps_and_checks(result, inputs, b, c):
    """The worked steps of each turbine that runs in load case ``c``, and its exhaust-dryness check."""
    for t in sorted(inputs.turbines, key=lambda t: t.name):
        flow = b.turbine_flow.get(t.name, 0.0)
        if flow <= 0.0:
            continue
        x = b.turbine_expansion[t.name]
        shaft, electric = turbine_power(b, t)
        result.work(f"{c}: turbine {t.name} exhaust enthalpy",
                    "h2 = h1 − η_s·(h1 − h2s),  h2s = h(p2, s1)  [IF97]", "h1 - eta_s*(h1 - h2s)", x.exhaust.enthalpy / 1e3, "kJ/kg", h1=_kj(x.inlet.enthalpy),
                    eta_s=(t.isentropic_efficiency, ""), h2s=_kj(x.isentropic.enthalpy))
        result.work(f"{c}: turbine {t.name} shaft power", "P = m·(h1 − h2)", "m*(h1 - h2)", shaft / 1e3, "kW",
                    m=(flow * 3600, "kg/h"), h1=_kj(x.inlet.enthalpy), h2=_kj(x.exhaust.enthalpy))
        result.work(f"{c}: turbine {t.name} electric power", "P_e = η_g·P", "eta_g*P", electric / 1e3, "kW",
                    eta_g=(generator_efficiency(t), ""), P=(shaft / 1e3, "kW"))
        exhaust_dryness_check(result, t, x, c)


def turbine_dryness_checks(result, inputs, b, c):
    """The exhaust-dryness check of each turbine that runs in the solved load case ``b`` (named ``c``), alone: for
    the what-if, whose header states (and so the turbines' exhausts) may differ from the load case's."""
    for t in sorted(inputs.turbines, key=lambda t: t.name):
        if b.turbine_flow.get(t.name, 0.0) > 0.0:
            exhaust_dryness_check(result, t, b.turbine_expansion[t.name], c)


def exhaust_dryness_check(result, t, x, c):
    """A wet exhaust checked against the dryness the last blades and the users take; a dry one stated."""
    dryness = x.exhaust_dryness
    drop_s = x.inlet.enthalpy - x.isentropic.enthalpy
    name = f"{c}: turbine {t.name} exhaust dryness"
    if x.exhaust.phase == "wet":
        result.check_limit(name, (dryness, ""), [(">=", (MIN_EXHAUST_DRYNESS, ""), "warn")],
                           lambda status: Phrase.of(
                               "wet exhaust into the " + t.target + " header, dryness {dryness:.3f}" +
                               (", not below {limit:.2f} (common practice)" if status == "pass" else
                                ", below {limit:.2f} (common practice): the last blades erode and the users "
                                "get wet steam; give the inlet more superheat or a separator after the turbine"),
                               dryness=(dryness, ""), limit=(MIN_EXHAUST_DRYNESS, "")), source="common practice")
    else:
        result.notice(name, Phrase.of("dry exhaust into the " + t.target + " header at {temperature:.1f}, "
                                      "{superheat:.1f} superheat (isentropic drop {drop:.1f})",
                                      temperature=(x.exhaust.temperature - 273.15, "degC"),
                                      superheat=(max(x.exhaust.superheat, 0.0), "K"), drop=_kj(drop_s)))


def add_turbine_year(result, inputs, site, balances, prefix="", base=None):
    """The year's electricity of the turbines (MWh, as the fuel energy) and its value at the site's power price.

    ``prefix`` "what_if_" for the what-if's balances, with ``base`` the balance's own electricity (MWh): then
    the difference, what-if less balance, too. Returns the year's electricity, MWh (None without turbines).
    """
    if not inputs.turbines:
        return None
    hours = {c.name: c.hours for c in inputs.load_cases}
    energy = 0.0
    for name, b in balances.items():
        for t in inputs.turbines:
            if t.name in b.turbine_flow:
                energy += turbine_power(b, t)[1] * hours[name] / 3.6e9
    words = "Without " + ", ".join(inputs.without) + ": e" if prefix else "E"
    result.add(f"{prefix}annual_turbine_electricity", f"{words}lectricity the turbines generate a year", energy, "MWh")
    price = site.power_price
    if price is not None:
        result.add(f"{prefix}annual_turbine_electricity_value", f"{words}lectricity of the turbines a year, valued at "
                   "the site's power price", energy * price.per_mwh, price.currency)
    if base is not None:
        without = ", ".join(inputs.without)
        result.add("what_if_annual_turbine_electricity_difference", f"Without {without}, more electricity from the "
                   "turbines a year (what-if less balance)", energy - base, "MWh")
        if price is not None:
            result.add("what_if_annual_turbine_electricity_value_difference", f"Without {without}, more value of "
                       "the turbines' electricity a year (what-if less balance)", (energy - base) * price.per_mwh,
                       price.currency)
    return energy


def closing_turbine(inputs, b, header):
    """The name of the turbine that balances ``header`` and passes steam in load case ``b``, else None."""
    for t in inputs.turbines:
        if t.flow is None and t.target == header and b.turbine_flow.get(t.name, 0.0) > 0.0:
            return t.name
    return None
