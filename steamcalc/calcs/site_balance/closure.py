"""Each header and the deaerator re-balanced with the second IF97 implementation, from the recorded states.

The solver's balances close by construction. Here each stream's enthalpy is evaluated again from its
pressure and temperature (or dryness) with the other IF97 engine than the one in use, and the energy
entering and leaving each header (and the deaerator) is summed again: a wrong flow, a mis-booked stream
or an engine fault shows as a residual, judged against :data:`CLOSURE_TOLERANCE` of the energy entering.
"""

from __future__ import annotations

from ...properties.steam import SATURATION_TOLERANCE, SteamState, saturation_temperature
from ...units.amounts import Phrase
from ..balance import Stream, second_engine_enthalpy
from ..base import full_record_wanted

#: Residual of a header's or the deaerator's energy balance, as a fraction of the energy entering, above
#: which the check fails. The two IF97 implementations agree to about 1e-9 in h at the same (p, T).
CLOSURE_TOLERANCE = 1e-6
#: Above it there is no saturation line, Pa (IAPWS-IF97 critical pressure).
CRITICAL_PRESSURE = 22.064e6
SOURCE = "IAPWS-IF97 through the second implementation (seuif97 for an issued record)"


def _stream(name, mass_flow, state):
    """A Stream of a state; a state on the saturation line by its dryness, since (p, T) does not fix it there."""
    if state.dryness is None and state.pressure < CRITICAL_PRESSURE and \
            abs(state.temperature - saturation_temperature(state.pressure)) < 10 * SATURATION_TOLERANCE:
        dryness = 1.0 if state.enthalpy >= SteamState.from_p_dryness(state.pressure, 1.0).enthalpy - 1e-3 else 0.0
        return Stream(name, mass_flow, state.pressure, dryness=dryness)
    return Stream.of(name, mass_flow, state)


def header_streams(site, b, header):
    """(inflows, outflows) of a header as Streams: supplies at their own states, demands at the header's."""
    state = b.header_states[header]
    inflows = [_stream(name, m, s) for name, m, s in b.inflows[header] if m > 0.0]
    if header in b.shortfalls:
        inflows.append(_stream("shortfall (nothing supplies it)", b.shortfalls[header], state))
    outflows = [_stream(name, m, state) for name, m in b.outflows[header] if m > 0.0]
    return inflows, outflows


def deaerator_streams(b):
    """(inflows, outflows) of the deaerator as Streams."""
    states = b.states
    inflows = [_stream("make-up water", b.makeup, b.makeup_state or states["makeup"])]
    inflows += [_stream(name, m, s) for name, (m, s) in b.returns.items() if m > 0.0]
    inflows.append(_stream("heating steam", b.deaerator_steam, b.header_states[b.deaerator_header]))
    outflows = [_stream("feedwater", b.feedwater, states["feedwater"]),
                _stream("vent", b.deaerator_vent, states["deaerator_vent"])]
    return inflows, outflows


def relative_residual(inflows, outflows, engine=None):
    """|Σ ṁh in − Σ ṁh out| / Σ ṁh in, with the enthalpies of ``engine`` (the other IF97 engine by default)."""
    energy_in = sum(s.mass_flow * second_engine_enthalpy(s, engine) for s in inflows)
    energy_out = sum(s.mass_flow * second_engine_enthalpy(s, engine) for s in outflows)
    return abs(energy_in - energy_out) / energy_in


def turbine_residual(b, name, engine=None):
    """|ṁ(h1 − h2) − P| / ṁh1 of turbine ``name``: its inlet and exhaust re-evaluated with ``engine`` (the other
    IF97 engine by default) against the shaft power P = ṁ(h1 − h2) the balance booked."""
    flow, x = b.turbine_flow[name], b.turbine_expansion[name]
    inlet, exhaust = _stream("inlet", flow, x.inlet), _stream("exhaust", flow, x.exhaust)
    h_1, h_2 = second_engine_enthalpy(inlet, engine), second_engine_enthalpy(exhaust, engine)
    return abs(flow * (h_1 - h_2) - flow * x.enthalpy_drop) / (flow * h_1)


def _check(result, name, inflows, outflows, residual=None):
    residual = relative_residual(inflows, outflows) if residual is None else residual
    detail = Phrase.of("re-summed from the recorded states with the second IF97 implementation: residual "
                       "{residual:.1e} of the energy entering (tolerance {tolerance:.0e})", residual=(residual, ""),
                       tolerance=(CLOSURE_TOLERANCE, ""))
    if residual <= CLOSURE_TOLERANCE:
        result.notice(name, detail)
    else:   # a balance that does not close is a fault in the program: the record says so and fails
        result.check_limit(name, (residual, ""), [("<=", (CLOSURE_TOLERANCE, ""), "fail")], detail, source=SOURCE)


def check_closures(result, inputs, site, b):
    """Add, for a solved load case, a closure check per header that carries steam and one for the deaerator."""
    if not full_record_wanted():
        return
    for header in sorted(site.headers, key=lambda h: -site.headers[h]):
        inflows, outflows = header_streams(site, b, header)
        if inflows:
            _check(result, f"{b.case}: {header} header closes (independent)", inflows, outflows)
    for turbine in sorted(b.turbine_flow):
        if b.turbine_flow[turbine] > 0.0:
            _check(result, f"{b.case}: turbine {turbine} closes with its shaft power (independent)", (), (),
                   turbine_residual(b, turbine))
    inflows, outflows = deaerator_streams(b)
    _check(result, f"{b.case}: deaerator closes (independent)", inflows, outflows)
    recovery = blowdown_streams(b)
    if recovery is not None:
        _check(result, f"{b.case}: blowdown flash vessel and cooler close (independent)", *recovery)


def blowdown_streams(b):
    """(inflows, outflows) of the blowdown flash vessel and cooler together, as Streams; None without either."""
    states = b.states
    if b.blowdown_flash_fraction == 0.0 and b.blowdown_heat_recovered == 0.0:
        return None
    residual = states["blowdown_residual"]
    h_out = residual.enthalpy - (b.blowdown_heat_recovered / b.blowdown_residual if b.blowdown_residual else 0.0)
    inflows = [_stream("blowdown", b.blowdown, states["blowdown"])]
    outflows = [_stream("blowdown to drain", b.blowdown_residual, SteamState.from_ph(residual.pressure, h_out))]
    if b.blowdown_flash_steam > 0.0:
        outflows.append(_stream("blowdown flash steam", b.blowdown_flash_steam, states["blowdown_flash_steam"]))
    if b.blowdown_heat_recovered > 0.0:
        inflows.append(_stream("make-up water", b.makeup, states["makeup"]))
        outflows.append(_stream("make-up water heated", b.makeup, b.makeup_state))
    return inflows, outflows
