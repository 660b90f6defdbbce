"""Quantity strings at the edges: parsing, the site atmosphere and record units.

Inside a calculation every number is in one SI set: pressure in Pa (absolute),
temperature in K, temperature difference in K, mass flow in kg/s, specific
enthalpy in J/kg. Strings such as ``"16 bar(g)"`` are turned into those numbers
once, here, with pint; records store values in the engineering units of
:data:`RECORD_UNITS`, each with a unit string that pint can parse.
"""

from __future__ import annotations

import functools
import math
import re

import pint

from ..errors import UnitError

ureg = pint.UnitRegistry()
# A million Btu: the unit US plants buy fuel in (the Btu as pint defines it, the International Table Btu).
ureg.define("MMBtu = 1e6 * Btu")
# A line's pressure gradient as the trade states it: a pressure difference per 100 m of pipe (SI records), per
# 100 ft (US views). Units of their own, so that a gradient converts as one quantity, never as a pressure
# beside a length written in words.
ureg.define("bar_per_100m = bar / (100 * meter)")
ureg.define("psi_per_100ft = psi / (100 * foot)")
Q_ = ureg.Quantity

#: Standard atmosphere at sea level, Pa (ISO 2533:1975).
STANDARD_ATMOSPHERE = 101325.0

#: Quantity kinds that inputs and results can have: SI unit used inside
#: calculations, unit stored in records, and the pint dimensionality.
SI_UNITS = {
    "pressure": "Pa",
    "pressure_difference": "Pa",
    "temperature": "K",
    "temperature_difference": "K",
    "mass_flow": "kg/s",
    "specific_enthalpy": "J/kg",
    "specific_entropy": "J/(kg*K)",
    "power": "W",
    "length": "m",
    "velocity": "m/s",
    "area": "m**2",
    "flow_coefficient": "m**3/h",
    "specific_heat": "J/(kg*K)",
    "heat_transfer_coefficient": "W/(m**2*K)",
    "fouling_resistance": "m**2*K/W",
    "thermal_conductivity": "W/(m*K)",
    "volume_flow": "m**3/s",
    "density": "kg/m**3",
    "time": "s",
    "pressure_gradient": "Pa/m",
    "expansion_coefficient": "1/K",
    "dimensionless": "",
}

RECORD_UNITS = {
    "pressure": "bar",
    "pressure_difference": "bar",
    "temperature": "degC",
    "temperature_difference": "K",
    "mass_flow": "kg/h",
    "specific_enthalpy": "kJ/kg",
    "specific_entropy": "kJ/(kg*K)",
    "power": "kW",
    "length": "m",
    "velocity": "m/s",
    "area": "m**2",
    "flow_coefficient": "m**3/h",
    "specific_heat": "kJ/(kg*K)",
    "heat_transfer_coefficient": "kW/(m**2*K)",
    "fouling_resistance": "m**2*K/kW",
    "thermal_conductivity": "W/(m*K)",
    "volume_flow": "m**3/h",
    "density": "kg/m**3",
    "time": "min",
    "pressure_gradient": "bar_per_100m",
    "expansion_coefficient": "ppm/K",
    "dimensionless": "",
}

#: Stated bounds of a quantity given as input, in the SI unit of its kind: ``(smallest, largest)``
#: magnitude of a value that is not zero. They are far outside any steam plant (0.0036 kg/h to
#: 36 000 t/h of flow, say) and only stop a slip of the exponent from reaching a calculation; the
#: calculations and IAPWS-IF97 apply their own, tighter ranges.
QUANTITY_BOUNDS = {
    "pressure": (1.0, 1e9),
    "pressure_difference": (1e-3, 1e9),
    "temperature_difference": (1e-6, 1e3),
    "mass_flow": (1e-6, 1e4),
    "specific_enthalpy": (1e-3, 1e8),
    "specific_entropy": (1e-6, 1e6),
    "power": (1e-3, 1e10),
    "length": (1e-6, 1e5),
    "velocity": (1e-6, 1e3),
    "area": (1e-6, 1e6),
    "flow_coefficient": (1e-6, 1e6),
    "specific_heat": (1.0, 1e5),
    "heat_transfer_coefficient": (1e-3, 1e6),
    "fouling_resistance": (1e-9, 1.0),
    "thermal_conductivity": (1e-4, 1e3),
    "volume_flow": (1e-9, 1e3),
    "density": (1e-3, 1e5),
    "dimensionless": (1e-12, 1e6),
    "temperature": (1e-3, 1e4),
    "time": (1e-3, 1e7),
    # liquids' cubic expansion coefficients run from ~1e-4 (water near 20 °C) to ~2e-3 1/K (light solvents)
    "expansion_coefficient": (1e-7, 0.1),
}

#: Examples in error messages and placeholders, in the spelling people write (all of them are read).
_EXAMPLES = {
    "pressure": "'16 bar(g)' or '17 bar(a)'",
    "pressure_difference": "'0.3 bar'",
    "temperature": "'230 °C'",
    "temperature_difference": "'10 K'",
    "mass_flow": "'4.5 t/h' or '1.25 kg/s'",
    "length": "'180 m'",
    "dimensionless": "'10 %'",
    "velocity": "'0.07 m/s'",
    "flow_coefficient": "'40 m³/h'",
    "specific_heat": "'3.9 kJ/(kg·K)'",
    "heat_transfer_coefficient": "'1.8 kW/(m²·K)'",
    "fouling_resistance": "'0.1 m²·K/kW'",
    "thermal_conductivity": "'0.045 W/(m·K)'",
    "area": "'2.6 m²'",
    "volume_flow": "'12 m³/h'",
    "density": "'1030 kg/m³'",
    "time": "'1 min' or '60 s'",
    "expansion_coefficient": "'700 ppm/K'",
}

_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_SPLIT = re.compile(rf"^\s*({_NUMBER})\s*(.*?)\s*$")

#: Longest quantity string read; no real one comes near it.
MAX_QUANTITY_TEXT = 100
# A unit is names joined by '*', '/', '·' or spaces, with small whole exponents and brackets:
# enough for 'kJ/(kg*K)' or 'm^3/h', and nothing that pint would evaluate as arithmetic.
_UNIT_TOKEN = re.compile(r"\s*(?:(?P<name>[A-Za-z_°µ%][A-Za-z0-9_°µ]*)|(?P<power>(?:\^|\*\*)\s*-?[1-4](?![0-9]))"
                         r"|(?P<op>[*/·])|(?P<open>\()|(?P<close>\)))")

# Pressure units and their size in Pa. Each must be followed by its basis.
_PRESSURE_UNITS = {"bar": 1e5, "mbar": 100.0, "Pa": 1.0, "kPa": 1e3, "MPa": 1e6, "psi": 6894.757293168361}
# Basis written as a bare letter straight after the unit is accepted where the trade writes it so.
_LETTER_BASIS = {"bar", "mbar", "psi"}
_PRESSURE = re.compile(
    rf"^\s*(?P<number>{_NUMBER})\s*(?P<unit>mbar|bar|kPa|MPa|Pa|psi)\s*"
    r"(?:\((?P<paren>[aAgG])\)|(?P<letter>[aAgG]))?\s*$"
)


def standard_atmosphere_pressure(elevation):
    """Atmospheric pressure at an elevation, from the standard atmosphere.

    Parameters
    ----------
    elevation : float
        Elevation above mean sea level, m. Valid from -500 m to 11 000 m (the troposphere).

    Returns
    -------
    float
        Atmospheric pressure, Pa (absolute).

    Notes
    -----
    Troposphere of the standard atmosphere, with sea-level pressure
    :math:`p_0` = 101 325 Pa, temperature 288.15 K and lapse rate 0.0065 K/m:

    .. math:: p = p_0 \\left(1 - 2.25577\\times10^{-5}\\, z\\right)^{5.25588}

    References
    ----------
    ISO 2533:1975, Standard Atmosphere (troposphere, equation for pressure).

    Examples
    --------
    >>> round(standard_atmosphere_pressure(0.0))
    101325
    >>> round(standard_atmosphere_pressure(180.0) / 1e5, 4)
    0.9918
    """
    from ..errors import OutOfRangeError

    if not (-500.0 <= elevation <= 11000.0) or math.isnan(elevation):
        raise OutOfRangeError(
            "elevation outside the troposphere of the standard atmosphere",
            field="elevation", value=elevation, limits=(-500, 11000, "m"),
            fix="give atmospheric_pressure in the site file instead",
        )
    return STANDARD_ATMOSPHERE * (1.0 - 2.25577e-5 * elevation) ** 5.25588


def parse_pressure(text, field, atmospheric_pressure=STANDARD_ATMOSPHERE):
    """Parse a pressure string that states its basis; return absolute pressure.

    Parameters
    ----------
    text : str
        e.g. ``"16 bar(g)"``, ``"17 bara"``, ``"250 kPa(a)"``, ``"35 psig"``.
    field : str
        Name of the input, used in error messages.
    atmospheric_pressure : float
        Site atmospheric pressure, Pa (absolute), used for gauge values.

    Returns
    -------
    float
        Absolute pressure, Pa.

    Notes
    -----
    :math:`p_{abs} = p_{gauge} + p_{atm}`. A pressure without its basis is refused,
    because the two readings differ by about one bar.

    References
    ----------
    Common practice for pressure notation (bar(g), bar(a)).

    Examples
    --------
    >>> parse_pressure("16 bar(g)", "inlet_pressure")
    1701325.0
    >>> parse_pressure("2 bara", "outlet_pressure")
    200000.0
    """
    if not isinstance(text, str):
        raise UnitError(
            "a pressure needs a unit and its basis", field=field, value=text,
            fix=f"write it as a string, e.g. {_EXAMPLES['pressure']}",
        )
    match = _PRESSURE.match(text) if len(text) <= MAX_QUANTITY_TEXT else None
    if match is None:
        split = _SPLIT.match(text) if len(text) <= MAX_QUANTITY_TEXT else None
        unit = split.group(2) if split else ""
        if split and is_plain_unit(unit) and _is_dimension(unit, "[pressure]"):
            raise UnitError(
                f"pressure unit '{unit}' is not one steamcalc reads with a basis",
                field=field, value=text,
                fix="use bar(a), bar(g), bara, barg, kPa(a), kPa(g), MPa(a), MPa(g), psia or psig",
            )
        raise UnitError(
            f"'{text}' is not a pressure", field=field, value=text,
            fix=f"give a number, a unit and its basis, e.g. {_EXAMPLES['pressure']}",
        )
    unit = match.group("unit")
    basis = match.group("paren") or match.group("letter")
    if match.group("letter") and unit not in _LETTER_BASIS:
        basis = None
    if basis is None:
        raise UnitError(
            f"'{text}' does not say whether it is absolute or gauge",
            field=field, value=text,
            fix=f"write '{match.group('number')} {unit}(a)' for absolute or "
            f"'{match.group('number')} {unit}(g)' for gauge",
        )
    value = _finite_number(match.group("number"), text, field) * _PRESSURE_UNITS[unit]
    if basis.lower() == "g":
        value += atmospheric_pressure
    if value <= 0.0:
        raise UnitError(
            f"'{text}' is an absolute pressure of {value / 1e5:.5g} bar(a), at or below zero",
            field=field, value=text, fix="a vacuum is given as an absolute pressure above zero",
        )
    check_bounds(value, field, "pressure", text)
    return value


def is_plain_unit(unit):
    """True for a unit written as names, '*', '/', brackets and small whole exponents only.

    Such a unit is read by pint without evaluating any arithmetic: no numbers but exponents
    from 1 to 4, no chained powers.

    Examples
    --------
    >>> is_plain_unit("kJ/(kg*K)"), is_plain_unit("m^3/h"), is_plain_unit("")
    (True, True, True)
    >>> is_plain_unit("t/h*9**9**9"), is_plain_unit("h*1e6")
    (False, False)
    """
    if not isinstance(unit, str) or len(unit) > MAX_QUANTITY_TEXT:
        return False
    return _plain(unit)


@functools.lru_cache(maxsize=1024)
def _plain(unit):
    # A record names a handful of units hundreds of times: each spelling is read once per process.
    position, depth, previous = 0, 0, "start"
    while position < len(unit):
        if unit[position:].strip() == "":
            break
        match = _UNIT_TOKEN.match(unit, position)
        if match is None:
            return False
        kind = match.lastgroup
        if kind == "power" and previous not in ("name", "close"):
            return False
        if kind == "open":
            depth += 1
            if depth > 3:
                return False
        elif kind == "close":
            depth -= 1
            if depth < 0 or previous in ("op", "open", "start"):
                return False
        elif kind == "op" and previous in ("op", "open", "start"):
            return False
        position, previous = match.end(), kind
    return depth == 0 and previous not in ("op", "open")


def _finite_number(number_text, text, field):
    value = float(number_text)
    if not math.isfinite(value):
        raise UnitError(f"'{text}' is not a finite number", field=field, value=text,
                        fix="give an ordinary number, e.g. 4.5 or 1.2e3")
    return value


# Unit spellings people write, turned into what pint reads. Symbols glued together the way the
# trade writes them ("m2K", "kgK") are split; a slash is read as dividing by everything after it
# ("W/m²K" is W/(m²·K), as written on data sheets), where pint alone would read W·K/m².
_SUPERSCRIPTS = {"²": "^2", "³": "^3", "⁴": "^4", "·": "*", "⋅": "*", "×": "*"}
_WORDS = ((re.compile(r"(?:°\s*C|℃|\bdeg\.?\s+C\b|\bdegree_Celsius\b|\bcelsius\b)"), "degC"),
          (re.compile(r"(?:°\s*F|℉|\bdeg\.?\s+F\b|\bdegree_Fahrenheit\b|\bfahrenheit\b)"), "degF"))
_GLUED_EXPONENT = re.compile(r"(?<=[A-Za-z])([1-4])(?![0-9.])")
_EXPONENT_THEN_NAME = re.compile(r"(\^[1-4])(?=[A-Za-z°])")
_GLUED_KG = re.compile(r"\bkg(?=(?:K|degC|degF)\b)")
_NAME = re.compile(r"[A-Za-z_°µ%][A-Za-z0-9_°µ]*")
#: Names a unit library reads as something else than the trade means: C is the coulomb, F the farad.
_MISREAD = {"C": ("a coulomb", "°C (or degC)"), "F": ("a farad", "°F (or degF)")}
#: Names a unit library reads one way and engineers write meaning another.
_AMBIGUOUS = {name: ("a US short ton (907.2 kg, 9.3 % below a tonne) to a unit library, where a steam engineer "
                     "usually means a tonne", "t (the tonne)", "t")
              for name in ("ton", "tons")}


def unit_spelling(unit, field=None, text=None):
    """A unit as people write it, in the spelling pint reads; the one place spellings are mapped.

    Accepted: superscripts (``m³/h``, ``kW/(m²·K)``), glued exponents (``m3/h``, ``kW/m2K``),
    ``°C``/``℃``/``deg C`` for ``degC``, and a slash that divides by all that follows it
    (``W/m²K`` is W/(m²·K)). A bare ``C`` or ``F`` (the coulomb and the farad to pint) is refused
    with a fix, and so is ``ton`` (a US short ton to pint, where a steam engineer means a tonne). Inside a compound unit a temperature unit is a difference (``kJ/(kg·°C)``).

    Parameters
    ----------
    unit : str
        The unit part of a quantity string.
    field, text : str, optional
        The input and its whole text, for the error message.

    Returns
    -------
    str
        A unit string for pint.

    References
    ----------
    BIPM SI Brochure (9th ed., 2019), 5.4 (writing unit symbols; a solidus divides by what follows
    it, brackets where ambiguous); the glued spellings are common practice on data sheets.

    Examples
    --------
    >>> unit_spelling("m³/h"), unit_spelling("m3/h"), unit_spelling("kW/m2K")
    ('m^3/h', 'm^3/h', 'kW/(m^2*K)')
    >>> unit_spelling("W/m²K"), unit_spelling("kW/(m^2 K)"), unit_spelling("°C")
    ('W/(m^2*K)', 'kW/(m^2 K)', 'degC')
    >>> unit_spelling("kJ/kg°C"), unit_spelling("m²·K/kW")
    ('kJ/(kg*delta_degC)', 'm^2*K/kW')
    """
    for symbol, plain in _SUPERSCRIPTS.items():
        unit = unit.replace(symbol, plain)
    for pattern, name in _WORDS:
        unit = pattern.sub(name, unit)
    unit = _GLUED_EXPONENT.sub(r"^\1", unit)
    unit = _EXPONENT_THEN_NAME.sub(r"\1*", unit)
    unit = _GLUED_KG.sub("kg*", unit).strip()
    names = _NAME.findall(unit)
    for name in names:
        if name in _AMBIGUOUS:
            what, fix, replacement = _AMBIGUOUS[name]
            example = re.sub(rf'(?<![A-Za-z_]){name}(?![A-Za-z0-9_])', replacement, text) if text else ""
            raise UnitError(f"'{name}' is ambiguous: it is {what}", field=field,
                            value=text if text is not None else unit,
                            fix=f"write {fix}" + (f", e.g. '{example}'" if example else "")
                                + ", or short_ton or long_ton if that is what is meant")
        if name in _MISREAD:
            what, fix = _MISREAD[name]
            raise UnitError(f"'{name}' alone is {what} to a unit library, not a temperature unit", field=field,
                            value=text if text is not None else unit,
                            fix=f"write {fix}" + (f", e.g. '{re.sub(rf'(?<![A-Za-z_]){name}(?![A-Za-z0-9_])', fix.split()[0], text)}'"
                                                  if text else ""))
    if len(names) > 1:
        # A temperature inside a compound unit (kJ/(kg·°C), W/(m²·°C)) is a temperature difference.
        unit = re.sub(r"\bdeg([CF])\b", r"delta_deg\1", unit)
    if unit.count("/") == 1 and "(" not in unit:
        numerator, denominator = unit.split("/")
        factors = [f for f in re.split(r"[\s*]+", denominator.strip()) if f]
        if len(factors) > 1:
            unit = f"{numerator.strip()}/({'*'.join(factors)})"
    return unit


def _literal_split(text, field, example):
    # The one place a quantity string is split: a number, then a plain unit; no arithmetic.
    if len(text) > MAX_QUANTITY_TEXT:
        raise UnitError(f"the text is {len(text)} characters long; a quantity is a number and a unit",
                        field=field, value=text[:40] + "...", fix=f"e.g. {example}")
    split = _SPLIT.match(text)
    if split is None:
        raise UnitError(f"'{text}' is not a number followed by a unit", field=field, value=text,
                        fix=f"e.g. {example}")
    number, unit = _finite_number(split.group(1), text, field), split.group(2)
    if unit:
        spelt = unit_spelling(unit, field, text)
        unit = spelt if is_plain_unit(spelt) else unit
    if unit and not is_plain_unit(unit):
        raise UnitError(f"'{text}' is not a number followed by a unit (no arithmetic or powers of numbers)",
                        field=field, value=text, fix=f"write the value worked out, e.g. {example}")
    return number, unit, split.group(1)


def parse_amount(text, field, unit, example):
    """A number followed by a unit, converted to ``unit`` (for site data such as hours).

    Examples
    --------
    >>> parse_amount("0.202 kg/kWh", "fuel_emission_factor", "kg/MWh", "'202 kg/MWh'")
    202.0
    """
    if not isinstance(text, str):
        raise UnitError("needs a number and a unit, as text", field=field, value=text, fix=f"e.g. {example}")
    number, unit_text, _ = _literal_split(text, field, example)
    if not unit_text:
        raise UnitError(f"'{text}' has no unit", field=field, value=text, fix=f"e.g. {example}")
    try:
        value = Q_(number, unit_text).to(unit).magnitude
    except pint.DimensionalityError:
        raise UnitError(f"'{text}' is not in units of {unit}", field=field, value=text,
                        fix=f"e.g. {example}") from None
    except Exception:
        raise UnitError(f"unit '{unit_text}' is not known", field=field, value=text, fix=f"e.g. {example}") from None
    if not math.isfinite(value):
        raise UnitError(f"'{text}' is not a finite number", field=field, value=text, fix=f"e.g. {example}")
    return float(value)


def _is_dimension(unit_text, dimension):
    try:
        return Q_(1.0, unit_text).dimensionality == ureg.parse_expression(_DIM_PROBE[dimension]).dimensionality
    except Exception:
        return False


_DIM_PROBE = {"[pressure]": "Pa", "[temperature]": "K", "[mass_flow]": "kg/s", "[length]": "m"}
_OFFSET_UNITS = {"degC", "°C", "degF", "°F", "celsius", "fahrenheit", "degree_Celsius", "degree_Fahrenheit"}


def parse_quantity(text, field, kind):
    """Parse a quantity string of a known kind into the SI unit of :data:`SI_UNITS`.

    Parameters
    ----------
    text : str
        e.g. ``"230 degC"``, ``"10 K"``, ``"4.5 t/h"``.
    field : str
        Name of the input, used in error messages.
    kind : str
        One of ``temperature``, ``temperature_difference``, ``mass_flow``, ``length``
        (pressures go through :func:`parse_pressure`).

    Returns
    -------
    float
        The value in the SI unit of that kind (K, K, kg/s, m).

    References
    ----------
    Unit definitions of pint's default registry (SI, ISO 80000).

    Examples
    --------
    >>> parse_quantity("4.5 t/h", "mass_flow", "mass_flow")
    1.25
    >>> parse_quantity("230 degC", "inlet_temperature", "temperature")
    503.15
    """
    example = _EXAMPLES.get(kind, "")
    if not isinstance(text, str):
        raise UnitError(
            "a quantity needs a unit", field=field, value=text,
            fix=f"write it as a string with its unit, e.g. {example}",
        )
    number, unit, number_text = _literal_split(text, field, example)
    if not unit:
        raise UnitError(f"'{text}' has no unit", field=field, value=text, fix=f"e.g. {example}")
    if kind == "temperature_difference" and unit in _OFFSET_UNITS:
        raise UnitError(
            f"'{text}' is a temperature, but {field} is a temperature difference",
            field=field, value=text,
            fix=f"write '{number_text} K' (a difference of 1 °C is 1 K)" if "C" in unit else
            f"write it in kelvin, '{number * 5 / 9:.4g} K' (a difference of 1 °F is 5/9 K)",
        )
    try:
        _unit(unit)
    except Exception:
        raise UnitError(f"unit '{unit}' is not known", field=field, value=text, fix=f"e.g. {example}") from None
    si_unit = SI_UNITS[kind]
    try:
        value = convert(number, unit, si_unit)
    except pint.DimensionalityError:
        raise UnitError(
            f"'{text}' is not a {kind.replace('_', ' ')}", field=field, value=text,
            fix=f"give a {kind.replace('_', ' ')}, e.g. {example}",
        ) from None
    if not math.isfinite(value):
        raise UnitError(f"'{text}' is not a finite number", field=field, value=text, fix=f"e.g. {example}")
    if kind == "temperature" and value <= 0.0:
        raise UnitError(f"'{text}' is at or below absolute zero", field=field, value=text)
    check_bounds(value, field, kind, text)
    return float(value)


def check_bounds(value, field, kind, given=None):
    """Refuse a value (SI unit of its kind) outside :data:`QUANTITY_BOUNDS`; zero is left to the caller.

    Examples
    --------
    >>> check_bounds(1.25, "mass_flow", "mass_flow")
    >>> check_bounds(1e300, "mass_flow", "mass_flow")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    steamcalc.errors.OutOfRangeError: field 'mass_flow': ... Valid range: 0.0036 to 3.6e+07 kg/h. ...
    """
    from ..errors import OutOfRangeError

    bounds = QUANTITY_BOUNDS.get(kind)
    if bounds is None or value == 0.0:
        return
    low, high = bounds
    if not low <= abs(value) <= high:
        shown = [to_record_unit(b, kind) for b in bounds] if kind != "temperature" else [low, high]
        unit = {"temperature": "K", "pressure": "bar(a)", "pressure_difference": "bar difference"}.get(
            kind, RECORD_UNITS[kind])
        raise OutOfRangeError(
            f"{abs(value):g} {SI_UNITS[kind]}{'(a)' if kind == 'pressure' else ''} is outside the bounds steamcalc accepts for a "
            f"{kind.replace('_', ' ')}", field=field, value=given if given is not None else value,
            limits=(shown[0], shown[1], unit), fix="check the number and its unit")


def to_record_unit(value_si, kind):
    """Convert an SI value of a quantity kind to the unit stored in records.

    Examples
    --------
    >>> round(to_record_unit(1701325.0, "pressure"), 6)
    17.01325
    >>> round(to_record_unit(503.15, "temperature"), 6)
    230.0
    """
    if kind == "dimensionless":
        return float(value_si)
    return float(convert(value_si, SI_UNITS[kind], RECORD_UNITS[kind]))


def convert(value, unit, target):
    """``value`` in ``unit`` converted to ``target`` (unit names), as pint converts it, to the last bit.

    Between units without an offset pint multiplies by one conversion factor: that factor is found once per
    pair (pint's own, its conversion of 1.0) and the value multiplied by it here, which is pint's arithmetic
    without the Quantity made around it on every call. A temperature with an offset (degC, degF) goes through pint.

    Examples
    --------
    >>> convert(17.01325, "bar", "Pa"), convert(230.0, "degC", "K")
    (1701325.0, 503.15)
    """
    factor = _factor(unit, target)
    if factor is None:
        return Q_(value, _unit(unit)).to(_unit(target)).magnitude
    return value * factor


@functools.lru_cache(maxsize=1024)
def _factor(unit, target):
    """pint's factor from ``unit`` to ``target``; None when either has an offset."""
    if not (Q_(1.0, _unit(unit))._is_multiplicative and Q_(1.0, _unit(target))._is_multiplicative):
        return None
    return Q_(1.0, _unit(unit)).to(_unit(target)).magnitude


@functools.lru_cache(maxsize=1024)
def _unit(name):
    """A unit string parsed once (pint parses a string on every Quantity made from it; the Unit is the same)."""
    return ureg.Unit(name)


def from_record_unit(value, unit, kind):
    """Convert a record value with its unit string back to the SI unit of its kind.

    Examples
    --------
    >>> from_record_unit(230.0, "degC", "temperature")
    503.15
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise UnitError("a record value must be a finite number", field=kind, value=value)
    if kind == "dimensionless":
        return float(value)
    if not is_plain_unit(unit):
        raise UnitError("a record unit must be a plain unit name", field=kind, value=unit)
    try:
        return float(convert(value, unit, SI_UNITS[kind]))
    except Exception:
        raise UnitError(f"the record unit '{unit}' is not a unit of {kind.replace('_', ' ')}", field=kind,
                        value=unit) from None
