"""The heater workbook's turndown table: load, duty, the steam-side pressure each U needs, and whether the
condensate drains against its back pressure (below the stall pressure it does not), from the result."""

from __future__ import annotations

from .figures import turndown_series


def _u_label(result, which):
    if f"turndown_u_{which}" in result.values:
        return f"{which} U {result.value(f'turndown_u_{which}'):.3g} kW/(m²·K)"
    return "UA as at design"


def turndown_rows(inputs, result):
    """Turndown table: load, duty and the steam-side pressure needed, each column naming its U."""
    loads, pressures = turndown_series(result)
    clean = dict(zip(*turndown_series(result, clean=True)))
    drain = None
    if inputs.condensate_back_pressure is not None:
        # No stall pressure: the static head alone drains the condensate at any steam-side pressure.
        drain = result.value("stall_pressure") if "stall_pressure" in result.values else 0.0
    fouled_name = _u_label(result, "fouled") if clean else _u_label(result, "clean") + " = fouled"
    rows = []
    for load, pressure in zip(loads, pressures):
        row = {"load, %": load, "duty, kW": result.value("duty") * load / 100,
               f"steam-side pressure, {fouled_name}, bar(a)": pressure}
        if clean:
            row[f"steam-side pressure, {_u_label(result, 'clean')}, bar(a)"] = clean[load]
        if drain is not None:
            if clean:
                row["drains, clean U"] = "yes" if clean[load] > drain else "NO - stall"
                row["drains, fouled U"] = "yes" if pressure > drain else "NO - stall"
            else:
                row["drains by pressure"] = "yes" if pressure > drain else "NO - stall"
        rows.append(row)
    return rows
