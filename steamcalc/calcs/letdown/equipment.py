"""The let-down station's equipment: valve sizing over the flow range, fail-open flow,
line velocities, and the power the valve throws away.

Called by :func:`steamcalc.calcs.letdown.calculation.calculate` with the states it has found; adds
its values, steps and checks to the same Result.
"""

from __future__ import annotations

from ...equipment.line_loss import line_pressure_drop
from ...equipment.piping import DN_TO_NPS, line_velocity, pipe_inner_diameter
from ...equipment.valve import kv_to_cv, piping_factors, size_steam_valve, travel_limits, valve_flow, valve_travel
from ...errors import InputError, OutOfRangeError
from ...properties.steam import CRITICAL_PRESSURE, CRITICAL_TEMPERATURE, SteamState, dynamic_viscosity, saturation_temperature
from ...units.amounts import Amount, Phrase

#: Defaults stated as assumptions when not given (common practice for globe control valves).
DEFAULT_XT = 0.70
DEFAULT_FL = 0.90
DEFAULT_FD = 1.0
DEFAULT_RANGEABILITY = 50.0
#: Line velocity limits, m/s (common practice): saturated or wet steam 25-35, superheated 40-50.
DEFAULT_MAX_VELOCITY_WET = 30.0
DEFAULT_MAX_VELOCITY_SUPERHEATED = 45.0
DEFAULT_SCHEDULE = "40"
#: What valve.max_inlet_pressure is when not said: the upstream safety valve's set pressure (the figure an
#: engineer finds on the upstream header's data sheet), to which its accumulation is added for the relief load.
DEFAULT_UPSTREAM_PRESSURE_BASIS = "set pressure"
UPSTREAM_PRESSURE_BASES = ("set pressure", "relieving pressure")
#: Accumulation of the upstream safety valve, of its gauge set pressure: the single-device allowance for operating
#: contingencies of API RP 520 Part I (7th ed., 2000), 3.5.2 and Table 2 (110 % of the MAWP, i.e. 10 % of a set
#: pressure at the MAWP); conservative for a boiler under ASME Section I, whose PG-67 allows 6 %.
DEFAULT_UPSTREAM_ACCUMULATION = 0.10
#: Preferred nominal sizes for suggestions (common practice: DN90, DN125 and the like are
#: hard to buy and to fit).
NON_PREFERRED_DN = (90, 125)


def sizing_kappa(state, result=None):
    """Isentropic exponent for sizing at a valve inlet state.

    Single-phase and dry saturated steam: κ = w²ρ/p from IF97; dry saturated vapour takes
    the vapour-side value, so κ is continuous as the superheat falls to zero. Wet steam
    (x < 1): Zeuner's rule κ = 1.035 + 0.1·x, so κ is discontinuous at x = 1.
    """
    if state.isentropic_exponent is not None:
        return state.isentropic_exponent
    if state.dryness == 1.0:
        # The saturated-vapour end of region 4 carries no speed of sound; the vapour-side
        # limit is region 2 on the saturation line, taken 1 mK above it.
        vapour = SteamState.from_pT(state.pressure, state.temperature + 1e-3)
        if result is not None:
            result.assumptions.append(
                "Dry saturated inlet: κ = w²ρ/p of the vapour on the saturation line (IF97 region 2); "
                "for wet steam (x < 1) κ follows Zeuner's rule, so κ is discontinuous at x = 1")
        return vapour.isentropic_exponent
    kappa = 1.035 + 0.1 * state.dryness
    if result is not None:
        result.assumptions.append(
            f"Wet inlet steam: isentropic exponent κ = 1.035 + 0.1·x = {kappa:.4f} (Zeuner's empirical exponent of "
            "the wet-steam adiabatic pvⁿ = const, as quoted in A Text-Book of Mechanical Engineering, appendix note "
            "to p. 608); "
            "IEC 60534-2-1 compressible sizing is approximate for wet steam, and κ is discontinuous at x = 1")
    return kappa


def flow_cases(inputs):
    """(name, mass flow kg/s) for each flow case given, low to high."""
    cases = []
    if inputs.min_flow is not None:
        cases.append(("minimum", inputs.min_flow))
    cases.append(("normal", inputs.mass_flow))
    if inputs.max_flow is not None:
        cases.append(("maximum", inputs.max_flow))
    return cases


def case_inlet_pressure(inputs, case):
    """Upstream pressure (Pa) a flow case is sized at: the maximum flow at the lowest upstream
    pressure, the minimum flow at the highest, the normal flow at the normal pressure."""
    if case == "maximum" and inputs.min_inlet_pressure is not None:
        return inputs.min_inlet_pressure
    if case == "minimum" and inputs.max_inlet_pressure is not None:
        return inputs.max_inlet_pressure
    return inputs.inlet_pressure


def inlet_state_at(inputs, pressure, normal_inlet):
    """The inlet steam at another upstream pressure, with the same temperature, superheat or
    dryness as the normal inlet is specified by."""
    if pressure == inputs.inlet_pressure:
        return normal_inlet
    field = "valve.max_inlet_pressure" if pressure > inputs.inlet_pressure else "valve.min_inlet_pressure"
    try:
        if inputs.inlet_temperature is not None:
            t_sat = saturation_temperature(pressure) if pressure <= CRITICAL_PRESSURE else CRITICAL_TEMPERATURE
            if inputs.inlet_temperature <= t_sat + 1e-6:
                raise InputError(
                    f"at {pressure / 1e5:.4g} bar(a) the inlet temperature {inputs.inlet_temperature - 273.15:.1f} °C "
                    f"is not above saturation ({t_sat - 273.15:.1f} °C): the steam would be wet at that pressure",
                    field=field, value=pressure, fix="check the pressure and its basis, or specify the inlet "
                    "by its superheat or dryness")
            return SteamState.from_pT(pressure, inputs.inlet_temperature)
        if inputs.inlet_superheat is not None:
            return SteamState.from_pT(pressure, saturation_temperature(pressure) + inputs.inlet_superheat)
        return SteamState.from_p_dryness(pressure, inputs.inlet_dryness)
    except OutOfRangeError as exc:
        raise exc.for_field(field) from None


def relief_set_pressure(inputs):
    """The downstream relief set pressure (Pa): [inputs.relief] set_pressure, else the superseded
    valve.relief_set_pressure; None when neither is given."""
    return inputs.set_pressure if inputs.set_pressure is not None else inputs.relief_set_pressure


def steam_viscosity(state):
    """Dynamic viscosity (Pa·s) of the steam of a state; for wet steam, that of its vapour."""
    if state.dryness is not None:
        vapour = SteamState.from_p_dryness(state.pressure, 1.0)
        return dynamic_viscosity(vapour.temperature, vapour.density)
    return dynamic_viscosity(state.temperature, state.density)


def line_drop(state, mass_flow, size, schedule, length, fittings_k, field):
    """Darcy–Weisbach loss of a line (steamcalc.equipment.line_loss.LineLoss) at a state and flow."""
    diameter = pipe_inner_diameter(size, schedule, field=field)
    return line_pressure_drop(mass_flow, state.density, steam_viscosity(state), diameter, length, fittings_k or 0.0)


def valve_inlet_state(inputs, case, flow, normal_inlet):
    """Steam at the valve inlet for a flow case: the upstream (header) state of that case, less
    the inlet line's pressure drop when the line's length is given (adiabatic line: h kept).

    Returns
    -------
    tuple
        ``(state at the valve inlet, inlet line pressure drop Pa)``.
    """
    upstream = inlet_state_at(inputs, case_inlet_pressure(inputs, case), normal_inlet)
    if inputs.inlet_length is None or inputs.inlet_size is None:
        return upstream, 0.0
    loss = line_drop(upstream, flow, inputs.inlet_size, inputs.schedule or DEFAULT_SCHEDULE, inputs.inlet_length,
                     inputs.inlet_fittings_k, "lines.inlet_size")
    if loss.pressure_drop >= 0.5 * (upstream.pressure - inputs.outlet_pressure):
        raise InputError(
            f"the inlet line loses {loss.pressure_drop / 1e5:.3g} bar difference at the {case} flow, half or more of "
            "the drop available to the valve", field="lines.inlet_size", value=inputs.inlet_size,
            fix="choose a larger inlet line or check its length")
    try:
        return SteamState.from_ph(upstream.pressure - loss.pressure_drop, upstream.enthalpy), loss.pressure_drop
    except OutOfRangeError as exc:
        raise exc.for_field("lines.inlet_length") from None


def _diameters(inputs):
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    sizes = {}
    for name in ("inlet_size", "outlet_size", "valve_size"):
        text = getattr(inputs, name)
        section = "valve" if name == "valve_size" else "lines"
        sizes[name] = None if text is None else pipe_inner_diameter(text, schedule, field=f"{section}.{name}")
    return sizes, schedule


def _valve_geometry(inputs):
    """xT and the valve and pipe diameters (mm) that enter the sizing; None where not given."""
    sizes, _ = _diameters(inputs)
    mm = {k: (None if v is None else v * 1000) for k, v in sizes.items()}
    with_fittings = mm["valve_size"] is not None and (mm["inlet_size"] or mm["outlet_size"])
    diameters = (mm["valve_size"], mm["inlet_size"], mm["outlet_size"]) if with_fittings else (None, None, None)
    return (inputs.xt if inputs.xt is not None else DEFAULT_XT), diameters


def required_kv(inputs, inlet, kappa, mass_flow):
    """Sizing of the let-down valve at one flow (kg/s) from the given inlet state to the outlet
    pressure, with the case's xT and fittings.

    Returns
    -------
    steamcalc.equipment.valve.ValveSizing
    """
    xt, (valve_d, inlet_d, outlet_d) = _valve_geometry(inputs)
    return size_steam_valve(mass_flow * 3600, inlet.pressure / 1e3, inputs.outlet_pressure / 1e3,
                            inlet.density, kappa, xt, valve_d=valve_d, inlet_d=inlet_d, outlet_d=outlet_d)


def rated_travel(inputs, kv):
    """Travel (0 to 1) of the rated valve at a required Kv, with the case's characteristic."""
    characteristic = inputs.characteristic or "equal-percentage"
    rangeability = inputs.rangeability if inputs.rangeability is not None else DEFAULT_RANGEABILITY
    return valve_travel(min(kv, inputs.rated_kv), inputs.rated_kv, characteristic, rangeability)


def valve_section(inputs, inlet, result):
    """Kv, Cv, choked flag and travel for each flow case at its own pressure pair; relief load."""
    fl = inputs.fl if inputs.fl is not None else DEFAULT_FL
    fd = inputs.fd if inputs.fd is not None else DEFAULT_FD
    if inputs.xt is None:
        result.assumptions.append(f"Valve xT = {DEFAULT_XT} (globe valve, common practice; not given)")
    if inputs.fl is None:
        result.assumptions.append(f"Valve FL = {DEFAULT_FL} (globe valve, common practice; not given)")
    kappa = sizing_kappa(inlet, result)
    if inlet.cp is not None:
        result.assumptions.append(
            f"Isentropic exponent κ = w²ρ/p = {kappa:.4f} from IF97 at the inlet (the specific-heat ratio "
            f"cp/cv = {inlet.cp / inlet.cv:.4f} differs by {100 * abs(inlet.cp / inlet.cv / kappa - 1):.1f} %; "
            "κ is the property the expansion of real steam follows)")
    result.assumptions.append(f"FL = {fl:g} and Fd = {fd:g} are recorded for the valve; for steam (compressible, "
                              "turbulent) the sizing uses xT, and FL, Fd matter only for liquid or laminar flow")
    result.assumptions.append("Flow cases at their own upstream pressure: the maximum flow at the lowest upstream "
                              "pressure (largest Kv), the minimum flow at the highest (smallest Kv), the normal flow "
                              "at the normal pressure (common practice)")
    with_fittings = _valve_geometry(inputs)[1][0] is not None
    result.add("isentropic_exponent", "Isentropic exponent at the inlet", kappa)
    sizing, states, kappas = {}, {}, {}
    for name, flow in flow_cases(inputs):
        state, drop = valve_inlet_state(inputs, name, flow, inlet)
        kappas[name] = sizing_kappa(state)
        s = required_kv(inputs, state, kappas[name], flow)
        sizing[name], states[name] = s, state
        result.states[f"valve_inlet_{name}"] = state
        if drop:
            result.add(f"inlet_line_pressure_drop_{name}", f"Inlet line pressure drop, {name} flow", drop / 1e5, "bar")
        result.add(f"valve_kv_{name}", f"Required Kv, {name} flow", s.kv, "m**3/h")
        result.add(f"choked_{name}", f"Choked flow, {name} flow", s.choked)
        # A number, not a text "p1 → p2": views write it in their own units and verify compares it as a number.
        result.add(f"valve_inlet_pressure_{name}", f"Valve inlet pressure the {name} flow is sized at",
                   state.pressure / 1e5, "bar")
    design_case = "maximum" if "maximum" in sizing else "normal"
    design, state = sizing[design_case], states[design_case]
    p1_kpa = state.pressure / 1e3
    design_kappa = kappas[design_case]
    if f"inlet_line_pressure_drop_{design_case}" in result.values:
        header = case_inlet_pressure(inputs, design_case)
        result.work("Valve inlet pressure", f"p1 = p_header − Δp_inlet line  ({design_case} flow; Darcy–Weisbach)",
                    "p_header - dp_inlet", state.pressure / 1e5, "bar", p_header=(header / 1e5, "bar"),
                    dp_inlet=((header - state.pressure) / 1e5, "bar", "difference"))
    p1, p2 = (state.pressure / 1e5, "bar"), (inputs.outlet_pressure / 1e5, "bar")
    result.work("Pressure differential ratio", f"x = (p1 − p2) / p1  ({design_case} flow)", "(p1 - p2)/p1", design.x,
                p1=p1, p2=p2)
    # Without fittings xTP is xT itself; the symbol says which the step used.
    xt_symbol = "xTP" if with_fittings else "xT"
    result.work("Choked limit",
                "x_choked = Fγ·xT  (Fγ = κ/1.40)" + ("; xTP with fittings" if with_fittings else ""),
                f"kappa/1.4*{xt_symbol}", design.x_choked, kappa=(design_kappa, ""), **{xt_symbol: (design.xtp, "")})
    result.work("Expansion factor", "Y = 1 − min(x, x_choked) / (3·x_choked)", "1 - min(x, x_choked)/(3*x_choked)",
                design.expansion_factor, x=(design.x, ""), x_choked=(design.x_choked, ""))
    design_flow = dict(flow_cases(inputs))[design_case]
    # N6 = 3.16 holds for W in kg/h, p1 in kPa and ρ1 in kg/m³ only: the step keeps those units.
    result.work(f"Required Kv ({design_case} flow)", "Kv = W / (N6·Fp·Y·√(x_siz·p1·ρ1)), N6 = 3.16",
                "W/(3.16*Fp*Y*sqrt(x_siz*p1*rho1))", design.kv, "m**3/h", units_fixed=True, role="flow_coefficient",
                W=(design_flow * 3600, "kg/h"), Fp=(design.piping_factor, ""), Y=(design.expansion_factor, ""),
                x_siz=(min(design.x, design.x_choked), ""), p1=(p1_kpa, "kPa"), rho1=(state.density, "kg/m**3"))
    result.add("valve_kv", f"Required Kv (sized on the {design_case} flow)", design.kv, "m**3/h")
    result.add("valve_cv", f"Required Cv (sized on the {design_case} flow)", kv_to_cv(design.kv), "")
    result.add("choked", f"Choked flow at the {design_case} flow", design.choked)
    result.add("piping_geometry_factor", "Piping geometry factor Fp", design.piping_factor)
    # Choked when x ≥ Fγ·xT (IEC 60534-2-1), so the check passes only below the limit.
    x, x_choked = (design.x, ""), (design.x_choked, "")
    result.check_limit(
        "Choked flow", x, [("<", x_choked, "warn")],
        lambda status: Phrase.of(
            "x = {x:.3f} ≥ Fγ·xT = {x_choked:.3f}: the valve is choked; flow no longer rises with a lower outlet "
            "pressure, and noise is likely; consider a low-noise trim or a two-stage let-down" if status == "warn" else
            "x = {x:.3f} below the choked limit {x_choked:.3f}", x=x, x_choked=x_choked),
        source="IEC 60534-2-1")
    if inputs.rated_kv is not None:
        _rated_valve(inputs, sizing, design, result)
    return sizing


def _rated_valve(inputs, sizing, design, result):
    kvs = inputs.rated_kv
    characteristic = inputs.characteristic or "equal-percentage"
    rangeability = inputs.rangeability if inputs.rangeability is not None else DEFAULT_RANGEABILITY
    result.add("rated_kv", "Rated Kv of the selected valve", kvs, "m**3/h")
    rated = Amount(kvs, "m**3/h", role="flow_coefficient")
    required = Amount(design.kv, "m**3/h", role="flow_coefficient")
    result.check_limit(
        "Rated Kv sufficient", required, [("<=", rated, "fail")],
        lambda status: Phrase.of(
            "the selected valve (Kvs {kvs:.2f}) is smaller than the required {kv:.2f}" if status == "fail" else
            "Kvs {kvs:.2f} ≥ required {kv:.2f}", kvs=rated, kv=required))
    for name, s in sizing.items():
        travel = rated_travel(inputs, s.kv)
        result.add(f"valve_travel_{name}", f"Valve travel, {name} flow", 100.0 * travel, "percent")
        result.check_limit(f"Valve travel at {name} flow", (100.0 * travel, "percent"), travel_limits(),
                           Phrase.of(f"{{travel:.0f}} travel ({characteristic}, R = {rangeability:g}); "
                                     "10-90 % usable, 20-80 % preferred (common practice)",
                                     travel=(100.0 * travel, "percent")), source="common practice")
    # The travel of a valve too small for the flow is full travel: min(Kv, Kvs). A ratio of Kvs is a fraction,
    # which a percent holds a hundred times; a logarithm is a plain number, so the percent is written out.
    expression = "min(Kv, Kvs)/Kvs" if characteristic == "linear" else "100*(1 + ln(min(Kv, Kvs)/Kvs)/ln(R))"
    ratios = dict(Kv=Amount(sizing["normal"].kv, "m**3/h", role="flow_coefficient"), Kvs=rated)
    if characteristic != "linear":
        ratios["R"] = (rangeability, "")
    result.work("Valve travel (normal flow)", "h = Kv/Kvs (linear) or h = 1 + ln(Kv/Kvs)/ln R (equal-percentage)",
                expression, result.value("valve_travel_normal"), "percent", **ratios)


def upstream_relieving_pressure(inputs, atmospheric_pressure, result=None):
    """The highest pressure the upstream reaches when the let-down fails open (Pa absolute).

    ``valve.max_inlet_pressure`` is, by ``valve.upstream_pressure_basis``, either the upstream safety
    valve's set pressure (the default), to which its accumulation is added on the gauge pressure,

    .. math:: p_{up} = p_{set,up} + a\\,(p_{set,up} - p_{atm})

    or already the highest pressure the upstream reaches ("relieving pressure"), taken as it is.

    Parameters
    ----------
    inputs : Inputs
        The let-down's inputs; ``max_inlet_pressure`` in Pa absolute.
    atmospheric_pressure : float
        The site's atmospheric pressure, Pa.
    result : Result, optional
        Where the step and the assumption are written.

    Returns
    -------
    float
        Pa absolute.

    References
    ----------
    API RP 520 Part I (7th ed., 2000), 3.5.2 (operating contingencies) and Table 2: a single pressure-relief
    device limits the accumulated pressure to 110 % of the MAWP, i.e. 10 % of the gauge set pressure of a valve set
    at the MAWP. ASME BPVC Section I, PG-67: a boiler's safety valves allow 6 %, so 10 % is the conservative default.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> given = SimpleNamespace(max_inlet_pressure=19.01325e5, upstream_pressure_basis=None, upstream_accumulation=None)
    >>> round(upstream_relieving_pressure(given, 1.01325e5) / 1e5, 5)
    20.81325
    """
    p_given = inputs.max_inlet_pressure
    basis = inputs.upstream_pressure_basis or DEFAULT_UPSTREAM_PRESSURE_BASIS
    if basis == "relieving pressure":
        if result is not None:
            result.assumptions.append(
                "The highest upstream pressure is given as the highest the upstream reaches "
                "(valve.upstream_pressure_basis = 'relieving pressure'): no accumulation is added")
        return p_given
    accumulation = (inputs.upstream_accumulation if inputs.upstream_accumulation is not None
                    else DEFAULT_UPSTREAM_ACCUMULATION)
    p_up = p_given + accumulation * (p_given - atmospheric_pressure)
    if result is not None:
        result.assumptions.append(
            "The highest upstream pressure is the upstream safety valve's set pressure (valve.upstream_pressure_basis "
            f"= 'set pressure'{'' if inputs.upstream_pressure_basis else ', the default'}): the relief load is taken "
            f"at its relieving pressure, with an accumulation of {100 * accumulation:g} % of the gauge set pressure"
            + ("" if inputs.upstream_accumulation is not None else
               " (the single-device allowance for operating contingencies of API RP 520 Part I, 7th ed., 3.5.2 and "
               "Table 2: 110 % of the MAWP, 10 % of a set pressure at the MAWP; a boiler's safety valves under ASME "
               "Section I, PG-67, allow 6 %: give valve.upstream_accumulation)"))
        result.work("Upstream relieving pressure", "p_up = p_set,up + a·(p_set,up − p_atm)  (accumulation on the "
                    "gauge set pressure)", "p_set_up + a*(p_set_up - p_atm)", p_up / 1e5, "bar",
                    p_set_up=(p_given / 1e5, "bar"), a=(accumulation, ""), p_atm=(atmospheric_pressure / 1e5, "bar"))
        result.add("upstream_relieving_pressure", "Highest upstream pressure at relief (set pressure plus "
                   "accumulation)", p_up / 1e5, "bar")
    return p_up


def relief_load_section(inputs, inlet, site, result):
    """Flow through the rated valve, and through the bypass, wide open at the highest upstream
    pressure against the downstream relief set pressure; the relief device's design flow."""
    if inputs.rated_kv is None and inputs.bypass_kv is None:
        return
    p_up = (inputs.inlet_pressure if inputs.max_inlet_pressure is None
            else upstream_relieving_pressure(inputs, site.atmospheric_pressure, result))
    if inputs.max_inlet_pressure is None:
        result.check("Highest upstream pressure given", "warn",
                     Phrase.of("no highest upstream pressure: the fail-open flow is taken at the normal inlet pressure "
                               "{p_up:.4g}, which understates the relief load if the inlet can rise (boiler or HP "
                               "header safety-valve setting); give valve.max_inlet_pressure", p_up=(p_up / 1e5, "bar")))
    set_pressure = relief_set_pressure(inputs)
    if set_pressure is not None:
        p_down = set_pressure
        against = "the relief set pressure {p_down:.4g}"
    else:
        p_down = inputs.outlet_pressure
        against = ("the normal outlet pressure {p_down:.4g} (no relief set pressure given; at the set pressure the "
                   "flow is the same when choked and lower when not)")
    where = Phrase.of(against, p_down=(p_down / 1e5, "bar")).text()
    if p_down >= p_up:
        raise InputError("the relief set pressure must be below the upstream pressure",
                         field="relief.set_pressure" if inputs.set_pressure is not None else "valve.relief_set_pressure",
                         value=p_down, fix="check the pressure and its basis (bar(g)/bar(a))")
    normal_state = inlet_state_at(inputs, p_up, inlet)
    state, basis = relief_inlet_state(inputs, p_up, normal_state)
    kappa = sizing_kappa(state)
    result.assumptions.append(
        f"Relief load: valve and bypass wide open at the highest upstream pressure {p_up / 1e5:.4g} bar(a), "
        f"on {basis} against {where}; no credit "
        "for the low-pressure users' consumption (common practice). The valve failing open and the bypass opened in "
        "error are taken as separate single failures, not together (the single-jeopardy basis of API Std 521, "
        "6th ed., 4.2.3: two or more unrelated causes of overpressure at once, double jeopardy, are not a basis "
        "for design)")
    xt, (valve_d, inlet_d, outlet_d) = _valve_geometry(inputs)
    flows = {}
    if inputs.rated_kv is not None:
        kvs = inputs.rated_kv
        # Wide open, the fittings act on the rated Kv, not on the Kv the design flow needs.
        fp, xtp = piping_factors(kvs, valve_d, inlet_d, outlet_d, xt) if valve_d is not None else (1.0, xt)
        flows["fail_open_flow"] = valve_flow(kvs, p_up / 1e3, p_down / 1e3, state.density, kappa, xtp, fp)
        result.add("fail_open_flow", "Fail-open flow of the rated valve", flows["fail_open_flow"], "kg/h")
        # N6 = 3.16 holds for W in kg/h, p in kPa and ρ1 in kg/m³ only: the step keeps those units.
        xt_symbol = "xTP" if valve_d is not None else "xT"
        x_choked = f"kappa/1.4*{xt_symbol}"
        result.work("Fail-open flow", "W = N6·Fp·Kvs·Y·√(x_siz·p1·ρ1), valve wide open, p1 the highest upstream "
                    "pressure, p2 the " + ("relief set pressure" if set_pressure else "normal outlet pressure (no relief "
                    "set pressure given)") + "; Y = 1 − x_siz/(3·Fγ·xT), x_siz = min((p1 − p2)/p1, Fγ·xT), Fγ = κ/1.40",
                    f"3.16*Fp*Kvs*(1 - min((p1 - p2)/p1, {x_choked})/(3*({x_choked})))"
                    f"*sqrt(min((p1 - p2)/p1, {x_choked})*p1*rho1)", flows["fail_open_flow"], "kg/h", units_fixed=True,
                    Fp=(fp, ""), Kvs=Amount(kvs, "m**3/h", role="flow_coefficient"), p1=(p_up / 1e3, "kPa"),
                    p2=(p_down / 1e3, "kPa"), kappa=(kappa, ""), rho1=(state.density, "kg/m**3"),
                    **{xt_symbol: (xtp, "")})
    if inputs.bypass_kv is not None:
        flows["bypass_open_flow"] = valve_flow(inputs.bypass_kv, p_up / 1e3, p_down / 1e3, state.density, kappa, xt)
        result.add("bypass_open_flow", "Flow through the bypass valve wide open", flows["bypass_open_flow"], "kg/h")
        # N6 = 3.16 holds for W in kg/h, p in kPa and ρ1 in kg/m³ only: the step keeps those units.
        result.work("Bypass-open flow", "W = N6·Kv_bypass·Y·√(x_siz·p1·ρ1), Fp = 1, xT the main valve's; "
                    "Y = 1 − x_siz/(3·Fγ·xT), x_siz = min((p1 − p2)/p1, Fγ·xT), Fγ = κ/1.40",
                    "3.16*Kv_bypass*(1 - min((p1 - p2)/p1, kappa/1.4*xT)/(3*(kappa/1.4*xT)))"
                    "*sqrt(min((p1 - p2)/p1, kappa/1.4*xT)*p1*rho1)", flows["bypass_open_flow"], "kg/h",
                    units_fixed=True, Kv_bypass=Amount(inputs.bypass_kv, "m**3/h", role="flow_coefficient"),
                    p1=(p_up / 1e3, "kPa"), p2=(p_down / 1e3, "kPa"), kappa=(kappa, ""), xT=(xt, ""),
                    rho1=(state.density, "kg/m**3"))
        result.assumptions.append(f"Bypass valve at the main valve's xT = {xt:g}, no reducers (a bypass with a lower "
                                  "xT passes less when choked)")
    if state is not normal_state and "fail_open_flow" in flows:
        # What the normal inlet temperature would have given: the record shows what the worst state adds.
        at_normal = valve_flow(inputs.rated_kv, p_up / 1e3, p_down / 1e3, normal_state.density,
                               sizing_kappa(normal_state), xtp, fp)
        result.add("fail_open_flow_at_normal_temperature", "Fail-open flow at the normal inlet temperature "
                   "(not the basis)", at_normal, "kg/h")
    governing = max(flows, key=flows.get)
    design_flow = flows[governing]
    what = "the control valve failing open" if governing == "fail_open_flow" else "the bypass valve wide open"
    result.add("relief_design_flow", "Relief design flow (larger of fail-open and bypass-open)", design_flow, "kg/h")
    # What the relief designer needs, not a verdict: a notice, and among the warnings as something to act on.
    result.notice("Relief design flow for the relief designer", act=True, detail=Phrase.of(
        f"{what} passes about {{flow:,.0f}} from {{p_up:.4g}} against {against}: the downstream relief device "
        "must be sized for this flow, to the local pressure-equipment code",
        flow=(design_flow, "kg/h"), p_up=(p_up / 1e5, "bar"), p_down=(p_down / 1e5, "bar")))


def relief_inlet_state(inputs, p_up, normal_state):
    """The densest credible inlet steam at the highest upstream pressure, and its description.

    Superheated steam that loses its superheat is denser and passes more through a valve wide open, so
    the relief load is taken on dry saturated steam at ``p_up``, or at the least superheat the inputs say
    the steam keeps for certain (``relief_min_superheat``) when that is below the normal inlet's. Wet and
    supercritical inlets are taken as they are.
    """
    if normal_state.dryness is not None or p_up > CRITICAL_PRESSURE:
        return normal_state, f"the inlet steam as specified ({normal_state.temperature - 273.15:.1f} °C)"
    t_sat = saturation_temperature(p_up)
    if inputs.relief_min_superheat is None:
        return (SteamState.from_p_dryness(p_up, 1.0),
                f"dry saturated steam ({t_sat - 273.15:.1f} °C: the densest credible steam; give "
                "valve.relief_min_superheat if the superheat is kept for certain)")
    temperature = t_sat + inputs.relief_min_superheat
    if temperature >= normal_state.temperature:
        return normal_state, f"the normal inlet temperature ({normal_state.temperature - 273.15:.1f} °C)"
    return (SteamState.from_pT(p_up, temperature),
            f"steam with the least superheat given, {inputs.relief_min_superheat:g} K ({temperature - 273.15:.1f} °C)")


def _smallest_size(mass_flow, density, limit, schedule, non_preferred=False):
    for dn, _ in sorted(DN_TO_NPS.items()):
        if dn in NON_PREFERRED_DN and not non_preferred:
            continue
        try:
            d = pipe_inner_diameter(f"DN{dn}", schedule)
        except InputError:
            continue
        if line_velocity(mass_flow, density, d) <= limit:
            return f"DN{dn}"
    return None


def line_section(inputs, inlet, throttled, outlet, result):
    """Line velocities at the design flow; the smallest standard sizes under the limits."""
    design_flow = inputs.max_flow if inputs.max_flow is not None else inputs.mass_flow
    sizes, schedule = _diameters(inputs)
    spray_ratio = result.value("outlet_mass_flow") / result.value("inlet_mass_flow")
    wet_limit = inputs.max_velocity_wet or DEFAULT_MAX_VELOCITY_WET
    hot_limit = inputs.max_velocity_superheated or DEFAULT_MAX_VELOCITY_SUPERHEATED
    if inputs.max_velocity_wet is None or inputs.max_velocity_superheated is None:
        result.assumptions.append(f"Line velocity limits {wet_limit:g} m/s for saturated or wet steam and "
                                  f"{hot_limit:g} m/s for superheated steam (common practice)")
    design_case = "maximum" if inputs.max_flow is not None else "normal"
    # The inlet line carries the design flow at that case's valve inlet state (the lowest upstream
    # pressure, less the line's drop, for the maximum flow): the least dense steam, the highest velocity.
    inlet = result.states[f"valve_inlet_{design_case}"]   # found by valve_section
    result.assumptions.append(f"Line velocities at the {design_case} flow, the inlet line at "
                              f"{inlet.pressure / 1e5:.4g} bar(a), schedule {schedule} pipe (ASME B36.10M)")

    if throttled is not outlet:
        result.assumptions.append("Downstream of the desuperheater the saturated/wet steam velocity limit applies: "
                                  "spray droplets may remain in the line (common practice)")
    if not inputs.non_preferred_sizes:
        result.assumptions.append("Suggested line sizes skip the non-preferred sizes "
                                  + ", ".join(f"DN{dn}" for dn in NON_PREFERRED_DN) + " (common practice)")

    def superheated(state):
        if state is outlet and throttled is not outlet:
            return False
        return state.phase == "superheated vapour" and (state.superheat or 0) > 5.0

    def limit(state):
        return hot_limit if superheated(state) else wet_limit

    def limit_source(state):
        given = inputs.max_velocity_superheated if superheated(state) else inputs.max_velocity_wet
        return "" if given is not None else "common practice"

    for key, state, flow, size_key, label in (
            ("inlet", inlet, design_flow, "inlet_size", "Inlet line"),
            ("outlet", outlet, design_flow * spray_ratio, "outlet_size", "Outlet line")):
        suggested = _smallest_size(flow, state.density, limit(state), schedule, bool(inputs.non_preferred_sizes))
        result.add(f"suggested_{key}_size", f"{label}: smallest size under {limit(state):g} m/s",
                   suggested or "larger than DN600")
        if sizes[size_key] is None:
            continue
        velocity = line_velocity(flow, state.density, sizes[size_key])
        result.add(f"{key}_velocity", f"{label} velocity ({getattr(inputs, size_key)})", velocity, "m/s")
        speed, most = (velocity, "m/s"), (limit(state), "m/s")
        result.check_limit(
            f"{label} velocity", speed, [("<=", most, "warn")],
            lambda status: Phrase.of(
                f"{{velocity:.1f}} in {getattr(inputs, size_key)} exceeds {{limit:g}}: "
                + ("a noisy and erosive station; " if key == "outlet" else "")
                + f"{suggested or 'a size above DN600'} keeps under the limit (common practice)" if status == "warn"
                else "{velocity:.1f} within {limit:g}", velocity=speed, limit=most),
            source=limit_source(state))
    if throttled is not outlet and sizes["outlet_size"] is not None:
        velocity = line_velocity(design_flow, throttled.density, sizes["outlet_size"])
        result.add("valve_outlet_velocity", "Velocity after the valve, before the desuperheater", velocity, "m/s")
