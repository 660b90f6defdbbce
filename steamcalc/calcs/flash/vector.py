"""Flash samples over arrays: the banded results of many Monte Carlo samples at once.

The numbers :func:`steamcalc.calcs.flash.calculation.calculate` gives for the banded results
(``UNCERTAINTY_RESULTS``) under :func:`~steamcalc.calcs.base.numbers_only`, on the fast engine,
for a whole array of sampled inputs: the same balances — the adiabatic flash of each stage at
constant enthalpy, the heat of the flash steam above make-up water less what is vented above the
demand, the fuel and money a year — and the same vessel diameters (Souders–Brown vapour area,
liquid hold-up, nozzles), with IF97 over arrays (:mod:`steamcalc.properties.steam_arrays`). No
steps, checks or text: the record's own run makes those, once.

A sample is answered here only when ``calculate()`` would give it a result: the screen refuses
condensate above saturation (and, to be safe, within a hair of it without being on it), pressures
outside the saturation line or in its region-3 part, and condensate below 0 °C. Samples not
answered go through ``calculate()`` one by one, which gives them their result or their reason;
``tests/test_uncertainty_vector_kinds.py`` compares both paths sample by sample.
"""

from __future__ import annotations

import numpy as np

from ...equipment.piping import pipe_inner_diameter
from ...equipment.vessel import MAX_HOLDUP_DEPTH_TO_DIAMETER, nozzle_minimum_diameter
from ...properties.engines.common import MIN_PRESSURE, MIN_TEMPERATURE, SATURATION_PRESSURE_623
from ...properties.steam import SATURATION_TOLERANCE, SteamState
from ...properties.steam_arrays import properties_pT, saturated_pair, saturation_temperatures, states_ph
from ..economics import annual_fuel_energy, missing_site_data
from .fraction import flash_fraction
from .vessel import DEFAULT_K_FACTOR, DEFAULT_RESIDENCE_TIME

#: The banded results this path gives (``steamcalc.calcs.flash.calculation.UNCERTAINTY_RESULTS``).
RESULTS = ("flash_fraction", "flash_steam_flow", "recovered_heat_rate", "annual_cost_saving", "vessel_diameter")
#: Samples at pressures above this go the one-by-one way: the saturation line's region-3 part, where
#: the scalar engine refines what the arrays take from the backward equations (no condensate system
#: works there).
_HIGHEST_PRESSURE = SATURATION_PRESSURE_623


def _full(value, size):
    return np.broadcast_to(np.asarray(value, dtype=float), (size,)).copy()


def _column(inputs, columns, name, size):
    """A sampled input as its array, any other as the case gives it (None stays None)."""
    if name in columns:
        return np.asarray(columns[name], dtype=float)
    value = getattr(inputs, name)
    return None if value is None else _full(value, size)


def sample_results(inputs, site, columns, size, keys):
    """Banded flash results of many samples at once, on the fast engine.

    Parameters
    ----------
    inputs : steamcalc.calcs.flash.calculation.Inputs
        The nominal inputs (every input that is not sampled).
    site : steamcalc.cases.site.Site
        Make-up water temperature, operating hours, boiler efficiency and fuel price (the heat
        and the money); atmospheric pressure (the make-up water's).
    columns : dict of str to numpy.ndarray
        The sampled inputs, SI units (Pa, K, kg/s, m/s, s), ``size`` values each.
    size : int
        Number of samples.
    keys : sequence of str
        Result keys wanted, from :data:`RESULTS`.

    Returns
    -------
    tuple
        ``(values, answered)``: values, shape (size, len(keys)), in the record's units (fraction,
        kg/h, kW, the fuel price's currency, m), NaN in rows not answered; answered, a boolean
        array, True where the row holds what ``calculate()`` gives.

    Notes
    -----
    As :func:`steamcalc.calcs.flash.calculation.calculate`: per stage
    :math:`x = \\max(0, (h_{in} - h_f)/h_{fg})`, :math:`\\dot m_{flash} = x \\dot m_{in}`;
    :math:`\\dot Q = \\sum \\dot m_{flash} (h_g - h_{mw})`, less the share vented above the demand;
    :math:`E = \\dot Q t/\\eta_{boiler}`; vessel diameter the largest of
    :math:`\\sqrt{4 \\dot V_g/(\\pi v)}`, :math:`(4 \\dot V_f t_{res}/(\\pi r))^{1/3}` and the nozzles'.

    References
    ----------
    IAPWS R7-97(2012) (through seuif97); Souders and Brown (1934), Ind. Eng. Chem. 26(1), 98-103;
    ASME BPVC VIII-1 UG-36(b)(1) (nozzles).

    Examples
    --------
    >>> from steamcalc.calcs.flash.calculation import Inputs
    >>> from steamcalc.cases.site import Site
    >>> nominal = Inputs(condensate_pressure=11.01325e5, condensate_flow=1.0, flash_pressure=1.01325e5)
    >>> values, answered = sample_results(nominal, Site(), {"condensate_pressure": np.array([10e5, 12e5])},
    ...                                   2, ["flash_fraction"])
    >>> [round(float(v), 4) for v in values[:, 0]], answered.tolist()
    ([0.1523, 0.1682], [True, True])
    """
    names = ("condensate_pressure", "condensate_flow", "condensate_temperature", "flash_pressure", "lp_demand",
             "k_factor", "vapour_velocity", "residence_time")
    x = {name: _column(inputs, columns, name, size) for name in names}
    stages = [x["flash_pressure"]] if inputs.stages is None else [_full(p, size) for p in inputs.stages]
    answered = _screen(x, stages, size)
    values = np.full((size, len(keys)), np.nan)
    rows = np.flatnonzero(answered)
    if rows.size:
        subset = {name: None if column is None else column[rows] for name, column in x.items()}
        results = _results(inputs, site, subset, [p[rows] for p in stages], rows.size)
        for j, key in enumerate(keys):
            values[rows, j] = results[key]
        kept = np.all(np.isfinite(values[rows]), axis=1)
        answered[rows[~kept]] = False
        values[rows[~kept]] = np.nan
    return values, answered


def _in_range(pressure):
    return (pressure >= MIN_PRESSURE) & (pressure <= _HIGHEST_PRESSURE)


def _screen(x, stages, size):
    """Rows ``calculate()`` gives a result for (conservatively: a hair above saturation is left out)."""
    p_c = x["condensate_pressure"]
    ok = _in_range(p_c) & (x["condensate_flow"] > 0.0)
    previous = p_c
    for p in stages:
        ok &= _in_range(p) & (p < previous)   # as the Inputs check: pressures fall stage by stage
        previous = p
    t = x["condensate_temperature"]
    if t is not None:
        t_sat = np.full(size, np.nan)
        t_sat[ok] = saturation_temperatures(p_c[ok])
        on_line = np.abs(t - t_sat) <= SATURATION_TOLERANCE
        ok &= on_line | ((t < t_sat - 2 * SATURATION_TOLERANCE) & (t >= MIN_TEMPERATURE))
    return ok


def _inlet_enthalpy(x, size):
    """Condensate enthalpy, J/kg: saturated liquid at its pressure, or subcooled at its temperature."""
    p_c, t = x["condensate_pressure"], x["condensate_temperature"]
    saturated = saturated_pair(p_c, ("enthalpy",))[0].enthalpy
    if t is None:
        return saturated
    subcooled = np.abs(t - saturation_temperatures(p_c)) > SATURATION_TOLERANCE
    enthalpy = saturated.copy()
    if subcooled.any():
        enthalpy[subcooled] = properties_pT(p_c[subcooled], t[subcooled], ("enthalpy",)).enthalpy
    return enthalpy


def _stage(pressure, enthalpy_in, flow_in, size):
    """One adiabatic flash: its fraction, flash and residual flows, the residual's enthalpy and
    density, and the saturated liquid and vapour densities and vapour enthalpy at its pressure."""
    liquid, vapour = saturated_pair(pressure, ("enthalpy", "density"))
    flashes = enthalpy_in > liquid.enthalpy
    fraction = np.where(flashes, flash_fraction(enthalpy_in, liquid.enthalpy, vapour.enthalpy), 0.0)
    steam_flow = flow_in * fraction
    residual_h, residual_rho = liquid.enthalpy.copy(), liquid.density.copy()
    below = ~flashes
    if below.any():
        # Condensate below saturation at the flash pressure stays liquid at its own enthalpy.
        state = states_ph(pressure[below], enthalpy_in[below])
        residual_h[below] = enthalpy_in[below]
        residual_rho[below] = properties_pT(pressure[below], state.temperature, ("density",)).density
    return {"fraction": fraction, "steam_flow": steam_flow, "residual_flow": flow_in - steam_flow,
            "residual_enthalpy": residual_h, "residual_density": residual_rho, "liquid_density": liquid.density,
            "vapour_density": vapour.density, "vapour_enthalpy": vapour.enthalpy}


def _results(inputs, site, x, stage_pressures, size):
    flow = x["condensate_flow"]
    enthalpy, stage_flow = _inlet_enthalpy(x, size), flow
    stages = []
    for pressure in stage_pressures:
        stage = _stage(pressure, enthalpy, stage_flow, size)
        stages.append(stage)
        enthalpy, stage_flow = stage["residual_enthalpy"], stage["residual_flow"]
    # Summed in the same order and units as calculate(), so that each sample gives its very numbers.
    total_flash = sum(s["steam_flow"] for s in stages)
    results = {"flash_fraction": total_flash / flow, "flash_steam_flow": sum(s["steam_flow"] * 3600 for s in stages)}
    heat = _recovered_heat(inputs, site, x, stages, total_flash)
    if heat is not None:
        results["recovered_heat_rate"] = heat / 1e3
        if not missing_site_data(site, ("operating_hours", "boiler_efficiency", "fuel_price")):
            fuel = annual_fuel_energy(heat, site.operating_hours, site.boiler_efficiency)
            results["annual_cost_saving"] = fuel * site.fuel_price.per_mwh
    results["vessel_diameter"] = _vessel_diameter(inputs, x, stages, size)
    return results


def _recovered_heat(inputs, site, x, stages, total_flash):
    """Heat of the flash steam the users take above make-up water, W (None without a make-up temperature)."""
    if site.makeup_water_temperature is None:
        return None
    makeup = SteamState.from_pT(max(site.atmospheric_pressure, 1.01325e5), site.makeup_water_temperature)
    heat = sum(s["steam_flow"] * (s["vapour_enthalpy"] - makeup.enthalpy) for s in stages)
    demand = x["lp_demand"]
    if inputs.vented or demand is None:
        return heat
    excess = np.where(total_flash <= demand, 0.0, total_flash - demand)
    vents = excess > 0.0
    excess_heat = np.where(vents, heat * excess / np.where(vents, total_flash, 1.0), 0.0)
    return np.where(vents, heat - excess_heat, heat)


def _vessel_diameter(inputs, x, stages, size):
    """Largest stage's diameter, m: each the largest of vapour area, liquid hold-up and nozzles."""
    residence = x["residence_time"] if x["residence_time"] is not None else _full(DEFAULT_RESIDENCE_TIME, size)
    bores = [pipe_inner_diameter(getattr(inputs, name), field=f"vessel.{name}")
             for name in ("inlet_nozzle", "steam_nozzle", "condensate_nozzle") if getattr(inputs, name) is not None]
    biggest = np.zeros(size)
    for s in stages:
        if x["vapour_velocity"] is not None:
            allowed = x["vapour_velocity"]
        else:
            k = x["k_factor"] if x["k_factor"] is not None else DEFAULT_K_FACTOR
            # fluids.separator.v_Souders_Brown, over arrays: K·√((ρ_f − ρ_g)/ρ_g).
            allowed = k * np.sqrt((s["liquid_density"] - s["vapour_density"]) / s["vapour_density"])
        d_vapour = np.sqrt(4.0 * (s["steam_flow"] / s["vapour_density"]) / (np.pi * allowed))
        holdup = s["residual_flow"] / s["residual_density"] * residence
        d_holdup = (4.0 * holdup / (np.pi * MAX_HOLDUP_DEPTH_TO_DIAMETER)) ** (1.0 / 3.0)
        diameter = np.maximum(d_vapour, d_holdup)
        if bores:
            diameter = np.maximum(diameter, nozzle_minimum_diameter(bores))
        biggest = np.maximum(biggest, diameter)
    return biggest
