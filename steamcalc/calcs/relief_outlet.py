"""A relief valve's outlet pipe against the valve's outlet: the let-down's relief valve and the heater's reverse
tube-rupture valve hold the discharge pipe given against the smallest outlet API 526 pairs with the selected orifice.

A pipe narrower than the valve's outlet raises the built-up back pressure and the reaction force: a warning, as the
valve makers' installation instructions ask for the outlet size or larger (common practice).
"""

from __future__ import annotations

from ..equipment.piping import DN_TO_NPS, pipe_inner_diameter
from ..equipment.relief import API526_OUTLET_NPS


def valve_outlet_pipe(letter, size, schedule, field):
    """The relief valve's outlet pipe: its bore, its description, and whether it is narrower than the valve's outlet.

    Parameters
    ----------
    letter : str
        The selected API 526 orifice letter.
    size : str or None
        The discharge pipe's nominal size as given (None: the valve's own outlet is taken as the open discharge).
    schedule : str
        The pipe schedule of both bores.
    field : str
        The case-file key of ``size``, for a size that cannot be read.

    Returns
    -------
    tuple
        ``(inner diameter m, description, narrower)``.

    References
    ----------
    API 526 (orifice letters and valve sizes), the smallest outlet of each letter as tabulated in the Valve Selection
    Handbook, Table 5-1.

    Examples
    --------
    >>> valve_outlet_pipe("J", "DN65", "40", "overpressure.discharge_size")[2]
    True
    >>> valve_outlet_pipe("J", "DN80", "40", "overpressure.discharge_size")[2]
    False
    """
    nps = API526_OUTLET_NPS[letter]
    dn = next(d for d, n in DN_TO_NPS.items() if n == nps)
    outlet = (f"DN{dn} (the smallest outlet API 526 pairs with the {letter} orifice: its inlet × orifice × outlet sizes "
              "as tabulated in the Valve Selection Handbook, Table 5-1)")
    valve_outlet = pipe_inner_diameter(f"DN{dn}", schedule)
    if size is None:
        return valve_outlet, outlet, False
    diameter = pipe_inner_diameter(size, schedule, field=field)
    return diameter, f"{size} (given), on the valve's outlet {outlet}", diameter < valve_outlet * (1.0 - 1e-9)


def narrow_outlet_warning(result, name, described):
    """The warning for an outlet pipe narrower than the valve's outlet (``described`` by :func:`valve_outlet_pipe`)."""
    result.check(name, "warn",
                 f"the outlet pipe {described} is narrower than the valve's outlet: it raises the built-up back "
                 "pressure and the reaction force; run it at the outlet size or larger (common practice; the "
                 "valve maker's installation instructions govern)")
