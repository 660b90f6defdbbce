"""The site steam balance: the headers, boiler, deaerator, let-downs, back-pressure turbines, flash vessels and
users of a site, per load case, in one record.

Per load case (:mod:`.solver`): each header closed by its let-down's make-up or a vent (the record says
which, and how much), the boiler's steam, blowdown and fuel, the deaerator's heating steam by its mass
and energy balance with its vent, the make-up water, and the heat lost in vents and blowdown. A year is
the load cases weighted by their hours. A what-if (``[inputs.what_if] without``) solves the same site with
items taken out of service and compares fuel, water, CO₂ and money a year (:mod:`.comparison`).
"""

from __future__ import annotations

from ...errors import InputError
from ...properties.steam import REFERENCE as IF97_REFERENCE
from ...units.amounts import Phrase
from ..base import Result, full_record_wanted
from .closure import check_closures
from .comparison import add_comparison, annual_totals
from .figures import figures
from .inputs import Inputs, checked_against_site
from .links import balance_link_problems as linked_record_problems
from .links import stale_links
from .returns import add_return_notes, return_flash_checks, return_flash_results, return_steps
from .solver import MAX_SWEEPS, TOLERANCE, fixed_states, solve_case
from .steps import case_steps
from .turbines import add_turbine_notes, add_turbine_year, closing_turbine, turbine_case_results
from .turbines import turbine_dryness_checks, turbine_steps_and_checks
from .valve_checks import header_pressure_checks, letdown_valve_checks

KIND = "balance"
TITLE = "Site steam balance"
WORKBOOK = "site_balance.ipynb"
UNCERTAINTY_RESULTS = ()
SUMMARY_RESULTS = ("annual_fuel_energy", "annual_fuel_cost", "annual_makeup_water", "annual_co2",
                   "annual_total_cost", "what_if_annual_total_cost_difference", "annual_turbine_electricity",
                   "annual_turbine_electricity_value")

__all__ = ["Inputs", "calculate", "linked_record_problems", "stale_links", "KIND", "TITLE", "WORKBOOK"]

CAUTIONS = (
    "Equipment downstream of a let-down valve must be protected against the valve (or its bypass) failing "
    "open: a relief device sized for that flow, to the local pressure-equipment code; the engineer of record "
    "and the relief-valve maker's certified capacity govern.",
    "Boilers, deaerators and flash vessels are pressure equipment: their design, marking, inspection and "
    "operation follow the local code and the makers' instructions.",
    "Steam and flashing condensate cause severe burns; vents and blowdown discharge to a safe place.",
    "A balance states flows that close on paper; headers run on controls, traps and valves that must be sized "
    "for every load case, start-up and trip, which this record does not do.",
    "These results support design by a competent engineer; they do not replace the applicable codes, the "
    "equipment makers' data or a licensed engineer's approval.",
)


#: Blowdown, as a share of the boiler's feedwater, above which a balance warns (common practice).
BLOWDOWN_LIMIT = 0.10


def _efficiency(inputs, site):
    efficiency = inputs.boiler.efficiency
    if efficiency is not None:
        if not 0.0 < efficiency <= 1.0:
            # The fuel is the heat over the efficiency: at zero there is no answer, above one there is no boiler.
            raise InputError("a boiler efficiency lies above 0 and at most 1", field="boiler.efficiency",
                             value=efficiency, limits=(0, 1, ""),
                             fix="give the steam heat out over the fuel in, e.g. 0.86")
        return efficiency
    if site.boiler_efficiency is not None:
        return site.boiler_efficiency
    raise InputError("the boiler efficiency is not given", field="boiler.efficiency",
                     fix="give efficiency in [inputs.boiler], or boiler_efficiency in the site file")


def calculate(inputs, site):
    """Solve the site's steam balance for every load case (and its what-if), with checks and figures.

    Parameters
    ----------
    inputs : Inputs
        Boiler, deaerator, load cases, let-downs, users, flash vessels (SI: Pa absolute, K, kg/s, W, s).
    site : steamcalc.cases.site.Site
        Header pressures, atmosphere, make-up water temperature, and the hours, fuel price, emission
        factor and water cost of the yearly figures.

    Returns
    -------
    Result
        Per load case ``<case>.boiler_steam_flow``, ``<case>.fuel_power``, ``<case>.deaerator_steam_flow``,
        ``<case>.makeup_water_flow``, ``<case>.<header>.closed_by`` (let-down, vent or balanced) with the
        let-down and vent flows, and the year's ``annual_fuel_energy``, ``annual_makeup_water``,
        ``annual_co2``, ``annual_total_cost``; with a what-if, the same for it and the differences. With
        turbines, per load case ``<case>.<turbine>.steam_flow``, ``exhaust_enthalpy``, ``exhaust_dryness``,
        ``shaft_power`` and ``electric_power``, and the year's ``annual_turbine_electricity`` (with its value at
        the site's power price when the site file gives one).

    Notes
    -----
    Deaerator, mass and energy with a vent of a fraction :math:`v` of its heating steam :math:`\\dot m_s`:

    .. math:: \\dot m_s = \\frac{\\dot m_{fw}(h_{fw} - h_{mu}) - \\sum \\dot m_r (h_r - h_{mu})}
              {h_s - h_{mu} - v (h_v - h_{mu})}, \\quad
              \\dot m_{mu} = \\dot m_{fw} + v \\dot m_s - \\sum \\dot m_r - \\dot m_s

    With the vent stated as a fraction :math:`w` of the feedwater instead, :math:`\\dot m_s (h_s - h_{mu}) =
    \\dot m_{fw}(h_{fw} - h_{mu}) + w \\dot m_{fw} (h_v - h_{mu}) - \\sum \\dot m_r (h_r - h_{mu})`. Condensate to a
    vented receiver returns less its flash to the site atmosphere (:mod:`.returns`).

    Blowdown from the dissolved-solids balance of the boiler, :math:`\\dot m_{fw} c_{fw} = \\dot m_{bd} c_{bw}`
    with :math:`\\dot m_{fw} = \\dot m_{steam} + \\dot m_{bd}`: :math:`\\dot m_{bd} = \\dot m_{steam}
    c_{fw} / (c_{bw} - c_{fw})`. Desuperheater: :math:`\\dot m_{steam} = \\dot m_{out} (h_{out} - h_w) /
    (h_{in} - h_w)`. Boiler fuel: :math:`P = [\\dot m_{steam}(h_{steam} - h_{fw}) + \\dot m_{bd}(h_{bd} -
    h_{fw})] / \\eta`. Back-pressure turbine: :math:`h_2 = h_1 - \\eta_s (h_1 - h_{2s})` with
    :math:`h_{2s} = h(p_2, s_1)`, shaft power :math:`P = \\dot m (h_1 - h_2)`, electric :math:`P_e = \\eta_g P`.

    References
    ----------
    IAPWS R7-97(2012), IAPWS-IF97, for every property. The boiler's dissolved-solids (TDS) mass balance and the
    deaerator's mass and energy balances are the steady-flow balances of any engineering-thermodynamics text
    (common practice for site steam balances).

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> from steamcalc.calcs.site_balance.items import Boiler, Deaerator, LoadCase, User
    >>> site = Site(headers={"HP": 11e5, "LP": 3e5}, makeup_water_temperature=288.15, boiler_efficiency=0.85)
    >>> inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05),
    ...                 deaerator=Deaerator(pressure=1.3e5, steam_header="HP", vent_fraction=0.0),
    ...                 load_cases=(LoadCase("all year", 8000 * 3600.0),),
    ...                 users=(User(name="Process", header="HP", flows=(("all year", 1.0),)),))
    >>> r = calculate(inputs, site)
    >>> round(r.value("all year.boiler_steam_flow"))  # kg/h: the user's 3600 kg/h and the deaerator's steam
    4233
    """
    checked_against_site(inputs, site)
    efficiency = _efficiency(inputs, site)
    result = Result()
    result.references.extend([
        IF97_REFERENCE,
        "Steady-flow mass and energy balances of headers, deaerator and boiler (any engineering-thermodynamics text)",
        "Boiler blowdown from the dissolved-solids mass balance, feedwater against the boiler-water limit "
        "(common practice)",
    ])
    result.assumptions.extend([
        "Steady state in each load case; headers, let-downs and flash vessels adiabatic; kinetic and potential "
        "energy neglected",
        "Each header's steam is the adiabatic mix of what enters it; a let-down without desuperheater is a "
        "throttle (isenthalpic)",
        "Users condense their steam to saturated liquid at the header pressure; a user given a duty takes that "
        "duty over the enthalpy of the header's steam less that of saturated water at the header pressure",
        "Feedwater leaves the deaerator saturated at its pressure; feed-pump work is neglected",
        ("The deaerator vents the stated fraction of its feedwater, as saturated steam at its pressure, whatever "
         "heating steam it takes" if inputs.deaerator.vent_of_feedwater is not None else
         "The deaerator vents the stated fraction of its heating steam (not of its feedwater: the vent falls with "
         "the heating steam when hot returns heat the feedwater), as saturated steam at its pressure"),
        "Blowdown leaves the boiler as saturated water at the boiler pressure",
        "Flash steam above a header's demand is vented: only the flash steam the header takes displaces boiler "
        "steam; when a header vents, its vent is shared among the flash steam flowing into it in proportion to "
        "each flow, so the flash steam credited adds up to the flash steam less the vent",
        f"Each load case solved by successive substitution until no flow or header enthalpy changes by more than "
        f"{TOLERANCE:.0e} (relative) between sweeps; at most {MAX_SWEEPS} sweeps, else the case is refused",
        f"Gauge pressures converted with the site atmosphere of {site.atmospheric_pressure / 1e5:.5g} bar(a)",
    ])
    result.cautions.extend(CAUTIONS)
    add_return_notes(result, inputs, site)
    add_turbine_notes(result, inputs)
    _deaerator_vent_check(result, inputs.deaerator)
    states = fixed_states(inputs, site)
    balances = {}
    for case in inputs.load_cases:
        b = solve_case(inputs, site, case.name, states)
        balances[case.name] = b
        _case_results(result, inputs, site, b, efficiency, case)
        case_steps(result, inputs, site, b, efficiency, case)
        return_steps(result, inputs, site, b, case.name)
        turbine_steps_and_checks(result, inputs, b, case.name)
        check_closures(result, inputs, site, b)
    _case_checks(result, inputs, site, balances)
    letdown_valve_checks(result, inputs, balances)
    header_pressure_checks(result, inputs, site)
    return_flash_checks(result, inputs, balances)
    totals = annual_totals(result, inputs, site, balances, efficiency, "")
    electricity = add_turbine_year(result, inputs, site, balances)
    _blowdown_year(result, inputs, balances)
    alternative = None
    if inputs.without:
        alt = {c.name: solve_case(inputs, site, c.name, states, inputs.without) for c in inputs.load_cases}
        for case in inputs.load_cases:
            _case_results(result, inputs, site, alt[case.name], efficiency, case, prefix="what_if.")
        # The what-if is a balance the site may run: it meets the same limits, named for it.
        _case_checks(result, inputs, site, alt, f"Without {', '.join(inputs.without)}, ")
        for case in inputs.load_cases:
            turbine_dryness_checks(result, inputs, alt[case.name], f"Without {', '.join(inputs.without)}, {case.name}")
        letdown_valve_checks(result, inputs, alt, f"Without {', '.join(inputs.without)}, ", "what_if.")
        return_flash_checks(result, inputs, alt, f"Without {', '.join(inputs.without)}, ")
        alternative = annual_totals(result, inputs, site, alt, efficiency, "what_if_")
        add_turbine_year(result, inputs, site, alt, "what_if_", electricity)
        add_comparison(result, inputs, site, totals, alternative)
    result.states["balances"] = balances
    if full_record_wanted():
        result.figures.extend(figures(inputs, site, balances))
    return result


def _case_results(result, inputs, site, b, efficiency, case, prefix=""):
    c = f"{prefix}{case.name}"
    what = f"{'Without ' + ', '.join(inputs.without) + ', ' if prefix else ''}{case.name}"
    states = b.states
    heat = (b.boiler_steam * (states["boiler_steam"].enthalpy - states["feedwater"].enthalpy)
            + b.blowdown * (states["blowdown"].enthalpy - states["feedwater"].enthalpy))
    result.add(f"{c}.boiler_steam_flow", f"{what}: boiler steam", b.boiler_steam * 3600, "kg/h")
    result.add(f"{c}.blowdown_flow", f"{what}: boiler blowdown", b.blowdown * 3600, "kg/h")
    result.add(f"{c}.feedwater_flow", f"{what}: feedwater (boiler and desuperheaters)", b.feedwater * 3600, "kg/h")
    result.add(f"{c}.boiler_heat", f"{what}: heat to steam and blowdown", heat / 1e3, "kW")
    result.add(f"{c}.fuel_power", f"{what}: fuel input", heat / efficiency / 1e3, "kW")
    result.add(f"{c}.deaerator_steam_flow", f"{what}: deaerator heating steam", b.deaerator_steam * 3600, "kg/h")
    result.add(f"{c}.deaerator_vent_flow", f"{what}: deaerator vent", b.deaerator_vent * 3600, "kg/h")
    result.add(f"{c}.makeup_water_flow", f"{what}: make-up water", b.makeup * 3600, "kg/h")
    h_mu = states["makeup"].enthalpy
    vent_heat = b.deaerator_vent * (states["deaerator_vent"].enthalpy - h_mu) + sum(
        m * (b.header_enthalpy[h] - h_mu) for h, m in b.vents.items())
    result.add(f"{c}.vent_heat_loss", f"{what}: heat lost in vents (above make-up water)", vent_heat / 1e3, "kW")
    residual_heat = b.blowdown_residual * (states["blowdown_residual"].enthalpy - h_mu) - b.blowdown_heat_recovered
    result.add(f"{c}.blowdown_heat_loss", f"{what}: heat lost in blowdown (above make-up water)",
               residual_heat / 1e3, "kW")
    boiler = inputs.boiler
    if boiler.blowdown_flash_header is not None:
        used = blowdown_flash_used(b, boiler.blowdown_flash_header)
        result.add(f"{c}.blowdown_flash_steam_flow", f"{what}: blowdown flash steam to the "
                   f"{boiler.blowdown_flash_header} header", b.blowdown_flash_steam * 3600, "kg/h")
        result.add(f"{c}.blowdown_flash_steam_used", f"{what}: blowdown flash steam the "
                   f"{boiler.blowdown_flash_header} header takes (steam saved)", used * 3600, "kg/h")
    if boiler.blowdown_cooled:
        result.add(f"{c}.blowdown_heat_recovered", f"{what}: heat the blowdown gives the make-up water",
                   b.blowdown_heat_recovered / 1e3, "kW")
        result.add(f"{c}.makeup_temperature_to_deaerator", f"{what}: make-up water to the deaerator",
                   b.makeup_state.temperature - 273.15, "degC")
    if boiler.blowdown_flash_header is not None or boiler.blowdown_cooled:
        result.add(f"{c}.blowdown_heat_saved", f"{what}: heat saved by the blowdown recovery (flash steam taken and "
                   "cooler, above make-up water)", blowdown_heat_saved(b) / 1e3, "kW")
    letdown_into = {ld.target: ld for ld in inputs.letdowns if ld.name in b.letdown_steam}
    for h in sorted(site.headers, key=lambda name: -site.headers[name]):
        state = b.header_states[h]
        result.add(f"{c}.{h}.temperature", f"{what}: {h} header temperature", state.temperature - 273.15, "degC")
        if h in b.vents:
            closed = "vent"
        elif h in b.shortfalls:
            closed = "short: no supply"
        elif h == inputs.boiler.header:
            closed = "boiler"
        elif h in letdown_into and b.letdown_steam[letdown_into[h].name] > 0.0:
            closed = f"let-down {letdown_into[h].name}"
            if closing_turbine(inputs, b, h):
                closed = f"turbine {closing_turbine(inputs, b, h)} and let-down {letdown_into[h].name}"
        elif closing_turbine(inputs, b, h):
            closed = f"turbine {closing_turbine(inputs, b, h)}"
        else:
            closed = "balanced"
        result.add(f"{c}.{h}.closed_by", f"{what}: {h} header closed by", closed)
        result.add(f"{c}.{h}.vent_flow", f"{what}: {h} header vent", b.vents.get(h, 0.0) * 3600, "kg/h")
        if h in b.shortfalls:
            result.add(f"{c}.{h}.shortfall", f"{what}: {h} header shortfall", b.shortfalls[h] * 3600, "kg/h")
    for ld in inputs.letdowns:
        if ld.name in b.letdown_steam:
            result.add(f"{c}.{ld.name}.steam_flow", f"{what}: let-down {ld.name} steam",
                       b.letdown_steam[ld.name] * 3600, "kg/h")
            if ld.desuperheated:
                result.add(f"{c}.{ld.name}.spray_flow", f"{what}: let-down {ld.name} spray water",
                           b.letdown_spray[ld.name] * 3600, "kg/h")
    for name, flow in b.user_flows.items():
        result.add(f"{c}.{name}.steam_flow", f"{what}: {name} steam", flow * 3600, "kg/h")
    turbine_case_results(result, inputs, b, c, what)
    return_flash_results(result, b, c, what)
    for f in inputs.flashes:
        if f.name in b.flash_steam:
            steam = b.flash_steam[f.name]
            used = flash_used(b, f.target, steam)
            result.add(f"{c}.{f.name}.flash_steam_flow", f"{what}: flash vessel {f.name} steam", steam * 3600, "kg/h")
            result.add(f"{c}.{f.name}.flash_steam_used", f"{what}: flash vessel {f.name} steam the {f.target} header "
                       "takes", used * 3600, "kg/h")


def _blowdown_year(result, inputs, balances):
    boiler = inputs.boiler
    if boiler.blowdown_flash_header is None and not boiler.blowdown_cooled:
        return
    result.references.append("Blowdown flash fraction from the flash vessel's energy balance; the make-up water "
                             "cooler as a counter-flow exchanger by approach temperature or effectiveness "
                             "(any heat-transfer text)")
    result.assumptions.append("Blowdown flash vessel and cooler adiabatic; the flash steam leaves saturated at the "
                              "header pressure, the residual saturated water; the make-up water is heated at the "
                              "deaerator pressure and not above its saturation temperature there")
    hours = {c.name: c.hours for c in inputs.load_cases}
    if boiler.blowdown_flash_header is not None:
        steam = sum(blowdown_flash_used(b, boiler.blowdown_flash_header) * hours[n] for n, b in balances.items())
        result.add("annual_blowdown_flash_steam_used", "Blowdown flash steam taken by the "
                   f"{boiler.blowdown_flash_header} header a year (steam saved)", steam / 1e3, "t")
    if boiler.blowdown_cooled:
        heat = sum(b.blowdown_heat_recovered * hours[n] for n, b in balances.items())
        result.add("annual_blowdown_heat_recovered", "Heat the blowdown gives the make-up water a year",
                   heat / 3.6e9, "MWh")
    saved = sum(blowdown_heat_saved(b) * hours[n] for n, b in balances.items())
    result.add("annual_blowdown_heat_saved", "Heat saved by the blowdown recovery a year", saved / 3.6e9, "MWh")


def blowdown_flash_used(b, header):
    """Blowdown flash steam the header takes, kg/s: its share of the header's vent is not credited
    (:func:`flash_used`)."""
    return flash_used(b, header, b.blowdown_flash_steam)


def flash_used(b, header, steam):
    """The part of ``steam`` (kg/s of flash steam into ``header``) the header takes: the header's vent is shared
    among all the flash steam flowing in (flash vessels and blowdown flash) in proportion to each flow.

    .. math:: \\dot m_{used} = \\dot m \\left(1 - \\frac{\\min(V, \\sum \\dot m_{flash})}{\\sum \\dot m_{flash}}\\right)

    so the flash steam credited adds up to the flash steam less the vent (common practice for crediting
    recovered flash steam: only what displaces live steam counts).
    """
    flashed = sum(m for name, m, _ in b.inflows.get(header, ())
                  if name.startswith("flash vessel ") or name == "blowdown flash steam")
    if steam <= 0.0 or flashed <= 0.0:
        return 0.0
    return steam * (1.0 - min(b.vents.get(header, 0.0), flashed) / flashed)


def blowdown_heat_saved(b):
    """Heat the blowdown recovery saves, W: flash steam the header takes and the cooler's heat, above make-up."""
    h_mu = b.states["makeup"].enthalpy
    flash = 0.0
    if b.blowdown_flash_steam > 0.0:
        header = next(h for h, flows in b.inflows.items() if any(n == "blowdown flash steam" for n, *_ in flows))
        flash = blowdown_flash_used(b, header) * (b.states["blowdown_flash_steam"].enthalpy - h_mu)
    return flash + b.blowdown_heat_recovered


def _case_checks(result, inputs, site, balances, what=""):
    """The checks of a set of solved load cases; ``what`` begins each check's name ("Without FL-01, ")."""
    boiler = inputs.boiler
    for case_name, b in balances.items():
        name = f"{what}{case_name}"
        if boiler.capacity is not None:
            result.check_limit(f"{name}: boiler within its rating", (b.boiler_steam * 3600, "kg/h"),
                               [("<=", (boiler.capacity * 3600, "kg/h"), "fail")],
                               lambda status, b=b: Phrase.of(
                                   "boiler steam {steam:.0f} " + ("within" if status == "pass" else "beyond") +
                                   " its maximum continuous rating {rating:.0f}", steam=(b.boiler_steam * 3600, "kg/h"),
                                   rating=(boiler.capacity * 3600, "kg/h")), source="the boiler's rating (input)")
        if b.boiler_steam > 0.0:
            share = b.blowdown / (b.boiler_steam + b.blowdown)
            result.check_limit(f"{name}: boiler blowdown rate", (share * 100, "%"),
                               [("<=", (BLOWDOWN_LIMIT * 100, "%"), "warn")],
                               lambda status, b=b, share=share: Phrase.of(
                                   "blowdown {blowdown:.0f} is {share:.1f} of the boiler's feedwater" + (
                                       "" if status == "pass" else ": beyond what a boiler is run at; check the "
                                       "dissolved-solids figures (same measure, the boiler-water limit well above the "
                                       "feedwater's) or treat the feedwater better"),
                                   blowdown=(b.blowdown * 3600, "kg/h"), share=(share * 100, "%")),
                               source="common practice: blowdown seldom above 10 % of the feedwater")
        result.check_limit(f"{name}: deaerator needs heating steam", (b.deaerator_flash_vent * 3600, "kg/h"),
                           [("<=", (0.0, "kg/h"), "warn")],
                           lambda status, b=b: Phrase.of("the deaerator takes {steam:.0f} of heating steam",
                                                         steam=(b.deaerator_steam * 3600, "kg/h"))
                           if status == "pass" else Phrase.of(
                               "the returned condensate brings more heat than the feedwater needs: the deaerator takes "
                               "no steam and {vent:.0f} flashes off at its vent; cool the returns or use the flash",
                               vent=(b.deaerator_flash_vent * 3600, "kg/h")))
        for h, short in b.shortfalls.items():
            unreturned = "" if b.returns_not_taken <= 0.0 else (
                "; its users cannot return the condensate of steam they do not get, so {kept:.0f} of returns is "
                "not counted and the make-up is the water actually supplied")
            result.check_limit(f"{name}: {h} header supplied", (short * 3600, "kg/h"), [("<=", (0.0, "kg/h"), "fail")],
                               Phrase.of("the " + h + " header is short by {short:.1f}: nothing feeds it "
                                         "(no let-down into it, or the boiler's fixed flow is too small)" + unreturned +
                                         "; this load case's figures are no basis for design",
                                         short=(short * 3600, "kg/h"),
                                         **({"kept": (b.returns_not_taken * 3600, "kg/h")} if unreturned else {})))
        for ld in inputs.letdowns:
            steam = b.letdown_steam.get(ld.name)
            if steam is None or steam == 0.0:
                continue
            if ld.max_flow is not None:
                source = f"let-down record {ld.link.record_id} rev {ld.link.revision}" if ld.link else "input"
                result.check_limit(f"{name}: let-down {ld.name} within its valve's maximum flow",
                                   (steam * 3600, "kg/h"), [("<=", (ld.max_flow * 3600, "kg/h"), "fail")],
                                   Phrase.of("let-down steam {steam:.0f} against the valve's maximum {limit:.0f}",
                                             steam=(steam * 3600, "kg/h"), limit=(ld.max_flow * 3600, "kg/h")),
                                   source=source)
            if ld.min_flow is not None:
                result.check_limit(f"{name}: let-down {ld.name} above its valve's minimum flow",
                                   (steam * 3600, "kg/h"), [(">=", (ld.min_flow * 3600, "kg/h"), "warn")],
                                   Phrase.of("let-down steam {steam:.0f} against the valve's minimum {limit:.0f}: "
                                             "below it the valve works near its seat",
                                             steam=(steam * 3600, "kg/h"), limit=(ld.min_flow * 3600, "kg/h")),
                                   source="common practice")
        for f in inputs.flashes:
            steam = b.flash_steam.get(f.name)
            if steam is None or steam == 0.0:
                continue
            vented = steam - flash_used(b, f.target, steam)
            result.check_limit(f"{name}: flash vessel {f.name} steam taken by the {f.target} header",
                               (vented * 3600, "kg/h"), [("<=", (0.0, "kg/h"), "warn")],
                               lambda status, f=f, steam=steam, vented=vented: Phrase.of(
                                   "all {steam:.0f} of flash steam is taken by the " + f.target + " header",
                                   steam=(steam * 3600, "kg/h")) if status == "pass" else Phrase.of(
                                   "of {steam:.0f} flash steam, {vented:.0f} is vented: the " + f.target + " header "
                                   "cannot take it, and only the steam used is credited",
                                   steam=(steam * 3600, "kg/h"), vented=(vented * 3600, "kg/h")))
    # A header that vents in one load case and lets down in another swings across its let-down's range.
    for h in site.headers:
        vents = [n for n, b in balances.items() if h in b.vents]
        letdowns = [n for n, b in balances.items()
                    if any(ld.target == h and b.letdown_steam.get(ld.name, 0.0) > 0.0 for ld in inputs.letdowns)]
        if vents and letdowns:
            result.check(f"{what}{h} header vents in one load case and lets down in another", "warn",
                         f"it vents in {', '.join(vents)} and is made up by let-down in {', '.join(letdowns)}: steam "
                         "let down in one season is thrown away in the other; look for a user or a back-pressure "
                         "turbine that evens it out, and set the vent and let-down controls apart so they never "
                         "work at once")
        elif vents:
            worst = max(balances[n].vents[h] for n in vents)
            result.check_limit(f"{what}{h} header does not vent", (worst * 3600, "kg/h"),
                               [("<=", (0.0, "kg/h"), "warn")],
                               Phrase.of("the " + h + " header vents up to {vent:.0f} (" + ", ".join(vents) + ")",
                                         vent=(worst * 3600, "kg/h")))


#: A deaerator's vent stated on its feedwater above which the figure is more likely a slip than a vent, %
#: (common practice: a deaerator vents a few tenths of a per cent of its feedwater or less).
DEAERATOR_VENT_LIMIT = 1.0


def _deaerator_vent_check(result, deaerator):
    """A vent stated as a share of the feedwater against what a deaerator vents."""
    if deaerator.vent_of_feedwater is None:
        return
    share = (deaerator.vent_of_feedwater * 100, "%")
    result.check_limit("Deaerator vent", share, [("<=", (DEAERATOR_VENT_LIMIT, "%"), "warn")],
                       lambda status: Phrase.of(
                           "{share:.3g} of the feedwater vented" + (
                               ", within the {limit:g} a deaerator vents" if status == "pass" else ", beyond the {limit:g} a deaerator vents: check the figure "
                               "(a fraction of the feedwater, not a percentage); the steam vented is lost with it"),
                           share=share, limit=(DEAERATOR_VENT_LIMIT, "%")),
                       source="common practice: a deaerator vents a few tenths of a per cent of its feedwater or less")
