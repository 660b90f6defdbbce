"""Solving one load case of a site steam balance: headers closed by let-down or vent, deaerator, boiler.

Each header below the boiler's is closed from the lowest pressure up: its demand (users, the deaerator's
heating steam, the steam its let-downs and turbines draw for lower headers) less its fixed supply (flash
steam, the exhaust of turbines given a fixed flow) is made up when short by the turbine that balances it (up
to its maximum flow), then by the let-down that feeds it, and vented when long. The boiler's header takes what is left:
the boiler steam when it balances the site, else a vent or a shortfall. Users given a duty take
:math:`\\dot m = Q / (h_{header} - h_f)`; header states are the adiabatic mix of their inflows, so the
flows and the states depend on each other, and on the deaerator's steam, which depends on the feedwater
the boiler and the desuperheaters draw. The loop is solved by successive substitution until no flow and
no header enthalpy changes by more than :data:`TOLERANCE` (relative) between sweeps; a case that does
not is refused by name (:class:`~steamcalc.errors.NotConvergedError`), never given as solved.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ...errors import InputError, NotConvergedError, OutOfRangeError
from ...properties.steam import CRITICAL_PRESSURE, SteamState, saturation_temperature
from .blowdown import RECOVERY, cooler_heat, flash_fraction, has_recovery, recovery_states, without_recovery
from .turbines import expansion

#: Largest relative change of any flow or header enthalpy between two sweeps of a solved case.
TOLERANCE = 1e-10
#: Sweeps allowed before a case is refused as not converged.
MAX_SWEEPS = 200
#: Flows below this (kg/s, 0.0036 kg/h) count as zero when judging the change between sweeps.
FLOW_SCALE = 1e-6


@dataclass
class CaseBalance:
    """The solved balance of one load case (SI: kg/s, J/kg, W), with the states the record names."""

    case: str
    boiler_steam: float = 0.0
    blowdown: float = 0.0
    feedwater: float = 0.0
    deaerator_steam: float = 0.0
    deaerator_vent: float = 0.0
    deaerator_flash_vent: float = 0.0                      # vented because the returns are too hot
    makeup: float = 0.0
    makeup_state: object = None                            # the make-up water entering the deaerator
    blowdown_flash_fraction: float = 0.0
    blowdown_flash_steam: float = 0.0                      # to the boiler's blowdown_flash_header, kg/s
    blowdown_residual: float = 0.0                         # to the cooler or drain, kg/s
    blowdown_heat_recovered: float = 0.0                   # by the make-up water in the cooler, W
    returns: dict = field(default_factory=dict)            # name -> (kg/s, SteamState)
    return_flash_fraction: dict = field(default_factory=dict)  # user -> flash fraction at its vented receiver
    return_flash_vented: dict = field(default_factory=dict)    # user -> kg/s flashed off at its vented receiver
    user_flows: dict = field(default_factory=dict)         # user -> kg/s
    flash_steam: dict = field(default_factory=dict)        # flash -> kg/s
    flash_residual: dict = field(default_factory=dict)     # flash -> kg/s
    flash_fraction: dict = field(default_factory=dict)
    letdown_steam: dict = field(default_factory=dict)      # let-down -> steam drawn, kg/s
    letdown_spray: dict = field(default_factory=dict)      # let-down -> spray water, kg/s
    letdown_outlet: dict = field(default_factory=dict)     # let-down -> SteamState at the outlet
    turbine_flow: dict = field(default_factory=dict)       # turbine -> steam through it, kg/s
    turbine_expansion: dict = field(default_factory=dict)  # turbine -> Expansion (inlet, isentropic, exhaust)
    vents: dict = field(default_factory=dict)              # header -> kg/s
    shortfalls: dict = field(default_factory=dict)         # header -> kg/s nobody supplies
    header_enthalpy: dict = field(default_factory=dict)    # header -> J/kg
    header_states: dict = field(default_factory=dict)      # header -> SteamState
    inflows: dict = field(default_factory=dict)            # header -> [(name, kg/s, SteamState)]
    outflows: dict = field(default_factory=dict)           # header -> [(name, kg/s)]
    returns_not_taken: float = 0.0                         # kg/s of returns a short site cannot take
    deaerator_header: str = ""
    sweeps: int = 0
    last_change: float = 0.0
    states: dict = field(default_factory=dict)             # boiler_steam, feedwater, makeup, vent, blowdown


def _state(make, address):
    try:
        return make()
    except OutOfRangeError as exc:
        raise exc.for_field(address) from None


def fixed_states(inputs, site):
    """The states that do not change between sweeps: boiler steam, feedwater, make-up, vent, blowdown, spray water."""
    boiler, da = inputs.boiler, inputs.deaerator
    states = {}
    if boiler.pressure >= CRITICAL_PRESSURE:
        raise InputError(f"a boiler at {boiler.pressure / 1e5:.5g} bar(a) is at or above the critical pressure "
                         f"{CRITICAL_PRESSURE / 1e5:.5g} bar(a) (IAPWS-IF97): it has no boiling water, so no blowdown "
                         "and no saturated steam", field="boiler.pressure", value=f"{boiler.pressure / 1e5:.5g} bar(a)",
                         limits=(0, CRITICAL_PRESSURE / 1e5, "bar(a)"),
                         fix="give the drum boiler's working pressure, below the critical pressure")
    states["blowdown"] = _state(lambda: SteamState.from_p_dryness(boiler.pressure, 0.0), "boiler.pressure")
    if boiler.temperature is None:
        states["boiler_steam"] = SteamState.from_p_dryness(boiler.pressure, 1.0)
    else:
        states["boiler_steam"] = _state(lambda: SteamState.from_pT(boiler.pressure, boiler.temperature),
                                        "boiler.temperature")
        if boiler.temperature < saturation_temperature(boiler.pressure) - 1e-9:
            raise InputError(f"the boiler steam at {boiler.temperature - 273.15:.2f} °C is below saturation at "
                             f"{boiler.pressure / 1e5:.4g} bar(a)", field="boiler.temperature",
                             fix="give the superheated steam temperature, or leave it out for saturated steam")
    states["feedwater"] = SteamState.from_p_dryness(da.pressure, 0.0)
    states["deaerator_vent"] = SteamState.from_p_dryness(da.pressure, 1.0)
    makeup_t = da.makeup_temperature if da.makeup_temperature is not None else site.makeup_water_temperature
    if makeup_t is None:
        raise InputError("the make-up water temperature is not given", field="deaerator.makeup_temperature",
                         fix='give makeup_temperature in [inputs.deaerator], or makeup_water_temperature in the site file')
    states["makeup"] = _state(lambda: SteamState.from_pT(max(site.atmospheric_pressure, 1.01325e5), makeup_t),
                              "deaerator.makeup_temperature")
    if states["makeup"].enthalpy >= states["feedwater"].enthalpy:
        raise InputError("the make-up water is as hot as the deaerator's water: the deaerator has nothing to heat",
                         field="deaerator.makeup_temperature", fix="check the make-up temperature and deaerator pressure")
    for ld in inputs.letdowns:
        if not ld.desuperheated:
            continue
        p_w = ld.water_pressure if ld.water_pressure is not None else boiler.pressure
        t_w = ld.water_temperature if ld.water_temperature is not None else states["feedwater"].temperature
        water = _state(lambda: SteamState.from_pT(p_w, t_w), f"letdown.{ld.name}.water_temperature")
        if t_w >= saturation_temperature(p_w):
            raise InputError(f"spray water at {t_w - 273.15:.2f} °C is not liquid at {p_w / 1e5:.4g} bar(a)",
                             field=f"letdown.{ld.name}.water_temperature", fix="give the feed-pump water temperature")
        states[f"spray:{ld.name}"] = water
        p_out = site.headers[ld.target]
        t_sat = saturation_temperature(p_out)
        if ld.target_temperature is None and ld.target_superheat <= 0.0:
            raise InputError(f"let-down {ld.name} desuperheated to {ld.target_superheat:g} K of superheat: a spray "
                             "desuperheater cannot bring steam to saturation (its water would stay unevaporated)",
                             field=f"letdown.{ld.name}.target_superheat", value=f"{ld.target_superheat:g} K",
                             fix='give a superheat above zero, e.g. "10 K" (common practice), or leave the '
                                 "desuperheater out for a throttling let-down")
        if ld.target_temperature is not None and ld.target_temperature <= t_sat:
            raise InputError(f"let-down {ld.name} desuperheated to {ld.target_temperature - 273.15:.2f} °C, at or "
                             f"below saturation at its {ld.target} header ({t_sat - 273.15:.2f} °C at "
                             f"{p_out / 1e5:.4g} bar(a)): a spray desuperheater cannot reach it",
                             field=f"letdown.{ld.name}.target_temperature",
                             value=f"{ld.target_temperature - 273.15:.2f} °C",
                             fix=f"give a temperature above {t_sat - 273.15:.1f} °C (e.g. 10 K above it, common "
                                 "practice), or target_superheat")
        t_out = ld.target_temperature if ld.target_temperature is not None else t_sat + ld.target_superheat
        states[f"target:{ld.name}"] = _state(lambda: SteamState.from_pT(p_out, t_out),
                                             f"letdown.{ld.name}.target_temperature")
    for user in inputs.users:
        if user.return_fraction > 0.0:
            p_u = site.headers[user.header]
            if user.return_temperature is None:
                raise InputError(f"user {user.name} returns condensate but its temperature is not given",
                                 field=f"user.{user.name}.return_temperature",
                                 fix='give return_temperature, e.g. "90 degC"')
            if user.return_temperature > saturation_temperature(p_u):
                raise InputError(f"condensate of {user.name} at {user.return_temperature - 273.15:.2f} °C is above "
                                 f"saturation at its header ({saturation_temperature(p_u) - 273.15:.2f} °C)",
                                 field=f"user.{user.name}.return_temperature",
                                 fix="give a temperature at or below the header's saturation temperature")
            if user.condensate_to != "deaerator":
                # An open receiver (or the cooler ahead of it) holds water at most at its boiling point.
                p_r = site.atmospheric_pressure
                if user.return_temperature > saturation_temperature(p_r):
                    t_boil = saturation_temperature(p_r) - 273.15
                    raise InputError(f"condensate of {user.name} at {user.return_temperature - 273.15:.2f} °C is "
                                     f"above its boiling point at the site atmosphere ({t_boil:.2f} °C at "
                                     f"{p_r / 1e5:.4g} bar(a)): a {user.condensate_to} return cannot hold it",
                                     field=f"user.{user.name}.return_temperature",
                                     fix="give the temperature of the water leaving the receiver, or write "
                                         'condensate_to = "deaerator" for a return under pressure into the deaerator')
            states[f"return:{user.name}"] = _state(lambda: SteamState.from_pT(p_u, min(
                user.return_temperature, saturation_temperature(p_u) - 1e-6)), f"user.{user.name}.return_temperature")
    _check_vent(boiler, da, states)
    return recovery_states(boiler, site.headers, da.pressure, states)


def _check_vent(boiler, da, states):
    """Refuse a blowdown or a deaerator vent so large that no balance exists.

    Each kg of heating steam :math:`D` gives :math:`h_s - h_{mu} - v (h_v - h_{mu})` to the feedwater, and every kg
    of steam the boiler raises (this heating steam among it) needs :math:`(1 + k)(h_{fw} - h_{mu})`, less at most
    :math:`k (h_{bd} - h_{mu})` recovered from its blowdown when it has a blowdown recovery. With :math:`h_s` at
    most the boiler steam's enthalpy, no finite :math:`D` closes the deaerator unless the first exceeds the second:
    the blowdown is refused when even a deaerator without vent could not, else the vent.
    """
    h_mu = states["makeup"].enthalpy
    k = boiler.blowdown_of_steam
    v, w = _vent_bases(da)
    recovered = k * (states["blowdown"].enthalpy - h_mu) if has_recovery(boiler) else 0.0
    latent = states["deaerator_vent"].enthalpy - h_mu
    needs = (1 + k) * (states["feedwater"].enthalpy - h_mu) - recovered
    if states["boiler_steam"].enthalpy - h_mu <= needs:
        by_fraction = boiler.blowdown_fraction is not None
        raise InputError(f"a blowdown of {k:.3g} kg per kg of steam takes more heat from the feedwater than the steam "
                         "raised can give back in the deaerator: no balance exists",
                         field="boiler.blowdown_fraction" if by_fraction else "boiler.feedwater_tds",
                         value=boiler.blowdown_fraction if by_fraction else boiler.feedwater_tds,
                         fix="check the blowdown figures (the boiler-water limit well above the feedwater's, in the "
                             "same measure); blowdown is seldom above a tenth of the feedwater (common practice)")
    needs += (1 + k) * w * latent
    if w > 0.0 and states["boiler_steam"].enthalpy - h_mu <= needs:
        raise InputError(f"a deaerator venting {w:g} of its feedwater needs more heating steam than the boiler can "
                         "raise: no balance exists", field="deaerator.vent_of_feedwater", value=w,
                         fix="give the vent as a fraction of the feedwater: a few thousandths or less "
                             "(common practice)")
    gives = states["boiler_steam"].enthalpy - h_mu - v * latent
    if gives <= needs:
        limit = (states["boiler_steam"].enthalpy - h_mu - needs) / (states["deaerator_vent"].enthalpy - h_mu)
        raise InputError(f"a deaerator venting {da.vent_fraction:g} of its heating steam vents more than the steam "
                         "leaves to heat the feedwater: no balance exists (the heating steam would grow without end); "
                         f"here the vent must be below {limit:.3g}", field="deaerator.vent_fraction",
                         value=da.vent_fraction, limits=(0, round(limit, 3), ""),
                         fix="give the vent as a fraction of the heating steam: a few hundredths or less "
                             "(common practice)")


def _change(new, old):
    worst = 0.0
    for key, value in new.items():
        scale = max(abs(value), FLOW_SCALE if key[0] == "m" else 1.0)
        worst = max(worst, abs(value - old.get(key, 0.0)) / scale)
    return worst


def _vent_bases(da):
    """(v, w): the deaerator's vent as a fraction of its heating steam and of its feedwater (one of them zero)."""
    if da.vent_of_feedwater is not None:
        return 0.0, da.vent_of_feedwater
    return da.vent_fraction, 0.0


def _capped_returns(b, h_steam, h_fw, h_mu, h_v, vents, returned, heat_returned):
    """Scale the returns of a short site so that they close the deaerator with no make-up; the deaerator steam.

    With make-up zero and a vent :math:`V = v D + w F`, the deaerator's mass balance
    :math:`R' = F (1 + w) - (1 - v) D` and energy balance :math:`D (h_s - h_{mu}) = F (h_{fw} - h_{mu}) +
    V (h_v - h_{mu}) - R' c - Q_{bd}` (:math:`c` the returns' mean enthalpy above make-up) give
    :math:`D = (F (h_{fw} - h_{mu} + w (h_v - h_{mu}) - (1 + w) c) - Q_{bd}) / (h_s - h_{mu} - v (h_v - h_{mu}) -
    (1 - v) c)`; when that is negative the deaerator takes no steam and the surplus heat flashes off at its vent.
    """
    v, w = vents
    c, a, latent = heat_returned / returned, h_fw - h_mu, h_v - h_mu
    f = b.feedwater
    steam = ((f * (a + w * latent - (1 + w) * c) - b.blowdown_heat_recovered)
             / (h_steam - h_mu - v * latent - (1 - v) * c))
    if steam >= 0.0:
        kept = f * (1 + w) - (1.0 - v) * steam
        b.deaerator_vent, b.deaerator_flash_vent = v * steam + w * f, 0.0
    else:
        steam = 0.0
        b.deaerator_vent = (f * (c - a) + b.blowdown_heat_recovered) / (latent - c)
        b.deaerator_flash_vent = b.deaerator_vent - w * f
        kept = f + b.deaerator_vent
    scale = max(0.0, kept) / returned
    b.returns = {name: (m * scale, state) for name, (m, state) in b.returns.items()}
    b.returns_not_taken = returned - max(0.0, kept)
    b.deaerator_steam, b.makeup = steam, 0.0
    return steam


def solve_case(inputs, site, case, states, out_of_service=()):
    """The balance of one load case, with the items in ``out_of_service`` taken out.

    Parameters
    ----------
    inputs : Inputs
    site : steamcalc.cases.site.Site
        Header pressures, Pa (absolute).
    case : str
        The load case's name.
    states : dict
        From :func:`fixed_states`.
    out_of_service : iterable of str
        Names of let-downs, users and flash vessels taken out (the what-if), and
        :data:`~.blowdown.RECOVERY` for the boiler's blowdown flash and cooler.

    Returns
    -------
    CaseBalance

    Raises
    ------
    NotConvergedError
        When the sweeps do not settle within :data:`TOLERANCE` in :data:`MAX_SWEEPS`.
    InputError
        When the condensate returned would exceed the feedwater (negative make-up).
    """
    off = set(out_of_service)
    headers = dict(site.headers)
    order = sorted(headers, key=lambda name: headers[name])        # lowest pressure first
    liquid = {h: SteamState.from_p_dryness(p, 0.0) for h, p in headers.items()}
    vapour = {h: SteamState.from_p_dryness(p, 1.0) for h, p in headers.items()}
    boiler, da = inputs.boiler, inputs.deaerator
    if RECOVERY in off:
        boiler, states = without_recovery(boiler, headers, da.pressure, states)
    users = [u for u in sorted(inputs.users, key=lambda u: u.name) if u.name not in off]
    user_by_name = {u.name: u for u in users}
    flashes = [f for f in sorted(inputs.flashes, key=lambda f: f.name) if f.name not in off and f.from_user in user_by_name]
    flashed_users = {f.from_user for f in flashes}
    letdowns = {ld.target: ld for ld in inputs.letdowns if ld.name not in off}
    turbines = [t for t in sorted(inputs.turbines, key=lambda t: t.name) if t.name not in off]
    balancing_turbines = {t.target: t for t in turbines if t.flow is None}
    h_header = {h: vapour[h].enthalpy for h in headers}
    h_fw, h_mu = states["feedwater"].enthalpy, states["makeup"].enthalpy
    h_v = states["deaerator_vent"].enthalpy
    blowdown_ratio = boiler.blowdown_of_steam
    deaerator_steam = 0.0
    blowdown, makeup = 0.0, 0.0               # of the previous sweep: the flash steam and the cooler follow them
    flash_header = boiler.blowdown_flash_header
    bd_fraction = flash_fraction(states["blowdown"].enthalpy, headers[flash_header]) if flash_header else 0.0
    previous = {}
    for sweep in range(1, MAX_SWEEPS + 1):
        b = CaseBalance(case, deaerator_header=da.steam_header)
        for u in users:
            kind, value = u.load(case)
            if kind == "flow":
                b.user_flows[u.name] = value
            else:
                b.user_flows[u.name] = value / (h_header[u.header] - liquid[u.header].enthalpy)
        demand = {h: 0.0 for h in headers}
        supply = {h: 0.0 for h in headers}
        b.inflows = {h: [] for h in headers}
        b.outflows = {h: [] for h in headers}
        for u in users:
            demand[u.header] += b.user_flows[u.name]
            b.outflows[u.header].append((f"user {u.name}", b.user_flows[u.name]))
        for f in flashes:
            u = user_by_name[f.from_user]
            condensate = u.return_fraction * b.user_flows[u.name]
            h_in, low, high = liquid[u.header].enthalpy, liquid[f.target].enthalpy, vapour[f.target].enthalpy
            fraction = max(0.0, (h_in - low) / (high - low))
            b.flash_fraction[f.name] = fraction
            b.flash_steam[f.name] = fraction * condensate
            b.flash_residual[f.name] = condensate - fraction * condensate
            supply[f.target] += b.flash_steam[f.name]
            b.inflows[f.target].append((f"flash vessel {f.name}", b.flash_steam[f.name], vapour[f.target]))
        if flash_header is not None:
            b.blowdown_flash_fraction = bd_fraction
            b.blowdown_flash_steam = bd_fraction * blowdown
            supply[flash_header] += b.blowdown_flash_steam
            b.inflows[flash_header].append(("blowdown flash steam", b.blowdown_flash_steam,
                                            states["blowdown_flash_steam"]))
        demand[da.steam_header] += deaerator_steam
        b.outflows[da.steam_header].append(("deaerator heating steam", deaerator_steam))
        draw = {h: 0.0 for h in headers}

        def through_turbine(t, flow):
            """Book ``flow`` through turbine ``t``: drawn from its inlet header, its exhaust into the lower one."""
            x = expansion(t, headers[t.source], h_header[t.source], headers[t.target])
            b.turbine_flow[t.name], b.turbine_expansion[t.name] = flow, x
            draw[t.source] += flow
            b.outflows[t.source].append((f"turbine {t.name}", flow))
            b.inflows[t.target].append((f"turbine {t.name} exhaust", flow, x.exhaust))
            return flow

        for t in turbines:
            if t.flow is not None:
                supply[t.target] += through_turbine(t, t.flow)
        for h in order:
            net = demand[h] + draw[h] - supply[h]
            turbine = balancing_turbines.get(h)
            if turbine is not None and h != boiler.header:
                # The turbine passes what the header needs, up to its maximum; the let-down makes up the rest.
                passed = min(max(net, 0.0), turbine.max_flow if turbine.max_flow is not None else float("inf"))
                net -= through_turbine(turbine, passed)
            if h == boiler.header:
                b.boiler_steam = max(net, 0.0) if boiler.flow is None else boiler.flow
                surplus = b.boiler_steam - net
                if surplus > 0.0:
                    b.vents[h] = surplus
                elif surplus < 0.0:
                    b.shortfalls[h] = -surplus
                b.inflows[h].append(("boiler steam", b.boiler_steam, states["boiler_steam"]))
                continue
            ld = letdowns.get(h)
            if net > 0.0 and ld is not None:
                h_source = h_header[ld.source]
                target = states.get(f"target:{ld.name}")
                if target is not None and h_source > target.enthalpy:
                    h_w = states[f"spray:{ld.name}"].enthalpy
                    steam = net * (target.enthalpy - h_w) / (h_source - h_w)
                    outlet = target
                else:
                    steam = net
                    outlet = SteamState.from_ph(headers[h], h_source)
                b.letdown_steam[ld.name] = steam
                b.letdown_spray[ld.name] = net - steam
                b.letdown_outlet[ld.name] = outlet
                draw[ld.source] += steam
                b.outflows[ld.source].append((f"let-down {ld.name}", steam))
                b.inflows[h].append((f"let-down {ld.name}", net, outlet))
            elif net > 0.0:
                b.shortfalls[h] = net
            elif net < 0.0:
                b.vents[h] = -net
            if ld is not None and ld.name not in b.letdown_steam:
                b.letdown_steam[ld.name], b.letdown_spray[ld.name] = 0.0, 0.0
        for h in headers:
            if h in b.vents:
                b.outflows[h].append((f"vent from {h}", b.vents[h]))
            total = sum(m for _, m, _ in b.inflows[h])
            if total > 0.0:
                h_header[h] = sum(m * s.enthalpy for _, m, s in b.inflows[h]) / total
        b.header_enthalpy = dict(h_header)
        b.blowdown = b.boiler_steam * blowdown_ratio
        b.blowdown_residual = b.blowdown - bd_fraction * b.blowdown
        b.blowdown_heat_recovered = cooler_heat(boiler, b.blowdown_residual, states["blowdown_residual"], makeup,
                                                states["makeup"], states["makeup_cooler_pressure"])
        b.feedwater = b.boiler_steam + b.blowdown + sum(b.letdown_spray.values())
        heat_returned = 0.0
        for u in users:
            if u.return_fraction > 0.0 and u.name not in flashed_users:
                state = states[f"return:{u.name}"]
                condensate = u.return_fraction * b.user_flows[u.name]
                if u.return_flashes_off:
                    x = flash_fraction(liquid[u.header].enthalpy, site.atmospheric_pressure)
                    b.return_flash_fraction[u.name] = x
                    b.return_flash_vented[u.name] = x * condensate
                    condensate -= x * condensate
                b.returns[f"condensate of {u.name}"] = (condensate, state)
        for f in flashes:
            b.returns[f"residual condensate of {f.name}"] = (b.flash_residual[f.name], liquid[f.target])
        returned = sum(m for m, _ in b.returns.values())
        heat_returned = sum(m * (s.enthalpy - h_mu) for m, s in b.returns.values())
        h_steam = h_header[da.steam_header]
        v, w = _vent_bases(da)
        fixed_vent = w * b.feedwater             # a vent stated on the feedwater does not follow the heating steam
        needed = b.feedwater * (h_fw - h_mu) - heat_returned - b.blowdown_heat_recovered + fixed_vent * (h_v - h_mu)
        if needed >= 0.0:
            deaerator_steam = needed / (h_steam - h_mu - v * (h_v - h_mu))
            b.deaerator_vent = v * deaerator_steam + fixed_vent
        else:
            # The returns bring more heat than the feedwater needs: the deaerator takes no steam, and the surplus
            # flashes off at its vent as saturated steam.
            deaerator_steam = 0.0
            b.deaerator_flash_vent = -needed / (h_v - h_mu)
            b.deaerator_vent = b.deaerator_flash_vent + fixed_vent
        b.deaerator_steam = deaerator_steam
        b.makeup = b.feedwater + b.deaerator_vent - returned - deaerator_steam
        if b.makeup < 0.0 and b.shortfalls:
            # A header nobody supplies: its users cannot get their steam, so they cannot return its condensate. The
            # returns are taken as the water actually supplied can give back (no make-up), the rest unreturned.
            deaerator_steam = _capped_returns(b, h_steam, h_fw, h_mu, h_v, (v, w), returned, heat_returned)
        blowdown, makeup = b.blowdown, b.makeup
        now = {"m_boiler": b.boiler_steam, "m_deaerator": deaerator_steam, "m_blowdown": b.blowdown,
               "m_makeup": b.makeup, "q_blowdown_cooler": b.blowdown_heat_recovered,
               **{f"m_{k}": v for k, v in b.letdown_steam.items()}, **{f"m_{k}": v for k, v in b.turbine_flow.items()},
               **{f"h_{k}": v for k, v in h_header.items()}}
        b.last_change = _change(now, previous) if previous else 1.0
        previous = now
        b.sweeps = sweep
        if sweep > 1 and b.last_change <= TOLERANCE:
            break
    else:
        raise NotConvergedError(
            f"load case {case!r}: the balance did not settle in {MAX_SWEEPS} sweeps (last relative change "
            f"{b.last_change:.1e}, tolerance {TOLERANCE:.0e})", field=f"load_case.{case}", value=b.last_change,
            fix="check for a loop the balance cannot close (a deaerator on a header fed only through it), or "
                "split the load case")
    if b.makeup < -FLOW_SCALE * 1e-3:
        raise InputError(f"load case {case!r}: the condensate returned exceeds the feedwater by "
                         f"{-b.makeup * 3600:.1f} kg/h", field=f"load_case.{case}",
                         fix="check the users' returned fractions: the site cannot return more water than it uses")
    for h in headers:
        b.header_states[h] = SteamState.from_ph(headers[h], h_header[h])
    b.makeup_state = states["makeup"]
    if b.blowdown_heat_recovered > 0.0 and b.makeup > 0.0:
        b.makeup_state = SteamState.from_ph(states["makeup_cooler_pressure"],
                                            h_mu + b.blowdown_heat_recovered / b.makeup)
    b.states = states
    return b
