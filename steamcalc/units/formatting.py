"""How a number with its unit is written for people: the unit as the trade writes it, the figures per quantity.

These are the rules every view uses (:mod:`steamcalc.render.display` builds on them); they sit with the
units so that a layer below the views (the uncertainty summary) writes numbers the same way.
"""

from __future__ import annotations

import functools
import math
import re

from .quantities import Q_

SYSTEMS = ("SI", "US")

#: Record unit → US customary display unit (pint names).
US_UNITS = {
    "degC": "degF", "bar": "psi", "kPa": "psi", "kg/h": "lb/h", "kg/s": "lb/s", "kJ/kg": "Btu/lb", "kW": "Btu/h",
    "K": "delta_degF", "m/s": "ft/s", "m": "ft", "mm": "inch", "m**2": "ft**2", "mm**2": "inch**2", "m**3": "ft**3",
    "kW/K": "Btu/(h*delta_degF)", "kW/(m**2*K)": "Btu/(h*ft**2*delta_degF)", "kJ/(kg*K)": "Btu/(lb*delta_degF)",
    "t": "short_ton", "kg/m**3": "lb/ft**3", "m**2*K/kW": "h*ft**2*delta_degF/Btu", "m**3/h": "gallon/minute",
    "m**3/s": "ft**3/s", "N": "lbf", "kg/(m**2*s)": "lb/(ft**2*s)", "Pa": "lb/(ft*s**2)",
    "W/m": "Btu/(h*ft)", "W/(m*K)": "Btu/(h*ft*delta_degF)", "MWh": "MMBtu", "bar_per_100m": "psi_per_100ft",
    "ppm/K": "ppm/delta_degF",
}

#: A unit as people write it, for units whose written form is not the pint name made typographic.
_UNIT_WORDS = {
    "degC": "°C", "degF": "°F", "delta_degC": "K", "delta_degF": "°F", "percent": "%", "dimensionless": "",
    "gallon/minute": "US gpm", "inch": "in", "inch**2": "in²", "short_ton": "short ton", "lbf": "lbf",
    "Btu/(h*delta_degF)": "Btu/(h·°F)", "Btu/(h*ft**2*delta_degF)": "Btu/(h·ft²·°F)",
    "Btu/(lb*delta_degF)": "Btu/(lb·°F)", "h*ft**2*delta_degF/Btu": "h·ft²·°F/Btu", "lb/(ft*s**2)": "lb/(ft·s²)",
    "kg/(m**2*s)": "kg/(m²·s)", "lb/(ft**2*s)": "lb/(ft²·s)", "Btu/(h*ft)": "Btu/(h·ft)",
    "Btu/(h*ft*delta_degF)": "Btu/(h·ft·°F)", "ppm/delta_degF": "ppm/°F",
    # A line's pressure gradient: a pressure difference per length of pipe, so it carries the difference basis.
    "bar_per_100m": "bar difference per 100 m", "psi_per_100ft": "psi difference per 100 ft",
    # Every sound level steamcalc records is an A-weighted sound pressure level (IEC 60534-8-3's L_pAe; limits are
    # read only as dB(A)). pint has no A-weighting, so records keep "dB" and every view writes dB(A).
    "dB": "dB(A)",
}

#: Pressure units as stored in records (design §3.4: absolute) and their display units.
#: ("Pa" is left out: results in Pa are momentum fluxes ρv², not pressures.)
_PRESSURE_UNITS = {"bar": "bar", "psi": "psi", "kPa": "kPa", "MPa": "MPa"}

#: Kv → Cv: Cv = Kv × (m³/h in US gal/min) / √(bar in psi) = 1.156 Kv (IEC 60534-1, Kv = 0.865 Cv).
CV_PER_KV = float(Q_(1.0, "m**3/h").to("gallon/minute").magnitude / math.sqrt(Q_(1.0, "bar").to("psi").magnitude))


_CURRENCY = re.compile(r"[A-Z]{3}")


def _currency(unit):
    # The length first: nearly every unit is not three letters long, and this runs for every number shown.
    return isinstance(unit, str) and len(unit) == 3 and _CURRENCY.fullmatch(unit) is not None


def _unit_words(unit, basis):
    """The rule of :func:`unit_label`."""
    if unit is None:
        return ""
    if unit in _PRESSURE_UNITS:
        if basis == "difference":
            return f"{unit} difference"
        return "psia" if unit == "psi" else f"{unit}(a)"
    if unit in _UNIT_WORDS:
        return _UNIT_WORDS[unit]
    text = unit.replace("**2", "²").replace("**3", "³").replace("**4", "⁴").replace("^2", "²").replace("^3", "³")
    text = text.replace("degC", "°C").replace("degF", "°F").replace("*", "·")
    return text


# Every number shown asks for its unit's words, and a record has a few dozen units among hundreds of numbers.
_unit_words_of = functools.lru_cache(maxsize=512)(_unit_words)


def unit_label(unit, basis="absolute"):
    """A display unit as people write it; a pressure always carries its basis.

    Records hold absolute pressures (design §3.4), so a pressure unit reads ``bar(a)``
    (``psia``) unless ``basis`` is ``"difference"``, when it reads ``bar difference``.

    Examples
    --------
    >>> unit_label("bar"), unit_label("psi"), unit_label("bar", "difference")
    ('bar(a)', 'psia', 'bar difference')
    >>> unit_label("m**3/h"), unit_label("percent"), unit_label("kW/(m**2*K)"), unit_label("delta_degF")
    ('m³/h', '%', 'kW/(m²·K)', '°F')
    >>> unit_label("dB"), unit_label("bar_per_100m"), unit_label("psi_per_100ft")
    ('dB(A)', 'bar difference per 100 m', 'psi difference per 100 ft')
    """
    if type(unit) is str and type(basis) is str and len(unit) <= 64:
        return _unit_words_of(unit, basis)
    return _unit_words(unit, basis)


format_unit = unit_label


# --- numbers ---------------------------------------------------------------------------------

#: Figures per quantity, by display unit: ``("decimals", n)`` a fixed number of decimals,
#: ``("figures", n)`` significant figures. Numbers of 1000 and more are whole numbers with
#: thousands separators. Common practice for calculation records: temperatures to 0.1 K, sound
#: to 0.1 dB, areas of relief orifices in whole mm², money in whole units.
_FIGURES = {
    "degC": ("decimals", 1), "degF": ("decimals", 1), "K": ("decimals", 1), "delta_degF": ("decimals", 1),
    "delta_degC": ("decimals", 1), "dB": ("decimals", 1), "mm**2": ("decimals", 0), "inch**2": ("figures", 4),
    "percent": ("percent", 0),
}
DEFAULT_FIGURES = 4
_DEFAULT_RULE = ("figures", DEFAULT_FIGURES)


def _group(text):
    end = text.find(".")
    head = text if end < 0 else text[:end]
    # Most numbers have at most three figures before the point: nothing to group (a sign aside).
    if len(head) - head.startswith("-") <= 3 and not head.startswith("--"):
        return text
    whole, dot, decimals = text.partition(".")
    sign = "-" if whole.startswith("-") else ""
    whole = whole.lstrip("-")
    if len(whole) > 3:
        whole = f"{int(whole):,}"
    return f"{sign}{whole}{dot}{decimals}"


def format_number(value, unit="", trim=False):
    """A value as a report shows it, to the figures its quantity calls for.

    Parameters
    ----------
    value : float, int, bool, str or None
        The value, in the (display) unit ``unit``.
    unit : str
        Its unit (record or display spelling, pint names): it chooses the figures.
    trim : bool
        Drop trailing zeros (for inputs, shown with no more figures than the user gave).

    Examples
    --------
    >>> format_number(196.23456, "degC"), format_number(4500.0, "kg/h"), format_number(0.0738377)
    ('196.2', '4,500', '0.07384')
    >>> format_number(48882.24, "EUR"), format_number(7.38377, "percent"), format_number(True)
    ('48,882', '7.4', 'yes')
    >>> format_number(None), format_number(13909.65, "kg/h"), format_number(2.114, "bar")
    ('—', '13,910', '2.114')
    """
    if type(value) is float and type(unit) is str and len(unit) != 3 and math.isfinite(value) and value != 0:
        # Most numbers shown: the rules below for these cases, written out.
        rule = _FIGURES.get(unit)
        if rule is None:
            return _to_four_figures(value, trim)
        if rule[0] == "decimals":   # never the percent unit, whose rule is its own
            return _group(f"{value:.{rule[1]}f}")
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if not isinstance(value, (int, float)):
        return str(value)
    if not math.isfinite(value):
        return str(value)
    if value == 0:
        return "0"
    rule, n = _FIGURES.get(unit, _DEFAULT_RULE)
    if type(unit) is str and len(unit) != 3:
        pass   # not a currency (_currency's own first test, without its call: this runs for every number shown)
    elif _currency(unit):
        rule, n = "decimals", 0
    if rule == "percent":
        # 74.6 %, 7.4 %, 0.53 %: one decimal, two figures below 1 %, none from 100 %.
        rule, n = ("figures", 2) if abs(value) < 1 else ("decimals", 0 if abs(value) >= 100 else 1)
    if abs(value) >= 1000 and rule == "figures":
        rule, n = "decimals", 0
    if rule == "decimals":
        if n and float(value).is_integer() and unit == "percent":
            return _group(f"{value:.0f}")   # 10 %, not 10.0 %
        return _group(f"{value:.{n}f}")
    if abs(value) < 1e-3:
        return f"{value:.{max(n - 1, 1)}e}".replace("e-0", "e-")
    if float(value).is_integer():
        return _group(f"{value:.0f}")   # a whole number as typed (25 m, 63 m³/h), no invented zeros
    digits = n - 1 - math.floor(math.log10(abs(value)))
    text = f"{value:.{max(digits, 0)}f}"
    if trim and "." in text:
        text = text.rstrip("0").rstrip(".")
    return _group(text)


def _to_four_figures(value, trim):
    """:func:`format_number` of a finite, non-zero float in a unit with the default rule and no currency."""
    size = abs(value)
    if size >= 1000:
        return _group(f"{value:.0f}")
    if size < 1e-3:
        return f"{value:.{DEFAULT_FIGURES - 1}e}".replace("e-0", "e-")
    if value.is_integer():
        return f"{value:.0f}"   # under 1000: nothing to group
    digits = DEFAULT_FIGURES - 1 - math.floor(math.log10(size))
    text = f"{value:.{max(digits, 0)}f}"
    if trim and "." in text:
        text = text.rstrip("0").rstrip(".")
    return _group(text)


def format_quantity(value, unit, basis="absolute"):
    """``"148.8 °C"``: a value and its unit as people read them.

    Examples
    --------
    >>> format_quantity(148.7785, "degC"), format_quantity(0.5285, "bar", "difference")
    ('148.8 °C', '0.5285 bar difference')
    """
    return f"{format_number(value, unit)} {unit_label(unit, basis)}".strip()


# --- which values are fractions shown in % ---------------------------------------------------
