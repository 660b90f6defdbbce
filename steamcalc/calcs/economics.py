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
    >>> from steamcalc.cases.site import Price
    >>> annual_value(697.7, Price(40.0, "EUR"))
    27908.0
    """
    return energy_mwh * price.per_mwh


#: The two calorific-value bases a fuel's energy can be counted on.
FUEL_BASES = ("gross", "net")
#: Basis taken when the site file does not state one.
DEFAULT_FUEL_BASIS = "gross"
_BASIS_NAMES = {"gross": "gross calorific value (GCV, higher heating value)",
                "net": "net calorific value (NCV, lower heating value)"}


def fuel_basis(site):
    """The calorific-value basis a site's fuel figures are on: ``"gross"`` or ``"net"``.

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> fuel_basis(Site()), fuel_basis(Site(fuel_basis="net"))
    ('gross', 'net')
    """
    return site.fuel_basis or DEFAULT_FUEL_BASIS


def fuel_basis_assumption(site):
    """The one assumption line stating the energy basis of a site's fuel figures.

    Any calculation that turns heat into fuel energy, money or CO2 with the site's
    fuel price, boiler efficiency and emission factor adds this line to its record.

    Parameters
    ----------
    site : steamcalc.cases.site.Site

    Returns
    -------
    str

    Notes
    -----
    Fuel energy :math:`E = Q t / \\eta_{boiler}` is on the basis :math:`\\eta` is on; the price
    and emission factor must be per MWh on the same basis, or the cost and CO2 are out by
    the GCV/NCV ratio (about 1.11 for natural gas, 1.05–1.07 for oils).

    References
    ----------
    Common practice: gas is sold and billed on gross calorific value in most markets, while
    boiler efficiencies are often quoted on net; the figures must be put on one basis.
    The ratios: UK Government GHG Conversion Factors for Company Reporting 2023, Fuels, kg CO2
    per kWh on the net and on the gross calorific value: natural gas 0.20226/0.18256 = 1.108;
    fuel oil 0.28413/0.26709 = 1.064; gas oil 0.26978/0.25359 = 1.064; burning oil
    0.25849/0.24557 = 1.053.

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> fuel_basis_assumption(Site(fuel_basis="net"))[:60]
    'Fuel energy on the net calorific value (NCV, lower heating v'
    """
    basis = fuel_basis(site)
    stated = ("as the site file states" if site.fuel_basis else
              f"the default, as the site file does not state the fuel basis; write fuel_basis = \"{basis}\" "
              "(or \"net\") in the site file to confirm")
    return (f"Fuel energy on the {_BASIS_NAMES[basis]} basis, {stated}: the fuel price, the boiler efficiency "
            "and the emission factor are all read as per MWh of fuel on that basis; a figure quoted on the "
            "other basis must be converted first (natural gas GCV/NCV ≈ 1.11: the ratio of the UK government's "
            "greenhouse-gas conversion factors for natural gas per kWh of net and of gross calorific value)")


def annual_water_cost(mass_flow, density, operating_hours, water_cost):
    """Volume a year of water and its cost, for make-up water (and its treatment) avoided.

    Parameters
    ----------
    mass_flow : float
        Water kept in the system, kg/s.
    density : float
        Density of the make-up water, kg/m³.
    operating_hours : float
        h a year.
    water_cost : steamcalc.cases.site.WaterCost
        Cost per m³ of make-up water, treatment included.

    Returns
    -------
    tuple
        ``(volume, cost)``: m³ a year and money a year in the water cost's currency.

    Notes
    -----
    :math:`V = \\dot m \\, t / \\rho`, :math:`C = V c_w`.

    Examples
    --------
    >>> from steamcalc.cases.site import WaterCost
    >>> annual_water_cost(1.0, 1000.0, 1000.0, WaterCost(2.0, "EUR"))
    (3600.0, 7200.0)
    """
    volume = mass_flow * operating_hours * 3600.0 / density
    return volume, volume * water_cost.per_m3
