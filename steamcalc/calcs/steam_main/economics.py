"""The economic insulation thickness of a steam main: the candidate with the least yearly cost per metre.

For each candidate thickness the heat loss per metre comes from the heat balance of :mod:`.heat_loss`
(the first segment's pipe at its inlet steam temperature); its fuel a year and that fuel's cost follow
from the site's operating hours, boiler efficiency and fuel price, as the main's yearly loss does. The
installed cost per metre is spread over the evaluation period by the capital recovery factor
(annualised cost, a textbook method of engineering economics: common practice). The economic thickness
is the candidate with the least sum of the two.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from ...errors import InputError
from ...units.amounts import Phrase
from ...units.rows import Column
from ..economics import annual_fuel_energy, annual_value, missing_site_data
from .heat_loss import surface_loss

#: The candidates' columns: thickness (0 for bare) and installed cost per metre of pipe, in the site's currency.
OPTION_COLUMNS = (
    Column("thickness", "signed_length", "Thickness", '"50 mm"', required=True),
    Column("cost", "number", "Installed cost per metre", "42.0", required=True),
)
#: Highest discount rate accepted, a fraction a year: beyond it the figure is a slip (8 typed for 8 %).
MAX_DISCOUNT_RATE = 0.5
#: Longest evaluation period accepted, years (insulation on a plant main rarely outlives 40 years).
MAX_YEARS = 50.0

METHOD = ("Economic insulation thickness by the least annualised cost: installed cost times the capital recovery "
          "factor i(1+i)^n/((1+i)^n - 1) plus the fuel cost a year of the heat loss (textbook engineering "
          "economics; common practice)")


@dataclass(frozen=True)
class Option:
    """One candidate insulation and what it costs a year, per metre of the main."""

    thickness: float        #: m
    installed_cost: float   #: currency per metre of pipe
    heat_loss: float        #: W/m
    fuel_energy: float      #: MWh a year per metre
    energy_cost: float      #: currency a year per metre
    annualised_cost: float  #: currency a year per metre
    total: float            #: currency a year per metre


def capital_recovery_factor(rate, years):
    """The share of a first cost that pays it back with interest in equal yearly sums.

    Parameters
    ----------
    rate : float
        Discount rate a year, fraction (0.08 for 8 %); 0 gives the straight share 1/n.
    years : float
        Evaluation period, years.

    Returns
    -------
    float
        Capital recovery factor, 1/year.

    Notes
    -----
    .. math:: CRF = \\frac{i (1 + i)^n}{(1 + i)^n - 1}, \\qquad CRF \\to 1/n \\text{ as } i \\to 0

    References
    ----------
    The uniform-series capital recovery factor of engineering economics (any engineering economics text;
    common practice).

    Examples
    --------
    >>> round(capital_recovery_factor(0.08, 10), 5)
    0.14903
    >>> capital_recovery_factor(0.0, 10)
    0.1
    """
    if rate == 0.0:
        return 1.0 / years
    growth = (1.0 + rate) ** years
    return rate * growth / (growth - 1.0)


def check_options(options, rate, years):
    """Refuse candidates a user could not mean, and rates or periods given without them (the Inputs' checks)."""
    given = [name for name, v in (("discount_rate", rate), ("evaluation_years", years)) if v is not None]
    if options is None:
        if given:
            raise InputError("is given without insulation options to compare", field=f"insulation.{given[0]}",
                             fix="add [[inputs.insulation.options]] tables (thickness, cost), or remove it")
        return
    if len(options) < 2:
        raise InputError("the economic thickness needs at least two candidate thicknesses", field="insulation.options",
                         value=len(options), fix="add a [[inputs.insulation.options]] table for each thickness to compare")
    for name, value in (("discount_rate", rate), ("evaluation_years", years)):
        if value is None:
            raise InputError("is required with insulation options", field=f"insulation.{name}",
                             fix="add discount_rate = 0.08 and evaluation_years = 10 (your company's figures) to "
                                 "[inputs.insulation]")
    if not 0.0 <= rate <= MAX_DISCOUNT_RATE:
        raise InputError(f"a discount rate lies from 0 to {MAX_DISCOUNT_RATE:g} a year", field="insulation.discount_rate",
                         value=rate, limits=(0, MAX_DISCOUNT_RATE, ""), fix="write 8 % as 0.08")
    if not 1.0 <= years <= MAX_YEARS:
        raise InputError(f"an evaluation period lies from 1 to {MAX_YEARS:g} years", field="insulation.evaluation_years",
                         value=years, limits=(1, MAX_YEARS, "years"))
    previous = None
    for index, (thickness, _cost) in enumerate(options):
        where = f"insulation.options[{index}].thickness"
        if not 0.0 <= thickness <= 0.5:
            raise InputError(f"the thickness of option {index + 1} lies from 0 (bare) to 500 mm", field=where,
                             value=f"{thickness * 1000:g} mm", limits=(0, 500, "mm"))
        if previous is not None and thickness <= previous:
            raise InputError(f"the thicknesses must increase down the list: option {index + 1} is not thicker than "
                             f"option {index} ({previous * 1000:g} mm)", field=where, value=f"{thickness * 1000:g} mm",
                             fix="list the candidates from the thinnest to the thickest, each once")
        previous = thickness


def evaluate_options(options, pipe_outer_diameter, steam_temperature, ambient, wind, pressure, insulation, site, rate,
                     years):
    """Each candidate's heat loss and yearly costs per metre of main.

    Parameters
    ----------
    options : tuple of (float, float)
        (thickness m, installed cost per metre of pipe) in increasing thickness.
    pipe_outer_diameter, steam_temperature, ambient, wind, pressure : float
        m, K, K, m/s, Pa: as :func:`.heat_loss.surface_loss` takes them.
    insulation : Insulation
        The case's insulation; each candidate takes its conductivities and jacket with its own thickness.
    site : steamcalc.cases.site.Site
        Operating hours, boiler efficiency and fuel price.
    rate, years : float
        Discount rate (fraction a year) and evaluation period (years).

    Returns
    -------
    tuple of Option

    Notes
    -----
    :math:`C_E = q' t / \\eta_{boiler} \\cdot p_{fuel}`, :math:`C_A = C_{inst} \\cdot CRF(i, n)`,
    :math:`C = C_E + C_A`, all per metre a year.

    Examples
    --------
    >>> from steamcalc.cases.site import Price, Site
    >>> from steamcalc.calcs.steam_main.heat_loss import Insulation
    >>> site = Site(operating_hours=6000.0, boiler_efficiency=0.86, fuel_price=Price(40.0, "EUR"))
    >>> got = evaluate_options(((0.04, 30.0), (0.05, 34.0)), 0.0889, 448.0, 293.15, 0.0, 101325.0,
    ...                        Insulation(0.05, 0.040, 0.055, 0.1), site, 0.08, 10)
    >>> [(round(o.heat_loss, 1), round(o.total, 2)) for o in got]
    [(62.9, 22.03), (54.9, 20.38)]
    """
    factor = capital_recovery_factor(rate, years)
    out = []
    for thickness, cost in options:
        loss = surface_loss(pipe_outer_diameter, steam_temperature, ambient, wind, pressure,
                            replace(insulation, thickness=thickness)).heat_loss
        fuel = annual_fuel_energy(loss, site.operating_hours, site.boiler_efficiency)
        energy_cost = annual_value(fuel, site.fuel_price)
        out.append(Option(thickness, cost, loss, fuel, energy_cost, cost * factor, energy_cost + cost * factor))
    return tuple(out)


def economic_index(options):
    """Index of the candidate with the least total yearly cost (the thinner on a tie)."""
    return min(range(len(options)), key=lambda i: (options[i].total, i))


def step_at(options, index, installed):
    """The candidates' step at the economic thickness, toward the installed one, m."""
    toward = index + 1 if installed > options[index].thickness else index - 1
    if not 0 <= toward < len(options):
        toward = index - 1 if toward > index else index + 1
    return abs(options[toward].thickness - options[index].thickness)


def report_economics(inputs, site, flows, result):
    """The economic thickness's steps, results and check; returns the options evaluated (or None)."""
    if inputs.insulation_options is None:
        result.notice("Economic insulation thickness", "no candidate thicknesses with installed costs are given: the "
                      "economic thickness is not computed; list them in [[inputs.insulation.options]]")
        return None
    missing = missing_site_data(site, ("operating_hours", "boiler_efficiency", "fuel_price"))
    if missing:
        result.check("Site data for the economic thickness", "warn",
                     f"the site file lacks {', '.join(missing)}: the economic thickness is not computed")
        return None
    from .report import _insulation

    first, rate, years = flows[0], inputs.discount_rate, inputs.evaluation_years
    options = evaluate_options(inputs.insulation_options, first.outer_diameter, first.inlet.temperature,
                               inputs.ambient_temperature, inputs.wind_speed, site.atmospheric_pressure,
                               _insulation(inputs), site, rate, years)
    currency = site.fuel_price.currency
    per_m = f"{currency}/m"
    factor = capital_recovery_factor(rate, years)
    result.references.append(METHOD)
    result.assumptions.append(f"Economic thickness per metre of the first segment's pipe ({first.segment.size}) at "
                              "its inlet steam temperature; installed costs in the fuel price's currency, "
                              "at today's prices")
    result.work("Capital recovery factor", "CRF = i (1 + i)^n / ((1 + i)^n − 1)", "i*(1 + i)**n/((1 + i)**n - 1)"
                if rate > 0 else "1/n", factor, "", **({"i": (rate, "")} if rate > 0 else {}), n=(years, ""))
    for n, o in enumerate(options, start=1):
        mm = f"{o.thickness * 1000:g} mm"
        result.work(f"Option {n} ({mm}): fuel cost a year of the heat loss", "C_E = q' · t / η_boiler · fuel price",
                    "at_price(q*t/eta_boiler, fuel_price)", o.energy_cost, per_m, q=(o.heat_loss, "W/m"),
                    t=(site.operating_hours, "h"), eta_boiler=(site.boiler_efficiency, ""),
                    fuel_price=(site.fuel_price.per_mwh, f"{currency}/MWh"))
        result.work(f"Option {n} ({mm}): installed cost a year", "C_A = C_inst · CRF", "annualised(C_inst, CRF)",
                    o.annualised_cost, per_m, C_inst=(o.installed_cost, per_m), CRF=(factor, ""))
        result.work(f"Option {n} ({mm}): total cost a year", "C = C_E + C_A", "sum_of(C_E, C_A)", o.total, per_m,
                    C_E=(o.energy_cost, per_m), C_A=(o.annualised_cost, per_m))
        result.add(f"option_{n}_thickness", f"Option {n}: insulation thickness", o.thickness * 1000, "mm")
        result.add(f"option_{n}_heat_loss", f"Option {n}: heat loss", o.heat_loss, "W/m")
        result.add(f"option_{n}_energy_cost", f"Option {n}: fuel cost a year, per metre", o.energy_cost, per_m)
        result.add(f"option_{n}_annualised_cost", f"Option {n}: installed cost a year, per metre", o.annualised_cost,
                   per_m)
        result.add(f"option_{n}_total_cost", f"Option {n}: total cost a year, per metre", o.total, per_m)
    best = economic_index(options)
    chosen = options[best]
    result.add("capital_recovery_factor", "Capital recovery factor", factor)
    result.add("economic_thickness", "Economic insulation thickness", chosen.thickness * 1000, "mm")
    result.add("economic_total_cost", "Least total cost a year, per metre", chosen.total, per_m)
    if best in (0, len(options) - 1):
        end = "thinnest" if best == 0 else "thickest"
        result.check("Economic thickness inside the candidates", "warn", Phrase.of(
            f"the least cost falls on the {end} candidate ({{t:.0f}}): the true economic thickness may lie beyond "
            "the list; add a candidate past it", t=(chosen.thickness * 1000, "mm")))
    step = step_at(options, best, inputs.insulation_thickness)
    off = abs(inputs.insulation_thickness - chosen.thickness)
    result.check_limit("Installed thickness against the economic thickness", (off * 1000, "mm"),
                       [("<=", (step * 1000, "mm"), "warn")],
                       lambda s: Phrase.of("the installed {t:.0f} is within one candidate step of the economic {e:.0f}"
                                           if s == "pass" else "the installed {t:.0f} is more than one candidate step "
                                           "from the economic {e:.0f}: reconsider the thickness",
                                           t=(inputs.insulation_thickness * 1000, "mm"), e=(chosen.thickness * 1000,
                                                                                            "mm")),
                       source="common practice")
    return options


def economics_figure(inputs, options, currency):
    """Yearly costs per metre against thickness: fuel, installed, total, the economic thickness marked."""
    from ..base import Axis, Figure, Series

    x = tuple(o.thickness * 1000 for o in options)
    best = options[economic_index(options)]
    series = [Series("fuel cost of the heat loss", x, tuple(o.energy_cost for o in options), style="line+markers"),
              Series("installed cost a year", x, tuple(o.annualised_cost for o in options), style="line+markers",
                     dash="dash"),
              Series("total", x, tuple(o.total for o in options), style="line+markers", role="outlet"),
              Series("economic thickness", (best.thickness * 1000,), (best.total,), style="markers", role="inlet")]
    return Figure("economic_thickness", "Yearly cost per metre against insulation thickness (first segment)",
                  x=Axis("insulation thickness", "mm"), y=Axis("cost a year per metre", f"{currency}/m"),
                  series=tuple(series))

