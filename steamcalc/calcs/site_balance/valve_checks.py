"""Checks of a balance against the records it links: each linked let-down's valve at the balance's flow, and
each linked record's pressures against the site's headers.

A let-down record sizes its valve at its own flows; the balance sets the station's flow in each load case. The
valve is sized again at that flow by the let-down kind's own functions (:mod:`steamcalc.calcs.letdown.equipment`,
IEC 60534-2-1 for compressible flow), with the station's inlet steam, pressures, valve and inlet line as the
linked record states them (copied into the balance's inputs when the case is read, :mod:`.links`), and held
against the record's rated Kv and the one travel rule of every control valve here
(:func:`steamcalc.equipment.valve.travel_limits`).
"""

from __future__ import annotations

from ...equipment.valve import travel_limits
from ...errors import InputError, OutOfRangeError
from ...units.amounts import Amount, Phrase
from ..base import Result
from ..letdown.calculation import Inputs as LetdownInputs
from ..letdown.calculation import inlet_state
from ..letdown.equipment import DEFAULT_RANGEABILITY, DEFAULT_XT, rated_travel, required_kv, sizing_kappa
from ..letdown.equipment import valve_inlet_state

#: A linked record's pressure differs from its header's when the difference exceeds the larger of 1 % of the
#: header's absolute pressure and 0.05 bar: about what a header's gauge reads to and its control band holds
#: (common practice).
HEADER_PRESSURE_FRACTION = 0.01
HEADER_PRESSURE_FLOOR = 0.05e5

#: The station's fields a balance's let-down hands to the let-down kind's valve sizing.
_STATION = ("inlet_pressure", "outlet_pressure", "inlet_temperature", "inlet_superheat", "inlet_dryness", "rated_kv",
            "xt", "characteristic", "rangeability", "valve_size", "inlet_size", "outlet_size", "schedule",
            "inlet_length", "inlet_fittings_k")


def sized_valve(letdown, flow):
    """The linked let-down's valve at a flow: the let-down kind's sizing at the record's inlet and outlet.

    Parameters
    ----------
    letdown : steamcalc.calcs.site_balance.items.Letdown
        A let-down whose linked record gave its station (inlet pressure and steam, outlet pressure, rated Kv).
    flow : float
        Steam through the valve, kg/s (the balance's let-down steam, ahead of any desuperheater).

    Returns
    -------
    tuple
        ``(sizing, travel, valve inlet state)``: :class:`steamcalc.equipment.valve.ValveSizing` (Kv in m³/h),
        the travel (0 to 1) of the rated valve by its characteristic, and the steam at the valve inlet (after
        the inlet line's loss at this flow, as the let-down record takes it).

    Notes
    -----
    .. math:: K_v = \\frac{W}{N_6 F_p Y \\sqrt{x_{siz} p_1 \\rho_1}}, \\quad h = 1 + \\frac{\\ln(K_v/K_{vs})}{\\ln R}
              \\text{ (equal-percentage) or } h = K_v/K_{vs} \\text{ (linear)}

    References
    ----------
    IEC 60534-2-1:2011, equations (8), (12)-(15) (compressible flow) and (2)-(6), (18) (fittings);
    IEC 60534-2-4:2009, inherent flow characteristics.

    Examples
    --------
    >>> from steamcalc.calcs.site_balance.items import Letdown, Link
    >>> ld = Letdown(name="HP-LP", source="HP", target="LP", inlet_pressure=16.99e5, outlet_pressure=3.49e5,
    ...              inlet_temperature=503.15, rated_kv=63.0, xt=0.70, characteristic="equal-percentage",
    ...              rangeability=50.0, link=Link("LD-01", "B", "letdown", "0" * 64))
    >>> sizing, travel, inlet = sized_valve(ld, 3439 / 3600)   # kg/s
    >>> round(sizing.kv, 2), sizing.choked, round(100 * travel, 1)
    (17.49, True, 67.2)
    """
    values = {name: getattr(letdown, name) for name in _STATION if getattr(letdown, name) is not None}
    record = letdown.link.record_id if letdown.link else letdown.name
    try:
        station = LetdownInputs(mass_flow=flow, **values)
        normal_inlet, _ = inlet_state(station, Result())   # its worked steps belong to the let-down's record
        inlet, _ = valve_inlet_state(station, "normal", flow, normal_inlet)
        sizing = required_kv(station, inlet, sizing_kappa(inlet), flow)
    except (InputError, OutOfRangeError) as exc:
        raise InputError(f"the valve of let-down {letdown.name} cannot be sized at the balance's "
                         f"{flow * 3600:.0f} kg/h with its linked record {record}'s station: {exc.message}",
                         field=f"letdown.{letdown.name}.record", value=record,
                         fix=f"check {record}'s valve and inlet line for this flow, or re-issue it") from None
    return sizing, rated_travel(station, sizing.kv), inlet


def _valve_words(letdown):
    characteristic = letdown.characteristic or "equal-percentage"
    rangeability = letdown.rangeability if letdown.rangeability is not None else DEFAULT_RANGEABILITY
    return characteristic, rangeability


def letdown_valve_checks(result, inputs, balances, what="", prefix=""):
    """Per load case, each linked let-down's required Kv at the balance's flow against its record's rated Kv,
    and the valve's travel there against the travel rule; ``what`` begins each check's name and label
    ("Without FL-01, "), ``prefix`` each result's key ("what_if.")."""
    sized = [ld for ld in inputs.letdowns if ld.link is not None and ld.rated_kv is not None]
    if sized and not what:
        result.references.append("IEC 60534-2-1:2011, control-valve sizing for compressible flow, equations (8), "
                                  "(12)-(15), with fittings (2)-(6), (18); IEC 60534-2-4:2009 inherent characteristics")
        defaults = [ld.name for ld in sized if ld.xt is None]
        result.assumptions.append(
            "Each linked let-down's valve is sized again at the balance's let-down steam in each load case, at the "
            "inlet steam, pressures, valve and inlet line its record states (its inlet line's loss taken at that "
            "flow), by the let-down calculation's own IEC 60534-2-1 sizing; its travel by the record's valve "
            "characteristic" + (f"; xT {DEFAULT_XT} where the record gives none ({', '.join(defaults)})"
                                if defaults else ""))
    for case_name, b in balances.items():
        name = f"{what}{case_name}"
        for ld in sized:
            steam = b.letdown_steam.get(ld.name)
            if steam is None or steam == 0.0:
                continue
            sizing, travel, inlet = sized_valve(ld, steam)
            record = f"let-down record {ld.link.record_id} rev {ld.link.revision}"
            kv = Amount(sizing.kv, "m**3/h", role="flow_coefficient")
            kvs = Amount(ld.rated_kv, "m**3/h", role="flow_coefficient")
            result.add(f"{prefix}{case_name}.{ld.name}.valve_kv", f"{name}: let-down {ld.name} required Kv at the "
                       "balance's flow", sizing.kv, "m**3/h")
            result.add(f"{prefix}{case_name}.{ld.name}.valve_travel", f"{name}: let-down {ld.name} valve travel at "
                       "the balance's flow", 100.0 * travel, "percent")
            result.check_limit(
                f"{name}: let-down {ld.name} valve's rated Kv at the balance's flow", kv, [("<=", kvs, "fail")],
                lambda status, ld=ld, kv=kv, kvs=kvs, steam=steam, inlet=inlet: Phrase.of(
                    "{flow:.0f} from {p1:.4g} and {t1:.1f} to {p2:.4g} needs Kv {kv:.2f}" + (
                        ", within" if status == "pass" else ", beyond") + " the rated Kv {kvs:.2f} of "
                    f"{ld.link.record_id}'s valve" + ("" if status == "pass" else ": the valve cannot pass the "
                                                       "balance's let-down steam; re-size it or re-issue the record"),
                    flow=(steam * 3600, "kg/h"), p1=(inlet.pressure / 1e5, "bar"), t1=(inlet.temperature - 273.15,
                                                                                        "degC"),
                    p2=(ld.outlet_pressure / 1e5, "bar"), kv=kv, kvs=kvs),
                source=f"IEC 60534-2-1:2011 equation (8); rated Kv from {record}")
            characteristic, rangeability = _valve_words(ld)
            result.check_limit(
                f"{name}: let-down {ld.name} valve travel at the balance's flow", (100.0 * travel, "percent"),
                travel_limits(),
                Phrase.of(f"{{travel:.0f}} travel ({characteristic}, R = {rangeability:g}) at {{flow:.0f}}; "
                          "10-90 % usable, 20-80 % preferred (common practice)",
                          travel=(100.0 * travel, "percent"), flow=(steam * 3600, "kg/h")),
                source="common practice")


def _linked_pressures(inputs):
    """(item words, link, what, record's pressure Pa, header) of every pressure a linked record states."""
    users = {u.name: u for u in inputs.users}
    for ld in inputs.letdowns:
        if ld.link is not None:
            yield f"let-down {ld.name}", ld.link, "inlet", ld.inlet_pressure, ld.source
            yield f"let-down {ld.name}", ld.link, "outlet", ld.outlet_pressure, ld.target
    for f in inputs.flashes:
        if f.link is not None:
            yield f"flash vessel {f.name}", f.link, "condensate", f.condensate_pressure, users[f.from_user].header
            yield f"flash vessel {f.name}", f.link, "flash", f.flash_pressure, f.target
    for u in inputs.users:
        if u.link is not None:
            yield f"user {u.name}", u.link, "steam supply", u.steam_pressure, u.header


def header_pressure_checks(result, inputs, site):
    """Each linked record's pressures against the balance's header pressures in the site file: a record issued for
    another header pressure warns, naming the record, the header and both pressures.

    The tolerance is the larger of 1 % of the header's absolute pressure and 0.05 bar (common practice).
    """
    for item, link, what, pressure, header in _linked_pressures(inputs):
        if pressure is None:
            continue
        header_pressure = site.headers[header]
        tolerance = max(HEADER_PRESSURE_FRACTION * header_pressure, HEADER_PRESSURE_FLOOR)
        difference = Amount(abs(pressure - header_pressure) / 1e5, "bar", "difference")
        limit = Amount(tolerance / 1e5, "bar", "difference")
        result.check_limit(
            f"Linked record {link.record_id} {what} pressure against the {header} header", difference,
            [("<=", limit, "warn")],
            lambda status, item=item, link=link, what=what, pressure=pressure, header=header, hp=header_pressure,
            difference=difference: Phrase.of(
                f"{link.record_id} rev {link.revision} ({item}) has its {what} at {{record:.4g}}; the site's {header} "
                "header is at {header:.4g}, a difference of {difference:.3f}" + (
                    "" if status == "pass" else f": {link.record_id} was issued for another header pressure; "
                    "re-issue it at the site's header pressure, or correct the site file"),
                record=(pressure / 1e5, "bar"), header=(hp / 1e5, "bar"), difference=difference),
            source=f"common practice: within the larger of {100 * HEADER_PRESSURE_FRACTION:g} % of the header's "
                   f"absolute pressure and {HEADER_PRESSURE_FLOOR / 1e5:g} bar difference")
