"""A year of a balance, and the comparison of two balances (the what-if): fuel, water, CO₂ and money.

A year is the load cases weighted by their hours: fuel energy :math:`E = \\sum_c P_{fuel,c} t_c`, make-up
water :math:`V = \\sum_c \\dot m_{mu,c} t_c / \\rho_{mu}`, CO₂ :math:`E \\cdot f_{CO_2}`, money
:math:`E \\cdot p_{fuel} + V \\cdot p_{water}`, with the site's prices, emission factor and basis.
"""

from __future__ import annotations

from ..economics import fuel_basis, fuel_basis_assumption

#: The yearly figures a comparison shows: key, words, unit (None: the site's currency).
ANNUAL = (("annual_fuel_energy", "fuel energy a year", "MWh"),
          ("annual_makeup_water", "make-up water a year", "m**3"),
          ("annual_co2", "CO₂ a year", "t"),
          ("annual_fuel_cost", "fuel cost a year", None),
          ("annual_water_cost", "make-up water cost a year", None),
          ("annual_total_cost", "fuel and water cost a year", None),
          # the turbines' figures come from :func:`.turbines.add_turbine_year`, which adds their differences
          ("annual_turbine_electricity", "electricity the turbines generate a year", "MWh"),
          ("annual_turbine_electricity_value", "value of the turbines' electricity a year", None))


def annual_totals(result, inputs, site, balances, efficiency, prefix):
    """Add the year's figures of a set of solved load cases (``prefix`` "" or "what_if_"); return them."""
    states = next(iter(balances.values())).states
    fuel_mwh, water_m3 = 0.0, 0.0
    for case in inputs.load_cases:
        b = balances[case.name]
        heat = (b.boiler_steam * (states["boiler_steam"].enthalpy - states["feedwater"].enthalpy)
                + b.blowdown * (states["blowdown"].enthalpy - states["feedwater"].enthalpy))
        fuel_mwh += heat / efficiency * case.hours / 3.6e9
        water_m3 += b.makeup * case.hours / states["makeup"].density
    words = "Without " + ", ".join(inputs.without) + ": " if prefix else ""
    totals = {"annual_fuel_energy": fuel_mwh, "annual_makeup_water": water_m3}
    result.add(f"{prefix}annual_fuel_energy", f"{words}Fuel energy a year ({fuel_basis(site)} calorific value)",
               fuel_mwh, "MWh")
    result.add(f"{prefix}annual_makeup_water", f"{words}Make-up water a year", water_m3, "m**3")
    if not prefix:
        result.assumptions.append(fuel_basis_assumption(site))
        hours = sum(c.hours for c in inputs.load_cases) / 3600.0
        result.add("annual_hours", "Hours a year of the load cases", hours, "h")
    if site.fuel_emission_factor is not None:
        totals["annual_co2"] = fuel_mwh * site.fuel_emission_factor / 1e3
        result.add(f"{prefix}annual_co2", f"{words}CO₂ a year", totals["annual_co2"], "t")
    currency = None
    if site.fuel_price is not None:
        currency = site.fuel_price.currency
        totals["annual_fuel_cost"] = fuel_mwh * site.fuel_price.per_mwh
        result.add(f"{prefix}annual_fuel_cost", f"{words}Fuel cost a year", totals["annual_fuel_cost"], currency)
    if site.water_cost is not None:
        totals["annual_water_cost"] = water_m3 * site.water_cost.per_m3
        result.add(f"{prefix}annual_water_cost", f"{words}Make-up water cost a year", totals["annual_water_cost"],
                   site.water_cost.currency)
        if currency == site.water_cost.currency:
            totals["annual_total_cost"] = totals["annual_fuel_cost"] + totals["annual_water_cost"]
            result.add(f"{prefix}annual_total_cost", f"{words}Fuel and water cost a year", totals["annual_total_cost"],
                       currency)
    elif currency is not None:
        totals["annual_total_cost"] = totals["annual_fuel_cost"]
        result.add(f"{prefix}annual_total_cost", f"{words}Fuel cost a year (no water cost in the site file)",
                   totals["annual_total_cost"], currency)
    totals["currency"] = currency
    return totals


def add_comparison(result, inputs, site, base, alternative):
    """Add the differences of the what-if from the balance as stated (what-if minus balance)."""
    without = ", ".join(inputs.without)
    for key, words, unit in ANNUAL:
        if key in base and key in alternative:
            unit = base["currency"] if unit is None else unit
            result.add(f"what_if_{key}_difference", f"Without {without}, more {words} (what-if less balance)",
                       alternative[key] - base[key], unit)


def comparison_rows(record):
    """The comparison table of a balance record: one row per yearly figure, balance, what-if and difference.

    Reads only the record's results, so a view can show it without the calculation.
    """
    results = record.get("results", {})
    rows = []
    for key, words, _ in ANNUAL:
        if key in results and f"what_if_{key}" in results:
            unit = results[key].get("unit", "")
            rows.append({"figure": words, "unit": unit, "balance": results[key]["value"],
                         "what-if": results[f"what_if_{key}"]["value"],
                         "difference": results[f"what_if_{key}_difference"]["value"]})
    return rows
