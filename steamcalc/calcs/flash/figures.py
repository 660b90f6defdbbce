"""The flash calculation's figure as data: flash fraction against flash pressure, the chosen stage(s) marked.

Computed here from the same flash-fraction function as the results and stored in the record; the views
only draw it.
"""

from __future__ import annotations

import numpy as np

from ...properties.steam_arrays import saturation_arrays
from ..base import Axis, Figure, Series, figure_or_missing
from .fraction import flash_fraction

CURVE_POINTS = 60
#: Lowest flash pressure drawn, Pa (absolute), and the span below the condensate pressure.
LOWEST_FLASH_PRESSURE = 0.2e5
PRESSURE_SPAN = 60.0
TITLE = "Flash fraction against flash pressure"


def flash_chart(inputs, result):
    """Flash fraction (%) of this condensate against flash pressure (log axis), single flash from the inlet."""
    inlet_enthalpy = result.value("condensate_enthalpy") * 1e3
    top = inputs.condensate_pressure
    pressures = np.geomspace(max(LOWEST_FLASH_PRESSURE, top / PRESSURE_SPAN), top * 0.999, CURVE_POINTS)
    sat = saturation_arrays(pressures)
    fractions = flash_fraction(inlet_enthalpy, sat["h_f"], sat["h_g"]) * 100.0
    stages = inputs.stage_pressures
    if len(stages) == 1:
        marks = ((stages[0], result.value("flash_fraction")),)
        names = ("chosen flash pressure",)
    else:
        marks = tuple((p, result.value(f"stage_{i}_flash_fraction")) for i, p in enumerate(stages, start=1))
        names = tuple(f"stage {i}" for i in range(1, len(stages) + 1))
    series = (Series("single flash from the inlet", tuple(pressures / 1e5), tuple(fractions), role="outlet"),
              Series("this case", tuple(p / 1e5 for p, _ in marks), tuple(x * 100.0 for _, x in marks),
                     style="markers", role="inlet", labels=names))
    return Figure("flash_fraction", TITLE, x=Axis("flash pressure", "bar", scale="log", basis="absolute"),
                  y=Axis("flash fraction, of the condensate entering", "percent"), series=series)


def figures(inputs, result):
    """The flash calculation's figures."""
    return [figure_or_missing("flash_fraction", TITLE, lambda: flash_chart(inputs, result))]
