"""The flash fraction: the share of hot condensate that flashes to steam at a lower pressure."""

from __future__ import annotations

import numpy as np


def flash_fraction(inlet_enthalpy, liquid_enthalpy, vapour_enthalpy):
    """Mass fraction of condensate flashing to steam at a lower pressure (none when it is subcooled there).

    Parameters
    ----------
    inlet_enthalpy : float or array_like
        Specific enthalpy of the condensate arriving, J/kg.
    liquid_enthalpy, vapour_enthalpy : float or array_like
        Saturated liquid and vapour enthalpies h_f and h_g at the flash pressure, J/kg.

    Returns
    -------
    float or numpy.ndarray
        x = max(0, (h_in − h_f) / (h_g − h_f)), 0 to 1.

    Notes
    -----
    An adiabatic flash at constant enthalpy (steady-flow energy balance, no heat or work);
    x = (h_in − h_f)/h_fg, e.g. Rogers & Mayhew, *Engineering Thermodynamics*, throttling of a
    saturated liquid.

    Examples
    --------
    >>> round(float(flash_fraction(762.7e3, 561.4e3, 2725.9e3)), 4)   # IF97: 10 bar(a) to 3 bar(a)
    0.093
    >>> float(flash_fraction(400e3, 561.5e3, 2724.9e3))
    0.0
    """
    fraction = (np.asarray(inlet_enthalpy, dtype=float) - liquid_enthalpy) / (
        np.asarray(vapour_enthalpy, dtype=float) - liquid_enthalpy)
    fraction = np.maximum(0.0, fraction)
    return float(fraction) if fraction.ndim == 0 else fraction
