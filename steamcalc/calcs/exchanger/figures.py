"""The exchanger's figure as data: the steam-side pressure needed against load, the drainage limit, the
control valve's supply pressure and its travel.

Drawn from the turndown the calculation found (the same results the record lists) and stored in the
record; the views only draw it.
"""

from __future__ import annotations

from ..base import Axis, Band, Figure, Series, figure_or_missing

TITLE = "Turndown: steam-side pressure needed against load"


def turndown_series(result, clean=False):
    """(loads in %, pressures in bar(a)) of the turndown, on the fouled U or (when it differs) the clean U."""
    prefix = "required_steam_pressure_clean_" if clean else "required_steam_pressure_"
    loads = sorted(int(k[len(prefix):]) for k in result.values if k.startswith(prefix) and k[len(prefix):].isdigit())
    return loads, [result.value(f"{prefix}{load}") for load in loads]


def u_words(result, which):
    """The U a turndown line is on, in words: "clean U", "fouled U", or "UA as at design" (the values are results)."""
    return f"{which} U" if f"turndown_u_{which}" in result.values else "UA as at design"


def _travel(result, tag):
    prefix = "control_valve_travel_" + ("clean_" if tag == "clean" else "")
    rows = []
    for key, value in result.values.items():
        rest = key[len(prefix):] if key.startswith(prefix) else ""
        if rest.isdigit():
            rows.append((int(rest), value.value))
    return sorted(rows)


def stall_chart(inputs, result):
    """Steam-side pressure needed against load (fouled and clean U), the lines a stall is judged against,
    the stall region shaded, and the rated control valve's travel on the right axis."""
    loads, pressures = turndown_series(result)
    clean_loads, clean_pressures = turndown_series(result, clean=True)
    fouled_name = u_words(result, "fouled") if clean_loads else u_words(result, "clean") + " (no fouling)"
    series = [Series(f"pressure needed, {fouled_name}", tuple(loads), tuple(pressures), style="line+markers",
                     role="outlet")]
    if clean_loads:
        series.append(Series(f"pressure needed, {u_words(result, 'clean')}", tuple(clean_loads),
                             tuple(clean_pressures), style="line+markers", dash="dot"))
    bands = []
    if inputs.condensate_back_pressure is not None:
        back = inputs.condensate_back_pressure / 1e5
        series.append(Series("condensate back pressure", (0.0, 100.0), (back, back), role="limit", dash="dash"))
        if "stall_pressure" in result.values and abs(result.value("stall_pressure") - back) > 1e-9:  # drainage given
            drain = result.value("stall_pressure")
            series.append(Series("drainage stops below this pressure (trap differential, static head, lift)",
                                 (0.0, 100.0), (drain, drain), role="limit", dash="dot"))
        stall = result.value("stall_load_fraction") * 100
        if 0 < stall < 100:
            bands.append(Band("x", 0.0, stall, "stall region, clean U"))
    if inputs.control_valve_supply_pressure is not None:
        supply = inputs.control_valve_supply_pressure / 1e5
        series.append(Series("control valve supply pressure", (0.0, 100.0), (supply, supply), role="reference",
                             dash="dashdot"))
    y2 = None
    for tag, dash in (("fouled", "dash"), ("clean", "dot")):
        rows = _travel(result, tag)
        if rows:
            series.append(Series(f"control valve travel, {tag} U (right axis)", tuple(load for load, _ in rows),
                                 tuple(travel for _, travel in rows), style="line+markers", role="secondary",
                                 dash=dash, axis="y2"))
            y2 = Axis("control valve travel", "percent", low=0.0, high=100.0)
    return Figure("turndown", TITLE, x=Axis("load, of design", "percent", low=0.0, high=102.0),
                  y=Axis("pressure", "bar", basis="absolute"), y2=y2, series=tuple(series), bands=tuple(bands))


def figures(inputs, result):
    """The exchanger's figures."""
    return [figure_or_missing("turndown", TITLE, lambda: stall_chart(inputs, result))]
