"""The let-down valve's aerodynamic noise and outlet Mach number at each flow case, and a two-stage proposal.

IEC 60534-8-3 (through fluids) at each flow case's Kv and pressures; the valve-outlet Mach number against the
method's scope; when the noise or the pressure ratio calls for it, two valves in series, each sized on its own
valve, split for the least combined level. Called by :func:`steamcalc.calcs.letdown.calculation.calculate`
after the valve section; adds its values, steps and checks to the same Result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ...equipment.noise import (
    DEFAULT_NOISE_LIMIT, DRY_GAS_SOURCE, OUTLET_MACH_LIMIT, OUTLET_MACH_SOURCE, combined_level, outlet_mach,
    parse_sound_level, valve_noise,
)
from ...equipment.piping import DN_TO_NPS, pipe_dimensions, pipe_inner_diameter
from ...equipment.valve import size_steam_valve
from ...errors import InputError, NotConvergedError
from ...properties.engines import FAST_ENGINE, using_engine
from ...properties.steam import SteamState
from ...units.amounts import Amount, Phrase
from .equipment import (
    DEFAULT_FD, DEFAULT_FL, DEFAULT_SCHEDULE, DEFAULT_XT, NON_PREFERRED_DN, _valve_geometry, flow_cases, sizing_kappa,
)

#: Pressure ratio p1/p2 above which a two-stage let-down is proposed (common practice: beyond
#: about 5 a single trim runs far past choking, with high noise and trim wear).
TWO_STAGE_RATIO = 5.0
#: The two-stage split of least combined noise: each stage takes between SPLIT_SHARE and 1 - SPLIT_SHARE of the
#: overall pressure ratio in ln p (the rule of this proposal: a stage that takes less does little, and the quietest
#: "split" would otherwise be one valve and a throttle that does nothing); SPLIT_SCAN intermediate pressures even in
#: ln p over that span, then a golden-section search in the best one's bracket until the bracket is SPLIT_TOLERANCE
#: wide in ln p (0.1 % of the pressure; the combined level changes by far less than 0.01 dB over it), within
#: SPLIT_STEPS steps (about 12 are needed; more means the search is broken).
SPLIT_SHARE = 0.25
SPLIT_SCAN = 12
SPLIT_TOLERANCE = 1e-3
SPLIT_STEPS = 40
GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


def noise_geometry(inputs):
    """(valve outlet port, its bore m, bore m and wall m of the pipe the valve discharges into).

    The pipe is the outlet line, or the outlet of an expander fitted on the valve outlet when one is given
    (valve.outlet_expander_size), which must then be larger than the port.
    """
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    port = inputs.valve_outlet_size or inputs.valve_size or inputs.outlet_size
    field = "valve.valve_outlet_size" if inputs.valve_outlet_size else "valve.valve_size"
    port_d = pipe_inner_diameter(port, schedule, field=field)
    if inputs.outlet_expander_size is None:
        pipe_d, wall = pipe_dimensions(inputs.outlet_size, schedule, field="lines.outlet_size")
        return port, port_d, pipe_d, wall
    pipe_d, wall = pipe_dimensions(inputs.outlet_expander_size, schedule, field="valve.outlet_expander_size")
    if pipe_d <= port_d:
        raise InputError(f"an expander on the valve outlet widens it: {inputs.outlet_expander_size} is not larger "
                         f"than the {port} outlet port", field="valve.outlet_expander_size",
                         value=inputs.outlet_expander_size,
                         fix=f"give the expander's outlet size, larger than {port}, or leave it out")
    return port, port_d, pipe_d, wall


def _noise_pipe(inputs):
    return inputs.outlet_expander_size or inputs.outlet_size


def stage_noise(inputs, inlet, p2, flow, geometry, kv=None, outlet=None):
    """Kv, noise (dB(A)) and outlet state of one stage from an inlet state to p2 (the Kv sized
    here unless given; the outlet state, isenthalpic at p2, found here unless given)."""
    kappa = sizing_kappa(inlet)
    if kv is None:
        xt, (valve_d, inlet_d, outlet_d) = _valve_geometry(inputs)
        kv = size_steam_valve(flow * 3600, inlet.pressure / 1e3, p2 / 1e3, inlet.density, kappa, xt,
                              valve_d=valve_d, inlet_d=inlet_d, outlet_d=outlet_d).kv
    outlet = SteamState.from_ph(p2, inlet.enthalpy) if outlet is None else outlet
    _, port_d, pipe_d, wall = geometry
    return kv, _level(inputs, flow, inlet, outlet, kappa, kv, port_d, pipe_d, wall), outlet


def _level(inputs, flow, inlet, outlet, kappa, kv, port_d, pipe_d, wall):
    return valve_noise(flow, inlet, outlet, kappa, kv, port_d, pipe_d, wall,
                       inputs.fd if inputs.fd is not None else DEFAULT_FD,
                       inputs.fl if inputs.fl is not None else DEFAULT_FL)


def noise_section(inputs, result):
    """IEC 60534-8-3 noise at each flow case, the valve outlet Mach number against the method's
    scope, the steam's phase against it, and a two-stage proposal."""
    limit = parse_sound_level(inputs.noise_limit) if inputs.noise_limit is not None else DEFAULT_NOISE_LIMIT
    if inputs.outlet_size is None or (inputs.valve_size is None and inputs.valve_outlet_size is None):
        result.assumptions.append("Valve noise (IEC 60534-8-3) and outlet Mach number not predicted: they need "
                                  "valve.valve_size and lines.outlet_size")
        return
    geometry = noise_geometry(inputs)
    port, port_d, pipe_d, wall = geometry
    if inputs.noise_limit is None:
        result.assumptions.append(f"Noise limit {DEFAULT_NOISE_LIMIT:g} dB(A) at 1 m (common practice)")
    pipe = (f"the {inputs.outlet_expander_size} outlet of the expander on the valve outlet"
            if inputs.outlet_expander_size else f"a {inputs.outlet_size} steel pipe")
    result.assumptions.append(
        f"Valve noise by IEC 60534-8-3 (fluids' implementation) at each flow case's Kv and pressures, A-weighted, "
        f"1 m from {pipe} (schedule {inputs.schedule or DEFAULT_SCHEDULE}, bore {1000 * pipe_d:.1f} mm, wall "
        f"{1000 * wall:.2f} mm), valve outlet {port}, FL and Fd of the valve, without the reducers' FLP; a standard "
        "(not low-noise) trim. The method holds for single-phase dry gases and vapours up to a valve outlet Mach "
        f"number of {OUTLET_MACH_LIMIT:g} ({OUTLET_MACH_SOURCE}); the implementation adds the noise of an expander "
        "only when the downstream pipe's own Mach number exceeds 0.3 (fluids.control_valve.control_valve_noise_g_2011)")
    levels, machs, wet = {}, {}, {}
    for name, flow in flow_cases(inputs):
        inlet = result.states[f"valve_inlet_{name}"]
        _, level, outlet = stage_noise(inputs, inlet, inputs.outlet_pressure, flow, geometry,
                                       kv=result.value(f"valve_kv_{name}"))
        result.states[f"valve_outlet_{name}"] = outlet
        levels[name] = level
        result.add(f"valve_noise_{name}", f"Valve noise at 1 m, A-weighted, {name} flow", level, "dB")
        machs[name] = outlet_mach(flow, outlet, port_d)
        result.add(f"valve_outlet_mach_{name}", f"Valve outlet Mach number, {name} flow", machs[name])
        if outlet.dryness is not None:
            wet[name] = outlet.dryness
    if wet:   # saturated or wet: no single-phase speed of sound (steamcalc.equipment.noise.speed_of_sound)
        result.assumptions.append("Outlet Mach number of saturated or wet steam on the homogeneous-equilibrium speed "
                                  "of sound, w² = (∂p/∂ρ)s along the IF97 isentrope, with the mixture density (the "
                                  "vapour's own speed of sound is higher and would understate the Mach number)")
    loudest = max(levels, key=levels.get)
    flow = dict(flow_cases(inputs))[loudest]
    # The IEC 60534-8-3 route (stream power, acoustic efficiency, transmission loss) is a procedure, not one
    # formula: the step names it with the operating point it was run at.
    result.work(f"Valve noise ({loudest} flow)", "L_pAe,1m  [IEC 60534-8-3: stream power, acoustic efficiency, "
                "pipe transmission loss, A-weighted]", "L_pAe(W, p1, p2, Kv)", levels[loudest], "dB",
                W=(flow * 3600, "kg/h"), p1=(result.states[f"valve_inlet_{loudest}"].pressure / 1e5, "bar"),
                p2=(inputs.outlet_pressure / 1e5, "bar"),
                Kv=Amount(result.value(f"valve_kv_{loudest}"), "m**3/h", role="flow_coefficient"))
    # A level's unit is written dB(A) (steamcalc.units.formatting): every level steamcalc records is A-weighted.
    level, most = (levels[loudest], "dB"), (limit, "dB")
    limit_source = "" if inputs.noise_limit is not None else "common practice"
    result.check_limit(
        "Valve noise", level, [("<=", most, "warn")],
        lambda status: Phrase.of(
            f"{{level:.1f}} at 1 m at the {loudest} flow exceeds {{limit:g}}: a low-noise trim, acoustic "
            "lagging, a heavier downstream wall or a two-stage let-down" if status == "warn" else
            f"{{level:.1f}} at 1 m at the {loudest} flow, within {{limit:g}}", level=level, limit=most),
        source=limit_source)
    worst = max(machs, key=machs.get)
    result.add("valve_outlet_mach_maximum", "Valve outlet Mach number, highest", machs[worst])
    outlet_mach_check(result, "Valve outlet Mach number", machs[worst], port, f"at the {worst} flow",
                      expander=inputs.outlet_expander_size)
    if wet:
        _dry_steam_check(wet, result)
    _two_stage(inputs, levels[loudest], limit, geometry, result)


def outlet_mach_check(result, name, mach, port, where, expander=None, breach=None, **where_amounts):
    """The valve outlet Mach number against the 0.3 to which IEC 60534-8-3 predicts the noise.

    Above it the level is outside the method, a failing check, unless an expander is fitted on the valve
    outlet (``expander``, its size): the standard's high-Mach procedure then applies, which the implementation
    used here adds only when the downstream pipe's Mach number exceeds 0.3, so a warning. ``breach`` sets the
    verdict of a breach otherwise (a proposal's stage warns: it is advice, not the design). ``where`` is a phrase
    template whose slots ``where_amounts`` fill.
    """
    breach = breach or ("warn" if expander else "fail")
    over = mach - OUTLET_MACH_LIMIT
    amounts = dict(mach=(mach, ""), limit=(OUTLET_MACH_LIMIT, ""), over=(over, ""),
                   share=(100.0 * over / OUTLET_MACH_LIMIT, "percent"), **where_amounts)
    text = f"Mach {{mach:.3f}} in the {port} outlet " + where

    def phrase(status):
        if status == "pass":
            return Phrase.of(text + ", within the {limit:g} to which IEC 60534-8-3 predicts the noise",
                             mach=amounts["mach"], limit=amounts["limit"], **where_amounts)
        if expander:
            return Phrase.of(
                text + " is {over:.3f} ({share:.0f}) above {limit:g}: with the expander to "
                f"{expander} on the valve outlet the standard's high-Mach procedure (noise in the expander) applies, "
                "which the implementation used here adds only when the downstream pipe's Mach number exceeds 0.3: "
                "the level may be understated; the valve maker's prediction governs", **amounts)
        return Phrase.of(
            text + " is {over:.3f} ({share:.0f}) above the {limit:g} to which IEC 60534-8-3 predicts the noise: the "
            "level is outside the method; a larger valve outlet, or an expander on the valve outlet "
            "(valve.outlet_expander_size) and the valve maker's prediction", **amounts)
    result.check_limit(name, (mach, ""), [("<=", (OUTLET_MACH_LIMIT, ""), breach)], phrase, source=OUTLET_MACH_SOURCE)


def _dry_steam_check(wet, result):
    """The steam after the valve against the method's fluids (single-phase dry gases and vapours)."""
    case = min(wet, key=wet.get)
    dryness, dry = (wet[case], ""), (1.0, "")
    result.check_limit(
        "Noise method: dry steam after the valve", dryness, [(">=", dry, "warn")],
        lambda status: Phrase.of(
            f"wet steam after the valve (dryness {{dryness:.4f}} at the {case} flow): IEC 60534-8-3 is for "
            "single-phase dry gases and vapours, so the level is an estimate outside the method (the vapour taken "
            "as a gas); the outlet Mach number is on the homogeneous-equilibrium speed of sound"
            if status == "warn" else
            f"dry saturated steam after the valve at the {case} flow (dryness {{dryness:.4f}})",
            dryness=dryness), source=DRY_GAS_SOURCE)


@dataclass(frozen=True)
class _Body:
    """A valve body a proposed stage may take: its size, body bore (m; None: sized without reducers), outlet
    port and its bore (m), rated Kv (m³/h; None when not known)."""

    size: str
    bore: float | None
    port: str
    port_d: float
    rated_kv: float | None


@dataclass(frozen=True)
class _Stage:
    """One stage of a two-stage proposal on its body: required Kv, outlet Mach number, level dB(A)."""

    body: _Body
    kv: float
    mach: float
    level: float
    outlet: SteamState
    fits: bool   # the body's rated Kv holds the Kv and its outlet Mach number is within the method's 0.3


@dataclass(frozen=True)
class _Split:
    pressure: float
    first: _Stage
    second: _Stage

    @property
    def level(self):
        return combined_level((self.first.level, self.second.level))

    @property
    def fits(self):
        return self.first.fits and self.second.fits


def _valve_series(inputs, geometry):
    """The bodies a stage may take, smallest first: the selected valve, then each larger preferred size up to the
    pipe the stages discharge into, its outlet the size itself and its rated Kv the selected valve's scaled by
    the bore squared (geometrically similar bodies of one series: common practice; the maker's figures govern)."""
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    port, port_d, pipe_d, _ = geometry
    bore = pipe_inner_diameter(inputs.valve_size, schedule, field="valve.valve_size") if inputs.valve_size else None
    base = bore or port_d
    bodies = [_Body(inputs.valve_size or port, bore, port, port_d, inputs.rated_kv)]
    for dn in sorted(DN_TO_NPS):
        if dn in NON_PREFERRED_DN and not inputs.non_preferred_sizes:
            continue
        try:
            d = pipe_inner_diameter(f"DN{dn}", schedule)
        except InputError:
            continue   # not made in this schedule
        if base < d <= pipe_d:
            rated = None if inputs.rated_kv is None else inputs.rated_kv * (d / base) ** 2
            bodies.append(_Body(f"DN{dn}", d, f"DN{dn}", d, rated))
    return bodies


def _stage(inputs, inlet, outlet, flow, series, sides, geometry):
    """A stage from ``inlet`` to ``outlet`` on the first body of the series that holds it (rated Kv and outlet
    Mach number), else on the largest that can be sized; None when none can be (IEC 60534-2-1's reducer
    equations give no Kv). ``sides``: bores (m) of the pipes before and after the stage."""
    kappa = sizing_kappa(inlet)
    xt = inputs.xt if inputs.xt is not None else DEFAULT_XT
    found = None
    for body in series:
        # A pipe no wider than the body joins it without a reducer.
        inlet_d, outlet_d = (1000 * d if body.bore is not None and d is not None and d > body.bore else None
                             for d in sides)
        try:
            kv = size_steam_valve(flow * 3600, inlet.pressure / 1e3, outlet.pressure / 1e3, inlet.density, kappa, xt,
                                  valve_d=None if body.bore is None else 1000 * body.bore, inlet_d=inlet_d,
                                  outlet_d=outlet_d).kv
        except InputError:
            continue
        mach = outlet_mach(flow, outlet, body.port_d)
        found = body, kv, mach, (body.rated_kv is None or kv <= body.rated_kv) and mach <= OUTLET_MACH_LIMIT
        if found[3]:
            break
    if found is None:
        return None
    body, kv, mach, fits = found
    _, _, pipe_d, wall = geometry
    return _Stage(body, kv, mach, _level(inputs, flow, inlet, outlet, kappa, kv, body.port_d, pipe_d, wall), outlet,
                  fits)


def _quietest_split(evaluate, p1, p2):
    """The split of least combined level among those whose stages both fit their bodies; None when none of the
    scan does. Each stage takes :data:`SPLIT_SHARE` to 1 - :data:`SPLIT_SHARE` of ln(p1/p2); a scan of
    :data:`SPLIT_SCAN` pressures even in ln p over that span, then a golden-section search in the best one's
    bracket until it is :data:`SPLIT_TOLERANCE` wide in ln p; the best split evaluated is returned."""
    tried = {}

    def level(x):
        if x not in tried:
            tried[x] = evaluate(math.exp(x))
        split = tried[x]
        return split.level if split is not None and split.fits else math.inf

    span = math.log(p1 / p2)
    low, high = math.log(p2) + SPLIT_SHARE * span, math.log(p1) - SPLIT_SHARE * span
    grid = [low + (high - low) * i / (SPLIT_SCAN - 1) for i in range(SPLIT_SCAN)]
    best = min(range(SPLIT_SCAN), key=lambda i: level(grid[i]))
    if not math.isfinite(level(grid[best])):
        return None
    a, b = grid[max(best - 1, 0)], grid[min(best + 1, SPLIT_SCAN - 1)]
    c, d = b - GOLDEN * (b - a), a + GOLDEN * (b - a)
    for _ in range(SPLIT_STEPS):
        if b - a <= SPLIT_TOLERANCE:
            break
        if level(c) <= level(d):
            b, d = d, c
            c = b - GOLDEN * (b - a)
        else:
            a, c = c, d
            d = a + GOLDEN * (b - a)
    else:
        raise NotConvergedError(
            f"the search for the two-stage split of least noise did not narrow to {SPLIT_TOLERANCE:g} in ln p "
            f"({100 * SPLIT_TOLERANCE:g} % of the pressure) in {SPLIT_STEPS} steps: the bracket is {b - a:.2g} wide",
            field="two-stage split (least combined noise)", value=b - a,
            fix="report this case; the single-stage results stand, the two-stage proposal cannot be made")
    return tried[min(tried, key=level)]


def _two_stage(inputs, noise, limit, geometry, result):
    """The pressure ratio against the single-stage rule and, when it or the noise is above its limit, a two-stage
    proposal: the split of least combined noise, each stage on its own valve of the series and checked."""
    case = "maximum" if inputs.max_flow is not None else "normal"
    inlet = result.states[f"valve_inlet_{case}"]
    p1, p2 = inlet.pressure, inputs.outlet_pressure
    ratio = p1 / p2
    single = result.value(f"valve_noise_{case}")
    pressure_ratio, most_ratio, most = (ratio, ""), (TWO_STAGE_RATIO, ""), (limit, "dB")
    loud = noise > limit
    result.check_limit(
        "Single-stage let-down", pressure_ratio, [("<=", most_ratio, "warn")],
        lambda status: Phrase.of(
            "pressure ratio {ratio:.2f} above {most:g} (common practice: a single trim runs far past choking, with "
            "high noise and trim wear): a two-stage let-down is weighed below", ratio=pressure_ratio, most=most_ratio)
        if status == "warn" else Phrase.of(
            "pressure ratio {ratio:.2f} (up to {most:g}, common practice), but the noise is above {limit:g}: a "
            "two-stage let-down is weighed below" if loud else
            "pressure ratio {ratio:.2f} (up to {most:g}, common practice) and noise within {limit:g}: one stage "
            "suffices", ratio=pressure_ratio, most=most_ratio, limit=most), source="common practice")
    if not loud and ratio <= TWO_STAGE_RATIO:
        return
    flow = dict(flow_cases(inputs))[case]
    series = _valve_series(inputs, geometry)
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    inlet_line = (pipe_inner_diameter(inputs.inlet_size, schedule, field="lines.inlet_size") if inputs.inlet_size
                  else None)
    pipe_d, pipe = geometry[2], _noise_pipe(inputs)
    outlet = result.states[f"valve_outlet_{case}"]

    def evaluate(p_mid):
        middle = SteamState.from_ph(p_mid, inlet.enthalpy)
        first = _stage(inputs, inlet, middle, flow, series, (inlet_line, pipe_d), geometry)
        second = _stage(inputs, middle, outlet, flow, series, (pipe_d, pipe_d), geometry)
        return None if first is None or second is None else _Split(p_mid, first, second)

    selected = series[0]
    result.assumptions.append(
        f"Two-stage proposal at the {case} flow: each stage on the first valve of a series that holds its Kv within "
        f"the rated Kv and its outlet Mach number within {OUTLET_MACH_LIMIT:g}: the selected valve ({selected.size}, "
        f"outlet {selected.port}"
        + (f", rated Kv {selected.rated_kv:g} m³/h" if selected.rated_kv is not None else ", no rated Kv given: "
           "chosen by the outlet Mach number alone")
        + f"), then the larger preferred sizes up to the {pipe} pipe, each with an outlet of its own size and the rated "
        "Kv scaled by the bore squared (geometrically similar bodies of one series, common practice; the maker's "
        "series governs). Each stage is sized by IEC 60534-2-1 at its own inlet state and pressures, with reducers "
        f"to the pipes either side, and its noise found by IEC 60534-8-3 on the {pipe} pipe, the pipe between the "
        "stages taken as that size; the stages' levels add as an energy sum. The split is the one of least combined "
        f"noise with each stage taking {SPLIT_SHARE:g} to {1 - SPLIT_SHARE:g} of ln(p1/p2) (the rule of this "
        "proposal: a stage that takes less does little), searched on the fast IF97 engine and worked at the split found "
        "on the record's engine; the split at equal pressure ratios is shown beside it")
    p_equal = math.sqrt(p1 * p2)
    result.work("Two-stage intermediate pressure (equal pressure ratios)", "p_i = √(p1·p2)", "sqrt(p1*p2)",
                p_equal / 1e5, "bar", p1=(p1 / 1e5, "bar"), p2=(p2 / 1e5, "bar"))
    result.add("two_stage_intermediate_pressure", "Two-stage let-down at equal pressure ratios: intermediate "
               "pressure (for comparison)", p_equal / 1e5, "bar")
    equal = evaluate(p_equal)
    if equal is not None:
        result.add("two_stage_noise_combined_equal_ratios", "Two-stage let-down at equal pressure ratios: combined "
                   "noise at 1 m, A-weighted (for comparison)", equal.level, "dB")
    # The search only chooses the split: it runs on the fast IF97 engine (some 25 noise and sizing evaluations),
    # and the stages at the split it finds are then worked on the record's own engine, so every engine that
    # verifies the record finds the same split.
    with using_engine(FAST_ENGINE):
        searched = _quietest_split(evaluate, p1, p2)
    quietest = evaluate(searched.pressure) if searched is not None else None
    if quietest is not None and not quietest.fits:
        quietest = None
    if equal is not None and equal.fits and (quietest is None or equal.level < quietest.level):
        quietest = equal   # the search's scan does not hold the equal split itself
    proposal = quietest or equal
    if proposal is None:
        result.check("Two-stage let-down: combined noise", "warn", Phrase.of(
            f"no valve of the series from {series[0].size} to the {pipe} pipe can be sized for either stage at the "
            f"{case} flow: a two-stage let-down needs valves larger than the pipe, or the valve maker's design"))
        return
    if quietest is not None:
        result.work("Two-stage intermediate pressure (least combined noise)",
                    "p_i = p_quietest(p1, p2, W): the p of least L(p) = 10·log10(10^(L1(p)/10) + 10^(L2(p)/10)), "
                    "each stage on the first valve of the series that holds it and taking "
                    f"{SPLIT_SHARE:g} to {1 - SPLIT_SHARE:g} of ln(p1/p2); {SPLIT_SCAN} pressures even in ln p, then "
                    f"a golden-section search to {100 * SPLIT_TOLERANCE:g} % of the pressure",
                    "p_quietest(p1, p2, W)", quietest.pressure / 1e5, "bar", p1=(p1 / 1e5, "bar"),
                    p2=(p2 / 1e5, "bar"), W=(flow * 3600, "kg/h"))
    basis = ("least combined noise" if quietest is not None else
             "equal pressure ratios: no split has both stages within the valves of the series")
    result.add("two_stage_split_pressure", f"Two-stage let-down: intermediate pressure ({basis})",
               proposal.pressure / 1e5, "bar")
    stages = (("first", proposal.first, proposal.pressure), ("second", proposal.second, p2))
    for word, stage, _ in stages:
        _stage_results(word, stage, stage.body is series[0], result)
    result.add("two_stage_noise_combined", "Two-stage let-down: combined noise at 1 m, A-weighted", proposal.level,
               "dB")
    result.work("Two-stage combined noise", "L = 10·log10(10^(L1/10) + 10^(L2/10))  (energy sum of the two stages' "
                "levels at 1 m)", "10*log10(10**(L1/10) + 10**(L2/10))", proposal.level, "dB", units_fixed=True,
                L1=(proposal.first.level, "dB"), L2=(proposal.second.level, "dB"))
    for word, stage, pressure in stages:
        # As the single valve's check, but a proposal is advice, not the design: a breach warns.
        outlet_mach_check(result, f"Two-stage let-down: {word}-stage outlet Mach number", stage.mach, stage.body.port,
                          f"at {{p_out:.4g}} ({word} stage)", breach="warn", p_out=(pressure / 1e5, "bar"))
        if stage.body.rated_kv is not None:
            _stage_kv_check(word, stage, stage.body is series[0], pipe, result)
    _combined_check(inputs, case, proposal, quietest, equal, (single, noise, limit, ratio), pipe, result)


def _stage_results(word, stage, selected, result):
    result.add(f"two_stage_valve_{word}", f"Two-stage let-down: {word}-stage valve size", stage.body.size)
    if stage.body.rated_kv is not None:
        how = "the selected valve's" if selected else "the selected valve's scaled by the bore squared"
        result.add(f"two_stage_rated_kv_{word}", f"Two-stage let-down: {word}-stage valve rated Kv ({how})",
                   stage.body.rated_kv, "m**3/h")
    result.add(f"two_stage_kv_{word}", f"Two-stage let-down: {word}-stage Kv", stage.kv, "m**3/h")
    result.add(f"two_stage_outlet_mach_{word}", f"Two-stage let-down: {word}-stage outlet Mach number", stage.mach)
    result.add(f"two_stage_noise_{word}", f"Two-stage let-down: {word}-stage noise at 1 m, A-weighted", stage.level,
               "dB")


def _stage_kv_check(word, stage, selected, pipe, result):
    need = Amount(stage.kv, "m**3/h", role="flow_coefficient")
    rated = Amount(stage.body.rated_kv, "m**3/h", role="flow_coefficient")
    whose = "the selected valve's rated Kv" if selected else (
        "rated Kv scaled from the selected valve's by the bore squared (common practice; the maker's rated Kv governs)")
    result.check_limit(
        f"Two-stage let-down: {word}-stage rated Kv", need, [("<=", rated, "warn")],
        lambda status: Phrase.of(
            f"Kv {{kv:.1f}} is above the rated {{kvs:.1f}} of the {stage.body.size}, the largest valve of the series "
            f"up to the {pipe} pipe that could be sized: the stage needs a larger valve or the maker's design"
            if status == "warn" else f"Kv {{kv:.1f}} within the rated {{kvs:.1f}} of the {stage.body.size}",
            kv=need, kvs=rated), source=whose)


def _combined_check(inputs, case, proposal, quietest, equal, levels, pipe, result):
    """The combined level of the proposal's stages against the noise limit, with what the proposal is."""
    single, noise, limit, ratio = levels
    combined, most = (proposal.level, "dB"), (limit, "dB")
    first, second = proposal.first, proposal.second
    amounts = dict(p_mid=(proposal.pressure / 1e5, "bar"), noise1=(first.level, "dB"), noise2=(second.level, "dB"),
                   combined=combined, single=(single, "dB"), gain=(abs(single - proposal.level), "dB"), limit=most,
                   kv1=Amount(first.kv, "m**3/h", role="flow_coefficient"),
                   kv2=Amount(second.kv, "m**3/h", role="flow_coefficient"))
    if noise > limit:
        why = "noise above the limit"
    else:
        why = "pressure ratio {ratio:.2f} above {most_ratio:g}"
        amounts.update(ratio=(ratio, ""), most_ratio=(TWO_STAGE_RATIO, ""))
    text = (f"{why} at the {case} flow: two valves in series, intermediate {{p_mid:.4g}} "
            + ("(the split of least combined noise" if quietest is not None else "(equal pressure ratios: no split "
               "has both stages within the valves of the series")
            + f"); first stage {first.body.size} at Kv {{kv1:.1f}}, {{noise1:.1f}}; second stage {second.body.size} at "
            "Kv {kv2:.1f}, {noise2:.1f}; together {combined:.1f} at 1 m (energy sum) against {single:.1f} for one "
            + ("stage, {gain:.1f} less" if proposal.level <= single else "stage, {gain:.1f} more"))
    if equal is not None and quietest is not None and quietest is not equal:
        text += "; at equal pressure ratios (intermediate {p_equal:.4g}) {equal:.1f}"
        amounts.update(p_equal=(equal.pressure / 1e5, "bar"), equal=(equal.level, "dB"))
    text += f"; each stage discharges into the {pipe} pipe, the pipe between them included"
    if first.outlet.dryness is not None:
        text += "; the steam between the stages is wet (dryness {dryness:.3f}): outside the method"
        amounts["dryness"] = (first.outlet.dryness, "")
    result.check_limit(
        "Two-stage let-down: combined noise", combined, [("<=", most, "warn")],
        lambda status: Phrase.of(text + ("; still above {limit:g}: low-noise trims or acoustic lagging as well"
                                         if status == "warn" else "; within {limit:g}"), **amounts),
        source="" if inputs.noise_limit is not None else "common practice")
