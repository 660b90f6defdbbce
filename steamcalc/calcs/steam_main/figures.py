"""The steam main's figures as data: pressure along the main with its drip legs, and loss against thickness."""

from __future__ import annotations

from ..base import Axis, Figure, Series, figure_or_missing
from .heat_loss import Insulation, surface_loss

#: Insulation thicknesses drawn, m (common stock thicknesses of pipe sections).
THICKNESSES = (0.0, 0.025, 0.04, 0.05, 0.065, 0.08, 0.1)


def pressure_profile(flows, drips):
    """Pressure (bar(a)) against distance from the header, with the drip legs marked."""
    x, y, edge = [0.0], [flows[0].inlet.pressure / 1e5], 0.0
    for f in flows:
        edge += f.segment.length
        x.append(edge)
        y.append(f.outlet.pressure / 1e5)
    return Figure("main_pressure", "Pressure along the main", x=Axis("distance from the header", "m"),
                  y=Axis("pressure", "bar", basis="absolute"),
                  series=(Series("steam pressure", tuple(x), tuple(y), style="line+markers", role="process"),
                          Series("drip legs", tuple(d.distance for d in drips), tuple(d.pressure / 1e5 for d in drips),
                                 style="markers", role="outlet", labels=tuple(f"drip {d.number}" for d in drips))))


def loss_against_thickness(inputs, site, flows):
    """Heat loss of the first segment, W/m, against insulation thickness, the chosen thickness marked."""
    first = flows[0]
    losses = [surface_loss(first.outer_diameter, first.inlet.temperature, inputs.ambient_temperature, inputs.wind_speed,
                           site.atmospheric_pressure, Insulation(t, inputs.conductivity_50, inputs.conductivity_150,
                                                                 inputs.jacket_emissivity)).heat_loss
              for t in THICKNESSES]
    return Figure("loss_against_thickness", "Heat loss against insulation thickness (first segment)",
                  x=Axis("insulation thickness", "mm"), y=Axis("heat loss", "W/m", scale="log"),
                  series=(Series("heat loss", tuple(t * 1000 for t in THICKNESSES), tuple(losses), style="line+markers"),
                          Series("this case", (inputs.insulation_thickness * 1000,), (first.loss.heat_loss,),
                                 style="markers", role="inlet")))


def figures(inputs, site, flows, drips, result, options=None):
    drawn = [figure_or_missing("main_pressure", "Pressure along the main", lambda: pressure_profile(flows, drips)),
             figure_or_missing("loss_against_thickness", "Heat loss against insulation thickness (first segment)",
                               lambda: loss_against_thickness(inputs, site, flows))]
    if options:
        from .economics import economics_figure
        drawn.append(figure_or_missing("economic_thickness", "Yearly cost per metre against insulation thickness (first segment)",
                                       lambda: economics_figure(inputs, options, site.fuel_price.currency)))
    return drawn
