"""How values are shown to people: units as the trade writes them, numbers to sensible figures.

Records keep SI engineering units (design §3.4) and their code keys; everything a user reads —
reports, the workbook, the review, ``verify`` and ``diff`` — goes through the rules here, in one
place:

* units as people write them (``m³/h``, ``%``, ``°C``, ``kW/(m²·K)``, ``bar(a)``), never the
  unit library's spelling (``m**3/h``, ``percent``, ``degC``);
* numbers to figures chosen per quantity (a temperature to 0.1 K, a flow to four figures, money
  in whole units with thousands separators), fractions the trade states in % in %, yes/no for
  flags;
* the site's display system: ``"SI"`` shows the record's units; ``"US"`` converts for display only
  (°F, psia, lb/h, Btu/lb, Kv → Cv, DN → NPS), in tables, uncertainty bands, check details and
  the numbers substituted into the steps. The JSON record is never converted.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from ..units.formatting import (CV_PER_KV, SYSTEMS, US_UNITS,  # noqa: F401  (the rules, shown here)
                                 _group, format_number, format_quantity, unit_label)
from ..units.amounts import Amount, Phrase
from ..units.expressions import written_step
from ..units.quantities import convert as convert_units

def _calculation(record):
    from ..calcs import get_calculation

    try:
        return get_calculation(record.get("kind"))
    except Exception:   # an unknown kind is reported elsewhere; here it only labels units
        return None


def shown_in_percent(calc, key, label=""):
    """True for a plain fraction the trade states in % (a calculation's ``PERCENT_VALUES``).

    A key matches an entry exactly or by ending in ``_<entry>`` (``stage_2_flash_fraction``); a
    step (no key) matches by its label naming the entry ("Stall load, clean U").
    """
    names = getattr(calc, "PERCENT_VALUES", ())
    if type(names) is tuple and all(type(name) is str for name in names) and type(key) is str and \
            type(label) is str and len(label) <= 200:
        return _in_percent(names, key, label)   # the same question for each entry of each record of a kind
    return _in_percent.__wrapped__(names, key, label)


@lru_cache(maxsize=1024)
def _in_percent(names, key, label):
    if key:
        return any(key == name or key.endswith("_" + name) for name in names)
    text = str(label).lower()
    return any(words(name).lower().removesuffix(" fraction") in text for name in names)


def pressure_basis(record, section, key):
    """``"difference"`` for a record entry that holds a pressure difference, else ``"absolute"``.

    Inputs are looked up by their field kind; results by the calculation's
    ``PRESSURE_DIFFERENCE_RESULTS``; tolerances are always differences.
    """
    if section == "tolerances":
        return "difference"
    calc = _calculation(record)
    if calc is None:
        return "absolute"
    if section == "inputs":
        from ..calcs.base import input_fields

        kinds = {f.name: f.metadata["kind"] for f in input_fields(calc.Inputs)}
        return "difference" if kinds.get(key) == "pressure_difference" else "absolute"
    if section == "results" and key in getattr(calc, "PRESSURE_DIFFERENCE_RESULTS", ()):
        return "difference"
    return "absolute"


def _step_basis(step):
    # A step whose equation finds a pressure drop (Δp = ...) gives a difference, not a pressure.
    return "difference" if str(step.get("equation", "")).lstrip().startswith("Δp") else "absolute"


# --- US customary display ---------------------------------------------------------------------

#: DN designation → NPS (ASME B36.10M sizes; the metric and inch series share outside diameters).
_NPS_TEXT = {15: "½", 20: "¾", 25: "1", 32: "1¼", 40: "1½", 50: "2", 65: "2½", 80: "3", 90: "3½", 100: "4",
             125: "5", 150: "6", 200: "8", 250: "10", 300: "12", 350: "14", 400: "16", 450: "18", 500: "20",
             600: "24"}
_DN = re.compile(r"\bDN\s?(\d+)\b")
_NPS_TWICE = re.compile(r"(NPS [\d/½¾¼]+(?: × NPS [\d/½¾¼]+)*) \(NPS [\d/½¾¼]+(?: × NPS [\d/½¾¼]+)*\)")


def nps_text(text):
    """Every ``DN80`` in a text as ``NPS 3`` (US display).

    Examples
    --------
    >>> nps_text("Inlet line velocity (DN80); DN15 and DN999")
    'Inlet line velocity (NPS 3); NPS ½ and DN999'
    >>> nps_text("a valve NPS 3/4 × NPS 1 (DN20 × DN25) passes")
    'a valve NPS 3/4 × NPS 1 passes'
    """
    if not isinstance(text, str):
        return text
    if "DN" not in text and "(NPS" not in text:
        return text   # neither pattern can match (most texts): spares both substitutions
    text = _DN.sub(lambda m: f"NPS {_NPS_TEXT[int(m.group(1))]}" if int(m.group(1)) in _NPS_TEXT else m.group(0),
                   text)
    # A text that gives NPS sizes with their DN beside them in brackets says them once in US display.
    return _NPS_TWICE.sub(r"\1", text)


def _is_kv(key, label=""):
    return bool(re.search(r"(?:^|_)kv(?:_|$)", key or "")) or "Kv" in (label or "")


def convert(value, unit, system, key=None, label=""):
    """A value and unit in the display system: (value, unit). Non-numbers pass through.

    In ``"US"`` a flow coefficient (a key or label naming Kv) becomes a Cv, without unit.

    Examples
    --------
    >>> value, unit = convert(100.0, "degC", "US")
    >>> round(value, 6), unit
    (212.0, 'degF')
    >>> round(convert(10.0, "K", "US")[0], 6)
    18.0
    >>> value, unit = convert(10.0, "m**3/h", "US", key="valve_kv")
    >>> round(value, 3), unit
    (11.561, '')
    """
    if system == "SI" or isinstance(value, bool) or not isinstance(value, (int, float)):
        return value, unit
    if unit == "m**3/h" and _is_kv(key, label):
        return value * CV_PER_KV, ""
    if unit not in US_UNITS:
        return value, unit
    target = US_UNITS[unit]
    return float(convert_units(value, unit, target)), target


def us_label(label):
    """A label for US display: Kv named Cv, DN sizes as NPS, quantities in it in US units.

    Examples
    --------
    >>> us_label("Inlet line: smallest size under 45 m/s"), us_label("Rated Kv (Kvs)")
    ('Inlet line: smallest size under 148 ft/s', 'Rated Cv (Cvs)')
    """
    if not isinstance(label, str):
        return label
    label = us_text(label)
    return _KV_WORD.sub(r"Cv\1", label) if "Kv" in label else label


#: Units written in texts (steps, checks) and their pint names, longest first so that ``m`` never
#: takes the start of ``m/s``. A pressure keeps its basis: gauge stays gauge.
_TEXT_UNITS = [
    ("kJ/(kg·K)", "kJ/(kg*K)"), ("kW/(m²·K)", "kW/(m**2*K)"), ("m²·K/kW", "m**2*K/kW"), ("kg/(m² s)", "kg/(m**2*s)"),
    ("kg/(m²·s)", "kg/(m**2*s)"), ("bar difference per 100 m", "bar_per_100m"), ("bar difference", "bar~d"), ("kPa difference", "kPa~d"), ("bar(a)", "bar~a"),
    ("bar(g)", "bar~g"), ("kPa(a)", "kPa~a"), ("kPa(g)", "kPa~g"), ("kg/m³", "kg/m**3"), ("m³/s", "m**3/s"),
    ("m³/h", "m**3/h"), ("kJ/kg", "kJ/kg"), ("kg/h", "kg/h"), ("kg/s", "kg/s"), ("kW/K", "kW/K"),
    ("W/(m·K)", "W/(m*K)"), ("W/m", "W/m"), ("m/s", "m/s"),
    ("mm²", "mm**2"), ("m²", "m**2"), ("m³", "m**3"), ("°C", "degC"), ("kW", "kW"), ("mm", "mm"), ("m", "m"),
    ("K", "K"), ("N", "N"),
]
_NUM = r"-?(?:\d{1,3}(?:,\d{3})+|\d+)(?:\.\d+)?"
_TEXT_QUANTITY = re.compile(
    rf"(?<![\w.,^/+])(?P<chain>{_NUM}(?:(?:\s*[−→]\s*|\s+(?:and|to)\s+){_NUM})*)(?P<close>\)?)\s?(?P<unit>"
    + "|".join(re.escape(written) for written, _ in _TEXT_UNITS) + r")(?![\w²³(])")
_TEXT_PINT = dict(_TEXT_UNITS)
#: Equations with a constant for SI units (IEC 60534-2-1's N6, API 520's steam equation and reaction
#: force): their substitutions stay in SI, where the constant holds.
_SI_CONSTANT = re.compile(r"N6|\[[^\]]*(?:kg/h|kPa|mm²)[^\]]*\]|129\.41")
_US_PRESSURE = {"a": "psia", "g": "psig", "d": "psi difference"}


def _figures_of(number_text):
    digits = number_text.replace(",", "").replace("-", "").replace(".", "").lstrip("0")
    return max(len(digits), 2)


def _us_number(number_text, unit):
    """One number of a text converted to US units, to as many figures as it was written with."""
    value = float(number_text.replace(",", ""))
    if unit == "K" and value >= 200:
        shown, target = value * 1.8, "degR"   # an absolute temperature: kelvin to rankine
    else:
        shown, target = convert_units(value, unit, US_UNITS[unit]), US_UNITS[unit]
    if shown == 0:
        return number_text, target
    digits = _figures_of(number_text) - 1 - math.floor(math.log10(abs(shown)))
    text = f"{shown:.{max(digits, 0)}f}"
    return (_group(text) if "," in number_text or abs(shown) >= 1e4 else text), target


_CLAUSE = re.compile(r"(;\s*|,\s+)")
_KV_CHAIN = re.compile(rf"((?<![\w.,]){_NUM}(?:(?:\s+and\s+|\s*[−→]\s*){_NUM})*)\s?m³/h")
_KV_CHAIN_PARTS = re.compile(r"(\s+and\s+|\s*[−→]\s*)")
_KV_WORD = re.compile(r"\bKv(s?)\b")
_CHAIN_PARTS = re.compile(r"(\s*[−→]\s*|\s+(?:and|to)\s+)")
_DIGIT = re.compile(r"\d")


def _to_cv(match):
    # A chain of numbers in m³/h that are Kv values, as Cv values (no unit), each to the figures it was written with.
    parts = _KV_CHAIN_PARTS.split(match.group(1))
    for i in range(0, len(parts), 2):
        value = float(parts[i].replace(",", "")) * CV_PER_KV
        digits = _figures_of(parts[i]) - 1 - math.floor(math.log10(abs(value))) if value else 0
        parts[i] = f"{value:.{max(digits, 0)}f}"
    return "".join(parts)


def _flow_coefficients(clause):
    # In a clause naming a Kv, each number in m³/h is a Kv: it becomes a Cv (no unit) and Kv is named Cv.
    if "Kv" not in clause or "m³/h" not in clause:
        return clause
    return _KV_WORD.sub(r"Cv\1", _KV_CHAIN.sub(_to_cv, clause))


def _us_quantity(match):
    unit = _TEXT_PINT[match.group("unit")]
    pint_unit, _, basis = unit.partition("~")
    parts = _CHAIN_PARTS.split(match.group("chain"))
    target = None
    for i in range(0, len(parts), 2):
        parts[i], target = _us_number(parts[i], pint_unit)
    written = _US_PRESSURE[basis] if basis else unit_label(target)
    if target == "degR":
        written = "°R"
    return f"{''.join(parts)}{match.group('close')} {written}"


def us_text(text):
    """A step's substitution or a check's detail with its quantities in US customary units.

    Each number written with its unit is converted, to the figures it was written with; a chain
    such as ``(1546.3 − 349.2) kPa(a)`` or ``55.00→85.00 °C`` is converted number by number. A
    number written without a unit is left as it is; DN sizes read as NPS.

    Examples
    --------
    >>> us_text("h1 = h(16.99 bar(a), 230.00 °C)")
    'h1 = h(246.4 psia, 446.00 °F)'
    >>> us_text("x = (1546.3 − 349.2) kPa(a) / 1546.3 kPa(a)")
    'x = (224.27 − 50.65) psia / 224.27 psia'
    >>> us_text("T3 = 138.78 °C + 10.00 K in DN80")
    'T3 = 281.80 °F + 18.00 °F in NPS 3'
    >>> us_text("limit 0.5 bar difference per 100 m (common practice)")
    'limit 2.2 psi difference per 100 ft (common practice)'
    >>> us_text("Rated Kv in m³/h"), us_text("Rated Kv, in m³/h"), us_text("Outlet temperature")
    ('Rated Cv in m³/h', 'Rated Kv, in m³/h', 'Outlet temperature')
    """
    if not isinstance(text, str):
        return text
    kv = "Kv" in text and "m³/h" in text
    # Most labels hold no digit: no quantity, DN size or Kv value to convert, and (without a Kv in m³/h or an NPS
    # size written twice) nothing to rename.
    if not kv and "NPS" not in text and _DIGIT.search(text) is None:
        return text
    if kv:
        text = "".join(_flow_coefficients(part) for part in _CLAUSE.split(text))
    return nps_text(_TEXT_QUANTITY.sub(_us_quantity, text))


# --- the record as shown -----------------------------------------------------------------------

def _difference_inputs(calc):
    if calc is None:
        return set()
    from ..calcs.base import input_fields

    return {f.name for f in input_fields(calc.Inputs) if f.metadata["kind"] == "pressure_difference"}


def _input_labels(calc):
    if calc is None:
        return {}
    from ..calcs.base import input_fields

    return {f.name: f.metadata["label"] for f in input_fields(calc.Inputs)}


def words(key):
    """A code key in words for a sentence when no label is known: ``outlet_temperature`` → "outlet temperature".

    Examples
    --------
    >>> words("valve_kv"), words("annual_co2_avoided")
    ('valve Kv', 'annual CO₂ avoided')
    """
    trade = {"kv": "Kv", "cv": "Cv", "lmtd": "LMTD", "ua": "UA", "co2": "CO₂", "dn": "DN", "u": "U"}
    return " ".join(trade.get(word, word) for word in str(key).split("_"))


def _in_sentence(label):
    # Lower-case the first letter for use inside a sentence, unless it starts an acronym (xT, LMTD).
    label = str(label)
    return label if len(label) > 1 and label[1].isupper() else label[:1].lower() + label[1:]


_E_NOTATION = re.compile(r"(?<![\w.])(\d+(?:\.\d+)?)[eE]([+-]?)(\d+)(?![\w.])")
_E_HINT = re.compile(r"\d[eE]")   # what every e-notation number holds: a digit, then the e
_CO2 = re.compile(r"\bCO2\b")
_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _powers_of_ten(match):
    mantissa, sign, exponent = match.group(1), match.group(2), int(match.group(3))
    if float(mantissa) == 0:
        return "0"
    power = f"10{(('-' if sign == '-' else '') + str(exponent)).translate(_SUPERSCRIPT)}"
    return power if float(mantissa) == 1 else f"{mantissa} × {power}"


def trade_text(text):
    """Formulae and numbers as the trade writes them, in any text shown: CO₂, and a number in
    e-notation as a power of ten (``1.3e-15`` → 1.3 × 10⁻¹⁵, ``1e-03`` → 10⁻³, ``0.0e+00`` → 0).

    The record keeps its own text; this is display only.

    Examples
    --------
    >>> trade_text("CO2: residual 1.3e-15 (tolerance 1e-03), 0.0e+00, Re = 1.47e+06")
    'CO₂: residual 1.3 × 10⁻¹⁵ (tolerance 10⁻³), 0, Re = 1.47 × 10⁶'
    """
    if not isinstance(text, str):
        return text
    # Most texts hold neither: the cheap tests spare them both substitutions (this runs for every label shown).
    if "CO2" in text:
        text = _CO2.sub("CO₂", text)
    return _E_NOTATION.sub(_powers_of_ten, text) if _E_HINT.search(text) else text


def _show_entry(entry, key, calc, system, basis, label, equation="", trim=False):
    """Add ``shown`` (number text), ``shown_unit`` and ``label`` to an input or result entry."""
    value, unit = entry.get("value"), entry.get("unit", "")
    if isinstance(value, list):
        converted = [convert(v, unit, system, key, label) for v in value]
        values = [v for v, _ in converted]
        unit = converted[0][1] if converted else unit
        entry["shown"] = ", ".join(format_number(v, unit, trim) for v in values)
    else:
        number = type(value) is float or (isinstance(value, (int, float)) and not isinstance(value, bool))
        if number and unit == "" and shown_in_percent(calc, key, label):
            value, unit = value * 100.0, "percent"
        if system != "SI":
            value, unit = convert(value, unit, system, key, label)
            number = isinstance(value, (int, float)) and not isinstance(value, bool)
        shown = format_number(value, unit, trim)
        # A text value (a size, a drip leg "NPS 3, 700 mm deep", rows of a list) with its quantities in US units.
        entry["shown"] = us_text(shown) if system == "US" else shown
        if number:
            entry["value"] = value
    entry["unit"] = unit
    entry["shown_unit"] = unit_label(unit, basis)
    if unit == "dB" and "A-weighted" in f"{label} {equation}":
        entry["shown_unit"] = "dB(A)"
    shown_label = trade_text(label)
    entry["label"] = us_label(shown_label) if system == "US" else shown_label
    return entry


_DIFFERENCE_UNITS = {"degC": "K", "degF": "delta_degF"}


def _show_uncertainty(section, record, calc, system, labels):
    results = record.get("results", {})
    for key, band in section.get("bands", {}).items():
        unit = band.get("unit", "")
        scale = 100.0 if unit == "" and shown_in_percent(calc, key) else 1.0
        shown_unit = "percent" if scale != 1.0 else unit
        label = (results.get(key) or {}).get("label") or words(key)
        cells = {}
        for stat in ("nominal", "low", "p50", "high"):
            raw = band.get(stat, band.get({"low": "p05", "high": "p95"}.get(stat, stat)))
            value, display_unit = convert(raw * scale if isinstance(raw, (int, float)) else raw, shown_unit, system,
                                          key, label)
            cells[stat] = format_number(value, display_unit)
        band["shown"] = cells
        band["shown_unit"] = unit_label(display_unit, pressure_basis(record, "results", key))
        band["label"] = us_label(trade_text(label)) if system == "US" else trade_text(label)
        rows = [row for row in section.get("sensitivity", {}).get(key, []) if row.get("swing")][:2]
        band["sensitive_to"] = [_in_sentence(labels.get(row.get("input"), words(row.get("input")))) for row in rows]
        # A swing is a difference: of a temperature it is in K (°F of difference in US).
        swing_unit = _DIFFERENCE_UNITS.get(shown_unit, shown_unit)
        swings = [convert(row["swing"] * scale, swing_unit, system, key, label) for row in rows]
        band["sensitivity_shown"] = [
            f"{name} (swing {format_number(value, unit)} {unit_label(unit, 'difference')})".replace(" )", ")")
            for name, (value, unit) in zip(band["sensitive_to"], swings)]
    for key, tolerance in section.get("tolerances", {}).items():
        value, unit = convert(tolerance.get("value"), _DIFFERENCE_UNITS.get(tolerance.get("unit", ""),
                                                                         tolerance.get("unit", "")), system, key)
        tolerance["label"] = labels.get(key, words(key))
        tolerance["shown"] = format_number(value, unit)
        tolerance["shown_unit"] = unit_label(unit, "difference")
    coverage = section.get("coverage", 0.9)
    lines = []
    for key, band in section.get("bands", {}).items():
        cells, unit = band["shown"], band["shown_unit"]
        line = (f"{band['label']}: {cells['nominal']} {unit}, {coverage * 100:g} % coverage "
                f"interval {cells['low']} to {cells['high']} {unit}").replace("  ", " ").replace(" ,", ",")
        if band["sensitive_to"]:
            line += f"; most sensitive to {band['sensitive_to'][0]}"
        lines.append(line)
    failed = section.get("failed_samples")
    if isinstance(failed, dict) and failed:
        samples, valid = section.get("samples", 0), section.get("valid_samples", 0)
        lines.append(f"{samples - valid} of {samples} samples gave no result: "
                     + "; ".join(f"{n} × {reason}" for reason, n in failed.items()))
    section["shown_summary"] = lines
    section["coverage_shown"] = f"{coverage * 100:g}"


def _copied_entries(table):
    """A table of entries (inputs, results, bands, tolerances) whose entries the display writes into: each entry a
    new dict, its values shared (the display replaces them, never changes them in place)."""
    if not isinstance(table, dict):
        return table
    return {key: dict(entry) if isinstance(entry, dict) else entry for key, entry in table.items()}


def _shown_copy(record):
    """The record's sections as :func:`display_record` writes into them: new dicts for what it writes (each input,
    result, step with its value, check, and the uncertainty section with its bands and tolerances); everything it
    only reads (provenance, cautions, references, figures, operands, signatures) shared with the record, unchanged."""
    shown = dict(record)
    for section in ("inputs", "results"):
        if section in shown:
            shown[section] = _copied_entries(shown[section])
    if isinstance(shown.get("steps"), list):
        shown["steps"] = [_shown_step(step) for step in shown["steps"]]
    if isinstance(shown.get("checks"), list):
        shown["checks"] = [dict(check) if isinstance(check, dict) else check for check in shown["checks"]]
    if isinstance(shown.get("uncertainty"), dict):
        section = shown["uncertainty"] = dict(shown["uncertainty"])
        for part in ("bands", "tolerances"):
            if part in section:
                section[part] = _copied_entries(section[part])
    return shown


def _shown_step(step):
    if not isinstance(step, dict):
        return step
    step = dict(step)
    if isinstance(step.get("value"), dict):
        step["value"] = dict(step["value"])
    return step


def display_record(record):
    """A copy of a record with every value ready to show: label, number text, unit text.

    The copy has tables of its own where the display writes (inputs, results, steps, checks, the
    uncertainty bands and tolerances); what it only reads (figure data, operands, provenance,
    cautions) it shares with the record: treat the copy as read-only, as every view does.

    Each input and result gains ``label`` (the trade's words), ``shown`` (the number to the
    figures its quantity calls for; fractions the trade states in % in %; yes/no) and
    ``shown_unit`` (the unit as people write it, pressures with their basis). Steps gain
    ``shown``/``shown_unit``; the uncertainty section gains shown bands, labelled tolerances and
    its summary in words. In the US system values, steps' substituted numbers and checks' details
    are converted; the JSON record is never changed.
    """
    system = record.get("site", {}).get("display_units", "SI")
    system = system if system in SYSTEMS else "SI"
    calc = _calculation(record)
    labels = _input_labels(calc)
    # New dicts only where the display writes; what it only reads (figure data, operands, provenance) is shared.
    shown = _shown_copy(record)
    differences = {"inputs": _difference_inputs(calc),
                   "results": set(getattr(calc, "PRESSURE_DIFFERENCE_RESULTS", ()))}
    for section in ("inputs", "results"):
        for key, entry in shown.get(section, {}).items():
            if not isinstance(entry, dict):
                continue
            label = entry.get("label") or labels.get(key) or words(key)
            basis = "difference" if key in differences[section] else "absolute"
            _show_entry(entry, key, calc, system, basis, label, trim=section == "inputs")
    for step in shown.get("steps", []):
        if not isinstance(step, dict):
            continue
        value = step.get("value") if isinstance(step.get("value"), dict) else {"value": step.get("value"), "unit": ""}
        label = step.get("label", "")
        if "expression" in step:
            _show_worked_step(step, value, calc, system, label)
            continue
        # A step whose equation holds a constant for SI units is shown wholly in SI, where it holds.
        si_only = system == "US" and bool(_SI_CONSTANT.search(str(step.get("equation", ""))))
        step_system = "SI" if si_only else system
        _show_entry(value, "", calc, step_system, _step_basis(step), label, step.get("equation", ""))
        step["value"] = value
        step["label"] = value["label"]
        if si_only:
            step["substituted"] = f"{step.get('substituted', '')} (in SI: the equation's constant is for SI units)"
        elif system == "US":
            step["substituted"] = us_text(step.get("substituted", ""))
        step["substituted"] = trade_text(step.get("substituted", ""))
    for check in shown.get("checks", []):
        if not isinstance(check, dict):
            continue
        check["name"] = trade_text(us_label(check.get("name")) if system == "US" else check.get("name"))
        # A notice is a statement, never shown as a pass.
        check["shown_status"] = "notice" if check.get("kind") == "notice" else check.get("status")
        if isinstance(check.get("phrase"), dict) and system == "US":
            check["detail"] = trade_text(nps_text(Phrase.from_record(check["phrase"]).text(system)))
        elif isinstance(check.get("phrase"), dict):
            check["detail"] = trade_text(check.get("detail"))   # the record's own SI writing of its phrase
        else:
            check["detail"] = trade_text(us_text(check.get("detail")) if system == "US" else check.get("detail"))
    shown["assumptions"] = [trade_text(us_text(a) if system == "US" else a) for a in shown.get("assumptions", [])]
    if isinstance(shown.get("uncertainty"), dict):
        _show_uncertainty(shown["uncertainty"], record, calc, system, labels)
    atmosphere = record.get("site", {}).get("atmospheric_pressure", {})
    shown["atmosphere_shown"] = format_quantity(*convert(atmosphere.get("value"), atmosphere.get("unit", "bar"),
                                                         system))
    if system == "US":
        if all(isinstance(step, dict) and "expression" in step for step in record.get("steps", [])):
            shown["display_note"] = ("Values shown in US customary units (Kv as Cv, DN sizes as NPS); the JSON "
                                     "record holds SI units. Each step is written from its operands in US units; "
                                     "a step whose equation holds a constant for other units is written in those "
                                     "units and says so.")
        else:
            shown["display_note"] = ("Values shown in US customary units (Kv as Cv, DN sizes as NPS); the JSON "
                                     "record holds SI units. In the steps, each number written with its unit is "
                                     "converted; a number written without one (a constant of an equation in SI "
                                     "units) is as computed, in SI.")
    return shown


def _show_worked_step(step, value, calc, system, label):
    """A step kept as expression and operands: its substitution written afresh in the display units.

    Its value is shown in the units its substitution is written in, so the page's arithmetic holds;
    an equation whose constant holds only in its own units stays in them, and says so in US display.
    """
    fixed = bool(step.get("units_fixed"))
    step_system = "SI" if fixed else system
    equation = str(step.get("equation", ""))
    if step_system == "SI" and isinstance(step.get("substituted"), str):
        written = step["substituted"]   # the record's own SI writing, which verify holds to its operands
    else:
        operands = {symbol: Amount.from_record(entry) for symbol, entry in step["operands"].items()}
        number = isinstance(value.get("value"), (int, float)) and not isinstance(value.get("value"), bool)
        target = Amount(value["value"], value.get("unit", ""), role=value.get("role", "")) if number else None
        written = written_step(equation, step["expression"], operands, target, step_system, fixed)
    if fixed and system == "US":
        written += " (in the units shown: the equation's constant is for them)"
    basis = "difference" if value.get("basis") == "difference" else _step_basis(step)
    _show_entry(value, "kv" if value.get("role") == "flow_coefficient" else "", calc, step_system, basis, label,
                equation)
    step["value"] = value
    step["label"] = value["label"]
    step["substituted"] = trade_text(written)


# --- the verify table ---------------------------------------------------------------------------

_BAND_STATISTICS = {"p05": "5th percentile", "p50": "median", "p95": "95th percentile", "low": "low end",
                    "high": "high end", "nominal": "nominal"}


def result_label(record, key):
    """The words for a result key of a record (its label), also for ``uncertainty.<key>.<statistic>``."""
    results = (record or {}).get("results", {})
    if key.startswith("uncertainty."):
        _, _, rest = key.partition(".")
        name, _, statistic = rest.rpartition(".")
        base = (results.get(name) or {}).get("label") or words(name)
        return trade_text(f"{base}, band {_BAND_STATISTICS.get(statistic, statistic)}")
    return trade_text((results.get(key) or {}).get("label") or words(key))


def _verify_cell(value):
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return f"{value:.8g}"
    return "-" if value is None else str(value)


#: Widest result label in the verify table; a longer one is cut (the key column names the result in full).
_VERIFY_LABEL_WIDTH = 48


def verify_table(comparisons, record=None, relative_tolerance=1e-6, absolute_tolerance=1e-9):
    """The per-result table of a verification, as text: the result in words, the recorded and
    recomputed values (as the JSON holds them, to 8 figures), the unit as people write it, the
    differences, the verdict and, last, the record's key.

    Examples
    --------
    >>> from types import SimpleNamespace as C
    >>> row = C(key="outlet_temperature", recorded=148.778, recomputed=148.778, unit="degC", abs_diff=0.0,
    ...         rel_diff=0.0, verdict="same")
    >>> print(verify_table([row], {"kind": "letdown", "results": {"outlet_temperature": {"label": "Outlet temperature"}}}))
    ... # doctest: +NORMALIZE_WHITESPACE
      result              recorded recomputed unit abs. diff rel. diff tolerance verdict key
      Outlet temperature   148.778    148.778 °C     0.0e+00   0.0e+00     1e-06 same    outlet_temperature
      (tolerance: relative 1e-06, or 1e-09 absolute near zero)
    """
    rows = []
    for c in comparisons:
        name = c.key.split(".")[1] if c.key.startswith("uncertainty.") else c.key
        basis = pressure_basis(record, "results", name) if record else "absolute"
        label = result_label(record, c.key)
        label = label if len(label) <= _VERIFY_LABEL_WIDTH else label[:_VERIFY_LABEL_WIDTH - 1] + "…"
        rows.append((label, _verify_cell(c.recorded), _verify_cell(c.recomputed),
                     unit_label(c.unit or "", basis), "" if c.abs_diff is None else f"{c.abs_diff:.1e}",
                     "" if c.rel_diff is None else f"{c.rel_diff:.1e}",
                     f"{relative_tolerance:.0e}" if c.abs_diff is not None else "exact", c.verdict, c.key))
    head = ("result", "recorded", "recomputed", "unit", "abs. diff", "rel. diff", "tolerance", "verdict", "key")
    widths = [max([len(head[i])] + [len(r[i]) for r in rows]) for i in range(len(head))]
    right = {1, 2, 4, 5, 6}

    def line(cells):
        return "  " + "  ".join(cell.rjust(w) if i in right else cell.ljust(w)
                                for i, (cell, w) in enumerate(zip(cells, widths))).rstrip()

    lines = [line(head)] + [line(r) for r in rows]
    lines.append(f"  (tolerance: relative {relative_tolerance:.0e}, or {absolute_tolerance:.0e} absolute near zero)")
    return "\n".join(lines)


# --- helpers for views that draw outside the record's own pages (workbook tables, run output, verify) ------

#: Units as tables and headings write them that :data:`_TEXT_UNITS` does not list, and their pint names.
_WRITTEN_EXTRA = {"%": "percent", "dB(A)": "dB", "°F": "degF", "psia": "psi~a", "psig": "psi~g",
                  "psi difference": "psi~d", "kJ/(kg·K)": "kJ/(kg*K)", "psi difference per 100 ft": "psi_per_100ft"}
_BASIS_WORDS = {"a": "absolute", "g": "gauge", "d": "difference"}


def written_unit(text):
    """The pint unit and pressure basis of a unit as people write it, or None for a writing not known.

    Examples
    --------
    >>> written_unit("bar(a)"), written_unit("bar difference"), written_unit("m³/h"), written_unit("%")
    (('bar', 'absolute'), ('bar', 'difference'), ('m**3/h', 'absolute'), ('percent', 'absolute'))
    >>> written_unit("furlongs") is None
    True
    """
    name = _TEXT_PINT.get(str(text).strip()) or _WRITTEN_EXTRA.get(str(text).strip())
    if name is None:
        return None
    unit, _, basis = name.partition("~")
    return unit, _BASIS_WORDS.get(basis, "absolute")


def shown_check(check, system="SI"):
    """A record's check as every view writes it: ``(name, detail)`` in the display system.

    The same writing as :func:`display_record` gives its checks: a check kept as a phrase is written
    afresh from its amounts in US units; an older text detail has its quantities converted.

    Examples
    --------
    >>> check = {"name": "Inlet line velocity (DN80)", "detail": "44.7 m/s exceeds 45 m/s"}
    >>> shown_check(check, "US")
    ('Inlet line velocity (NPS 3)', '147 ft/s exceeds 148 ft/s')
    """
    name, detail = check.get("name"), check.get("detail")
    if system != "US":
        return trade_text(name), trade_text(detail)
    if isinstance(check.get("phrase"), dict):
        detail = nps_text(Phrase.from_record(check["phrase"]).text(system))   # a size in it (DN80) as NPS 3
    else:
        detail = us_text(detail)
    return trade_text(us_label(name)), trade_text(detail)


def record_system(record):
    """The display system a record is shown in: its site's ``display_units`` (``"SI"`` unless ``"US"``)."""
    system = (record or {}).get("site", {}).get("display_units", "SI")
    return system if system in SYSTEMS else "SI"


def _difference_scale(unit, system, key, label):
    """Display units per record unit of a difference (°C → °F: 1.8; Kv → Cv: 1.156)."""
    zero, _ = convert(0.0, unit, system, key, label)
    one, _ = convert(1.0, unit, system, key, label)
    return one - zero


def comparisons_shown(comparisons, record):
    """A verification's comparisons and its record as the verify table shows them: in the record's
    display system (US: values, units and differences converted by pint, labels with NPS sizes; a flow
    coefficient stays the Kv the record holds, beside the Cv the record gives as a result of its own).

    Returns ``(comparisons, record)``; in SI both are returned as they are. The relative differences
    and the verdicts are the comparison's own (a unit change does not alter them).

    Examples
    --------
    >>> from types import SimpleNamespace as C
    >>> record = {"kind": "letdown", "site": {"display_units": "US"},
    ...           "results": {"inlet_temperature": {"label": "Inlet temperature"}}}
    >>> row = C(key="inlet_temperature", recorded=398.88889, recomputed=398.88889, unit="degC", abs_diff=1e-5,
    ...         rel_diff=2.5e-8, verdict="same")
    >>> (shown,), _ = comparisons_shown([row], record)
    >>> f"{shown.recorded:.8g}", shown.unit, f"{shown.abs_diff:.1e}"
    ('750', 'degF', '1.8e-05')
    """
    import copy

    system = record_system(record)
    if system == "SI" or record is None:
        return comparisons, record

    def label_of(key, entry):
        label = trade_text(entry.get("label") or words(key))
        # A flow coefficient stays a Kv here: the record holds its Cv as a result of its own, and two rows
        # called Cv whose figures differ in the fourth place (the record's factor and pint's) would mislead.
        return nps_text(us_text(label)) if _is_kv(key, label) else us_label(label)

    results = {key: dict(entry, label=label_of(key, entry)) if isinstance(entry, dict) else entry
               for key, entry in record.get("results", {}).items()}
    shown_record = dict(record, results=results)
    shown = []
    for c in comparisons:
        name = c.key.split(".")[1] if c.key.startswith("uncertainty.") else c.key
        label = (record.get("results", {}).get(name) or {}).get("label", "") if isinstance(
            record.get("results", {}).get(name), dict) else ""
        row = copy.copy(c)
        unit = c.unit or ""
        if _is_kv(name, label):
            shown.append(row)
            continue

        def one(value):
            if isinstance(value, list):
                return [convert(v, unit, system, name, label)[0] for v in value]
            if isinstance(value, str):
                return nps_text(value)   # a size (DN50) as the US record reads it
            return convert(value, unit, system, name, label)[0]

        row.recorded, row.recomputed = one(c.recorded), one(c.recomputed)
        row.unit = convert(1.0, unit, system, name, label)[1]
        if isinstance(c.abs_diff, (int, float)) and not isinstance(c.abs_diff, bool):
            row.abs_diff = abs(c.abs_diff * _difference_scale(unit, system, name, label))
        shown.append(row)
    return shown, shown_record
