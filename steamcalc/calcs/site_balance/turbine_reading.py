"""Reading the back-pressure turbines of a balance's case file, and refusing a turbine the balance cannot solve.

The case file holds, per turbine::

    [[inputs.turbine]]
    name = "TG-1"
    from = "HP"                            # inlet header
    to = "LP"                              # exhaust header, below the inlet
    flow = "balances the exhaust header"   # or a steam flow, e.g. "3 t/h"
    max_flow = "4 t/h"                     # optional: what it can swallow; the let-down makes up the rest
    isentropic_efficiency = 0.6            # above 0, at most 1
    generator_efficiency = 0.93            # optional: electric power over shaft power

Every refusal names the case-file address (``turbine[0].isentropic_efficiency``), the value and the fix.
"""

from __future__ import annotations

import math

from ...errors import CaseFileError, InputError
from .items import Turbine
from .reading import _given, _header, _name, _quantity, _unique

#: Words that say the turbine passes what its exhaust header needs (ahead of the let-down into it).
BALANCING = "balances the exhaust header"
KEYS = ("name", "from", "to", "flow", "max_flow", "isentropic_efficiency", "generator_efficiency")


def _efficiency(row, key, where, required):
    if key not in row:
        if required:
            raise CaseFileError("is required", field=f"{where}.{key}", fix=f"add {key} to {where}, e.g. {key} = 0.6")
        return None
    value = row[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError("must be a plain number above 0 and at most 1", field=f"{where}.{key}", value=value,
                         fix="write it without quotes or units, e.g. 0.6")
    if not 0.0 < value <= 1.0:
        raise InputError("an efficiency lies above 0 and at most 1", field=f"{where}.{key}", value=value,
                         limits=(0, 1, ""), fix="give it as a fraction, e.g. 0.6 for 60 %")
    return float(value)


def read_turbines(rows, site, given):
    """The ``[[inputs.turbine]]`` entries as :class:`~.items.Turbine` items (SI), their texts into ``given``."""
    turbines = []
    for i, row in enumerate(rows):
        where = f"turbine[{i}]"
        name = _name(row, where)
        flow_text = row.get("flow", BALANCING)
        if isinstance(flow_text, str) and flow_text.strip().lower() == BALANCING:
            flow = None
        else:
            flow = _quantity(row, "flow", where, "mass_flow")
        max_flow = _quantity(row, "max_flow", where, "mass_flow")
        if flow is not None and max_flow is not None and flow > max_flow:
            raise InputError(f"turbine {name}'s steam flow {flow * 3600:.0f} kg/h is above its maximum "
                             f"{max_flow * 3600:.0f} kg/h", field=f"{where}.flow", value=row.get("flow"),
                             fix=f'give a flow within the maximum, or flow = "{BALANCING}"')
        turbine = Turbine(name=name, source=_header(row, "from", where, site), target=_header(row, "to", where, site),
                          isentropic_efficiency=_efficiency(row, "isentropic_efficiency", where, True), flow=flow,
                          max_flow=max_flow,
                          generator_efficiency=_efficiency(row, "generator_efficiency", where, False))
        for key in KEYS:
            _given(given, f"turbine.{name}.{ {'from': 'source', 'to': 'target'}.get(key, key)}", row, key)
        turbines.append(turbine)
    _unique(turbines, "turbine")
    return tuple(turbines)


def check_turbine_network(inputs):
    """Refuse what needs no pressures: a turbine into its own header, two turbines balancing one header."""
    balancing = {}
    for turbine in inputs.turbines:
        if turbine.source == turbine.target:
            raise InputError(f"turbine {turbine.name} exhausts into its own inlet header {turbine.source}",
                             field=f"turbine.{turbine.name}.to", value=turbine.target,
                             fix="exhaust it into a lower-pressure header")
        if not 0.0 < turbine.isentropic_efficiency <= 1.0:
            raise InputError("an efficiency lies above 0 and at most 1", field=f"turbine.{turbine.name}"
                             ".isentropic_efficiency", value=turbine.isentropic_efficiency, limits=(0, 1, ""))
        if turbine.flow is None:
            if turbine.target in balancing:
                raise InputError(f"turbines {balancing[turbine.target]} and {turbine.name} both balance header "
                                 f"{turbine.target}; the balance cannot say which passes what",
                                 field=f"turbine.{turbine.name}.flow", value=BALANCING,
                                 fix="give one of them a fixed flow")
            balancing[turbine.target] = turbine.name
            if turbine.target == inputs.boiler.header:
                raise InputError(f"turbine {turbine.name} balances the boiler's header {turbine.target}",
                                 field=f"turbine.{turbine.name}.flow", value=BALANCING,
                                 fix="the boiler makes up its own header; give the turbine a fixed flow or "
                                     "exhaust it into a lower header")


def check_turbines_against_site(inputs, headers):
    """Refuse a turbine whose exhaust header is not below its inlet header (site pressures, Pa)."""
    for turbine in inputs.turbines:
        for key, name in (("from", turbine.source), ("to", turbine.target)):
            if name not in headers:
                raise InputError(f"header {name!r} is not in the site's headers", field=f"turbine.{turbine.name}.{key}",
                                 value=name, fix=f"use one of: {', '.join(headers) or 'none'}")
        p_in, p_out = headers[turbine.source], headers[turbine.target]
        if p_out >= p_in:
            raise InputError(f"turbine {turbine.name} exhausts into {turbine.target} ({p_out / 1e5:.4g} bar(a)), not "
                             f"below its inlet header {turbine.source} ({p_in / 1e5:.4g} bar(a))",
                             field=f"turbine.{turbine.name}.to", value=turbine.target,
                             fix="a back-pressure turbine exhausts into a header below its inlet's pressure")
