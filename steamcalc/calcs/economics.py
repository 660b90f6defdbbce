"""Yearly energy and money from a steady heat or power rate, with the site's data."""

from __future__ import annotations


def missing_site_data(site, keys):
    """The site keys among ``keys`` that the site file does not give."""
    return [k for k in keys if getattr(site, k) is None]


def annual_energy(rate, operating_hours):
    """Energy a year of a steady rate, MWh: E = P·t.

    Parameters
    ----------
    rate : float
        W.
    operating_hours : float
        h a year.

    Examples
    --------
    >>> annual_energy(100e3, 6000.0)
    600.0
    """
    return rate * operating_hours / 1e6


def annual_fuel_energy(heat_rate, operating_hours, boiler_efficiency):
    """Fuel energy a year that a steady heat rate stands for at the boiler, MWh.

    Parameters
    ----------
    heat_rate : float
        Heat delivered to (or saved from) the steam system, W.
    operating_hours : float
        Hours a year, h.
    boiler_efficiency : float
        Boiler efficiency on the fuel's heating value, 0 to 1.

    Notes
    -----
    :math:`E_{fuel} = \\dot Q \\, t / \\eta_{boiler}`.

    References
    ----------
    Common practice for steam-system savings estimates (fuel energy at the
    site's boiler efficiency).

    Examples
    --------
    >>> round(annual_fuel_energy(100e3, 6000.0, 0.86), 1)
    697.7
    """
    return annual_energy(heat_rate, operating_hours) / boiler_efficiency


def annual_value(energy_mwh, price):
    """Money a year for an energy a year at a price per MWh (same currency as the price).

    Examples
    --------
    >>> from steamcalc.site import Price
    >>> annual_value(697.7, Price(40.0, "EUR"))
    27908.0
    """
    return energy_mwh * price.per_mwh
