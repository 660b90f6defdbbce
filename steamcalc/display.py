"""Display units: records keep SI engineering units; reports and workbooks show the site's choice.

``"SI"`` shows the record's own units; ``"US"`` converts each value for display only
(°F, psia, lb/h, Btu/lb, ...). The JSON record is never converted.
"""

from __future__ import annotations

import copy

from .quantities import Q_

SYSTEMS = ("SI", "US")

#: Record unit → US customary display unit (pint names).
US_UNITS = {
    "degC": "degF", "bar": "psi", "kg/h": "lb/h", "kJ/kg": "Btu/lb", "kW": "Btu/h", "K": "delta_degF",
    "m/s": "ft/s", "m": "ft", "m**2": "ft**2", "kW/K": "Btu/(h*delta_degF)",
    "kW/(m**2*K)": "Btu/(h*ft**2*delta_degF)", "kJ/(kg*K)": "Btu/(lb*delta_degF)", "t": "short_ton",
    "kg/m**3": "lb/ft**3", "m**2*K/kW": "h*ft**2*delta_degF/Btu",
}
_LABELS = {"degF": "°F", "psi": "psia", "delta_degF": "°F (difference)", "Btu/(h*delta_degF)": "Btu/(h·°F)",
           "Btu/(h*ft**2*delta_degF)": "Btu/(h·ft²·°F)", "Btu/(lb*delta_degF)": "Btu/(lb·°F)", "ft**2": "ft²",
           "lb/ft**3": "lb/ft³", "short_ton": "short ton", "h*ft**2*delta_degF/Btu": "h·ft²·°F/Btu"}


def convert(value, unit, system):
    """A value and unit in the display system: (value, unit). Non-numbers pass through.

    Examples
    --------
    >>> value, unit = convert(100.0, "degC", "US")
    >>> round(value, 6), unit
    (212.0, 'degF')
    >>> round(convert(10.0, "K", "US")[0], 6)
    18.0
    """
    if system == "SI" or unit not in US_UNITS or isinstance(value, bool) or not isinstance(value, (int, float)):
        return value, unit
    target = US_UNITS[unit]
    return float(Q_(value, unit).to(target).magnitude), target


#: Pressure units as stored in records and their display units.
#: ("Pa" is left out: results in Pa are momentum fluxes ρv², not pressures.)
_PRESSURE_UNITS = {"bar": "bar", "psi": "psi", "kPa": "kPa", "MPa": "MPa"}


def unit_label(unit, basis="absolute"):
    """A display unit as people write it; a pressure always carries its basis.

    Records hold absolute pressures (design §3.4), so a pressure unit reads ``bar(a)``
    (``psia``) unless ``basis`` is ``"difference"``, when it reads ``bar difference``.

    Examples
    --------
    >>> unit_label("bar"), unit_label("psi"), unit_label("bar", "difference")
    ('bar(a)', 'psia', 'bar difference')
    """
    if unit in _PRESSURE_UNITS:
        if basis == "difference":
            return f"{unit} difference"
        return "psia" if unit == "psi" else f"{unit}(a)"
    return _LABELS.get(unit, unit)


def pressure_basis(record, section, key):
    """``"difference"`` for a record entry that holds a pressure difference, else ``"absolute"``.

    Inputs are looked up by their field kind; results by the calculation's
    ``PRESSURE_DIFFERENCE_RESULTS``; tolerances are always differences.
    """
    if section == "tolerances":
        return "difference"
    from .calcs import get_calculation

    try:
        calc = get_calculation(record.get("kind"))
    except Exception:   # an unknown kind is reported elsewhere; here it only labels units
        return "absolute"
    if section == "inputs":
        from .calcs.base import input_fields

        kinds = {f.name: f.metadata["kind"] for f in input_fields(calc.Inputs)}
        return "difference" if kinds.get(key) == "pressure_difference" else "absolute"
    if section == "results" and key in getattr(calc, "PRESSURE_DIFFERENCE_RESULTS", ()):
        return "difference"
    return "absolute"


def display_record(record):
    """A copy of a record with inputs, results and steps in the record's display units."""
    system = record.get("site", {}).get("display_units", "SI")
    if system == "SI":
        return record
    shown = copy.deepcopy(record)
    for section in ("inputs", "results"):
        for entry in shown.get(section, {}).values():
            if "unit" in entry and not isinstance(entry["value"], list):
                entry["value"], entry["unit"] = convert(entry["value"], entry["unit"], system)
            elif isinstance(entry.get("value"), list):
                converted = [convert(v, entry["unit"], system) for v in entry["value"]]
                entry["value"] = [v for v, _ in converted]
                entry["unit"] = converted[0][1] if converted else entry["unit"]
    for step in shown.get("steps", []):
        value = step["value"]
        value["value"], value["unit"] = convert(value["value"], value.get("unit", ""), system)
    shown["display_note"] = ("Values shown in US customary units; the JSON record holds SI units. Equations and "
                             "substituted numbers are as computed, in SI.")
    return shown
